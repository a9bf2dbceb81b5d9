package report

import (
	"bytes"
	"image"
	"testing"

	xdraw "golang.org/x/image/draw"
	"golang.org/x/image/math/f64"
	"gonum.org/v1/plot/vg/draw"
)

// TestRenderReusedBuffers renders each figure of the sample twice in every
// format, the second time into the buffers the first left (dirty pixel
// buffers, used output buffers, a reset deflate writer), and wants the
// same bytes.
func TestRenderReusedBuffers(t *testing.T) {
	r := analyzedSample(t)
	for _, f := range figures(r)[:2] {
		for _, format := range figureFormats {
			first, err := render(f, format)
			if err != nil {
				t.Fatal(err)
			}
			first = bytes.Clone(first)
			// Dirty every free buffer, as a figure of other content would.
			for _, b := range pixBuffers.free {
				for i := range b[:cap(b)] {
					b[:cap(b)][i] = 0x5a
				}
			}
			outBuffers.put(bytes.Repeat([]byte{0xa5}, len(first)+100)[:0])
			second, err := render(f, format)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(first, second) {
				t.Errorf("%s.%s: %d bytes, then %d bytes that differ", f.Name, format, len(first), len(second))
			}
			outBuffers.put(second)
		}
	}
}

// TestOutPool checks that a buffer is handed out with room for the largest
// file of its format so far and that at most maxOutFree buffers are kept,
// the smallest going first.
func TestOutPool(t *testing.T) {
	p := outPool{largest: map[string]int{}}
	if b := p.get("pdf"); b != nil {
		t.Fatalf("first buffer %d bytes of room, want none", cap(b))
	}
	p.sized("pdf", 1000)
	p.sized("pdf", 400)
	if b := p.get("pdf"); len(b) != 0 || cap(b) < 1000 {
		t.Fatalf("buffer len %d cap %d, want empty with room for 1000", len(b), cap(b))
	}
	for n := 1; n <= maxOutFree+2; n++ {
		p.put(make([]byte, 5, 100*n))
	}
	if len(p.free) != maxOutFree {
		t.Fatalf("%d buffers kept, want %d", len(p.free), maxOutFree)
	}
	for _, b := range p.free {
		if cap(b) < 300 {
			t.Errorf("kept a buffer of %d bytes over larger ones", cap(b))
		}
	}
	b := p.get("pdf")
	if len(b) != 0 || cap(b) < 1000 {
		t.Errorf("used buffer len %d cap %d, want empty with room for 1000", len(b), cap(b))
	}
}

// TestNewPixels wants n zeroed, writable bytes, from a mapping for a
// large buffer that freePixels gives back, and no unmapping of a heap
// buffer.
func TestNewPixels(t *testing.T) {
	for _, n := range []int{100, 3 << 20, 5<<20 + 12345} {
		b := newPixels(n)
		if len(b) != n {
			t.Fatalf("len %d, want %d", len(b), n)
		}
		for i, v := range b {
			if v != 0 {
				t.Fatalf("n=%d: byte %d is %d", n, i, v)
			}
		}
		for i := range b {
			b[i] = byte(i)
		}
		if b[n-1] != byte(n-1) {
			t.Fatal("write lost")
		}
		freePixels(b)
	}
	h := make([]byte, 4<<20)
	freePixels(h) // not mapped: left alone
	h[len(h)-1] = 1
}

// TestGridBiLinearSame draws opaque images scaled and translated (up and
// down, fractional offsets, partly off the canvas, a source sub-rectangle)
// with gridBiLinear and with x/image/draw's BiLinear and wants the same
// pixels; and a rotated one, which gridBiLinear hands to BiLinear.
func TestGridBiLinearSame(t *testing.T) {
	src := image.NewRGBA(image.Rect(-3, 2, 37, 31))
	for i := range src.Pix {
		src.Pix[i] = uint8(i*131 + i/7)
		if i%4 == 3 {
			src.Pix[i] = 0xff
		}
	}
	cases := []struct {
		name string
		s2d  f64.Aff3
		sr   image.Rectangle
	}{
		{"up", f64.Aff3{7.31, 0, 12.25, 0, -5.9, 240.7}, src.Bounds()},
		{"up, clipped", f64.Aff3{9.5, 0, -40.3, 0, 8.77, -13.1}, src.Bounds()},
		{"down", f64.Aff3{0.37, 0, 3.5, 0, 0.29, 1.75}, src.Bounds()},
		{"sub-rectangle", f64.Aff3{3.03, 0, 0.4, 0, -2.51, 150}, image.Rect(0, 5, 20, 28)},
		{"rotated", f64.Aff3{3, 1.5, 10, -1.2, 2.5, 100}, src.Bounds()},
	}
	for _, tc := range cases {
		want := image.NewRGBA(image.Rect(0, 0, 260, 250))
		for i := range want.Pix {
			want.Pix[i] = uint8(i * 7)
		}
		got := image.NewRGBA(want.Rect)
		copy(got.Pix, want.Pix)
		xdraw.BiLinear.Transform(want, tc.s2d, src, tc.sr, xdraw.Over, nil)
		gridBiLinear{}.Transform(got, tc.s2d, src, tc.sr, xdraw.Over, nil)
		if !bytes.Equal(got.Pix, want.Pix) {
			n := 0
			for i := range got.Pix {
				if got.Pix[i] != want.Pix[i] {
					n++
				}
			}
			t.Errorf("%s: %d of %d bytes differ", tc.name, n, len(got.Pix))
		}
	}
}

// BenchmarkEncodePNG encodes the sample's scores figure drawn at 300 dpi.
func BenchmarkEncodePNG(b *testing.B) {
	r := analyzedSample(b)
	f := metricsFigure(r)
	c := newPNGCanvas(f.W, f.H)
	if err := f.draw(draw.New(c)); err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(c.img.Pix)))
	for b.Loop() {
		data, err := encodePNG(c.img, pngDPI)
		if err != nil {
			b.Fatal(err)
		}
		outBuffers.put(data)
	}
}
