package pass

import (
	"errors"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestBlockError: GDAL's words for a block it could not allocate memory
// for (copied from GDAL 3.6.2's output when a block read met a limit of
// address space, ulimit -v 1900000 on a 27-million-cell run) give a
// *MemoryError, which fault.BadInput leaves unwrapped (exit 1), saying
// what to do about memory; it said "the file may be truncated or
// damaged" (exit 2). Another read error still blames the file.
func TestBlockError(t *testing.T) {
	oom := blockError("m1.tif", 5376, 0, errors.New("/gcore/gdalrasterblock.cpp, 1108: cannot allocate 262144 bytes"))
	var me *MemoryError
	if !errors.As(oom, &me) {
		t.Fatalf("out of memory: %T %v, want a *MemoryError", oom, oom)
	}
	want := "m1.tif: reading the block at column 5376 row 0, the library ran out of memory (it could not allocate 262144 bytes); free some memory, raise the process's limit of virtual memory"
	if got := oom.Error(); !strings.HasPrefix(got, want) || strings.Contains(got, "damaged") || strings.Contains(got, "gdalrasterblock") {
		t.Errorf("out of memory: %q, want it to start %q and not blame the file nor name GDAL's source", got, want)
	}
	if fault.IsBadInput(fault.BadInput(oom)) {
		t.Error("fault.BadInput wrapped a memory error as the input's fault (exit 2)")
	}
	bad := blockError("m1.tif", 0, 256, errors.New("TIFFReadEncodedTile() failed: Read error at row 64, col 0, tile 17; got 10 bytes, expected 6164"))
	if errors.As(bad, &me) || !strings.Contains(bad.Error(), "the file may be truncated or damaged") || !fault.IsBadInput(fault.BadInput(bad)) {
		t.Errorf("damaged block: %T %v, want the file blamed, as bad input", bad, bad)
	}
	// GDAL's words for a virtual raster whose source is gone.
	gone := blockError("m.vrt", 0, 0, errors.New("vrt/a.tif: No such file or directory"))
	if got := gone.Error(); !strings.Contains(got, "(vrt/a.tif: No such file or directory): a file the raster reads its values from is missing; restore it, or rebuild m.vrt") ||
		strings.Contains(got, "damaged") || !fault.IsBadInput(fault.BadInput(gone)) {
		t.Errorf("missing source: %q, want the missing file named as such, as bad input", got)
	}
}
