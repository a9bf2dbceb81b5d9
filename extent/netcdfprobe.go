package extent

import (
	"bufio"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
)

// CheckNetCDFClassic returns an error for a classic netCDF file (CDF-1,
// the 64-bit offset CDF-2 or CDF-5) that holds fewer bytes than its header
// says its variables' values take: GDAL's netCDF driver reads such a file
// cut short without a word, its missing cells as 0, so they would be
// scored as data. Any other file (not netCDF, netCDF-4, a header it
// cannot follow) gives nil: the drivers judge those.
//
// The header is read as the netCDF Classic and 64-bit Offset Format
// specification (NetCDF Users Guide, "File Format Specifications") lays
// it out: magic, numrecs, dim_list, gatt_list, var_list, each variable
// with its dimension ids, attributes, type, vsize and begin. A variable
// not along the record (unlimited) dimension needs begin plus the product
// of its dimensions' lengths times its type's size bytes; one along it,
// the same for its last record, at begin plus (numrecs - 1) times the
// record size (the sum of the record variables' vsize).
func CheckNetCDFClassic(path string) error {
	f, err := os.Open(path)
	if err != nil {
		return nil
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil || !st.Mode().IsRegular() {
		return nil
	}
	need, ok := netCDFClassicNeed(bufio.NewReader(f))
	if !ok || need <= st.Size() {
		return nil
	}
	return fmt.Errorf("it is a classic netCDF file whose header says its values take %d bytes, but it holds %d: the file is cut short (a copy or download that stopped); copy it again, or export it again from its source", need, st.Size())
}

// netCDF header tags (the specification's NC_DIMENSION, NC_VARIABLE,
// NC_ATTRIBUTE).
const (
	ncDimension = 0x0A
	ncVariable  = 0x0B
	ncAttribute = 0x0C
)

// ncTypeSize is the size in bytes of a value of each external type
// (1 byte ... 6 double; CDF-5 adds 7 ubyte ... 11 uint64).
var ncTypeSize = map[uint32]int64{1: 1, 2: 1, 3: 2, 4: 4, 5: 4, 6: 8, 7: 1, 8: 2, 9: 4, 10: 8, 11: 8}

// maxHeaderCount bounds the counts read from a header, so that a file
// that only begins like one is not followed into huge allocations.
const maxHeaderCount = 1 << 20

// netCDFClassicNeed returns the bytes a classic netCDF file's variables
// reach to, by its header; ok is false when r does not begin as one or
// its header cannot be followed.
func netCDFClassicNeed(r io.Reader) (need int64, ok bool) {
	var magic [4]byte
	if _, err := io.ReadFull(r, magic[:]); err != nil || string(magic[:3]) != "CDF" {
		return 0, false
	}
	version := magic[3]
	if version != 1 && version != 2 && version != 5 {
		return 0, false
	}
	h := &ncHeader{r: r, wide: version == 5}
	numrecs := h.count()
	streaming := !h.wide && numrecs == math.MaxUint32 || h.wide && numrecs == math.MaxUint64
	// dim_list
	var dims []uint64
	recDim := -1
	if tag, n := h.list(); tag == ncDimension {
		for i := uint64(0); i < n && h.err == nil; i++ {
			h.name()
			l := h.count()
			if l == 0 {
				recDim = len(dims)
			}
			dims = append(dims, l)
		}
	} else if tag != 0 {
		return 0, false
	}
	h.attrs()
	// var_list
	type variable struct {
		begin, size, vsize int64
		record             bool
	}
	var vars []variable
	if tag, n := h.list(); tag == ncVariable {
		for i := uint64(0); i < n && h.err == nil; i++ {
			h.name()
			nd := h.count()
			if nd > maxHeaderCount {
				return 0, false
			}
			v := variable{size: 1}
			for d := uint64(0); d < nd && h.err == nil; d++ {
				id := h.count()
				if id >= uint64(len(dims)) {
					return 0, false
				}
				if int(id) == recDim && d == 0 {
					v.record = true
					continue
				}
				if dims[id] > math.MaxInt64/uint64(max(v.size, 1)) {
					return 0, false
				}
				v.size *= int64(dims[id])
			}
			h.attrs()
			ts, known := ncTypeSize[h.u32()]
			if !known {
				return 0, false
			}
			if v.size > math.MaxInt64/ts {
				return 0, false
			}
			v.size *= ts
			if h.wide {
				v.vsize = int64(h.u64())
			} else {
				v.vsize = int64(h.u32())
			}
			if version == 1 {
				v.begin = int64(h.u32())
			} else {
				v.begin = int64(h.u64())
			}
			if v.begin < 0 || v.vsize < 0 {
				return 0, false
			}
			vars = append(vars, v)
		}
	} else if tag != 0 {
		return 0, false
	}
	if h.err != nil {
		return 0, false
	}
	var recSize int64
	for _, v := range vars {
		if v.record {
			recSize += v.vsize
		}
	}
	for _, v := range vars {
		end := v.begin + v.size
		if v.record {
			if streaming || numrecs == 0 {
				continue
			}
			if numrecs-1 > uint64(math.MaxInt64/max(recSize, 1)) {
				return 0, false
			}
			end += int64(numrecs-1) * recSize
		}
		if end < 0 {
			return 0, false
		}
		need = max(need, end)
	}
	return need, true
}

// ncHeader reads a classic netCDF header's big-endian fields, keeping the
// first error (the later reads then give 0).
type ncHeader struct {
	r    io.Reader
	wide bool // CDF-5: counts and lengths are 64-bit
	err  error
}

func (h *ncHeader) u32() uint32 {
	var b [4]byte
	if h.err == nil {
		_, h.err = io.ReadFull(h.r, b[:])
	}
	return binary.BigEndian.Uint32(b[:])
}

func (h *ncHeader) u64() uint64 {
	var b [8]byte
	if h.err == nil {
		_, h.err = io.ReadFull(h.r, b[:])
	}
	return binary.BigEndian.Uint64(b[:])
}

// count reads a count or length: 32-bit, 64-bit in CDF-5.
func (h *ncHeader) count() uint64 {
	if h.wide {
		return h.u64()
	}
	return uint64(h.u32())
}

// list reads a list's tag and element count (ABSENT is a zero tag).
func (h *ncHeader) list() (tag uint32, n uint64) {
	tag = h.u32()
	n = h.count()
	if n > maxHeaderCount {
		h.fail()
	}
	return tag, n
}

func (h *ncHeader) fail() {
	if h.err == nil {
		h.err = errors.New("netCDF header cannot be followed")
	}
}

// skip reads and drops n bytes padded to a multiple of 4.
func (h *ncHeader) skip(n uint64) {
	n = (n + 3) &^ 3
	if h.err == nil {
		var c int64
		c, h.err = io.CopyN(io.Discard, h.r, int64(n))
		if h.err == nil && c != int64(n) {
			h.fail()
		}
	}
}

// name reads a name: its length, then its bytes padded to 4.
func (h *ncHeader) name() {
	n := h.count()
	if n > maxHeaderCount {
		h.fail()
		return
	}
	h.skip(n)
}

// attrs reads an attribute list: each attribute's name, type, count and
// values padded to 4.
func (h *ncHeader) attrs() {
	tag, n := h.list()
	if tag != ncAttribute {
		if tag != 0 {
			h.fail()
		}
		return
	}
	for i := uint64(0); i < n && h.err == nil; i++ {
		h.name()
		ts, known := ncTypeSize[h.u32()]
		nv := h.count()
		if !known || nv > maxHeaderCount*16 {
			h.fail()
			return
		}
		h.skip(nv * uint64(ts))
	}
}
