package extent

import (
	"bufio"
	"encoding/json"
	"fmt"
	"os"
	"strings"
)

// brokenGeoJSON looks, in our own reading of the GeoJSON file at path,
// for a feature whose "geometry" GDAL cannot decode whole (read is how
// many features GDAL read). GDAL says nothing of one: a geometry it
// cannot decode at all (a type "Polygn", coordinates "abc") comes as
// none, as a null one does, and was skipped with the warning for a
// feature without geometry; a part of one it cannot decode (a
// MultiPolygon's second polygon "abc", a hole that is not a ring) is left
// out, and the rest read as if it were the whole. It returns the first
// such feature, numbered 1 for the first as the warnings number them,
// with what is wrong; 0 when there is none, when the file is not a
// feature collection or a feature, or when its features do not line up
// with GDAL's (then the numbering could name the wrong one). A read
// below 0 (GDAL could not open the file: some broken geometries make it
// refuse the whole file) skips that last check.
//
// The file is read as a stream, one feature at a time, so that a large
// file is never held whole in memory.
func brokenGeoJSON(path string, read int) (fid int, problem string) {
	f, err := os.Open(path)
	if err != nil {
		return 0, ""
	}
	defer f.Close()
	r := bufio.NewReaderSize(f, 1<<20)
	if bom, err := r.Peek(3); err == nil && string(bom) == "\xef\xbb\xbf" {
		r.Discard(3) // a UTF-8 byte order mark, as Windows editors write it: GDAL reads past it
	}
	dec := json.NewDecoder(r)
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return 0, ""
	}
	n := 0            // features seen
	var single []byte // the geometry of a file that is one Feature
	var hasSingle bool
	for dec.More() {
		key, err := dec.Token()
		if err != nil {
			return 0, ""
		}
		switch key {
		case "features":
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
					if p := geometryProblem(feat.Geometry); p != "" {
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
	if n == 0 && hasSingle && (read == 1 || read < 0) {
		if p := geometryProblem(single); p != "" {
			return 1, p
		}
		return 0, ""
	}
	if read >= 0 && n != read {
		return 0, ""
	}
	return fid, problem
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
