package report

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"
)

// twinFamily is manyExtents(t, n) with every model scored and given a
// curve on every extent, and with the hull (in no chain) given the area
// of the points chain's member points_<d>km: two extents outside one
// chain of one area, as a region buffer and a point buffer can be.
func twinFamily(t *testing.T, n int, d string) (*Results, string) {
	t.Helper()
	r := scoredEverywhere(manyExtents(t, n))
	twin := "points_" + d + "km"
	area := 0.0
	for _, e := range r.Extents {
		if e.ID == twin {
			area = e.AreaKm2
		}
	}
	if area == 0 {
		t.Fatalf("no extent %s", twin)
	}
	for i := range r.Extents {
		if r.Extents[i].ID == "hull" {
			r.Extents[i].AreaKm2 = area
		}
	}
	r.Curves = nil
	for _, m := range r.Models {
		for _, e := range r.Extents {
			r.Curves = append(r.Curves, Curve{Model: m.Name, Extent: e.ID, X: []float64{0, 0.2, 1}, Y: []float64{0, 0.7, 1}})
		}
	}
	return analyzedSampleWith(t, r), twin
}

// rocCurveLooks returns the line styles of the ROC figure's curves on the
// area ramp (width 1.1 pt), each once, as colour and dash pattern.
func rocCurveLooks(t *testing.T, f figure) map[string]bool {
	t.Helper()
	rec := &recorder.Canvas{}
	if err := f.draw(draw.NewCanvas(rec, f.W, f.H)); err != nil {
		t.Fatal(err)
	}
	looks := map[string]bool{}
	var c string
	var w vg.Length
	var d []vg.Length
	for _, a := range rec.Actions {
		switch a := a.(type) {
		case *recorder.SetColor:
			c = svgColor(a.Color)
		case *recorder.SetLineWidth:
			w = a.Width
		case *recorder.SetLineDash:
			d = a.Dashes
		case *recorder.Stroke:
			if w == vg.Points(1.1) {
				looks[fmt.Sprintf("%s %v", c, d)] = true
			}
		}
	}
	return looks
}

// TestROCTwinExtentsApart: two extents of one area that are not in one
// nested chain (the hull and a point buffer) took one colour of the area
// ramp, so their curves could not be told apart. Every curve on the ramp
// now has a look of its own (colour and dash), and the key names the
// twins; the colour stays the area's.
func TestROCTwinExtentsApart(t *testing.T) {
	r, twin := twinFamily(t, 13, "100")
	f := rocFigure(r)
	all, _ := rocCurveExtents(r, rocExtents(r))
	es, _ := rocShown(all)
	onRamp := 0
	for _, e := range es {
		if _, anchor := rocAnchorStyle(e.Kind); !anchor {
			onRamp++
		}
	}
	if looks := rocCurveLooks(t, f); len(looks) != onRamp {
		t.Errorf("%d curves on the area ramp drawn in %d looks: %v", onRamp, len(looks), looks)
	}
	texts := drawnTexts(t, f)
	for _, id := range []string{"hull", twin} {
		found := false
		for _, s := range texts {
			found = found || s == id
		}
		if !found {
			t.Errorf("the ROC key does not name %s", id)
		}
	}
	// Without twins, no curve is dashed and the key names none.
	plain := scoredEverywhere(manyExtents(t, 13))
	for _, s := range drawnTexts(t, rocFigure(analyzedSampleWith(t, plain))) {
		if s == "hull" {
			t.Error("the key names the hull, which has no twin")
		}
	}
}

// TestMapTwinExtentsApart: on a map panel of the extents in no chain past
// maxNamed members (coloured by area), two of one area took one colour.
// They now differ in dash, keep the ramp's colour for their area, and the
// key names them.
func TestMapTwinExtentsApart(t *testing.T) {
	r := manyExtents(t, 256) // 8 user extents and the hull in no chain
	var g mapGroup
	for _, gg := range mapGroups(r) {
		if gg.title == "extents in no chain" {
			g = gg
		}
	}
	if len(g.members) <= maxNamed {
		t.Fatalf("no-chain panel of %d members: the check needs the area ramp", len(g.members))
	}
	// user_0 takes user_1's area: twins outside any chain.
	var q0, q1 int
	for q, ei := range g.members {
		switch r.Extents[ei].ID {
		case "user_0":
			q0 = q
		case "user_1":
			q1 = q
		}
	}
	r.Extents[g.members[q0]].AreaKm2 = r.Extents[g.members[q1]].AreaKm2
	k := mapKeyOf(r, g)
	if k.ramp == nil {
		t.Fatal("no area ramp")
	}
	a, b := k.styles[q0], k.styles[q1]
	if sameLine(a, b) {
		t.Errorf("user_0 and user_1, of one area, drawn alike: %v", a)
	}
	if a.Color != b.Color {
		t.Errorf("user_0 and user_1, of one area, in colours %v and %v: the colour is the area's", a.Color, b.Color)
	}
	names := map[string]bool{}
	for _, it := range append(k.named, k.twins...) {
		names[it.label] = true
	}
	if !names["user_0"] || !names["user_1"] {
		t.Errorf("the key names %v, not both twins", names)
	}
	// Every member named has a twin: another within rampTwinGap on the
	// ramp (in this family the hull and user_6 are discs of one radius,
	// so they are twins too), and every member with one is named.
	most := 0.0
	for _, ei := range g.members {
		most = max(most, r.Extents[ei].AreaKm2)
	}
	div, _ := areaAxis(most)
	pos := func(ei int) float64 { return k.ramp.t(r.Extents[ei].AreaKm2 / div) }
	for _, ei := range g.members {
		id, has := r.Extents[ei].ID, false
		for _, ej := range g.members {
			has = has || (ej != ei && math.Abs(pos(ei)-pos(ej)) < rampTwinGap)
		}
		if names[id] != has {
			t.Errorf("%s named %v, has a twin %v", id, names[id], has)
		}
	}
}

// TestTwinDashes: members within rampTwinGap of one another and not in
// one chain each take a pattern of their own, however many (our
// constructed cases); members of one chain, and members farther apart,
// stay solid and are no twins.
func TestTwinDashes(t *testing.T) {
	cases := []struct {
		name     string
		ts       []float64
		chains   []string
		wantTwin []bool
	}{
		{"apart", []float64{0, 0.5, 1}, []string{"", "", ""}, []bool{false, false, false}},
		{"one area, no chain", []float64{0.5, 0.5}, []string{"", ""}, []bool{true, true}},
		{"one area, two chains", []float64{0.3, 0.3}, []string{"region", "points"}, []bool{true, true}},
		{"one chain", []float64{0.3, 0.31}, []string{"region", "region"}, []bool{false, false}},
		{"just apart", []float64{0.3, 0.3 + rampTwinGap}, []string{"", ""}, []bool{false, false}},
		{"chain and stranger", []float64{0.3, 0.305, 0.31}, []string{"region", "region", ""}, []bool{true, true, true}},
	}
	// Twelve of one area, more than the patterns of dashes.
	many := struct {
		name     string
		ts       []float64
		chains   []string
		wantTwin []bool
	}{name: "twelve"}
	for range 12 {
		many.ts, many.chains, many.wantTwin = append(many.ts, 0.7), append(many.chains, ""), append(many.wantTwin, true)
	}
	cases = append(cases, many)
	for _, c := range cases {
		dash, twin := twinDashes(c.ts, c.chains)
		for i := range c.ts {
			if twin[i] != c.wantTwin[i] {
				t.Errorf("%s: member %d twin %v, want %v", c.name, i, twin[i], c.wantTwin[i])
			}
			if !twin[i] && dash[i] != 0 {
				t.Errorf("%s: member %d has no twin but pattern %d", c.name, i, dash[i])
			}
			for j := range i {
				near := math.Abs(c.ts[i]-c.ts[j]) < rampTwinGap && (c.chains[i] == "" || c.chains[i] != c.chains[j])
				if near && fmt.Sprint(twinDash(dash[i])) == fmt.Sprint(twinDash(dash[j])) {
					t.Errorf("%s: twins %d and %d share the pattern %v", c.name, j, i, twinDash(dash[i]))
				}
			}
		}
	}
	seen := map[string]int{}
	for k := range 200 {
		p := fmt.Sprint(twinDash(k))
		if j, ok := seen[p]; ok {
			t.Errorf("twinDash(%d) = twinDash(%d) = %s", k, j, p)
		}
		seen[p] = k
	}
}
