package batchrun

import (
	"io"
	"path/filepath"
	"strconv"

	"areasweep/cmd/internal/outdir"
)

// Options are the batch's settings, as the command's flags give them.
type Options struct {
	Table string
	Out   string
	// Jobs is the most studies running at once; Memory the budget in
	// bytes they may need together (0: MemoryBudget of this machine).
	Jobs   int
	Memory int64
	// Only restricts the run to these study ids (a scheduler task runs
	// one); the summary is then not written.
	Only []string
	// SummaryOnly writes the summary from the finished study folders and
	// runs nothing but the merges of studies whose shards all finished.
	SummaryOnly bool
	// Shards splits each study into this many shards of grid rows
	// (run --shard), merged into the study's folder (1: whole studies).
	Shards int
	// Shard, with Only naming one study, runs only that shard (a
	// scheduler task); 0: every shard.
	Shard int
	Force bool
	Quiet bool
	// Slurm writes the SLURM job files instead of running; Submit also
	// submits them (see slurm.go).
	Slurm SlurmOptions
	// Version is recorded in each study's results (pipeline.Options).
	Version string
	// Build names this areasweep's build (pipeline.Options.Build).
	Build string
}

// SlurmOptions turn a batch into a SLURM job array plus a merge job.
type SlurmOptions struct {
	// Enabled (--slurm) writes the job files instead of running.
	Enabled bool
	// Submit submits them with sbatch; Wait then waits until they left
	// the queue and reports the tasks that did not finish.
	Submit, Wait bool
	// Partition, TimeLimit, CPUs and MaxParallel are the job's resources.
	Partition, TimeLimit string
	CPUs, MaxParallel    int
}

// IO is what Run writes to and how it tells the command's signal handler
// what a stop leaves behind.
type IO struct {
	// Out receives the summary's path and the SLURM plan; ErrOut the
	// progress lines (none with Options.Quiet).
	Out, ErrOut io.Writer
	// StopNote, when not nil, sets what a stop signal's message says of
	// the outputs while the studies run and returns the function that
	// puts the previous note back.
	StopNote func(note string) (restore func())
}

// OwnDir is the folder of the batch's own files inside --out (shards,
// failure records, the SLURM plan); ids cannot start with a dot, so it
// never clashes with a study. Its presence also marks --out as a batch's
// folder.
const OwnDir = outdir.BatchOwnDir

// shardDir is the folder of shard i of study id: inside the batch's own
// folder, so that the study folder (the merge's --out) holds no input.
func shardDir(out, id string, i int) string {
	return filepath.Join(out, OwnDir, "shards", id, strconv.Itoa(i))
}

// failurePath is where a study's last error is kept, so that a summary
// written later (by the scheduler's merge job) can show it.
// Shard k > 0 has its own record: the shards of a study run as separate
// scheduler tasks, and one's success must not erase another's failure.
func failurePath(out, id string, k int) string {
	if k > 0 {
		id += ".shard-" + strconv.Itoa(k)
	}
	return filepath.Join(out, OwnDir, "failed", id+".txt")
}

// slurmDir is where the plan goes: manifest.tsv, array.sh, merge.sh, logs/.
func slurmDir(out string) string { return filepath.Join(out, OwnDir, "slurm") }
