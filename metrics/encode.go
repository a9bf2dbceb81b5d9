package metrics

import (
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
)

// Binary form of layouts and accumulators, for partial results that are
// written by one process (a shard of raster blocks) and merged by another.
// Every number is stored exactly (int64 sums, float64 bit patterns), so
// decoding and merging partial accumulators gives exactly the accumulator a
// single pass would have made, and its encoding is byte-identical.
//
// Both encodings are little endian:
//
//	magic     4 bytes   "ASLY" (layout) or "ASAC" (accumulator)
//	version   uint16    EncodingVersion
//	body      ...       see EncodeLayout and EncodeAccumulator
//	checksum  32 bytes  SHA-256 of every byte before it
//
// An accumulator's body starts with the fingerprint of its layout, so it is
// decoded only onto the very layout it was made on.

// EncodingVersion is the version of the binary layout and accumulator
// encodings. Change it whenever the byte layout or the meaning of a field
// changes; decoders refuse any other version.
//
// Version 2: the layout has no histogram range, and each accumulator's
// fine histogram carries its own grid exponent and first bin.
// Version 3: the layout carries its histogram floor (WithHistFloor).
const EncodingVersion uint16 = 3

const (
	layoutMagic = "ASLY"
	accMagic    = "ASAC"
	headLen     = 4 + 2
	sumLen      = sha256.Size
)

// Sentinel errors of the decoders. Decoding errors are *DecodeError values
// wrapping one of these, so errors.Is finds the kind of problem.
var (
	// ErrEncodingVersion: the data were written with another EncodingVersion.
	ErrEncodingVersion = errors.New("metrics: unsupported encoding version")
	// ErrLayoutMismatch: an accumulator was made on another layout.
	ErrLayoutMismatch = errors.New("metrics: accumulator was made on a different layout")
	// ErrTruncated: the data end before the encoding does.
	ErrTruncated = errors.New("metrics: encoded data are truncated")
	// ErrCorrupt: the checksum does not match or a value is impossible.
	ErrCorrupt = errors.New("metrics: encoded data are corrupt")
	// ErrNotEncoding: the data do not start with the expected magic bytes.
	ErrNotEncoding = errors.New("metrics: data are not an encoded layout or accumulator")
)

// DecodeError reports why encoded data were refused: What names the
// encoding ("layout" or "accumulator"), Err is one of the sentinels above,
// and Detail says what was found.
type DecodeError struct {
	What   string
	Err    error
	Detail string
}

// Error formats the error as "metrics: cannot decode WHAT: reason: detail".
func (e *DecodeError) Error() string {
	msg := "metrics: cannot decode " + e.What + ": " + trimPrefix(e.Err.Error())
	if e.Detail != "" {
		msg += ": " + e.Detail
	}
	return msg
}

// Unwrap returns the sentinel.
func (e *DecodeError) Unwrap() error { return e.Err }

func trimPrefix(s string) string {
	const p = "metrics: "
	if len(s) >= len(p) && s[:len(p)] == p {
		return s[len(p):]
	}
	return s
}

// LayoutFingerprint is the SHA-256 of a layout's canonical encoding body:
// two layouts have the same fingerprint exactly when they have the same
// values, histogram bin count and histogram floor.
type LayoutFingerprint [sha256.Size]byte

// String returns the fingerprint in hexadecimal.
func (f LayoutFingerprint) String() string { return fmt.Sprintf("%x", f[:]) }

// layoutBody is the canonical description of l:
//
//	m         uint64            number of distinct values
//	values    m x float64 bits  ascending
//	histBins  uint64
//	floored   uint64            1 with a histogram floor, else 0
//	floor     int64             the floor exponent (0 without a floor)
func (l *Layout) layoutBody() []byte {
	b := make([]byte, 0, 8+8*len(l.d)+24)
	b = binary.LittleEndian.AppendUint64(b, uint64(len(l.d)))
	for _, v := range l.d {
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(v))
	}
	b = binary.LittleEndian.AppendUint64(b, uint64(l.hBins))
	var floored uint64
	if l.floored {
		floored = 1
	}
	b = binary.LittleEndian.AppendUint64(b, floored)
	b = binary.LittleEndian.AppendUint64(b, uint64(int64(l.hFloor)))
	return b
}

// Fingerprint returns the layout's fingerprint.
func (l *Layout) Fingerprint() LayoutFingerprint { return sha256.Sum256(l.layoutBody()) }

// seal prepends magic and version and appends the checksum.
func seal(magic string, body []byte) []byte {
	b := make([]byte, 0, headLen+len(body)+sumLen)
	b = append(b, magic...)
	b = binary.LittleEndian.AppendUint16(b, EncodingVersion)
	b = append(b, body...)
	s := sha256.Sum256(b)
	return append(b, s[:]...)
}

// open checks magic, version and checksum and returns the body.
func open(what, magic string, data []byte) ([]byte, error) {
	if len(data) < 4 {
		return nil, &DecodeError{What: what, Err: ErrTruncated, Detail: fmt.Sprintf("%d bytes, not even the magic bytes", len(data))}
	}
	if string(data[:4]) != magic {
		return nil, &DecodeError{What: what, Err: ErrNotEncoding, Detail: fmt.Sprintf("starts with %q, want %q", data[:4], magic)}
	}
	if len(data) < headLen {
		return nil, &DecodeError{What: what, Err: ErrTruncated, Detail: "ends inside the version"}
	}
	if v := binary.LittleEndian.Uint16(data[4:]); v != EncodingVersion {
		return nil, &DecodeError{What: what, Err: ErrEncodingVersion,
			Detail: fmt.Sprintf("written with version %d, this areasweep reads version %d; merge with the areasweep version that wrote it", v, EncodingVersion)}
	}
	if len(data) < headLen+sumLen {
		return nil, &DecodeError{What: what, Err: ErrTruncated, Detail: fmt.Sprintf("%d bytes, shorter than header and checksum", len(data))}
	}
	n := len(data) - sumLen
	if s := sha256.Sum256(data[:n]); string(s[:]) != string(data[n:]) {
		return nil, &DecodeError{What: what, Err: ErrCorrupt, Detail: "checksum mismatch (the data were cut short or changed)"}
	}
	return data[headLen:n], nil
}

// reader reads little-endian fields from a body, remembering the first
// shortfall.
type reader struct {
	b   []byte
	bad bool
}

func (r *reader) u64() uint64 {
	if len(r.b) < 8 {
		r.bad = true
		r.b = nil
		return 0
	}
	v := binary.LittleEndian.Uint64(r.b)
	r.b = r.b[8:]
	return v
}

func (r *reader) i64() int64   { return int64(r.u64()) }
func (r *reader) f64() float64 { return math.Float64frombits(r.u64()) }

// EncodeLayout returns the binary form of l (see the package's encoding
// notes): magic "ASLY", version, the layout body, checksum.
func EncodeLayout(l *Layout) []byte { return seal(layoutMagic, l.layoutBody()) }

// DecodeLayout rebuilds a layout from EncodeLayout's output. The result has
// the same fingerprint as the encoded layout.
func DecodeLayout(data []byte) (*Layout, error) {
	const what = "layout"
	body, err := open(what, layoutMagic, data)
	if err != nil {
		return nil, err
	}
	r := &reader{b: body}
	m := r.u64()
	if m > maxLayoutValues || m*8+24 != uint64(len(body)-8) {
		return nil, &DecodeError{What: what, Err: ErrCorrupt, Detail: fmt.Sprintf("value count %d does not match the %d-byte body", m, len(body))}
	}
	vals := make([]float64, m)
	for i := range vals {
		vals[i] = r.f64()
		if i > 0 && !(vals[i] > vals[i-1]) {
			return nil, &DecodeError{What: what, Err: ErrCorrupt, Detail: fmt.Sprintf("values %d and %d are not strictly ascending", i-1, i)}
		}
	}
	hBins, floored, floor := r.u64(), r.u64(), r.i64()
	if r.bad || hBins > maxHistBins || floored > 1 || (floored == 0 && floor != 0) || floor < minGridExp || floor > 1023 {
		return nil, &DecodeError{What: what, Err: ErrCorrupt, Detail: "bad histogram fields"}
	}
	var opts []LayoutOption
	if floored == 1 {
		opts = append(opts, WithHistFloor(int(floor)))
	}
	l, err := NewLayout(vals, int(hBins), opts...)
	if err != nil {
		return nil, &DecodeError{What: what, Err: ErrCorrupt, Detail: trimPrefix(err.Error())}
	}
	if l.Fingerprint() != sha256.Sum256(body) {
		// NewLayout normalised something (for example -0 to +0).
		return nil, &DecodeError{What: what, Err: ErrCorrupt, Detail: "values are not in canonical form"}
	}
	return l, nil
}

// EncodeAccumulator returns the binary form of a:
//
//	layout    32 bytes          LayoutFingerprint of a's layout
//	bins      uint64            2m+1
//	hist      uint64            fine-histogram bins
//	bins      (2m+1) x (area int64, n int64)
//	exponent  int64             histogram grid exponent e (0 when empty)
//	first     int64             grid bin of hist[0]: g_e(min) (0 when empty)
//	hist      hist x (area int64, n int64)
//	min, max  float64 bits      +Inf / -Inf while empty, -0 stored as +0
//	cells, area, skipped  int64
//	bounded   uint64            0 or 1
//
// Every field is exact, so DecodeAccumulator gives back an accumulator whose
// Merge with others is exactly the merge of the originals.
func EncodeAccumulator(a *Accumulator) []byte {
	fp := a.layout.Fingerprint()
	b := make([]byte, 0, sumLen+16+16*(len(a.bins)+len(a.hist))+64)
	b = append(b, fp[:]...)
	b = binary.LittleEndian.AppendUint64(b, uint64(len(a.bins)))
	b = binary.LittleEndian.AppendUint64(b, uint64(len(a.hist)))
	for _, s := range a.bins {
		b = binary.LittleEndian.AppendUint64(b, uint64(s.area))
		b = binary.LittleEndian.AppendUint64(b, uint64(s.n))
	}
	// The histogram is written from the bin of the minimum, so that where
	// the window happened to sit does not change the bytes.
	var e, first int64
	i0 := 0
	if a.cells > 0 {
		i0, _ = a.occupied()
		e, first = int64(a.he), a.hbase+int64(i0)
	}
	b = binary.LittleEndian.AppendUint64(b, uint64(e))
	b = binary.LittleEndian.AppendUint64(b, uint64(first))
	for i := range a.hist {
		var s sum
		if i0+i < len(a.hist) {
			s = a.hist[i0+i]
		}
		b = binary.LittleEndian.AppendUint64(b, uint64(s.area))
		b = binary.LittleEndian.AppendUint64(b, uint64(s.n))
	}
	b = binary.LittleEndian.AppendUint64(b, math.Float64bits(plusZero(a.min)))
	b = binary.LittleEndian.AppendUint64(b, math.Float64bits(plusZero(a.max)))
	b = binary.LittleEndian.AppendUint64(b, uint64(a.cells))
	b = binary.LittleEndian.AppendUint64(b, uint64(a.area))
	b = binary.LittleEndian.AppendUint64(b, uint64(a.skipped))
	var bounded uint64
	if a.bounded {
		bounded = 1
	}
	b = binary.LittleEndian.AppendUint64(b, bounded)
	return seal(accMagic, b)
}

// DecodeAccumulator rebuilds an accumulator on layout l from
// EncodeAccumulator's output. It refuses another encoding version
// (ErrEncodingVersion), an accumulator made on a layout with another
// fingerprint (ErrLayoutMismatch), truncated data (ErrTruncated) and data
// whose checksum or content is impossible (ErrCorrupt): negative sums, bins
// that do not add up to the totals, a range that does not fit the count.
func DecodeAccumulator(data []byte, l *Layout) (*Accumulator, error) {
	const what = "accumulator"
	body, err := open(what, accMagic, data)
	if err != nil {
		return nil, err
	}
	corrupt := func(format string, args ...any) error {
		return &DecodeError{What: what, Err: ErrCorrupt, Detail: fmt.Sprintf(format, args...)}
	}
	if len(body) < sumLen+16 {
		return nil, corrupt("body of %d bytes is too short", len(body))
	}
	want := l.Fingerprint()
	if string(body[:sumLen]) != string(want[:]) {
		return nil, &DecodeError{What: what, Err: ErrLayoutMismatch,
			Detail: fmt.Sprintf("it was made on layout %x…, this model's layout is %x…; merge only partial results of the same model, inputs and settings", body[:6], want[:6])}
	}
	r := &reader{b: body[sumLen:]}
	nb, nh := r.u64(), r.u64()
	if nb != uint64(l.Bins()) || nh != uint64(l.hBins) {
		return nil, corrupt("%d exact and %d histogram bins, the layout has %d and %d", nb, nh, l.Bins(), l.hBins)
	}
	if uint64(len(r.b)) != 16*(nb+nh)+64 {
		return nil, corrupt("body length does not match %d bins", nb+nh)
	}
	a := l.NewAccumulator()
	var binArea, binN, histArea, histN int64
	var ok bool
	readSums := func(dst []sum, totalArea, totalN *int64) error {
		for i := range dst {
			s := sum{r.i64(), r.i64()}
			if s.area < 0 || s.n < 0 || (s.n == 0 && s.area != 0) {
				return corrupt("bin %d holds area %d and count %d", i, s.area, s.n)
			}
			dst[i] = s
			if *totalArea, ok = addNoOverflow(*totalArea, s.area); !ok {
				return corrupt("area sum overflows")
			}
			if *totalN, ok = addNoOverflow(*totalN, s.n); !ok {
				return corrupt("count sum overflows")
			}
		}
		return nil
	}
	if err := readSums(a.bins, &binArea, &binN); err != nil {
		return nil, err
	}
	e, first := r.i64(), r.i64()
	if err := readSums(a.hist, &histArea, &histN); err != nil {
		return nil, err
	}
	a.min, a.max = plusZero(r.f64()), plusZero(r.f64())
	a.cells, a.area, a.skipped = r.i64(), r.i64(), r.i64()
	bounded := r.u64()
	switch {
	case a.cells < 0 || a.area < 0 || a.skipped < 0:
		return nil, corrupt("negative totals")
	case binN != a.cells || histN != a.cells || binArea != a.area || histArea != a.area:
		return nil, corrupt("bins do not add up to %d cells and area %d", a.cells, a.area)
	case bounded > 1:
		return nil, corrupt("bounded flag is %d", bounded)
	case a.cells == 0 && (!math.IsInf(a.min, 1) || !math.IsInf(a.max, -1) || bounded != 0):
		return nil, corrupt("an empty accumulator must have range (+Inf, -Inf) and no bounded flag")
	case a.cells > 0 && (math.IsNaN(a.min) || math.IsNaN(a.max) || math.IsInf(a.min, 0) || math.IsInf(a.max, 0) || a.min > a.max):
		return nil, corrupt("range [%v, %v] is impossible for %d cells", a.min, a.max, a.cells)
	}
	a.bounded = bounded == 1
	if a.cells == 0 {
		if e != 0 || first != 0 {
			return nil, corrupt("an empty accumulator must have histogram exponent and first bin 0")
		}
		return a, nil
	}
	if e < int64(l.minExp(a.min, a.max)) || e > 1074 || gridBin(a.min, int(e)) != first {
		return nil, corrupt("histogram grid (exponent %d, first bin %d) does not fit the range [%v, %v]", e, first, a.min, a.max)
	}
	last := int(gridBin(a.max, int(e)) - first)
	if last >= len(a.hist) {
		return nil, corrupt("range [%v, %v] spans more than %d histogram bins of exponent %d", a.min, a.max, len(a.hist), e)
	}
	for i := last + 1; i < len(a.hist); i++ {
		if a.hist[i].n != 0 {
			return nil, corrupt("histogram bin %d lies above the maximum %v", i, a.max)
		}
	}
	a.he, a.hbase, a.hinv = int(e), first, gridInv(int(e))
	a.hlo, a.hhi = float64(first), float64(first+int64(len(a.hist)))
	return a, nil
}

// plusZero maps -0 to +0. Add keeps whichever zero came first as the
// minimum or maximum and Merge prefers -0, so a range at zero would depend
// on cell order; the encoding stores +0 for both.
func plusZero(v float64) float64 {
	if v == 0 {
		return 0
	}
	return v
}

// addNoOverflow returns a+b and whether it did not overflow (a, b >= 0).
func addNoOverflow(a, b int64) (int64, bool) {
	s := a + b
	return s, s >= a
}
