package main

import (
	"os"
	"path/filepath"
	"testing"

	"areasweep/cmd/internal/batch"
)

// TestBatchSettingsHashIgnoresHowTableIsNamed: the completion marker's
// settings checksum must not depend on whether the table was named by a
// relative or an absolute path (a scheduler task names it absolutely; a
// user resumes from another folder), or every finished study would be
// taken as made from other settings.
func TestBatchSettingsHashIgnoresHowTableIsNamed(t *testing.T) {
	s := sharedStudy(t)
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
	byAbs, err := resolveBatch(&BatchOptions{Table: table, Out: out})
	if err != nil {
		t.Fatal(err)
	}
	byRel, err := resolveBatch(&BatchOptions{Table: rel, Out: out})
	if err != nil {
		t.Fatal(err)
	}
	if byRel[0].opts.Occurrences == byAbs[0].opts.Occurrences {
		t.Fatalf("the test needs the two namings to give different input paths, both gave %s", byRel[0].opts.Occurrences)
	}
	for i := range byAbs {
		if byAbs[i].settings != byRel[i].settings {
			t.Errorf("study %s: settings checksum %s with %s, %s with %s", byAbs[i].id, byAbs[i].settings, table, byRel[i].settings, rel)
		}
	}
	// Another input must still change it.
	byAbs[1].opts.Occurrences = s.far
	if h := batch.SettingsHash(canonicalSettings(byAbs[1].opts.Options)); h == byRel[1].settings {
		t.Error("another occurrence file gave the same settings checksum")
	}
}
