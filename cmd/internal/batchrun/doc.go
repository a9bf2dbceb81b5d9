// Package batchrun runs the batch command's work: it reads a study table
// into studies, runs those not yet done (whole, or as shards followed by
// their merge) within a number of jobs and a memory budget, records each
// failure, and writes the summary across the studies; or, for a SLURM
// cluster, writes (and submits) the job array that does the same.
//
// The command gives it the flags' values (Options) and its writers (IO);
// it prints nothing else and never exits. Run is the one entry point. The
// scheduling within the limits and the completion marker are package
// batch's; one run of a study is package pipeline's.
//
// # The batch's folder
//
// --out holds one folder per study (the study's id), the summary files,
// and OwnDir: the batch's own files (the shards' folders, the last error
// of each study that failed, the SLURM plan). Its presence marks --out as
// a batch's folder; a study id cannot start with a dot, so it never
// clashes with a study.
//
// # Studies' states
//
// Before it runs a study, Run reads the completion marker in its folder
// (and in its shards' folders): none, the study runs; the marker's
// settings checksum is the study's now and its recorded input files are
// unchanged (package batch's Checker), the study is done and skipped;
// else the study is stale, named with the reason and run again only with
// --force. A stale shard runs again without --force: its folder is the
// batch's own.
package batchrun
