package report

import (
	"errors"
	"strings"
	"syscall"
	"testing"
)

// TestFontTempDirErrorFileSize: the PDF writer's font data stopped by the
// process's limit of file size (ulimit -f; the system's reason "file too
// large", syscall.EFBIG's words) is worded as that limit (EFBIG wrapped,
// for outdir.FileSizeAdvice), not as an unusable TMPDIR; other reasons
// keep the TMPDIR advice. The panic text is the library's, as the
// temporary folder's check words its own failures (CheckTempDir).
func TestFontTempDirErrorFileSize(t *testing.T) {
	for _, tc := range []struct {
		msg         string
		efbig, tdir bool
	}{
		{pdfFontFailed + "write /tmp/vgpdf-123/font.z: file too large", true, false},
		{pdfFontFailed + "open /tmp/vgpdf-123/font.z: read-only file system", false, true},
		{pdfFontFailed + "write /tmp/vgpdf-123/font.z: no space left on device", false, true},
	} {
		err := fontTempDirError(tc.msg)
		if got := errors.Is(err, syscall.EFBIG); got != tc.efbig {
			t.Errorf("%q: errors.Is(EFBIG) %v, want %v (%v)", tc.msg, got, tc.efbig, err)
		}
		if got := strings.Contains(err.Error(), "set TMPDIR"); got != tc.tdir {
			t.Errorf("%q: TMPDIR advice %v, want %v (%v)", tc.msg, got, tc.tdir, err)
		}
	}
}
