package extent

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestUnitIDOfDatesAndLists: GDAL reads a GeoJSON property holding dates
// as a Date field and one holding arrays as a list field. godal gives
// such a field no text, so every feature was one unit of id "" (the whole
// layer, silently). Dates now name their units as OGR writes them
// (ogrinfo prints 2020/01/02 for "2020-01-02"); lists are refused.
func TestUnitIDOfDatesAndLists(t *testing.T) {
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	path := filepath.Join(dir, "units.geojson")
	body := `{"type":"FeatureCollection","features":[
{"type":"Feature","properties":{"day":"2020-01-02","codes":[1,2]},"geometry":{"type":"Polygon","coordinates":[[[0.5,0.5],[1.5,0.5],[1.5,1.5],[0.5,1.5],[0.5,0.5]]]}},
{"type":"Feature","properties":{"day":"2020-01-03","codes":[3]},"geometry":{"type":"Polygon","coordinates":[[[2.5,2.5],[3.5,2.5],[3.5,3.5],[2.5,3.5],[2.5,2.5]]]}},
{"type":"Feature","properties":{"day":"2020-01-02","codes":[4]},"geometry":{"type":"Polygon","coordinates":[[[0.5,2.5],[1.5,2.5],[1.5,3.5],[0.5,3.5],[0.5,2.5]]]}}]}`
	if err := os.WriteFile(path, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	units, _, err := ReadUnits(path, "day", g)
	if err != nil {
		t.Fatal(err)
	}
	var ids []string
	for _, u := range units {
		ids = append(ids, u.ID)
	}
	if strings.Join(ids, ",") != "2020/01/02,2020/01/03" {
		t.Errorf("unit ids %q, want 2020/01/02 (features 1 and 3) and 2020/01/03", ids)
	}
	if _, _, err := ReadUnits(path, "codes", g); err == nil || !strings.Contains(err.Error(), `field "codes" holds lists of whole numbers, which cannot name a unit`) {
		t.Errorf("a list field: %v", err)
	}
}

// TestUnitIDsDifferingInSpaces: ids "A" and " A" (or "A" and "A" with a
// no-break space, U+00A0) are two units, as the README says features are
// grouped by their value; the run now warns, naming both, where it kept
// them apart without a word. So do ids that differ only in letter case
// (Unicode case folding: "Straße" and "STRASSE" too) or in the Unicode
// form of the same letters (composed or decomposed), quoted with escapes.
func TestUnitIDsDifferingInSpaces(t *testing.T) {
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	sq := func(x, y float64) [][2]float64 {
		return [][2]float64{{x, y}, {x + 1, y}, {x + 1, y + 1}, {x, y + 1}, {x, y}}
	}
	for _, tc := range []struct {
		name string
		ids  []string
		want string
	}{
		{"leading space", []string{"A", " A", "B"}, `("A" and " A")`},
		{"no-break space", []string{"A\u00a0", "B", "A"}, `("A\u00a0" and "A")`},
		{"letter case", []string{"Forest", "B", "forest"}, `("Forest" and "forest")`},
		// "é" as one character (U+00E9) and as "e" and a combining acute
		// accent (U+0301): the same letters, two byte sequences.
		{"unicode form", []string{"Prair\u00e9", "B", "Praire\u0301"}, `("Prair\u00e9" and "Praire\u0301")`},
		{"sharp s folded", []string{"Stra\u00dfe", "B", "STRASSE"}, `("Straße" and "STRASSE")`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := writeGeoJSON(t, dir, tc.name+".geojson", tc.ids, [][][2]float64{sq(0.5, 0.5), sq(2.5, 0.5), sq(0.5, 2.5)})
			units, warns, err := ReadUnits(path, "id", g)
			if err != nil {
				t.Fatal(err)
			}
			if len(units) != 3 {
				t.Errorf("%d units, want 3 (the ids are kept as they are)", len(units))
			}
			if !strings.Contains(strings.Join(warns, "\n"), "differ only in the spaces around them, in letter case or in the Unicode encoding of the same letters are kept as separate units "+tc.want) {
				t.Errorf("warnings %q lack %s", warns, tc.want)
			}
		})
	}
	// Ids that differ otherwise draw no such warning (an accent is a
	// letter of its own).
	path := writeGeoJSON(t, dir, "plain.geojson", []string{"A", "Prair\u00e9", "Praire"}, [][][2]float64{sq(0.5, 0.5), sq(2.5, 0.5), sq(0.5, 2.5)})
	if _, warns, err := ReadUnits(path, "id", g); err != nil || len(warns) != 0 {
		t.Errorf("ids A, Prairé, Praire: warnings %q, error %v", warns, err)
	}
}
