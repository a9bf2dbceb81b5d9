package pipeline

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/outdir"
	"areasweep/cmd/internal/pass"
	"areasweep/cmd/internal/settings"
	"areasweep/cmd/internal/shardfile"
	"areasweep/metrics"
	"areasweep/report"
)

// MergeOptions are a merge's own settings; everything else comes from the
// shards.
type MergeOptions struct {
	// Files are partial files, or folders whose *.aspf files are taken.
	Files []string
	// Out, Force, Quiet and Workers are as for Run.
	Out     string
	Force   bool
	Quiet   bool
	Workers int
	// Version is this areasweep's version and Build its build; shards of
	// another version or build are refused.
	Version string
	Build   string
}

// ToolID is what a partial file records as the areasweep that wrote it:
// the version, with the build when it is known. Two builds of one
// version number (two commits of a development version, say) can sum
// the grid differently, so their shards must not be merged.
func ToolID(version, build string) string {
	if build == "" {
		return version
	}
	return version + " (" + build + ")"
}

// Merge combines the partial files of every shard of one run into that
// run's outputs in --out: results.json and scores.csv byte for byte those
// of a single Run, and the same report, figures, extents.gpkg,
// extents.tif and omitted_points.gpkg (only run.log differs: timings and
// the merge's own lines).
//
// Before anything is written it reads every file (ShardError naming the
// file for one that is not a partial file, damaged or cut short), checks
// that they are exactly the shards 1..N of one run (metrics.CheckShardSet:
// the same areasweep version, inputs, settings, seed and shard count, no
// shard twice or missing), decodes and merges their sums, and prepares the
// run from the recorded inputs and settings, refusing inputs whose SHA-256
// changed since the shards ran. Then every pass takes its sums from the
// shards instead of reading the model, and the run finishes as Run does.
func Merge(ctx context.Context, mo MergeOptions, io IO) (*report.Results, error) {
	t0 := time.Now()
	files, err := shardPaths(mo.Files)
	if err != nil {
		return nil, err
	}
	// The refusals of --out that need no write, before the partial files
	// are read (Prepare makes them again with the inputs they record).
	if err := outdir.Check(mo.Out, mo.Force, files, nil); err != nil {
		return nil, err
	}
	merged, first, err := readShards(files, ToolID(mo.Version, mo.Build))
	if err != nil {
		return nil, err
	}
	readTime := time.Since(t0)
	var rec recordedRun
	dec := json.NewDecoder(strings.NewReader(string(merged.Run)))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&rec); err != nil {
		return nil, fault.BadInput(fmt.Errorf("%s: the recorded run cannot be read (%v); run the shards again with this areasweep", first.Source, err))
	}
	if rec.settingsHash() != first.Settings {
		return nil, fault.BadInput(fmt.Errorf("%s: the recorded settings do not match the header's settings hash; the file was altered: run its shard again", first.Source))
	}
	o := Options{Values: settings.Values{Out: mo.Out, Force: mo.Force, Quiet: mo.Quiet, Workers: mo.Workers}, Version: mo.Version, Build: mo.Build,
		ExpectInputs: first.Inputs, MoreInputs: files}
	rec.apply(&o)
	// The shards record the input paths as they were given: a relative
	// one is relative to the folder shard 1 ran in.
	// When some relative input is found and another is not, the merge
	// runs in the right folder and that input was removed or renamed.
	// An absolute one that no longer exists was removed or renamed since
	// the shards ran.
	var missing []string
	found := false
	for _, p := range o.InputPaths() {
		if p == "" {
			continue
		}
		if err := notRereadable(p); err != nil {
			return nil, fault.BadInput(fmt.Errorf("%s: %w", first.Source, err))
		}
		if filepath.IsAbs(p) {
			if _, err := os.Stat(p); errors.Is(err, fs.ErrNotExist) {
				return nil, fault.BadInput(fmt.Errorf("%s: the input %s, recorded by the shards, does not exist: it was removed or renamed since the shards ran "+
					"(or shard 1 ran on a machine where the inputs have other paths: the merge reads them at shard 1's paths); "+
					"restore it at that path, or run the shards again", first.Source, p))
			}
			continue
		}
		if _, err := os.Stat(p); err != nil {
			missing = append(missing, p)
		} else {
			found = true
		}
	}
	if len(missing) > 0 {
		here, werr := os.Getwd()
		if werr != nil {
			// The current folder was removed: said by the caller
			// (outdir.CwdGone), here not named as "".
			return nil, fault.BadInput(fmt.Errorf("%s: the input %s, recorded relative to the folder the shards ran in%s, is not found: "+
				"run the merge from %s, or run the shards again with absolute paths", first.Source, missing[0], ranIn(rec.Dir), thatFolder(rec.Dir)))
		}
		if found {
			return nil, fault.BadInput(fmt.Errorf("%s: the input %s is missing from %s, where the shards' other inputs are: it was removed or renamed since the shards ran; "+
				"restore it, or run the shards again", first.Source, missing[0], here))
		}
		return nil, fault.BadInput(fmt.Errorf("%s: the input %s, recorded relative to the folder the shards ran in%s, is not found from %s: "+
			"run the merge from %s, or run the shards again with absolute paths", first.Source, missing[0], ranIn(rec.Dir), here, thatFolder(rec.Dir)))
	}
	o.ShardDir = rec.Dir
	s, err := Prepare(ctx, o, io, nil)
	if err != nil {
		return nil, err
	}
	defer s.Close()
	s.logf("%d partial file(s) read, checked and added up in %.2f s", len(files), readTime.Seconds())
	if err := s.useShards(merged); err != nil {
		return nil, err
	}
	for i := range s.Passes() {
		if err := s.Pass(ctx, i); err != nil {
			return nil, err
		}
	}
	return s.Finish(ctx)
}

// ranIn names the folder the shards ran in (recordedRun.Dir) after "the
// folder the shards ran in": " (D)", or "" when not recorded.
func ranIn(dir string) string {
	if dir == "" {
		return ""
	}
	return " (" + dir + ")"
}

// thatFolder names the folder the shards ran in for "run the merge from
// ...": the folder, or "that folder" when not recorded.
func thatFolder(dir string) string {
	if dir == "" {
		return "that folder"
	}
	return dir
}

// elsewhere says, for an input path p whose file differs from the one the
// shards read, that a relative p was read from another folder than the
// shards' (dir, recorded; "" when not), and what to do; "" when p is
// absolute or the merge runs in that folder.
func elsewhere(p, dir string) string {
	if dir == "" || filepath.IsAbs(p) {
		return ""
	}
	here, err := os.Getwd()
	if err != nil || sameFolder(here, dir) {
		return ""
	}
	return fmt.Sprintf("; the shards ran in %s and read %s there, this merge runs in %s: run the merge from %s (if the file there is unchanged), or run the shards again", dir, p, here, dir)
}

// sameFolder reports whether the folders a and b are one (symbolic links
// resolved).
func sameFolder(a, b string) bool {
	if a == b {
		return true
	}
	ra, ea := filepath.EvalSymlinks(a)
	rb, eb := filepath.EvalSymlinks(b)
	return ea == nil && eb == nil && ra == rb
}

// notRereadable refuses an input path p that a merge cannot read again
// as its shards read it: standard input or a pipe (a shell's <(...),
// recorded as /dev/fd/N), a device or socket, or a named pipe (whose read
// would wait for a writer).
func notRereadable(p string) error {
	if p == "/dev/stdin" || strings.HasPrefix(p, "/dev/fd/") || strings.HasPrefix(p, "/proc/") && strings.Contains(p, "/fd/") {
		return fmt.Errorf("the input %s is standard input or a pipe (a shell's <(...)), which a merge cannot read again as the shards read it; "+
			"save it as a file and run the shards with that file", p)
	}
	if st, err := os.Stat(p); err == nil && !st.IsDir() && !st.Mode().IsRegular() {
		return fmt.Errorf("the input %s is a named pipe, device or socket, which a merge cannot read again as the shards read it; "+
			"save it as a file and run the shards with that file", p)
	}
	return nil
}

// shardPaths expands folders into their *.aspf files (sorted) and checks
// that every path exists.
func shardPaths(args []string) ([]string, error) {
	if len(args) == 0 {
		return nil, fault.BadInput(errors.New("no partial file given: name the shards' .aspf files or the folders holding them"))
	}
	var files []string
	for _, a := range args {
		st, err := os.Stat(a)
		if err != nil {
			return nil, fault.BadInput(fmt.Errorf("%s does not exist or cannot be read; check the path", shownPath(a)))
		}
		if !st.IsDir() {
			if !st.Mode().IsRegular() {
				// A merge reads each partial file twice (readShards): a
				// pipe would read empty the second time, a named pipe
				// without a writer would wait for ever.
				return nil, fault.BadInput(fmt.Errorf("%s is a pipe, device or socket (a shell's <(...), a named pipe), not a partial file: a merge reads each partial file more than once; give the path of the shard's .aspf file", shownPath(a)))
			}
			files = append(files, a)
			continue
		}
		found, err := filepath.Glob(filepath.Join(globEscape(a), "*.aspf"))
		if err != nil || len(found) == 0 {
			// Glob finds nothing in a folder it cannot list either.
			if _, lerr := listDir(a); lerr != nil {
				var pe *fs.PathError
				if errors.As(lerr, &pe) {
					lerr = pe.Err
				}
				return nil, fault.BadInput(fmt.Errorf("folder %s cannot be listed (%v): check that you may read it (its permissions), or give the shards' .aspf files in it instead of the folder", shownPath(a), lerr))
			}
			return nil, fault.BadInput(fmt.Errorf("folder %s holds no partial file (*.aspf); give the shards' output folders or files", shownPath(a)))
		}
		sort.Strings(found)
		for _, f := range found {
			if st, err := os.Stat(f); err == nil && st.IsDir() {
				return nil, fault.BadInput(fmt.Errorf("%s in folder %s is a folder, not a partial file; move it out of %s, or give the shards' .aspf files instead of the folder", shownPath(f), shownPath(a), shownPath(a)))
			}
		}
		files = append(files, found...)
	}
	return files, sameFileTwice(files)
}

// sameFileTwice refuses a partial file named twice, by one path or two
// (its folder and its own path, "s3/1" and "s3/1/shard-1-of-3.aspf"):
// the check of the shard set named it as two files that "are both shard
// 1", the same path twice.
func sameFileTwice(files []string) error {
	var seen []os.FileInfo
	for _, f := range files {
		st, err := os.Stat(f)
		if err != nil {
			seen = append(seen, nil)
			continue // named as unreadable when it is read
		}
		for j, prev := range seen {
			if prev == nil || !os.SameFile(prev, st) {
				continue
			}
			how := fmt.Sprintf("as %s and as %s", shownPath(files[j]), shownPath(f))
			if filepath.Clean(files[j]) == filepath.Clean(f) {
				how = "its folder or its path given twice"
			}
			return fault.BadInput(fmt.Errorf("partial file %s is given twice (%s); give each shard's file or folder once", shownPath(files[j]), how))
		}
		seen = append(seen, st)
	}
	return nil
}

// shownPath is path p as messages name it: quoted when it holds a line
// break, so that the message stays on one line.
func shownPath(p string) string {
	if strings.ContainsAny(p, "\n\r") {
		return strconv.Quote(p)
	}
	return p
}

// globEscape escapes the glob metacharacters of a literal path.
func globEscape(s string) string {
	var b strings.Builder
	for _, r := range s {
		if strings.ContainsRune(`*?[\`, r) {
			b.WriteByte('\\')
		}
		b.WriteRune(r)
	}
	return b.String()
}

// readShards reads the files twice: first every header, for
// metrics.CheckShardSet and the areasweep version (that of this build, so
// that shards of another version are named as such before their content is
// decoded), then each file's content, decoded and merged one file at a
// time. It returns the merged content and the first header.
func readShards(files []string, version string) (*shardfile.Merged, metrics.ShardHeader, error) {
	var headers []metrics.ShardHeader
	read := func(f string) ([]byte, error) {
		if err := checkPartial(f); err != nil {
			return nil, err
		}
		data, err := readPartial(f)
		if err != nil {
			return nil, cannotRead(f, err)
		}
		return data, nil
	}
	for _, f := range files {
		data, err := read(f)
		if err != nil {
			return nil, metrics.ShardHeader{}, err
		}
		pf, err := metrics.DecodePartial(data, shownPath(f))
		if err != nil {
			return nil, metrics.ShardHeader{}, fault.BadInput(err)
		}
		headers = append(headers, pf.Header)
	}
	if err := metrics.CheckShardSet(headers); err != nil {
		if errors.Is(err, metrics.ErrShardMissing) {
			shown := make([]string, len(files))
			for i, f := range files {
				shown[i] = shownPath(f)
			}
			err = fmt.Errorf("%w (given: %s)", err, givenList(shown))
		}
		nameSettings(err, files, headers)
		mixedSplits(err, files, headers)
		return nil, metrics.ShardHeader{}, fault.BadInput(err)
	}
	if h := headers[0]; h.Tool != version {
		return nil, metrics.ShardHeader{}, fault.BadInput(fmt.Errorf("%s: the shards were written by areasweep %s, this is %s; merge them with the areasweep that wrote them (or run the shards again with this one)", h.Source, h.Tool, version))
	}
	// Shard 1's recorded run is the one used: shards may differ in paths
	// (other folders or machines) but not in inputs or settings.
	order := make([]int, len(files))
	for i := range order {
		order[i] = i
	}
	sort.Slice(order, func(a, b int) bool { return headers[order[a]].Shard < headers[order[b]].Shard })
	m := &shardfile.Merged{}
	for _, i := range order {
		data, err := read(files[i])
		if err != nil {
			return nil, metrics.ShardHeader{}, err
		}
		sh, err := shardfile.Decode(data, shownPath(files[i]))
		if err != nil {
			return nil, metrics.ShardHeader{}, fault.BadInput(err)
		}
		if err := m.Add(sh); err != nil {
			return nil, metrics.ShardHeader{}, fault.BadInput(err)
		}
	}
	return m, headers[order[0]], nil
}

// readPartial reads a whole partial file, openPartial opens one for its
// checks (checkPartial), listDir lists a folder given as a shard's (seams for tests).
var (
	readPartial = os.ReadFile
	openPartial = os.Open
	listDir     = os.ReadDir
)

// cannotRead refuses partial file f that cannot be read (err), naming it
// once with the system's reason, and what to do; it said Go's "open F:
// permission denied" after the name.
func cannotRead(f string, err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		err = pe.Err
	}
	return fault.BadInput(fmt.Errorf("partial file %s cannot be read (%v): check that it is still there and that you may read it (its permissions), or run its shard again", shownPath(f), err))
}

// largePartialBytes is the size above which a partial file's checksum is
// checked while reading it in pieces before it is read whole. Our choice:
// a shard's partial file holds a few MB (the 1-bit map of its rows' cells
// with data is the largest part: 125 MB for all rows of a billion cells),
// so a larger one is checked first at the cost of one more read.
var largePartialBytes int64 = 64 << 20

// checkPartial refuses partial file f, before it is read whole, when its
// first bytes show another kind of file (metrics.CheckPartialStart) or,
// when it is larger than largePartialBytes, when it is cut short or
// changed (metrics.CheckPartialSum, read in pieces from the same open
// file): a foreign file or a damaged copy of gigabytes was read whole to
// be refused, and under a job's memory limit merge died with Go's "fatal
// error: out of memory".
func checkPartial(f string) error {
	fh, err := openPartial(f)
	if err != nil {
		return cannotRead(f, err)
	}
	defer fh.Close()
	head := make([]byte, metrics.PartialStartBytes)
	k, err := io.ReadFull(fh, head)
	if err != nil && err != io.EOF && err != io.ErrUnexpectedEOF {
		return cannotRead(f, err)
	}
	head = head[:k]
	if err := metrics.CheckPartialStart(head, shownPath(f)); err != nil {
		return fault.BadInput(err)
	}
	st, err := fh.Stat()
	if err != nil {
		return cannotRead(f, err)
	}
	if st.Size() <= largePartialBytes {
		return nil
	}
	if err := metrics.CheckPartialSum(io.MultiReader(bytes.NewReader(head), fh), st.Size(), shownPath(f)); err != nil {
		var se *metrics.ShardError
		if errors.As(err, &se) {
			return fault.BadInput(err)
		}
		return cannotRead(f, err)
	}
	return nil
}

// givenList names the partial files given, for the refusal of missing
// shards: the first five and how many more, so that a merge of a
// thousand shards does not print a thousand paths.
func givenList(files []string) string { return firstOf(files, 5) }

// firstOf joins the first k items with commas and counts the rest ("a, b
// and 3 more"), so that a message naming what it found stays short
// however many there are.
func firstOf(items []string, k int) string {
	if len(items) <= k {
		return strings.Join(items, ", ")
	}
	return fmt.Sprintf("%s and %d more", strings.Join(items[:k], ", "), len(items)-k)
}

// nameSettings adds to CheckShardSet's "differ in settings" which
// settings differ, read from the two files' recorded runs: the first
// header and the first that differs from it (the pair CheckShardSet
// names), when that one differs in settings alone.
func nameSettings(err error, files []string, headers []metrics.ShardHeader) {
	var se *metrics.ShardError
	if !errors.As(err, &se) || !errors.Is(err, metrics.ErrShardMismatch) {
		return
	}
	ref := headers[0]
	for i := 1; i < len(headers); i++ {
		h := headers[i]
		if h.Tool == ref.Tool && slices.Equal(h.Inputs, ref.Inputs) && h.Settings == ref.Settings {
			continue
		}
		if h.Tool != ref.Tool || !slices.Equal(h.Inputs, ref.Inputs) {
			return
		}
		run := func(f string) []byte {
			data, err := os.ReadFile(f)
			if err != nil {
				return nil
			}
			sh, err := shardfile.Decode(data, f)
			if err != nil {
				return nil
			}
			return sh.Run
		}
		if d := settingsDiff(run(files[0]), run(files[i])); d != "" {
			se.Detail = strings.Replace(se.Detail, "differ in settings", "differ in settings ("+d+")", 1)
		}
		return
	}
}

// mixedSplits adds to a refusal of shards of different runs that one
// folder holds partial files of several splits (shards run there with
// --force and another N), and which files to give instead. It looks at
// the shard counts in each folder, not at the field CheckShardSet names:
// two splits that also differ in settings or seed were named by those
// alone, without the hint.
func mixedSplits(err error, files []string, headers []metrics.ShardHeader) {
	var se *metrics.ShardError
	if !errors.As(err, &se) || !errors.Is(err, metrics.ErrShardMismatch) {
		return
	}
	counts := map[string]map[int]bool{}
	for i, f := range files {
		d := filepath.Dir(f)
		if counts[d] == nil {
			counts[d] = map[int]bool{}
		}
		counts[d][headers[i].Shards] = true
	}
	for _, f := range files {
		d := filepath.Dir(f)
		if len(counts[d]) > 1 {
			se.Detail += fmt.Sprintf(" (%s holds the partial files of several splits: give the files of one, shard-*-of-%d.aspf, instead of the folder)", shownPath(d), headers[0].Shards)
			return
		}
	}
}

// useShards makes every pass of s take its sums from merged instead of
// reading its model, after checking that the prepared run is the shards'
// run: the same grid and extents. A pass's plan reads only its model's
// values at the points (the layout needs no value range), so no raster is
// read in full.
func (s *Study) useShards(merged *shardfile.Merged) error {
	if merged.Width != s.grid.Width || merged.Height != s.grid.Height {
		return fault.BadInput(fmt.Errorf("the shards were made on a %d x %d grid, the inputs give %d x %d", merged.Width, merged.Height, s.grid.Width, s.grid.Height))
	}
	if len(merged.Members) != len(s.fam.Members) {
		return fault.Internal(fmt.Errorf("the shards hold %d extents, the inputs give %d", len(merged.Members), len(s.fam.Members)))
	}
	for k, m := range s.fam.Members {
		if merged.Members[k] != m.ID {
			return fault.Internal(fmt.Errorf("extent %d is %s in the shards, %s here", k+1, merged.Members[k], m.ID))
		}
	}
	byName := map[string]*shardfile.Pass{}
	for i := range merged.Passes {
		p := &merged.Passes[i]
		byName[p.Name] = p
	}
	s.SetSums(func(s *Study, ctx context.Context, p *Plan) (*Sums, error) {
		mp := byName[p.Model.Name]
		if mp == nil {
			return nil, fault.Internal(fmt.Errorf("the shards hold no pass of %s", p.Model.Name))
		}
		if mp.Layout.Fingerprint() != p.Layout.Fingerprint() {
			return nil, fault.Internal(fmt.Errorf("%s: the layout made from the inputs differs from the shards'", modelWho(p.Model)))
		}
		sums := &Sums{Stats: mp.Stats}
		for _, a := range mp.Accs {
			b, err := shardfile.Rebase(a, p.Layout)
			if err != nil {
				return nil, fault.Internal(fmt.Errorf("%s: %w", modelWho(p.Model), err))
			}
			sums.Accs = append(sums.Accs, b)
		}
		if s.valid == nil {
			sums.Valid = merged.Valid
			sums.Preview = pass.NewPreview(s.grid, previewSide)
			if sums.Preview.Width != merged.PreviewWidth || sums.Preview.Height != merged.PreviewHeight {
				return nil, fault.Internal(fmt.Errorf("preview of %d x %d cells in the shards, %d x %d here", merged.PreviewWidth, merged.PreviewHeight, sums.Preview.Width, sums.Preview.Height))
			}
			copy(sums.Preview.Values, merged.Preview)
		}
		if p.null != nil {
			if merged.Background == nil {
				return nil, fault.Internal(errors.New("the shards hold no sorting-bias tally of the distance-only null"))
			}
			if err := p.null.bg.Merge(merged.Background); err != nil {
				return nil, fault.Internal(err)
			}
		}
		s.logf("%s: sums of every shard merged (no file read)", p.Model.Name)
		return sums, nil
	})
	return nil
}

// sidecarList names in's sidecar files for a message.
func sidecarList(in report.Input) string {
	if len(in.Sidecars) == 0 {
		return "none beside it now"
	}
	var names []string
	for _, sc := range in.Sidecars {
		names = append(names, filepath.Base(sc.Path))
	}
	return "now " + strings.Join(names, ", ")
}

// checkExpectedInputs refuses inputs whose checksums are not
// Options.ExpectInputs (a merge's shards' inputs), naming the file.
func (s *Study) checkExpectedInputs() error {
	want := s.o.ExpectInputs
	if want == nil {
		return nil
	}
	got := s.res.Inputs
	for i := range max(len(got), len(want)) {
		switch {
		case i >= len(got) || i >= len(want) || got[i].Role != want[i].Name:
			return fault.BadInput(fmt.Errorf("the inputs differ from the shards' (input %d); merge with the inputs the shards ran on", i+1))
		case got[i].SHA256 != want[i].SHA256:
			if why := elsewhere(got[i].Path, s.o.ShardDir); why != "" {
				return fault.BadInput(fmt.Errorf("%s %s is not the file the shards read (SHA-256 %s, the shards read %s)%s", got[i].Role, got[i].Path, got[i].SHA256[:12], want[i].SHA256[:12], why))
			}
			return fault.BadInput(fmt.Errorf("%s %s changed since the shards ran (SHA-256 %s, the shards read %s); restore the file or run the shards again", got[i].Role, got[i].Path, got[i].SHA256[:12], want[i].SHA256[:12]))
		case sidecarsDigest(got[i]) != want[i].Sidecars:
			return fault.BadInput(fmt.Errorf("%s %s: the files read with it (%s) are not those the shards read (a .prj, .dbf, .aux.xml or world file, or a virtual raster's source, added, removed or changed since); restore them or run the shards again", got[i].Role, got[i].Path, sidecarList(got[i])))
		}
	}
	return nil
}
