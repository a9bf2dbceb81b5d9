package extent

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// greatCirclePoint returns the point a fraction f of the way from a to b
// along the great circle through them (spherical linear interpolation), so
// that points made with it lie on one great circle up to rounding.
func greatCirclePoint(a, b LonLat, f float64) LonLat {
	u, v := unitVector(a.Lon, a.Lat), unitVector(b.Lon, b.Lat)
	w := math.Acos(math.Max(-1, math.Min(1, dot(u, v))))
	s1, s2 := math.Sin((1-f)*w)/math.Sin(w), math.Sin(f*w)/math.Sin(w)
	p := [3]float64{s1*u[0] + s2*v[0], s1*u[1] + s2*v[1], s1*u[2] + s2*v[2]}
	return LonLat{Lon: math.Atan2(p[1], p[0]) * 180 / math.Pi, Lat: math.Asin(p[2]/math.Sqrt(dot(p, p))) * 180 / math.Pi}
}

// TestHullCollinear: training points on one great circle (a meridian, the
// equator, a slanted great circle, rounded to 6 decimals as a CSV holds
// them) have no hull, whatever rounding leaves of their collinearity:
// before, three points on the meridian 12°E gave a hull of zero area (an
// empty member) and buffers of the segment, while the same points on the
// equator gave no hull members at all. A thin but real triangle (its
// middle point 1 km off the line, our choice) still has a hull. Points
// repeated at fewer than three places (as --no-thin keeps them) are told
// so, not called collinear.
func TestHullCollinear(t *testing.T) {
	round6 := func(p LonLat) LonLat {
		return LonLat{Lon: math.Round(p.Lon*1e6) / 1e6, Lat: math.Round(p.Lat*1e6) / 1e6}
	}
	slant := func(a, b LonLat, n int) []LonLat {
		var out []LonLat
		for i := 0; i < n; i++ {
			out = append(out, round6(greatCirclePoint(a, b, float64(i)/float64(n-1))))
		}
		return out
	}
	cases := []struct {
		name      string
		pts       []LonLat
		collinear bool
	}{
		{"meridian 12E", []LonLat{{12, 41}, {12, 42}, {12, 43}}, true},
		{"meridian 12E unsorted", []LonLat{{12, 43}, {12, 41.5}, {12, 42}, {12, 41}}, true},
		{"meridian 170W", []LonLat{{-170, -60}, {-170, -20}, {-170, 10}}, true},
		{"meridian 180", []LonLat{{180, 5}, {180, 6}, {180, 7.5}}, true},
		{"equator", []LonLat{{11, 0}, {12, 0}, {13, 0}}, true},
		{"slanted great circle", slant(LonLat{Lon: 11, Lat: 41}, LonLat{Lon: 15, Lat: 44}, 5), true},
		{"slanted long great circle", slant(LonLat{Lon: -60, Lat: -30}, LonLat{Lon: 10, Lat: 40}, 7), true},
		{"thin triangle 1 km", []LonLat{{12, 41}, {12.0 + 1/(111.32*math.Cos(42*math.Pi/180)), 42}, {12, 43}}, false},
		{"triangle", []LonLat{{12, 41}, {13, 42}, {12, 43}}, false},
		{"three at one place", []LonLat{{12, 41}, {12, 41}, {12, 41}}, true},
		{"five at two places", []LonLat{{12, 41}, {12, 41}, {13, 41}, {12, 41}, {13, 41}}, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			h, err := newSphericalHull(c.pts)
			if !c.collinear {
				if err != nil {
					t.Fatalf("hull refused: %v", err)
				}
				return
			}
			if err == nil {
				t.Fatalf("hull of collinear points built, %d vertices %s", len(h.poly), fmt.Sprint(h.boundary()))
			}
			want := "collinear"
			if strings.Contains(c.name, "place") {
				want = "needs training points at 3 or more places"
			}
			if !strings.Contains(err.Error(), want) {
				t.Fatalf("error %q does not say %q", err, want)
			}
		})
	}
}
