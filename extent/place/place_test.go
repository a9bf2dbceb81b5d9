package place

import (
	"reflect"
	"testing"
)

// TestPlace checks the rules on small tables worked out by hand: records
// outside the grid and on no data are dropped whatever their role, a
// second record of one role in a cell is thinned (the first kept, even if
// a record of the other role lies between), records of different roles
// share a cell, and without thinning every record with data is scored.
func TestPlace(t *testing.T) {
	r := Records{
		Cell:  []int{5, -1, 5, 7, 5, 5, 9, 7},
		Valid: []bool{true, true, true, false, true, true, true, true},
		Role:  []int{Train, Train, Test, Train, Train, Test, Test, Train},
	}
	cases := []struct {
		name string
		thin bool
		want Placement
	}{
		{"thinned", true, Placement{
			Cell:    []int{5, -1, 5, -1, -1, -1, 9, 7},
			Outside: []int{1}, NoData: []int{3},
			Thinned: []Duplicate{{Record: 4, First: 0}, {Record: 5, First: 2}},
		}},
		{"not thinned", false, Placement{
			Cell:    []int{5, -1, 5, -1, 5, 5, 9, 7},
			Outside: []int{1}, NoData: []int{3},
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := Place(r, c.thin); !reflect.DeepEqual(got, c.want) {
				t.Errorf("got %+v\nwant %+v", got, c.want)
			}
		})
	}
	if got := Place(Records{}, true); len(got.Cell) != 0 || got.Outside != nil {
		t.Errorf("no records: %+v", got)
	}
}
