package extent

import (
	"encoding/json"
	"fmt"
	"os"
	"strings"
)

// brokenGeoJSON looks, in our own reading of the GeoJSON file at path,
// at the features GDAL handed over without a geometry (empty, numbered
// 1 for the first as the warnings number them; read is how many features
// GDAL read): GDAL says the same nothing for a "geometry" that is null
// and for one it cannot decode (a type "Polygn", coordinates "abc"), and
// the second was skipped as if it were the first. It returns the first
// such feature whose geometry is present but broken, with what is wrong;
// 0 when there is none, when the file is not a feature collection or a
// feature, or when its features do not line up with GDAL's (then the
// numbering could name the wrong one).
//
// The file is read as a stream, one feature at a time, so that a large
// file is never held whole in memory.
func brokenGeoJSON(path string, empty []int, read int) (fid int, problem string) {
	want := make(map[int]bool, len(empty))
	for _, n := range empty {
		want[n] = true
	}
	f, err := os.Open(path)
	if err != nil {
		return 0, ""
	}
	defer f.Close()
	dec := json.NewDecoder(f)
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
				if want[n] && fid == 0 {
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
	if n == 0 && hasSingle && read == 1 && want[1] {
		if p := geometryProblem(single); p != "" {
			return 1, p
		}
		return 0, ""
	}
	if n != read {
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
	var v interface{}
	if err := json.Unmarshal(g.Coordinates, &v); err != nil {
		return "its \"coordinates\" cannot be read (" + err.Error() + ")"
	}
	if !nestsNumbers(v, depth) {
		return fmt.Sprintf("its %s's \"coordinates\" are not numbers nested as %s", typ, geoJSONShape[strings.ToLower(typ)])
	}
	return ""
}

// nestsNumbers reports whether v is depth arrays deep around positions:
// at depth 1 an array of two or more numbers; above it arrays (empty
// ones allowed) of what depth-1 holds.
func nestsNumbers(v interface{}, depth int) bool {
	a, ok := v.([]interface{})
	if !ok {
		return false
	}
	if depth == 1 {
		if len(a) < 2 {
			return false
		}
		for _, x := range a {
			if _, ok := x.(float64); !ok {
				return false
			}
		}
		return true
	}
	for _, x := range a {
		if !nestsNumbers(x, depth-1) {
			return false
		}
	}
	return true
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
