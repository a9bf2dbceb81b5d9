package report

import (
	"os"
	"strings"
	"testing"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/vgpdf"
)

// TestEndTempWorkWaitsForFontFolder: a stop signal's handler ends the
// process with os.Exit, which runs no deferred removal; a run of the demo
// stopped ~0.2 s in left the PDF writer's folder gofpdf-makefont-… in
// TMPDIR (seen in 5 of 168 signalled runs). EndTempWork, which the handler
// calls first, must return only once that folder is gone. The PDF writer
// makes one the first time a font size is drawn: each try draws a size
// not drawn before, catches its folder while it exists, and calls
// EndTempWork then.
func TestEndTempWorkWaitsForFontFolder(t *testing.T) {
	tmp := t.TempDir()
	t.Setenv("TMPDIR", tmp)
	fontDirs := func() []string {
		var found []string
		ents, _ := os.ReadDir(tmp)
		for _, e := range ents {
			if strings.HasPrefix(e.Name(), "gofpdf-makefont-") {
				found = append(found, e.Name())
			}
		}
		return found
	}
	caught := 0
	for try := 0; try < 40 && caught < 5; try++ {
		size := vg.Points(9.1 + 0.037*float64(try)) // a size no other test draws
		done := make(chan struct{})
		go func() {
			defer close(done)
			c := pdfCanvas{vgpdf.New(100, 100)}
			c.FillString(font.DefaultCache.Lookup(sansFont, size), vg.Point{X: 10, Y: 10}, "x")
		}()
		seen := false
	spin:
		for {
			select {
			case <-done:
				break spin
			default:
			}
			if len(fontDirs()) > 0 {
				seen = true
				break
			}
		}
		if seen {
			EndTempWork()
			if left := fontDirs(); len(left) > 0 {
				t.Errorf("try %d: EndTempWork returned while the PDF writer's folder %v was in TMPDIR", try, left)
			}
			tempWork.Unlock()
			caught++
		}
		<-done
	}
	if caught == 0 {
		t.Skip("the PDF writer's font folder was never seen while it existed: nothing to check")
	}
}
