package extent

import (
	"encoding/binary"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// geoJSONFrom builds a small GeoJSON file from fuzz bytes: up to four
// features, each a point, line, polygon (possibly degenerate or
// self-crossing), multipolygon or collection, with an id that may be
// missing, NULL, a number or a string, and coordinates that may be huge,
// repeated or across the antimeridian.
func geoJSONFrom(b []byte) string {
	next := func() byte {
		if len(b) == 0 {
			return 0
		}
		c := b[0]
		b = b[1:]
		return c
	}
	coord := func() float64 {
		if len(b) >= 9 && next()%16 == 0 {
			v := math.Float64frombits(binary.LittleEndian.Uint64(b))
			b = b[8:]
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return 1e308
			}
			return v
		}
		return float64(int8(next())) * 1.5
	}
	pt := func() string { return fmt.Sprintf("[%g,%g]", coord(), coord()) }
	ring := func() string {
		n := int(next()%6) + 1
		var p []string
		for i := 0; i < n; i++ {
			p = append(p, pt())
		}
		if next()%4 != 0 {
			p = append(p, p[0]) // closed, as GeoJSON asks
		}
		return "[" + strings.Join(p, ",") + "]"
	}
	var geom func(depth int) string
	geom = func(depth int) string {
		switch next() % 7 {
		case 0:
			return `{"type":"Point","coordinates":` + pt() + `}`
		case 1:
			return `{"type":"LineString","coordinates":[` + pt() + "," + pt() + `]}`
		case 2:
			return `{"type":"MultiPolygon","coordinates":[[` + ring() + `],[` + ring() + `]]}`
		case 3:
			if depth < 2 {
				return `{"type":"GeometryCollection","geometries":[` + geom(depth+1) + "," + geom(depth+1) + `]}`
			}
			return "null"
		case 4:
			return "null"
		default:
			return `{"type":"Polygon","coordinates":[` + ring() + `]}`
		}
	}
	var feats []string
	for n := int(next()%4) + 1; n > 0; n-- {
		id := []string{`"id":"a"`, `"id":null`, `"id":7`, ``, `"id":""`, `"id":"b"`}[next()%6]
		feats = append(feats, `{"type":"Feature","properties":{`+id+`},"geometry":`+geom(0)+`}`)
	}
	return `{"type":"FeatureCollection","features":[` + strings.Join(feats, ",") + `]}`
}

// FuzzReadUnits writes generated GeoJSON layers (or raw bytes that look
// like JSON) and reads them through the real reader, ReadUnits and
// ReadShape, on a small latitude-longitude grid, then rasterises what it
// returns. Every layer must be either refused with an error or give
// units with finite vertices; nothing may crash, panic or hang.
func FuzzReadUnits(f *testing.F) {
	f.Add([]byte{1, 5, 0, 4, 10, 20, 30, 40, 50, 60, 70, 80, 90, 100, 1})
	f.Add([]byte{2, 0, 1, 1, 2, 3, 4, 5, 6, 7, 8, 9})
	f.Add([]byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"a"},"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1],[0,0]]]}}]}`))
	f.Add([]byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":null},"geometry":{"type":"Polygon","coordinates":[[[170,0],[-170,0],[-170,1],[170,1],[170,0]]]}}]}`))
	g, err := NewGrid(40, 20, [6]float64{-20, 1, 0, 10, 0, -1}, "EPSG:4326")
	if err != nil {
		f.Fatal(err)
	}
	dir := f.TempDir()
	f.Fuzz(func(t *testing.T, b []byte) {
		body := string(b)
		if len(b) == 0 || b[0] != '{' {
			body = geoJSONFrom(b)
		}
		path := filepath.Join(dir, "layer.geojson")
		if err := os.WriteFile(path, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		check := func(s Shape) {
			for _, p := range s.Grid {
				for _, r := range p {
					for _, v := range r {
						if math.IsNaN(v[0]) || math.IsNaN(v[1]) {
							t.Fatalf("NaN vertex from %s", body)
						}
					}
				}
			}
			Fill(g, s.Grid, func(row, c0, c1 int) {
				if row < 0 || row >= g.Height || c0 < 0 || c1 > g.Width || c0 >= c1 {
					t.Fatalf("Fill gave row %d cells [%d,%d) on a %dx%d grid", row, c0, c1, g.Width, g.Height)
				}
			})
		}
		if units, _, err := ReadUnits(path, "id", g); err == nil {
			for _, u := range units {
				if u.ID == "" {
					t.Fatalf("unit with an empty id accepted from %s", body)
				}
				check(u.Shape)
			}
		}
		if s, _, err := ReadShape(path, g); err == nil {
			check(s)
		}
	})
}
