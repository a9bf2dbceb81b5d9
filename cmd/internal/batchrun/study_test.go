package batchrun

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"testing"

	"areasweep/cmd/internal/smallstudy"
	"areasweep/extent"
)

func TestMain(m *testing.M) {
	extent.Configure()
	os.Exit(m.Run())
}

// runBatch runs the batch of o in this process, as the batch command does
// with its defaults (--jobs 1, --shards 1) and without run's checks of
// each row (the tables here are valid).
func runBatch(o *Options) error {
	o.Jobs, o.Shards, o.Version = max(o.Jobs, 1), max(o.Shards, 1), "test"
	var out, errOut bytes.Buffer
	if err := Run(context.Background(), o, IO{Out: &out, ErrOut: &errOut}); err != nil {
		return fmt.Errorf("%w\n%s", err, errOut.String())
	}
	return nil
}

// smallStudy, batchTable and inputsStudy are the command's end-to-end
// tests' own (package smallstudy).
type smallStudy = smallstudy.Study

func newSmallStudy(t *testing.T) *smallStudy { return smallstudy.New(t, t.TempDir()) }

func batchTable(t *testing.T, s *smallStudy) string { return smallstudy.BatchTable(t, s.Dir) }

func inputsStudy(t *testing.T) (dir, table string) {
	s := newSmallStudy(t)
	dir = t.TempDir()
	return dir, smallstudy.Inputs(t, dir, s.Model, s.Region, s.Occ)
}
