package metrics

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"fmt"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
)

// Expected results here are by construction: shard sets are built from
// ShardBlocks and then broken one way at a time.

func hexOf(s string) string { return fmt.Sprintf("%x", sha256.Sum256([]byte(s))) }

// shardSet returns the n headers of one run over total blocks.
func shardSet(n, total int) []ShardHeader {
	hs := make([]ShardHeader, n)
	for i := range hs {
		hs[i] = ShardHeader{
			Format:      PartialFormatVersion,
			Tool:        "v1.2.3",
			Inputs:      []InputChecksum{{Name: "model:gbm", SHA256: hexOf("gbm")}, {Name: "occurrences", SHA256: hexOf("occ")}},
			Settings:    hexOf("settings"),
			Seed:        42,
			Shard:       i + 1,
			Shards:      n,
			TotalBlocks: total,
			Blocks:      ShardBlocks(i+1, n, total),
			Source:      fmt.Sprintf("part-%d.bin", i+1),
		}
	}
	return hs
}

func TestShardBlocksCover(t *testing.T) {
	for _, total := range []int{0, 1, 5, 6, 7, 100, 1001} {
		for _, n := range []int{1, 2, 3, 7, 13} {
			if err := CheckShardSet(shardSet(n, total)); err != nil {
				t.Errorf("total=%d n=%d: %v", total, n, err)
			}
		}
	}
}

func TestCheckShardSetRefuses(t *testing.T) {
	cases := []struct {
		name  string
		edit  func([]ShardHeader) []ShardHeader
		want  error
		words string // a piece of the message
	}{
		{"none", func([]ShardHeader) []ShardHeader { return nil }, ErrNoShards, "give every partial file"},
		{"other seed", func(h []ShardHeader) []ShardHeader { h[2].Seed = 43; return h }, ErrShardMismatch, "seed (42 vs 43)"},
		{"other settings", func(h []ShardHeader) []ShardHeader { h[1].Settings = hexOf("x"); return h }, ErrShardMismatch, "part-2.bin (shard 2/3) differ in settings"},
		{"other input", func(h []ShardHeader) []ShardHeader {
			h[1].Inputs = []InputChecksum{{Name: "model:gbm", SHA256: hexOf("gbm2")}, {Name: "occurrences", SHA256: hexOf("occ")}}
			return h
		}, ErrShardMismatch, `"model:gbm" has another checksum`},
		{"other sidecars", func(h []ShardHeader) []ShardHeader {
			h[1].Inputs = []InputChecksum{{Name: "model:gbm", SHA256: hexOf("gbm"), Sidecars: hexOf("gbm.prj")}, {Name: "occurrences", SHA256: hexOf("occ")}}
			return h
		}, ErrShardMismatch, `"model:gbm" has other sidecar files`},
		{"bad sidecars checksum", func(h []ShardHeader) []ShardHeader {
			h[0].Inputs = []InputChecksum{{Name: "model:gbm", SHA256: hexOf("gbm"), Sidecars: "abc"}, {Name: "occurrences", SHA256: hexOf("occ")}}
			return h
		}, ErrShardHeader, "of its sidecar files too"},
		{"extra input", func(h []ShardHeader) []ShardHeader {
			h[1].Inputs = append(h[1].Inputs[:2:2], InputChecksum{Name: "region", SHA256: hexOf("r")})
			return h
		}, ErrShardMismatch, `extra input "region" in the second`},
		// A model given to one run only was named by its place: input 2
		// is "model:glm" vs "occurrences".
		{"a model of one run only", func(h []ShardHeader) []ShardHeader {
			h[1].Inputs = []InputChecksum{{Name: "model:gbm", SHA256: hexOf("gbm")}, {Name: "model:glm", SHA256: hexOf("glm")}, {Name: "occurrences", SHA256: hexOf("occ")}}
			return h
		}, ErrShardMismatch, `extra input "model:glm" in the second`},
		{"a model missing", func(h []ShardHeader) []ShardHeader { h[1].Inputs = h[1].Inputs[1:]; return h }, ErrShardMismatch, `input "model:gbm" missing in the second`},
		{"models in another order", func(h []ShardHeader) []ShardHeader {
			for i := range h {
				h[i].Inputs = []InputChecksum{{Name: "model:gbm", SHA256: hexOf("gbm")}, {Name: "model:glm", SHA256: hexOf("glm")}}
			}
			h[1].Inputs = []InputChecksum{h[1].Inputs[1], h[1].Inputs[0]}
			return h
		}, ErrShardMismatch, "the same inputs in another order (model:gbm, model:glm vs model:glm, model:gbm"},
		{"a name given twice", func(h []ShardHeader) []ShardHeader {
			h[1].Inputs = append(h[1].Inputs[:2:2], InputChecksum{Name: "occurrences", SHA256: hexOf("occ")})
			return h
		}, ErrShardMismatch, "2 inputs vs 3"},
		{"other tool", func(h []ShardHeader) []ShardHeader { h[1].Tool = "v1.2.4"; return h }, ErrShardMismatch, "areasweep version"},
		{"other N", func(h []ShardHeader) []ShardHeader { return append(h[:2], shardSet(4, 10)[2]) }, ErrShardMismatch, "shard count (3 vs 4)"},
		{"other blocks", func(h []ShardHeader) []ShardHeader { return append(h[:2], shardSet(3, 11)[2]) }, ErrShardMismatch, "raster block count"},
		{"duplicate", func(h []ShardHeader) []ShardHeader { return append(h, h[1]) }, ErrShardDuplicate, "both shard 2"},
		{"missing", func(h []ShardHeader) []ShardHeader { return h[1:2] }, ErrShardMissing, "shard(s) 1, 3 of 3"},
		// Block ranges altered: the shards on either side named, and what to do.
		{"overlap", func(h []ShardHeader) []ShardHeader { h[1].Blocks[0].First--; return h }, ErrShardBlocks, "part-1.bin (shard 1/3) and part-2.bin (shard 2/3) both hold block"},
		{"gap", func(h []ShardHeader) []ShardHeader { h[1].Blocks[0].End--; return h }, ErrShardBlocks, "are in no shard (between part-2.bin (shard 2/3) and part-3.bin (shard 3/3)); a partial file was altered or damaged; run the shards named again"},
		{"head", func(h []ShardHeader) []ShardHeader { h[0].Blocks[0].First++; return h }, ErrShardBlocks, "blocks 0 to 0 of 10 are in no shard (the first, part-1.bin (shard 1/3), begins at block 1)"},
		{"tail", func(h []ShardHeader) []ShardHeader { h[2].Blocks[0].End--; return h }, ErrShardBlocks, "blocks 9 to 9 of 10 are in no shard (after part-3.bin (shard 3/3))"},
		{"shard out of range", func(h []ShardHeader) []ShardHeader { h[0].Shard = 4; return h }, ErrShardHeader, "shard 4/3"},
		{"bad checksum text", func(h []ShardHeader) []ShardHeader { h[0].Settings = "abc"; return h }, ErrShardHeader, "settings hash"},
		{"other format", func(h []ShardHeader) []ShardHeader { h[0].Format = 1; return h }, ErrPartialFormat, "format 1"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := CheckShardSet(c.edit(shardSet(3, 10)))
			if !errors.Is(err, c.want) {
				t.Fatalf("got %v, want %v", err, c.want)
			}
			var se *ShardError
			if !errors.As(err, &se) {
				t.Fatalf("not a *ShardError: %v", err)
			}
			if !bytes.Contains([]byte(err.Error()), []byte(c.words)) {
				t.Fatalf("message %q lacks %q", err, c.words)
			}
		})
	}
	// Missing shards, three or more in a row named as a range: by
	// construction, shards 1, 2, 5 and 10 to 27 of 50 given.
	var some []ShardHeader
	for _, h := range shardSet(50, 100) {
		if h.Shard <= 2 || h.Shard == 5 || h.Shard >= 10 && h.Shard <= 27 {
			some = append(some, h)
		}
	}
	if err := CheckShardSet(some); !errors.Is(err, ErrShardMissing) || !strings.Contains(err.Error(), "shard(s) 3, 4, 6-9, 28-50 of 50 not given") {
		t.Errorf("shards 1, 2, 5, 10-27 of 50: %v", err)
	}
	// Order does not matter.
	hs := shardSet(7, 50)
	rand.New(rand.NewPCG(1, 2)).Shuffle(len(hs), func(i, j int) { hs[i], hs[j] = hs[j], hs[i] })
	if err := CheckShardSet(hs); err != nil {
		t.Fatal(err)
	}
}

// TestPartialFileShards writes one partial file per shard (layout plus
// accumulators of its cells), reads them back, checks the set and merges:
// the merged accumulators encode exactly like a single pass's.
func TestPartialFileShards(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 4))
	l, lv := randomLayout(t, rng)
	const blocks, extents = 23, 3
	// cells per block, with a per-extent membership.
	type cell struct {
		v   float64
		w   int64
		ext int
	}
	byBlock := make([][]cell, blocks)
	single := []*Accumulator{l.NewAccumulator(), l.NewAccumulator(), l.NewAccumulator()}
	for b := range byBlock {
		vals, ws := randomCells(rng, lv, 40)
		for i := range vals {
			c := cell{vals[i], ws[i], rng.IntN(extents)}
			byBlock[b] = append(byBlock[b], c)
			single[c.ext].Add(c.v, c.w)
		}
	}
	for _, n := range []int{1, 2, 3, 7} {
		var files [][]byte
		for _, h := range shardSet(n, blocks) {
			accs := []*Accumulator{l.NewAccumulator(), l.NewAccumulator(), l.NewAccumulator()}
			for _, r := range h.Blocks {
				for b := r.First; b < r.End; b++ {
					for _, c := range byBlock[b] {
						accs[c.ext].Add(c.v, c.w)
					}
				}
			}
			p := &PartialFile{Header: h, Sections: []PartialSection{{"layout", EncodeLayout(l)}}}
			for k, a := range accs {
				p.Sections = append(p.Sections, PartialSection{fmt.Sprintf("extent/%d", k), EncodeAccumulator(a)})
			}
			data, err := EncodePartial(p)
			if err != nil {
				t.Fatal(err)
			}
			files = append(files, data)
		}
		rng.Shuffle(len(files), func(i, j int) { files[i], files[j] = files[j], files[i] })
		var parts []*PartialFile
		var headers []ShardHeader
		for i, f := range files {
			p, err := DecodePartial(f, fmt.Sprintf("f%d", i))
			if err != nil {
				t.Fatal(err)
			}
			parts = append(parts, p)
			headers = append(headers, p.Header)
		}
		if err := CheckShardSet(headers); err != nil {
			t.Fatalf("N=%d: %v", n, err)
		}
		ld, _ := parts[0].Section("layout")
		lm, err := DecodeLayout(ld)
		if err != nil {
			t.Fatal(err)
		}
		for k := range extents {
			m := lm.NewAccumulator()
			for _, p := range parts {
				d, ok := p.Section(fmt.Sprintf("extent/%d", k))
				if !ok {
					t.Fatal("section missing")
				}
				a, err := DecodeAccumulator(d, lm)
				if err != nil {
					t.Fatal(err)
				}
				if err := m.Merge(a); err != nil {
					t.Fatal(err)
				}
			}
			if !bytes.Equal(EncodeAccumulator(m), EncodeAccumulator(single[k])) {
				t.Fatalf("N=%d extent %d: merged shards differ from the single pass", n, k)
			}
		}
	}
}

func TestDecodePartialRefuses(t *testing.T) {
	h := shardSet(2, 10)[0]
	p := &PartialFile{Header: h, Sections: []PartialSection{{"a", []byte("xyz")}, {"b", nil}}}
	good, err := EncodePartial(p)
	if err != nil {
		t.Fatal(err)
	}
	back, err := DecodePartial(good, "part-1.bin")
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(back.Header, h) || len(back.Sections) != 2 || string(back.Sections[0].Data) != "xyz" || back.Sections[1].Name != "b" {
		t.Fatalf("round trip changed the file: %+v", back)
	}
	for n := range len(good) {
		_, err := DecodePartial(good[:n], "f")
		if !errors.Is(err, ErrPartialFormat) {
			t.Fatalf("truncated to %d: %v", n, err)
		}
		// Cut after the magic bytes: the message says what to do.
		if n >= 4 && !strings.Contains(err.Error(), "shard again") {
			t.Errorf("truncated to %d: %v, want it to say to run the shard again", n, err)
		}
	}
	for i := range len(good) {
		b := bytes.Clone(good)
		b[i] ^= 0x40
		if _, err := DecodePartial(b, "f"); err == nil {
			t.Fatalf("byte %d changed: accepted", i)
		}
	}
	for _, old := range []byte{1, 2} { // files of the previous formats
		v := bytes.Clone(good)
		v[4] = old
		if _, err := DecodePartial(reseal(v), "f"); !errors.Is(err, ErrPartialFormat) || !bytes.Contains([]byte(err.Error()), []byte(fmt.Sprintf("format %d", old))) {
			t.Fatalf("version %d: %v", old, err)
		}
	}
	if _, err := EncodePartial(&PartialFile{Header: h, Sections: []PartialSection{{"a", nil}, {"a", nil}}}); !errors.Is(err, ErrShardHeader) {
		t.Fatalf("repeated section: %v", err)
	}
	bad := h
	bad.Shard = 0
	if _, err := EncodePartial(&PartialFile{Header: bad}); !errors.Is(err, ErrShardHeader) {
		t.Fatalf("shard 0: %v", err)
	}
}

// TestCheckPartialSum: the checksum read in pieces accepts what
// DecodePartial accepts and refuses, with DecodePartial's words, a file
// cut short or with any byte changed past its first 6 (the bytes
// CheckPartialStart checks), also when the file ends before the size
// given (cut while being read).
func TestCheckPartialSum(t *testing.T) {
	h := shardSet(2, 10)[1]
	good, err := EncodePartial(&PartialFile{Header: h, Sections: []PartialSection{{"a", bytes.Repeat([]byte("xyz"), 40000)}}})
	if err != nil {
		t.Fatal(err)
	}
	if err := CheckPartialSum(bytes.NewReader(good), int64(len(good)), "f"); err != nil {
		t.Fatalf("a whole partial file refused: %v", err)
	}
	same := func(what string, data []byte, size int64) {
		t.Helper()
		_, want := DecodePartial(data, "f")
		got := CheckPartialSum(bytes.NewReader(data), size, "f")
		if want == nil || got == nil || got.Error() != want.Error() {
			t.Fatalf("%s: CheckPartialSum says %v, DecodePartial %v", what, got, want)
		}
	}
	for _, n := range []int{6, 20, partialMinBytes - 1, partialMinBytes, len(good) / 2, len(good) - 1} {
		same(fmt.Sprintf("cut to %d bytes", n), good[:n], int64(n))
	}
	for _, i := range []int{6, 100, len(good) / 2, len(good) - sha256.Size - 1, len(good) - 1} {
		b := bytes.Clone(good)
		b[i] ^= 0x40
		same(fmt.Sprintf("byte %d changed", i), b, int64(len(b)))
	}
	// Stat said len(good) bytes, the read ends 10 bytes short: cut short.
	err = CheckPartialSum(bytes.NewReader(good[:len(good)-10]), int64(len(good)), "f")
	if !errors.Is(err, ErrPartialFormat) || !strings.Contains(err.Error(), "is cut short") {
		t.Fatalf("file ended before its size: %v", err)
	}
}

// FuzzDecodePartial: arbitrary bytes, raw and sealed, never panic; what is
// accepted has a valid header and encodes back to the same bytes when its
// header JSON is canonical.
func FuzzDecodePartial(f *testing.F) {
	h := shardSet(3, 10)[1]
	good, err := EncodePartial(&PartialFile{Header: h, Sections: []PartialSection{{"layout", []byte{1, 2}}}})
	if err != nil {
		f.Fatal(err)
	}
	f.Add(good)
	f.Add(good[6 : len(good)-sha256.Size])
	f.Fuzz(func(t *testing.T, data []byte) {
		sealed := binary.LittleEndian.AppendUint16([]byte(partialMagic), PartialFormatVersion)
		sealed = append(sealed, data...)
		sum := sha256.Sum256(sealed)
		sealed = append(sealed, sum[:]...)
		for _, in := range [][]byte{data, sealed} {
			p, err := DecodePartial(in, "fuzz")
			if err != nil {
				var se *ShardError
				if !errors.As(err, &se) {
					t.Fatalf("not a *ShardError: %v", err)
				}
				continue
			}
			if err := p.Header.Validate(); err != nil {
				t.Fatalf("accepted an invalid header: %v", err)
			}
			if _, err := EncodePartial(p); err != nil {
				t.Fatalf("accepted file does not encode: %v", err)
			}
		}
	})
}
