// Package place decides which occurrence records a run scores, once each
// record has been located on the grid (extent.Grid.CellOf) and the first
// model read at its cell: a record outside the grid or on a cell without
// data is not scored, and with thinning only the first record of a role
// in a cell is. It is pure Go (no GDAL), so its rules are tested without
// rasters.
package place

// Role indices of Records.Role.
const (
	Train = 0
	Test  = 1
)

// Records are the occurrence records of a run, in table order.
type Records struct {
	// Cell is each record's grid cell (row*width + col), -1 when it lies
	// outside the grid.
	Cell []int
	// Valid tells whether the model has data at each record's cell (read
	// at the cell; ignored for a record outside the grid).
	Valid []bool
	// Role is each record's role, Train or Test.
	Role []int
}

// Placement says which records are scored and why the others are not.
type Placement struct {
	// Cell is each record's cell if it is scored, else -1.
	Cell []int
	// Outside, NoData and Thinned list the records not scored, in table
	// order: outside the grid, on a cell without data, and a later record
	// of the same role in a cell already holding one (thinning).
	Outside, NoData []int
	Thinned         []Duplicate
}

// Duplicate is a thinned record and the earlier record of the same role
// and cell that is kept.
type Duplicate struct{ Record, First int }

// Place applies the rules to r: outside the grid, then no data, then (if
// thin) one record per cell and role, the first in table order kept
// (common practice for presence data: a cell counts once per role).
func Place(r Records, thin bool) Placement {
	p := Placement{Cell: make([]int, len(r.Cell))}
	type key struct{ cell, role int }
	seen := map[key]int{}
	for i, c := range r.Cell {
		p.Cell[i] = -1
		switch {
		case c < 0:
			p.Outside = append(p.Outside, i)
			continue
		case !r.Valid[i]:
			p.NoData = append(p.NoData, i)
			continue
		}
		if thin {
			k := key{c, r.Role[i]}
			if first, dup := seen[k]; dup {
				p.Thinned = append(p.Thinned, Duplicate{Record: i, First: first})
				continue
			}
			seen[k] = i
		}
		p.Cell[i] = c
	}
	return p
}
