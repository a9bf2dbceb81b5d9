package metrics

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestValueSet: the set holds each distinct value once, ascending, -0 as
// +0, skips cells without a value (bin -1), whatever a cache shared
// with other sets held, is given only with at least
// two cells per value, is the same however the
// cells are split and merged (a union), is dropped past MaxSetValues
// values (also through a merge), and Encode/DecodeValueSet round-trip it
// and refuse sets no pass makes.
func TestValueSet(t *testing.T) {
	// One cache for every set below: each new set clears it (a set
	// filled with a cache from another would skip the values it knew).
	var c ValueCache
	var s ValueSet
	s.AddRow([]float64{3, 3, 1, math.Copysign(0, -1), 2, 99, 1}, []int32{0, 0, 0, 0, 0, -1, 0}, &c)
	// 6 cells of 4 values: fewer than two cells per value, no set.
	if got, ok := s.Values(); ok || got != nil {
		t.Errorf("values %v (%v) of 4 values on 6 cells, want none", got, ok)
	}
	s.AddRow([]float64{2, 0}, []int32{0, 0}, &c)
	if got, ok := s.Values(); !ok || !slices.Equal(got, []float64{0, 1, 2, 3}) || math.Signbit(got[0]) {
		t.Errorf("values %v (%v), want [0 1 2 3]", got, ok)
	}

	// Split in two, merged either way: the same set as one pass.
	r := rand.New(rand.NewPCG(1, 2))
	vals := make([]float64, 3000)
	bins := make([]int32, len(vals))
	for i := range vals {
		vals[i] = float64(r.IntN(500))
	}
	var whole, a, b ValueSet
	whole.AddRow(vals, bins, &c)
	a.AddRow(vals[:1700], bins[:1700], &c)
	b.AddRow(vals[1700:], bins[1700:], &c)
	ab, ba := a, b
	ab.vals, ba.vals = slices.Clone(a.vals), slices.Clone(b.vals)
	ab.Merge(b)
	ba.Merge(a)
	w, _ := whole.Values()
	for _, m := range []ValueSet{ab, ba} {
		if got, ok := m.Values(); !ok || !slices.Equal(got, w) {
			t.Errorf("merged set of %d values differs from the whole pass's %d", len(got), len(w))
		}
	}

	// Past MaxSetValues: dropped, in one row or through a merge.
	many := make([]float64, MaxSetValues+1)
	for i := range many {
		many[i] = float64(i)
	}
	var big, half1, half2 ValueSet
	big.AddRow(many, make([]int32, len(many)), &c)
	half1.AddRow(many[:MaxSetValues/2+1], make([]int32, MaxSetValues/2+1), &c)
	half2.AddRow(many[MaxSetValues/2+1:], make([]int32, len(many)-MaxSetValues/2-1), &c)
	half1.Merge(half2)
	for name, m := range map[string]ValueSet{"one row": big, "merged": half1} {
		if got, ok := m.Values(); ok || got != nil {
			t.Errorf("%s: %d values past the cap kept (%v)", name, len(got), ok)
		}
	}

	// Round trip, and refusals.
	for _, m := range []ValueSet{{}, s, big} {
		back, err := DecodeValueSet(m.Encode())
		if err != nil || back.many != m.many || !slices.Equal(back.vals, m.vals) {
			t.Errorf("round trip of %v: %v, %v", m, back, err)
		}
	}
	bad := s.Encode()
	for i := 0; i < 8; i++ { // the first two values swapped: not ascending
		bad[32+i], bad[40+i] = bad[40+i], bad[32+i]
	}
	for name, b := range map[string][]byte{
		"short":         s.Encode()[:15],
		"cut":           s.Encode()[:30],
		"not ascending": bad,
		"many with values": func() []byte {
			b := s.Encode()
			b[0] = 1
			return b
		}(),
	} {
		if _, err := DecodeValueSet(b); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
}
