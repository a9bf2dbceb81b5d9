package batchrun

import (
	"context"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"time"

	"areasweep/cmd/internal/batch"
	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/pipeline"
	"areasweep/report"
)

// unit is one piece of a batch run by batch.Run: a whole study, one
// shard of it (shard > 0) or the merge of its shards (merge).
type unit struct {
	study int
	shard int
	merge bool
}

// runStudies runs every study not yet done within the limits and returns
// each study's error in table order: whole, or with --shards N as N
// shards each followed by the merge of its shards. With --shard I (a
// scheduler task) only that shard runs; with --summary-only nothing runs
// but the merges of studies whose shards are all finished.
func runStudies(ctx context.Context, o *Options, studies []*study, p *progress) []error {
	errs := make([]error, len(studies))
	todo := toRun(o, studies, errs, p)
	if o.Shards <= 1 {
		var units []unit
		for _, i := range todo {
			if o.SummaryOnly {
				errs[i] = readFailure(o.Out, studies[i], 0)
				continue
			}
			units = append(units, unit{study: i})
		}
		runUnits(ctx, o, studies, units, errs, p)
		return errs
	}
	runShards(ctx, o, studies, todo, errs, p)
	if o.Shard > 0 {
		return errs
	}
	mergeShards(ctx, o, studies, todo, errs, p)
	return errs
}

// toRun returns the indices of the studies to run, in table order, and
// sets the error of each study that is not to run and did not finish: an
// input file missing, a marker that cannot be read, a stale study without
// --force. A stale study, or any with --force, runs with run --force.
func toRun(o *Options, studies []*study, errs []error, p *progress) []int {
	workers := max(1, runtime.GOMAXPROCS(0)/o.Jobs)
	var todo []int
	var skipped []string
	defer func() { p.skipped(skipped) }()
	for i, st := range studies {
		if st.missing != nil {
			errs[i] = st.missing
			p.line(st.id, "not run: "+oneLine(fault.UserText(st.missing)))
			continue
		}
		s, why, err := st.state()
		switch {
		case err != nil:
			errs[i] = forceNote(o, err)
			continue
		case s == stateDone:
			skipped = append(skipped, st.id)
			continue
		case s == stateStale && !o.Force:
			errs[i] = &staleError{fmt.Sprintf("%s was made %s; add --force to run it again, or %s", st.dir, why.why, why.remedy)}
			continue
		case s == stateStale || o.Force:
			// --force also lets a study run into a folder left without
			// a marker (the user's, or one given areasweep's files by
			// hand): run --force replaces areasweep's files only.
			st.opts.Force = true
		}
		if st.opts.Workers == 0 {
			st.opts.Workers = workers
		}
		todo = append(todo, i)
	}
	return todo
}

// runShards runs the shards of the studies todo not yet finished (with
// --shard I only shard I; with --summary-only none).
func runShards(ctx context.Context, o *Options, studies []*study, todo []int, errs []error, p *progress) {
	var units []unit
	for _, i := range todo {
		st := studies[i]
		for k := 1; k <= o.Shards; k++ {
			if o.SummaryOnly || (o.Shard > 0 && k != o.Shard) {
				continue
			}
			switch s, _, err := shardState(o, st, k, o.Shards); {
			case err != nil:
				errs[i] = err
			case s == stateDone:
				p.line(st.id, fmt.Sprintf("shard %d/%d already finished, skipped", k, o.Shards))
			default:
				units = append(units, unit{study: i, shard: k})
			}
		}
	}
	runUnits(ctx, o, studies, units, errs, p)
}

// mergeShards merges the shards of each study todo whose shards all
// finished; a study with a shard not finished gets that shard's error.
func mergeShards(ctx context.Context, o *Options, studies []*study, todo []int, errs []error, p *progress) {
	var merges []unit
	for _, i := range todo {
		if errs[i] != nil {
			continue
		}
		var missing []int
		var stale error
		for k := 1; k <= o.Shards; k++ {
			s, why, _ := shardState(o, studies[i], k, o.Shards)
			if s != stateDone {
				missing = append(missing, k)
			}
			if s == stateStale && stale == nil {
				stale = fmt.Errorf("shard %d/%d was made %s; running the same command again runs it again", k, o.Shards, why.why)
			}
		}
		if len(missing) > 0 {
			if errs[i] = stale; stale == nil {
				errs[i] = readFailure(o.Out, studies[i], missing[0])
			}
			continue
		}
		merges = append(merges, unit{study: i, merge: true})
	}
	runUnits(ctx, o, studies, merges, errs, p)
}

// runUnits runs units within the limits (each needs its study's memory
// estimate) and stores the first error of each study in errs.
func runUnits(ctx context.Context, o *Options, studies []*study, units []unit, errs []error, p *progress) {
	var jobs []batch.Job
	var run []unit
	for _, u := range units {
		st := studies[u.study]
		if errs[u.study] != nil {
			continue
		}
		need, err := pipeline.Estimate(st.opts)
		if err != nil {
			errs[u.study] = err
			continue
		}
		jobs = append(jobs, batch.Job{ID: st.id, Need: need})
		run = append(run, u)
	}
	budget := o.Memory
	if budget == 0 {
		if budget = pipeline.MemoryBudget(); budget == 0 {
			budget = 1 << 62 // unknown: the job count alone limits
		}
	}
	runErrs := batch.Run(ctx, jobs, batch.Limits{Jobs: o.Jobs, Budget: budget}, func(ctx context.Context, k int) error {
		u := run[k]
		st := studies[u.study]
		what := ""
		switch {
		case u.shard > 0:
			what = fmt.Sprintf("shard %d/%d", u.shard, o.Shards)
		case u.merge:
			what = fmt.Sprintf("merge of %d shards", o.Shards)
		}
		p.line(st.id, strings.TrimSpace(what+" started"))
		t0 := time.Now()
		warned, err := runUnit(ctx, o, st, u)
		if err != nil {
			p.line(st.id, strings.TrimSpace(what+" failed: ")+" "+oneLine(fault.UserText(err)))
			return err
		}
		done := strings.TrimSpace(fmt.Sprintf("%s finished in %.1f s", what, time.Since(t0).Seconds()))
		if warned > 0 {
			done += fmt.Sprintf(", with %d warning%s (%s, and the summary's Warnings)", warned, report.Plural(warned), filepath.Join(st.id, "run.log"))
		}
		p.line(st.id, done)
		return nil
	})
	for k, err := range runErrs {
		u := run[k]
		if err == nil || errs[u.study] != nil {
			continue
		}
		if errors.Is(err, batch.ErrTooLarge) {
			err = fmt.Errorf("%w%s; give more with --memory, or make the study smaller (coarser or clipped rasters, fewer extents or workers)", err, pipeline.StripsAdvice(studies[u.study].opts))
		}
		if u.shard > 0 {
			err = fmt.Errorf("shard %d/%d: %w", u.shard, o.Shards, err)
		}
		errs[u.study] = err
	}
}

// runUnit runs one unit and writes its completion marker: the study's
// folder for a whole study or a merge, the shard's folder for a shard.
// The marker is written into the run's staging folder (pipeline.IO.Seal)
// and moved into place with the outputs, after them: a unit killed at any
// moment (SIGKILL at a scheduler's time limit) leaves either its folder
// as it was, to be run again, or every output with its marker, never
// finished outputs without a marker (which a re-run would refuse as a
// folder it did not make) nor a marker beside half-moved outputs. It
// returns the number of warnings of a whole study or a merge (0 for a
// shard, whose warnings its merge gives).
func runUnit(ctx context.Context, o *Options, st *study, u unit) (int, error) {
	po := st.opts
	po.Quiet, po.Version, po.Build = true, o.Version, o.Build
	var read []pipeline.InputFile
	var m batch.Marker
	pio := pipeline.IO{ErrOut: io.Discard, Log: &pipeline.Log{}, Inputs: func(f []pipeline.InputFile) { read = f },
		Seal: func(stage string) error {
			if u.shard == 0 {
				sum, err := batch.FileSHA256(filepath.Join(stage, "results.json"))
				if err != nil {
					return err
				}
				m["results"] = sum
			}
			m.SetInputs(markerInputs(read))
			return batch.WriteMarker(stage, m)
		}}
	if u.shard > 0 {
		po.Out = shardDir(o.Out, st.id, u.shard)
		// The shard's folder is the batch's own, and a shard replaces
		// only its own partial file and log: a folder left without a
		// marker (a shard stopped before it could write one, or made
		// from other settings) is run into again without --force.
		po.Force = true
		m = batch.Marker{"study": st.id, "shard": fmt.Sprintf("%d/%d", u.shard, o.Shards), "settings": st.settings, markerValues: string(st.canonical)}
		return 0, pipeline.RunShard(ctx, po, pio, u.shard, o.Shards)
	}
	m = batch.Marker{"study": st.id, "settings": st.settings, markerValues: string(st.canonical)}
	if u.merge {
		// The partial files by name, not their folders: a folder keeps
		// the file of an earlier split (--shards changed between two
		// runs), which the merge would refuse as a mix of splits on
		// every rerun.
		files := make([]string, o.Shards)
		for k := range files {
			files[k] = filepath.Join(shardDir(o.Out, st.id, k+1), pipeline.ShardFileName(k+1, o.Shards))
		}
		mo := pipeline.MergeOptions{Files: files, Out: st.dir, Force: po.Force, Quiet: true, Workers: po.Workers, Version: o.Version, Build: o.Build}
		return warnings(pipeline.Merge(ctx, mo, pio))
	}
	return warnings(pipeline.Run(ctx, po, pio))
}

// warnings is the number of warnings of a run's results.
func warnings(r *report.Results, err error) (int, error) {
	if err != nil || r == nil {
		return 0, err
	}
	return len(r.Warnings), nil
}

// progress prints one line per study event to standard error.
type progress struct {
	quiet bool
	w     io.Writer
	mu    sync.Mutex
}

// maxSkipLines is how many finished studies the progress names one line
// each; past that one line counts them (our choice: a rerun of a batch of
// dozens printed a line for every finished study).
const maxSkipLines = 10

// skipped prints the studies skipped as finished, in table order: a line
// each, or one line for all when they are more than maxSkipLines.
func (p *progress) skipped(ids []string) {
	if len(ids) <= maxSkipLines {
		for _, id := range ids {
			p.line(id, "already finished, skipped")
		}
		return
	}
	if p.quiet {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	fmt.Fprintf(p.w, "areasweep batch: %d studies already finished, skipped (%s, ... %s; summary.csv lists them)\n", len(ids), strings.Join(ids[:3], ", "), ids[len(ids)-1])
}

func (p *progress) line(id, what string) {
	if p.quiet {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	fmt.Fprintf(p.w, "areasweep batch: %s: %s\n", id, what)
}
