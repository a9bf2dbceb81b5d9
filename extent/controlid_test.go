package extent

import (
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestControlCharacterIDs: an ecoregion id holding a control character
// (a line break from a text pasted from several lines, a tab, a byte
// such as 0x01) is refused naming the file, the feature (1-based, the
// GeoPackage's FID), the field and the character; such ids went raw into
// report.html (where 0x01 is not allowed) and methods.md, a line break
// splitting the line that lists the units. Accents and other printable
// text are ids like any other.
func TestControlCharacterIDs(t *testing.T) {
	g, _ := geoGrid(t, 0, 10, 0.1, 100, 100)
	sr := wgs84SR(t)
	square := func(x0 float64) []byte {
		geom, err := godal.NewGeometryFromWKT(fmt.Sprintf("POLYGON((%g 1,%g 1,%g 3,%g 3,%g 1))", x0, x0+2, x0+2, x0, x0), sr)
		if err != nil {
			t.Fatal(err)
		}
		defer geom.Close()
		b, err := geom.WKB()
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	cases := []struct {
		second string
		want   string // "" when accepted
	}{
		{"Région Sud", ""},
		{"Zone\nSud", `feature 2 has the id "Zone\nSud" in field "unit", which holds a control character (U+000A, a line break)`},
		{"Zone\r\nSud", `(U+000D, a line break)`},
		{"Zone\tSud", `(U+0009, a tab)`},
		{"Zoné\x01", `"Zoné\x01" in field "unit", which holds a control character (U+0001, not text)`},
		{"Zone\u0085", `(U+0085, not text)`},
	}
	for i, c := range cases {
		path := filepath.Join(t.TempDir(), fmt.Sprintf("units%d.gpkg", i))
		feats := []Feature{{square(1.03), []any{"Nord"}}, {square(4.03), []any{c.second}}}
		if err := WriteLayer(path, "units", sr, godal.GTPolygon, []LayerField{{"unit", godal.FTString}}, feats); err != nil {
			t.Fatal(err)
		}
		units, _, err := ReadUnits(path, "unit", g)
		switch {
		case c.want == "" && (err != nil || len(units) != 2 || units[1].ID != c.second):
			t.Errorf("%q: %v, units %v", c.second, err, units)
		case c.want != "" && (err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), path) || !strings.Contains(err.Error(), "remove it from the id")):
			t.Errorf("%q: %v, want it refused with %s", c.second, err, c.want)
		}
	}
}
