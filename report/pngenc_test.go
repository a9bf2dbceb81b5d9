package report

import (
	"bytes"
	"compress/zlib"
	"image"
	"image/color"
	"image/png"
	"runtime"
	"testing"

	"gonum.org/v1/plot/vg/draw"
)

// TestEncodePNG decodes what encodePNG wrote with image/png and wants the
// pixels it was given: a drawn figure (opaque, written as RGB) and an
// image with translucent pixels (written as RGBA by image/png); both carry
// a pHYs chunk of 300 dpi.
func TestEncodePNG(t *testing.T) {
	r := analyzedSample(t)
	f := metricsFigure(r)
	c := newPNGCanvas(f.W, f.H)
	if err := f.draw(draw.New(c)); err != nil {
		t.Fatal(err)
	}
	clear := image.NewRGBA(image.Rect(0, 0, 7, 5))
	for i := range clear.Pix {
		clear.Pix[i] = uint8(i * 37)
	}
	for q := 0; q < len(clear.Pix); q += 4 {
		// Premultiplied: no channel above alpha.
		a := clear.Pix[q+3]
		for k := range 3 {
			clear.Pix[q+k] = min(clear.Pix[q+k], a)
		}
	}
	for _, tc := range []struct {
		name  string
		img   *image.RGBA
		model color.Model
	}{{"figure", c.img, color.RGBAModel}, {"translucent", clear, color.NRGBAModel}} {
		data, err := encodePNG(tc.img, pngDPI)
		if err != nil {
			t.Fatal(err)
		}
		got, err := png.Decode(bytes.NewReader(data))
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if got.Bounds() != tc.img.Bounds() {
			t.Fatalf("%s: bounds %v, want %v", tc.name, got.Bounds(), tc.img.Bounds())
		}
		if got.ColorModel() != tc.model {
			t.Errorf("%s: decoded as %T", tc.name, got)
		}
		b := tc.img.Bounds()
		bad := 0
		for y := b.Min.Y; y < b.Max.Y; y++ {
			for x := b.Min.X; x < b.Max.X; x++ {
				r0, g0, b0, a0 := tc.img.At(x, y).RGBA()
				r1, g1, b1, a1 := got.At(x, y).RGBA()
				// A translucent pixel goes through non-premultiplied
				// 8-bit storage, exact to within rounding.
				if d := max(diff(r0, r1), diff(g0, g1), diff(b0, b1), diff(a0, a1)); d > 0x101 || (tc.name == "figure" && d != 0) {
					bad++
				}
			}
		}
		if bad > 0 {
			t.Errorf("%s: %d pixels differ", tc.name, bad)
		}
		if !bytes.Contains(data, append([]byte("pHYs"), physData(pngDPI)...)) {
			t.Errorf("%s: no pHYs chunk of %d dpi", tc.name, pngDPI)
		}
	}
}

func diff(a, b uint32) uint32 {
	if a > b {
		return a - b
	}
	return b - a
}

// TestZlibWritersKept: a writer given back is the one handed out next,
// even after garbage collections (a sync.Pool would drop it), at most
// GOMAXPROCS are kept, and a PNG encoded again with a kept writer has the
// same bytes.
func TestZlibWritersKept(t *testing.T) {
	img := image.NewRGBA(image.Rect(0, 0, 50, 40))
	for i := range img.Pix {
		img.Pix[i] = uint8(i * 7)
		if i%4 == 3 {
			img.Pix[i] = 0xff
		}
	}
	first, err := encodePNG(img, pngDPI)
	if err != nil {
		t.Fatal(err)
	}
	first = bytes.Clone(first)
	zw := zlibWriters.get()
	zlibWriters.put(zw)
	runtime.GC()
	runtime.GC()
	if got := zlibWriters.get(); got != zw {
		t.Error("the writer given back was not kept across garbage collections")
	} else {
		zlibWriters.put(got)
	}
	again, err := encodePNG(img, pngDPI)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(first, again) {
		t.Error("a PNG encoded again with a kept writer has other bytes")
	}
	var ws []*zlib.Writer
	for range runtime.GOMAXPROCS(0) + 3 {
		ws = append(ws, zlibWriters.get())
	}
	for _, w := range ws {
		zlibWriters.put(w)
	}
	if n := len(zlibWriters.free); n != runtime.GOMAXPROCS(0) {
		t.Errorf("%d writers kept, want GOMAXPROCS = %d", n, runtime.GOMAXPROCS(0))
	}
}
