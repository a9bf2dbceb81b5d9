package report

import (
	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// Cut-offs of the analysis. None of them is a published standard: they are
// our own choices (marked "common practice" where they follow habit), kept
// here so that the report and methods text can quote them.
const (
	// FloorShareFlag: a model whose minimum value covers at least this share
	// of the valid area is flagged as truncated (our choice).
	FloorShareFlag = 0.20
	// TailJumpFlag: a ROC curve whose last segment is a tie (test points
	// share the lowest value with many cells, so the segment starts below
	// y = 1) spanning more than this on the area axis is flagged (our
	// choice). A flat run at y = 1 is never flagged: it is background
	// below every test point, which a good model shows on a large extent.
	TailJumpFlag = 0.20
	// NearCells: test points within NearCells cell widths of a training point
	// count as "near" (our choice).
	NearCells = 3.0
	// NearShareWarn: warn when more than this share of test points is near a
	// training point (our choice).
	NearShareWarn = 0.25
	// MinPairedPoints: a paired difference on fewer common test points
	// than this is reported but not judged (our choice): its t
	// interval from the placements, or its percentile interval from the
	// resamples of so few points, is no basis for a verdict, a ranking or
	// a reading against a null (with 3 points the interval can even have
	// zero width). Its position is "too_few" and its reading ReadingTooFew.
	MinPairedPoints = 10
	// MinResampledPoints: a paired difference whose interval comes from
	// the paired resamples (method "paired_resamples": the partial ROC
	// ratio, the omission rates, the Boyce index) on fewer common test
	// points than this is reported but not judged either (our choice,
	// from the coverage simulation of metrics.TestCoverageSweep on eight
	// landscapes: on 10 common test points up to 12% of the partial ROC
	// ratio's intervals between two models (the truth within the
	// tolerance) and up to 9% of the omission rate's (the truth beyond
	// it) were placed against the default tolerance contrary to the true
	// difference ("inside" with the truth beyond it, or "outside" with it
	// within), where a correct 95% interval errs so at most 5% of the
	// time with the truth within and 2.5% with it beyond; on 30, at most
	// 1.9% and 0.1%; the placements' t interval of the AUC errs so at
	// most 3.8% of the time at 10, the truth within). An omission rate
	// between two extents of one model keeps MinPairedPoints: it is 0 in
	// every resample (minCommonPoints). Its position is "too_few", as
	// below MinPairedPoints, and its reason names this cut-off.
	MinResampledPoints = 30
	// MinCrossingPoints: a partial ROC ratio's difference between two
	// models (or a model and a null) from the resamples is judged only
	// when E n, the number of common test points expected beyond the
	// curve's 1 - E crossing, is at least this (our choice;
	// partialROCMinPoints): 30 points at E = 0.05, 150 at E = 0.01. The
	// ratio rests on the lowest E share of the test points, and the
	// resamples of an extreme order statistic are too narrow. In the
	// coverage simulation (metrics.TestCoverageSweep, seven landscapes
	// with a ratio, E = 0.01, 0.025, 0.05, 0.1 and 0.2) the intervals
	// between two models covered 0.76 to 0.84 at E = 0.01 and 30 points
	// (E n = 0.3), and at E n = 1.5 about what E = 0.05 covers at 30
	// points (0.85 to 0.93 at E = 0.05 and 30; 0.83 to 0.94 at E = 0.025
	// and 60; 0.85 to 0.95 at E = 0.01 and 150), with at most 0.4% of the
	// positions against the default tolerance contrary to the truth at
	// E = 0.01 and 0.025 on those points. At E = 0.1 and 0.2, 30 points
	// (E n = 3 and 6) covered 0.91 to 0.96 and 0.93 to 0.95.
	MinCrossingPoints = 1.5
	// MinPercentileResamples: with fewer resamples than this a 2.5th and
	// a 97.5th percentile do not lie inside the resampled values (1/0.025
	// = 40; type 7 interpolates them toward the most extreme ones), so
	// the run warns, and a paired difference whose percentile interval
	// comes from fewer formed resamples is reported but not judged (our
	// cut-off): its position is "too_few_resamples" and its reading
	// ReadingTooFewResamples.
	MinPercentileResamples = 40
	// KmPerDegree is the length of one degree of latitude used to turn
	// geographic cell widths into km (approximation: 40,075 km / 360 at the
	// equator, scaled by cos(latitude) for longitude).
	KmPerDegree = 111.32
)

// Sensitivity holds the analysis of how much each score depends on the
// extent. It is filled by Analyze. Every number is finite; quantities that
// cannot be computed are 0 with a false "...defined" flag.
type Sensitivity struct {
	// Headline is two or three plain sentences with the key numbers.
	Headline string `json:"headline"`
	// Metrics lists the metrics analysed, in report order.
	Metrics []MetricInfo `json:"metrics"`
	// ModelNames lists the models, in Results.Models order.
	ModelNames []string `json:"models"`
	// ScoredExtents lists the extents used by the analysis (status "ok" and
	// scored for at least one model), in family order.
	ScoredExtents []string `json:"scored_extents"`
	// SkippedExtents lists the extents left out, with the reason.
	SkippedExtents []SkippedExtent `json:"skipped_extents"`
	// Unscored lists the scores with Scored=false on usable extents.
	Unscored []UnscoredScore `json:"unscored_scores"`
	// BaseExtent is the extent every paired difference is taken from
	// ("base" when scored, else the first scored extent).
	BaseExtent string `json:"base_extent"`
	// TestPoints lists the number of test points per scored extent (in
	// ScoredExtents order), and TestPointsVary whether they differ.
	TestPoints     []int `json:"test_points"`
	TestPointsVary bool  `json:"test_points_vary"`
	// Spreads holds one description per metric and model.
	Spreads []Spread `json:"spreads"`
	// ModelVerdicts holds, per metric and model, the equivalence verdict
	// with the paired difference of every extent from the base.
	ModelVerdicts []ModelVerdict `json:"model_verdicts"`
	// Verdicts sums up ModelVerdicts per metric.
	Verdicts []Verdict `json:"verdicts"`
	// Rankings compares every pair of models per metric by their paired
	// differences on each extent; empty with fewer than two models.
	Rankings []ModelRanking `json:"rankings"`
	// AboveNull compares every model with every null, per metric (AUC and
	// the partial ROC ratio at each E) and scored extent: the paired
	// difference model minus null with its 95% interval. Empty without
	// nulls.
	AboveNull []AboveNull `json:"above_null"`
	// Decompositions describes, per metric, how the spread of the models x
	// extents table splits (a property of the chosen family) and how far
	// the extents agree on the order of the models; empty with fewer than
	// two models.
	Decompositions []Decomposition `json:"decompositions"`
	// Chains summarises the nested rings per chain and model.
	Chains []ChainSummary `json:"chains"`
	// Truncation holds one check per model.
	Truncation []TruncationCheck `json:"truncation"`
	// Independence describes how far test points lie from training points.
	Independence Independence `json:"independence"`
	// OmittedPoints lists, per model and threshold, the omitted test points.
	OmittedPoints []OmittedPoints `json:"omitted_points"`
	// Warnings are the analysis' own warnings (Results.Warnings are the run's).
	Warnings []string `json:"warnings"`
}

// MetricKind is the kind of an analysed metric.
type MetricKind string

// The metric kinds.
const (
	MetricAUC           MetricKind = "auc"
	MetricAUCUnweighted MetricKind = "auc_unweighted"
	MetricPartialROC    MetricKind = "partial_roc"
	MetricOmission      MetricKind = "omission"
	MetricAreaFraction  MetricKind = "area_fraction"
	MetricBoyce         MetricKind = "boyce"
)

// Judgement is the equivalence verdict on a metric (see ModelVerdict).
type Judgement string

// The verdicts.
const (
	JudgementRobust       Judgement = "robust"
	JudgementSensitive    Judgement = "extent-sensitive"
	JudgementUndetermined Judgement = "undetermined"
)

// StepKind says what a ChainStep adds to the inner extent: StepRing, the
// cells of a ring (and the test points in it), or StepTestPoints, test
// points that first fall inside with the outer extent.
type StepKind string

// The chain step kinds.
const (
	StepRing       StepKind = "ring"
	StepTestPoints StepKind = "test_points"
)

// MetricInfo names one analysed metric.
type MetricInfo struct {
	// Key is a stable identifier: "auc", "auc_unweighted",
	// "partial_roc_e0.05", "omission_minimum_training_presence",
	// "omission_fixed_0.5", "area_fraction_mtp", "boyce".
	Key   string     `json:"key"`
	Label string     `json:"label"`
	Kind  MetricKind `json:"kind"`
	// E is the allowable omission of a partial ROC metric.
	E float64 `json:"e,omitempty"`
	// Threshold and ThresholdValue identify an omission metric (the value
	// only for "fixed" thresholds, which can repeat by name).
	Threshold      metrics.ThresholdRule `json:"threshold,omitempty"`
	ThresholdValue float64               `json:"threshold_value,omitempty"`
	// HigherIsBetter orders models in rankings. Omission and area fraction
	// at the minimum training presence rank lower values first (the latter
	// is our choice: at a threshold that keeps every training point, a
	// smaller predicted area is the more specific model).
	HigherIsBetter bool `json:"higher_is_better"`
	// Tolerance is the difference treated as negligible in the verdicts
	// (Settings).
	Tolerance float64 `json:"tolerance"`
}

// minCommonPoints is the fewest common test points a paired difference of
// the metric and kind is judged on (the function of the same name, by the
// method its differences are formed with: the placements for the AUCs,
// the paired resamples for the partial ROC ratio, omission rates and
// Boyce index, exact for the predicted area).
func (m MetricInfo) minCommonPoints(kind PairKind) int {
	method := ""
	switch m.Kind {
	case MetricPartialROC, MetricOmission, MetricBoyce:
		method = "paired_resamples"
	}
	return minCommonPoints(method, kind, m.Key)
}

// SkippedExtent is an extent left out of the analysis.
type SkippedExtent struct {
	ID          string       `json:"id"`
	Status      vocab.Status `json:"status"`
	DuplicateOf string       `json:"duplicate_of,omitempty"`
	Reason      string       `json:"reason"`
}

// UnscoredScore is a model that could not be scored on a usable extent.
type UnscoredScore struct {
	Model  string `json:"model"`
	Extent string `json:"extent"`
	Reason string `json:"reason"`
}

// Spread describes one metric of one model across the scored extents. It
// is a description of the chosen family, not an inference: the extents are
// nested or overlapping, share their test points and were chosen by the
// user, so they are not a sample.
//
//	range = max - min
//	SD    = sqrt( sum (x_e - mean)^2 / (n-1) )
type Spread struct {
	Metric string `json:"metric"`
	Model  string `json:"model"`
	N      int    `json:"n"`
	// Extents, AreasKm2 and Values are the data, in family order.
	Extents  []string  `json:"extents"`
	AreasKm2 []float64 `json:"areas_km2"`
	Values   []float64 `json:"values"`
	// BootSD holds the per-extent uncertainty drawn in the figure (0 when
	// the metric has none): for AUC the SD over the full-size paired
	// resamples (Score.AUCBootSD), for partial ROC the SD of the published
	// half-size bootstrap (0, with BootLow = BootHigh = the value, where
	// BootstrapReadable is false). BootLow/BootHigh: value -+ SD for AUC,
	// the published bootstrap interval for partial ROC.
	BootSD   []float64 `json:"boot_sd,omitempty"`
	BootLow  []float64 `json:"boot_low,omitempty"`
	BootHigh []float64 `json:"boot_high,omitempty"`

	Min       float64 `json:"min"`
	Max       float64 `json:"max"`
	Range     float64 `json:"range"`
	MinExtent string  `json:"min_extent"`
	MaxExtent string  `json:"max_extent"`
	Mean      float64 `json:"mean"`
	SD        float64 `json:"sd"`
	SDDefined bool    `json:"sd_defined"`
}

// Slope is the ordinary least-squares slope of AUC against log2(extent area
// in km2) along one nested chain: the change per doubling of the area. It
// is a description of the chain; no interval is given, because the members
// of a chain are nested and share their test points.
//
//	y_e = a + b log2(A_e),  b = Sxy/Sxx,  r^2 = 1 - SSE/Syy
type Slope struct {
	Defined     bool    `json:"defined"`
	N           int     `json:"n"`
	PerDoubling float64 `json:"per_doubling"`
	Intercept   float64 `json:"intercept"`
	R2          float64 `json:"r2"`
	R2Defined   bool    `json:"r2_defined"`
}

// ExtentDifference is the paired difference of one metric between one
// extent and the base extent for one model (from Results.Paired, or exact
// for the predicted area, which has no test-point sampling error).
type ExtentDifference struct {
	Extent string `json:"extent"`
	// Value is the metric on the extent's own test points.
	Value        float64 `json:"value"`
	TestPoints   int     `json:"test_points"`
	CommonPoints int     `json:"common_points"`
	Defined      bool    `json:"defined"`
	Diff         float64 `json:"diff"`
	// Low and High are Diff's 95% interval (Diff itself for an exact
	// difference), absent when it has none (a point_difference, or an
	// undefined difference; see Paired).
	Low  *float64 `json:"ci_low,omitempty"`
	High *float64 `json:"ci_high,omitempty"`
	// Method is "placements", "paired_resamples", "point_difference" or
	// "exact".
	Method string `json:"method"`
	// TestSetShift is how much the change of test set moved the score
	// beyond Diff (0 when both extents hold the same test points).
	TestSetShift float64 `json:"test_set_shift"`
	// Position of the interval against -tolerance..+tolerance: "inside",
	// "outside" (wholly beyond) or "overlapping"; "too_few" when the
	// difference rests on fewer than MinPairedPoints test points, and
	// "too_few_resamples" when its percentile interval comes from fewer
	// than MinPercentileResamples formed resamples, "not_calibrated" for
	// every Boyce index difference (BoyceCoverage) and every partial ROC
	// ratio difference between extents (partialROCExtentCoverage) (all
	// three not judged; an exact difference always is).
	Position string `json:"position"`
	// NotJudged says why a difference is not judged (Paired.NotJudgedReason);
	// absent when it is judged.
	NotJudged string `json:"not_judged_reason,omitempty"`
	// minPoints is the fewest common test points it is judged on
	// (minCommonPoints).
	minPoints int
	// nFormed is the number of resamples that formed a paired_resamples
	// difference (Paired.Formed), for the sentences.
	nFormed int
	// metric is the MetricInfo key of the difference, for its reason not
	// to be judged (notCalibratedWhy).
	metric string
}

// ModelVerdict is the equivalence judgement of one metric for one model
// against the tolerance T (our own default or the user's):
//
//	robust           every paired difference from the base extent has its
//	                 95% interval inside -T..+T
//	extent-sensitive at least one interval lies wholly outside -T..+T
//	undetermined     otherwise: an interval straddles -T or +T (too wide
//	                 to tell), some differences rest on too few common test
//	                 points to be judged (Largest names the largest
//	                 difference and its interval), or no difference could
//	                 be formed
type ModelVerdict struct {
	Metric    string    `json:"metric"`
	Label     string    `json:"label"`
	Model     string    `json:"model"`
	Tolerance float64   `json:"tolerance"`
	Verdict   Judgement `json:"verdict"`
	Base      string    `json:"base_extent"`
	BaseValue float64   `json:"base_value"`
	// BaseDefined is false when the metric is undefined on the base extent.
	BaseDefined bool               `json:"base_defined"`
	Diffs       []ExtentDifference `json:"differences"`
	// Largest is the index in Diffs of the defined difference with the
	// largest |Diff| (-1 when none); for an extent-sensitive verdict, of
	// the largest judged one (on MinPairedPoints or more common test
	// points), which the verdict rests on.
	Largest int `json:"largest"`
	// Undefined lists extents where the difference could not be formed.
	Undefined []string `json:"undefined_on"`
	Sentence  string   `json:"sentence"`
	// baseScored tells that the model is scored on the base extent (the
	// metric may still be undefined there, BaseDefined): "not scored on
	// base" would be wrong for a score undefined on its one extent.
	baseScored bool
}

// Verdict sums up the ModelVerdicts of one metric: extent-sensitive when
// any model's is, robust when every model's is, undetermined otherwise.
type Verdict struct {
	Metric    string    `json:"metric"`
	Label     string    `json:"label"`
	Tolerance float64   `json:"tolerance"`
	Verdict   Judgement `json:"verdict"`
	// Sensitive, Robust and Undetermined list the models by verdict.
	Sensitive    []string `json:"sensitive_models"`
	Robust       []string `json:"robust_models"`
	Undetermined []string `json:"undetermined_models"`
	Sentence     string   `json:"sentence"`
}

// ModelRanking judges two models on one metric by their paired
// differences (Model minus Other) on each extent: "beyond noise" means the
// 95% interval excludes 0.
type ModelRanking struct {
	Metric string `json:"metric"`
	Model  string `json:"model"`
	Other  string `json:"other"`
	// Extents is the number of extents with a defined difference; Better
	// and Worse count those where Model is better / worse than Other beyond
	// noise (in the metric's better direction); the rest are within noise.
	Extents     int                `json:"extents"`
	Better      int                `json:"better"`
	Worse       int                `json:"worse"`
	WithinNoise int                `json:"within_noise"`
	Diffs       []ExtentDifference `json:"differences"`
	Sentence    string             `json:"sentence"`
}

// Decomposition describes the spread of one metric over a models x extents
// table (only extents scored for every model) by splitting it into main
// effects and the non-additive part. The shares are a property of the
// chosen family of extents (another family gives other shares), so they
// describe this table and are not a finding about models in general. With one value per cell there is no replicate, so the
// residual is the model x extent interaction plus any noise (Tukey 1949,
// Biometrics 5:232, discusses exactly this case):
//
//	SS_total   = sum_ij (x_ij - m)^2
//	SS_extent  = I sum_j (mean_.j - m)^2      (I models)
//	SS_model   = J sum_i (mean_i. - m)^2      (J extents)
//	SS_residual = SS_total - SS_extent - SS_model
//	            = sum_ij (x_ij - mean_i. - mean_.j + m)^2
//	shares = SS / SS_total
//
// Rankings give rank 1 to the best model on each extent (mid-ranks for
// ties); Kendall's W measures how well the extents agree on the ranking
// (see kendallW).
type Decomposition struct {
	Metric string `json:"metric"`
	// Defined is false when fewer than two models or extents are common,
	// or the table has no spread; Note says why.
	Defined bool     `json:"defined"`
	Note    string   `json:"note,omitempty"`
	Models  []string `json:"models"`
	Extents []string `json:"extents"`
	// Values[i][j] is model i on extent j.
	Values          [][]float64     `json:"values"`
	GrandMean       float64         `json:"grand_mean"`
	SSTotal         float64         `json:"ss_total"`
	SSExtent        float64         `json:"ss_extent"`
	SSModel         float64         `json:"ss_model"`
	SSResidual      float64         `json:"ss_residual"`
	ShareExtent     float64         `json:"share_extent"`
	ShareModel      float64         `json:"share_model"`
	ShareResidual   float64         `json:"share_residual"`
	Rankings        []ExtentRanking `json:"rankings"`
	BaseExtent      string          `json:"base_extent"`
	DiffersFromBase []string        `json:"differs_from_base"`
	// KendallW is a description of agreement; no chi-square p-value is
	// given because the extents are not independent judges.
	KendallW        float64 `json:"kendall_w"`
	KendallWDefined bool    `json:"kendall_w_defined"`
	Sentence        string  `json:"sentence"`
}

// ExtentRanking is the ranking of the models on one extent.
type ExtentRanking struct {
	Extent string `json:"extent"`
	// Ranks are in Decomposition.Models order; rank 1 is best.
	Ranks []float64 `json:"ranks"`
	// Order lists the models best first (ties in model order).
	Order           []string `json:"order"`
	DiffersFromBase bool     `json:"differs_from_base"`
}

// ChainSummary follows the AUC of one model along one nested chain. The
// change from the first to the last member telescopes into steps:
//
//	A_0 = AUC of the first member (from Scores; AUCInner of the first ring
//	      if that score is missing)
//	test-point step k:  AUCInner_k - A_{k-1}   (test points that enter with
//	                    the ring, judged against the inner background)
//	ring step k:        AUCOuter_k - AUCInner_k (background added by ring k)
//	A_k = AUCOuter_k
//	share = step / (A_K - A_0)
//
// so the shares sum to 1. Test-point steps are listed only when non-zero
// (|step| > 1e-9; smaller differences are rounding, and A_0 then is
// AUCInner of the first ring). Ring AUCs obey the mix identity
//
//	AUCOuter = (A_inner AUCInner + A_ring AUCRing) / (A_inner + A_ring)
//
// because the area-weighted AUC is a mean over background area; MixResidual
// records how far the run's numbers are from it.
type ChainSummary struct {
	Chain          string      `json:"chain"`
	Model          string      `json:"model"`
	Members        []string    `json:"members"`
	MemberAreasKm2 []float64   `json:"member_areas_km2"`
	StartAUC       float64     `json:"start_auc"`
	EndAUC         float64     `json:"end_auc"`
	Change         float64     `json:"change"`
	SharesDefined  bool        `json:"shares_defined"`
	Steps          []ChainStep `json:"steps"`
	// Largest is the index in Steps of the step with the largest |share|
	// (-1 when shares are undefined).
	Largest int `json:"largest"`
	// Slope describes AUC against log2(area) over the chain's members.
	Slope    Slope  `json:"slope"`
	Sentence string `json:"sentence"`
}

// ChainStep is one step of a ChainSummary.
type ChainStep struct {
	Kind           StepKind `json:"kind"`
	Inner          string   `json:"inner"`
	Outer          string   `json:"outer"`
	RingAreaKm2    float64  `json:"ring_area_km2"`
	RingCells      int64    `json:"ring_cells"`
	AUCInner       float64  `json:"auc_inner"`
	AUCRing        float64  `json:"auc_ring"`
	AUCRingDefined bool     `json:"auc_ring_defined"`
	AUCOuter       float64  `json:"auc_outer"`
	Change         float64  `json:"change"`
	Share          float64  `json:"share"`
	MixResidual    float64  `json:"mix_residual"`
}

// TruncationCheck flags a model whose predictions look truncated: a floor
// value covering a large share of the area, or ROC curves whose last
// segment is a long tie starting below y = 1 (test points share the lowest
// value with many cells).
type TruncationCheck struct {
	Model      string  `json:"model"`
	FloorShare float64 `json:"floor_share"`
	FloorFlag  bool    `json:"floor_flag"`
	// Tails lists the extents whose curve's last segment is a tie that
	// starts below y = 1 and spans more than TailJumpFlag on the area axis.
	Tails    []TailJump `json:"tails"`
	MaxJump  float64    `json:"max_jump"`
	Flag     bool       `json:"flag"`
	Sentence string     `json:"sentence"`
}

// TailJump is the last segment of one ROC curve.
type TailJump struct {
	Extent string  `json:"extent"`
	XFrom  float64 `json:"x_from"`
	YFrom  float64 `json:"y_from"`
	Jump   float64 `json:"jump"`
}

// Independence summarises the distance from each scored test point to the
// nearest training point (Point.NearestTrainKm). Quartiles use linear
// interpolation (Hyndman & Fan 1996 definition 7). The cell width is
// |geotransform[1]| km for a projected grid in metres (/1000), and for a
// geographic grid |geotransform[1]| * 111.32 * cos(mean latitude of the
// scored points) km: an approximation (spherical, east-west width).
type Independence struct {
	Defined bool    `json:"defined"`
	N       int     `json:"n"`
	Min     float64 `json:"min_km"`
	Q1      float64 `json:"q1_km"`
	Median  float64 `json:"median_km"`
	Q3      float64 `json:"q3_km"`
	Max     float64 `json:"max_km"`
	// CellWidthKm is the cell width on the ground; CellWidthApprox marks
	// the approximations: the east-west width at the points' mean latitude
	// on a geographic grid, the mean true cell size on a projected grid
	// whose map scale varies (projectedCellWidthKm).
	CellWidthKm     float64 `json:"cell_width_km"`
	CellWidthApprox bool    `json:"cell_width_approx"`
	NearKm          float64 `json:"near_km"`
	NearCount       int     `json:"near_count"`
	NearShare       float64 `json:"near_share"`
	Warn            bool    `json:"warn"`
	Sentence        string  `json:"sentence"`
}

// OmittedPoints lists the test points omitted at one threshold of a model.
type OmittedPoints struct {
	Model      string                `json:"model"`
	Threshold  metrics.ThresholdRule `json:"threshold"`
	Value      float64               `json:"value"`
	Count      int                   `json:"count"`
	TestPoints int                   `json:"test_points"`
	Share      float64               `json:"share"`
	IDs        []int                 `json:"ids"`
}
