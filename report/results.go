package report

import (
	"bytes"
	"crypto/sha256"
	"encoding"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"sync"

	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// SchemaVersion is the version of the results.json layout written by this
// package. It changes whenever a field is renamed or its meaning changes.
//
// Version 2 existed in two forms, one from each of two lines of work, and
// version 3 holds both:
//   - per-test-point placements, auc_se, the DeLong variance, paired
//     differences ("paired"), tolerances and paired resamples in the
//     settings, auc_boot_sd from full-size resamples, partial ROC "defined"
//     with the tie rule, and the equivalence verdicts of the sensitivity
//     analysis;
//   - models may be nulls (Model.Role), scored like models (placements and
//     paired records included) but kept out of every ranking and of the
//     sensitivity analysis; extents carry the spatial sorting bias;
//     settings.distance_null;
//
// and adds model above null: paired records of kind PairedKindNull (every model
// minus every null per extent) and sensitivity.above_null.
//
// Version 4 changes the meaning of ci_low and ci_high of the paired
// records of method "placements": the Student t 95% interval with n - 1
// degrees of freedom (metrics.PairedPlacements) where version 3 had the
// normal one. A version 3 file is refused, so that its intervals are
// never described with the words of the other.
//
// Version 5 adds resample_size to each partial ROC record: the number of
// test points each resample of the published bootstrap draws, on which
// whether the report gives its interval and P now rests
// (BootstrapReadable). A version 4 file has none, and is refused.
//
// Version 6 writes the differences that are described, not judged (the
// Boyce index's, and the partial ROC ratio's between two extents) with
// method "point_difference": the two scores on the common test points and
// their difference, without se, ci_low, ci_high or resamples (their
// intervals fall short of their 95% coverage: BoyceCoverage,
// partialROCExtentCoverage), in paired and in sensitivity; and leaves
// se, ci_low and ci_high out of an undefined difference instead of
// writing 0. A version 5 file, whose intervals for those differences
// would be printed again by an older report, is refused.
const SchemaVersion = 6

// Results is the whole of one run as written to results.json. Every slice is
// kept in a stable order (extents in family order, scores by model then
// extent) so that the same inputs and seed give byte-identical files.
type Results struct {
	SchemaVersion int          `json:"schema_version"`
	Software      Software     `json:"software"`
	Seed          uint64       `json:"seed"`
	Settings      Settings     `json:"settings"`
	Inputs        []Input      `json:"inputs"`
	Grid          Grid         `json:"grid"`
	Models        []Model      `json:"models"`
	Points        []Point      `json:"points"`
	PointCounts   PointCounts  `json:"point_counts"`
	Extents       []Extent     `json:"extents"`
	Scores        []Score      `json:"scores"`
	Rings         []Ring       `json:"rings"`
	Omissions     []Omission   `json:"omissions"`
	Curves        []Curve      `json:"curves"`
	Paired        []Paired     `json:"paired"`
	Preview       *Preview     `json:"preview,omitempty"`
	Sensitivity   *Sensitivity `json:"sensitivity,omitempty"`
	Warnings      []string     `json:"warnings"`
}

// Software names the program that wrote the file.
type Software struct {
	Name    string `json:"name"`
	Version string `json:"version"`
}

// Settings records every choice that changes a number in the file.
type Settings struct {
	RegionBuffersKm    []float64 `json:"region_buffers_km"`
	PointBuffersKm     []float64 `json:"point_buffers_km"`
	PointBufferAll     bool      `json:"point_buffers_all_points"`
	HullBuffersKm      []float64 `json:"hull_buffers_km"`
	EcoregionMinPoints int       `json:"ecoregion_min_points"`
	EcoregionField     string    `json:"ecoregion_field,omitempty"`
	EcoregionClip      bool      `json:"ecoregion_clip"`
	OccurrencesCRS     string    `json:"occurrences_crs"` // empty: WGS84 longitude/latitude
	Extra              []string  `json:"extra_extents"`   // NAME=PATH as given
	E                  []float64 `json:"e"`
	Iterations         int       `json:"iterations"`
	ResampleFraction   float64   `json:"resample_fraction"`
	FixedThresholds    []float64 `json:"fixed_thresholds"`
	ThinPerCell        bool      `json:"thin_per_cell"`
	BoyceWindow        float64   `json:"boyce_window"`
	BoyceSteps         int       `json:"boyce_steps"`
	// DistanceNull is true when the distance-only null was scored.
	DistanceNull bool `json:"distance_null"`
	// PairedResamples is B, the number of full-size paired resamples of the
	// test points (one set, drawn from the run seed alone, shared by every
	// model and extent).
	PairedResamples int `json:"paired_resamples"`
	// Tolerances of the equivalence verdicts (our own defaults, see
	// DefaultToleranceAUC and the others): a difference from the base
	// extent whose 95% interval lies inside -tolerance..+tolerance is
	// negligible. ToleranceAUC serves both AUCs, ToleranceOmission the
	// omission rates and the predicted area at the minimum training
	// presence.
	ToleranceAUC        float64 `json:"tolerance_auc"`
	TolerancePartialROC float64 `json:"tolerance_partial_roc"`
	ToleranceOmission   float64 `json:"tolerance_omission"`
	ToleranceBoyce      float64 `json:"tolerance_boyce"`
}

// Default tolerances of the equivalence verdicts. They are our own choice,
// not a published standard, and the report prints the ones used:
//
//	AUC (both)          0.02   a fiftieth of the AUC scale
//	partial ROC ratio   0.05   a twentieth of the ratio's null value 1
//	omission, area      0.05   one test point in twenty
//	Boyce index         0.10   a twentieth of its -1..1 range
const (
	DefaultToleranceAUC        = 0.02
	DefaultTolerancePartialROC = 0.05
	DefaultToleranceOmission   = 0.05
	DefaultToleranceBoyce      = 0.10
)

// Input is one input file and its SHA-256 checksum.
type Input struct {
	Role   string `json:"role"` // "model:NAME", "null:NAME", "occurrences", "region", "ecoregions", "extra"
	Path   string `json:"path"`
	SHA256 string `json:"sha256"` // of the file at Path alone
	// Sidecars are the other files GDAL or OGR may read as part of the
	// same dataset (a raster's .prj, .aux.xml, .ovr, world file, a virtual
	// raster's sources; a shapefile's .shx, .dbf, .prj, .cpg), those that
	// exist, sorted by path, each with its own SHA-256; omitted when there
	// are none. Added without a new schema version: a file without it
	// reads as before.
	Sidecars []Sidecar `json:"sidecars,omitempty"`
}

// Sidecar is one file read with an input (Input.Sidecars) and its SHA-256.
type Sidecar struct {
	Path   string `json:"path"`
	SHA256 string `json:"sha256"`
}

// Grid describes the model raster grid shared by all models.
type Grid struct {
	Width        int        `json:"width"`
	Height       int        `json:"height"`
	GeoTransform [6]float64 `json:"geotransform"`
	CRS          string     `json:"crs"` // "EPSG:4326" when known, else the WKT
	Geographic   bool       `json:"geographic"`
	CellAreaNote string     `json:"cell_area_method"`
	// Unit and UnitM are a projected grid's coordinate unit as its CRS
	// names it and its length in metres, for the maps' axes (absent on
	// latitude-longitude grids).
	Unit  string  `json:"unit,omitempty"`
	UnitM float64 `json:"unit_m,omitempty"`
}

// Model roles and null kinds (Model.Role, Model.NullKind).
const (
	// RoleModel is a suitability model the study evaluates.
	RoleModel = "model"
	// RoleNull is a reference surface scored like a model on the same
	// extents and test points, shown beside the models and never ranked.
	RoleNull = "null"
	// NullDistance is the distance-only null: minus the geodesic distance
	// from each cell's centre to the nearest training point (Hijmans 2012,
	// Ecology 93:679-688), computed by areasweep.
	NullDistance = "distance_to_training"
	// NullRaster is a raster the user marked as a null (--null).
	NullRaster = "raster"
	// DistanceNullName is the model name of the distance-only null.
	DistanceNullName = "distance_null"
)

// Model is one suitability raster, or a null scored like one.
type Model struct {
	Name string `json:"name"`
	// Path is the raster's path; empty for the distance-only null, which is
	// computed.
	Path string `json:"path"`
	// Role is RoleModel or RoleNull.
	Role string `json:"role"`
	// NullKind is NullDistance or NullRaster for a null, empty for a model.
	NullKind string `json:"null_kind,omitempty"`
	// ValueMin and ValueMax are the smallest and largest valid values seen in
	// the pass over the whole raster.
	ValueMin float64 `json:"value_min"`
	ValueMax float64 `json:"value_max"`
	// FloorShare is the share of valid area at the model's minimum value:
	// a large share flags truncated predictions.
	FloorShare float64 `json:"floor_share"`
}

// Point is one occurrence record after reading, thinning and sampling.
type Point struct {
	ID     int               `json:"id"`   // physical line number in the occurrence file (the header is line 1)
	Role   vocab.Role        `json:"role"` // vocab.RoleTrain or vocab.RoleTest
	Lon    float64           `json:"lon"`
	Lat    float64           `json:"lat"`
	Row    int               `json:"row"`
	Col    int               `json:"col"`
	Status vocab.PointStatus `json:"status"`
	// NearestTrainKm is, for scored test points, the geodesic distance to
	// the nearest scored training point; 0 for other points.
	NearestTrainKm float64 `json:"nearest_train_km"`
}

// PointCounts summarises Points.
type PointCounts struct {
	Train         int `json:"train"`
	Test          int `json:"test"`
	Thinned       int `json:"thinned"`
	OutsideRaster int `json:"outside_raster"`
	NoData        int `json:"nodata"`
}

// Extent is one member of the extent family.
type Extent struct {
	ID            string     `json:"id"`
	Kind          vocab.Kind `json:"kind"`
	Params        string     `json:"params"`
	Cells         int64      `json:"cells"`
	AreaKm2       float64    `json:"area_km2"`
	TrainPoints   int        `json:"train_points"`
	TestPoints    int        `json:"test_points"`
	ShareOfRaster float64    `json:"share_of_raster"`
	// Status is vocab.StatusOK, StatusEmpty or StatusDuplicate;
	// DuplicateOf names the earlier member with the same cells.
	Status      vocab.Status `json:"status"`
	DuplicateOf string       `json:"duplicate_of,omitempty"`
	// Chain names the nested chain this member belongs to (e.g. "region"),
	// ordered by area; empty when the member is in no chain.
	Chain string `json:"chain,omitempty"`
	// SortingBias compares the test points' distances to the nearest
	// training point with the extent's cells' (Hijmans 2012); absent when
	// the distance-only null was not computed.
	SortingBias *SortingBias `json:"sorting_bias,omitempty"`
}

// SortingBias is the spatial sorting bias of one extent (Hijmans 2012,
// Ecology 93:679-688): with t_i the geodesic distance from test point i
// inside the extent to the nearest training point and d_c that from the
// centre of cell c of the extent, area-weighted by w_c,
//
//	ratio_mean   = mean_i t_i / (sum_c w_c d_c / sum_c w_c)
//	ratio_median = median_i t_i / weighted median_c d_c
//
// Values well below 1 mean the test points lie nearer the training points
// than the extent's background does: distance alone separates them. It is a
// description of the data, not a test.
type SortingBias struct {
	// Defined is false when the extent holds no test point or no area, or
	// when half its area or more lies within 1 m of a training point (the
	// cells' median cannot be told from 0); Reason then says which, and
	// the numbers are 0.
	Defined bool   `json:"defined"`
	Reason  string `json:"reason,omitempty"`
	// TestPoints is the number of test points inside the extent.
	TestPoints int `json:"test_points"`
	// TestMeanKm and TestMedianKm summarise t_i (the median of an even
	// count is the mean of the middle two).
	TestMeanKm   float64 `json:"test_mean_km"`
	TestMedianKm float64 `json:"test_median_km"`
	// BackgroundMeanKm is exact but for rounding each d_c to the millimetre;
	// BackgroundMedianKm is read from bins of relative width 0.001 with
	// linear interpolation inside the bin, so within 0.1%.
	BackgroundMeanKm   float64 `json:"background_mean_km"`
	BackgroundMedianKm float64 `json:"background_median_km"`
	RatioMean          float64 `json:"ratio_mean"`
	RatioMedian        float64 `json:"ratio_median"`
}

// Score holds every metric of one model on one extent.
type Score struct {
	Model       string  `json:"model"`
	Extent      string  `json:"extent"`
	Scored      bool    `json:"scored"`
	NotScored   string  `json:"not_scored,omitempty"` // reason when Scored is false
	Cells       int64   `json:"cells"`
	AreaKm2     float64 `json:"area_km2"`
	TestPoints  int     `json:"test_points"`
	TrainPoints int     `json:"train_points"`
	// TestOutside and TrainOutside count the model's scored points that lie
	// outside this extent (reported, not scored on it).
	TestOutside  int `json:"test_points_outside"`
	TrainOutside int `json:"train_points_outside"`

	AUC           float64 `json:"auc"`
	AUCUnweighted float64 `json:"auc_unweighted"`
	AUCTrain      float64 `json:"auc_train"`
	// AUCSE is the standard error of AUC from the test points' placements,
	// the extent's cells being the complete population (the presence
	// component of DeLong et al. 1988); 0 with fewer than 2 test points.
	AUCSE float64 `json:"auc_se"`
	// AUCUnweightedSEDeLong is the square root of DeLong's full variance of
	// AUCUnweighted, for readers who treat the cells as a sample (each
	// counted once, unweighted).
	AUCUnweightedSEDeLong float64 `json:"auc_unweighted_se_delong"`
	// AUCBootSD is the standard deviation of the test AUC across the run's
	// full-size paired resamples of the test points, restricted to this
	// extent's test points. It estimates the same quantity as AUCSE.
	AUCBootSD float64 `json:"auc_boot_sd"`
	// TestPointIDs lists the ids (Point.ID) of the test points scored on
	// this extent; Placements and PlacementsUnweighted hold, in the same
	// order, each one's placement: the share of the extent's area (of its
	// cells) scoring below the point plus half the share scoring the same.
	// AUC is the mean of Placements.
	TestPointIDs         []int     `json:"test_point_ids"`
	Placements           []float64 `json:"placements"`
	PlacementsUnweighted []float64 `json:"placements_unweighted"`

	PartialROC []PartialROC `json:"partial_roc"`
	Thresholds []Threshold  `json:"thresholds"`
	Boyce      *Boyce       `json:"boyce"`

	// BoyceUndefined says why Boyce is null on a scored pair (fewer than 3
	// windows with background area, or no variation); absent otherwise.
	BoyceUndefined string `json:"boyce_undefined_reason,omitempty"`
}

// PartialROC is the partial ROC result for one allowable omission E.
// RatioMean, RatioSD, CILow, CIHigh and PValue come from the published
// half-size bootstrap (Peterson et al. 2008) and describe the ratio's own
// uncertainty; differences between extents or models use the paired
// full-size resamples (Results.Paired).
type PartialROC struct {
	E float64 `json:"e"`
	// Defined is false when the full-set ratio is undefined; Reason says
	// why (the curve reaches 1-E only at x = 1, or the crossing falls among
	// test points tied at one value).
	Defined bool   `json:"defined"`
	Reason  string `json:"undefined_reason,omitempty"`
	// XE is the share of area where the curve first reaches 1-E
	// (interpolated along the crossing segment).
	XE float64 `json:"x_e"`
	// TiedAtCrossing, DiscreteDefined, DiscreteXE and DiscreteRatio: for a
	// tie crossing, the number of tied test points and the reading at
	// thresholds only (x_E = area at or above the tied value).
	TiedAtCrossing  int     `json:"tied_at_crossing"`
	DiscreteDefined bool    `json:"discrete_defined"`
	DiscreteXE      float64 `json:"discrete_x_e"`
	DiscreteRatio   float64 `json:"discrete_ratio"`
	Ratio           float64 `json:"ratio"`
	RatioMean       float64 `json:"ratio_mean"`
	RatioSD         float64 `json:"ratio_sd"`
	CILow           float64 `json:"ci_low"`
	CIHigh          float64 `json:"ci_high"`
	PValue          float64 `json:"p_value"`
	Iterations      int     `json:"iterations"`
	NotFormed       int     `json:"iterations_not_formed"`
	// ResampleSize is the number of test points each resample draws
	// (with replacement): max(1, round(fraction x test points)).
	ResampleSize int `json:"resample_size"`
	// PRandom is the one-sided Monte Carlo p-value of the full-sample
	// ratio against the ratios of as many test points drawn at random
	// over the extent's area (metrics.PartialROC.PRandom), from
	// RandomFormed draws that formed a ratio; absent where it is not
	// computed, PRandomNote saying why (absent too on an undefined ratio
	// and in results files written before 2026-12-05).
	PRandom      float64 `json:"p_random,omitempty"`
	RandomFormed int     `json:"random_draws_formed,omitempty"`
	PRandomNote  string  `json:"p_random_note,omitempty"`
}

// Threshold is a threshold-based omission test.
type Threshold struct {
	Name         metrics.ThresholdRule `json:"name"`
	Value        float64               `json:"value"`
	Omission     float64               `json:"omission"`
	AreaFraction float64               `json:"area_fraction"`
	Successes    int                   `json:"successes"`
	N            int                   `json:"n"`
	PBinomial    float64               `json:"p_binomial"`
}

// Boyce is the continuous Boyce index and its predicted/expected curve.
type Boyce struct {
	Index   float64   `json:"index"`
	Windows int       `json:"windows"`
	Used    int       `json:"windows_used"`
	Mid     []float64 `json:"window_mid"`
	Ratio   []float64 `json:"pe_ratio"`
}

// Ring is one step of a nested chain: Outer contains Inner, and the ring is
// Outer minus Inner. AUCOuter equals the area-weighted mix
// (InnerAreaKm2*AUCInner + RingAreaKm2*AUCRing) / (InnerAreaKm2+RingAreaKm2).
type Ring struct {
	Chain        string  `json:"chain"`
	Model        string  `json:"model"`
	Inner        string  `json:"inner"`
	Outer        string  `json:"outer"`
	InnerAreaKm2 float64 `json:"inner_area_km2"`
	RingAreaKm2  float64 `json:"ring_area_km2"`
	RingCells    int64   `json:"ring_cells"`
	AUCInner     float64 `json:"auc_inner"`
	AUCRing      float64 `json:"auc_ring"`
	AUCOuter     float64 `json:"auc_outer"`
	// ShareOfChange is (AUCOuter-AUCInner) / (AUCOuter of the chain's last
	// member - AUCInner of its first member).
	ShareOfChange float64 `json:"share_of_change"`
}

// Omission lists the test points a threshold omits for a model. Thresholds
// depend only on the model and training points, so the list does not
// depend on the extent.
type Omission struct {
	Model     string                `json:"model"`
	Threshold metrics.ThresholdRule `json:"threshold"`
	Value     float64               `json:"value"`
	Omitted   []int                 `json:"omitted_point_ids"`
}

// Curve is a ROC curve on the area axis for one model and extent, thinned to
// at most a few hundred vertices for drawing. X is the fraction of the
// extent's area predicted present, Y the fraction of test presences.
type Curve struct {
	Model  string    `json:"model"`
	Extent string    `json:"extent"`
	X      []float64 `json:"x"`
	Y      []float64 `json:"y"`
}

// Preview is a coarse copy of the first model for drawing the map.
// Values holds Width*Height bytes, row by row from the north, base64-coded:
// 0..254 scale linearly from ValueMin to ValueMax, 255 is no data.
// Masks holds one base64 bitset per extent (same order as Results.Extents),
// bit i = preview cell i (LSB first) lies in that extent.
type Preview struct {
	Width    int        `json:"width"`
	Height   int        `json:"height"`
	Bounds   [4]float64 `json:"bounds"` // west, south, east, north in grid CRS
	ValueMin float64    `json:"value_min"`
	ValueMax float64    `json:"value_max"`
	Values   string     `json:"values"`
	Masks    []string   `json:"masks"`
}

// Paired is one paired difference A - B on the test points both sides
// share: two extents of one model (Kind PairedKindExtent: Extent minus
// OtherExtent, the base extent), two models on one extent (Kind
// PairedKindModel: Model minus OtherModel) or a model and a null on one
// extent (Kind PairedKindNull: Model minus the null OtherModel).
//
// Method "placements": AUC differences from per-point placements, SE =
// sqrt(sum (D_i - mean D)^2 / (n(n-1))) and a Student t 95% interval
// (n - 1 degrees of freedom).
// Method "paired_resamples": the other scores, over the run's full-size
// paired resamples restricted to the common points; SE is the SD of the
// resampled differences and the interval their 2.5 and 97.5 percentiles.
// Method "point_difference": the differences that are described, not
// judged (notCalibrated: the Boyce index's, and the partial ROC ratio's
// between two extents): the two scores on the common points and their
// difference only, with no SE, interval or resamples, since the
// intervals measured for them fall short of their 95% coverage
// (BoyceCoverage, partialROCExtentCoverage) and an interval that does
// is not one to print.
type Paired struct {
	// Metric is a MetricInfo key ("auc", "partial_roc_e0.05", ...).
	Metric      string   `json:"metric"`
	Kind        PairKind `json:"kind"`
	Model       string   `json:"model"`
	Extent      string   `json:"extent"`
	OtherModel  string   `json:"other_model"`
	OtherExtent string   `json:"other_extent"`
	// CommonPoints is the number of test points on both sides.
	CommonPoints int    `json:"common_points"`
	Method       string `json:"method"`
	// Defined is false when the score cannot be formed on the common
	// points or too few points or resamples exist.
	Defined bool `json:"defined"`
	// A and B are the two scores on the common points; Diff = A - B.
	A    float64 `json:"a"`
	B    float64 `json:"b"`
	Diff float64 `json:"diff"`
	// SE, Low and High are the standard error and the 95% interval of
	// Diff: there for methods placements and paired_resamples (when
	// Defined), absent for point_difference (and for an undefined
	// difference), never read as 0.
	SE   *float64 `json:"se,omitempty"`
	Low  *float64 `json:"ci_low,omitempty"`
	High *float64 `json:"ci_high,omitempty"`
	// Resamples and NotFormed count the paired resamples drawn and those
	// that could not form the score (paired_resamples only).
	Resamples int `json:"resamples"`
	NotFormed int `json:"resamples_not_formed"`
	// TestSetShift is how much the change of test set moved the score:
	// (A on its own points - B on its own points) - Diff.
	TestSetShift float64 `json:"test_set_shift"`
	// NotJudged says why a defined difference is reported but not judged
	// (NotJudgedReason); absent when it is judged.
	NotJudged string `json:"not_judged_reason,omitempty"`
}

// BootstrapReadable tells whether the published half-size bootstrap of pr
// gives an interval and a P: at least MinPercentileResamples of its
// resamples formed a ratio (fewer put no value below the 2.5th or above
// the 97.5th percentile, and bound P below by 1/B, as for the paired
// differences) and each resample draws at least MinPairedPoints test
// points (the cut-off of the paired differences, our choice). A resample
// of fewer is a handful of points (with one point every resample is a
// single point: an interval of zero width and a P of 0, printed "< 1/B"),
// no basis for an interval or a test, whether the extent holds few test
// points or the fraction (--fraction) is small: with the default 0.5 the
// extent needs 19 (round(9.5) = 10). The full-sample ratio and the
// resamples' mean are given either way; results.json keeps every number.
func BootstrapReadable(pr PartialROC) bool {
	return pr.Iterations-pr.NotFormed >= MinPercentileResamples && pr.ResampleSize >= MinPairedPoints
}

// Judged tells whether p rests on enough to be judged (a verdict, a
// ranking, a reading against a null): MinPairedPoints or more common test
// points and, for an interval from the paired resamples, at least
// MinPercentileResamples resamples that formed the difference. Less is
// reported, not judged (NotJudgedReason says why).
func (p *Paired) Judged() bool { return p.notJudgedKind() == "" }

// notJudgedKind is positionTooFew when p rests on fewer common test
// points than it is judged on (minPoints), positionTooFewResamples when
// its percentile interval comes from fewer than MinPercentileResamples
// formed resamples, positionNotCalibrated for any other point_difference
// (a run writes the Boyce index's differences, BoyceCoverage, and the
// partial ROC ratio's between two extents, partialROCExtentCoverage, so)
// and any such difference of method paired_resamples, ""
// when p is judged. Too few points is said first: it is the reason
// whatever the resamples. A difference that is 0 by construction
// (zeroByConstruction) is judged on any number of points (the cut-off on
// formed resamples, a matter of --iterations, still applies).
func (p *Paired) notJudgedKind() string {
	switch {
	case p.CommonPoints < p.minPoints() && !p.zeroByConstruction():
		return positionTooFew
	case p.Method == "paired_resamples" && p.Formed() < MinPercentileResamples:
		return positionTooFewResamples
	case p.Method == "point_difference" || p.Method == "paired_resamples" && NotCalibrated(p.Metric, p.Kind):
		return positionNotCalibrated
	}
	return ""
}

// notCalibrated tells whether the percentile intervals of the paired
// resamples of metric (a MetricInfo key) between two sides of kind fall
// short of their 95% coverage in our simulation check, so that their
// differences are described, not judged: the Boyce index's of any kind
// (BoyceCoverage), and the partial ROC ratio's between two extents of one
// model (partialROCExtentCoverage; between two models they come near
// 95% once E n reaches MinCrossingPoints, and are judged from there).
func NotCalibrated(metric string, kind PairKind) bool {
	return metric == MetricKeyBoyce || (kind == PairedKindExtent && isPartialROCKey(metric))
}

// isPartialROCKey tells whether key is the MetricInfo key of a partial
// ROC ratio (MetricKeyPartialROC).
func isPartialROCKey(key string) bool { return strings.HasPrefix(key, "partial_roc_e") }

// MetricKeyBoyce is the MetricInfo key of the Boyce index.
const MetricKeyBoyce = "boyce"

// BoyceCoverage is what the report says of the coverage of the Boyce
// index's paired intervals: the range measured by
// metrics.TestPairedIntervalCoverage (between two models and between two
// nested extents, 10 to 500 test points; README, "How often the 95%
// intervals cover"). The index from n test points is biased against its
// value on the whole presence distribution (which lies near 1 for any
// model whose presences rise with its value), and differently for each
// model and extent; a percentile interval of the resampled differences,
// or the basic interval (measured too: 0.47 to 0.94), does not correct
// that. So a Boyce difference is described, never judged: no verdict,
// ranking or reading rests on it.
const BoyceCoverage = "34% to 88%"

// partialROCExtentCoverage is what the report says of the coverage of
// the partial ROC ratio's paired intervals between two extents of one
// model, at each E where it was measured: the range measured by
// metrics.TestPairedIntervalCoverage between two nested extents, 10 to
// 500 common test points (README, "How often the 95% intervals cover";
// at E = 0.05, 59% to 89% at 30 points over six other landscapes in
// metrics.TestCoverageSweep, 500 draws each). The difference of the two
// ratios rests on the test points at the crossing of y = 1 - E, the
// lowest E share of them (at E = 0.05 and 10 or 30 points the lowest or
// the second lowest), whose bootstrap distribution is lumpy and does not
// mirror the sampling distribution: the misses fall on one side, a side
// that differs between landscapes. No other interval from the same
// resamples measured (basic, normal, bias-corrected, BCa, m out of n;
// metrics/coverage_alt_test.go, at E = 0.05) reached 93% on every
// landscape at 30 points or more. So a partial ROC ratio difference
// between extents is described, never judged: no verdict rests on it (the
// comparisons of two models on one extent are judged, on enough test
// points: MinCrossingPoints).
var partialROCExtentCoverage = []struct {
	e     float64
	cover string
}{{0.01, "9% to 84%"}, {0.05, "38% to 91%"}, {0.1, "58% to 93%"}, {0.2, "51% to 78%"}}

// partialROCCoverageAll is the range of partialROCExtentCoverage over all
// its E.
const partialROCCoverageAll = "9% to 93%"

// PartialROCCoverageClause says what our simulation check measured of the
// coverage of the partial ROC ratio's paired intervals between extents at
// the E of key (a MetricInfo key): "38% to 91% in our simulation check" at
// a measured E; at another, the range over the measured ones and that it
// was not run at key's E: "9% to 93% in our simulation check at E = 0.01,
// 0.05, 0.1 and 0.2, not run at E = 0.3". A range quoted bare for an E
// never simulated claimed a measurement never made.
func PartialROCCoverageClause(key string) string {
	e, _ := partialROCKeyE(key)
	return partialROCCoverageRun([]float64{e})
}

// partialROCCoverageRun says the same for the E of a run, in the methods
// text: "38% to 91% in our simulation check" for one measured E, "38% to
// 91% at E = 0.05 and 58% to 93% at E = 0.1 in our simulation check" for
// several, and when one was not simulated the range over those that were
// and "..., not run at E = 0.3".
func partialROCCoverageRun(es []float64) string {
	var parts, missing, measured []string
	for _, c := range partialROCExtentCoverage {
		measured = append(measured, fmtG(c.e))
	}
	for _, e := range es {
		if i := slices.Index(measured, fmtG(e)); i >= 0 {
			parts = append(parts, fmt.Sprintf("%s at E = %s", partialROCExtentCoverage[i].cover, fmtG(e)))
		} else {
			missing = append(missing, fmtG(e))
		}
	}
	switch {
	case len(missing) > 0:
		return fmt.Sprintf("%s in our simulation check at E = %s, not run at E = %s", partialROCCoverageAll, joinList(measured), joinList(missing))
	case len(parts) == 1:
		// One E: the range alone, as the sentences about that E quote it.
		return partialROCExtentCoverage[slices.Index(measured, fmtG(es[0]))].cover + " in our simulation check"
	}
	return joinList(parts) + " in our simulation check"
}

// PublishedPSize is how often the published bootstrap's P of the partial
// ROC ratio (Peterson et al. 2008) falls below 0.05 on a model with no
// skill, at E = 0.05, as metrics' TestPublishedBootstrapSize measures it
// (400 simulated studies per size, B = 500, fraction 0.5): far above the
// 5% a calibrated test allows, so no statement of skill rests on the
// published P or interval (README "The published partial ROC bootstrap").
const PublishedPSize = "42% of studies of 40 test records and 19% of 90, at E = 0.05"

// Interval returns p's SE and 95% interval; ok is false (and the three
// 0) when p has none: a point_difference or an undefined difference.
func (p *Paired) Interval() (se, low, high float64, ok bool) {
	if p.SE == nil || p.Low == nil || p.High == nil {
		return 0, 0, 0, false
	}
	return *p.SE, *p.Low, *p.High, true
}

// Interval returns d's 95% interval; ok is false (and both 0) when d has
// none (see ExtentDifference.Low).
func (d *ExtentDifference) Interval() (low, high float64, ok bool) {
	if d.Low == nil || d.High == nil {
		return 0, 0, false
	}
	return *d.Low, *d.High, true
}

// Float returns a pointer to a copy of v, for the optional numbers of
// Paired and ExtentDifference.
func Float(v float64) *float64 { return &v }

// Formed is the number of paired resamples that formed the difference
// (Resamples - NotFormed).
func (p *Paired) Formed() int { return p.Resamples - p.NotFormed }

// zeroByConstruction tells whether p is an omission rate's difference
// between two extents of one model that is exactly 0 (with its SE and
// interval, where it has them): each side compares the same common test
// points with the same threshold, fixed from the training points or by
// the user whatever the extent (metrics.ThresholdRules), so every paired
// difference is 0 whatever the data. It has no sampling error, and a
// cut-off on the number of common test points, which guards intervals
// that under-cover on few points, has nothing to guard: it is judged
// (inside any tolerance) on any number. The audit's verdict read
// "undetermined: too few common test points to tell whether it moves by
// more than ±0.05, although every difference from base is 0" on 6 and 8
// common points. The check on the value, not the metric alone, keeps a
// threshold that did depend on the extent from passing unjudged.
func (p *Paired) zeroByConstruction() bool {
	if !p.Defined || p.Kind != PairedKindExtent || !strings.HasPrefix(p.Metric, "omission_") || p.Diff != 0 {
		return false
	}
	if se, lo, hi, ok := p.Interval(); ok && (se != 0 || lo != 0 || hi != 0) {
		return false
	}
	return true
}

// NotJudgedReason says why a defined p is reported but not judged, as
// results.json's not_judged_reason and the report give it, or "" when it
// is judged (or undefined: nothing to judge).
func (p *Paired) NotJudgedReason() string {
	if !p.Defined {
		return ""
	}
	return notJudgedReason(p.notJudgedKind(), p.Metric, p.CommonPoints, p.Formed(), p.minPoints())
}

// minPoints is the fewest common test points p is judged on
// (minCommonPoints).
func (p *Paired) minPoints() int { return minCommonPoints(p.Method, p.Kind, p.Metric) }

// minCommonPoints is the fewest common test points a paired difference of
// method, kind and metric (a MetricInfo key) is judged on:
// MinResampledPoints for a percentile interval of the paired resamples
// and for a point_difference (which stands for one: the same cut-off as
// before those differences lost their intervals), MinPairedPoints for
// the others, and for an omission rate between two
// extents of one model, whose difference is 0 in every resample (both
// sides compare each common test point with the model's same threshold,
// fixed from its training points whatever the extent), so that no
// interval is to be calibrated; notJudgedKind judges such a difference on
// any number of points when it is 0 (zeroByConstruction).
//
// A partial ROC ratio's difference between two models (or a model and a
// null) from the resamples also needs E n >= MinCrossingPoints
// (partialROCMinPoints): 150 common test points at E = 0.01.
func minCommonPoints(method string, kind PairKind, metric string) int {
	if (method == "paired_resamples" || method == "point_difference") && !(kind == PairedKindExtent && strings.HasPrefix(metric, "omission_")) {
		if e, ok := partialROCKeyE(metric); ok && kind != PairedKindExtent {
			return partialROCMinPoints(e)
		}
		return MinResampledPoints
	}
	return MinPairedPoints
}

// partialROCMinPoints is the fewest common test points a partial ROC
// ratio's difference at E between two models is judged on:
// MinResampledPoints, and at least MinCrossingPoints / E, so that E n,
// the number of test points expected beyond the curve's 1 - E crossing,
// is at least MinCrossingPoints (30 at E = 0.05 and above, 60 at 0.025,
// 150 at 0.01).
func partialROCMinPoints(e float64) int {
	// The factor keeps 1.5 / 0.05 = 29.999999999999996 and 1.5 / 0.01 =
	// 150.00000000000003 at 30 and 150; the cap keeps a tiny E (1e-300,
	// allowed) from overflowing int, which would judge on any number.
	return max(MinResampledPoints, int(min(math.Ceil(MinCrossingPoints/e*(1-1e-12)), 1<<53)))
}

// partialROCKeyE returns the E of a partial ROC ratio's MetricInfo key
// (MetricKeyPartialROC); ok is false for another key.
func partialROCKeyE(key string) (e float64, ok bool) {
	s, ok := strings.CutPrefix(key, "partial_roc_e")
	if !ok {
		return 0, false
	}
	e, err := strconv.ParseFloat(s, 64)
	if err != nil || !(e > 0 && e < 1) {
		return 0, false
	}
	return e, true
}

// notJudgedReason words a not-judged kind (positionTooFew,
// positionTooFewResamples, positionNotCalibrated) for a difference of
// metric (a MetricInfo key) on common test points from formed resamples,
// judged from cut common test points on; "" for any other kind.
func notJudgedReason(kind, metric string, common, formed, cut int) string {
	switch kind {
	case positionTooFew:
		return fmt.Sprintf("too few common test points: %d, our cut-off %d", common, cut)
	case positionTooFewResamples:
		return fmt.Sprintf("too few resamples: %d formed, our cut-off %d", formed, MinPercentileResamples)
	case positionNotCalibrated:
		return notCalibratedWhy(metric)
	}
	return ""
}

// notCalibratedWhy says why a difference of metric (a MetricInfo key)
// with position positionNotCalibrated is not judged: the partial ROC
// ratio's between extents (partialROCExtentCoverage), or the Boyce
// index's (BoyceCoverage, also for any other key).
func notCalibratedWhy(metric string) string {
	if isPartialROCKey(metric) {
		return "the partial ROC ratio's paired intervals between extents fall short of their 95% coverage: " + PartialROCCoverageClause(metric)
	}
	return "the Boyce index's paired intervals fall short of their 95% coverage: " + BoyceCoverage + " in our simulation check"
}

// MetricKeyPartialROC, MetricKeyOmission: the MetricInfo keys of a partial
// ROC ratio at E and of an omission rate at a threshold (value used for
// "fixed" thresholds only).
func MetricKeyPartialROC(e float64) string { return "partial_roc_e" + fmtG(e) }

// MetricKeyOmission returns the MetricInfo key of the omission rate at a
// named threshold; value distinguishes "fixed" thresholds.
func MetricKeyOmission(name metrics.ThresholdRule, value float64) string {
	if name == metrics.ThresholdFixed {
		return "omission_fixed_" + fmtG(value)
	}
	return "omission_" + string(name)
}

// BaseExtent returns the extent differences are taken from: "base" when
// it is among ids, else the first of ids ("" when ids is empty).
func BaseExtent(ids []string) string {
	for _, id := range ids {
		if id == vocab.BaseID {
			return id
		}
	}
	if len(ids) == 0 {
		return ""
	}
	return ids[0]
}

// Load reads a results.json file and checks it before anything uses it:
// the JSON's shape against Results (CheckShape: keys twice, nulls, wrong
// kinds, and any field a run always writes that is missing, so that a
// field deleted by hand or by a tool is not read as 0), the schema
// version, then the values (Validate). Every error names the file and,
// for a field, its JSON path, and says what to do.
func Load(path string) (*Results, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, readResultsError(path, err)
	}
	return Decode(path, data)
}

// readResultsError words a failed read of the results file path: missing,
// a folder, not readable, or another error of the file system (err, as
// the system words it, after the path).
func readResultsError(path string, err error) error {
	switch st, serr := os.Stat(path); {
	case errors.Is(err, fs.ErrNotExist):
		return &readError{fmt.Sprintf("report: %s does not exist: it was removed or renamed after the run, or the folder is not the --out folder of a finished run; restore it from a copy, or run the study again", path), err}
	case serr == nil && st.IsDir():
		return &readError{fmt.Sprintf("report: %s is a folder, not the results file a run writes; give the --out folder of a finished run", path), err}
	case errors.Is(err, fs.ErrPermission):
		return &readError{fmt.Sprintf("report: %s cannot be read (permission denied); give yourself read access (chmod u+r) and run again", path), err}
	}
	cause := err
	var pe *fs.PathError
	if errors.As(err, &pe) {
		cause = pe.Err
	}
	return &readError{fmt.Sprintf("report: %s cannot be read (%v)", path, cause), err}
}

// readError is a worded failure to read a results file: its message, and
// the file system's error beneath (errors.Is(err, fs.ErrNotExist)).
type readError struct {
	msg string
	err error
}

func (e *readError) Error() string { return e.msg }
func (e *readError) Unwrap() error { return e.err }

// LoadWritten is Load for a file whose SHA-256 (hex) a run recorded as it
// wrote it (a batch's completion marker): while the file still has that
// checksum it holds exactly what a run wrote, so the walk of its shape
// (CheckShape: about twice the time of decoding) is skipped; the schema
// version and the values are checked as by Load. Any other file gets
// every check.
func LoadWritten(path, sum string) (*Results, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, readResultsError(path, err)
	}
	if h := sha256.Sum256(data); sum == "" || hex.EncodeToString(h[:]) != sum {
		return Decode(path, data)
	}
	var r Results
	if err := json.Unmarshal(data, &r); err != nil {
		return Decode(path, data) // cannot be: let Decode say why
	}
	if r.SchemaVersion != SchemaVersion {
		return Decode(path, data)
	}
	if err := validate(path, &r); err != nil {
		return nil, err
	}
	return &r, nil
}

// Decode is Load on the bytes of the file at path.
func Decode(path string, data []byte) (*Results, error) {
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, fmt.Errorf("report: %s is empty: the run that wrote it did not finish, or the file was emptied; give the --out folder of a finished run, or rerun areasweep run", path)
	}
	if bytes.HasPrefix(data, utf8BOM) {
		return nil, fmt.Errorf("report: %s starts with a byte-order mark (the bytes EF BB BF, which some editors add when saving as \"UTF-8 with BOM\"); JSON has none and a run writes none: restore the file from a copy, or save it as UTF-8 without BOM", path)
	}
	if utf16Text(data) {
		// Saved as "Unicode" by an editor: the message named "the byte
		// 0xFF where a value should begin".
		return nil, fmt.Errorf("report: %s is UTF-16 text (as an editor saves \"Unicode\"); a run writes it as UTF-8: restore the file from a copy, or save it as UTF-8 without BOM", path)
	}
	shapeErr := CheckShape(data)
	if shapeErr == nil {
		// The shape holds: one JSON object, every key once, a whole
		// schema_version. Decoded straight away, without the map of its
		// top-level fields below (a copy of the whole file, and a third
		// pass over it); anything else takes the way below.
		var r Results
		if json.Unmarshal(data, &r) == nil {
			if r.SchemaVersion != SchemaVersion {
				return nil, otherVersion(path, r.SchemaVersion, r.Software.Version)
			}
			if err := validate(path, &r); err != nil {
				return nil, err
			}
			return &r, nil
		}
	}
	var top map[string]json.RawMessage
	if err := json.Unmarshal(data, &top); err != nil {
		if shapeErr != nil && !IsTopLevelShapeError(shapeErr) {
			return nil, shapeError(path, shapeErr) // JSON broken or cut short at a field
		}
		if startsAsResults(data) {
			// A run's file broken by an edit (a comma left before the
			// last '}'): said to be no results file at all, with advice
			// to give another folder.
			return nil, shapeError(path, errors.New(jsonCause(data, err)))
		}
		return nil, fmt.Errorf("report: %s is not a results file written by areasweep (%s); give the --out folder of a finished run", path, jsonCause(data, err))
	}
	raw, ok := top["schema_version"]
	if !ok {
		return nil, fmt.Errorf("report: %s is not a results file written by areasweep (it has no schema_version); give the --out folder of a finished run", path)
	}
	var version int
	// A null reads as 0 without an error: it is the shape's problem
	// (schema_version is null), not a version 0.
	if json.Unmarshal(raw, &version) == nil && version != SchemaVersion && string(bytes.TrimSpace(raw)) != "null" {
		// Another version's file: its shape is another's too, so this
		// comes before the shape's problems.
		var sw struct {
			Version string `json:"version"`
		}
		if json.Unmarshal(top["software"], &sw) != nil {
			sw.Version = ""
		}
		return nil, otherVersion(path, version, sw.Version)
	}
	if shapeErr != nil {
		return nil, shapeError(path, shapeErr)
	}
	var r Results
	if err := json.Unmarshal(data, &r); err != nil {
		return nil, fmt.Errorf("report: %s is not a results file written by areasweep (%s); give the --out folder of a finished run", path, jsonCause(data, err))
	}
	if err := validate(path, &r); err != nil {
		return nil, err
	}
	return &r, nil
}

// utf16Text reports whether data is UTF-16 text: it starts with a UTF-16
// byte-order mark, or its first two bytes are an ASCII character and a
// 0 (little-endian without one) or the reverse.
func utf16Text(data []byte) bool {
	if len(data) < 2 {
		return false
	}
	a, b := data[0], data[1]
	return a == 0xFF && b == 0xFE || a == 0xFE && b == 0xFF || a != 0 && a < 0x80 && b == 0 || a == 0 && b != 0 && b < 0x80
}

// startsAsResults reports whether data starts as a run writes
// results.json: '{', then the key schema_version.
func startsAsResults(data []byte) bool {
	rest, ok := bytes.CutPrefix(bytes.TrimLeft(data, " \t\r\n"), []byte("{"))
	return ok && bytes.HasPrefix(bytes.TrimLeft(rest, " \t\r\n"), []byte(`"schema_version"`))
}

// otherVersion says that the file at path has another schema version,
// written by the software version by ("" if unknown), and what to do: an
// older file is best run again (builds of one development version can
// write different schema versions, so the version alone may not find the
// build that wrote it), a newer one re-rendered by the build that wrote it.
func otherVersion(path string, version int, by string) error {
	if by != "" {
		by = " (" + by + ")"
	}
	if version < SchemaVersion {
		return fmt.Errorf("report: %s has schema_version %d, written by an earlier areasweep%s; this build reads %d: run the study again with this build, or re-render it with the build that wrote it",
			path, version, by, SchemaVersion)
	}
	return fmt.Errorf("report: %s has schema_version %d, this build reads %d: re-render it with the areasweep version that wrote it%s, or run the study again with this one",
		path, version, SchemaVersion, by)
}

// shapeError says that the file at path fails CheckShape, and what to do.
func shapeError(path string, err error) error {
	return fmt.Errorf("report: %s is not a results file written by areasweep as it stands: %v; the file was edited, damaged or cut short: restore it from a copy, or rerun areasweep run to write a new one", path, err)
}

// jsonCause says in plain words why a file is not the JSON of a results
// file: cut short, not JSON (where), or JSON of another shape.
func jsonCause(data []byte, err error) string {
	var syn *json.SyntaxError
	var typ *json.UnmarshalTypeError
	switch {
	case errors.Is(err, io.ErrUnexpectedEOF) || err.Error() == "unexpected end of JSON input":
		return "it is cut short"
	case errors.As(err, &syn):
		return "it is not valid JSON " + jsonSyntaxWords(data, syn.Offset, syn)
	case errors.As(err, &typ) && typ.Field == "":
		return fmt.Sprintf("it holds a JSON %s, not an object", typ.Value)
	case errors.As(err, &typ):
		return fmt.Sprintf("its field %s holds a JSON %s of the wrong kind", typ.Field, typ.Value)
	}
	return "it cannot be read as JSON"
}

// Encode returns the canonical JSON encoding of r: two-space indent, a final
// newline, keys in struct order. The bytes are those of a json.Encoder with
// SetIndent("", "  ") (HTML characters escaped); the values are encoded by
// encoding/json and indented by indentJSON, which is faster than the
// encoder's own indenting (TestEncodeSameAsEncodingJSON). EncodeTo
// writes the same bytes to a writer.
func (r *Results) Encode() ([]byte, error) {
	var buf bytes.Buffer
	if err := r.EncodeTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// EncodeTo writes Encode's bytes to w, in pieces of about
// encodeChunk bytes.
//
// Why in pieces: a json.Encoder marshals the whole value into one buffer
// grown by doubling before it writes anything (9 MB compact, 14 MB
// indented at 60 extents; each doubling fresh memory, page faults and a
// copy). Here each top-level field is encoded on its own, and a slice
// field (the scores, curves, paired records, ...) element by element, by
// one json.Encoder into one reused buffer, the pieces joined as
// encoding/json joins the fields of a struct and the elements of a slice
// (resultsFields) and indented as they come (indenter), so nothing larger
// than the largest single field besides the slices (the sensitivity
// analysis, under 1 MB) is held.
func (r *Results) EncodeTo(w io.Writer) error {
	fields := resultsFields()
	if fields == nil { // a field the piecewise encoding does not handle
		var buf bytes.Buffer
		if err := json.NewEncoder(&buf).Encode(r); err != nil {
			return fmt.Errorf("report: encode results: %w", err)
		}
		_, err := w.Write(indentJSON(make([]byte, 0, buf.Len()*7/4), buf.Bytes()))
		return err
	}
	e := &pieceEncoder{w: w, out: make([]byte, 0, encodeChunk+encodeChunk/2)}
	e.enc = json.NewEncoder(&e.piece)
	rv := reflect.ValueOf(r).Elem()
	e.raw([]byte("{"))
	first := true
	for _, f := range fields {
		fv := rv.Field(f.index)
		if f.omitEmpty && isEmptyJSONValue(fv) {
			continue
		}
		if !first {
			e.raw([]byte(","))
		}
		first = false
		e.raw(f.key)
		if f.elements && !fv.IsNil() {
			e.raw([]byte("["))
			for i := range fv.Len() {
				if i > 0 {
					e.raw([]byte(","))
				}
				// A pointer to the element: addressable, as an element
				// of a slice is to encoding/json.
				e.value(fv.Index(i).Addr().Interface())
			}
			e.raw([]byte("]"))
		} else {
			e.value(fv.Addr().Interface())
		}
	}
	e.raw([]byte("}\n"))
	e.flush()
	if e.err != nil {
		return fmt.Errorf("report: encode results: %w", e.err)
	}
	return nil
}

// encodeChunk is about the size of EncodeTo's writes.
const encodeChunk = 256 << 10

// pieceEncoder is EncodeTo's state: the indented output not yet written,
// the encoder and its reused buffer, the first error.
type pieceEncoder struct {
	w     io.Writer
	out   []byte
	ind   indenter
	piece bytes.Buffer
	enc   *json.Encoder
	err   error
}

// raw appends compact JSON text, indented.
func (e *pieceEncoder) raw(b []byte) {
	e.out = e.ind.indent(e.out, b)
	if len(e.out) >= encodeChunk {
		e.flush()
	}
}

// value appends the encoding of v, indented.
func (e *pieceEncoder) value(v any) {
	if e.err != nil {
		return
	}
	e.piece.Reset()
	if err := e.enc.Encode(v); err != nil {
		e.err = err
		return
	}
	e.raw(bytes.TrimSuffix(e.piece.Bytes(), []byte("\n"))) // the newline Encode ends a value with
}

// flush writes what is held.
func (e *pieceEncoder) flush() {
	if e.err == nil && len(e.out) > 0 {
		_, e.err = e.w.Write(e.out)
	}
	e.out = e.out[:0]
}

// resultsField is a field of Results as encoding/json encodes it: its
// index, its key as written ("name":), whether it has omitempty and
// whether it is a slice encoded element by element (not []byte, which
// encoding/json writes in base64, nor a slice type with its own
// marshaller).
type resultsField struct {
	index     int
	key       []byte
	omitEmpty bool
	elements  bool
}

// resultsFields returns the fields of Results that encoding/json encodes,
// in its order, or nil when Results has a field whose encoding EncodeTo
// does not reproduce (embedded, unexported with a tag, a json option
// other than omitempty, a duplicate or unusual key, or a Results with
// its own MarshalJSON); TestResultsFieldsPlain keeps it from being nil.
var resultsFields = sync.OnceValue(func() []resultsField {
	rt := reflect.TypeFor[Results]()
	if marshals(rt) {
		return nil
	}
	var fs []resultsField
	seen := map[string]bool{}
	for i := range rt.NumField() {
		f := rt.Field(i)
		tag, hasTag := f.Tag.Lookup("json")
		if f.Anonymous || (!f.IsExported() && hasTag) {
			return nil
		}
		if !f.IsExported() || tag == "-" {
			continue
		}
		name, opts, _ := strings.Cut(tag, ",")
		if name == "" {
			name = f.Name
		}
		if (opts != "" && opts != "omitempty") || seen[name] || strings.ContainsAny(name, "\"\\<>&") {
			return nil
		}
		seen[name] = true
		key, err := json.Marshal(name)
		if err != nil {
			return nil
		}
		elements := f.Type.Kind() == reflect.Slice && f.Type.Elem().Kind() != reflect.Uint8 && !marshals(f.Type)
		fs = append(fs, resultsField{index: i, key: append(key, ':'), omitEmpty: opts == "omitempty", elements: elements})
	}
	return fs
})

// marshals tells whether t or *t has a method through which
// encoding/json encodes it (MarshalJSON or MarshalText).
func marshals(t reflect.Type) bool {
	for _, m := range []reflect.Type{reflect.TypeFor[json.Marshaler](), reflect.TypeFor[encoding.TextMarshaler]()} {
		if t.Implements(m) || reflect.PointerTo(t).Implements(m) {
			return true
		}
	}
	return false
}

// isEmptyJSONValue is encoding/json's test for omitempty: false, 0, a nil
// pointer or interface, an empty array, map, slice or string.
func isEmptyJSONValue(v reflect.Value) bool {
	switch v.Kind() {
	case reflect.Array, reflect.Map, reflect.Slice, reflect.String:
		return v.Len() == 0
	case reflect.Bool, reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr,
		reflect.Float32, reflect.Float64, reflect.Interface, reflect.Pointer:
		return v.IsZero()
	}
	return false
}

// IsNull reports whether m is a null rather than a model under evaluation.
func (m Model) IsNull() bool { return m.Role == RoleNull }
