package pipeline

import (
	"io"
	"os"
	"strings"
	"sync"

	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/settings"
	"areasweep/metrics"
)

// Options are the resolved settings of one run: the command fills them
// from its flags and the study file (settings.Table), batch from a table
// row, and each checks them with Validate before calling Run.
type Options struct {
	settings.Values

	// ExtentsOnly stops after building and exporting the family.
	ExtentsOnly bool
	// Shard is {I, N} for shard I of N's run (set by RunShard), zero
	// otherwise: its output folder is opened with outdir.OpenShard.
	Shard [2]int

	// InputsDir, when set, is a directory of generated inputs (the demo's)
	// that is moved into Out/inputs with the results; input paths are
	// recorded as they will be after the move.
	InputsDir string
	// StudyFile is the study file the settings came from, if any; it is
	// only kept away from --out like the other inputs.
	StudyFile string
	// Version is the software version recorded in results.json.
	Version string
	// Build names this areasweep's build (its source revision and Go
	// version, see cmd/areasweep's buildID); a shard records it beside
	// Version, and a merge refuses the shards of another build.
	Build string
	// ExpectInputs, when set, are the inputs' checksums the run must find
	// (role and SHA-256, in the order of results.json's inputs): a merge
	// refuses inputs that changed since its shards ran.
	ExpectInputs []metrics.InputChecksum
	// MoreInputs are other files the run reads (a merge's partial files),
	// kept away from --out like the inputs.
	MoreInputs []string
	// ShardDir is the folder a merge's shards ran in, when they recorded
	// it: named when a relative input read here is not the file they read.
	ShardDir string
}

// InputPaths lists every input file, for the check that --out holds none.
func (o *Options) InputPaths() []string {
	p := []string{o.Occurrences, o.Region, o.Ecoregions}
	if crs := o.CRSFile(); crs != "" {
		p = append(p, crs)
	}
	for _, m := range append(append(append([]string{}, o.Models...), o.Nulls...), o.Extra...) {
		if _, path, err := inputs.ParseNamedPath(m); err == nil {
			p = append(p, path)
		}
	}
	return p
}

// CRSFile returns --occurrences-crs when it names a file (a .prj or WKT
// file, which GDAL reads for the CRS), "" otherwise (an authority code,
// a WKT or PROJ string): such a file is an input like the others, its
// SHA-256 recorded and rechecked.
func (o *Options) CRSFile() string {
	if !namesFile(o.OccurrencesCRS) {
		return ""
	}
	return o.OccurrencesCRS
}

// namesFile reports whether crs, a CRS as the user wrote it, names a
// regular file (GDAL then reads the CRS from it).
func namesFile(crs string) bool {
	if crs == "" {
		return false
	}
	st, err := os.Stat(crs)
	return err == nil && st.Mode().IsRegular()
}

// IO are the streams a run writes to besides its output folder.
type IO struct {
	// ErrOut receives the log lines (unless Options.Quiet) and the
	// progress bars.
	ErrOut io.Writer
	// Terminal is true when ErrOut is a terminal (progress bars are drawn).
	Terminal bool
	// Log, when set, receives the run log as it is written (the command
	// reads it for a crash report); the same text goes to run.log.
	Log *Log
	// Inputs, when set, is called once the input checksums are taken
	// (results.json's inputs), with every file hashed: each input and its
	// sidecar files, in results.json's order. A batch records them in its
	// completion marker to tell, on a re-run, whether an input changed.
	Inputs func([]InputFile)
	// Seal, when set, is called with the staging folder once every output
	// is in it, before they are moved into --out; a batch writes its
	// completion marker there, so that the marker arrives with the
	// outputs (one rename onto a new --out; moved last into an existing
	// one) and a run killed at any moment leaves either no marker or
	// every output beside it.
	Seal func(stage string) error
}

// InputFile is one file a run hashed, with its size and modification
// time as found when its hashing started (a file changed while it is
// hashed is then seen as modified after it).
type InputFile struct {
	// Role is that of the input the file belongs to, as results.json
	// names it ("model:NAME", "occurrences", "region", ...); a sidecar
	// file has its input's role.
	Role string
	// Path is the file as it was opened.
	Path string
	// Size in bytes, ModTime in nanoseconds since 1970 (Unix time).
	Size, ModTime int64
	// SHA256 is the hex SHA-256 of its content.
	SHA256 string
}

// Log is the text of a run log, safe to read while the run writes it.
type Log struct {
	mu sync.Mutex
	b  strings.Builder
}

// WriteString appends s.
func (l *Log) WriteString(s string) {
	l.mu.Lock()
	l.b.WriteString(s)
	l.mu.Unlock()
}

// Write appends p; it never fails.
func (l *Log) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

// String returns the log so far.
func (l *Log) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}
