// Package slurm turns a list of tasks (one study, or one shard of a study,
// each into its own output folder) into a SLURM job array plus a dependent
// merge job: it writes the task manifest and the job scripts, submits them
// with sbatch when asked, waits for them, and knows which tasks are already
// finished so that a resubmission runs only the others.
//
// It sits under cmd/internal because only the command line uses it: it
// runs programs (sbatch, squeue) and writes scripts, which is neither
// scoring (metrics), extents (extent) nor reporting (report).
//
// # Manifest
//
// manifest.tsv is a tab-separated table with a header line and one line per
// task; task k of the array (SLURM_ARRAY_TASK_ID = k, from 1) is line k
// after the header:
//
//	study	shard	out
//	oak	1/2	/scratch/batch/oak/shard-1
//
// Study ids, shards and folders hold no tab, newline or carriage return.
//
// # Finished tasks
//
// A task is finished when its output folder holds the marker file
// MarkerName. The array script writes it only after the task's command
// exited with status 0, as its last step, atomically (a temporary file in
// the same folder, then a rename), so a marker never stands beside
// half-written outputs. A marker the command wrote itself (areasweep
// batch's, with the study's settings checksum) is kept, the script adding
// its own lines to it. A failed task removes the output folder it created
// when that folder is still empty. With Plan.CommandMakesOut the script
// does not create the folder: the command does (areasweep moves its
// staged outputs onto it in one rename), so a task killed at any moment
// leaves no folder or a finished one. The array script skips a task whose marker exists,
// and Plan.Pending lists the unfinished tasks, so that a resubmission can
// name only those in --array: tasks are idempotent and restartable.
//
// # Resources
//
// Each task asks for --mem from the run's memory estimate (MemoryMB: the
// estimate plus our own headroom), --cpus-per-task and, when given, a time
// limit and a partition. The merge job runs with --dependency=afterok:JID
// on the array, so it starts only when every array task succeeded.
package slurm
