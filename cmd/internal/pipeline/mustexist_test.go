package pipeline

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestMustExistUnreadable: an input file the user cannot read is refused
// as an input error naming it and the cause, before GDAL reports it as
// "not a raster". Root reads every file whatever its mode, so as root
// the case is a file the kernel lets nobody read, /proc/sys/vm/drop_caches
// (write only), and the test is skipped only when even that opens.
func TestMustExistUnreadable(t *testing.T) {
	p := filepath.Join(t.TempDir(), "model.tif")
	if err := os.WriteFile(p, []byte("x"), 0o000); err != nil {
		t.Fatal(err)
	}
	if f, err := os.Open(p); err == nil {
		f.Close()
		p = "/proc/sys/vm/drop_caches"
		if f, err := os.Open(p); err == nil || !os.IsPermission(err) {
			if err == nil {
				f.Close()
			}
			t.Skip("no file here that this user cannot read")
		}
	}
	err := mustExist("model m", p)
	if err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), "cannot be read (permission denied)") || !strings.Contains(err.Error(), p) {
		t.Fatalf("mustExist = %v", err)
	}
}

// TestMustExistEmptyAndCommas: a raster of 0 bytes is refused as empty,
// and a path holding a second NAME=PATH item names that mistake.
func TestMustExistEmptyAndCommas(t *testing.T) {
	dir := t.TempDir()
	empty := filepath.Join(dir, "zero.tif")
	os.WriteFile(empty, nil, 0o644)
	if err := mustExist("model m", empty); err == nil || !strings.Contains(err.Error(), "empty (0 bytes)") {
		t.Errorf("empty file: %v", err)
	}
	if err := mustExist("occurrences", empty); err != nil {
		t.Errorf("an empty occurrence table is left to the table reader: %v", err)
	}
	if err := mustExist("model a", filepath.Join(dir, "a.tif,b="+filepath.Join(dir, "b.tif"))); err == nil || !strings.Contains(err.Error(), "several NAME=PATH items") {
		t.Errorf("two items in one flag: %v", err)
	}
}
