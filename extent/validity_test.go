package extent

import (
	"fmt"
	"math"
	"strings"
	"syscall"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestInvalidReason: GEOS's reasons (the phrases of
// geos::operation::valid::TopologyValidationError, as GDAL 3.6 with GEOS
// 3.11 raises them from OGR_G_IsValid, checked with
// osgeo.ogr.Geometry.IsValid under gdal.PushErrorHandler) become our words;
// anything else gives "", never the raw text.
func TestInvalidReason(t *testing.T) {
	for _, c := range []struct{ raw, want string }{
		{"Self-intersection at or near point 0.5 0.5", "a self-intersection at or near 0.5 0.5"},
		{"Ring Self-intersection at or near point 1 2", "a ring self-intersection at or near 1 2"},
		{"Hole lies outside shell at or near point 20 20", "hole lies outside shell at or near 20 20"},
		{"Interior is disconnected at or near point -3.25 1e-07", "interior is disconnected at or near -3.25 1e-07"},
		{"Too few distinct points in geometry component at or near point 1 1", "too few distinct points in geometry component at or near 1 1"},
		{"Nested shells at or near point 5 5", "nested shells at or near 5 5"},
		{"Invalid Coordinate at or near point nan nan", "invalid coordinate at or near nan nan"},
		{"Ring is not closed", "ring is not closed"},
		{"Topology Validation Error at or near point 0 0", ""},
		{"", ""},
		{"GEOSisValid_r: IllegalArgumentException: Points of LinearRing do not form a closed linestring", ""},
		{"ERROR 1: Self-intersection at or near point 0 0", ""},
	} {
		if got := invalidReason(c.raw); got != c.want {
			t.Errorf("invalidReason(%q) = %q, want %q", c.raw, got, c.want)
		}
	}
}

// TestRepairWarningGivesReason: a region with invalid features is repaired
// with a warning that names the file, each feature and why GEOS found it
// invalid, in our words and the layer's coordinates.
func TestRepairWarningGivesReason(t *testing.T) {
	dir := t.TempDir()
	g, _ := geoGrid(t, 0, 4, 0.1, 40, 40)
	// A bow-tie whose edges cross at (2, 2) (by construction).
	bow := [][2]float64{{1, 1}, {3, 3}, {3, 1}, {1, 3}, {1, 1}}
	// Another bow-tie, crossing at (2.5, 0.5).
	bow2 := [][2]float64{{2, 0}, {3, 1}, {3, 0}, {2, 1}, {2, 0}}
	square := [][2]float64{{0.2, 0.2}, {0.8, 0.2}, {0.8, 0.8}, {0.2, 0.8}, {0.2, 0.2}}
	for _, c := range []struct {
		name  string
		rings [][][2]float64
		want  []string
	}{
		{"one", [][][2]float64{bow}, []string{"one.geojson feature 1 had invalid geometry (a self-intersection at or near 2 2, in the layer's coordinates); repaired with GDAL MakeValid"}},
		{"two", [][][2]float64{square, bow, bow2}, []string{"two.geojson features 2, 3 had invalid geometry (feature 2: a self-intersection at or near 2 2; feature 3: a self-intersection at or near 2.5 0.5, in the layer's coordinates)"}},
	} {
		ids := make([]string, len(c.rings))
		for i := range ids {
			ids[i] = "u"
		}
		path := writeGeoJSON(t, dir, c.name+".geojson", ids, c.rings)
		_, warns, err := ReadShape(path, g)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		all := strings.Join(warns, "\n")
		for _, w := range c.want {
			if !strings.Contains(all, w) {
				t.Errorf("%s: warnings\n%s\nlack %q", c.name, all, w)
			}
		}
		if strings.Contains(all, "Self-intersection") || strings.Contains(all, "point 2 2") {
			t.Errorf("%s: GEOS's raw words in %q", c.name, all)
		}
	}
}

// BenchmarkValidity times the validity check of one polygon of n vertices
// (a circle, valid, so GEOS walks it all): GDAL's OGR_G_IsValid through
// godal (what the check was) and validity (a WKB copy into a geometry of
// its own, then the same check under a handler of its own), in process
// CPU ns per check (getrusage, user + system) beside the wall ns/op.
func BenchmarkValidity(b *testing.B) {
	for _, n := range []int{100, 10000} {
		var sb strings.Builder
		sb.WriteString("POLYGON((")
		for i := 0; i <= n; i++ {
			a := 2 * math.Pi * float64(i%n) / float64(n)
			if i > 0 {
				sb.WriteString(",")
			}
			fmt.Fprintf(&sb, "%.9f %.9f", math.Cos(a), math.Sin(a))
		}
		sb.WriteString("))")
		g, err := godal.NewGeometryFromWKT(sb.String(), nil)
		if err != nil {
			b.Fatal(err)
		}
		for _, way := range []struct {
			name string
			f    func() bool
		}{{"godal", g.Valid}, {"validity", func() bool { ok, _ := validity(g); return ok }}} {
			b.Run(fmt.Sprintf("vertices=%d/%s", n, way.name), func(b *testing.B) {
				b.ReportAllocs()
				c0 := cpuNanos()
				for i := 0; i < b.N; i++ {
					if !way.f() {
						b.Fatal("a circle is valid")
					}
				}
				b.ReportMetric(float64(cpuNanos()-c0)/float64(b.N), "cpu-ns/op")
			})
		}
		g.Close()
	}
}

// cpuNanos is the process's CPU time (user + system) in ns.
func cpuNanos() int64 {
	var ru syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &ru)
	return ru.Utime.Nano() + ru.Stime.Nano()
}
