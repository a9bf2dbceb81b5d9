package batch

import (
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// record is the marker record of the file at path as a run would take it.
func record(t *testing.T, role, path string) InputFile {
	t.Helper()
	st, err := os.Stat(path)
	if err != nil {
		t.Fatal(err)
	}
	sum, err := FileSHA256(path)
	if err != nil {
		t.Fatal(err)
	}
	return InputFile{Role: role, Path: path, Size: st.Size(), ModTime: st.ModTime().UnixNano(), SHA256: sum}
}

// TestCheckInputs: each way a recorded file can be found on a re-run,
// with what Check must say of it.
func TestCheckInputs(t *testing.T) {
	later := time.Now().Add(time.Hour)
	for _, c := range []struct {
		name string
		// change acts on the recorded file after it was recorded.
		change    func(t *testing.T, path string)
		changed   string // substring of the one change's String; "" none
		refreshed bool
	}{
		{name: "untouched", change: func(*testing.T, string) {}},
		{name: "touched, same content", change: func(t *testing.T, p string) {
			if err := os.Chtimes(p, later, later); err != nil {
				t.Fatal(err)
			}
		}, refreshed: true},
		{name: "rewritten with the same bytes", change: func(t *testing.T, p string) {
			b, _ := os.ReadFile(p)
			if err := os.WriteFile(p, b, 0o644); err != nil {
				t.Fatal(err)
			}
			os.Chtimes(p, later, later) // a time that surely differs
		}, refreshed: true},
		{name: "other content, same size", change: func(t *testing.T, p string) {
			if err := os.WriteFile(p, []byte("lon,lat\n2,1\n"), 0o644); err != nil {
				t.Fatal(err)
			}
			os.Chtimes(p, later, later)
		}, changed: "the occurrences file %s holds other content (SHA-256 "},
		{name: "other size", change: func(t *testing.T, p string) {
			if err := os.WriteFile(p, []byte("lon,lat\n1,2\n3,4\n"), 0o644); err != nil {
				t.Fatal(err)
			}
		}, changed: "the occurrences file %s holds other content"},
		{name: "removed", change: func(t *testing.T, p string) {
			if err := os.Remove(p); err != nil {
				t.Fatal(err)
			}
		}, changed: "the occurrences file %s was removed"},
		{name: "replaced by a directory", change: func(t *testing.T, p string) {
			os.Remove(p)
			if err := os.Mkdir(p, 0o755); err != nil {
				t.Fatal(err)
			}
		}, changed: "the occurrences file %s is no longer a file"},
		{name: "its folder replaced by a file", change: func(t *testing.T, p string) {
			os.RemoveAll(filepath.Dir(p))
			if err := os.WriteFile(filepath.Dir(p), []byte("x"), 0o644); err != nil {
				t.Fatal(err)
			}
		}, changed: "the occurrences file %s was removed"},
		{name: "a symlink's target changed", change: func(t *testing.T, p string) {
			other := filepath.Join(filepath.Dir(p), "other.csv")
			if err := os.WriteFile(other, []byte("lon,lat\n9,9\n"), 0o644); err != nil {
				t.Fatal(err)
			}
			os.Chtimes(other, later, later)
			os.Remove(p)
			if err := os.Symlink(other, p); err != nil {
				t.Fatal(err)
			}
		}, changed: "the occurrences file %s holds other content"},
	} {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(t.TempDir(), "in put\tü", "occ.csv")
			os.Mkdir(filepath.Dir(p), 0o755)
			if err := os.WriteFile(p, []byte("lon,lat\n1,2\n"), 0o644); err != nil {
				t.Fatal(err)
			}
			rec := []InputFile{record(t, "occurrences", p)}
			c.change(t, p)
			var ch Checker
			got, err := ch.Check(rec)
			if err != nil {
				t.Fatal(err)
			}
			switch {
			case c.changed == "" && len(got.Changed) > 0:
				t.Errorf("changes %v, want none", got.Changed)
			case c.changed != "" && (len(got.Changed) != 1 || !strings.Contains(got.Changed[0].String(), strings.ReplaceAll(c.changed, "%s", p))):
				t.Errorf("changes %v, want one saying %q", got.Changed, c.changed)
			}
			if (got.Refreshed != nil) != c.refreshed {
				t.Errorf("refreshed %v, want %v", got.Refreshed, c.refreshed)
			}
			if got.Refreshed != nil {
				// The refreshed record needs no hashing next time: it
				// matches the file's stat and keeps the checksum.
				now := record(t, "occurrences", p)
				if got.Refreshed[0] != now {
					t.Errorf("refreshed record %+v, the file now %+v", got.Refreshed[0], now)
				}
			}
		})
	}
}

// TestUnreadableInput: a recorded file that cannot be read (as when its
// permissions became 000; root reads it anyway, so the error is made
// here) is named once with its role as users read it, the system's
// reason, and what to do.
func TestUnreadableInput(t *testing.T) {
	f := InputFile{Role: "model:m", Path: "/data/m.tif.aux.xml"}
	got := unreadable(f, fmt.Errorf("batch: %w", &fs.PathError{Op: "open", Path: f.Path, Err: fs.ErrPermission})).Error()
	want := "batch: the model m file /data/m.tif.aux.xml cannot be read to check that it is the one the study was made from (permission denied); make it readable, or, if the study should no longer use it, move it away (the study then counts as made from other inputs, which --force runs again)"
	if got != want {
		t.Errorf("got  %q\nwant %q", got, want)
	}
}

// TestMarkerInputsRoundTrip: input records survive WriteMarker and
// ReadMarker in order, a path with a space and a tab included, alongside
// the other keys; a marker without them (an older areasweep's) reads as
// recording none.
func TestMarkerInputsRoundTrip(t *testing.T) {
	dir := t.TempDir()
	files := []InputFile{
		{Role: "model:m", Path: "/data/m 1.tif", Size: 10, ModTime: 1700000000123456789, SHA256: strings.Repeat("a", 64)},
		{Role: "model:m", Path: "/data/m 1.tif.aux.xml", Size: 0, ModTime: 1, SHA256: strings.Repeat("b", 64)},
		{Role: "occurrences", Path: "/data/odd\tname.csv", Size: 3, ModTime: -5, SHA256: strings.Repeat("c", 64)},
	}
	for i := range 9 { // more than nine: the keys must still sort in order
		files = append(files, InputFile{Role: "extra:e", Path: "/data/e" + string(rune('a'+i)) + ".shp", SHA256: strings.Repeat("d", 64)})
	}
	m := Marker{"study": "s", "settings": "x"}
	m.SetInputs(files)
	if err := WriteMarker(dir, m); err != nil {
		t.Fatal(err)
	}
	back, err := ReadMarker(dir)
	if err != nil {
		t.Fatal(err)
	}
	got, err := back.Inputs()
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != len(files) {
		t.Fatalf("%d records back, want %d", len(got), len(files))
	}
	for i := range files {
		if got[i] != files[i] {
			t.Errorf("record %d: %+v, want %+v", i, got[i], files[i])
		}
	}
	if back["study"] != "s" || back["settings"] != "x" {
		t.Errorf("other keys: %v", back)
	}
	// Setting fewer records drops the others.
	back.SetInputs(files[:1])
	if got, _ := back.Inputs(); len(got) != 1 {
		t.Errorf("after SetInputs of one file: %d records", len(got))
	}
	old := Marker{"study": "s", "settings": "x", "results": "y"}
	if got, err := old.Inputs(); got != nil || err != nil {
		t.Errorf("older marker: %v, %v; want no records", got, err)
	}
	bad := Marker{"input.0001": "12\tnot-a-time\t" + strings.Repeat("a", 64) + "\tregion\t/r.shp"}
	if _, err := bad.Inputs(); err == nil || !strings.Contains(err.Error(), "input.0001") {
		t.Errorf("bad record: %v; want an error naming the line", err)
	}
}

// TestCheckerHashesOnce: a file whose time changed is hashed once per
// Checker, not at every check of every study that names it.
func TestCheckerHashesOnce(t *testing.T) {
	p := filepath.Join(t.TempDir(), "m.tif")
	if err := os.WriteFile(p, []byte("cells"), 0o644); err != nil {
		t.Fatal(err)
	}
	rec := []InputFile{record(t, "model:m", p)}
	later := time.Now().Add(time.Hour)
	os.Chtimes(p, later, later)
	var ch Checker
	if _, err := ch.Check(rec); err != nil {
		t.Fatal(err)
	}
	if len(ch.sums) != 1 {
		t.Fatalf("%d sums kept after one check, want 1", len(ch.sums))
	}
	// The second check takes the kept sum instead of reading the file:
	// a kept sum made different shows up as a change.
	for k := range ch.sums {
		ch.sums[k] = strings.Repeat("f", 64)
	}
	got, err := ch.Check(rec)
	if err != nil || len(got.Changed) != 1 || got.Changed[0].SHA256 != strings.Repeat("f", 64) {
		t.Errorf("second check: %+v, %v; want the kept sum used", got, err)
	}
}
