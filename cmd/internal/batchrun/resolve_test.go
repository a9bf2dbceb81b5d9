package batchrun

import (
	"os"
	"path/filepath"
	"testing"

	"areasweep/cmd/internal/batch"
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
