package outfile

import (
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// TestWrite: the file holds the data with mode perm &^ umask, replaces an
// older file whole, leaves no temporary file, and a failure (missing
// folder) leaves nothing and keeps the cause in the error chain.
func TestWrite(t *testing.T) {
	old := syscall.Umask(0o027)
	defer syscall.Umask(old)
	saved := Umask
	Umask = 0o027
	defer func() { Umask = saved }()
	dir := t.TempDir()
	p := filepath.Join(dir, "a.txt")
	for _, data := range []string{"first version, longer", "second"} {
		if err := Write(p, []byte(data), 0o666); err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(p)
		if err != nil || string(b) != data {
			t.Fatalf("read %q %v, want %q", b, err, data)
		}
	}
	if st, _ := os.Stat(p); st.Mode().Perm() != 0o640 {
		t.Errorf("mode %v, want 0640 (0666 &^ 027)", st.Mode().Perm())
	}
	if err := Write(filepath.Join(dir, "s.sh"), []byte("#!/bin/sh\n"), 0o777); err != nil {
		t.Fatal(err)
	}
	if st, _ := os.Stat(filepath.Join(dir, "s.sh")); st.Mode().Perm() != 0o750 {
		t.Errorf("script mode %v, want 0750", st.Mode().Perm())
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 2 {
		t.Errorf("folder holds %d entries, want 2 (no temporary file left)", len(entries))
	}
	err := Write(filepath.Join(dir, "missing", "b.txt"), []byte("x"), 0o666)
	if !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("write into a missing folder: %v, want a not-exist cause", err)
	}
}

// TestWriteFrom: the file holds what fill wrote in several pieces; a
// failing fill leaves neither the file nor a temporary file, keeps an
// older file as it was, and its error is in the chain.
func TestWriteFrom(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.json")
	if err := WriteFrom(p, 0o666, func(w io.Writer) error {
		for _, s := range []string{"{", `"a":`, "1}\n"} {
			if _, err := io.WriteString(w, s); err != nil {
				return err
			}
		}
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	if b, err := os.ReadFile(p); err != nil || string(b) != "{\"a\":1}\n" {
		t.Fatalf("read %q %v", b, err)
	}
	boom := errors.New("boom")
	err := WriteFrom(p, 0o666, func(w io.Writer) error {
		io.WriteString(w, "half")
		return boom
	})
	if !errors.Is(err, boom) {
		t.Errorf("failing fill: %v, want boom in the chain", err)
	}
	if b, _ := os.ReadFile(p); string(b) != "{\"a\":1}\n" {
		t.Errorf("failing fill changed the file: %q", b)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("folder holds %d entries, want 1 (no temporary file left)", len(entries))
	}
}

// TestIsTemp: a temporary file named as Write names its own is
// recognised (a killed write leaves one); ordinary names are not.
func TestIsTemp(t *testing.T) {
	dir := t.TempDir()
	for range 5 {
		f, err := os.CreateTemp(dir, ".roc_curves.svg"+tempInfix+"*")
		if err != nil {
			t.Fatal(err)
		}
		f.Close()
		if name := filepath.Base(f.Name()); !IsTemp(name) {
			t.Errorf("IsTemp(%q) = false for a temporary file named as Write names them", name)
		}
	}
	for _, name := range []string{"roc_curves.svg", ".roc_curves.svg", "roc_curves.svg.tmp-12", ".a.tmp-", ".a.tmp-12x", ".tmp-12"} {
		if IsTemp(name) {
			t.Errorf("IsTemp(%q) = true, want false", name)
		}
	}
}

// TestWriteAll: a set of files replaces the older ones together; a file
// that cannot be written (its folder is missing) leaves every older file
// as it was and no temporary file anywhere; a rename that fails (the path
// is a folder) says how many files were already replaced.
func TestWriteAll(t *testing.T) {
	dir := t.TempDir()
	sub := filepath.Join(dir, "figs")
	if err := os.Mkdir(sub, 0o777); err != nil {
		t.Fatal(err)
	}
	a, b, c := filepath.Join(dir, "a.csv"), filepath.Join(sub, "b.svg"), filepath.Join(dir, "c.html")
	read := func() [3]string {
		var got [3]string
		for i, p := range []string{a, b, c} {
			data, _ := os.ReadFile(p)
			got[i] = string(data)
		}
		return got
	}
	set := func(v string, extra ...File) []File {
		return append([]File{{a, []byte("a" + v)}, {b, []byte("b" + v)}, {c, []byte("c" + v)}}, extra...)
	}
	if err := WriteAll(set("1"), 0o666); err != nil {
		t.Fatal(err)
	}
	if got := read(); got != [3]string{"a1", "b1", "c1"} {
		t.Fatalf("after the first set: %q", got)
	}
	err := WriteAll(set("2", File{filepath.Join(dir, "missing", "d.png"), []byte("d")}), 0o666)
	if !errors.Is(err, fs.ErrNotExist) {
		t.Fatalf("a file in a missing folder: %v, want a not-exist cause", err)
	}
	if got := read(); got != [3]string{"a1", "b1", "c1"} {
		t.Errorf("a failed set changed the older files: %q", got)
	}
	for _, d := range []string{dir, sub} {
		entries, _ := os.ReadDir(d)
		for _, e := range entries {
			if IsTemp(e.Name()) {
				t.Errorf("temporary file %s left in %s", e.Name(), d)
			}
		}
	}
	// A folder in the way of the last file: the first three are replaced.
	blocked := filepath.Join(dir, "e")
	if err := os.MkdirAll(filepath.Join(blocked, "inside"), 0o777); err != nil {
		t.Fatal(err)
	}
	err = WriteAll(set("3", File{blocked, []byte("e")}), 0o666)
	if err == nil || !strings.Contains(err.Error(), "after 3 of the 4 files were replaced") {
		t.Errorf("a failed rename: %v, want it to say 3 of the 4 files were replaced", err)
	}
	if got := read(); got != [3]string{"a3", "b3", "c3"} {
		t.Errorf("files before the failed rename: %q, want them replaced", got)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if IsTemp(e.Name()) {
			t.Errorf("temporary file %s left after a failed rename", e.Name())
		}
	}
}

// TestWriteErrorNamesTheFile: a failure on Write's temporary file is
// reported on the file's own path (the temporary name is never shown),
// keeping the system's reason for errors.Is; any other failure is
// wrapped with the path.
func TestWriteErrorNamesTheFile(t *testing.T) {
	tmp := &os.PathError{Op: "write", Path: "/out/.results.json.tmp-123456", Err: syscall.EFBIG}
	err := writeError("/out/results.json", tmp)
	if got, want := err.Error(), "write /out/results.json: file too large"; got != want {
		t.Errorf("temporary file's failure: %q, want %q", got, want)
	}
	if !errors.Is(err, syscall.EFBIG) {
		t.Errorf("%v: the reason is lost", err)
	}
	other := errors.New("fill failed")
	if got, want := writeError("/out/results.json", other).Error(), "write /out/results.json: fill failed"; got != want {
		t.Errorf("other failure: %q, want %q", got, want)
	}
}
