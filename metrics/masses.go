package metrics

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
)

// Mass is a value of a model's cells and an area (units) of cells at it.
type Mass struct {
	Value float64
	Area  int64
}

// MassList is a list of a model's values with an area at each, ascending
// by value, that keeps at most a fixed number of them (its cap): the
// smallest, Cut telling that more qualified. The pass gathers two
// (pass.Stats): the smallest distinct values with the exact area of each
// (LowestValues of them), and the values held by long runs of equal cells
// with the area of those runs (MaxRunValues of them). Both depend only on
// the cells added, not on their order or on how they were split among
// workers or shards: a value that is among the cap smallest of the whole
// is among the cap smallest of every part that holds it, so a merge (a
// union with the areas of a value added, cut back to the cap smallest)
// keeps its whole area; and a value once cut is never added back, since
// the list then holds cap smaller values. The zero value is empty.
type MassList struct {
	Masses []Mass
	Cut    bool
}

// LowestValues is the number of the smallest distinct values of a model
// whose exact areas the pass keeps (pass.Stats.Lowest). Our choice: a
// floor hidden above the minimum by a few stray cells (a fill value with
// a few cells of another below it) is among them, at 16 bytes a value.
const LowestValues = 16

// RunCells and MaxRunValues: the pass lists a value held by a run of at
// least RunCells equal cells in a row of one of its blocks (a plateau of
// many cells: a fill value, a region where the model is constant), with
// the area of those runs, for at most MaxRunValues values (the smallest;
// pass.Stats.Runs). Our choices: a model of many values (more than
// MaxSetValues) almost never repeats one value on 16 neighbouring cells
// except on a plateau, and 64 plateaus are more than a model of many
// values is expected to have; a model with more is refused the
// area-random test where the values past the list could matter
// (newAreaModel).
const (
	RunCells     = 16
	MaxRunValues = 64
)

// Add adds area at value v (finite; -0 is read as +0) to l, keeping at
// most max values.
func (l *MassList) Add(v float64, area int64, max int) {
	if v == 0 {
		v = 0
	}
	ms := l.Masses
	n := len(ms)
	if n >= max && v > ms[n-1].Value {
		l.Cut = true
		return
	}
	i := n // the first at or above v (a short list: walked from the end)
	for i > 0 && ms[i-1].Value >= v {
		i--
	}
	if i < n && ms[i].Value == v {
		ms[i].Area += area
		return
	}
	if n >= max {
		// v is below the largest: it goes in, the largest goes out.
		l.Cut = true
		copy(ms[i+1:], ms[i:n-1])
		ms[i] = Mass{v, area}
		return
	}
	ms = append(ms, Mass{})
	copy(ms[i+1:], ms[i:n])
	ms[i] = Mass{v, area}
	l.Masses = ms
}

// Bound returns the value at or below which l is complete: every
// qualifying value at or below it is listed. It is +Inf when l was never
// cut.
func (l *MassList) Bound() float64 {
	if !l.Cut {
		return math.Inf(1)
	}
	if len(l.Masses) == 0 {
		return math.Inf(-1)
	}
	return l.Masses[len(l.Masses)-1].Value
}

// Merge adds o into l (a union, the areas of a value added), keeping at
// most max values.
func (l *MassList) Merge(o MassList, max int) {
	for _, m := range o.Masses {
		l.Add(m.Value, m.Area, max)
	}
	if o.Cut {
		l.Cut = true
	}
}

// Clone returns a copy of l that shares no memory with it.
func (l MassList) Clone() MassList {
	return MassList{Masses: append([]Mass(nil), l.Masses...), Cut: l.Cut}
}

// Encode returns l as bytes: the count and the cut flag (uint32 each),
// then per value its float64 bits and area (uint64 each), little-endian.
func (l MassList) Encode() []byte {
	b := binary.LittleEndian.AppendUint32(nil, uint32(len(l.Masses)))
	var cut uint32
	if l.Cut {
		cut = 1
	}
	b = binary.LittleEndian.AppendUint32(b, cut)
	for _, m := range l.Masses {
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(m.Value))
		b = binary.LittleEndian.AppendUint64(b, uint64(m.Area))
	}
	return b
}

// ErrMassList is returned by DecodeMassList for bytes that are not a
// valid list.
var ErrMassList = errors.New("not a valid list of values and areas")

// DecodeMassList reads a list written by Encode from the front of b and
// returns it with the bytes after it. It refuses more than max values, a
// value that is not finite (or is -0), values out of order or repeated, a
// negative area, and a cut list that is not full.
func DecodeMassList(b []byte, max int) (MassList, []byte, error) {
	var l MassList
	if len(b) < 8 {
		return l, b, fmt.Errorf("%w: %d bytes, want at least 8", ErrMassList, len(b))
	}
	n, cut := binary.LittleEndian.Uint32(b), binary.LittleEndian.Uint32(b[4:])
	b = b[8:]
	switch {
	case uint64(n) > uint64(max):
		return l, b, fmt.Errorf("%w: %d values, at most %d", ErrMassList, n, max)
	case cut > 1 || (cut == 1 && int(n) != max):
		return l, b, fmt.Errorf("%w: cut flag %d with %d of %d values", ErrMassList, cut, n, max)
	case uint64(len(b)) < 16*uint64(n):
		return l, b, fmt.Errorf("%w: %d values do not fit in %d bytes", ErrMassList, n, len(b))
	}
	l.Cut = cut == 1
	for i := range int(n) {
		v := math.Float64frombits(binary.LittleEndian.Uint64(b[16*i:]))
		a := int64(binary.LittleEndian.Uint64(b[16*i+8:]))
		if math.IsNaN(v) || math.IsInf(v, 0) || math.Signbit(v) && v == 0 || a < 0 || (i > 0 && !(v > l.Masses[i-1].Value)) {
			return MassList{}, b, fmt.Errorf("%w: value %v (area %d) not finite, out of order or with a negative area", ErrMassList, v, a)
		}
		l.Masses = append(l.Masses, Mass{v, a})
	}
	return l, b[16*n:], nil
}
