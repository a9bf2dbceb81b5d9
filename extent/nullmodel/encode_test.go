package nullmodel

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"sync"
	"testing"
)

// randomBackground adds the cells of parts (a cell goes to part c%parts by
// its position in a shuffled order) into parts Backgrounds and one whole
// Background, over extents 0..3 (extent 2 never added to).
func randomBackground(seed uint64, cells, parts int) (whole *Background, split []*Background) {
	rng := rand.New(rand.NewPCG(seed, 1))
	whole = &Background{}
	split = make([]*Background, parts)
	for i := range split {
		split[i] = &Background{}
	}
	for c := range cells {
		k := []int{0, 1, 3}[rng.IntN(3)]
		d := []float64{rng.Float64() * 2e6, rng.Float64(), 0, 1234.5678}[rng.IntN(4)]
		w := int64(rng.IntN(1<<40)) + 1
		whole.Add(k, []float64{d}, []int64{w})
		split[(c*7919)%parts].Add(k, []float64{d}, []int64{w})
	}
	return whole, split
}

// TestBackgroundShardsMergeExactly splits random cells into N = 1, 2, 3
// and 7 parts, encodes each, decodes and merges them in shuffled order, and
// requires the single Background's bytes, means, medians and sorting bias.
func TestBackgroundShardsMergeExactly(t *testing.T) {
	for _, n := range []int{1, 2, 3, 7} {
		whole, split := randomBackground(uint64(n), 500, n)
		rng := rand.New(rand.NewPCG(9, uint64(n)))
		rng.Shuffle(len(split), func(i, j int) { split[i], split[j] = split[j], split[i] })
		merged := &Background{}
		for _, p := range split {
			d, err := DecodeBackground(EncodeBackground(p))
			if err != nil {
				t.Fatalf("N=%d: %v", n, err)
			}
			if err := merged.Merge(d); err != nil {
				t.Fatalf("N=%d: %v", n, err)
			}
		}
		if !bytes.Equal(EncodeBackground(merged), EncodeBackground(whole)) {
			t.Errorf("N=%d: merged encoding differs from the single background", n)
		}
		test := []float64{100, 2500, 7e5}
		for k := range 4 {
			if a, b := fmt.Sprint(merged.SortingBias(k, test)), fmt.Sprint(whole.SortingBias(k, test)); a != b {
				t.Errorf("N=%d extent %d: sorting bias %s, single %s", n, k, a, b)
			}
		}
	}
}

// TestDecodeBackgroundRefuses: every single-byte change, every truncation
// and content made impossible behind a valid checksum are refused with
// ErrBackgroundEncoding.
func TestDecodeBackgroundRefuses(t *testing.T) {
	whole, _ := randomBackground(3, 40, 1)
	data := EncodeBackground(whole)
	for i := range data {
		c := bytes.Clone(data)
		c[i] ^= 0x10
		if _, err := DecodeBackground(c); !errors.Is(err, ErrBackgroundEncoding) {
			t.Fatalf("byte %d changed: err %v", i, err)
		}
	}
	for n := 0; n < len(data); n += 7 {
		if _, err := DecodeBackground(data[:n]); !errors.Is(err, ErrBackgroundEncoding) {
			t.Fatalf("cut to %d bytes: err %v", n, err)
		}
	}
	// An extent whose area disagrees with its bins, resealed.
	b := &Background{}
	b.Add(0, []float64{10, 20}, []int64{5, 6})
	b.get(0).area = 12
	if _, err := DecodeBackground(EncodeBackground(b)); !errors.Is(err, ErrBackgroundEncoding) {
		t.Errorf("bins not adding up to the area: err %v", err)
	}
	b.get(0).area = -11
	if _, err := DecodeBackground(EncodeBackground(b)); !errors.Is(err, ErrBackgroundEncoding) {
		t.Errorf("negative area: err %v", err)
	}
}

// TestBackgroundEncodesMergedPartialSums: rows tallied by concurrent
// goroutines (so into several locked partial sums) encode to the same bytes
// as the same rows added one by one, and a Background that merged a decoded
// part before its own rows were added equals the whole too.
func TestBackgroundEncodesMergedPartialSums(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 5))
	const rows, cols = 64, 50
	dist := make([][]float64, rows)
	w := make([][]int64, rows)
	for r := range rows {
		dist[r], w[r] = make([]float64, cols), make([]int64, cols)
		for c := range cols {
			dist[r][c], w[r][c] = rng.Float64()*3e6, int64(rng.IntN(1<<30))
		}
	}
	add := func(b *Background, r int) {
		var row Row
		row.Set(dist[r], w[r])
		tl := b.Tally()
		defer tl.Done()
		tl.Add(r%3, &row, 0, cols/2)
		tl.Add(3, &row, cols/3, cols)
	}
	seq := &Background{}
	for r := range rows {
		add(seq, r)
	}
	conc := &Background{}
	var wg sync.WaitGroup
	for g := range 8 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for r := g; r < rows; r += 8 {
				add(conc, r)
			}
		}()
	}
	wg.Wait()
	used := 0
	for i := range conc.shards {
		if len(conc.shards[i].ext) > 0 {
			used++
		}
	}
	want := EncodeBackground(seq)
	if !bytes.Equal(EncodeBackground(conc), want) {
		t.Errorf("concurrent tallies (%d partial sums used) encode differently from sequential adds", used)
	}
	part := &Background{}
	for r := range rows / 2 {
		add(part, r)
	}
	d, err := DecodeBackground(EncodeBackground(part))
	if err != nil {
		t.Fatal(err)
	}
	late := &Background{}
	if err := late.Merge(d); err != nil {
		t.Fatal(err)
	}
	for r := rows / 2; r < rows; r++ {
		add(late, r)
	}
	if !bytes.Equal(EncodeBackground(late), want) {
		t.Error("merge then adds encodes differently from the whole")
	}
}

// TestBackgroundNestedRings: cells tallied as rings of nested groups
// (Nest: each cell added only to the smallest extent of each sequence
// holding it) encode byte for byte as the same cells added to every
// extent holding them, tallied directly or after a Merge of a part (whose
// whole-extent sums must not be added up again). Extents 0 ⊂ 1 ⊂ 4 form
// one sequence, 2 ⊂ 3 another (3 holds every cell of 2, 2 is sometimes
// empty in a row), and 5 stands alone.
func TestBackgroundNestedRings(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	const rows, cols = 60, 50
	groups := [][]int{{0, 1, 4}, {2, 3}, {5}}
	type cell struct {
		d    float64
		w    int64
		mask uint64
	}
	grid := make([][]cell, rows)
	for r := range grid {
		for c := 0; c < cols; c++ {
			var m uint64
			switch lvl := rng.IntN(4); lvl { // smallest of 0 ⊂ 1 ⊂ 4 holding it (3: none)
			case 0:
				m |= 1<<0 | 1<<1 | 1<<4
			case 1:
				m |= 1<<1 | 1<<4
			case 2:
				m |= 1 << 4
			}
			if rng.IntN(3) == 0 {
				m |= 1 << 3
				if r%4 != 0 && rng.IntN(2) == 0 {
					m |= 1 << 2
				}
			}
			if rng.IntN(2) == 0 {
				m |= 1 << 5
			}
			d := rng.Float64() * 3e5
			if rng.IntN(40) == 0 {
				d = math.NaN()
			}
			grid[r] = append(grid[r], cell{d, int64(rng.IntN(1<<30)) + 1, m})
		}
	}
	// add tallies rows r0 <= r < r1 into b, to every extent holding a cell
	// (ring false) or to the smallest of each sequence (ring true).
	add := func(b *Background, r0, r1 int, ring bool) {
		for r := r0; r < r1; r++ {
			var row Row
			d, w := make([]float64, cols), make([]int64, cols)
			for c, x := range grid[r] {
				d[c], w[c] = x.d, x.w
			}
			row.Set(d, w)
			tl := b.Tally()
			for _, seq := range groups {
				for i, k := range seq {
					for c := range cols {
						m := grid[r][c].mask
						if m>>uint(k)&1 == 0 || ring && i > 0 && m>>uint(seq[i-1])&1 != 0 {
							continue
						}
						tl.Add(k, &row, c, c+1)
					}
				}
			}
			tl.Done()
		}
	}
	whole := &Background{}
	add(whole, 0, rows, false)
	want := EncodeBackground(whole)
	rings := &Background{}
	rings.Nest(groups)
	add(rings, 0, rows, true)
	if !bytes.Equal(EncodeBackground(rings), want) {
		t.Error("ring tallies added up along the groups encode differently from whole-extent tallies")
	}
	part := &Background{}
	part.Nest(groups)
	add(part, 0, rows/3, true)
	d, err := DecodeBackground(EncodeBackground(part))
	if err != nil {
		t.Fatal(err)
	}
	late := &Background{}
	late.Nest(groups)
	if err := late.Merge(d); err != nil {
		t.Fatal(err)
	}
	add(late, rows/3, rows, true)
	if !bytes.Equal(EncodeBackground(late), want) {
		t.Error("a merged part then ring tallies encode differently from whole-extent tallies")
	}
	for k := range 6 {
		if whole.Area(k) == 0 {
			t.Errorf("extent %d has no area: the test would not test it", k)
		}
	}
}
