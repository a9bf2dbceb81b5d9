package metrics

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// The expected values in this file are by construction: a single
// accumulator filled with every cell is the reference, and the shards are
// the same cells split at random.

// randomCells draws n cells whose values hit layout values exactly, fall
// between them, and fall outside the histogram range, with random integer
// weights (some zero), plus a few non-finite values that Add skips.
func randomCells(rng *rand.Rand, layoutVals []float64, n int) (vals []float64, ws []int64) {
	for range n {
		var v float64
		switch rng.IntN(6) {
		case 0:
			v = layoutVals[rng.IntN(len(layoutVals))]
		case 1:
			v = -5 + 20*rng.Float64() // partly outside the histogram [0, 10)
		case 2:
			v = math.NaN()
		default:
			v = 10 * rng.Float64()
		}
		w := rng.Int64N(1 << 40)
		if rng.IntN(10) == 0 {
			w = 0
		}
		vals = append(vals, v)
		ws = append(ws, w)
	}
	return vals, ws
}

func randomLayout(t testing.TB, rng *rand.Rand) (*Layout, []float64) {
	t.Helper()
	m := 1 + rng.IntN(40)
	vals := make([]float64, m)
	for i := range vals {
		vals[i] = math.Round(10*rng.Float64()*100) / 100
	}
	l, err := NewLayout(vals, 16+rng.IntN(200))
	if err != nil {
		t.Fatal(err)
	}
	return l, vals
}

// TestEncodeShardsMergeExactly splits random accumulators into N parts,
// sends every part through EncodeAccumulator / DecodeAccumulator onto a
// layout decoded from EncodeLayout (as a merging process would), merges
// them in a shuffled order and requires the same bytes as the single
// accumulator's encoding.
func TestEncodeShardsMergeExactly(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 1))
	for trial := range 40 {
		l, lv := randomLayout(t, rng)
		vals, ws := randomCells(rng, lv, rng.IntN(3000))
		single := l.NewAccumulator()
		for i := range vals {
			single.Add(vals[i], ws[i])
		}
		want := EncodeAccumulator(single)

		l2, err := DecodeLayout(EncodeLayout(l))
		if err != nil {
			t.Fatal(err)
		}
		if l2.Fingerprint() != l.Fingerprint() {
			t.Fatal("decoded layout has another fingerprint")
		}
		for _, n := range []int{1, 2, 3, 7} {
			parts := make([]*Accumulator, n)
			for i := range parts {
				parts[i] = l.NewAccumulator()
			}
			for i := range vals {
				parts[rng.IntN(n)].Add(vals[i], ws[i])
			}
			encoded := make([][]byte, n)
			for i, p := range parts {
				encoded[i] = EncodeAccumulator(p)
			}
			rng.Shuffle(n, func(i, j int) { encoded[i], encoded[j] = encoded[j], encoded[i] })
			merged := l2.NewAccumulator()
			for _, e := range encoded {
				d, err := DecodeAccumulator(e, l2)
				if err != nil {
					t.Fatalf("trial %d N=%d: %v", trial, n, err)
				}
				if err := merged.Merge(d); err != nil {
					t.Fatal(err)
				}
			}
			if got := EncodeAccumulator(merged); !bytes.Equal(got, want) {
				t.Fatalf("trial %d N=%d: merged encoding differs from the single accumulator's", trial, n)
			}
			if merged.Cells() != single.Cells() || merged.Area() != single.Area() || merged.Skipped() != single.Skipped() ||
				merged.Min() != single.Min() || merged.Max() != single.Max() {
				t.Fatalf("trial %d N=%d: totals differ", trial, n)
			}
		}
	}
}

// TestEncodeRoundTripRing: a ring from Sub (bounded range) and an empty
// accumulator survive the round trip bit for bit.
func TestEncodeRoundTripRing(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 2))
	l, lv := randomLayout(t, rng)
	vals, ws := randomCells(rng, lv, 500)
	outer, inner := l.NewAccumulator(), l.NewAccumulator()
	for i := range vals {
		outer.Add(vals[i], ws[i])
		if i%3 == 0 {
			inner.Add(vals[i], ws[i])
		}
	}
	ring, err := outer.Sub(inner)
	if err != nil {
		t.Fatal(err)
	}
	for name, a := range map[string]*Accumulator{"ring": ring, "empty": l.NewAccumulator(), "outer": outer} {
		e := EncodeAccumulator(a)
		d, err := DecodeAccumulator(e, l)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if d.RangeExact() != a.RangeExact() || d.Min() != a.Min() || d.Max() != a.Max() || !bytes.Equal(EncodeAccumulator(d), e) {
			t.Fatalf("%s: round trip changed the accumulator", name)
		}
	}
}

// TestEncodeSignedZero: -0 and +0 cells in either order give the same
// encoding (Add keeps whichever zero came first; the encoding stores +0).
func TestEncodeSignedZero(t *testing.T) {
	l, err := NewLayout([]float64{0.5}, 16)
	if err != nil {
		t.Fatal(err)
	}
	a, b := l.NewAccumulator(), l.NewAccumulator()
	a.Add(math.Copysign(0, -1), 1)
	a.Add(0, 1)
	b.Add(0, 1)
	b.Add(math.Copysign(0, -1), 1)
	if !bytes.Equal(EncodeAccumulator(a), EncodeAccumulator(b)) {
		t.Fatal("signed zeros change the encoding")
	}
}

// reseal replaces the checksum of an encoding after it was edited.
func reseal(b []byte) []byte {
	n := len(b) - sha256.Size
	s := sha256.Sum256(b[:n])
	return append(b[:n:n], s[:]...)
}

func TestDecodeRefuses(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 3))
	l, lv := randomLayout(t, rng)
	vals, ws := randomCells(rng, lv, 300)
	a := l.NewAccumulator()
	for i := range vals {
		a.Add(vals[i], ws[i])
	}
	good := EncodeAccumulator(a)
	other, err := NewLayout(append(lv, 99), l.HistBins())
	if err != nil {
		t.Fatal(err)
	}
	// bins starts after magic, version, fingerprint and the two bin counts.
	firstBin := headLen + sha256.Size + 16

	cases := []struct {
		name   string
		data   func() []byte
		layout *Layout
		want   error
	}{
		{"other version", func() []byte {
			b := bytes.Clone(good)
			binary.LittleEndian.PutUint16(b[4:], EncodingVersion+1)
			return reseal(b)
		}, l, ErrEncodingVersion},
		{"other layout", func() []byte { return good }, other, ErrLayoutMismatch},
		{"layout bytes", func() []byte { return EncodeLayout(l) }, l, ErrNotEncoding},
		{"empty", func() []byte { return nil }, l, ErrTruncated},
		{"header only", func() []byte { return good[:headLen] }, l, ErrTruncated},
		{"cut before checksum", func() []byte { return good[:len(good)-1] }, l, ErrCorrupt},
		{"cut and resealed", func() []byte { return reseal(bytes.Clone(good[:len(good)-40])) }, l, ErrCorrupt},
		{"bit flipped", func() []byte {
			b := bytes.Clone(good)
			b[firstBin+3] ^= 0x10
			return b
		}, l, ErrCorrupt},
		{"negative bin, resealed", func() []byte {
			b := bytes.Clone(good)
			binary.LittleEndian.PutUint64(b[firstBin:], uint64(1)<<63)
			return reseal(b)
		}, l, ErrCorrupt},
		{"bins do not add up, resealed", func() []byte {
			b := bytes.Clone(good)
			v := binary.LittleEndian.Uint64(b[firstBin+8:])
			binary.LittleEndian.PutUint64(b[firstBin+8:], v+1)
			return reseal(b)
		}, l, ErrCorrupt},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := DecodeAccumulator(c.data(), c.layout)
			if !errors.Is(err, c.want) {
				t.Fatalf("got %v, want %v", err, c.want)
			}
			var de *DecodeError
			if !errors.As(err, &de) || de.What != "accumulator" {
				t.Fatalf("not a *DecodeError for an accumulator: %v", err)
			}
		})
	}
	// Every truncation and every single-bit change is refused.
	for n := range len(good) {
		if _, err := DecodeAccumulator(good[:n], l); err == nil {
			t.Fatalf("truncated to %d bytes: accepted", n)
		}
	}
	for i := range len(good) {
		b := bytes.Clone(good)
		b[i] ^= 1 << (i % 8)
		if _, err := DecodeAccumulator(b, l); err == nil {
			t.Fatalf("bit flipped in byte %d: accepted", i)
		}
	}
}

func TestDecodeLayoutRefuses(t *testing.T) {
	l, err := NewLayout([]float64{0.1, 0.2, 0.3}, 64)
	if err != nil {
		t.Fatal(err)
	}
	good := EncodeLayout(l)
	// values start after magic, version and the value count.
	first := headLen + 8
	unsorted := bytes.Clone(good)
	copy(unsorted[first:first+8], good[first+8:first+16])
	copy(unsorted[first+8:first+16], good[first:first+8])
	negZero, _ := NewLayout([]float64{0}, 16)
	nz := EncodeLayout(negZero)
	binary.LittleEndian.PutUint64(nz[first:], math.Float64bits(math.Copysign(0, -1)))
	cases := map[string]struct {
		data []byte
		want error
	}{
		"unsorted":       {reseal(unsorted), ErrCorrupt},
		"negative zero":  {reseal(nz), ErrCorrupt},
		"truncated":      {good[:len(good)-1], ErrCorrupt},
		"short":          {good[:3], ErrTruncated},
		"accumulator":    {EncodeAccumulator(l.NewAccumulator()), ErrNotEncoding},
		"count too big":  {reseal(append(binary.LittleEndian.AppendUint64(bytes.Clone(good[:headLen]), 1<<40), good[first:]...)), ErrCorrupt},
		"resealed short": {reseal(bytes.Clone(good[:len(good)-16])), ErrCorrupt},
	}
	for name, c := range cases {
		if _, err := DecodeLayout(c.data); !errors.Is(err, c.want) {
			t.Errorf("%s: got %v, want %v", name, err, c.want)
		}
	}
}

// FuzzDecodeAccumulator feeds arbitrary bytes to the decoders, both as they
// are and sealed with a valid header and checksum (so that the content
// checks are reached). Whatever is accepted must encode back to the same
// bytes and merge without error.
func FuzzDecodeAccumulator(f *testing.F) {
	l, err := NewLayout([]float64{0.25, 0.5, 0.75}, 16)
	if err != nil {
		f.Fatal(err)
	}
	a := l.NewAccumulator()
	for i := range 50 {
		a.Add(float64(i)/50, int64(i))
	}
	f.Add(EncodeAccumulator(a))
	f.Add(EncodeAccumulator(l.NewAccumulator()))
	f.Add(EncodeLayout(l))
	f.Add(EncodeAccumulator(a)[headLen : len(EncodeAccumulator(a))-sha256.Size])
	f.Fuzz(func(t *testing.T, data []byte) {
		for _, in := range [][]byte{data, seal(accMagic, data)} {
			d, err := DecodeAccumulator(in, l)
			if err != nil {
				var de *DecodeError
				if !errors.As(err, &de) {
					t.Fatalf("error is not a *DecodeError: %v", err)
				}
				continue
			}
			if got := EncodeAccumulator(d); !bytes.Equal(got, in) && !bytes.Equal(got, canonicalZero(in)) {
				t.Fatal("accepted data do not encode back to themselves")
			}
			if err := d.Clone().Merge(d); err != nil {
				t.Fatal(err)
			}
		}
		for _, in := range [][]byte{data, seal(layoutMagic, data)} {
			dl, err := DecodeLayout(in)
			if err == nil && !bytes.Equal(EncodeLayout(dl), in) {
				t.Fatal("accepted layout does not encode back to itself")
			}
		}
	})
}

// canonicalZero returns an accumulator encoding with -0 in min or max
// replaced by +0 and the checksum recomputed (what the decoder normalises).
func canonicalZero(in []byte) []byte {
	b := bytes.Clone(in)
	n := len(b) - sha256.Size
	// min and max sit before cells, area, skipped and bounded (4 x 8 bytes).
	for _, off := range []int{n - 48, n - 40} {
		if off >= 0 && binary.LittleEndian.Uint64(b[off:]) == 1<<63 {
			binary.LittleEndian.PutUint64(b[off:], 0)
		}
	}
	return reseal(b)
}
