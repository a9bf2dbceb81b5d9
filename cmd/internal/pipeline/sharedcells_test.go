package pipeline

import (
	"strings"
	"testing"

	"areasweep/extent/vocab"
	"areasweep/report"
)

// TestSharedTestCellsWording: the --no-thin warning counted the distinct
// cells as "1 distinct cells" when every test point shares one cell (an audit of edge
// cases: 12 test points in one cell); one cell is "1 distinct cell".
func TestSharedTestCellsWording(t *testing.T) {
	for _, c := range []struct {
		cells []int
		want  string
	}{
		{[]int{7, 7, 7}, "2 of the 3 test points scored lie in a cell with another test point (--no-thin keeps them: 1 distinct cell):"},
		{[]int{7, 7, 8}, "1 of the 3 test points scored lie in a cell with another test point (--no-thin keeps them: 2 distinct cells):"},
	} {
		s := &Study{o: &Options{}, log: &Log{}, res: &report.Results{}} // no ErrOut: the log only
		for i, cell := range c.cells {
			s.points = append(s.points, report.Point{ID: i + 2, Role: vocab.RoleTest, Status: vocab.PointScored})
			s.cell = append(s.cell, cell)
		}
		s.warnSharedTestCells()
		if len(s.res.Warnings) != 1 || !strings.Contains(s.res.Warnings[0], c.want) {
			t.Errorf("cells %v: warnings %q, want one saying %q", c.cells, s.res.Warnings, c.want)
		}
	}
}
