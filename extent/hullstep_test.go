package extent

import (
	"math"
	"math/rand/v2"
	"testing"

	"areasweep/extent/geodesy"
)

// TestHullStep: the hull's boundary is cut at sqrt(8 d_min x 1 m) for the
// smallest positive hull buffer d_min (worked by hand: 894.43 m at 100
// km), at hullBoxStep without one, whatever the grid.
func TestHullStep(t *testing.T) {
	for _, tc := range []struct {
		name string
		dm   []float64
		want float64
	}{
		{"hull and 100 km", []float64{0, 100e3}, math.Sqrt(8e5)},
		{"smallest buffer decides", []float64{250e3, 10e3, 0}, math.Sqrt(8e4)},
		{"hull only", []float64{0}, hullBoxStep},
	} {
		if got := hullStep(tc.dm); math.Abs(got-tc.want) > 1e-9 {
			t.Errorf("%s: step %g m, want %g", tc.name, got, tc.want)
		}
	}
}

// TestHullStepBound: a point at geodesic distance d from an ellipsoidal
// geodesic edge (reached by going d at right angles from a point on the
// edge) lies within d + hullBufferTol of the points the edge is cut into
// at hullStep for buffers of d, and no nearer than d (less a millimetre
// of rounding, our tolerance): the bound hullStep's comment derives, on
// edges of 20 to 3000 km anywhere between 80 S and 80 N, d from 1 to
// 1000 km (PROJ's geodesics, Karney 2013).
func TestHullStepBound(t *testing.T) {
	// Our choice of seed: fixed cases.
	rng := rand.New(rand.NewPCG(3, 5))
	worst := 0.0
	for i := 0; i < 60; i++ {
		lat1, lon1 := rng.Float64()*160-80, rng.Float64()*360-180
		length := 20e3 + rng.Float64()*2980e3
		lat2, lon2 := geodesy.Direct(lat1, lon1, rng.Float64()*360-180, length)
		if math.Abs(lat2) > 80 {
			continue
		}
		d := math.Pow(10, 3+3*rng.Float64())
		step := hullStep([]float64{0, d})
		lats, lons := geodesy.Densify(lat1, lon1, lat2, lon2, step)
		// A foot strictly between two cut points, then d at right angles.
		s, azi, _ := geodesy.Inverse(lat1, lon1, lat2, lon2)
		if len(lats) < 3 {
			continue
		}
		k := 1 + rng.IntN(len(lats)-2)
		at := (float64(k) - 0.5) / float64(len(lats)-1) * s
		flat, flon, fazi := geodesy.DirectAzimuth(lat1, lon1, azi, at)
		side := 90.0
		if rng.IntN(2) == 0 {
			side = -90
		}
		plat, plon := geodesy.Direct(flat, flon, fazi+side, d)
		near := math.Inf(1)
		for j := range lats {
			near = math.Min(near, geodesy.Distance(plat, plon, lats[j], lons[j]))
		}
		if near > d+hullBufferTol || near < d-1e-3 {
			t.Errorf("edge (%.3f, %.3f)-(%.3f, %.3f), d %.0f m, step %.1f m: nearest cut point %.4f m away, want within [d, d + %g m]", lat1, lon1, lat2, lon2, d, step, near, hullBufferTol)
		}
		worst = math.Max(worst, near-d)
	}
	t.Logf("largest overestimate %.4f m (bound %g m)", worst, hullBufferTol)
}
