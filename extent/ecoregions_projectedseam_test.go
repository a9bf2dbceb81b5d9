package extent

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestEcoregionSplitAt180OnProjectedGrid: a unit stored as two parts split
// at 180 degrees (valid in longitude/latitude: the parts meet along the
// meridian) is, projected to a grid in NZTM (EPSG:2193) with vertices
// added along its edges, a multipolygon whose parts cross each other by
// rounding along that meridian. GEOS refused the touching test on it and
// the run stopped with "ecoregions.gpkg unit "A": the touching test
// failed (side location conflict ...); check the unit geometries in a
// GIS", blaming a valid layer. The unit is now repaired once projected,
// keeping the area of both parts. Unit B shares A's west edge (177° E)
// and C touches nothing, so B is the one touching unit (by construction).
func TestEcoregionSplitAt180OnProjectedGrid(t *testing.T) {
	dir := t.TempDir()
	units := filepath.Join(dir, "units.geojson")
	body := `{"type":"FeatureCollection","features":[
{"type":"Feature","properties":{"id":"A"},"geometry":{"type":"MultiPolygon","coordinates":[
 [[[177,-40],[180,-40],[180,-35],[177,-35],[177,-40]]],
 [[[-180,-38],[-178,-38],[-178,-36],[-180,-36],[-180,-38]]]]}},
{"type":"Feature","properties":{"id":"B"},"geometry":{"type":"Polygon","coordinates":[[[175,-40],[177,-40],[177,-35],[175,-35],[175,-40]]]}},
{"type":"Feature","properties":{"id":"C"},"geometry":{"type":"Polygon","coordinates":[[[-177.5,-40],[-176,-40],[-176,-39],[-177.5,-39],[-177.5,-40]]]}}]}`
	if err := os.WriteFile(units, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{{{176, -40}, {180, -40}, {180, -35}, {176, -35}, {176, -40}}})
	g, err := NewGrid(110, 95, [6]float64{1.7e6, 1e4, 0, 6.3e6, 0, -1e4}, "EPSG:2193")
	if err != nil {
		t.Fatal(err)
	}
	read, _, err := ReadUnits(units, "id", g)
	if err != nil {
		t.Fatal(err)
	}
	for _, u := range read {
		if ok, why := validity(u.geom); !ok {
			t.Errorf("unit %s projected is not a valid geometry: %s", u.ID, why)
		}
	}
	v := NewValidFunc(110, 95, func(int) bool { return true })
	train := []LonLat{{176, -37}, {175.5, -38.5}}
	f, err := Build(g, v, Spec{Region: region, Train: train, Ecoregions: units, EcoregionField: "id", EcoregionMinPoints: 1}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	if m := f.Members[memberIdx(t, f, "ecoregions_k1")]; !strings.HasSuffix(m.Params, "units=B") {
		t.Errorf("ecoregion member %q, want unit B", m.Params)
	}
	if m := f.Members[memberIdx(t, f, "ecoregions_k1_touching")]; !strings.HasSuffix(m.Params, "plus touching units=A") {
		t.Errorf("touching member %q, want unit A added", m.Params)
	}
}
