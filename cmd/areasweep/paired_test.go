package main

import (
	"math"
	"path/filepath"
	"testing"

	"areasweep/extent/vocab"
	"areasweep/metrics"
	"areasweep/report"
)

// TestPairedAgainstRawCells runs the small study and recomputes, from the
// raw cells of each extent (membership from extents.tif, areas by the
// authalic-latitude formula), every test point's placement and the paired
// AUC differences from the base extent; and checks that model "sq", the
// square of "m", has the same placements, so every paired AUC difference
// between the two is 0 with SE 0 (a monotone transform keeps the ranking).
func TestPairedAgainstRawCells(t *testing.T) {
	s := newSmallStudy(t)
	out := filepath.Join(s.dir, "out")
	_, se, code := runBin(t, s.args(out)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, se)
	}
	res := loadResults(t, out)
	names, bands := readBands(t, filepath.Join(out, "extents.tif"))
	areaRow := make([]float64, s.h)
	for r := range areaRow {
		top := 48 - float64(r)*0.25
		areaRow[r] = cellAreaKm2(top-0.25, top, 0.25)
	}
	cellOf := map[int]int{}
	for _, p := range res.Points {
		if p.Role == vocab.RoleTest && p.Status == vocab.PointScored {
			cellOf[p.ID] = p.Row*s.w + p.Col
		}
	}
	// placements[extent][point id] from raw cells: (W(<v) + W(=v)/2) / W.
	placements := map[string]map[int]float64{}
	for k, id := range names {
		var tot float64
		for i, b := range bands[k] {
			if b == 1 && !math.IsNaN(s.vals[i]) {
				tot += areaRow[i/s.w]
			}
		}
		pl := map[int]float64{}
		for pid, c := range cellOf {
			if bands[k][c] != 1 {
				continue
			}
			v := s.vals[c]
			var below float64
			for i, b := range bands[k] {
				if b != 1 || math.IsNaN(s.vals[i]) {
					continue
				}
				switch {
				case s.vals[i] < v:
					below += areaRow[i/s.w]
				case s.vals[i] == v:
					below += areaRow[i/s.w] / 2
				}
			}
			pl[pid] = below / tot
		}
		placements[id] = pl
	}
	checked := 0
	for _, sc := range res.Scores {
		if sc.Model != "m" || !sc.Scored {
			continue
		}
		if len(sc.Placements) != len(sc.TestPointIDs) || len(sc.Placements) != sc.TestPoints {
			t.Fatalf("%s: %d placements for %d ids and %d test points", sc.Extent, len(sc.Placements), len(sc.TestPointIDs), sc.TestPoints)
		}
		for i, pid := range sc.TestPointIDs {
			if want := placements[sc.Extent][pid]; math.Abs(sc.Placements[i]-want) > 1e-9 {
				t.Errorf("%s point %d: placement %.12f, raw cells %.12f", sc.Extent, pid, sc.Placements[i], want)
			}
			checked++
		}
	}
	if checked == 0 {
		t.Fatal("no placement checked")
	}
	pairs := 0
	for _, p := range res.Paired {
		if p.Metric != "auc" {
			continue
		}
		switch {
		case p.Kind == report.PairedKindExtent && p.Model == "m":
			a, b := placements[p.Extent], placements[p.OtherExtent]
			var d []float64
			for pid, va := range a {
				if vb, ok := b[pid]; ok {
					d = append(d, va-vb)
				}
			}
			if len(d) != p.CommonPoints || p.Defined != (len(d) >= 2) {
				t.Errorf("%s - %s: %d common points (defined %v), raw cells %d", p.Extent, p.OtherExtent, p.CommonPoints, p.Defined, len(d))
				continue
			}
			if len(d) < 2 {
				continue // one point has no SE: undefined, as checked above
			}
			var m, ss float64
			for _, x := range d {
				m += x
			}
			m /= float64(len(d))
			for _, x := range d {
				ss += (x - m) * (x - m)
			}
			sd := math.Sqrt(ss / float64(len(d)*(len(d)-1)))
			if math.Abs(p.Diff-m) > 1e-9 || math.Abs(val(p.SE)-sd) > 1e-9 || math.Abs(val(p.Low)-(m-metrics.T975(len(d)-1)*sd)) > 1e-9 {
				t.Errorf("%s - %s: diff %.12f SE %.12f, raw cells %.12f %.12f", p.Extent, p.OtherExtent, p.Diff, val(p.SE), m, sd)
			}
			pairs++
		case p.Kind == report.PairedKindModel && p.Model == "m" && p.OtherModel == "sq":
			// Defined: 0 with SE 0; undefined (one common point): no SE.
			if p.Diff != 0 || p.Defined != (p.CommonPoints >= 2) || p.Defined && val(p.SE) != 0 || !p.Defined && p.SE != nil {
				t.Errorf("m - sq on %s: %+v, want exactly 0 with SE 0 (none when undefined)", p.Extent, p)
			}
			pairs++
		}
	}
	if pairs < 3 {
		t.Errorf("checked %d paired AUC records", pairs)
	}
	if res.SchemaVersion != report.SchemaVersion {
		t.Errorf("schema_version %d", res.SchemaVersion)
	}
}
