package shardfile

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"areasweep/cmd/internal/pass"
	"areasweep/extent"
	"areasweep/extent/nullmodel"
	"areasweep/metrics"
)

// A synthetic run: a grid of gw x gh cells, three members (every cell, the
// left half, the top rows), two passes with values from a fixed PCG
// stream, 1 in 11 cells without value, a 5 x 4 preview and a background.
const gw, gh = 23, 17

func cellValue(pass, cell int) float64 {
	if cell%11 == 0 {
		return math.NaN()
	}
	r := rand.New(rand.NewPCG(uint64(pass), uint64(cell)))
	return math.Round(r.Float64()*40) / 40 // ties on purpose
}

func inMember(k, cell int) bool {
	switch k {
	case 1:
		return cell%gw < gw/2
	case 2:
		return cell/gw < 6
	}
	return true
}

var members = []string{"all", "left", "top"}

// shardOf computes shard i of n of the synthetic run directly from the
// cells (as a pass over its rows would) and returns it with its header.
func shardOf(t *testing.T, i, n int, seed uint64, layouts []*metrics.Layout) *Shard {
	t.Helper()
	blocks, rows := Rows(i, n, gh)
	s := &Shard{Header: metrics.ShardHeader{Tool: "test", Settings: strings.Repeat("ab", 32), Seed: seed, Shard: i, Shards: n, TotalBlocks: gh, Blocks: blocks,
		Inputs: []metrics.InputChecksum{{Name: "model:m", SHA256: strings.Repeat("0", 64)}}},
		Run: []byte(`{"any":"json"}`), Width: gw, Height: gh, Members: members, PreviewWidth: 5, PreviewHeight: 4, Background: &nullmodel.Background{}}
	valid := make([]bool, gw*gh)
	for p, l := range layouts {
		ps := Pass{Name: fmt.Sprint("m", p), Layout: l}
		for range members {
			ps.Accs = append(ps.Accs, l.NewAccumulator())
		}
		for row := rows.First; row < rows.End; row++ {
			for c := 0; c < gw; c++ {
				cell := row*gw + c
				v := cellValue(p, cell)
				if math.IsNaN(v) {
					continue
				}
				w := int64(1000 + row)
				var st pass.Stats
				st.Min, st.Max, st.Area, st.FloorArea, st.AnyValid = v, v, w, w, true
				// The smallest values and (as if a run of the block held
				// them) every third cell's value with its area.
				st.Lowest.Add(v, w, metrics.LowestValues)
				if cell%3 == 0 {
					st.Runs.Add(v, w, metrics.MaxRunValues)
				}
				ps.Stats.Merge(st)
				for k := range members {
					if inMember(k, cell) {
						ps.Accs[k].Add(v, w)
						if p == 1 {
							s.Background.Add(k, []float64{v * 1e5}, []int64{w})
						}
					}
				}
				if p == 0 {
					valid[cell] = true
				}
			}
		}
		s.Passes = append(s.Passes, ps)
	}
	s.Valid = ValidRuns(extent.NewValidFunc(gw, gh, func(i int) bool { return valid[i] }), rows)
	for j := 0; j < 20; j++ {
		if src := (j/5)*4 + 1; src >= rows.First && src < rows.End {
			s.Preview = append(s.Preview, PreviewCell{j, float64(j) / 7})
		}
	}
	return s
}

func testLayouts(t *testing.T) []*metrics.Layout {
	var out []*metrics.Layout
	for _, vals := range [][]float64{{0.25, 0.5, 0.9}, {0.1, 0.775}} {
		l, err := metrics.NewLayout(vals, 64)
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, l)
	}
	return out
}

// summary is every merged number, as bytes.
func summary(m *Merged) string {
	var b strings.Builder
	for _, p := range m.Passes {
		for _, a := range p.Accs {
			b.Write(metrics.EncodeAccumulator(a))
		}
		fmt.Fprintf(&b, "%+v", p.Stats)
	}
	for row := 0; row < m.Valid.Height(); row++ {
		fmt.Fprint(&b, m.Valid.Row(row, nil))
	}
	fmt.Fprint(&b, m.Preview)
	b.Write(nullmodel.EncodeBackground(m.Background))
	return b.String()
}

// TestShardsMergeExactly: the synthetic run split into N = 1, 2, 3, 7 and
// 20 shards (20 shards of 17 rows leave three shards without a row), each
// encoded and decoded, merges in shuffled order to exactly the single
// shard's content; decoding then re-encoding gives the same bytes.
func TestShardsMergeExactly(t *testing.T) {
	layouts := testLayouts(t)
	whole := &Merged{}
	one := shardOf(t, 1, 1, 5, layouts)
	if err := whole.Add(one); err != nil {
		t.Fatal(err)
	}
	want := summary(whole)
	for _, n := range []int{1, 2, 3, 7, 20} {
		var shards []*Shard
		for i := 1; i <= n; i++ {
			data, err := Encode(shardOf(t, i, n, 5, layouts))
			if err != nil {
				t.Fatal(err)
			}
			s, err := Decode(data, fmt.Sprintf("shard-%d", i))
			if err != nil {
				t.Fatalf("N=%d shard %d: %v", n, i, err)
			}
			again, err := Encode(s)
			if err != nil || !bytes.Equal(again, data) {
				t.Fatalf("N=%d shard %d: decoded shard re-encodes differently (%v)", n, i, err)
			}
			shards = append(shards, s)
		}
		rand.New(rand.NewPCG(uint64(n), 2)).Shuffle(n, func(a, b int) { shards[a], shards[b] = shards[b], shards[a] })
		m := &Merged{}
		var headers []metrics.ShardHeader
		for _, s := range shards {
			if err := m.Add(s); err != nil {
				t.Fatalf("N=%d: %v", n, err)
			}
			headers = append(headers, s.Header)
		}
		if err := metrics.CheckShardSet(headers); err != nil {
			t.Fatalf("N=%d: %v", n, err)
		}
		if got := summary(m); got != want {
			t.Errorf("N=%d: merged content differs from the single shard's", n)
		}
	}
}

// TestDecodeRefuses: a partial file whose sections are damaged behind a
// valid envelope (so that only the section checks can catch them) is
// refused with a *metrics.ShardError naming the file.
func TestDecodeRefuses(t *testing.T) {
	layouts := testLayouts(t)
	data, err := Encode(shardOf(t, 2, 3, 5, layouts))
	if err != nil {
		t.Fatal(err)
	}
	pf, err := metrics.DecodePartial(data, "x")
	if err != nil {
		t.Fatal(err)
	}
	change := map[string]func([]byte) []byte{
		"meta":          func(b []byte) []byte { return bytes.Replace(b, []byte(`"width":23`), []byte(`"width":2`), 1) },
		"valid":         func(b []byte) []byte { return b[:len(b)-4] },
		"preview":       func(b []byte) []byte { return append(b, 1) },
		"pass/0/layout": func(b []byte) []byte { b[8] ^= 1; return b },
		"pass/1/stats":  func(b []byte) []byte { b[31] = 0x80; return b },
		"pass/0/stats":  func(b []byte) []byte { b[32] = 0; return b }, // area but no cell with data
		// More smallest values than the list keeps; a run's value (the
		// first, after the 16 smallest) out of order.
		"pass/1/stats lowest": func(b []byte) []byte { b[40] = 0xff; return b },
		"pass/1/stats runs":   func(b []byte) []byte { b[40+8+16*16+8] ^= 0x7f; b[40+8+16*16+15] = 0x7f; return b },
		"pass/0/acc/1":        func(b []byte) []byte { b[50] ^= 1; return b },
		"background":          func(b []byte) []byte { return b[:20] },
		"missing run":         nil,
		"unknown extras":      nil,
	}
	for name, fn := range change {
		t.Run(name, func(t *testing.T) {
			c := &metrics.PartialFile{Header: pf.Header}
			for _, s := range pf.Sections {
				d := bytes.Clone(s.Data)
				switch {
				case name == "missing run" && s.Name == "run":
					continue
				case s.Name == strings.Fields(name)[0] && fn != nil:
					d = fn(d)
				}
				c.Sections = append(c.Sections, metrics.PartialSection{Name: s.Name, Data: d})
			}
			if name == "unknown extras" {
				c.Sections = append(c.Sections, metrics.PartialSection{Name: "pass/9/acc/0", Data: []byte{1}})
			}
			enc, err := metrics.EncodePartial(c)
			if err != nil {
				t.Fatal(err)
			}
			_, err = Decode(enc, "shard-2-of-3.aspf")
			var se *metrics.ShardError
			if !errors.As(err, &se) || !strings.Contains(err.Error(), "shard-2-of-3.aspf") {
				t.Errorf("err = %v, want a ShardError naming the file", err)
			}
		})
	}
}

// TestMergedRefusesOtherRuns: shards whose layouts, members or rows
// disagree are refused by Add, naming the odd shard.
func TestMergedRefusesOtherRuns(t *testing.T) {
	layouts := testLayouts(t)
	other, err := metrics.NewLayout([]float64{0.25, 0.5, 0.95}, 64)
	if err != nil {
		t.Fatal(err)
	}
	for name, second := range map[string]*Shard{
		"layout":  shardOf(t, 2, 2, 5, []*metrics.Layout{other, layouts[1]}),
		"members": func() *Shard { s := shardOf(t, 2, 2, 5, layouts); s.Members = []string{"all", "left", "x"}; return s }(),
		"overlap": shardOf(t, 1, 2, 5, layouts),
	} {
		m := &Merged{}
		if err := m.Add(shardOf(t, 1, 2, 5, layouts)); err != nil {
			t.Fatal(err)
		}
		second.Header.Source = "odd.aspf"
		err := m.Add(second)
		if !errors.Is(err, metrics.ErrShardMismatch) || !strings.Contains(err.Error(), "odd.aspf") {
			t.Errorf("%s: err = %v", name, err)
		}
	}
}

// FuzzDecode feeds Decode raw bytes and valid partial files with sections
// changed behind a valid envelope. It must never panic, and what it
// accepts must encode, decode again and encode to the same bytes.
func FuzzDecode(f *testing.F) {
	l1, _ := metrics.NewLayout([]float64{0.25, 0.5, 0.9}, 64)
	l2, _ := metrics.NewLayout([]float64{0.1, 0.775}, 64)
	for _, n := range []int{1, 3} {
		s := shardOf(&testing.T{}, 1, n, 5, []*metrics.Layout{l1, l2})
		data, err := Encode(s)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data, "", []byte(nil))
		f.Add(data, "valid", []byte{0, 0, 0, 0})
		f.Add(data, "meta", []byte(`{"width":23,"height":17,"members":[],"passes":[],"preview_width":0,"preview_height":0,"background":false}`))
	}
	f.Fuzz(func(t *testing.T, data []byte, section string, replace []byte) {
		if section != "" {
			// Put replace in place of the named section, behind a valid
			// header and checksum, so that the section checks are reached.
			pf, err := metrics.DecodePartial(data, "fuzz")
			if err != nil {
				return
			}
			for i := range pf.Sections {
				if pf.Sections[i].Name == section {
					pf.Sections[i].Data = replace
				}
			}
			if data, err = metrics.EncodePartial(pf); err != nil {
				return
			}
		}
		s, err := Decode(data, "fuzz")
		if err != nil {
			return
		}
		a, err := Encode(s)
		if err != nil {
			t.Fatalf("accepted shard does not encode: %v", err)
		}
		s2, err := Decode(a, "fuzz")
		if err != nil {
			t.Fatalf("re-encoded shard is refused: %v", err)
		}
		b, err := Encode(s2)
		if err != nil || !bytes.Equal(a, b) {
			t.Fatalf("encoding is not stable (%v)", err)
		}
	})
}

// BenchmarkDecodeMerge measures what a merge does per partial file:
// decode it (checksums, every accumulator) and add it to the sum, for
// shards of 13 extents x 3 passes with layouts of 1,000 values and 4,096
// histogram bins (the benchmark study's size); bytes/s is file bytes.
func BenchmarkDecodeMerge(b *testing.B) {
	vals := make([]float64, 1000)
	for i := range vals {
		vals[i] = float64(i) / 1000
	}
	l, err := metrics.NewLayout(vals, 4096)
	if err != nil {
		b.Fatal(err)
	}
	ids := make([]string, 13)
	for k := range ids {
		ids[k] = fmt.Sprint("e", k)
	}
	mk := func(i int) []byte {
		blocks, _ := Rows(i, 4, 400)
		s := &Shard{Header: metrics.ShardHeader{Tool: "bench", Settings: strings.Repeat("cd", 32), Shard: i, Shards: 4, TotalBlocks: 400, Blocks: blocks},
			Run: []byte(`{}`), Width: 500, Height: 400, Members: ids, PreviewWidth: 1, PreviewHeight: 1}
		rng := rand.New(rand.NewPCG(uint64(i), 3))
		for p := range 3 {
			ps := Pass{Name: fmt.Sprint("m", p), Layout: l}
			for range ids {
				a := l.NewAccumulator()
				for range 20000 {
					a.Add(rng.Float64(), 1000)
				}
				ps.Accs = append(ps.Accs, a)
			}
			s.Passes = append(s.Passes, ps)
		}
		for range 100 {
			s.Valid = append(s.Valid, []int32{0, 500})
		}
		data, err := Encode(s)
		if err != nil {
			b.Fatal(err)
		}
		return data
	}
	files := [][]byte{mk(1), mk(2), mk(3), mk(4)}
	b.SetBytes(int64(len(files[0]) * len(files)))
	b.ReportAllocs()
	for b.Loop() {
		m := &Merged{}
		for _, f := range files {
			s, err := Decode(f, "bench")
			if err != nil {
				b.Fatal(err)
			}
			if err := m.Add(s); err != nil {
				b.Fatal(err)
			}
		}
	}
}
