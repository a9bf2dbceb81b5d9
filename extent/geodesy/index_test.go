package geodesy

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// randomPoints draws n points with a fixed seed from a mix that stresses the
// index: uniform on the sphere, within 0.5 deg of the antimeridian, within 2
// deg of a pole, tight clusters, exact duplicates of earlier points and
// longitudes written in (180, 360].
func randomPoints(seed uint64, n int) (lats, lons []float64) {
	r := rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))
	lats, lons = make([]float64, n), make([]float64, n)
	for i := range n {
		var lat, lon float64
		switch k := r.IntN(20); {
		case k < 8: // uniform on the sphere
			lat = math.Asin(2*r.Float64()-1) * 180 / math.Pi
			lon = 360*r.Float64() - 180
		case k < 12: // antimeridian strip
			lat = 160*r.Float64() - 80
			lon = 179.5 + r.Float64()*0.5
			if r.IntN(2) == 0 {
				lon = -lon
			}
		case k < 16: // polar caps
			lat = 88 + 2*r.Float64()
			if r.IntN(2) == 0 {
				lat = -lat
			}
			lon = 360*r.Float64() - 180
		case k < 18 && i > 0: // tight cluster around an earlier point
			j := r.IntN(i)
			lat = math.Max(-90, math.Min(90, lats[j]+0.01*(r.Float64()-0.5)))
			lon = lons[j] + 0.01*(r.Float64()-0.5)
		case k < 19 && i > 0: // exact duplicate
			j := r.IntN(i)
			lat, lon = lats[j], lons[j]
		default: // longitude in (180, 360]
			lat = 180*r.Float64() - 90
			lon = 180 + 180*r.Float64()
		}
		lats[i], lons[i] = lat, lon
	}
	return lats, lons
}

// bruteNearest is the reference: the minimum of Distance over all sites,
// first index on ties.
func bruteNearest(lats, lons []float64, lat, lon float64) (int, float64) {
	best, bd := -1, math.Inf(1)
	for i := range lats {
		if d := Distance(lat, lon, lats[i], lons[i]); d < bd {
			best, bd = i, d
		}
	}
	return best, bd
}

// TestNearestVsBruteForce compares Index.Nearest with brute force (the
// minimum of Distance over all sites) on 1500 random sites and 700 random
// queries (fixed seed) including the antimeridian, the poles, clusters,
// duplicates and query points equal to sites. It requires the same index or,
// on ties, the same distance; and for maxDist below, at, and above the true
// distance the documented behaviour.
func TestNearestVsBruteForce(t *testing.T) {
	slat, slon := randomPoints(1, 1500)
	qlat, qlon := randomPoints(2, 600)
	for i := 0; i < 100; i++ { // queries exactly at sites, some with lon shifted by 360
		qlat = append(qlat, slat[i*7])
		qlon = append(qlon, slon[i*7]-360*float64(i%2))
	}
	ix, err := NewIndex(slat, slon)
	if err != nil {
		t.Fatal(err)
	}
	if ix.Len() != len(slat) {
		t.Fatalf("Len = %d, want %d", ix.Len(), len(slat))
	}
	for q := range qlat {
		wi, wd := bruteNearest(slat, slon, qlat[q], qlon[q])
		gi, gd := ix.Nearest(qlat[q], qlon[q], 0)
		if gi != wi && gd != wd {
			t.Errorf("query %d (%v, %v): Nearest = (%d, %.6f), brute force (%d, %.6f)", q, qlat[q], qlon[q], gi, gd, wi, wd)
			continue
		}
		if gi < 0 || gd != Distance(qlat[q], qlon[q], slat[gi], slon[gi]) {
			t.Errorf("query %d: distance %v is not Distance to site %d", q, gd, gi)
		}
		for _, md := range []float64{wd * 0.999, wd, wd * 1.001, 1000, 1e5, 1e6, math.Inf(1)} {
			mi, mdist := ix.Nearest(qlat[q], qlon[q], md)
			if wd <= md || md <= 0 {
				if mi != wi && mdist != wd {
					t.Errorf("query %d maxDist %v: (%d, %v), want (%d, %v)", q, md, mi, mdist, wi, wd)
				}
			} else if mi != -1 || !math.IsInf(mdist, 1) {
				t.Errorf("query %d maxDist %v (true %v): (%d, %v), want (-1, +Inf)", q, md, wd, mi, mdist)
			}
		}
	}
}

// TestNearestEllipsoidBeatsChord builds cases where the chord between the
// index's unit vectors and the WGS84 geodesic disagree on the nearest site.
// The rectifying-latitude vectors are exact along meridians but shrink
// east-west lines on the equator by R_r/a: one degree of latitude from the
// equator is 110 574 m, while 0.9934 deg of longitude on the equator is
// 110 584 m yet has the smaller chord. The exact stage must pick the north
// site.
func TestNearestEllipsoidBeatsChord(t *testing.T) {
	tests := []struct {
		name       string
		lats, lons []float64
		qlat, qlon float64
		want       int
	}{
		{"equator_north_vs_east", []float64{0, 1}, []float64{0.9934, 0}, 0, 0, 1},
		{"equator_east_vs_north", []float64{1, 0}, []float64{0, -0.9934}, 0, 0, 0},
		{"across_antimeridian", []float64{0, -1}, []float64{-179.0066, 180}, 0, 180, 1},
		{"polar_cap", []float64{89.9, 89.0}, []float64{0, 0}, 89.0, 180, 0},
		{"duplicate_tie_first_index", []float64{10, 10, 10}, []float64{20, 20, 20}, 11, 21, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			ix, err := NewIndex(tc.lats, tc.lons)
			if err != nil {
				t.Fatal(err)
			}
			wi, wd := bruteNearest(tc.lats, tc.lons, tc.qlat, tc.qlon)
			if wi != tc.want {
				t.Fatalf("test premise broken: brute force picks %d", wi)
			}
			gi, gd := ix.Nearest(tc.qlat, tc.qlon, 0)
			if gi != tc.want || gd != wd {
				t.Errorf("Nearest = (%d, %v), want (%d, %v)", gi, gd, tc.want, wd)
			}
		})
	}
}

// TestNewIndexErrors checks the rejected inputs.
func TestNewIndexErrors(t *testing.T) {
	tests := []struct {
		name       string
		lats, lons []float64
	}{
		{"empty", nil, nil},
		{"length_mismatch", []float64{1, 2}, []float64{1}},
		{"lat_above_90", []float64{0, 90.5}, []float64{0, 0}},
		{"lat_nan", []float64{math.NaN()}, []float64{0}},
		{"lon_above_360", []float64{0}, []float64{361}},
		{"lon_inf", []float64{0}, []float64{math.Inf(-1)}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if ix, err := NewIndex(tc.lats, tc.lons); err == nil {
				t.Errorf("NewIndex = %v, want error", ix)
			} else if msg := err.Error(); len(msg) < 9 || msg[:9] != "geodesy: " {
				t.Errorf("error %q lacks package prefix", msg)
			}
		})
	}
}

// TestNearestInvalidQuery: out-of-range queries give (-1, NaN).
func TestNearestInvalidQuery(t *testing.T) {
	ix, err := NewIndex([]float64{0}, []float64{0})
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range [][2]float64{{91, 0}, {math.NaN(), 0}, {0, math.Inf(1)}, {0, math.NaN()}} {
		if i, d := ix.Nearest(q[0], q[1], 0); i != -1 || !math.IsNaN(d) {
			t.Errorf("Nearest(%v, %v) = (%d, %v), want (-1, NaN)", q[0], q[1], i, d)
		}
	}
}

// TestNearestConcurrent runs Nearest from four goroutines and compares with
// serial answers.
func TestNearestConcurrent(t *testing.T) {
	slat, slon := randomPoints(3, 3000)
	qlat, qlon := randomPoints(4, 2000)
	ix, err := NewIndex(slat, slon)
	if err != nil {
		t.Fatal(err)
	}
	want := make([]int, len(qlat))
	for q := range qlat {
		want[q], _ = ix.Nearest(qlat[q], qlon[q], 0)
	}
	errs := make(chan error, 4)
	for w := range 4 {
		go func() {
			for q := range qlat {
				if got, _ := ix.Nearest(qlat[q], qlon[q], float64(w)*1e5); w == 0 && got != want[q] {
					errs <- fmt.Errorf("goroutine %d query %d: %d, serial %d", w, q, got, want[q])
					return
				}
			}
			errs <- nil
		}()
	}
	for range 4 {
		if err := <-errs; err != nil {
			t.Error(err)
		}
	}
}

// TestNearestNoAlloc: queries must not allocate.
func TestNearestNoAlloc(t *testing.T) {
	slat, slon := randomPoints(5, 2000)
	ix, err := NewIndex(slat, slon)
	if err != nil {
		t.Fatal(err)
	}
	if a := testing.AllocsPerRun(200, func() { ix.Nearest(12.3, 45.6, 0); ix.Nearest(-80, 170, 5e4) }); a != 0 {
		t.Errorf("Nearest allocates %v times per call pair", a)
	}
}

// benchSites returns n sites inside a 20 x 40 degree box (an occurrence
// range), near queries inside the box and far queries at least ~10 deg away.
func benchSites(n int) (slat, slon, nearLat, nearLon, farLat, farLon []float64) {
	r := rand.New(rand.NewPCG(uint64(n), 7))
	slat, slon = make([]float64, n), make([]float64, n)
	for i := range n {
		slat[i], slon[i] = 30+20*r.Float64(), -10+40*r.Float64()
	}
	const nq = 4096
	nearLat, nearLon = make([]float64, nq), make([]float64, nq)
	farLat, farLon = make([]float64, nq), make([]float64, nq)
	for i := range nq {
		nearLat[i], nearLon[i] = 30+20*r.Float64(), -10+40*r.Float64()
		farLat[i], farLon[i] = -60+70*r.Float64(), 60+100*r.Float64()
	}
	return
}

func BenchmarkNearest(b *testing.B) {
	for _, n := range []int{10000, 100000} {
		slat, slon, nlat, nlon, flat, flon := benchSites(n)
		ix, err := NewIndex(slat, slon)
		if err != nil {
			b.Fatal(err)
		}
		for _, c := range []struct {
			name     string
			lat, lon []float64
			maxDist  float64
		}{
			{"near/nolimit", nlat, nlon, 0},
			{"near/max50km", nlat, nlon, 5e4},
			{"far/nolimit", flat, flon, 0},
			{"far/max50km", flat, flon, 5e4},
		} {
			b.Run(fmt.Sprintf("sites=%d/%s", n, c.name), func(b *testing.B) {
				b.ReportAllocs()
				for i := 0; b.Loop(); i++ {
					k := i & (len(c.lat) - 1)
					ix.Nearest(c.lat[k], c.lon[k], c.maxDist)
				}
			})
		}
	}
}

func BenchmarkNewIndex100000(b *testing.B) {
	slat, slon, _, _, _, _ := benchSites(100000)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := NewIndex(slat, slon); err != nil {
			b.Fatal(err)
		}
	}
}

// TestIndexLowerBounds checks the two lower bounds the Index relies on
// against Inverse on 40 000 random pairs (fixed seed; uniform, nearly
// antipodal, short, and nearly antipodal along the equator): (1) s >= R_r
// sigma with sigma the angle between rectifying unit vectors, and (2) s >=
// ECEF chord. It also checks that bound (1) is within the factor R_r/a of s
// claimed in the Index documentation. The allowance 1e-13 s + 20 nm covers
// PROJ's ~15 nm error and the rounding of ECEF coordinates (~1 nm); the Index
// itself adds 1e-6 m.
func TestIndexLowerBounds(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	worst := 0.0
	for i := range 40000 {
		lat1, lon1 := math.Asin(2*r.Float64()-1)*180/math.Pi, 360*r.Float64()-180
		var lat2, lon2 float64
		switch i % 5 {
		case 0:
			lat2, lon2 = math.Asin(2*r.Float64()-1)*180/math.Pi, 360*r.Float64()-180
		case 1:
			lat2, lon2 = math.Max(-90, math.Min(90, -lat1+r.Float64()-0.5)), lon1+180+2*(r.Float64()-0.5)
		case 2:
			lat2, lon2 = math.Max(-90, math.Min(90, lat1+0.1*(r.Float64()-0.5))), lon1+0.1*(r.Float64()-0.5)
		case 3:
			lat1, lat2, lon2 = 2*(r.Float64()-0.5), 2*(r.Float64()-0.5), lon1+175+5*r.Float64()
		case 4: // short east-west lines, where bound (1) is loosest
			lat2, lon2 = lat1, lon1+r.Float64()
		}
		s := Distance(lat1, lon1, lat2, lon2)
		v1, p1 := siteVectors(lat1, lon1)
		v2, p2 := siteVectors(lat2, lon2)
		sigma := 2 * math.Asin(math.Min(1, math.Sqrt(d2(&v1, &v2))/2))
		if b1 := rectBound * sigma; b1 > s*(1+1e-13)+2e-8 {
			t.Fatalf("bound (1) violated: (%v,%v)-(%v,%v): s %v < R sigma %v", lat1, lon1, lat2, lon2, s, b1)
		} else if s > 0 {
			worst = math.Max(worst, 1-b1/s)
		}
		if d := math.Sqrt(d2(&p1, &p2)); d > s*(1+1e-13)+2e-8 {
			t.Fatalf("bound (2) violated: (%v,%v)-(%v,%v): s %v < chord %v", lat1, lon1, lat2, lon2, s, d)
		}
	}
	if lim := 1 - rectRadius/SemiMajor; worst > lim*(1+1e-6) {
		t.Errorf("bound (1) looseness %v exceeds 1 - R_r/a = %v", worst, lim)
	}
	t.Logf("largest relative looseness of bound (1): %.6g (1 - R_r/a = %.6g)", worst, 1-rectRadius/SemiMajor)
}

// TestRectifying checks the rectifying latitude used by the Index: R_r mu
// equals the meridian arc from Inverse (Karney 2013 via PROJ) to 1 micrometre
// at every 0.5 degree, the quarter meridian R_r pi/2 is 10 001 965.729 m (FROM
// MEMORY, as in TestHandbookLengths), and the east-west stretch condition of
// bound (1), R_r cos(mu) <= N cos(phi) = a cos(beta), holds on a 0.001-degree
// grid.
func TestRectifying(t *testing.T) {
	if q := rectRadius * math.Pi / 2; math.Abs(q-10001965.729) > 1e-3 {
		t.Errorf("R_r pi/2 = %.4f, want 10001965.729", q)
	}
	for lat := 0.5; lat <= 90; lat += 0.5 {
		m := Distance(0, 0, lat, 0)
		if got := rectRadius * rectifying(lat*math.Pi/180); math.Abs(got-m) > 1e-6 {
			t.Errorf("lat %v: R_r mu = %.9f, meridian arc %.9f", lat, got, m)
		}
	}
	for k := 0; k <= 90000; k++ {
		phi := float64(k) / 1000 * math.Pi / 180
		beta := math.Atan2((1-Flattening)*math.Sin(phi), math.Cos(phi))
		if rectRadius*math.Cos(rectifying(phi)) > SemiMajor*math.Cos(beta)*(1+1e-15) {
			t.Fatalf("stretch condition fails at %v deg", float64(k)/1000)
		}
	}
}

// TestStretchMax: k = N cos(phi) / (R_r cos(mu)) = a cos(beta) / (R_r
// cos(mu)) stays at or below stretchMax and falls with latitude on a
// 0.001-degree grid (k = a/R_r at the equator; by the formulas in the Index
// comment), and
// NearestBounds brackets the exact nearest distance from Nearest (itself
// checked against brute-force Inverse in this file) for random queries
// near and far from random sites, and reports (maxDist, +Inf) only when
// Nearest finds no site within maxDist.
func TestStretchMax(t *testing.T) {
	prev := math.Inf(1)
	for k := 0; k < 90000; k++ {
		phi := float64(k) / 1000 * math.Pi / 180
		beta := math.Atan2((1-Flattening)*math.Sin(phi), math.Cos(phi))
		kk := SemiMajor * math.Cos(beta) / (rectRadius * math.Cos(rectifying(phi)))
		if kk > stretchMax {
			t.Fatalf("k = %v > %v at %v deg", kk, stretchMax, float64(k)/1000)
		}
		// Rounding near the pole moves k by ~1e-11; NearestBounds allows
		// 1e-9 (our own margin).
		if kk > prev*(1+1e-10) || kk < 1-1e-9 {
			t.Fatalf("k = %v at %v deg: not falling with latitude from %v, or below 1", kk, float64(k)/1000, prev)
		}
		if got := stretchAt(float64(k) / 1000); got != kk {
			t.Fatalf("stretchAt(%v) = %v, want %v", float64(k)/1000, got, kk)
		}
		prev = kk
	}
	rng := rand.New(rand.NewPCG(5, 9))
	ix, _, _ := randomIndex(t, rng, 300, -60, 120, -30, 60)
	for q := 0; q < 3000; q++ {
		lat, lon := -89+178*rng.Float64(), -180+360*rng.Float64()
		maxD := []float64{0, 5e5, 3e6}[q%3]
		_, s := ix.Nearest(lat, lon, maxD)
		lo, hi := ix.NearestBounds(lat, lon, maxD)
		if math.IsInf(hi, 1) {
			if !math.IsInf(s, 1) || lo != maxD {
				t.Fatalf("(%v, %v) maxD %v: bounds (%v, +Inf) but Nearest gives %v", lat, lon, maxD, lo, s)
			}
			continue
		}
		if math.IsInf(s, 1) {
			// No site within maxD: the chord stage may still not exclude
			// all of them, and then the bounds say nothing more.
			continue
		}
		if s < lo || s > hi {
			t.Fatalf("(%v, %v): %v outside [%v, %v]", lat, lon, s, lo, hi)
		}
		if hi-lo > 0.0018*s+1e-3 {
			t.Errorf("(%v, %v): interval %v wide at %v m", lat, lon, hi-lo, s)
		}
	}
}

// TestIndexSlot checks that Slot is the inverse of the tree's order: the
// site at each site's slot is that site, and the slots are a permutation.
func TestIndexSlot(t *testing.T) {
	lats, lons := make([]float64, 1000), make([]float64, 1000)
	for i := range lats {
		lats[i], lons[i] = -60+float64(i*37%1000)*0.12, -170+float64(i*91%1000)*0.34
	}
	ix, err := NewIndex(lats, lons)
	if err != nil {
		t.Fatal(err)
	}
	seen := make([]bool, ix.Len())
	moved := 0
	for i := range ix.Len() {
		s := ix.Slot(i)
		if s < 0 || s >= ix.Len() || seen[s] || int(ix.ids[s]) != i {
			t.Fatalf("site %d: slot %d (seen %v, holds site %d)", i, s, s >= 0 && s < ix.Len() && seen[s], ix.ids[s])
		}
		seen[s] = true
		if s != i {
			moved++
		}
	}
	if moved == 0 {
		t.Fatal("no site moved: the check cannot tell Slot from the identity")
	}
}
