package pass

import (
	"errors"
)

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
	errFound, errTooMany := errors.New("found"), errors.New("too many")
	err = r.eachBlock(func(x0, y0, w, h int) error {
		if read >= maxCells {
			return errTooMany
		}
		n := w * h
		read += n
		if cap(buf) < n {
			buf = make([]float64, n)
		}
		buf = buf[:n]
		if err := src.ReadBlock(x0, y0, w, h, buf); err != nil {
			return err
		}
		r.decode(buf)
		for _, v := range buf {
			if r.valid(v) {
				return errFound
			}
		}
		return nil
	})
	switch err {
	case nil:
		return false, true, nil
	case errFound:
		return true, true, nil
	case errTooMany:
		return false, false, nil
	}
	return false, false, err
}
