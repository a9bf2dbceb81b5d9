package pass

// HasData reports whether the band holds a valid model value (not no
// data, NaN or infinite, after scale and offset), reading its blocks at
// full resolution in order and stopping at the first block that holds one.
// A band of more than maxCells cells is read only up to its first
// maxCells cells' blocks: when none of them holds a value, known is false
// (the rest is not read). No pass needs it; it serves only to explain a
// run that cannot start, which should not read a whole continent of no
// data to word its message.
func (r *Raster) HasData(maxCells int) (any, known bool, err error) {
	var buf []float64
	read := 0
	src := r.sharedSource()
	defer r.holdCache(1)()
	for b := range r.readBlocks() {
		if read >= maxCells {
			return false, false, nil
		}
		n := b.w * b.h
		read += n
		if cap(buf) < n {
			buf = make([]float64, n)
		}
		buf = buf[:n]
		if err := src.ReadBlock(b.x0, b.y0, b.w, b.h, buf); err != nil {
			return false, false, err
		}
		if err := r.decode(buf); err != nil {
			return false, false, err
		}
		for _, v := range buf {
			if r.valid(v) {
				return true, true, nil
			}
		}
	}
	return false, true, nil
}
