package extent

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"strings"
)

// jsonDialect is the JSON format of a feature file that brokenJSON reads
// itself: GDAL hands over a geometry it cannot decode in these as none.
type jsonDialect int

const (
	notJSON jsonDialect = iota
	// geoJSONDialect is GeoJSON: a FeatureCollection, a single Feature,
	// or a sequence of Features one a line, each line perhaps begun by
	// the record separator 0x1E (GeoJSONSeq, .geojsonl or .geojsons).
	geoJSONDialect
	// esriJSONDialect is the JSON of an ArcGIS REST query: "features"
	// of "attributes" and a "geometry" of "rings", "paths", "points" or
	// "x" and "y".
	esriJSONDialect
)

// dialectOfDriver is the dialect of a file GDAL opened with the driver
// of that short name; notJSON for any other driver.
func dialectOfDriver(driver string) jsonDialect {
	switch driver {
	case "GeoJSON", "GeoJSONSeq":
		return geoJSONDialect
	case "ESRIJSON":
		return esriJSONDialect
	}
	return notJSON
}

// sniffDialect guesses the dialect of a file GDAL could not open, from
// its first 64 KiB as GDAL tells an ArcGIS file from GeoJSON: the words
// only ArcGIS's JSON holds. Anything else is read as GeoJSON (whose scan
// finds nothing in a file that holds no features).
func sniffDialect(path string) jsonDialect {
	f, err := os.Open(path)
	if err != nil {
		return notJSON
	}
	defer f.Close()
	head := make([]byte, 64<<10)
	n, _ := io.ReadFull(f, head)
	head = head[:n]
	for _, w := range []string{`"esriGeometry`, `"esriFieldType`, `"fieldAliases"`} {
		if bytes.Contains(head, []byte(w)) {
			return esriJSONDialect
		}
	}
	return geoJSONDialect
}

// brokenJSON looks, in our own reading of the GeoJSON, GeoJSONSeq or
// ArcGIS JSON file at path (dialect says which), for a feature whose
// "geometry" GDAL cannot decode whole (read is how many features GDAL
// read). GDAL says nothing of one: a geometry it cannot decode at all (a
// type "Polygn", coordinates "abc", ArcGIS "rings" holding a null) comes
// as none, as a null one does, and was skipped with the warning for a
// feature without geometry; a part of a GeoJSON one it cannot decode (a
// MultiPolygon's second polygon "abc", a hole that is not a ring) is left
// out, and the rest read as if it were the whole. It returns the first
// such feature, numbered 1 for the first as the warnings number them,
// with what is wrong; 0 when there is none, when the file holds no
// features we can read, or when its features do not line up with GDAL's
// (then the numbering could name the wrong one). A read below 0 (GDAL
// could not open the file: some broken geometries make it refuse the
// whole file) skips that last check.
//
// The file is read as a stream, one feature at a time, so that a large
// file is never held whole in memory.
func brokenJSON(path string, dialect jsonDialect, read int) (fid int, problem string) {
	check := geometryProblem
	switch dialect {
	case notJSON:
		return 0, ""
	case esriJSONDialect:
		check = esriGeometryProblem
	}
	f, err := os.Open(path)
	if err != nil {
		return 0, ""
	}
	defer f.Close()
	r := bufio.NewReaderSize(f, 1<<20)
	if bom, err := r.Peek(3); err == nil && string(bom) == "\xef\xbb\xbf" {
		r.Discard(3) // a UTF-8 byte order mark, as Windows editors write it: GDAL reads past it
	}
	dec := json.NewDecoder(dropRS{r})
	n := 0 // features seen
	// Each top-level object: a collection, or a Feature (the file's only
	// one, or one of a sequence).
	for {
		t, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil || t != json.Delim('{') {
			return 0, ""
		}
		var single []byte // the geometry of an object that is a Feature
		var hasSingle, collection bool
		for dec.More() {
			key, err := dec.Token()
			if err != nil {
				return 0, ""
			}
			switch key {
			case "features":
				collection = true
				if t, err := dec.Token(); err != nil || t != json.Delim('[') {
					return 0, ""
				}
				for dec.More() {
					var feat struct {
						Geometry json.RawMessage `json:"geometry"`
					}
					if err := dec.Decode(&feat); err != nil {
						return 0, ""
					}
					n++
					if fid == 0 {
						if p := check(feat.Geometry); p != "" {
							fid, problem = n, p
						}
					}
				}
				if _, err := dec.Token(); err != nil {
					return 0, ""
				}
			case "geometry":
				var raw json.RawMessage
				if err := dec.Decode(&raw); err != nil {
					return 0, ""
				}
				single, hasSingle = raw, true
			default:
				var skip json.RawMessage
				if err := dec.Decode(&skip); err != nil {
					return 0, ""
				}
			}
		}
		if _, err := dec.Token(); err != nil {
			return 0, ""
		}
		if hasSingle && !collection {
			n++
			if fid == 0 {
				if p := check(single); p != "" {
					fid, problem = n, p
				}
			}
		}
	}
	if read >= 0 && n != read {
		return 0, ""
	}
	return fid, problem
}

// dropRS reads its reader without the record separators (0x1E) that begin
// each line of a GeoJSONSeq file written with them (.geojsons). JSON
// holds that byte nowhere else: in a string it must be escaped.
type dropRS struct{ r io.Reader }

func (d dropRS) Read(p []byte) (int, error) {
	for {
		n, err := d.r.Read(p)
		k := 0
		for _, b := range p[:n] {
			if b != 0x1e {
				p[k] = b
				k++
			}
		}
		if k > 0 || err != nil || n == 0 {
			return k, err
		}
	}
}

// geoJSONDepth is, for each GeoJSON geometry type (lower case, as GDAL
// reads the type whatever its case), how deeply its coordinates nest
// arrays around the numbers: a Point's [x, y] is 1, a Polygon's rings of
// points 3.
var geoJSONDepth = map[string]int{
	"point": 1, "multipoint": 2, "linestring": 2, "multilinestring": 3,
	"polygon": 3, "multipolygon": 4, "geometrycollection": 0,
}

// geoJSONShape says, for the message, how each type's coordinates nest.
var geoJSONShape = map[string]string{
	"point":           "one [longitude, latitude] pair",
	"multipoint":      "an array of [longitude, latitude] pairs",
	"linestring":      "an array of [longitude, latitude] pairs",
	"multilinestring": "an array of lines, each an array of [longitude, latitude] pairs",
	"polygon":         "an array of rings, each an array of [longitude, latitude] pairs",
	"multipolygon":    "an array of polygons, each an array of rings of [longitude, latitude] pairs",
}

// geometryProblem says what is wrong with a feature's "geometry" member
// (raw JSON; nil when the member is absent): "" for none or null (no
// geometry, which is allowed) and for a geometry we find nothing wrong
// with (an empty one, coordinates []).
func geometryProblem(raw json.RawMessage) string {
	s := strings.TrimSpace(string(raw))
	if s == "" || s == "null" {
		return ""
	}
	var g struct {
		Type        json.RawMessage   `json:"type"`
		Coordinates json.RawMessage   `json:"coordinates"`
		Geometries  []json.RawMessage `json:"geometries"`
	}
	if s[0] != '{' {
		return fmt.Sprintf("its \"geometry\" is %s, not an object with a \"type\" and \"coordinates\"", jsonKind(s))
	}
	if err := json.Unmarshal(raw, &g); err != nil {
		return "its \"geometry\" cannot be read (" + err.Error() + ")"
	}
	var typ string
	if err := json.Unmarshal(g.Type, &typ); err != nil || typ == "" {
		return "its geometry has no \"type\" (Polygon, MultiPolygon, ...)"
	}
	depth, ok := geoJSONDepth[strings.ToLower(typ)]
	if !ok {
		return fmt.Sprintf("its geometry type %q is not a GeoJSON type (Point, MultiPoint, LineString, MultiLineString, Polygon, MultiPolygon, GeometryCollection)", typ)
	}
	if depth == 0 {
		for i, m := range g.Geometries {
			if p := geometryProblem(m); p != "" {
				return fmt.Sprintf("member %d of its GeometryCollection: %s", i+1, strings.TrimPrefix(p, "its "))
			}
		}
		return ""
	}
	c := strings.TrimSpace(string(g.Coordinates))
	if c == "" || c == "null" {
		return fmt.Sprintf("its %s has no \"coordinates\"", typ)
	}
	if rest, ok := nestsNumbers(g.Coordinates, depth); !ok || len(skipSpace(rest)) != 0 {
		return fmt.Sprintf("its %s's \"coordinates\" are not numbers nested as %s", typ, geoJSONShape[strings.ToLower(typ)])
	}
	return ""
}

// esriParts is, for each member of an ArcGIS JSON geometry that holds
// coordinates, how deeply they nest arrays around the numbers and, for
// the message, how.
var esriParts = []struct {
	key   string
	depth int
	shape string
}{
	{"rings", 3, "an array of rings, each an array of [x, y] pairs"},
	{"paths", 3, "an array of paths, each an array of [x, y] pairs"},
	{"points", 2, "an array of [x, y] pairs"},
}

// esriGeometryProblem is geometryProblem for a feature of ArcGIS's JSON,
// whose "geometry" holds "rings" (a polygon: outer rings and holes
// alike), "paths", "points" or "x" and "y" and no type. GDAL decodes none
// of a geometry with a broken part (a hole "abc", an M value null): the
// feature comes without geometry. Nor does it decode true curves
// ("curveRings", as a query asking for them returns), which would be
// lost the same way.
func esriGeometryProblem(raw json.RawMessage) string {
	s := strings.TrimSpace(string(raw))
	if s == "" || s == "null" {
		return ""
	}
	if s[0] != '{' {
		return fmt.Sprintf("its \"geometry\" is %s, not an object with \"rings\"", jsonKind(s))
	}
	var g map[string]json.RawMessage
	if err := json.Unmarshal(raw, &g); err != nil {
		return "its \"geometry\" cannot be read (" + err.Error() + ")"
	}
	for _, p := range esriParts {
		c, ok := g[p.key]
		if !ok {
			continue
		}
		if rest, ok := nestsNumbers(c, p.depth); !ok || len(skipSpace(rest)) != 0 {
			null := ""
			if bytes.Contains(c, []byte("null")) {
				null = " (a null among them, as ArcGIS writes an M or Z value left empty, is not read either)"
			}
			return fmt.Sprintf("its %q are not numbers nested as %s%s", p.key, p.shape, null)
		}
		return ""
	}
	for _, k := range []string{"curveRings", "curvePaths"} {
		if _, ok := g[k]; ok {
			return fmt.Sprintf("its geometry is made of true curves (%q), which GDAL does not read; export it again with the curves as vertices (an ArcGIS REST query without returnTrueCurves=true gives them so)", k)
		}
	}
	if x, ok := g["x"]; ok {
		if _, ok := nestsNumbers([]byte("["+string(x)+","+string(g["y"])+"]"), 1); ok {
			return ""
		}
		return "its point's \"x\" and \"y\" are not both numbers"
	}
	return "its geometry has no \"rings\" (nor \"paths\", \"points\" or \"x\" and \"y\")"
}

// nestsNumbers reports whether b (valid JSON, as the decoder checked it)
// starts with depth arrays nested around positions: at depth 1 an array
// of two or more numbers; above it arrays (empty ones allowed) of what
// depth-1 holds. It returns what follows that value. The bytes are
// scanned, not decoded: a large polygon's coordinates make no values.
func nestsNumbers(b []byte, depth int) (rest []byte, ok bool) {
	b = skipSpace(b)
	if len(b) == 0 || b[0] != '[' {
		return nil, false
	}
	b = skipSpace(b[1:])
	count := 0
	for len(b) > 0 && b[0] != ']' {
		if count > 0 {
			if b[0] != ',' {
				return nil, false
			}
			b = skipSpace(b[1:])
		}
		if depth == 1 {
			if len(b) == 0 || !(b[0] == '-' || (b[0] >= '0' && b[0] <= '9')) {
				return nil, false
			}
			i := 1
			for i < len(b) && strings.IndexByte("0123456789.eE+-", b[i]) >= 0 {
				i++
			}
			b = skipSpace(b[i:])
		} else {
			var ok bool
			if b, ok = nestsNumbers(b, depth-1); !ok {
				return nil, false
			}
			b = skipSpace(b)
		}
		count++
	}
	if len(b) == 0 || (depth == 1 && count < 2) {
		return nil, false
	}
	return b[1:], true
}

// skipSpace drops the JSON white space at the start of b.
func skipSpace(b []byte) []byte {
	for len(b) > 0 && (b[0] == ' ' || b[0] == '\t' || b[0] == '\n' || b[0] == '\r') {
		b = b[1:]
	}
	return b
}

// jsonKind names the kind of JSON value s starts with.
func jsonKind(s string) string {
	switch s[0] {
	case '"':
		return "a string"
	case '[':
		return "an array"
	case 't', 'f':
		return "true or false"
	}
	return "a number"
}
