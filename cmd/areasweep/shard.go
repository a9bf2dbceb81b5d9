package main

import (
	"context"
	"fmt"
	"path/filepath"
	"strconv"
	"strings"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/pipeline"
	"areasweep/cmd/internal/settings"
)

// maxShards bounds N in --shard I/N (our choice: far above any cluster
// array a single study needs; a shard is at least one grid row anyway).
const maxShards = 100000

// shardFlag is --shard I/N: run only shard I of N of the grid's rows and
// write its partial file (N = 0: not set).
type shardFlag struct{ I, N int }

func (f *shardFlag) String() string {
	if f.N == 0 {
		return ""
	}
	return fmt.Sprintf("%d/%d", f.I, f.N)
}

func (f *shardFlag) Set(s string) error {
	a, b, ok := strings.Cut(s, "/")
	i, err1 := strconv.Atoi(strings.TrimSpace(a))
	n, err2 := strconv.Atoi(strings.TrimSpace(b))
	if !ok || err1 != nil || err2 != nil || n < 1 || n > maxShards || i < 1 || i > n {
		return fmt.Errorf("%q is not I/N with 1 <= I <= N <= %d (e.g. --shard 2/8)", s, maxShards)
	}
	if f.N != 0 && (f.I != i || f.N != n) {
		// Only the last would be run, as with a file flag (onceString).
		return fmt.Errorf("--shard is given twice (%q, then %q); only one is used: give it once", f.String(), s)
	}
	f.I, f.N = i, n
	return nil
}

func (f *shardFlag) Type() string { return "I/N" }

// shardSweep runs shard o.Shard of the run o and prints where its partial
// file is.
func shardSweep(o *RunOptions) error {
	if o.ExtentsOnly {
		return fault.BadInput(fmt.Errorf("--shard splits the scoring passes; 'extents' scores nothing"))
	}
	log := &pipeline.Log{}
	setRunLog(log)
	defer setRunLog(nil)
	po := o.Options
	po.StudyFile, po.Version, po.Build = o.Study, version, buildID()
	if err := pipeline.RunShard(context.Background(), po, pipeline.IO{ErrOut: o.IO.ErrOut, Terminal: o.IO.Terminal, Log: log}, o.Shard.I, o.Shard.N); err != nil {
		return err
	}
	fmt.Fprintf(o.IO.Out, "partial file: %s\n", filepath.Join(o.Out, pipeline.ShardFileName(o.Shard.I, o.Shard.N)))
	return nil
}

// checkWorkers checks a --workers value of a command without RunOptions.
func checkWorkers(n int) error {
	if n < 0 || n > settings.MaxWorkers {
		return fault.BadInput(fmt.Errorf("--workers is %d; give 1 to %d, or leave it out to use every core", n, settings.MaxWorkers))
	}
	return nil
}
