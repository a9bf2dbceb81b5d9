package report

import (
	"image"
	"math"

	"golang.org/x/image/draw"
	"golang.org/x/image/math/f64"
)

// gridBiLinear is golang.org/x/image/draw's BiLinear interpolator (gg's
// default, through which vgimg draws images) with a faster path for what
// the map panels do: an opaque RGBA image scaled and translated, without
// rotation or shear, onto an RGBA canvas. BiLinear computes each
// destination pixel's source position and tent weights anew; without
// rotation a column's horizontal weights are the same in every row and a
// row's vertical weights in every column, so they are computed once per
// column and row, with the same float64 operations, and each pixel sums
// the same products in the same order (TestGridBiLinearSame). Anything
// else goes to BiLinear.
type gridBiLinear struct{}

// Scale implements draw.Scaler.
func (gridBiLinear) Scale(dst draw.Image, dr image.Rectangle, src image.Image, sr image.Rectangle, op draw.Op, opts *draw.Options) {
	draw.BiLinear.Scale(dst, dr, src, sr, op, opts)
}

// Transform implements draw.Transformer. The set-up (dr, adr, d2s, bias,
// scales) is Kernel.Transform's, as is the per-pixel arithmetic of
// Kernel.transform_RGBA_RGBA_Src.
func (gridBiLinear) Transform(dstImg draw.Image, s2d f64.Aff3, srcImg image.Image, sr image.Rectangle, op draw.Op, opts *draw.Options) {
	dst, ok1 := dstImg.(*image.RGBA)
	src, ok2 := srcImg.(*image.RGBA)
	if !ok1 || !ok2 || opts != nil || (op != draw.Over && op != draw.Src) || s2d[1] != 0 || s2d[3] != 0 ||
		s2d[0] == 0 || s2d[4] == 0 || !sr.In(src.Bounds()) || sr.Empty() || !src.Opaque() {
		draw.BiLinear.Transform(dstImg, s2d, srcImg, sr, op, opts)
		return
	}
	dr := transformRect(&s2d, &sr)
	adr := dst.Bounds().Intersect(dr)
	if adr.Empty() {
		return
	}
	d2s := invert(&s2d)
	bias := transformRect(&d2s, &adr).Min
	bias.X--
	bias.Y--
	d2s[2] -= float64(bias.X)
	d2s[5] -= float64(bias.Y)
	adr = adr.Sub(dr.Min)
	xscale := max(math.Abs(d2s[0]), math.Abs(d2s[1]))
	yscale := max(math.Abs(d2s[3]), math.Abs(d2s[4]))

	// taps are one axis's source range and normalised weights per
	// destination column (or row); ok is false where the pixel's source
	// position falls outside sr on that axis.
	type taps struct {
		ok     bool
		lo, hi int
		w      []float64
	}
	axis := func(n, first int, pos func(d int) float64, bias, smin, smax int, scale float64) []taps {
		halfWidth, argScale := 1.0, 1.0 // BiLinear's support is 1
		if scale > 1 {
			halfWidth *= scale
			argScale = 1 / scale
		}
		width := 1 + 2*int(math.Ceil(halfWidth))
		out := make([]taps, n)
		ws := make([]float64, n*width)
		for i := range out {
			s := pos(first + i)
			if c := int(s) + bias; c < smin || c >= smax {
				continue
			}
			s += float64(bias)
			s -= 0.5
			lo := max(int(math.Floor(s-halfWidth)), smin)
			hi := min(int(math.Ceil(s+halfWidth)), smax)
			w := ws[i*width : i*width+hi-lo]
			total := 0.0
			for k := lo; k < hi; k++ {
				wk := 0.0
				if t := math.Abs((s - float64(k)) * argScale); t < 1 {
					wk = 1 - t
				}
				w[k-lo] = wk
				total += wk
			}
			for k := range w {
				w[k] /= total
			}
			out[i] = taps{true, lo, hi, w}
		}
		return out
	}
	// The position's other term is d2s[1]*dyf (d2s[3]*dxf), a zero: adding
	// it changes no sum, as the first term is never zero.
	dyf0 := float64(dr.Min.Y+adr.Min.Y) + 0.5
	dxf0 := float64(dr.Min.X+adr.Min.X) + 0.5
	cols := axis(adr.Dx(), adr.Min.X, func(dx int) float64 {
		dxf := float64(dr.Min.X+dx) + 0.5
		return float64(d2s[0]*dxf) + float64(d2s[1]*dyf0) + d2s[2]
	}, bias.X, sr.Min.X, sr.Max.X, xscale)
	rows := axis(adr.Dy(), adr.Min.Y, func(dy int) float64 {
		dyf := float64(dr.Min.Y+dy) + 0.5
		return float64(d2s[3]*dxf0) + float64(d2s[4]*dyf) + d2s[5]
	}, bias.Y, sr.Min.Y, sr.Max.Y, yscale)

	for dy := adr.Min.Y; dy < adr.Max.Y; dy++ {
		ry := rows[dy-adr.Min.Y]
		if !ry.ok {
			continue
		}
		d := (dr.Min.Y+dy-dst.Rect.Min.Y)*dst.Stride + (dr.Min.X+adr.Min.X-dst.Rect.Min.X)*4
		for dx := adr.Min.X; dx < adr.Max.X; dx, d = dx+1, d+4 {
			cx := cols[dx-adr.Min.X]
			if !cx.ok {
				continue
			}
			var pr, pg, pb, pa float64
			for ky := ry.lo; ky < ry.hi; ky++ {
				yWeight := ry.w[ky-ry.lo]
				if yWeight == 0 {
					continue
				}
				row := (ky - src.Rect.Min.Y) * src.Stride
				for kx := cx.lo; kx < cx.hi; kx++ {
					if w := cx.w[kx-cx.lo] * yWeight; w != 0 {
						pi := row + (kx-src.Rect.Min.X)*4
						pr += float64(float64(uint32(src.Pix[pi+0])*0x101) * w)
						pg += float64(float64(uint32(src.Pix[pi+1])*0x101) * w)
						pb += float64(float64(uint32(src.Pix[pi+2])*0x101) * w)
						pa += float64(float64(uint32(src.Pix[pi+3])*0x101) * w)
					}
				}
			}
			if pr > pa {
				pr = pa
			}
			if pg > pa {
				pg = pa
			}
			if pb > pa {
				pb = pa
			}
			dst.Pix[d+0] = uint8(fffftou(pr) >> 8)
			dst.Pix[d+1] = uint8(fffftou(pg) >> 8)
			dst.Pix[d+2] = uint8(fffftou(pb) >> 8)
			dst.Pix[d+3] = uint8(fffftou(pa) >> 8)
		}
	}
}

// fffftou converts the range [0.0, 65535.0] to [0, 0xffff] (x/image/draw's).
func fffftou(f float64) uint16 {
	i := int32(f + 0.5)
	if i > 0xffff {
		return 0xffff
	}
	if i > 0 {
		return uint16(i)
	}
	return 0
}

// invert returns the inverse of m (x/image/draw's).
func invert(m *f64.Aff3) f64.Aff3 {
	m00 := +m[3*1+1]
	m01 := -m[3*0+1]
	m02 := +float64(m[3*1+2]*m[3*0+1]) - float64(m[3*1+1]*m[3*0+2])
	m10 := -m[3*1+0]
	m11 := +m[3*0+0]
	m12 := +float64(m[3*1+0]*m[3*0+2]) - float64(m[3*1+2]*m[3*0+0])
	det := float64(m00*m11) - float64(m10*m01)
	return f64.Aff3{m00 / det, m01 / det, m02 / det, m10 / det, m11 / det, m12 / det}
}

// transformRect returns a rectangle that contains sr transformed by s2d
// (x/image/draw's).
func transformRect(s2d *f64.Aff3, sr *image.Rectangle) (dr image.Rectangle) {
	ps := [...]image.Point{{sr.Min.X, sr.Min.Y}, {sr.Max.X, sr.Min.Y}, {sr.Min.X, sr.Max.Y}, {sr.Max.X, sr.Max.Y}}
	for i, p := range ps {
		sxf, syf := float64(p.X), float64(p.Y)
		dx := int(math.Floor(float64(s2d[0]*sxf) + float64(s2d[1]*syf) + s2d[2]))
		dy := int(math.Floor(float64(s2d[3]*sxf) + float64(s2d[4]*syf) + s2d[5]))
		if i == 0 {
			dr = image.Rectangle{Min: image.Point{dx, dy}, Max: image.Point{dx + 1, dy + 1}}
			continue
		}
		dr.Min.X = min(dr.Min.X, dx)
		dr.Max.X = max(dr.Max.X, dx+1)
		dr.Min.Y = min(dr.Min.Y, dy)
		dr.Max.Y = max(dr.Max.Y, dy+1)
	}
	return dr
}
