package scenario

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

type golden struct {
	AUC []struct {
		Name                 string
		Pos, PosW, Neg, NegW []float64
		AUC                  float64
	}
	Hull []struct {
		Name   string
		Points [][2]float64
		Hull   [][2]float64
		Area   float64
	}
	Voronoi []struct {
		Name  string
		Box   [4]float64
		Seeds [][2]float64
		Areas []float64
	}
	Geod []struct {
		Name                   string
		Lon1, Lat1, Lon2, Lat2 float64
		Km                     float64
	}
}

func loadGolden(t *testing.T) golden {
	t.Helper()
	b, err := os.ReadFile("testdata/golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g golden
	// The Python keys are snake_case; map the two that differ.
	var raw map[string]json.RawMessage
	if err := json.Unmarshal(b, &raw); err != nil {
		t.Fatal(err)
	}
	var aucs []map[string]json.RawMessage
	if err := json.Unmarshal(raw["auc"], &aucs); err != nil {
		t.Fatal(err)
	}
	for _, a := range aucs {
		a["PosW"], a["NegW"] = a["pos_w"], a["neg_w"]
	}
	fixed, _ := json.Marshal(aucs)
	raw["auc"] = fixed
	b, _ = json.Marshal(raw)
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	if len(g.AUC) == 0 || len(g.Hull) == 0 || len(g.Voronoi) == 0 || len(g.Geod) == 0 {
		t.Fatal("golden.json incomplete")
	}
	return g
}

func toPts(a [][2]float64) []pt {
	p := make([]pt, len(a))
	for i, v := range a {
		p[i] = pt{v[0], v[1]}
	}
	return p
}

func TestConvexHullGolden(t *testing.T) {
	for _, c := range loadGolden(t).Hull {
		t.Run(c.Name, func(t *testing.T) {
			h := convexHull(toPts(c.Points))
			want := toPts(c.Hull) // scipy ConvexHull, counter-clockwise
			if len(h) != len(want) {
				t.Fatalf("%d hull vertices, scipy %d", len(h), len(want))
			}
			start := -1
			for i, p := range h {
				if p == want[0] {
					start = i
				}
			}
			if start < 0 {
				t.Fatalf("scipy vertex %v not in hull", want[0])
			}
			for k := range want {
				if h[(start+k)%len(h)] != want[k] {
					t.Fatalf("vertex %d: %v, scipy %v", k, h[(start+k)%len(h)], want[k])
				}
			}
			if a := polygonArea(h); math.Abs(a-c.Area) > 1e-9*c.Area { // scipy ConvexHull.volume
				t.Errorf("area %v, scipy %v", a, c.Area)
			}
		})
	}
}

func TestVoronoiGolden(t *testing.T) {
	for _, c := range loadGolden(t).Voronoi {
		t.Run(c.Name, func(t *testing.T) {
			b := c.Box
			cells := voronoiCells(toPts(c.Seeds), b[0], b[1], b[2], b[3])
			total := 0.0
			for i, cell := range cells {
				a := polygonArea(cell)
				if math.Abs(a-c.Areas[i]) > 1e-9*(b[2]-b[0])*(b[3]-b[1]) { // scipy Voronoi with mirrored seeds
					t.Errorf("cell %d area %v, scipy %v", i, a, c.Areas[i])
				}
				total += a
			}
			if box := (b[2] - b[0]) * (b[3] - b[1]); math.Abs(total-box) > 1e-9*box {
				t.Errorf("cells cover %v, box %v", total, box)
			}
		})
	}
}

func TestHaversineGolden(t *testing.T) {
	for _, c := range loadGolden(t).Geod {
		t.Run(c.Name, func(t *testing.T) {
			got := haversineKm(c.Lon1, c.Lat1, c.Lon2, c.Lat2)
			if math.Abs(got-c.Km) > 1e-5 { // proj geod -I on a 6371008.8 m sphere, reported to 1 mm
				t.Errorf("%v km, geod %v km", got, c.Km)
			}
		})
	}
}

func TestClipHalfPlane(t *testing.T) {
	sq := []pt{{0, 0}, {2, 0}, {2, 2}, {0, 2}}
	for _, c := range []struct {
		name    string
		a, b, k float64
		area    float64 // exact by hand
		n       int
	}{
		{"keep_all", 1, 0, 5, 4, 4},
		{"drop_all", 1, 0, -1, 0, 0},
		{"half_vertical", 1, 0, 1, 2, 4},
		{"corner_triangle", 1, 1, 1, 0.5, 3},
		{"cut_off_corner", -1, -1, -3, 0.5, 3},
		{"through_vertices", 1, 1, 2, 2, 3},
	} {
		t.Run(c.name, func(t *testing.T) {
			p := clipHalfPlane(sq, c.a, c.b, c.k)
			if len(p) != c.n || math.Abs(math.Abs(polygonArea(p))-c.area) > 1e-12 {
				t.Errorf("%d vertices area %v, want %d and %v: %v", len(p), polygonArea(p), c.n, c.area, p)
			}
		})
	}
}

func TestInRing(t *testing.T) {
	// An L-shaped (non-convex) ring.
	l := []pt{{0, 0}, {3, 0}, {3, 1}, {1, 1}, {1, 3}, {0, 3}}
	for _, c := range []struct {
		name string
		q    pt
		want bool
	}{
		{"inside_foot", pt{2, 0.5}, true},
		{"inside_leg", pt{0.5, 2}, true},
		{"in_the_notch", pt{2, 2}, false},
		{"left_outside", pt{-1, 1}, false},
		{"above", pt{0.5, 4}, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			if got := inRing(l, c.q); got != c.want {
				t.Errorf("inRing(%v) = %v, want %v", c.q, got, c.want)
			}
		})
	}
}

func TestGrowHull(t *testing.T) {
	ps := []pt{{-130, -40}, {-128, -40}, {-129, -38}}
	g := growHull(ps, 150)
	for _, p := range ps {
		for _, q := range g {
			if d := haversineKm(p.x, p.y, q.x, q.y); d < 150*0.99 {
				t.Errorf("vertex %v only %.1f km from point %v, want >= 150", q, d, p)
			}
		}
	}
	// Every vertex lies on a 150 km circle of some hull vertex (to the local
	// flat-earth approximation, 1%).
	for _, q := range g {
		best := math.Inf(1)
		for _, p := range ps {
			best = math.Min(best, haversineKm(p.x, p.y, q.x, q.y))
		}
		if best > 150*1.01 {
			t.Errorf("vertex %v is %.1f km from the nearest point, want about 150", q, best)
		}
	}
	if polygonArea(g) <= 0 {
		t.Error("grown hull not counter-clockwise")
	}
}

func TestFBMRange(t *testing.T) {
	f := newFBM(newRand(7, 1), 6)
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := range 20000 {
		v := f.at(float64(i%200)*0.037, float64(i/200)*0.041)
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	if lo < -1 || hi > 1 || hi-lo < 0.5 {
		t.Errorf("fBm range [%v, %v], want inside [-1, 1] and not flat", lo, hi)
	}
	// Continuity across lattice lines: a 1e-9 step moves the value by little.
	for _, x := range []float64{0.999999999, 3.999999999, 63.999999999} {
		if d := math.Abs(f.at(x, 0.5) - f.at(x+2e-9, 0.5)); d > 1e-6 {
			t.Errorf("jump %v at x=%v", d, x)
		}
	}
}

func TestSceneInvariants(t *testing.T) {
	sc := newScene(11)
	strong := 0
	for i, l := range sc.ls.land {
		if l && sc.truth[i] >= 0.5 {
			strong++
		}
	}
	// true niche: "maybe 15-25% of the land" (brief); the code aims at nicheShare = 20%.
	if s := float64(strong) / float64(sc.ls.nLand); s < 0.15 || s > 0.25 {
		t.Errorf("truth >= 0.5 on %.3f of land, want 0.15-0.25", s)
	}
	levels := map[float32]bool{}
	for i, l := range sc.ls.land {
		if l {
			levels[sc.coarse[i]] = true
		}
	}
	if len(levels) > coarseLevels || len(levels) < coarseLevels-2 {
		t.Errorf("coarse model has %d levels, want about %d", len(levels), coarseLevels)
	}
	if i, ok := cellAt(sc.station.x, sc.station.y); !ok || !sc.ls.land[i] {
		t.Errorf("field station %v not on land", sc.station)
	}
	for _, u := range sc.units {
		if len(u.ring) < 3 || polygonArea(u.ring) <= 0 {
			t.Errorf("unit %d degenerate", u.id)
		}
	}
}
