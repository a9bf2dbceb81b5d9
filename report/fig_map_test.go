package report

import (
	"fmt"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
)

// TestMapPanelsFit checks the map figure's arrangement for families from
// one panel to far more than a page holds: the drawn rows never take more
// height than the page leaves them (before, 60 extents drew panels over
// the colour bar and the point key), maps are at least mapMinH tall
// whenever any are left out, columns grow before panels are dropped, and
// the panels left out are the last ones, named in the caption.
func TestMapPanelsFit(t *testing.T) {
	const avail = 190 * vg.Millimeter
	for _, n := range []int{1, 2, 4, 7, 12, 16, 30, 80} {
		t.Run(fmt.Sprint(n), func(t *testing.T) {
			r := &Results{}
			var groups []mapGroup
			for i := range n {
				var members []int
				for k := range 5 {
					r.Extents = append(r.Extents, Extent{ID: fmt.Sprintf("region_%dkm", 20*(5*i+k+1))})
					members = append(members, len(r.Extents)-1)
				}
				groups = append(groups, mapGroup{title: fmt.Sprintf("nested chain c%d", i), members: members})
			}
			l := layoutMapPanels(r, groups, twoColumns, avail, 0.8)
			if l.shown < 1 || l.shown > n || l.cols < 1 || l.cols > mapMaxCols {
				t.Fatalf("layout %+v for %d panels", l, n)
			}
			rows := (l.shown + l.cols - 1) / l.cols
			if got := vg.Length(rows) * l.cellH; got > avail+1e-9 {
				t.Errorf("%d rows of %.1f mm take %.1f mm, more than the %.1f mm left", rows, l.cellH/vg.Millimeter, got/vg.Millimeter, avail/vg.Millimeter)
			}
			mapH := l.cellH - vg.Points(mapPanelChrome) - l.legendH
			if n > 1 && mapH < mapMinH-1e-9 {
				t.Errorf("maps %.1f mm tall, below the %.0f mm floor", mapH/vg.Millimeter, mapMinH/vg.Millimeter)
			}
			if l.shown < n && l.cols != mapMaxCols {
				t.Errorf("%d of %d panels left out with only %d columns", n-l.shown, n, l.cols)
			}
			if n == 1 && l.cols != 1 {
				t.Errorf("one panel in %d columns", l.cols)
			}
			if left := n - l.shown; left > 0 {
				got := leftTitles(groups, left)
				if !strings.HasPrefix(got, groups[l.shown].title) || !strings.HasSuffix(got, groups[n-1].title) {
					t.Errorf("left-out panels named %q", got)
				}
			}
		})
	}
}
