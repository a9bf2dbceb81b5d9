package nullmodel

import (
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"fmt"
)

// Binary form of a Background, for a run split into shards of grid rows:
// each shard tallies its rows, writes its Background, and the merge decodes
// and merges them. Every sum is an integer, so the merged Background is
// exactly the one a single pass makes, and re-encodes to the same bytes.
// The form holds the merged state (the partial sums of concurrent Tallies
// added together): which partial sum a row went to leaves no trace.
//
// Little endian:
//
//	magic      4 bytes  "ASBG"
//	version    uint16   BackgroundEncodingVersion
//	bins       uint32   the histogram's bin count (histLen; the bins follow
//	                    the float's bits, see distBin)
//	extents    uint32   count, then per extent:
//	             area int64, sum high uint64, sum low uint64,
//	             nonzero bins uint32, then per bin: index uint32, area int64
//	                                      (indices ascending)
//	checksum   32 bytes SHA-256 of every byte before it

// BackgroundEncodingVersion is the version of EncodeBackground's byte
// layout; DecodeBackground refuses any other.
// Version 2: bins from the float's bits (27 octaves of 1024 bins);
// version 1 had logarithmic bins of 0.1%.
const BackgroundEncodingVersion uint16 = 2

const bgMagic = "ASBG"

// maxBackgroundExtents bounds the extents DecodeBackground accepts: the
// family holds at most 1024 members (extent.MaxMembers), and each extent
// with data holds a histogram of some 28,000 bins, so a damaged count
// cannot ask for unbounded memory.
const maxBackgroundExtents = 1024

// ErrBackgroundEncoding is wrapped by every error of DecodeBackground and
// Background.Merge.
var ErrBackgroundEncoding = errors.New("nullmodel: bad sorting-bias background data")

// EncodeBackground returns the binary form of b (see above), its partial
// sums merged: like a read, it must come after the last Add. Extents that
// were never added to are stored empty.
func EncodeBackground(b *Background) []byte {
	b.mu.Lock()
	defer b.mu.Unlock()
	b.flush()
	out := append([]byte(bgMagic), 0, 0)
	binary.LittleEndian.PutUint16(out[4:], BackgroundEncodingVersion)
	out = binary.LittleEndian.AppendUint32(out, uint32(histLen))
	out = binary.LittleEndian.AppendUint32(out, uint32(len(b.merged)))
	for _, e := range b.merged {
		out = binary.LittleEndian.AppendUint64(out, uint64(e.area))
		out = binary.LittleEndian.AppendUint64(out, e.sumHi)
		out = binary.LittleEndian.AppendUint64(out, e.sumLo)
		n := 0
		for _, a := range e.hist {
			if a != 0 {
				n++
			}
		}
		out = binary.LittleEndian.AppendUint32(out, uint32(n))
		for j, a := range e.hist {
			if a != 0 {
				out = binary.LittleEndian.AppendUint32(out, uint32(j))
				out = binary.LittleEndian.AppendUint64(out, uint64(a))
			}
		}
	}
	s := sha256.Sum256(out)
	return append(out, s[:]...)
}

// DecodeBackground reads EncodeBackground's form. It refuses another
// version or bin count, a checksum mismatch, truncated data and impossible
// content (negative areas, bins out of order or out of range, bins that do
// not add up to the extent's area), wrapping ErrBackgroundEncoding.
func DecodeBackground(data []byte) (*Background, error) {
	bad := func(format string, a ...any) error {
		return fmt.Errorf("%w: %s", ErrBackgroundEncoding, fmt.Sprintf(format, a...))
	}
	if len(data) < 4+2+4+4+sha256.Size || string(data[:4]) != bgMagic {
		return nil, bad("not an encoded background (too short or wrong magic bytes)")
	}
	if v := binary.LittleEndian.Uint16(data[4:]); v != BackgroundEncodingVersion {
		return nil, bad("written with version %d, this areasweep reads version %d", v, BackgroundEncodingVersion)
	}
	n := len(data) - sha256.Size
	if s := sha256.Sum256(data[:n]); string(s[:]) != string(data[n:]) {
		return nil, bad("checksum mismatch (the data were cut short or changed)")
	}
	body := data[6:n]
	short := false
	u32 := func() uint32 {
		if len(body) < 4 {
			short, body = true, nil
			return 0
		}
		v := binary.LittleEndian.Uint32(body)
		body = body[4:]
		return v
	}
	u64 := func() uint64 {
		if len(body) < 8 {
			short, body = true, nil
			return 0
		}
		v := binary.LittleEndian.Uint64(body)
		body = body[8:]
		return v
	}
	if h := u32(); int(h) != histLen {
		return nil, bad("histogram of %d bins, this areasweep uses %d", h, histLen)
	}
	count := u32()
	if count > maxBackgroundExtents || uint64(count) > uint64(len(body))/28 {
		return nil, bad("%d extents do not fit in %d bytes", count, len(body))
	}
	b := &Background{merged: make([]bgExtent, count), done: true}
	for k := range b.merged {
		e := &b.merged[k]
		e.area, e.sumHi, e.sumLo = int64(u64()), u64(), u64()
		nb := u32()
		if short || uint64(nb) > uint64(len(body))/12 {
			return nil, bad("extent %d: truncated", k)
		}
		if e.area < 0 {
			return nil, bad("extent %d: negative area %d", k, e.area)
		}
		if nb > 0 {
			e.hist = make([]int64, histLen)
		}
		var sum int64
		prev := -1
		for range nb {
			j, a := int(u32()), int64(u64())
			if j <= prev || j >= histLen || a <= 0 {
				return nil, bad("extent %d: bin %d (area %d) out of order, out of range or not positive", k, j, a)
			}
			prev = j
			e.hist[j] = a
			if sum += a; sum < 0 || sum > e.area {
				return nil, bad("extent %d: bins add up to more than the area %d", k, e.area)
			}
		}
		if nb == 0 && (e.sumHi != 0 || e.sumLo != 0) {
			return nil, bad("extent %d: a distance sum without area", k)
		}
		if sum != e.area {
			return nil, bad("extent %d: bins add up to %d, not the area %d", k, sum, e.area)
		}
	}
	if short || len(body) != 0 {
		return nil, bad("truncated or %d stray bytes", len(body))
	}
	return b, nil
}

// Merge adds o's sums to b's, extent by extent: the result is the
// Background of both sets of cells, whatever the order of merges (every
// sum is an integer). o is read (its partial sums merged, so no Add may
// follow); b may still be added to if it was not read yet. It refuses sums
// that would overflow (wrapping ErrBackgroundEncoding).
func (b *Background) Merge(o *Background) error {
	if b == o {
		return fmt.Errorf("%w: a background merged into itself", ErrBackgroundEncoding)
	}
	o.mu.Lock()
	defer o.mu.Unlock()
	o.flush()
	b.mu.Lock()
	defer b.mu.Unlock()
	if b.done {
		var err error
		b.merged, err = addExtents(b.merged, o.merged)
		return err
	}
	// Whole-extent sums: kept apart from the partial sums, which may be
	// ring sums to be added up along Nest's sequences.
	var err error
	b.whole, err = addExtents(b.whole, o.merged)
	return err
}
