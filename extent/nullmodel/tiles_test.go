package nullmodel

// walkTiles calls fill on every tile of bw x bh cells of a gw x gh grid (the
// last ones cut at the edge), in row-major order, with the tile's part of
// need (nil when need is nil: no mask) and one tile buffer per whole-grid
// output, then copies the buffers into outs: a field computed block by
// block, as a pass asks for it.
func walkTiles(gw, gh, bw, bh int, need []uint64, outs [][]float64, fill func(x0, y0, w, h int, need []uint64, bufs [][]float64)) {
	bufs := make([][]float64, len(outs))
	for k := range bufs {
		bufs[k] = make([]float64, bw*bh)
	}
	nb := make([]uint64, bw*bh)
	for y0 := 0; y0 < gh; y0 += bh {
		for x0 := 0; x0 < gw; x0 += bw {
			w, h := min(bw, gw-x0), min(bh, gh-y0)
			var nd []uint64
			if need != nil {
				nd = nb[:w*h]
				for y := range h {
					copy(nd[y*w:(y+1)*w], need[(y0+y)*gw+x0:])
				}
			}
			fill(x0, y0, w, h, nd, bufs)
			for k, out := range outs {
				for y := range h {
					copy(out[(y0+y)*gw+x0:(y0+y)*gw+x0+w], bufs[k][y*w:(y+1)*w])
				}
			}
		}
	}
}
