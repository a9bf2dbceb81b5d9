package extent

import (
	"math"
	"testing"
)

// TestRegionSplitAtAntimeridianWorldMap: a latitude-longitude region split
// at 180 degrees (170 E - 170 W, 48 - 72 N, as two polygons) on world maps
// centred on Greenwich, where its halves lie on the map's opposite edges.
// On Mollweide the run was refused: vertices on the 180th meridian, projected
// to the map's edge, failed PROJ's inverse by a rounding error ("a vertex
// (1.39389e+07, 5.72608e+06) cannot be transformed to WGS84"). On Equal
// Earth the cut was taken as a boundary: region_minus100km lost the cells
// within 100 km of 180 degrees. Membership is checked against brute-force
// geodesic distance to the true outline (170 E to 190 E), leaving out cells
// within half a cell diagonal of the buffer's edge, widened by the 5 km
// the outline's points at every 10 km may add (the acceptance rule of
// TestRegionBufferMembership).
func TestRegionSplitAtAntimeridianWorldMap(t *testing.T) {
	dir := t.TempDir()
	east := [][2]float64{{170, 48}, {180, 48}, {180, 72}, {170, 72}, {170, 48}}
	west := [][2]float64{{-180, 48}, {-170, 48}, {-170, 72}, {-180, 72}, {-180, 48}}
	region := writeGeoJSON(t, dir, "split.geojson", []string{"e", "w"}, [][][2]float64{east, west})
	outline := [][2]float64{{170, 48}, {190, 48}, {190, 72}, {170, 72}, {170, 48}}
	blats, blons := densifyRing(outline, 10000)
	for _, c := range []struct {
		crs        string
		west, step float64
		w, h       int
	}{
		{"ESRI:54009", -18100000, 100000, 362, 182},
		{"EPSG:8857", -17300000, 100000, 346, 170},
	} {
		t.Run(c.crs, func(t *testing.T) {
			g, err := NewGrid(c.w, c.h, [6]float64{c.west, c.step, 0, float64(c.h/2) * c.step, 0, -c.step}, c.crs)
			if err != nil {
				t.Fatal(err)
			}
			defer g.Close()
			f, err := Build(g, nil, Spec{Region: region, RegionBuffersKm: []float64{-100}}, nil, nil)
			if err != nil {
				t.Fatal(err)
			}
			base, k := memberIdx(t, f, "base"), memberIdx(t, f, "region_minus100km")
			margin := 0.5*math.Sqrt2*c.step/1000*1.2 + 5 // 1.2: cells are not squares on the Earth (our margin)
			checked, nearSeam := 0, 0
			for row := 0; row < g.Height; row++ {
				for col := 0; col < g.Width; col++ {
					i := row*g.Width + col
					if !f.Has(base, i) {
						continue
					}
					x, y := g.Centre(col, row)
					lon, lat := make([]float64, 1), make([]float64, 1)
					g.ToLonLat([]float64{x}, []float64{y}, lon, lat)
					dist := bruteBoundaryKm(lon[0], lat[0], blats, blons)
					if math.Abs(dist-100) <= margin {
						continue
					}
					checked++
					if math.Abs(math.Abs(lon[0])-180) < 3 {
						nearSeam++
					}
					if got, want := f.Has(k, i), dist > 100; got != want {
						t.Fatalf("cell lon %.3f lat %.3f, %.1f km from the outline: in region_minus100km %v, want %v", lon[0], lat[0], dist, got, want)
					}
				}
			}
			if checked < 50 || nearSeam < 10 {
				t.Fatalf("checked %d cells, %d within 3 degrees of 180: too few to test the seam", checked, nearSeam)
			}
		})
	}
}
