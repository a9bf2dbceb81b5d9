package pass

import (
	"fmt"
	"math"
)

// ExactRange returns the smallest and largest valid model value of the
// band (after no-data, scale and offset), read from every block at full
// resolution. Unlike GDAL's approximate statistics it does not depend on
// how the file is stored (tiled or striped, with or without overviews). ok
// is false when the band has no valid value. It reads the whole raster:
// the scoring pass does not need it (the layout needs no value range), so
// it serves only to explain a run that cannot start.
func (r *Raster) ExactRange() (lo, hi float64, ok bool, err error) {
	lo, hi = math.Inf(1), math.Inf(-1)
	st := r.band.Structure()
	var buf []float64
	for b, more := st.FirstBlock(), true; more; b, more = b.Next() {
		n := b.W * b.H
		if cap(buf) < n {
			buf = make([]float64, n)
		}
		buf = buf[:n]
		if err := r.band.Read(b.X0, b.Y0, buf, b.W, b.H); err != nil {
			return 0, 0, false, fmt.Errorf("pass: read %s block at column %d row %d: %w", r.Path, b.X0, b.Y0, err)
		}
		r.decode(buf)
		for _, v := range buf {
			if r.valid(v) {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
	}
	if lo > hi {
		return 0, 0, false, nil
	}
	return lo, hi, true, nil
}
