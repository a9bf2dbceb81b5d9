// Package settings is the one table of a run's settings. Each row names a
// setting once: its flag (and study-file key), the type of its value,
// whether a study file may give it, its help text, its placeholder and
// how the README shows its default. The command binds its flags from the
// table, the study-file reader (package inputs) decodes keys by the
// table's kinds and resolves the paths they mark, and a test checks the
// README's list against it. Adding a setting touches Table, Values and
// the code that uses the value, nothing else.
package settings

import (
	"fmt"
	"reflect"
	"strconv"
	"strings"

	"areasweep/report"
)

// Kind is the type of a setting's value, which also says how a study file
// writes it.
type Kind int

const (
	// Text is a string.
	Text Kind = iota
	// Path is a string naming a file; a study file's relative path is
	// resolved against the study file's folder.
	Path
	// NamedPaths are NAME=PATH strings (a repeatable flag); each PATH is
	// resolved like a Path.
	NamedPaths
	// Bool is true or false (a flag without value).
	Bool
	// Int is a whole number (int).
	Int
	// Uint is a whole number from 0 (uint64).
	Uint
	// Float is a finite number (float64).
	Float
	// FloatList is a list of finite numbers ([]float64), comma-separated on
	// the command line.
	FloatList
	// CRS is a string: an authority code, WKT or PROJ string, or the path
	// of a file holding the CRS (a .prj or WKT file). A study file's
	// relative value that names a file beside the study file is resolved
	// against the study file's folder, as a Path is; any other value is
	// kept as written.
	CRS
)

// Setting is one row of the table.
type Setting struct {
	// Name is the long flag name, which is also the study-file key.
	Name string
	// Kind is the type of the value (it must match Field's pointer).
	Kind Kind
	// Arg is the placeholder of the value in the help and the README
	// (empty for a Bool).
	Arg string
	// Usage is the one-line help; Arg appears in it between backquotes
	// (the flag library's placeholder mark) unless the Kind shows LIST.
	Usage string
	// Study is true when a study file may give the setting.
	Study bool
	// Scoring marks a setting that changes only the scores: the extents
	// command accepts it but hides it from its help.
	Scoring bool
	// Unset is how the README shows a zero default ("—" when empty, "off"
	// for a Bool).
	Unset string
	// Field returns a pointer to the setting's field in v.
	Field func(v *Values) any
}

// Values are the settings of one run, filled from the defaults, the study
// file and the flags.
type Values struct {
	Models             []string // NAME=PATH
	Nulls              []string // NAME=PATH, rasters scored as nulls
	NoDistanceNull     bool
	Occurrences        string
	OccurrencesCRS     string
	Region             string
	Ecoregions         string
	EcoregionField     string
	EcoregionMinPoints int
	EcoregionClip      bool
	Extra              []string // NAME=PATH
	RegionBuffers      []float64
	PointBuffers       []float64
	PointBuffersAll    bool
	HullBuffers        []float64
	E                  []float64
	Iterations         int
	Fraction           float64
	Thresholds         []float64
	Seed               uint64
	Out                string
	Force              bool
	Quiet              bool
	NoThin             bool
	MembershipTIFF     bool
	Workers            int
	// Tolerances of the equivalence verdicts (report.Settings).
	ToleranceAUC, TolerancePartialROC, ToleranceOmission, ToleranceBoyce float64
}

// Defaults are the settings used when neither flag nor file says.
func Defaults() Values {
	return Values{
		EcoregionMinPoints:  1,
		RegionBuffers:       []float64{-50, 50, 100, 250, 500},
		PointBuffers:        []float64{50, 100, 200},
		HullBuffers:         []float64{0, 100},
		E:                   []float64{0.05},
		Iterations:          1000,
		Fraction:            0.5,
		Seed:                1,
		Out:                 "areasweep-out",
		ToleranceAUC:        report.DefaultToleranceAUC,
		TolerancePartialROC: report.DefaultTolerancePartialROC,
		ToleranceOmission:   report.DefaultToleranceOmission,
		ToleranceBoyce:      report.DefaultToleranceBoyce,
	}
}

// Bounds on settings, so that a typo cannot ask for hours or for more
// memory than a machine has. Each is our own choice, far above real use.
const (
	// MaxIterations bounds the bootstrap.
	MaxIterations = 1_000_000
	// MaxThresholds bounds --thresholds (each is an exact layout value and
	// a row per model and extent).
	MaxThresholds = 1000
	// MaxE bounds --e (one partial ROC bootstrap per value).
	MaxE = 100
	// MaxWorkers bounds --workers: more goroutines than this only add
	// accumulators to merge.
	MaxWorkers = 256
	// MaxBufferKm bounds each buffer distance, and is not our choice: no
	// two points of the WGS84 ellipsoid lie farther apart than half a
	// meridian, 20,003.93 km (the geodesic from pole to pole; pyproj's
	// Geod(ellps="WGS84").inv(0, 90, 0, -90)), rounded up. A larger buffer
	// takes every cell (or, shrinking, none) and is most likely metres
	// given as km; its id would spell the number out in full (1e300 made
	// an id of 300 digits).
	MaxBufferKm = 20004
)

// Table lists every setting. The study-file keys come first, in the order
// the reader lists them in its messages.
var Table = []Setting{
	{Name: "model", Kind: NamedPaths, Arg: "NAME=PATH", Study: true,
		Usage: "model raster as `NAME=PATH` (repeatable; all on one grid)",
		Field: func(v *Values) any { return &v.Models }},
	{Name: "occurrences", Kind: Path, Arg: "FILE", Study: true,
		Usage: "CSV `FILE` of occurrences: longitude, latitude and role (train/test) columns",
		Field: func(v *Values) any { return &v.Occurrences }},
	{Name: "occurrences-crs", Kind: CRS, Arg: "CRS", Study: true, Unset: "WGS84 lon/lat",
		Usage: "`CRS` of the occurrence coordinates, e.g. EPSG:3035 (default WGS84 lon/lat)",
		Field: func(v *Values) any { return &v.OccurrencesCRS }},
	{Name: "region", Kind: Path, Arg: "FILE", Study: true,
		Usage: "`FILE` of base study region polygons (GeoPackage, Shapefile, GeoJSON, any OGR format)",
		Field: func(v *Values) any { return &v.Region }},
	{Name: "ecoregions", Kind: Path, Arg: "FILE", Study: true,
		Usage: "optional ecoregion/unit polygon layer `FILE`",
		Field: func(v *Values) any { return &v.Ecoregions }},
	{Name: "ecoregion-field", Kind: Text, Arg: "NAME", Study: true,
		Usage: "id field `NAME` of the ecoregion layer",
		Field: func(v *Values) any { return &v.EcoregionField }},
	{Name: "ecoregion-min-points", Kind: Int, Arg: "K", Study: true,
		Usage: "units with at least `K` training points are occupied",
		Field: func(v *Values) any { return &v.EcoregionMinPoints }},
	{Name: "ecoregion-clip", Kind: Bool, Study: true,
		Usage: "also add the ecoregion extents clipped to the base region",
		Field: func(v *Values) any { return &v.EcoregionClip }},
	{Name: "extra", Kind: NamedPaths, Arg: "NAME=PATH", Study: true,
		Usage: "extra extent polygons as `NAME=PATH` (repeatable)",
		Field: func(v *Values) any { return &v.Extra }},
	{Name: "region-buffers", Kind: FloatList, Arg: "LIST", Study: true,
		Usage: "geodesic buffers of the base region in km, comma-separated; negative shrinks (write --region-buffers=-50,100)",
		Field: func(v *Values) any { return &v.RegionBuffers }},
	{Name: "point-buffers", Kind: FloatList, Arg: "LIST", Study: true,
		Usage: "radii in km of discs around the training points, comma-separated",
		Field: func(v *Values) any { return &v.PointBuffers }},
	{Name: "point-buffers-all", Kind: Bool, Study: true,
		Usage: "draw point buffers around all points, not only training points",
		Field: func(v *Values) any { return &v.PointBuffersAll }},
	{Name: "hull-buffers", Kind: FloatList, Arg: "LIST", Study: true,
		Usage: "buffers in km of the training points' convex hull, comma-separated (0 = the hull itself)",
		Field: func(v *Values) any { return &v.HullBuffers }},
	{Name: "e", Kind: FloatList, Arg: "LIST", Study: true, Scoring: true,
		Usage: "allowable omission E for partial ROC, each in (0,1), comma-separated",
		Field: func(v *Values) any { return &v.E }},
	{Name: "iterations", Kind: Int, Arg: "B", Study: true, Scoring: true,
		Usage: fmt.Sprintf("resamples `B`: of the published partial ROC bootstrap and of the paired full-size resamples (1 to %d)", MaxIterations),
		Field: func(v *Values) any { return &v.Iterations }},
	{Name: "fraction", Kind: Float, Arg: "F", Study: true, Scoring: true,
		Usage: "share `F` of test points drawn (with replacement) in each bootstrap iteration, in (0,1]",
		Field: func(v *Values) any { return &v.Fraction }},
	{Name: "thresholds", Kind: FloatList, Arg: "LIST", Study: true, Scoring: true, Unset: "none",
		Usage: fmt.Sprintf("fixed suitability thresholds to test besides the training-presence ones, comma-separated (at most %d)", MaxThresholds),
		Field: func(v *Values) any { return &v.Thresholds }},
	{Name: "seed", Kind: Uint, Arg: "N", Study: true, Scoring: true,
		Usage: "random seed `N` of the bootstrap",
		Field: func(v *Values) any { return &v.Seed }},
	{Name: "out", Kind: Path, Arg: "DIR", Study: true,
		Usage: "output directory `DIR` (an existing non-empty one needs --force)",
		Field: func(v *Values) any { return &v.Out }},
	{Name: "no-thin", Kind: Bool, Study: true,
		Usage: "keep several presences of one role in one cell (default: one per cell)",
		Field: func(v *Values) any { return &v.NoThin }},
	{Name: "membership-tif", Kind: Bool, Study: true,
		Usage: "also write extents.tif, one band per extent",
		Field: func(v *Values) any { return &v.MembershipTIFF }},
	{Name: "null", Kind: NamedPaths, Arg: "NAME=PATH", Study: true, Scoring: true,
		Usage: "raster scored as a null, not a model, as `NAME=PATH` (repeatable; same grid): shown beside the models, never ranked",
		Field: func(v *Values) any { return &v.Nulls }},
	{Name: "no-distance-null", Kind: Bool, Study: true, Scoring: true,
		Usage: "skip the distance-only null (minus the distance to the nearest training point) and the sorting-bias ratios",
		Field: func(v *Values) any { return &v.NoDistanceNull }},
	{Name: "tolerance-auc", Kind: Float, Arg: "D", Study: true, Scoring: true,
		Usage: "AUC difference `D` from the base extent you treat as negligible (our default)",
		Field: func(v *Values) any { return &v.ToleranceAUC }},
	{Name: "tolerance-partial-roc", Kind: Float, Arg: "D", Study: true, Scoring: true,
		Usage: "partial ROC ratio difference `D` the report's description counts as large (its differences between extents are described, not judged; our default)",
		Field: func(v *Values) any { return &v.TolerancePartialROC }},
	{Name: "tolerance-omission", Kind: Float, Arg: "D", Study: true, Scoring: true,
		Usage: "omission-rate and predicted-area difference `D` you treat as negligible (our default)",
		Field: func(v *Values) any { return &v.ToleranceOmission }},
	{Name: "tolerance-boyce", Kind: Float, Arg: "D", Study: true, Scoring: true,
		Usage: "Boyce index difference `D` the report's description counts as large (Boyce differences are described, not judged; our default)",
		Field: func(v *Values) any { return &v.ToleranceBoyce }},
	// Not in a study file: they say how to run, not what to compute.
	{Name: "force", Kind: Bool,
		Usage: "replace areasweep's files in an existing output directory (other files are kept)",
		Field: func(v *Values) any { return &v.Force }},
	{Name: "quiet", Kind: Bool,
		Usage: "no progress bars, no log lines and no answer line on standard error",
		Field: func(v *Values) any { return &v.Quiet }},
	{Name: "workers", Kind: Int, Arg: "N", Scoring: true, Unset: "all cores",
		Usage: fmt.Sprintf("scoring goroutines `N`, 1 to %d (default, or 0: all cores); results do not depend on it", MaxWorkers),
		Field: func(v *Values) any { return &v.Workers }},
}

// Lookup returns the setting named name.
func Lookup(name string) (Setting, bool) {
	for _, s := range Table {
		if s.Name == name {
			return s, true
		}
	}
	return Setting{}, false
}

// StudyKeys returns the keys a study file may contain, in table order.
func StudyKeys() []string {
	var keys []string
	for _, s := range Table {
		if s.Study {
			keys = append(keys, s.Name)
		}
	}
	return keys
}

// Change is a setting whose value differs between two Values: its name
// (the flag and study-file key) and the two values as a message shows
// them (Show).
type Change struct{ Name, A, B string }

// Changes lists the settings of Table whose values differ between a and
// b, in the table's order: the one comparison of two runs' settings (a
// changed batch row, shards of different runs).
func Changes(a, b *Values) []Change {
	var out []Change
	for _, s := range Table {
		x, y := reflect.ValueOf(s.Field(a)).Elem().Interface(), reflect.ValueOf(s.Field(b)).Elem().Interface()
		if !reflect.DeepEqual(x, y) {
			out = append(out, Change{s.Name, Show(x), Show(y)})
		}
	}
	return out
}

// Show writes a setting's value as a message shows it: a number in Go's
// shortest exact form, a list in brackets ([] when empty), a text quoted.
func Show(v any) string {
	switch x := v.(type) {
	case string:
		return strconv.Quote(x)
	case []string:
		return "[" + strings.Join(x, ", ") + "]"
	case []float64:
		parts := make([]string, len(x))
		for i, f := range x {
			parts[i] = strconv.FormatFloat(f, 'g', -1, 64)
		}
		return "[" + strings.Join(parts, ", ") + "]"
	case float64:
		return strconv.FormatFloat(x, 'g', -1, 64)
	}
	return fmt.Sprint(v)
}
