package pass

import (
	"math"
	"math/rand/v2"
	"testing"

	"areasweep/extent"
	"areasweep/extent/geodesy"
	"areasweep/metrics"
)

func TestDiagShare(t *testing.T) {
	for _, side := range []int{6365} {
		w, h := side, side*2/3
		g, _ := extent.NewGrid(w, h, [6]float64{-20, 60.0 / float64(w), 0, 70, 0, -40.0 / float64(h)}, "EPSG:4326")
		r := rand.New(rand.NewPCG(7, 8))
		var plats, plons []float64
		for len(plats) < 1000 {
			lon, lat := -20+60*r.Float64(), 30+40*r.Float64()
			d2 := ((lon-10)*(lon-10) + (lat-50)*(lat-50)) / 128
			if s := math.Exp(-d2); r.Float64() > s*s {
				continue
			}
			plats, plons = append(plats, lat), append(plons, lon)
		}
		ix, _ := geodesy.NewIndex(plats[:500], plons[:500])
		f := DistanceNull(g, ix)
		v := NewVirtual(g, f)
		var cells []int
		for i := range plats {
			c, row, _ := g.CellOf(plons[i], plats[i])
			cells = append(cells, row*w+c)
		}
		vals, _, _ := v.Sample(g, cells)
		far := f.FarthestBound(w, h, 64)
		layout, _ := metrics.NewLayout(vals, -far, 0, 4096)
		lo, hi := make([]float64, 240*240), make([]float64, 240*240)
		ex := 0
		for y0 := 0; y0 < h; y0 += 240 {
			for x0 := 0; x0 < w; x0 += 240 {
				bw, bh := min(240, w-x0), min(240, h-y0)
				f.Bracket(x0, y0, bw, bh, nil, layout, lo, hi)
				for i := range bw * bh {
					if lo[i] == hi[i] {
						ex++
					}
				}
			}
		}
		t.Logf("side %d far %.0f: exact share %.4f", side, far, float64(ex)/float64(w*h))
	}
}
