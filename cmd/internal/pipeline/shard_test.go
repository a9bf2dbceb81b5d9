package pipeline

import (
	"encoding/json"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"syscall"
	"testing"

	"areasweep/cmd/internal/fault"
	"areasweep/metrics"
)

// notRecorded are the Options fields a shard does not record, each with
// why: they do not change results.json, scores.csv or the other outputs,
// or the merge sets them itself.
var notRecorded = map[string]string{
	"Out":          "the merge's own --out",
	"Force":        "the merge's own --force",
	"Quiet":        "the merge's own --quiet",
	"Workers":      "results do not depend on it",
	"ExtentsOnly":  "a shard always scores",
	"InputsDir":    "the demo's generated inputs; the demo does not shard",
	"StudyFile":    "its settings are already resolved into the options",
	"Version":      "compared on its own (ShardHeader.Tool)",
	"Build":        "compared on its own (ShardHeader.Tool)",
	"ExpectInputs": "set by the merge from the shards' headers",
	"MoreInputs":   "set by the merge (the partial files)",
	"ShardDir":     "set by the merge from the shards' recorded folder (recordedRun.Dir)",
	"Shard":        "set by RunShard for the shard's own output folder; a merge is no shard",
}

// TestRecordedRunCoversOptions: every field of Options is either recorded
// by a shard (recordRun, and given back by apply) or listed in notRecorded
// with a reason, so that a new setting cannot be left out of the merge
// silently. Each recorded field is set to a non-zero value and must come
// back through JSON and apply.
func TestRecordedRunCoversOptions(t *testing.T) {
	var o Options
	ov := reflect.ValueOf(&o).Elem()
	recorded := reflect.TypeOf(recordedRun{})
	i := 0
	for _, idx := range reflect.VisibleFields(ov.Type()) {
		if idx.Anonymous {
			continue // settings.Values: its fields are checked one by one
		}
		i++ // a distinct value per field
		f := idx
		_, skip := notRecorded[f.Name]
		_, rec := recorded.FieldByName(f.Name)
		switch {
		case skip && rec:
			t.Errorf("Options.%s is both recorded and listed in notRecorded", f.Name)
		case !skip && !rec:
			t.Errorf("Options.%s is neither recorded by a shard (recordedRun) nor listed in notRecorded", f.Name)
		case rec:
			fv := ov.FieldByIndex(f.Index)
			switch fv.Kind() {
			case reflect.String:
				fv.SetString("x=" + f.Name)
			case reflect.Bool:
				fv.SetBool(true)
			case reflect.Int:
				fv.SetInt(int64(i + 1))
			case reflect.Uint64:
				fv.SetUint(uint64(i + 7))
			case reflect.Float64:
				fv.SetFloat(float64(i) + 0.25)
			case reflect.Slice:
				if fv.Type().Elem().Kind() == reflect.String {
					fv.Set(reflect.ValueOf([]string{"a=" + f.Name}))
				} else {
					fv.Set(reflect.ValueOf([]float64{-1.5, float64(i)}))
				}
			default:
				t.Fatalf("Options.%s: kind %s not handled by this test", f.Name, fv.Kind())
			}
		}
	}
	b, err := json.Marshal(recordRun(&o))
	if err != nil {
		t.Fatal(err)
	}
	var back recordedRun
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	var got Options
	back.apply(&got)
	for _, f := range reflect.VisibleFields(ov.Type()) {
		name := f.Name
		if _, skip := notRecorded[name]; skip || f.Anonymous {
			continue
		}
		if !reflect.DeepEqual(ov.FieldByIndex(f.Index).Interface(), reflect.ValueOf(got).FieldByIndex(f.Index).Interface()) {
			t.Errorf("Options.%s does not come back from the recorded run", name)
		}
	}
}

// TestSettingsHash: the hash ignores paths and the seed (compared on
// their own) but changes with any setting and with a model's name.
func TestSettingsHash(t *testing.T) {
	base := recordedRun{Models: []string{"m=/a/m.tif"}, Occurrences: "/a/o.csv", Region: "/a/r.gpkg", E: []float64{0.05}, Iterations: 100, Seed: 1}
	h := base.settingsHash()
	moved := base
	moved.Models, moved.Occurrences, moved.Region, moved.Seed = []string{"m=/b/m.tif"}, "o.csv", "/b/r.gpkg", 2
	if moved.settingsHash() != h {
		t.Error("the hash changed with paths or the seed")
	}
	for name, c := range map[string]recordedRun{
		"iterations": func() recordedRun { c := base; c.Iterations = 101; return c }(),
		"e":          func() recordedRun { c := base; c.E = []float64{0.1}; return c }(),
		"model name": func() recordedRun { c := base; c.Models = []string{"n=/a/m.tif"}; return c }(),
		"no-thin":    func() recordedRun { c := base; c.NoThin = true; return c }(),
	} {
		if c.settingsHash() == h {
			t.Errorf("%s: the hash did not change", name)
		}
	}
	if len(h) != 64 || strings.Trim(h, "0123456789abcdef") != "" {
		t.Errorf("hash %q is not 64 lower-case hex digits", h)
	}
}

// TestGivenList: the missing-shards refusal names at most five of the
// files given, then how many more (expected strings by construction).
func TestGivenList(t *testing.T) {
	files := func(n int) []string {
		var f []string
		for i := 1; i <= n; i++ {
			f = append(f, fmt.Sprintf("s%d/shard-%d-of-900.aspf", i, i))
		}
		return f
	}
	for _, tc := range []struct {
		n    int
		want string
	}{
		{1, "s1/shard-1-of-900.aspf"},
		{5, "s1/shard-1-of-900.aspf, s2/shard-2-of-900.aspf, s3/shard-3-of-900.aspf, s4/shard-4-of-900.aspf, s5/shard-5-of-900.aspf"},
		{899, "s1/shard-1-of-900.aspf, s2/shard-2-of-900.aspf, s3/shard-3-of-900.aspf, s4/shard-4-of-900.aspf, s5/shard-5-of-900.aspf and 894 more"},
	} {
		if got := givenList(files(tc.n)); got != tc.want {
			t.Errorf("%d files: %q, want %q", tc.n, got, tc.want)
		}
	}
}

// TestShardPathsNotAFile: a partial file given as a pipe (a shell's
// <(cat shard-1-of-3.aspf), a named pipe) or a device is refused, naming
// it: merge read a <(...) empty the second time and blamed the shard
// ("is empty (0 bytes): its shard did not finish writing it"), /dev/null
// likewise, and waited for ever on a named pipe without a writer.
func TestShardPathsNotAFile(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "shard-1-of-3.aspf")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skip("no named pipe here:", err)
	}
	r, w, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	defer w.Close()
	procFD := fmt.Sprintf("/proc/self/fd/%d", r.Fd())
	for _, p := range []string{fifo, "/dev/null", procFD} {
		if _, err := os.Stat(p); err != nil {
			t.Logf("%s: %v (skipped)", p, err)
			continue
		}
		_, err := shardPaths([]string{p})
		if err == nil || !fault.IsBadInput(err) {
			t.Fatalf("%s: %v, want a refusal (bad input)", p, err)
		}
		for _, want := range []string{p + " is a pipe, device or socket", "give the path of the shard's .aspf file"} {
			if !strings.Contains(err.Error(), want) {
				t.Errorf("%s: %q lacks %q", p, err, want)
			}
		}
	}
	// A regular file is taken as given.
	f := filepath.Join(dir, "shard-2-of-3.aspf")
	if err := os.WriteFile(f, []byte("x"), 0o600); err != nil {
		t.Fatal(err)
	}
	if got, err := shardPaths([]string{f}); err != nil || len(got) != 1 || got[0] != f {
		t.Errorf("regular file: %v, %v", got, err)
	}
}

// TestMergeLineBreakPaths: a partial file or folder whose path holds a
// line break is named quoted, so that merge's refusal stays on one line;
// it was printed raw across two ("areasweep: /tmp/odd/a" and
// "b/shard-3-of-3.aspf: not a valid partial file: ..."), as found with a
// cut-short file, a missing shard and a shard given twice.
func TestMergeLineBreakPaths(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "a\nb")
	if err := os.Mkdir(dir, 0o777); err != nil {
		t.Fatal(err)
	}
	cut := filepath.Join(dir, "shard-1-of-3.aspf")
	if err := os.WriteFile(cut, []byte("ASPF cut short"), 0o666); err != nil {
		t.Fatal(err)
	}
	quoted := strconvQuote(dir)
	for _, tc := range []struct {
		name string
		run  func() error
	}{
		{"absent file", func() error { _, err := shardPaths([]string{filepath.Join(dir, "none.aspf")}); return err }},
		{"empty folder", func() error { _, err := shardPaths([]string{mkdirIn(t, dir, "empty\nfolder")}); return err }},
		{"cut short", func() error { _, _, err := readShards([]string{cut}, "test"); return err }},
	} {
		err := tc.run()
		if err == nil {
			t.Fatalf("%s: no error", tc.name)
		}
		msg := err.Error()
		if strings.ContainsAny(msg, "\n\r") {
			t.Errorf("%s: message spans lines: %q", tc.name, msg)
		}
		if !strings.Contains(msg, strings.TrimSuffix(quoted, `"`)) {
			t.Errorf("%s: %q does not name %s quoted", tc.name, msg, quoted)
		}
	}
	// A path without a line break is named as given.
	if got := shownPath("/tmp/s p*[x]/shard-1-of-2.aspf"); got != "/tmp/s p*[x]/shard-1-of-2.aspf" {
		t.Errorf("shownPath changed a plain path: %q", got)
	}
}

func strconvQuote(s string) string { return fmt.Sprintf("%q", s) }

func mkdirIn(t *testing.T, parent, name string) string {
	p := filepath.Join(parent, name)
	if err := os.Mkdir(p, 0o777); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestReadShardsForeignNotReadWhole: a file given as a shard that is not
// a partial file (or of another format) is refused from its first bytes,
// with the messages of metrics.DecodePartial, without being read whole: a
// 3 GB file given by mistake was read into memory to be refused, and under
// a memory limit (ulimit -v 2000000, as a cluster job has) merge died with
// Go's "fatal error: out of memory" and a stack trace.
func TestReadShardsForeignNotReadWhole(t *testing.T) {
	dir := t.TempDir()
	var whole []string
	defer func(f func(string) ([]byte, error)) { readPartial = f }(readPartial)
	readPartial = func(f string) ([]byte, error) {
		whole = append(whole, f)
		return os.ReadFile(f)
	}
	for _, tc := range []struct {
		name, content, want string
	}{
		// The wants are DecodePartial's own words for the same content.
		{"empty.aspf", "", "is empty (0 bytes)"},
		{"image.aspf", "II*\x00" + strings.Repeat("x", 4096), `does not start with "ASPF"`},
		{"short.aspf", "AS", `does not start with "ASPF"`},
		{"old.aspf", "ASPF\x01\x00" + strings.Repeat("x", 4096), "format 1, this areasweep reads format 4"},
		// Format 3: the pass statistics without the smallest values and
		// the runs' values (the point masses of the area-random test).
		{"three.aspf", "ASPF\x03\x00" + strings.Repeat("x", 4096), "format 3, this areasweep reads format 4; merge with the areasweep version that wrote the shards"},
	} {
		f := filepath.Join(dir, tc.name)
		if err := os.WriteFile(f, []byte(tc.content), 0o666); err != nil {
			t.Fatal(err)
		}
		_, err := metrics.DecodePartial([]byte(tc.content), f)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Fatalf("%s: DecodePartial says %v, want %q", tc.name, err, tc.want)
		}
		whole = nil
		_, _, err = readShards([]string{f}, "test")
		if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), f+": not a valid partial file: "+tc.want) {
			t.Errorf("%s: %v, want a refusal naming it: %q", tc.name, err, tc.want)
		}
		if len(whole) > 0 {
			t.Errorf("%s: read whole before being refused", tc.name)
		}
	}
}

// TestReadShardsLargeDamagedNotReadWhole: a partial file above
// largePartialBytes whose checksum is wrong (a damaged copy that starts
// like a partial file) is refused with DecodePartial's words without
// being read whole: such a file of gigabytes was read into memory to be
// refused, and under a job's memory limit merge died with Go's "fatal
// error: out of memory". One at or below the size is read whole, as
// before (its checksum is then checked in memory).
func TestReadShardsLargeDamagedNotReadWhole(t *testing.T) {
	dir := t.TempDir()
	var whole []string
	defer func(f func(string) ([]byte, error), n int64) { readPartial, largePartialBytes = f, n }(readPartial, largePartialBytes)
	readPartial = func(f string) ([]byte, error) {
		whole = append(whole, f)
		return os.ReadFile(f)
	}
	largePartialBytes = 1000
	content := currentPartialStart + strings.Repeat("x", 4000) + strings.Repeat("\x00", 32)
	for _, tc := range []struct {
		name      string
		size      int
		readWhole bool
	}{
		{"large.aspf", len(content), false},
		{"cut.aspf", 1000, true},
	} {
		f := filepath.Join(dir, tc.name)
		if err := os.WriteFile(f, []byte(content[:tc.size]), 0o666); err != nil {
			t.Fatal(err)
		}
		_, want := metrics.DecodePartial([]byte(content[:tc.size]), f)
		if want == nil {
			t.Fatal("DecodePartial accepted a damaged file")
		}
		whole = nil
		_, _, err := readShards([]string{f}, "test")
		if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), want.Error()) {
			t.Errorf("%s: %v, want a refusal with DecodePartial's words: %v", tc.name, err, want)
		}
		if got := len(whole) > 0; got != tc.readWhole {
			t.Errorf("%s: read whole %v, want %v", tc.name, got, tc.readWhole)
		}
	}
}

// TestReadShardsCannotRead: a partial file that cannot be opened or read
// (a shard file of mode 000 for a user other than its owner, one removed
// between the merge's reads) is named once with the system's reason and
// what to do; merge said "partial file F cannot be read: open F:
// permission denied" (found with setpriv as nobody on a 000 file).
func TestReadShardsCannotRead(t *testing.T) {
	f := filepath.Join(t.TempDir(), "shard-2-of-3.aspf")
	if err := os.WriteFile(f, []byte(currentPartialStart+" rest of the file"), 0o666); err != nil {
		t.Fatal(err)
	}
	defer func(o func(string) (*os.File, error), r func(string) ([]byte, error)) {
		openPartial, readPartial = o, r
	}(openPartial, readPartial)
	denied := func(op string) error { return &fs.PathError{Op: op, Path: f, Err: syscall.EACCES} }
	for _, tc := range []struct {
		name string
		set  func()
	}{
		{"open for the first bytes", func() {
			openPartial = func(string) (*os.File, error) { return nil, denied("open") }
			readPartial = os.ReadFile
		}},
		{"read whole", func() {
			openPartial = os.Open
			readPartial = func(string) ([]byte, error) { return nil, denied("open") }
		}},
	} {
		tc.set()
		_, _, err := readShards([]string{f}, "test")
		want := "partial file " + f + " cannot be read (permission denied): check that it is still there and that you may read it"
		if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), want) || strings.Count(err.Error(), f) != 1 {
			t.Errorf("%s: %v, want %q naming the file once", tc.name, err, want)
		}
	}
}

// TestShardPathsFolderNotListed: a shard folder that cannot be listed
// (mode 000 or 311 for a user other than its owner) is said to be so, not
// to hold no partial file (found with setpriv as nobody: "folder F holds
// no partial file (*.aspf)" while its three files were there). An empty
// folder that can be listed still says it holds none.
func TestShardPathsFolderNotListed(t *testing.T) {
	dir := t.TempDir()
	defer func(f func(string) ([]os.DirEntry, error)) { listDir = f }(listDir)
	listDir = func(d string) ([]os.DirEntry, error) {
		return nil, &fs.PathError{Op: "open", Path: d, Err: syscall.EACCES}
	}
	_, err := shardPaths([]string{dir})
	want := "folder " + dir + " cannot be listed (permission denied): check that you may read it (its permissions), or give the shards' .aspf files in it instead of the folder"
	if err == nil || !fault.IsBadInput(err) || err.Error() != want {
		t.Errorf("unlisted folder: %v, want %q", err, want)
	}
	listDir = os.ReadDir
	_, err = shardPaths([]string{dir})
	if err == nil || !strings.Contains(err.Error(), "holds no partial file") {
		t.Errorf("empty folder: %v", err)
	}
}

// currentPartialStart is the first 6 bytes of a partial file of this
// areasweep's format (metrics.PartialFormatVersion, little-endian).
var currentPartialStart = "ASPF" + string([]byte{byte(metrics.PartialFormatVersion), byte(metrics.PartialFormatVersion >> 8)})
