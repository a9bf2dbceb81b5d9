package extent

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/paulmach/orb"
)

// TestUnitBoxNeverHidesAPoint: the envelope test that spares Contains'
// walk of every edge in trainCounts (a layer of 2,000 units of 500
// vertices and 17,000 training points took over 300 s without it, 3 s
// with it) never turns away a point Contains would count: random closed
// rings (star-shaped, 3 to 60 vertices, some with a hole, some with
// vertices on cell edges) and random points, a third of them on a
// vertex, a third near the envelope's edges; and on a ring left open it
// is not used.
func TestUnitBoxNeverHidesAPoint(t *testing.T) {
	g, err := NewGrid(200, 100, [6]float64{10, 0.05, 0, 50, 0, -0.05}, "EPSG:4326")
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	rng := rand.New(rand.NewPCG(3, 4))
	ring := func(cx, cy, r float64, n int, snap bool) orb.Ring {
		var out orb.Ring
		for i := range n {
			a := 2 * math.Pi * float64(i) / float64(n)
			rr := r * (0.3 + 0.7*rng.Float64())
			x, y := cx+rr*math.Cos(a), cy+rr*math.Sin(a)
			if snap {
				x, y = math.Round(x/0.05)*0.05, math.Round(y/0.05)*0.05
			}
			out = append(out, orb.Point{x, y})
		}
		return append(out, out[0])
	}
	inside, hidden := 0, 0
	for q := range 300 {
		cx, cy, r := 10+10*rng.Float64(), 45+5*rng.Float64(), 0.05+2*rng.Float64()
		p := orb.Polygon{ring(cx, cy, r, 3+rng.IntN(58), q%3 == 0)}
		if q%4 == 0 {
			p = append(p, ring(cx, cy, r/4, 5, false))
		}
		mp := orb.MultiPolygon{p}
		box, ok := containsBox(mp)
		if !ok {
			t.Fatal("a closed ring called open")
		}
		for k := range 400 {
			var x, y float64
			switch k % 3 {
			case 0: // on a vertex
				v := p[0][rng.IntN(len(p[0]))]
				x, y = v[0], v[1]
			case 1: // near the envelope's edges
				x = box.Min[0] + (box.Max[0]-box.Min[0])*float64(rng.IntN(2)) + 0.1*(rng.Float64()-0.5)
				y = box.Min[1] + (box.Max[1]-box.Min[1])*rng.Float64()
			default:
				x, y = cx-3*r+6*r*rng.Float64(), cy-3*r+6*r*rng.Float64()
			}
			in := Contains(g, mp, x, y)
			if in {
				inside++
			}
			if in && !boxHolds(box, g, x, y) {
				hidden++
				t.Errorf("(%v, %v) is inside the unit but outside its box %+v", x, y, box)
			}
		}
	}
	if inside < 10000 || hidden > 0 {
		t.Errorf("%d points inside, %d hidden by the box", inside, hidden)
	}
	open := orb.MultiPolygon{{orb.Ring{{10, 45}, {11, 45}, {11, 46}}}}
	if _, ok := containsBox(open); ok {
		t.Error("an open ring's box was used")
	}
}
