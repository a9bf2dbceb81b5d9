package report

import (
	"fmt"
	"os"
	"path/filepath"
	"testing"
)

// widenSample adds k-1 copies of every extent of the sample run but its
// base extent (ids suffixed _cN, in no chain), each with the scores, ROC
// curves and paired records of the extent it copies: a family k times as
// wide with the same models, as a run with many buffer distances writes.
func widenSample(t testing.TB, k int) *Results {
	t.Helper()
	r := loadSample(t)
	base := BaseExtent(extentIDs(r))
	exts, scores, curves, paired := r.Extents, r.Scores, r.Curves, r.Paired
	var masks []string
	if r.Preview != nil {
		masks = r.Preview.Masks
	}
	for c := 1; c < k; c++ {
		name := func(id string) string {
			if id == base {
				return id
			}
			return fmt.Sprintf("%s_c%d", id, c)
		}
		for i, e := range exts {
			if e.ID == base {
				continue
			}
			e.ID, e.Chain, e.DuplicateOf = name(e.ID), "", ""
			r.Extents = append(r.Extents, e)
			if masks != nil {
				r.Preview.Masks = append(r.Preview.Masks, masks[i])
			}
		}
		for _, s := range scores {
			if s.Extent != base {
				s.Extent = name(s.Extent)
				r.Scores = append(r.Scores, s)
			}
		}
		for _, cv := range curves {
			if cv.Extent != base {
				cv.Extent = name(cv.Extent)
				r.Curves = append(r.Curves, cv)
			}
		}
		for _, p := range paired {
			if p.Extent != base {
				p.Extent, p.OtherExtent = name(p.Extent), name(p.OtherExtent)
				r.Paired = append(r.Paired, p)
			}
		}
	}
	return r
}

// extentIDs lists r's extent ids in order.
func extentIDs(r *Results) []string {
	var ids []string
	for _, e := range r.Extents {
		ids = append(ids, e.ID)
	}
	return ids
}

// BenchmarkAnalyzeWide times Analyze on the sample run widened to 1, 8
// and 64 times its extents (10 to 577 extents, 312 to 18,456 paired
// records).
func BenchmarkAnalyzeWide(b *testing.B) {
	for _, k := range []int{1, 8, 64} {
		r := widenSample(b, k)
		b.Run(fmt.Sprintf("extents=%d/paired=%d", len(r.Extents), len(r.Paired)), func(b *testing.B) {
			for b.Loop() {
				if err := Analyze(r); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkLoadWide times Load (the shape walk, decoding, Validate) of
// the sample run widened to 64 times its extents, written as a run
// writes it (about 30 MB).
func BenchmarkLoadWide(b *testing.B) {
	data, err := widenSample(b, 64).Encode()
	if err != nil {
		b.Fatal(err)
	}
	path := filepath.Join(b.TempDir(), "results.json")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Load(path); err != nil {
			b.Fatal(err)
		}
	}
}

// TestPairedForIndexed: pairedFor answers from the index newAnalysis
// makes, not by a scan of r.Paired at each call, which made the analysis
// quadratic in the paired records (11 s of an 18 s re-render of an 87 MB
// results.json; BenchmarkAnalyzeWide times it). A record whose key is
// changed after the index was made is still found under its old key,
// where a scan would find nothing. (A test of the time itself, 16 times
// the records against the sample's, passed alone but failed under other
// work on a 2-core machine.)
func TestPairedForIndexed(t *testing.T) {
	r := widenSample(t, 8)
	a := newAnalysis(r)
	p := &r.Paired[len(r.Paired)-1]
	metric := p.Metric
	p.Metric = "changed after the index"
	if got := a.pairedFor(metric, p.Kind, p.Model, p.Extent, p.OtherModel, p.OtherExtent); got != p {
		t.Errorf("pairedFor gave %p, want the last record %p: it no longer answers from the index", got, p)
	}
}

// TestPairedForFirstRecord: the index answers as the scan it replaced
// did: the first record of a metric, kind and pair of sides (a second
// one, as a hand edit may add, is not used), and nil for none.
func TestPairedForFirstRecord(t *testing.T) {
	r := loadSample(t)
	p0 := r.Paired[5]
	again := p0
	again.Diff += 1
	r.Paired = append(r.Paired, again)
	a := newAnalysis(r)
	if got := a.pairedFor(p0.Metric, p0.Kind, p0.Model, p0.Extent, p0.OtherModel, p0.OtherExtent); got != &r.Paired[5] {
		t.Errorf("pairedFor gave %+v, want the first record, paired[5] %+v", got, p0)
	}
	if got := a.pairedFor(p0.Metric, p0.Kind, p0.Model, p0.Extent, p0.OtherModel, "ghost"); got != nil {
		t.Errorf("pairedFor of an extent with no record gave %+v, want nil", got)
	}
}
