package pipeline

import (
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"time"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/outdir"
	"areasweep/cmd/internal/pass"
	"areasweep/extent"
	"areasweep/extent/gdalmsg"
	"areasweep/metrics"
	"areasweep/report"
	"areasweep/report/outfile"
)

// histBins is the size of the fine histogram used for the Boyce index and
// curve drawing.
const histBins = 4096

// previewSide is the longer side of the coarse map copy in results.json.
const previewSide = 240

// Run runs the study o from its inputs to its outputs in --out and
// returns the results it wrote. Everything that can be checked is checked
// before --out is touched: the settings, every input file, the grids, the
// occurrences and the memory the run needs.
func Run(ctx context.Context, o Options, io IO) (*report.Results, error) {
	return RunInto(ctx, o, io, nil)
}

// RunInto is Run into d, an output folder already opened (the demo's, which
// holds the generated inputs); with d nil it opens o.Out itself. It reads
// as the data flows.
func RunInto(ctx context.Context, o Options, io IO, d *outdir.Dir) (*report.Results, error) {
	// Inputs, grid, points, the output folder and the family.
	s, err := Prepare(ctx, o, io, d)
	if err != nil {
		return nil, err
	}
	defer s.Close()
	// One pass per model and null; the first also finds the valid cells
	// the family is clipped to (Pass shows the step).
	if !o.ExtentsOnly {
		for i := range s.Passes() {
			if err := s.Pass(ctx, i); err != nil {
				return nil, err
			}
		}
	}
	// Analysis and outputs, moved into --out.
	return s.Finish(ctx)
}

// checkOut makes the refusals of the output folder that need no write
// (outdir.Check) before the long work of reading the points and hashing
// the inputs; Prepare opens it after that work (nothing is written before
// the inputs are checked), when it is not given.
func (s *Study) checkOut() error {
	if s.dir != nil {
		return nil
	}
	// The sidecars the checksums will find, listed now (no hashing), so
	// that one inside --out is named as the input there.
	var sidecars []string
	for _, in := range s.inputFiles() {
		if in.kind >= 0 {
			sidecars = append(sidecars, sidecarFiles(in.path, in.kind)...)
		}
	}
	return outdir.Check(s.o.Out, s.o.Force, append(s.outInputs(), sidecars...), s.shardFiles())
}

// outInputs are the files --out may not hold or be: the inputs, the study
// file and their sidecars found so far.
func (s *Study) outInputs() []string {
	o := s.o
	return append(append(append(o.InputPaths(), o.StudyFile), o.MoreInputs...), s.sidecars...)
}

// Study is one run in progress: its settings, grid, points, family and the
// results so far. Make it with Prepare, run each of its Passes with Pass
// (or Plan, a source of sums and Score), then Finish it; Close it on every
// path.
type Study struct {
	o      *Options
	io     IO
	log    *Log
	start  time.Time
	models []namedPath
	grid   *extent.Grid
	points []report.Point
	lonlat []extent.LonLat // per point
	cell   []int           // per point, -1 outside
	// firstVals, firstValid: the first model's values at cell, read once
	// when the points are placed and reused by its pass's layout.
	firstVals  []float64
	firstValid []bool
	// first is the first model's raster, open from its sampling at the
	// points (with the blocks it decoded there) until its pass plans it.
	first *pass.Raster
	// streams: the passes read their sums with Stream (SetSums clears it).
	streams bool
	// sidecars are the files read with the inputs (a raster's .prj, a
	// virtual raster's sources, a shapefile's .dbf), from the checksums:
	// --out may not hold them either.
	sidecars []string
	fam      *extent.Family
	res      *report.Results
	dir      *outdir.Dir
	ownDir   bool
	stage    string
	valid    *extent.Valid // nil until known: the family is then unclipped
	nWarn    int           // family warnings already reported
	// evals holds the paired-resample evaluator of every scored model x
	// extent (paired.go).
	evals map[[2]string]*metrics.Evaluator
	// rawDegrees: the table's coordinates, declared projected, all lie in
	// degree ranges.
	rawDegrees bool
	// occPiped is the occurrence table's record when it was read from a
	// pipe (readOccurrences): its checksum is of the bytes read then.
	occPiped *InputFile
	// sums gives a pass's sums (Stream unless SetSums replaced it).
	sums SumsFunc
	// rows, when set, restricts Stream to those grid rows (a shard's).
	rows *pass.RowRange
}

// Prepare checks the inputs, reads the grid and the points, opens the
// output folder (d, or o.Out when d is nil) and builds the extent family.
// Nothing is written before the inputs have been checked.
func Prepare(ctx context.Context, o Options, io IO, d *outdir.Dir) (*Study, error) {
	s := &Study{o: &o, io: io, log: io.Log, start: time.Now(), res: &report.Results{
		SchemaVersion: report.SchemaVersion,
		Software:      report.Software{Name: "areasweep", Version: o.Version},
		Seed:          o.Seed,
		Warnings:      []string{},
	}}
	if s.log == nil {
		s.log = &Log{}
	}
	s.sums, s.streams = (*Study).Stream, true
	s.dir = d
	for _, step := range []func() error{
		checkSetup,
		s.checkTempDir,
		s.checkFiles,
		s.checkOut,
		s.openGrid,
		s.checkMemory,
		func() error { return s.timed("occurrences read, placed and sampled", s.readPoints) },
		func() error { return s.timed("input checksums (SHA-256)", s.checksums) },
		s.checkExpectedInputs,
		ctx.Err,
	} {
		if err := step(); err != nil {
			s.Close()
			return nil, err
		}
	}
	if s.dir == nil {
		var err error
		if o.Shard[1] > 0 {
			s.dir, err = outdir.OpenShard(o.Out, o.Force, s.outInputs(), s.shardFiles())
		} else {
			s.dir, err = outdir.Open(o.Out, o.Force, s.outInputs())
		}
		if err != nil {
			s.Close() // the first model's raster
			return nil, err
		}
	}
	if s.dir.Cleaned > 0 {
		s.logf("removed %d staging folder(s) left in or beside %s by earlier runs that were stopped", s.dir.Cleaned, o.Out)
	}
	if n := len(s.dir.Kept); n > 0 {
		// Not a warning of the results (results.json does not depend on
		// what lies beside --out): the log's note.
		names := firstOf(s.dir.Kept, 3)
		s.logf("note: left %d folder(s) named like staging folders of %s as they are (%s): they hold no record that a stopped areasweep run of this --out made them, or their run still works on this machine; remove them yourself if they are left-overs",
			n, o.Out, names)
	}
	s.stage = s.dir.Stage
	if err := s.buildFamily(); err != nil {
		s.Close()
		return nil, err
	}
	return s, nil
}

// checkSetup refuses, before any input is read, a GDAL whose drivers
// areasweep needs are turned off (GDAL_SKIP) and a PROJ without its
// database (a PROJ_DATA naming a folder without proj.db): the inputs
// would otherwise be blamed, in the libraries' words.
func checkSetup() error {
	if err := extent.CheckSetup(); err != nil {
		return fault.BadInput(err)
	}
	return nil
}

// checkTempDir fails a run that draws figures (not extents, not a
// shard) whose temporary folder the PDF figures cannot use, before any
// work: it failed at the end, after the scoring (exit 1 all the same).
func (s *Study) checkTempDir() error {
	if s.o.ExtentsOnly || s.o.Shard[1] > 0 {
		return nil
	}
	if err := report.CheckTempDir(); err != nil {
		return fmt.Errorf("%w; nothing was written", err)
	}
	return nil
}

// Close removes the staging folder unless Finish moved it into place; it
// is safe to call more than once.
func (s *Study) Close() {
	if s.first != nil {
		s.first.Close()
		s.first = nil
	}
	if s.dir != nil {
		s.dir.Abort() // nothing once finished
	}
}

// Results are the results so far (complete after Finish).
func (s *Study) Results() *report.Results { return s.res }

// Stage is the staging folder the outputs are written into.
func (s *Study) Stage() string { return s.stage }

// Finish writes the outputs into the staging folder and moves them into
// --out: for a scoring run the family, the analysis (distances between
// points, the paired comparisons, report.Analyze), results.json, scores.csv,
// omitted_points.gpkg and the report; for ExtentsOnly the family and
// extents.csv; then run.log.
func (s *Study) Finish(ctx context.Context) (*report.Results, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if s.o.ExtentsOnly {
		if err := s.writeFamily(); err != nil {
			return nil, err
		}
		if err := outfile.Write(filepath.Join(s.stage, "extents.csv"), extentsCSV(s.res.Extents), 0o666); err != nil {
			return nil, s.writeFailed(err)
		}
	} else if err := s.finishScores(); err != nil {
		return nil, err
	}
	s.libraryMessages()
	s.logf("run finished in %.2f s (before moving the outputs into place)", time.Since(s.start).Seconds())
	if err := outfile.Write(filepath.Join(s.stage, "run.log"), []byte(s.log.String()), 0o666); err != nil {
		return nil, s.writeFailed(err)
	}
	if err := s.seal(); err != nil {
		return nil, err
	}
	if err := s.dir.Finish(); err != nil {
		return nil, err
	}
	return s.res, nil
}

// seal calls IO.Seal on the staging folder, if set.
func (s *Study) seal() error {
	if s.io.Seal == nil {
		return nil
	}
	if err := s.io.Seal(s.stage); err != nil {
		return s.writeFailed(err)
	}
	return nil
}

// finishScores writes the family, analyses the scores and writes the
// results and the report, overlapping what does not depend on each other:
// extents.gpkg is written during the analysis (which does not read what
// it writes), and results.json, scores.csv and omitted_points.gpkg while
// the report is drawn (both only read the analysed results). Every file
// is written whole by one goroutine, so no output depends on the
// schedule; the phases are logged in a fixed order once both sides of a
// pair are done, and the first error in that order is returned.
func (s *Study) finishScores() error {
	var famDur time.Duration
	famErr := make(chan error, 1)
	go func() {
		t0 := time.Now()
		err := recovered("writing extents.gpkg", s.writeFamilyFiles)
		famDur = time.Since(t0)
		famErr <- err
	}()
	t0 := time.Now()
	err := s.analyse()
	anaDur := time.Since(t0)
	ferr := <-famErr
	s.logf("extents.gpkg written in %.2f s (during the analysis)", famDur.Seconds())
	s.logf("analysis in %.2f s", anaDur.Seconds())
	if fault.IsInternal(ferr) {
		return ferr
	} else if ferr != nil {
		return s.writeFailed(ferr)
	}
	if err != nil {
		return err
	}
	var resDur time.Duration
	resErr := make(chan error, 1)
	go func() {
		t0 := time.Now()
		err := recovered("writing the results files", s.writeResults)
		resDur = time.Since(t0)
		resErr <- err
	}()
	t0 = time.Now()
	err = report.Write(s.stage, s.res)
	repDur := time.Since(t0)
	rerr := <-resErr
	s.logf("results.json, scores.csv and omitted_points.gpkg written in %.2f s (while the report was drawn)", resDur.Seconds())
	s.logf("report written in %.2f s", repDur.Seconds())
	if rerr != nil {
		return rerr
	}
	if err != nil {
		return s.writeFailed(err)
	}
	return nil
}

// recovered returns fn's error, or an internal error naming what for a
// panic in fn (a bug): on a goroutine of its own, a panic would end the
// program past the command's recovery.
func recovered(what string, fn func() error) (err error) {
	defer func() {
		if v := recover(); v != nil {
			err = fault.Internal(fmt.Errorf("%s: %v", what, v))
		}
	}()
	return fn()
}

// writeResults writes results.json, scores.csv and omitted_points.gpkg
// into the staging folder.
func (s *Study) writeResults() error {
	// Streamed into the file rather than held whole (14 MB at 60
	// extents, Results.EncodeTo). An error of the encoding itself (not of
	// the file) is internal, as from Encode.
	var encErr error
	fileErr := false
	if err := outfile.WriteFrom(filepath.Join(s.stage, "results.json"), 0o666, func(w io.Writer) error {
		encErr = s.res.EncodeTo(writerFunc(func(p []byte) (int, error) {
			n, err := w.Write(p)
			fileErr = fileErr || err != nil
			return n, err
		}))
		return encErr
	}); err != nil {
		if encErr != nil && !fileErr {
			return fault.Internal(err)
		}
		return s.writeFailed(err)
	}
	if err := outfile.Write(filepath.Join(s.stage, "scores.csv"), scoresCSV(s.res), 0o666); err != nil {
		return s.writeFailed(err)
	}
	if err := writeOmittedGPKG(filepath.Join(s.stage, "omitted_points.gpkg"), s.res); err != nil {
		return s.writeFailed(err)
	}
	return nil
}

// writerFunc is a function as an io.Writer.
type writerFunc func(p []byte) (int, error)

func (f writerFunc) Write(p []byte) (int, error) { return f(p) }

// recordedPath is the path written into results.json for an input: as
// given, or for generated demo inputs, where they end up (OUT/inputs/...).
func (s *Study) recordedPath(p string) string {
	if d := s.o.InputsDir; d != "" {
		if rel, err := filepath.Rel(d, p); err == nil && !strings.HasPrefix(rel, "..") {
			return filepath.Join(s.o.Out, "inputs", rel)
		}
	}
	return p
}

// namedPath is a model raster by name; Null marks one the user gave as a
// null (--null).
type namedPath struct {
	Name, Path string
	Null       bool
}

// who names m in messages: "model NAME", or "null NAME" for a raster the
// user gave with --null.
func (m namedPath) who() string { return roleName(m.Null, m.Name) }

// roleName is "model NAME", or "null NAME" when null.
func roleName(null bool, name string) string {
	if null {
		return "null " + name
	}
	return "model " + name
}

// modelWho names a pass's model in messages, as namedPath.who does.
func modelWho(m report.Model) string { return roleName(m.IsNull(), m.Name) }

// logf writes a line to the run log and, unless quiet, to stderr.
func (s *Study) logf(format string, args ...any) {
	line := fmt.Sprintf(format, args...)
	s.log.WriteString(line + "\n")
	if !s.o.Quiet && s.io.ErrOut != nil {
		fmt.Fprintln(s.io.ErrOut, line)
	}
}

func (s *Study) warn(msg string) {
	msg = fault.Warning(msg) // e.g. the extent family's "extent: ...; no hull extents"
	s.res.Warnings = append(s.res.Warnings, msg)
	s.logf("warning: %s", msg)
}

// writeFailed words an error while writing the outputs (exit 1), naming
// the output folder; a full disk or quota also says what to do.
func (s *Study) writeFailed(err error) error {
	return WriteFailedIn(s.o.Out, s.stage, err)
}

// sqliteFull is SQLite's text for a full disk (SQLITE_FULL), which GDAL's
// GeoPackage driver reports instead of the system's ENOSPC, inside its own
// words and the staging file's path ("sqlite3_exec(COMMIT) failed: database
// or disk is full", GDAL 3.6 on a full tmpfs).
const sqliteFull = "database or disk is full"

// WriteFailedIn is writeFailed for the output folder out, written through
// the staging folder stage: a library's message that names a file in
// stage (the user never sees that hidden folder) names it in out. The
// demo calls it for the inputs it writes into the staging folder before
// its run.
func WriteFailedIn(out, stage string, err error) error {
	cause := outdir.Cause(err)
	what := gdalmsg.Cause(cause.Error())
	if stage != "" {
		what = strings.ReplaceAll(what, stage, out)
	}
	full := outdir.DiskFull(cause)
	if _, serr := os.Stat(stage); stage != "" && !full && errors.Is(serr, fs.ErrNotExist) {
		// GDAL then says "unable to open database file", a write
		// "no such file or directory".
		what = fmt.Sprintf("the folder the run was writing in (%s) was removed while it worked, by another program or by hand; run again", stage)
	}
	if !full && strings.Contains(cause.Error(), sqliteFull) {
		full, what = true, syscall.ENOSPC.Error()
	}
	if full {
		what += " (free some space on that disk, or give --out a folder on another one)"
	} else {
		what += outdir.FileSizeAdvice(err)
	}
	return fmt.Errorf("writing the results into %s failed: %s; nothing in it was changed", out, what)
}

// libraryMessages moves the messages GDAL and its libraries raised outside
// any call that reported them as errors into the run log (not the
// terminal), one line per distinct message with how many times it came.
func (s *Study) libraryMessages() {
	msgs, dropped := gdalmsg.Drain()
	for _, l := range gdalmsg.Lines(msgs) {
		s.log.WriteString(l + "\n")
	}
	if dropped > 0 {
		fmt.Fprintf(s.log, "library messages: %d more not kept\n", dropped)
	}
}

// writeFamily exports the (clipped) family: extents.gpkg and, when asked,
// extents.tif.
func (s *Study) writeFamily() error {
	if err := s.timed("extents.gpkg written", s.writeFamilyFiles); err != nil {
		return s.writeFailed(err)
	}
	return nil
}

// writeFamilyFiles writes extents.gpkg and, when asked, extents.tif. It
// only reads the family and logs nothing, so it may run beside the
// analysis.
func (s *Study) writeFamilyFiles() error {
	if err := s.fam.WriteGeoPackage(filepath.Join(s.stage, "extents.gpkg")); err != nil {
		return err
	}
	if s.o.MembershipTIFF {
		return s.fam.WriteMembershipTIFF(filepath.Join(s.stage, "extents.tif"))
	}
	return nil
}
