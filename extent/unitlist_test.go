package extent

import "testing"

// TestUnitList: the unit ids in an ecoregion member's params stay one
// per unit when an id holds a comma (the separator), a semicolon (which
// separates the params), a double quote or spaces at its ends (ids told
// apart only by those are separate units); others are written bare, non-ASCII
// letters too. Before, "Forest, dry" and "Steppe" were written
// units=Forest, dry,Steppe: three units to a reader. Expected strings
// worked by hand.
func TestUnitList(t *testing.T) {
	cases := []struct {
		name string
		ids  []string
		want string
	}{
		{"plain", []string{"A", "B 2", "Prairie Ñandú"}, "A,B 2,Prairie Ñandú"},
		{"comma", []string{"Forest, dry", "Steppe"}, `"Forest, dry",Steppe`},
		{"semicolon", []string{"a;b"}, `"a;b"`},
		{"quote", []string{`the "big" one`}, `"the \"big\" one"`},
		{"spaces at the ends", []string{"A", " A", "A "}, `A," A","A "`},
		{"no-break space", []string{"A\u00a0"}, `"A\u00a0"`},
		{"none", nil, ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := unitList(c.ids); got != c.want {
				t.Errorf("unitList(%q) = %s, want %s", c.ids, got, c.want)
			}
		})
	}
}
