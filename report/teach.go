package report

import (
	"encoding/json"
	"fmt"
	"math"

	"areasweep/extent/vocab"
	"areasweep/metrics"
)

// teachCell is one model x extent entry of the embedded data.
type teachCell struct {
	Model          string    `json:"model"`
	Extent         string    `json:"extent"`
	Scored         bool      `json:"scored"`
	Reason         string    `json:"reason,omitempty"`
	AUC            float64   `json:"auc"`
	AUCSD          float64   `json:"auc_sd"`
	PartialROC     float64   `json:"partial_roc"`
	PartialROCLow  float64   `json:"partial_roc_low"`
	PartialROCHigh float64   `json:"partial_roc_high"`
	PartialROCOK   bool      `json:"partial_roc_ok"`
	Omission       float64   `json:"omission"`
	AreaFrac       float64   `json:"area_fraction"`
	ThreshOK       bool      `json:"threshold_ok"`
	TestPoints     int       `json:"test_points"`
	X              []float64 `json:"x"`
	Y              []float64 `json:"y"`

	// PartialROCNoInterval: the percentiles of the published bootstrap
	// are not given (BootstrapReadable is false; PartialROCLow and
	// PartialROCHigh are 0).
	PartialROCNoInterval bool `json:"partial_roc_no_interval,omitempty"`
	// AUCSDNone: there is no SD of AUC over the paired resamples (fewer
	// than 2 test points or resamples; AUCSD is 0).
	AUCSDNone bool `json:"auc_sd_none,omitempty"`
	// More are the partial ROC ratios at the other E values the explorer
	// shades (teachPayload.Bands), in the order of the E given; the
	// fields above hold the first E's.
	More []teachRatio `json:"more_partial_roc"`
}

// teachRatio is a cell's partial ROC ratio at one E other than the first.
type teachRatio struct {
	E          float64 `json:"e"`
	Ratio      float64 `json:"ratio"`
	Low        float64 `json:"low"`
	High       float64 `json:"high"`
	OK         bool    `json:"ok"`
	NoInterval bool    `json:"no_interval,omitempty"`
}

// teachBand is a shaded band of the explorer's ROC panel, as the ROC
// figure's panels shade it (rocBands): y from Lo to Hi in grey Grey
// (0 to 255).
type teachBand struct {
	E    float64 `json:"e"`
	Lo   float64 `json:"lo"`
	Hi   float64 `json:"hi"`
	Grey uint8   `json:"grey"`
}

type teachExtent struct {
	ID      string     `json:"id"`
	Kind    vocab.Kind `json:"kind"`
	Params  string     `json:"params"`
	AreaKm2 float64    `json:"area_km2"`
	Area    string     `json:"area"`
}

type teachPayload struct {
	// Models lists the models, then the nulls (references any model must
	// beat, after Hijmans 2012), and Labels how the page names each one.
	Models  []string      `json:"models"`
	Labels  []string      `json:"labels"`
	Extents []teachExtent `json:"extents"`
	E       float64       `json:"e"`
	// Es are the E values whose partial ROC region the explorer shades
	// and whose ratio it lists, as given (the first rocMaxBands, as the
	// ROC figure), Bands their bands and Unshaded the E values past them.
	Es       []float64   `json:"es"`
	Bands    []teachBand `json:"bands"`
	Unshaded string      `json:"unshaded"`
	Default  string      `json:"default_extent"`
	// Base is the extent every difference is taken from (the base
	// extent, or the one standing in for it).
	Base string `json:"base_extent"`
	// BaseWord names Base in the explorer's sentence: "the base extent",
	// or "the reference extent" when another stands in for it.
	BaseWord string `json:"base_word"`
	// Bootstrap names the partial ROC bootstrap whose percentiles the
	// explorer quotes (bootstrapName: "the published bootstrap" only
	// when it draws 50%).
	Bootstrap string      `json:"bootstrap"`
	Cells     []teachCell `json:"cells"`
}

func round4(v float64) float64 { return math.Round(v*1e4) / 1e4 }

// teachData builds the JSON embedded for the extent selector. Curves are
// rounded to 4 decimals (drawing only).
func teachData(r *Results) ([]byte, error) {
	s := r.Sensitivity
	pl := teachPayload{Models: []string{}, Labels: []string{}, Extents: []teachExtent{}, Cells: []teachCell{}, Es: []float64{}, Bands: []teachBand{}}
	pl.Models = append(pl.Models, s.ModelNames...)
	for _, n := range nulls(r) {
		pl.Models = append(pl.Models, n.Name)
	}
	for _, m := range pl.Models {
		pl.Labels = append(pl.Labels, ModelLabel(r, m))
	}
	if len(r.Settings.E) > 0 {
		pl.E = r.Settings.E[0]
	}
	pl.Es = append(pl.Es, r.Settings.E[:min(len(r.Settings.E), rocMaxBands)]...)
	for _, b := range rocBands(r.Settings.E) {
		pl.Bands = append(pl.Bands, teachBand{E: b.e, Lo: b.lo, Hi: b.hi, Grey: b.fill.Y})
	}
	if len(r.Settings.E) > rocMaxBands {
		var rest []string
		for _, e := range r.Settings.E[rocMaxBands:] {
			rest = append(rest, fmtG(e))
		}
		pl.Unshaded = joinList(rest)
	}
	pl.Base, pl.BaseWord, pl.Bootstrap = s.BaseExtent, referenceWord(s), bootstrapName(r.Settings)
	for _, e := range rocExtents(r) {
		pl.Extents = append(pl.Extents, teachExtent{ID: e.ID, Kind: e.Kind, Params: e.Params, AreaKm2: e.AreaKm2, Area: fmtArea(e.AreaKm2)})
		if e.ID == vocab.BaseID && pl.Default == "" {
			pl.Default = e.ID
		}
		if e.ID == s.BaseExtent {
			// The extent every difference is taken from, which is the
			// base extent unless another stands in for it: the explorer
			// opened on an unscored base ("Model m is not scored on
			// base") when a reference extent stood in for it.
			pl.Default = e.ID
		}
	}
	if pl.Default == "" && len(pl.Extents) > 0 {
		pl.Default = pl.Extents[0].ID
	}
	for _, m := range pl.Models {
		for _, e := range pl.Extents {
			c := teachCell{Model: m, Extent: e.ID, X: []float64{}, Y: []float64{}, More: []teachRatio{}}
			var sc *Score
			for i := range r.Scores {
				if r.Scores[i].Model == m && r.Scores[i].Extent == e.ID {
					sc = &r.Scores[i]
					break
				}
			}
			if sc == nil || !sc.Scored {
				c.Reason = "no score"
				if sc != nil && sc.NotScored != "" {
					c.Reason = sc.NotScored
				}
				pl.Cells = append(pl.Cells, c)
				continue
			}
			c.Scored, c.AUC, c.AUCSD, c.TestPoints = true, sc.AUC, sc.AUCBootSD, sc.TestPoints
			if sc.TestPoints < 2 || r.Settings.PairedResamples < 2 {
				c.AUCSD, c.AUCSDNone = 0, true
			}
			for k, e := range pl.Es {
				var t teachRatio
				t.E = e
				for _, pr := range sc.PartialROC {
					if math.Abs(pr.E-e) <= 1e-12 && pr.Defined && !(pr.Iterations > 0 && pr.NotFormed >= pr.Iterations) {
						t.Ratio, t.OK = pr.Ratio, true
						if BootstrapReadable(pr) {
							t.Low, t.High = pr.CILow, pr.CIHigh
						} else {
							t.NoInterval = true
						}
					}
				}
				if k > 0 {
					c.More = append(c.More, t)
					continue
				}
				c.PartialROC, c.PartialROCOK, c.PartialROCLow, c.PartialROCHigh, c.PartialROCNoInterval = t.Ratio, t.OK, t.Low, t.High, t.NoInterval
			}
			for _, t := range sc.Thresholds {
				if t.Name == metrics.ThresholdMTP {
					c.Omission, c.AreaFrac, c.ThreshOK = t.Omission, t.AreaFraction, true
				}
			}
			if cv := findCurve(r, m, e.ID); cv != nil {
				n := min(len(cv.X), len(cv.Y))
				for i := 0; i < n; i++ {
					c.X = append(c.X, round4(cv.X[i]))
					c.Y = append(c.Y, round4(cv.Y[i]))
				}
			}
			pl.Cells = append(pl.Cells, c)
		}
	}
	// encoding/json escapes <, > and & so the data cannot close the script.
	b, err := json.Marshal(pl)
	if err != nil {
		return nil, fmt.Errorf("report: embed selector data: %w", err)
	}
	return b, nil
}
