package extent

import (
	"math"
	"testing"
	"time"

	"github.com/paulmach/orb/planar"
)

// TestManyFeaturesOfOneID: a layer of 3000 disjoint squares, all with one
// id, is read as one unit holding every square, and in seconds. Adding
// each feature to the union of all before it took about 19 s for 2000
// such squares (measured with areasweep run on a region of them) and
// grows with the square of their number; unioned in pairs it takes well
// under a second. The expected area is the squares' own: 3000 of 0.05 x
// 0.05 degrees, disjoint, so their union is their sum.
func TestManyFeaturesOfOneID(t *testing.T) {
	if testing.Short() {
		t.Skip("writes and reads a layer of 3000 features")
	}
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 6, 0.01, 700, 600)
	const nx, ny = 60, 50
	n := nx * ny
	ids := make([]string, n)
	rings := make([][][2]float64, n)
	// Squares in a scrambled order (k*7919 mod n visits every cell once,
	// 7919 being prime to 3000), so that neighbours in the file are not
	// neighbours on the map, as in a layer written in no spatial order.
	for i := 0; i < n; i++ {
		k := i * 7919 % n
		x, y := 0.1*float64(k%nx)+0.02, 0.1*float64(k/nx)+0.02
		ids[i] = "a"
		rings[i] = [][2]float64{{x, y}, {x + 0.05, y}, {x + 0.05, y + 0.05}, {x, y + 0.05}, {x, y}}
	}
	path := writeGeoJSON(t, dir, "squares.geojson", ids, rings)
	start := time.Now()
	units, _, err := ReadUnits(path, "id", g)
	took := time.Since(start)
	if err != nil {
		t.Fatal(err)
	}
	if len(units) != 1 || units[0].ID != "a" {
		t.Fatalf("units %v, want one, a", units)
	}
	mp := units[0].Shape.LonLat
	if len(mp) != n {
		t.Errorf("the unit has %d polygons, want %d (one per square)", len(mp), n)
	}
	if got, want := planar.Area(mp), float64(n)*0.05*0.05; math.Abs(got-want) > 1e-9*want {
		t.Errorf("area %.12g square degrees, want %.12g", got, want)
	}
	if took > 20*time.Second {
		t.Errorf("reading %d features of one id took %s; want well under 20 s", n, took.Round(time.Second))
	}
	t.Logf("read %d features in %s", n, took)
}
