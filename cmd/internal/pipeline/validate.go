package pipeline

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/settings"
	"areasweep/extent"
	"areasweep/report"
)

// maxBuffers bounds each buffer list (our choice); the family holds at
// most extent.MaxMembers members anyway.
const maxBuffers = extent.MaxMembers

// Validate checks the settings that need no file access: the names, the
// inputs given, then the numbers, and --out; the first problem is
// reported, naming the setting as its flag ("--e value ..."), which a
// study file's key and a batch table's column share.
func (o *Options) Validate() error {
	for _, check := range []func() error{o.validateNames, o.validateInputs, o.validateNumbers, o.validateLists} {
		if err := check(); err != nil {
			return err
		}
	}
	if o.Out == "" {
		return fmt.Errorf("--out is empty; name an output directory")
	}
	return nil
}

// validateNames checks that a model is given and that the names of the
// models, nulls and extra layers are well formed and distinct.
func (o *Options) validateNames() error {
	if len(o.Models) == 0 && !o.ExtentsOnly {
		return fmt.Errorf("no model given: add --model NAME=PATH (or 'model:' in the study file)")
	}
	// Names are compared ignoring case: they become column names of
	// omitted_points.gpkg, which SQLite compares ignoring case, so "A" and
	// "a" would fail the run only when its outputs are written.
	seen := map[string]string{}
	for _, m := range o.Models {
		name, prev, err := namedOnce("--model", m, seen)
		switch {
		case err != nil:
			return err
		case prev == name:
			return fmt.Errorf("--model: name %q is given twice; give each model its own name", name)
		case prev != "":
			return fmt.Errorf("--model: names %q and %q differ only in case, which output tables do not tell apart; give each model its own name", prev, name)
		}
	}
	for _, m := range o.Nulls {
		name, prev, err := namedOnce("--null", m, seen)
		switch {
		case err != nil:
			return err
		case prev == name:
			return fmt.Errorf("--null: name %q is already used by a model or null; give each its own name", name)
		case prev != "":
			return fmt.Errorf("--null: name %q differs only in case from the model or null %q, which output tables do not tell apart; give each its own name", name, prev)
		}
	}
	if _, ok := seen[report.DistanceNullName]; ok && !o.NoDistanceNull {
		// Named by its flag first, so that a name from the study file is
		// told with the file and key (fromStudy), as the other names are.
		flag, what := "--model", "model"
		for _, m := range o.Nulls {
			if name, _, err := inputs.ParseNamedPath(m); err == nil && strings.EqualFold(name, report.DistanceNullName) {
				flag, what = "--null", "null"
			}
		}
		return fmt.Errorf("%s: the name %q is kept for the distance-only null; rename that %s (or add --no-distance-null)", flag, report.DistanceNullName, what)
	}
	// Extra layers' names become extent names (user_NAME), compared
	// ignoring case for the same reason: "Lake" and "lake" could not be
	// told apart in a case-insensitive table or file system.
	extras := map[string]string{}
	for _, m := range o.Extra {
		name, prev, err := namedOnce("--extra", m, extras)
		switch {
		case err != nil:
			return err
		case prev == name:
			return fmt.Errorf("--extra: name %q is given twice; give each extra layer its own name", name)
		case prev != "":
			return fmt.Errorf("--extra: names %q and %q differ only in case, which output tables do not tell apart; give each extra layer its own name", prev, name)
		}
	}
	return nil
}

// namedOnce parses the NAME=PATH value v of flag and records its name in
// seen (keyed by the name in lower case): prev is the name seen before
// that equals it ignoring case, "" when there is none.
func namedOnce(flag, v string, seen map[string]string) (name, prev string, err error) {
	name, _, err = inputs.ParseNamedPathOf(strings.TrimPrefix(flag, "--"), v)
	if err != nil {
		return "", "", fmt.Errorf("%s %q: %w", flag, v, err)
	}
	key := strings.ToLower(name)
	prev = seen[key]
	if prev == "" {
		seen[key] = name
	}
	return name, prev, nil
}

// validateInputs checks that the inputs every run needs are named.
func (o *Options) validateInputs() error {
	if o.Occurrences == "" {
		return fmt.Errorf("no occurrences given: add --occurrences FILE.csv")
	}
	if o.Region == "" {
		return fmt.Errorf("no base region given: add --region FILE (GeoPackage, Shapefile or GeoJSON)")
	}
	if o.Ecoregions != "" && o.EcoregionField == "" {
		if fields := extent.LayerFields(o.Ecoregions); len(fields) > 0 {
			return fmt.Errorf("--ecoregions %s needs --ecoregion-field NAME, the field holding each unit's id; its fields are: %s", o.Ecoregions, strings.Join(fields, ", "))
		}
		return fmt.Errorf("--ecoregions %s needs --ecoregion-field NAME, the field holding each unit's id", o.Ecoregions)
	}
	return crsTrailingText(o.OccurrencesCRS)
}

// validateNumbers checks the single numbers: counts, shares, E values,
// the worker count and the tolerances.
func (o *Options) validateNumbers() error {
	if o.EcoregionMinPoints < 1 {
		return fmt.Errorf("--ecoregion-min-points is %d; it must be 1 or more", o.EcoregionMinPoints)
	}
	for _, e := range o.E {
		if !(e > 0 && e < 1) {
			return fmt.Errorf("--e value %g is outside (0,1); E is a share of test points, e.g. 0.05", e)
		}
	}
	if len(o.E) == 0 {
		return fmt.Errorf("--e is empty; give at least one allowable omission, e.g. 0.05")
	}
	if o.Iterations < 1 || o.Iterations > settings.MaxIterations {
		return fmt.Errorf("--iterations is %d; it must be between 1 and %d", o.Iterations, settings.MaxIterations)
	}
	if !(o.Fraction > 0 && o.Fraction <= 1) {
		return fmt.Errorf("--fraction %g is outside (0,1]", o.Fraction)
	}
	if o.Workers < 0 || o.Workers > settings.MaxWorkers {
		return fmt.Errorf("--workers is %d; give 1 to %d, or leave it out to use every core", o.Workers, settings.MaxWorkers)
	}
	for _, t := range []struct {
		name string
		v    float64
	}{{"tolerance-auc", o.ToleranceAUC}, {"tolerance-partial-roc", o.TolerancePartialROC}, {"tolerance-omission", o.ToleranceOmission}, {"tolerance-boyce", o.ToleranceBoyce}} {
		if !(t.v > 0) || math.IsInf(t.v, 0) {
			return fmt.Errorf("--%s is %g; give a positive difference you would treat as negligible", t.name, t.v)
		}
	}
	return nil
}

// validateLists checks the number lists: finite values, at most so many,
// E values and thresholds each given once, and the buffers' signs.
func (o *Options) validateLists() error {
	for _, lst := range []struct {
		name string
		v    []float64
	}{{"region-buffers", o.RegionBuffers}, {"point-buffers", o.PointBuffers}, {"hull-buffers", o.HullBuffers}, {"thresholds", o.Thresholds}} {
		for _, v := range lst.v {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("--%s holds %v; give finite numbers", lst.name, v)
			}
		}
	}
	for _, lst := range []struct {
		name string
		v    []float64
		max  int
		dups bool
	}{{"region-buffers", o.RegionBuffers, maxBuffers, true}, {"point-buffers", o.PointBuffers, maxBuffers, true},
		{"hull-buffers", o.HullBuffers, maxBuffers, true}, {"e", o.E, settings.MaxE, false}, {"thresholds", o.Thresholds, settings.MaxThresholds, false}} {
		if len(lst.v) > lst.max {
			return fmt.Errorf("--%s has %d values; at most %d are allowed", lst.name, len(lst.v), lst.max)
		}
		if lst.dups {
			continue // buffer lists are sorted and de-duplicated, as documented
		}
		sorted := append([]float64(nil), lst.v...)
		sort.Float64s(sorted)
		for i := 1; i < len(sorted); i++ {
			if sorted[i] == sorted[i-1] {
				return fmt.Errorf("--%s gives %g twice; give each value once", lst.name, sorted[i])
			}
		}
	}
	for _, lst := range []struct {
		name string
		v    []float64
	}{{"region-buffers", o.RegionBuffers}, {"point-buffers", o.PointBuffers}, {"hull-buffers", o.HullBuffers}} {
		for _, d := range lst.v {
			if math.Abs(d) > settings.MaxBufferKm {
				return fmt.Errorf("--%s value %g km: no two places on Earth lie more than %d km apart; give distances in km (e.g. 50 for 50,000 m); a buffer that large takes every cell (or, shrinking, none), and the family's whole_raster already holds every cell", lst.name, d, settings.MaxBufferKm)
			}
		}
	}
	for _, d := range o.PointBuffers {
		if d <= 0 {
			return fmt.Errorf("--point-buffers value %g must be positive (km)", d)
		}
	}
	for _, d := range o.HullBuffers {
		if d < 0 {
			return fmt.Errorf("--hull-buffers value %g must be 0 (the hull) or positive (km)", d)
		}
	}
	return o.validateOmitColumns()
}

// maxOmitFields is the most fields a layer of omitted_points.gpkg may
// have: SQLite holds at most 2,000 columns in a table (SQLITE_MAX_COLUMN),
// and a GeoPackage layer's table spends two on the feature id and the
// geometry.
const maxOmitFields = 2000 - 2

// validateOmitColumns refuses settings whose omitted_points.gpkg would
// need more columns than a GeoPackage table holds: line and
// nearest_train_km, and one per model or null and threshold (the two
// training-presence ones and each fixed one). Two models, the distance-only
// null and 1000 --thresholds (3,008 columns) ran to the end and failed
// there, exit 1, with SQLite's "too many columns on test_points".
func (o *Options) validateOmitColumns() error {
	if o.ExtentsOnly {
		return nil
	}
	passes := len(o.Models) + len(o.Nulls)
	if !o.NoDistanceNull {
		passes++
	}
	cols := 2 + passes*(2+len(o.Thresholds))
	if passes == 0 || cols <= maxOmitFields {
		return nil
	}
	what := fmt.Sprintf("%d model(s) and null(s)", passes)
	if !o.NoDistanceNull {
		what += " (the distance-only null included)"
	}
	fix := fmt.Sprintf("give at most %d --thresholds", (maxOmitFields-2)/passes-2)
	if most := (maxOmitFields-2)/passes - 2; most < 0 {
		fix = fmt.Sprintf("give at most %d models and nulls together", (maxOmitFields-2)/2)
	} else if !o.NoDistanceNull {
		fix += ", or add --no-distance-null"
	}
	return fmt.Errorf("--thresholds has %d value(s): with %s, omitted_points.gpkg would need %d columns (one per model or null and threshold, the two training-presence thresholds included), more than the %d a GeoPackage table holds; %s",
		len(o.Thresholds), what, cols, maxOmitFields, fix)
}
