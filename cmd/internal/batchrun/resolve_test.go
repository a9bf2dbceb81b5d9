package batchrun

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/batch"
	"areasweep/cmd/internal/pipeline"
	"areasweep/cmd/internal/settings"
)

// TestBatchSettingsHashIgnoresHowTableIsNamed: the studies' input paths
// and the completion marker's settings checksum must not depend on whether the table was named by a
// relative or an absolute path (a scheduler task names it absolutely; a
// user resumes from another folder), or every finished study would be
// taken as made from other settings.
func TestBatchSettingsHashIgnoresHowTableIsNamed(t *testing.T) {
	s := newSmallStudy(t)
	table := batchTable(t, s)
	wd, err := os.Getwd()
	if err != nil {
		t.Fatal(err)
	}
	rel, err := filepath.Rel(wd, table)
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(t.TempDir(), "out")
	byAbs, err := resolve(&Options{Table: table, Out: out})
	if err != nil {
		t.Fatal(err)
	}
	byRel, err := resolve(&Options{Table: rel, Out: out})
	if err != nil {
		t.Fatal(err)
	}
	// The table's relative paths resolve to absolute ones either way, so
	// the studies record the same inputs in results.json.
	for i := range byAbs {
		if o := byRel[i].opts.Occurrences; o != byAbs[i].opts.Occurrences || !filepath.IsAbs(o) {
			t.Errorf("study %s: occurrences %s with %s, %s with %s", byAbs[i].id, byAbs[i].opts.Occurrences, table, o, rel)
		}
	}
	for i := range byAbs {
		if byAbs[i].settings != byRel[i].settings {
			t.Errorf("study %s: settings checksum %s with %s, %s with %s", byAbs[i].id, byAbs[i].settings, table, byRel[i].settings, rel)
		}
	}
	// Another input must still change it.
	byAbs[1].opts.Occurrences = s.Far
	if h := batch.SettingsHash(canonicalSettings(byAbs[1].opts)); h == byRel[1].settings {
		t.Error("another occurrence file gave the same settings checksum")
	}
}

// TestSettingsDiff: a finished study whose table row changed was refused
// as "made from other settings" without saying which; the marker now
// keeps the settings, and the refusal names each changed key with both
// values (at most maxDiffShown, then a count). A marker from before
// (no settings kept) or one that does not decode gives no names.
func TestSettingsDiff(t *testing.T) {
	base := pipeline.Options{Values: settings.Defaults()}
	change := func(f func(o *pipeline.Options)) []byte {
		o := base
		o.E = append([]float64{}, base.E...)
		f(&o)
		return canonicalSettings(o)
	}
	was := string(canonicalSettings(base))
	for _, c := range []struct {
		name string
		was  string
		now  []byte
		want string
	}{
		{"same", was, canonicalSettings(base), ""},
		{"one number", was, change(func(o *pipeline.Options) { o.Iterations = 250 }), "iterations 1000 then, 250 now"},
		{"a list and a text", was, change(func(o *pipeline.Options) { o.E = []float64{0.05, 0.1}; o.EcoregionField = "unit" }),
			`ecoregion-field "" then, "unit" now; e [0.05] then, [0.05, 0.1] now`},
		{"more than three", was, change(func(o *pipeline.Options) {
			o.Iterations, o.Fraction, o.Seed, o.NoThin = 10, 0.25, 9, true
		}), "iterations 1000 then, 10 now; fraction 0.5 then, 0.25 now; seed 1 then, 9 now; and 1 more"},
		{"an older marker", "", change(func(o *pipeline.Options) { o.Iterations = 250 }), ""},
		{"a damaged value", "{", change(func(o *pipeline.Options) { o.Iterations = 250 }), ""},
	} {
		if got := settingsDiff(c.was, c.now); got != c.want {
			t.Errorf("%s: %q, want %q", c.name, got, c.want)
		}
	}
}

// TestMissingInputBackslashes: a study table made on Windows (Excel)
// whose paths use backslashes names the file the path with / would be,
// instead of "does not exist or cannot be read; check the path".
func TestMissingInputBackslashes(t *testing.T) {
	dir := t.TempDir()
	os.MkdirAll(filepath.Join(dir, "inputs"), 0o755)
	occ := filepath.Join(dir, "inputs", "occ.csv")
	os.WriteFile(occ, []byte("x"), 0o644)
	o := &pipeline.Options{}
	o.Occurrences = filepath.Join(dir, `inputs\occ.csv`)
	col, err := missingInput(o)
	if col != "occurrences" || err == nil || !strings.Contains(err.Error(), "write the path with / between folders ("+occ+" exists)") {
		t.Errorf("column %q: %v", col, err)
	}
}
