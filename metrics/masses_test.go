package metrics

import (
	"errors"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"testing"
)

// TestMassListMergeExact: a MassList of cells split into parts and merged
// in any order is the list of adding every cell to one: the cap smallest
// distinct values, each with the whole area of its cells, and Cut exactly
// when there were more values (worked out by a map of every value).
func TestMassListMergeExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for rep := 0; rep < 500; rep++ {
		cap := 1 + rng.IntN(6)
		nv := 1 + rng.IntN(12)
		cells := make([]Mass, rng.IntN(60))
		for i := range cells {
			cells[i] = Mass{float64(rng.IntN(nv)) - 3, 1 + rng.Int64N(9)}
		}
		total := map[float64]int64{}
		for _, c := range cells {
			total[c.Value] += c.Area
		}
		keys := slices.Sorted(func(yield func(float64) bool) {
			for k := range total {
				if !yield(k) {
					return
				}
			}
		})
		var want MassList
		for _, k := range keys[:min(cap, len(keys))] {
			want.Masses = append(want.Masses, Mass{k, total[k]})
		}
		want.Cut = len(keys) > cap
		// Parts of the cells, in a shuffled order, merged in another.
		rng.Shuffle(len(cells), func(i, j int) { cells[i], cells[j] = cells[j], cells[i] })
		var parts []MassList
		for i := 0; i < len(cells); {
			j := i + 1 + rng.IntN(10)
			var p MassList
			for _, c := range cells[i:min(j, len(cells))] {
				p.Add(c.Value, c.Area, cap)
			}
			parts = append(parts, p)
			i = j
		}
		rng.Shuffle(len(parts), func(i, j int) { parts[i], parts[j] = parts[j], parts[i] })
		var got MassList
		for _, p := range parts {
			got.Merge(p, cap)
		}
		if len(got.Masses) == 0 {
			got.Masses = nil
		}
		if !reflect.DeepEqual(got, want) {
			t.Fatalf("cap %d, %d cells: merged %v, want %v", cap, len(cells), got, want)
		}
	}
}

// TestMassListEncode: a list reads back as written, and bytes that are no
// list are refused.
func TestMassListEncode(t *testing.T) {
	l := MassList{Masses: []Mass{{-1, 3}, {0, 7}, {2.5, 1}}, Cut: true}
	b := append(l.Encode(), 9, 9)
	got, rest, err := DecodeMassList(b, 3)
	if err != nil || !reflect.DeepEqual(got, l) || !slices.Equal(rest, []byte{9, 9}) {
		t.Fatalf("read back %v, rest %v, err %v; want %v", got, rest, err, l)
	}
	bad := map[string][]byte{
		"short":        {1, 0},
		"too many":     l.Encode(),
		"out of order": MassList{Masses: []Mass{{1, 1}, {0, 1}}}.Encode(),
		"negative":     MassList{Masses: []Mass{{1, -1}}}.Encode(),
		"cut not full": MassList{Masses: []Mass{{1, 1}}, Cut: true}.Encode(),
		"truncated":    l.Encode()[:30],
	}
	for name, b := range bad {
		max := 3
		if name == "too many" {
			max = 2
		}
		if _, _, err := DecodeMassList(b, max); !errors.Is(err, ErrMassList) {
			t.Errorf("%s: err %v, want ErrMassList", name, err)
		}
	}
}

// TestAreaRandomMasses: how newAreaModel reads the pass's point masses
// on a model of many values (4,000 cells uniform on (0.1, 1], 60 test
// points among them; the cut-off is 0.1 / 60 of the extent, 6.7 cells):
//
//   - a plateau of 600 cells at 0.5 that only the runs list (its runs
//     holding 600 cells) is refused, the note naming 0.5 and its bound
//     (the spread area of its histogram bin: the 600 cells and the few of the base there, of 4,600, 13.1%);
//   - the same plateau not listed is read as continuous (the limit the
//     README states: a plateau without long runs is not seen);
//   - a floor of 400 cells at 0.05 hidden by one cell at 0.01, listed
//     among the smallest values with the extent holding the whole raster,
//     is an atom (a p, no note), and in an extent that holds only part of
//     the raster (the raster's area larger) is refused, naming 0.05.
func TestAreaRandomMasses(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 32))
	base := make([]float64, 4000)
	for i := range base {
		base[i] = 0.1 + 0.9*rng.Float64()
	}
	test := make([]float64, 60)
	for i := range test {
		test[i] = base[rng.IntN(len(base))]
	}
	plateau := append(slices.Clone(base), slices.Repeat([]float64{0.5}, 600)...)
	floor := append(append(slices.Clone(base), 0.01), slices.Repeat([]float64{0.05}, 400)...)
	var lowest MassList
	for _, v := range floor {
		lowest.Add(v, 1, LowestValues)
	}
	for _, c := range []struct {
		name  string
		cells []float64
		set   Settings
		note  string // "" for a p
	}{
		{"plateau listed", plateau, Settings{ModelRuns: MassList{Masses: []Mass{{0.5, 600}}}, ModelArea: 4600}, "the model's value 0.5, which no test point takes, holds up to 13.1%"},
		{"plateau not listed", plateau, Settings{ModelArea: 4600}, ""},
		{"floor, whole raster", floor, Settings{ModelLowest: lowest, ModelArea: 4401}, ""},
		{"floor, part of the raster", floor, Settings{ModelLowest: lowest, ModelArea: 8000}, "the model's value 0.05, which no test point takes, holds up to 9.09%"},
	} {
		acc := unitCells(t, test, c.cells, 4096)
		c.set.E, c.set.Iterations = []float64{0.05}, 200
		sc, err := Score(acc, nil, test, c.set)
		if err != nil {
			t.Fatal(err)
		}
		pr := sc.PartialROC[0]
		if !pr.Formed {
			t.Fatalf("%s: the ratio is not formed", c.name)
		}
		switch {
		case c.note == "" && (pr.PRandom == 0 || pr.PRandomNote != ""):
			t.Errorf("%s: p %g, note %q; want a p", c.name, pr.PRandom, pr.PRandomNote)
		case c.note != "" && (pr.PRandom != 0 || !strings.HasPrefix(pr.PRandomNote, c.note)):
			t.Errorf("%s: p %g, note %q; want refused with %q", c.name, pr.PRandom, pr.PRandomNote, c.note)
		}
	}
}
