package geodesy

import (
	"math"
	"testing"
)

// dms converts degrees, minutes, seconds to decimal degrees (sign of d).
func dms(d, m, s float64) float64 {
	v := math.Abs(d) + m/60 + s/3600
	if math.Signbit(d) {
		return -v
	}
	return v
}

// Ellipsoids of Vincenty's test lines (PROJ `geod -le` lists the same values):
// Bessel 1841 a = 6377397.155 m, 1/f = 299.1528128; International 1924
// a = 6378388 m, 1/f = 297.
var (
	bessel = newGeodesic(6377397.155, 1/299.1528128)
	intl   = newGeodesic(6378388, 1/297.0)
)

// TestVincentyInverse checks the inverse solution on Vincenty's published
// test lines (a)-(c): Vincenty, T. (1975). Direct and inverse solutions of
// geodesics on the ellipsoid with application of nested equations. Survey
// Review 23(176):88-93, table of test lines. The numbers are FROM MEMORY (they
// agree with `geod` to the printed digits). Vincenty prints s to 1 mm and
// azimuths to 0.00001"; his method is good to ~0.1 mm on these lines, so the
// tolerance is 1 mm in distance and 5e-5" in azimuth. His azimuth alpha2 is the
// forward azimuth at point 2.
func TestVincentyInverse(t *testing.T) {
	tests := []struct {
		name             string
		g                *geodesic
		lat1, lat2, dlon float64
		s, azi1, azi2    float64
	}{
		{"a_bessel", bessel, dms(55, 45, 0), dms(-33, 26, 0), dms(108, 13, 0),
			14110526.170, dms(96, 36, 8.79960), dms(137, 52, 22.01454)},
		{"b_international", intl, dms(37, 19, 54.95367), dms(26, 7, 42.83946), dms(41, 28, 35.50729),
			4085966.703, dms(95, 27, 59.63089), dms(118, 5, 58.96161)},
		{"c_international", intl, dms(35, 16, 11.24862), dms(67, 22, 14.77638), dms(137, 47, 28.31435),
			8084823.839, dms(15, 44, 23.74850), dms(144, 55, 39.92147)},
	}
	const azTol = 5e-5 / 3600
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, a1, a2 := tc.g.inverse(tc.lat1, 0, tc.lat2, tc.dlon)
			if math.Abs(s-tc.s) > 1e-3 {
				t.Errorf("s = %.5f m, Vincenty %.3f", s, tc.s)
			}
			if d := angDiff(a1, tc.azi1); d > azTol {
				t.Errorf("azi1 = %.9f, Vincenty %.9f (diff %.2g\")", a1, tc.azi1, d*3600)
			}
			if d := angDiff(a2, tc.azi2); d > azTol {
				t.Errorf("azi2 = %.9f, Vincenty %.9f (diff %.2g\")", a2, tc.azi2, d*3600)
			}
		})
	}
}

// TestVincentyDirect checks the direct solution on Vincenty's (1975) lines
// (d) and (e) on the International ellipsoid (values FROM MEMORY, see
// TestVincentyInverse). These nearly antipodal lines are ill-conditioned in
// the inverse direction (0.00001" of input latitude moves alpha1 by 0.001"), so
// they are run forward: from (1 deg N, 0) with alpha1 and s, compare phi2,
// lambda, alpha2. Tolerance 1e-8 deg in position (about 1 mm; line (e) lands
// 0.8 mm from Vincenty's printed phi2) and 5e-5" in azimuth.
func TestVincentyDirect(t *testing.T) {
	tests := []struct {
		name                 string
		azi1, s              float64
		lat2, lon2, wantAzi2 float64
	}{
		{"d_international", dms(89, 0, 0), 19960000.000,
			dms(-0, 59, 53.83076), dms(179, 17, 48.02997), dms(91, 0, 6.11733)},
		{"e_international", dms(4, 59, 59.99995), 19780006.558,
			dms(1, 1, 15.18952), dms(179, 46, 17.84244), dms(174, 59, 59.88481)},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			lat2, lon2, azi2 := intl.direct(1, 0, tc.azi1, tc.s)
			if tc.name == "d_international" {
				tc.lat2 = -tc.lat2 // dms(-0, ...) cannot carry the sign of zero degrees
			}
			if math.Abs(lat2-tc.lat2) > 1e-8 || angDiff(lon2, tc.lon2) > 1e-8 {
				t.Errorf("end (%.10f, %.10f), Vincenty (%.10f, %.10f)", lat2, lon2, tc.lat2, tc.lon2)
			}
			if d := angDiff(azi2, tc.wantAzi2); d > 5e-5/3600 {
				t.Errorf("azi2 = %.9f, Vincenty %.9f (diff %.2g\")", azi2, tc.wantAzi2, d*3600)
			}
		})
	}
}

// TestHandbookLengths checks WGS84 lengths quoted in geodetic handbooks
// (FROM MEMORY): the quarter meridian 10 001 965.729 m, and the equator
// 2 pi a = 40 075 016.686 m (exact by definition of a). Tolerance 1 mm.
func TestHandbookLengths(t *testing.T) {
	tests := []struct {
		name                   string
		lat1, lon1, lat2, lon2 float64
		want                   float64
	}{
		{"quarter_meridian", 0, 0, 90, 0, 10001965.729},                     // from memory
		{"half_meridian", -90, 0, 90, 0, 2 * 10001965.729},                  // from memory, doubled
		{"quarter_equator", 0, 0, 0, 90, 2 * math.Pi * SemiMajor / 4},       // 2 pi a / 4
		{"one_degree_equator", 0, 10, 0, 11, 2 * math.Pi * SemiMajor / 360}, // 2 pi a / 360
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if s := Distance(tc.lat1, tc.lon1, tc.lat2, tc.lon2); math.Abs(s-tc.want) > 2e-3 {
				t.Errorf("Distance = %.4f, want %.4f", s, tc.want)
			}
		})
	}
}

// TestPolygonAreaExactCases uses polygons whose geodesic edges are meridians
// and the equator, so their area is also an exact zone area: CellArea's closed
// form (Snyder 1987 eq. 3-12) and geod_polygonarea (Karney 2013) must agree.
// The perimeter is checked against 2 pi a (equator) and the quarter meridian
// (FROM MEMORY, 10 001 965.729 m). Tolerance 1e-9 relative.
func TestPolygonAreaExactCases(t *testing.T) {
	const qm = 10001965.729 // quarter meridian, from memory
	tests := []struct {
		name       string
		lats, lons []float64
		area, peri float64
	}{
		{"north_hemisphere_ccw", []float64{0, 0, 0, 0}, []float64{0, 90, 180, -90},
			SurfaceArea() / 2, 2 * math.Pi * SemiMajor},
		// Westward the southern hemisphere is on the left: counter-clockwise
		// seen from the south, so again +A/2.
		{"south_hemisphere_ccw", []float64{0, 0, 0, 0}, []float64{0, -90, 180, 90},
			SurfaceArea() / 2, 2 * math.Pi * SemiMajor},
		{"octant_sector_30deg_cw", []float64{0, 90, 0}, []float64{0, 0, 30},
			-CellArea(0, 90, 30), 2*qm + 2*math.Pi*SemiMajor*30/360},
		{"south_sector_45deg_ccw", []float64{0, -90, 0}, []float64{100, 120, 145},
			CellArea(-90, 0, 45), 2*qm + 2*math.Pi*SemiMajor*45/360},
		{"sector_across_antimeridian", []float64{0, 0, 90}, []float64{170, -160, 0},
			CellArea(0, 90, 30), 2*qm + 2*math.Pi*SemiMajor*30/360},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			a, p := PolygonArea(tc.lats, tc.lons)
			if math.Abs(a-tc.area) > 1e-9*math.Abs(tc.area) {
				t.Errorf("area = %.6f, want %.6f (rel %.2g)", a, tc.area, (a-tc.area)/tc.area)
			}
			if math.Abs(p-tc.peri) > 1e-9*tc.peri {
				t.Errorf("perimeter = %.6f, want %.6f", p, tc.peri)
			}
		})
	}
}

// TestPolygonAreaDegenerate covers inputs with fewer than three vertices.
func TestPolygonAreaDegenerate(t *testing.T) {
	tests := []struct {
		name       string
		lats, lons []float64
		wantPeri   float64
	}{
		{"empty", nil, nil, 0},
		{"one_vertex", []float64{10}, []float64{20}, 0},
		{"two_vertices", []float64{0, 0}, []float64{0, 1}, 2 * Distance(0, 0, 0, 1)},
		{"mismatched_lengths", []float64{0, 0, 5}, []float64{0, 1}, 2 * Distance(0, 0, 0, 1)},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			a, p := PolygonArea(tc.lats, tc.lons)
			if a != 0 || math.Abs(p-tc.wantPeri) > 1e-6 {
				t.Errorf("PolygonArea = (%v, %v), want (0, %v)", a, p, tc.wantPeri)
			}
		})
	}
}

// TestDensifyProperties checks the contract of Densify: end points exactly as
// given, ceil(s/maxStep) equal pieces, every step <= maxStep, every point on
// the geodesic (d(P0,Pi) + d(Pi,Pn) = s to 1 micrometre, the triangle
// equality holding only on the shortest path).
func TestDensifyProperties(t *testing.T) {
	tests := []struct {
		name                   string
		lat1, lon1, lat2, lon2 float64
		maxStep                float64
		wantN                  int // points; 0 = ceil(s/maxStep)+1
	}{
		{"continental", 52.52, 13.405, 48.8566, 2.3522, 50000, 0},
		{"antimeridian", 60, 170, 55, -170, 10000, 0},
		{"over_pole", 80, 0, 80, 180, 100000, 0},
		{"near_antipodal", 0, 0, 0.5, 179.5, 1e6, 0},
		{"step_longer_than_line", 10, 10, 10.1, 10.1, 1e7, 2},
		{"coincident", 10, 10, 10, 10, 1000, 2},
		{"zero_step", 0, 0, 1, 1, 0, 2},
		{"negative_step", 0, 0, 1, 1, -5, 2},
		{"nan_step", 0, 0, 1, 1, math.NaN(), 2},
		{"inf_step", 0, 0, 1, 1, math.Inf(1), 2},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := Distance(tc.lat1, tc.lon1, tc.lat2, tc.lon2)
			lats, lons := Densify(tc.lat1, tc.lon1, tc.lat2, tc.lon2, tc.maxStep)
			want := tc.wantN
			if want == 0 {
				want = int(math.Ceil(s/tc.maxStep)) + 1
			}
			if len(lats) != want || len(lons) != want {
				t.Fatalf("%d/%d points, want %d", len(lats), len(lons), want)
			}
			n := len(lats) - 1
			if lats[0] != tc.lat1 || lons[0] != tc.lon1 || lats[n] != tc.lat2 || lons[n] != tc.lon2 {
				t.Errorf("end points (%v,%v) (%v,%v) not the input", lats[0], lons[0], lats[n], lons[n])
			}
			for i := 1; i <= n; i++ {
				step := Distance(lats[i-1], lons[i-1], lats[i], lons[i])
				if tc.wantN == 0 && step > tc.maxStep*(1+1e-12) {
					t.Errorf("step %d = %.6f m > maxStep %v", i, step, tc.maxStep)
				}
				if math.Abs(step-s/float64(n)) > 1e-6 {
					t.Errorf("step %d = %.9f m, want equal pieces of %.9f", i, step, s/float64(n))
				}
				d := Distance(tc.lat1, tc.lon1, lats[i], lons[i]) + Distance(lats[i], lons[i], tc.lat2, tc.lon2)
				if math.Abs(d-s) > 1e-6 {
					t.Errorf("point %d off the geodesic: %.9f vs %.9f", i, d, s)
				}
			}
		})
	}
}

// TestInverseInvalid checks that out-of-range latitudes give NaN, not a panic.
func TestInverseInvalid(t *testing.T) {
	tests := []struct {
		name                   string
		lat1, lon1, lat2, lon2 float64
	}{
		{"lat1_above_90", 91, 0, 0, 0},
		{"lat2_below_-90", 0, 0, -90.5, 0},
		{"nan_lat", math.NaN(), 0, 0, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if s, _, _ := Inverse(tc.lat1, tc.lon1, tc.lat2, tc.lon2); !math.IsNaN(s) {
				t.Errorf("s12 = %v, want NaN", s)
			}
		})
	}
}

// TestConcurrentInverse runs Inverse from several goroutines on the shared
// geod_geodesic and compares with serial results.
func TestConcurrentInverse(t *testing.T) {
	const n = 2000
	want := make([]float64, n)
	for i := range want {
		want[i] = Distance(float64(i%180)-89.5, float64(i), -float64(i%170)+80, -float64(2*i))
	}
	done := make(chan error, 4)
	for w := 0; w < 4; w++ {
		go func() {
			for i := range n {
				if d := Distance(float64(i%180)-89.5, float64(i), -float64(i%170)+80, -float64(2*i)); d != want[i] {
					done <- errMismatch
					return
				}
			}
			done <- nil
		}()
	}
	for range 4 {
		if err := <-done; err != nil {
			t.Fatal(err)
		}
	}
}

type mismatch struct{}

func (mismatch) Error() string { return "concurrent Distance differs from serial" }

var errMismatch error = mismatch{}

func BenchmarkInverse(b *testing.B) {
	b.ReportAllocs()
	var sink float64
	for i := 0; b.Loop(); i++ {
		s, _, _ := Inverse(40.64, -73.78, 1.36+float64(i%7), 103.99)
		sink += s
	}
	_ = sink
}

func BenchmarkDistance(b *testing.B) {
	b.ReportAllocs()
	var sink float64
	for i := 0; b.Loop(); i++ {
		sink += Distance(40.64, -73.78, 1.36+float64(i%7), 103.99)
	}
	_ = sink
}

func BenchmarkDensify1000km10km(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		Densify(52.52, 13.405, 48.8566, 2.3522, 10000)
	}
}

// TestEdgeAreas: the S12 of a polygon's edges, added up, are minus its
// PolygonArea (PROJ's geod_polygonarea) where no edge crosses the prime
// meridian and it holds no pole, on quadrilaterals and an octagon of a
// few metres to 200 km in both hemispheres, counter-clockwise and
// clockwise; the reversed edge has minus the S12 (to 1e-9 of the edge's
// own S12, our tolerance for rounding).
func TestEdgeAreas(t *testing.T) {
	for _, tc := range []struct {
		name       string
		lats, lons []float64
	}{
		{"1 km at 50 N", []float64{50, 50, 50.009, 50.009}, []float64{10, 10.014, 10.014, 10}},
		{"5 m at 45 S", []float64{-45, -45, -44.99995, -44.99995}, []float64{-70, -69.99994, -69.99994, -70}},
		{"200 km at 60 N, clockwise", []float64{60, 61.8, 61.8, 60}, []float64{20, 20, 23.6, 23.6}},
		{"octagon near the equator", []float64{-0.1, -0.1, -0.1, 0, 0.1, 0.1, 0.1, 0}, []float64{100, 100.1, 100.2, 100.2, 100.2, 100.1, 100, 100}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			n := len(tc.lats)
			lat2, lon2 := append(tc.lats[1:n:n], tc.lats[0]), append(tc.lons[1:n:n], tc.lons[0])
			s12 := make([]float64, n)
			EdgeAreas(tc.lats, tc.lons, lat2, lon2, s12)
			sum := 0.0
			for _, v := range s12 {
				sum += v
			}
			want, _ := PolygonArea(tc.lats, tc.lons)
			if want == 0 || math.Abs(-sum/want-1) > 1e-9 {
				t.Errorf("sum of S12 %.12g m2, PolygonArea %.12g (want minus the sum)", sum, want)
			}
			back := make([]float64, n)
			EdgeAreas(lat2, lon2, tc.lats, tc.lons, back)
			for i := range s12 {
				if math.Abs(back[i]+s12[i]) > 1e-9*math.Abs(s12[i]) {
					t.Errorf("edge %d: S12 %.12g forward, %.12g back", i, s12[i], back[i])
				}
			}
		})
	}
}
