package report

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestLoadWritten: with the checksum a run recorded, an unchanged file
// loads as with Load; a file changed since (a field deleted) gets every
// check and is refused as by Load; a wrong or empty checksum changes
// nothing but the cost.
func TestLoadWritten(t *testing.T) {
	path := filepath.Join(sampleDir, "sample_results.json")
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	h := sha256.Sum256(data)
	sum := hex.EncodeToString(h[:])
	for _, s := range []string{sum, "", strings.Repeat("0", 64)} {
		if _, err := LoadWritten(path, s); err != nil {
			t.Errorf("sum %q: %v", s, err)
		}
	}
	cut := filepath.Join(t.TempDir(), "results.json")
	os.WriteFile(cut, []byte(strings.Replace(string(data), `"auc": `, `"auc_was": `, 1)), 0o644)
	if _, err := LoadWritten(cut, sum); err == nil || !strings.Contains(err.Error(), ".auc is missing") {
		t.Errorf("changed file with the old sum: %v", err)
	}
}

// BenchmarkLoadWritten compares loading the sample results with every
// check (Load: the shape walk, decoding, Validate) and with the checksum
// a run recorded (LoadWritten: SHA-256, decoding, Validate).
func BenchmarkLoadWritten(b *testing.B) {
	path := filepath.Join(sampleDir, "sample_results.json")
	data, err := os.ReadFile(path)
	if err != nil {
		b.Fatal(err)
	}
	h := sha256.Sum256(data)
	sum := hex.EncodeToString(h[:])
	b.Run("checked", func(b *testing.B) {
		b.SetBytes(int64(len(data)))
		for range b.N {
			if _, err := Load(path); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("written", func(b *testing.B) {
		b.SetBytes(int64(len(data)))
		for range b.N {
			if _, err := LoadWritten(path, sum); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// TestLoadUnreadable: a results file that is missing, a folder, or not
// readable is named with what happened and what to do, in our words (Go's
// "read X: open X: no such file or directory" named the path twice), and
// a missing one is still fs.ErrNotExist for callers.
func TestLoadUnreadable(t *testing.T) {
	dir := t.TempDir()
	missing := filepath.Join(dir, "results.json")
	_, err := Load(missing)
	if err == nil || !errors.Is(err, fs.ErrNotExist) || strings.Count(err.Error(), missing) != 1 || !strings.Contains(err.Error(), missing+" does not exist: it was removed or renamed") {
		t.Errorf("missing: %v", err)
	}
	if _, err := LoadWritten(missing, "ab"); err == nil || !strings.Contains(err.Error(), missing+" does not exist") {
		t.Errorf("missing (LoadWritten): %v", err)
	}
	folder := filepath.Join(dir, "folder.json")
	if err := os.Mkdir(folder, 0o755); err != nil {
		t.Fatal(err)
	}
	if _, err := Load(folder); err == nil || !strings.Contains(err.Error(), folder+" is a folder, not the results file a run writes") {
		t.Errorf("folder: %v", err)
	}
	if os.Geteuid() != 0 {
		locked := filepath.Join(dir, "locked.json")
		if err := os.WriteFile(locked, []byte("{}"), 0o000); err != nil {
			t.Fatal(err)
		}
		if _, err := Load(locked); err == nil || !errors.Is(err, fs.ErrPermission) || !strings.Contains(err.Error(), "permission denied); give yourself read access") {
			t.Errorf("not readable: %v", err)
		}
	}
}
