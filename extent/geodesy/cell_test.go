package geodesy

import (
	"math"
	"testing"
)

// relDiff returns |a-b|/|b|.
func relDiff(a, b float64) float64 { return math.Abs(a-b) / math.Abs(b) }

// TestSurfaceArea checks the WGS84 surface area three ways:
//   - the handbook value 510 065 621.7 km^2 (FROM MEMORY; printed to 0.1 km^2),
//   - the closed form 2 pi a^2 (1 + (1-e^2)/e atanh(e)) written out here,
//   - twice the area of the equator as a geodesic polygon, from PROJ's
//     geod_polygonarea (Karney 2013), an independent algorithm.
func TestSurfaceArea(t *testing.T) {
	got := SurfaceArea()
	if d := math.Abs(got/1e6 - 510065621.7); d > 0.05 { // from memory, +-0.05 km^2
		t.Errorf("SurfaceArea = %.4f km^2, handbook 510065621.7", got/1e6)
	}
	e := math.Sqrt(Flattening * (2 - Flattening))
	closed := 2 * math.Pi * SemiMajor * SemiMajor * (1 + (1-e*e)/e*math.Atanh(e))
	if relDiff(got, closed) > 1e-14 {
		t.Errorf("SurfaceArea = %v, closed form %v", got, closed)
	}
	hemi, _ := PolygonArea([]float64{0, 0, 0, 0}, []float64{0, 90, 180, -90})
	if relDiff(got, 2*hemi) > 1e-12 {
		t.Errorf("SurfaceArea = %v, 2 x geod_polygonarea(equator) = %v", got, 2*hemi)
	}
	if relDiff(4*math.Pi*AuthalicRadius()*AuthalicRadius(), got) > 1e-14 {
		t.Errorf("4 pi R_q^2 != SurfaceArea")
	}
}

// TestGlobalGridSum sums CellArea over the global 1-degree grid (64 800
// cells) and compares with the closed-form surface area to 1e-9 relative
// (task brief), and each 1-degree band with the geod_polygonarea hemisphere.
func TestGlobalGridSum(t *testing.T) {
	var total, north float64
	for lat := -90; lat < 90; lat++ {
		var band float64
		for lon := -180; lon < 180; lon++ {
			band += CellArea(float64(lat), float64(lat+1), 1)
		}
		total += band
		if lat >= 0 {
			north += band
		}
	}
	if relDiff(total, SurfaceArea()) > 1e-9 {
		t.Errorf("grid sum %v, surface area %v", total, SurfaceArea())
	}
	hemi, _ := PolygonArea([]float64{0, 0, 0, 0}, []float64{0, 90, 180, -90}) // Karney 2013 via PROJ
	if relDiff(north, hemi) > 1e-9 {
		t.Errorf("northern grid sum %v, geod_polygonarea hemisphere %v", north, hemi)
	}
}

// TestAuthalicRadius: WGS84 authalic radius R_q = 6 371 007.1809 m (FROM
// MEMORY, NIMA TR8350.2 table 3.5 "radius of sphere of equal area"); 1 mm.
func TestAuthalicRadius(t *testing.T) {
	if r := AuthalicRadius(); math.Abs(r-6371007.1809) > 1e-3 {
		t.Errorf("AuthalicRadius = %.4f, want 6371007.1809", r)
	}
}

// TestCellAreaVsAuthalic compares CellArea with the independent spherical
// form area = R_q^2 dlon_rad (sin beta2 - sin beta1) on the authalic sphere,
// to 1e-12 relative (task brief). sin beta2 - sin beta1 is taken as
// 2 cos((b1+b2)/2) sin((b2-b1)/2); rounding of beta (~1e-16 rad) limits this
// check to cells at least ~0.05 deg tall, so smaller cells are covered by
// TestCellAreaAdditive instead.
func TestCellAreaVsAuthalic(t *testing.T) {
	rq := AuthalicRadius()
	heights := []struct {
		name string
		h    float64
	}{{"h180", 180}, {"h30", 30}, {"h10", 10}, {"h1", 1}, {"h0.25", 0.25}, {"h0.1", 0.1}}
	for _, hc := range heights {
		t.Run(hc.name, func(t *testing.T) {
			for lat := -90.0; lat+hc.h <= 90; lat += math.Max(hc.h, 3.7) {
				for _, dlon := range []float64{0.5, 1, 7, 360} {
					got := CellArea(lat, lat+hc.h, dlon)
					b1 := AuthalicLatitude(lat) * math.Pi / 180
					b2 := AuthalicLatitude(lat+hc.h) * math.Pi / 180
					want := rq * rq * dlon * math.Pi / 180 * 2 * math.Cos((b1+b2)/2) * math.Sin((b2-b1)/2)
					if relDiff(got, want) > 1e-12 {
						t.Errorf("lat %v..%v dlon %v: %v, authalic %v (rel %.2g)", lat, lat+hc.h, dlon, got, want, relDiff(got, want))
					}
				}
			}
		})
	}
}

// TestCellAreaVsBriefFormula compares CellArea with the textbook closed form
// written out literally (S(lat2) - S(lat1), natural log), for cells tall
// enough that the subtraction loses < 3 digits; 1e-12 relative.
func TestCellAreaVsBriefFormula(t *testing.T) {
	b := SemiMajor * (1 - Flattening)
	e := math.Sqrt(Flattening * (2 - Flattening))
	S := func(lat float64) float64 {
		x := math.Sin(lat * math.Pi / 180)
		return b * b / 2 * (x/(1-e*e*x*x) + 1/(2*e)*math.Log((1+e*x)/(1-e*x)))
	}
	tests := []struct {
		name             string
		lat1, lat2, dlon float64
	}{
		{"equator_to_pole", 0, 90, 1},
		{"pole_to_pole", -90, 90, 360},
		{"tropics", -23.44, 23.44, 10},
		{"mid_north", 40, 50, 5},
		{"high_south", -80, -70, 2},
		{"polar_cap", 85, 90, 1},
		{"one_degree_60N", 60, 61, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			want := tc.dlon * math.Pi / 180 * (S(tc.lat2) - S(tc.lat1))
			if got := CellArea(tc.lat1, tc.lat2, tc.dlon); relDiff(got, want) > 1e-12 {
				t.Errorf("CellArea = %v, closed form %v", got, want)
			}
		})
	}
}

// TestCellAreaAdditive checks that small cells keep full precision: a 1-deg
// cell split into n equal-height strips sums to the whole to 1e-12 relative,
// down to strips of 1e-5 deg (about 1 m), where subtracting values of S would
// lose 5 digits.
func TestCellAreaAdditive(t *testing.T) {
	tests := []struct {
		name string
		lat  float64
		n    int
	}{
		{"equator_1arcmin", 0, 60},
		{"45N_30arcsec", 45, 120},
		{"60S_1e-3deg", -60, 1000},
		{"89N_1e-5deg", 89, 100000},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			whole := CellArea(tc.lat, tc.lat+1, 1)
			var sum float64
			for i := range tc.n {
				lo := tc.lat + float64(i)/float64(tc.n)
				hi := tc.lat + float64(i+1)/float64(tc.n)
				sum += CellArea(lo, hi, 1)
			}
			if relDiff(sum, whole) > 1e-12 {
				t.Errorf("sum of %d strips %v, whole %v (rel %.2g)", tc.n, sum, whole, relDiff(sum, whole))
			}
		})
	}
}

// TestCellAreaVsPolygon: a cell's edges along parallels are not geodesics, so
// CellArea and PolygonArea of the four corners differ, and the difference must
// shrink for small cells. On a sphere (derived here, not from a source) the
// geodesic between two corners at latitude phi, w radians apart, bulges
// poleward by ((w/2)^2 - lambda^2)/2 sin(phi) cos(phi), enclosing an extra
// w^3 sin(phi) cos^2(phi) / 12 beside each parallel; the bulges of the two
// parallels of a w x w cell centred at phi nearly cancel, leaving
//
//	(polygon - cell)/cell ~ w^2 (1 - 3 sin^2 phi) / 12
//
// The test checks (i) the relative difference shrinks by 3.5-4.5 (i.e. as w^2)
// at every halving from 8 deg down to 1/16 deg, and (ii) for w <= 1 deg it
// matches the leading-order law within 5% (the ellipsoid adds O(e^2) ~ 1%).
// Latitudes avoid the zero of 1 - 3 sin^2 phi (35.26 deg).
func TestCellAreaVsPolygon(t *testing.T) {
	for _, lat := range []float64{-70, -30, 10, 45, 80} {
		prev := math.NaN()
		for w := 8.0; w >= 1.0/16; w /= 2 {
			lo, hi := lat-w/2, lat+w/2
			c := CellArea(lo, hi, w)
			p, _ := PolygonArea([]float64{lo, lo, hi, hi}, []float64{0, w, w, 0})
			r := (p - c) / c
			if !math.IsNaN(prev) {
				if q := prev / r; q < 3.5 || q > 4.5 {
					t.Errorf("lat %v w %v: relative difference %.3g fell by %.3f, want ~4", lat, w, r, q)
				}
			}
			prev = r
			if w <= 1 && w >= 0.25 {
				wr, sp := w*math.Pi/180, math.Sin(lat*math.Pi/180)
				law := wr * wr * (1 - 3*sp*sp) / 12
				if math.Abs(r-law) > 0.05*math.Abs(law) {
					t.Errorf("lat %v w %v: relative difference %.4g, spherical law %.4g", lat, w, r, law)
				}
			}
		}
	}
}

// TestAuthalicLatitudeSeries inverts AuthalicLatitude with Snyder's series
// (Snyder 1987, USGS PP 1395, eq. 3-18; coefficients FROM MEMORY):
//
//	phi = beta + (e^2/3 + 31e^4/180 + 517e^6/5040) sin 2beta
//	           + (23e^4/360 + 251e^6/3780) sin 4beta + (761e^6/45360) sin 6beta
//
// truncated at e^6, i.e. accurate to ~e^8 ~ 2e-9 rad; tolerance 1e-9 rad.
func TestAuthalicLatitudeSeries(t *testing.T) {
	e2 := EccentricitySq
	e4, e6 := e2*e2, e2*e2*e2
	for lat := -90.0; lat <= 90; lat += 2.5 {
		beta := AuthalicLatitude(lat) * math.Pi / 180
		phi := beta + (e2/3+31*e4/180+517*e6/5040)*math.Sin(2*beta) +
			(23*e4/360+251*e6/3780)*math.Sin(4*beta) + 761*e6/45360*math.Sin(6*beta)
		if d := math.Abs(phi - lat*math.Pi/180); d > 1e-9 {
			t.Errorf("lat %v: series gives %.12f rad, want %.12f", lat, phi, lat*math.Pi/180)
		}
	}
}

// TestCellAreaEdgeCases covers signs, the poles and invalid latitudes.
func TestCellAreaEdgeCases(t *testing.T) {
	tests := []struct {
		name             string
		lat1, lat2, dlon float64
		want             float64 // NaN means NaN expected
	}{
		{"reversed_lat_negative", 10, 0, 1, -CellArea(0, 10, 1)},
		{"negative_dlon", 0, 10, -1, -CellArea(0, 10, 1)},
		{"zero_height", 20, 20, 1, 0},
		{"symmetric_hemispheres", -10, 0, 1, CellArea(0, 10, 1)},
		{"pole_beta", 90, 90, 1, 0},
		{"lat_above_90", 0, 90.1, 1, math.NaN()},
		{"nan_lat", math.NaN(), 10, 1, math.NaN()},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := CellArea(tc.lat1, tc.lat2, tc.dlon)
			if math.IsNaN(tc.want) {
				if !math.IsNaN(got) {
					t.Errorf("CellArea = %v, want NaN", got)
				}
				return
			}
			if math.Abs(got-tc.want) > 1e-12*math.Abs(tc.want) {
				t.Errorf("CellArea = %v, want %v", got, tc.want)
			}
		})
	}
	if b := AuthalicLatitude(90); b != 90 {
		t.Errorf("AuthalicLatitude(90) = %v, want 90", b)
	}
	if b := AuthalicLatitude(-90); b != -90 {
		t.Errorf("AuthalicLatitude(-90) = %v, want -90", b)
	}
	if b := AuthalicLatitude(0); b != 0 {
		t.Errorf("AuthalicLatitude(0) = %v, want 0", b)
	}
	if b := AuthalicLatitude(100); !math.IsNaN(b) {
		t.Errorf("AuthalicLatitude(100) = %v, want NaN", b)
	}
}

func BenchmarkCellArea(b *testing.B) {
	b.ReportAllocs()
	var sink float64
	for i := 0; b.Loop(); i++ {
		lat := float64(i%170) - 85
		sink += CellArea(lat, lat+1.0/120, 1.0/120)
	}
	_ = sink
}
