package extent

import (
	"slices"
	"testing"

	"areasweep/extent/vocab"
)

// TestChainOnlyOnChainMembers: a member's chain (results.json and
// extents.csv `chain`) names a nested chain only when the member is in
// it, as README's "Only members with status ok enter a chain" says. An
// empty shrunk buffer (the 2° square shrunk by 500 km; 1° of latitude is
// about 111 km, from memory) and a grown buffer equal to another (500 and
// 1000 km both cover the 4° grid) kept the name "region" although the
// chain left them out, so a table grouped by chain put them in it.
func TestChainOnlyOnChainMembers(t *testing.T) {
	dir := t.TempDir()
	region := writeGeoJSON(t, dir, "r.geojson", []string{"r"}, [][][2]float64{{{1, 1}, {3, 1}, {3, 3}, {1, 3}, {1, 1}}})
	g, v := geoGrid(t, 0, 4, 0.1, 40, 40)
	f, err := Build(g, v, Spec{Region: region, RegionBuffersKm: []float64{-500, 100, 500, 1000}}, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]vocab.Status{"region_minus500km": vocab.StatusEmpty, "region_1000km": vocab.StatusDuplicate}
	for id, st := range want {
		if m := f.Members[memberIdx(t, f, id)]; m.Status != st {
			t.Fatalf("%s: status %s, want %s (the case this test is about)", id, m.Status, st)
		}
	}
	for k, m := range f.Members {
		in := m.Chain != "" && slices.Contains(f.Chains[m.Chain], k)
		if m.Chain != "" && !in {
			t.Errorf("%s (%s) names chain %q but is not in it (%v)", m.ID, m.Status, m.Chain, f.Chains[m.Chain])
		}
		for name, ks := range f.Chains {
			if slices.Contains(ks, k) && m.Chain != name {
				t.Errorf("%s is in chain %s but names %q", m.ID, name, m.Chain)
			}
		}
	}
	if got := len(f.Chains["region"]); got != 3 {
		t.Errorf("region chain has %d members, want 3 (base, region_100km, region_500km)", got)
	}
}
