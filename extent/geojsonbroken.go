package extent

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"strconv"
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
	switch dialect {
	case geoJSONDialect:
		return scanJSON(path, read, geometryProblem)
	case esriJSONDialect:
		return scanJSON(path, read, esriGeometryProblem)
	}
	return 0, ""
}

// openRingJSON returns the first feature (numbered 1 for the first) of
// the GeoJSON, GeoJSONSeq or ArcGIS JSON file at path (dialect says
// which) that holds a polygon ring not ending at its first point, and
// which ring; 0 when there is none. GDAL refuses the whole file for such
// a ring without naming the feature: this names it.
func openRingJSON(path string, dialect jsonDialect) (fid int, ring string) {
	switch dialect {
	case geoJSONDialect:
		return scanJSON(path, -1, geoJSONOpenRing)
	case esriJSONDialect:
		return scanJSON(path, -1, esriOpenRing)
	}
	return 0, ""
}

// scanJSON reads the features of the GeoJSON, GeoJSONSeq or ArcGIS JSON
// file at path as a stream and returns the first (numbered 1 for the
// first) whose "geometry" member check finds something wrong with, and
// what; see brokenJSON for read.
func scanJSON(path string, read int, check func(json.RawMessage) string) (fid int, problem string) {
	dec, closeFile, err := jsonStream(path)
	if err != nil {
		return 0, ""
	}
	defer closeFile()
	n := 0                       // features seen
	objects, collections := 0, 0 // top-level objects seen, and collections among them
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
		objects++
		if collection {
			collections++
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
	if (read >= 0 && n != read) || (collections > 0 && objects > 1) {
		// A collection followed by more is no file GDAL reads: its own
		// message (the JSON is not valid there) is the one to give.
		return 0, ""
	}
	return fid, problem
}

// jsonStream opens the JSON file at path for reading as a stream of
// tokens, past a UTF-8 byte order mark (as Windows editors write one:
// GDAL reads past it) and without record separators (see dropRS).
func jsonStream(path string) (*json.Decoder, func(), error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, err
	}
	r := bufio.NewReaderSize(f, 1<<20)
	if bom, err := r.Peek(3); err == nil && string(bom) == "\xef\xbb\xbf" {
		r.Discard(3)
	}
	return json.NewDecoder(dropRS{r}), func() { f.Close() }, nil
}

// skipValue reads past the next value of dec token by token, so that a
// large one (a TopoJSON file's arcs) is never held whole.
func skipValue(dec *json.Decoder) error {
	depth := 0
	for {
		t, err := dec.Token()
		if err != nil {
			return err
		}
		switch t {
		case json.Delim('{'), json.Delim('['):
			depth++
		case json.Delim('}'), json.Delim(']'):
			depth--
		}
		if depth == 0 {
			return nil
		}
	}
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
	return nestedArrays(b, depth, 2, number)
}

// nestedArrays reports whether b starts with depth arrays nested around
// values that leaf reads (it returns what follows one, ok false when b
// does not start with one), the innermost arrays holding at least
// minInner of them, the others any number; and returns what follows.
func nestedArrays(b []byte, depth, minInner int, leaf func([]byte) ([]byte, bool)) (rest []byte, ok bool) {
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
		var ok bool
		if depth == 1 {
			b, ok = leaf(b)
		} else {
			b, ok = nestedArrays(b, depth-1, minInner, leaf)
		}
		if !ok {
			return nil, false
		}
		b = skipSpace(b)
		count++
	}
	if len(b) == 0 || (depth == 1 && count < minInner) {
		return nil, false
	}
	return b[1:], true
}

// number reads the JSON number b starts with and returns what follows.
func number(b []byte) (rest []byte, ok bool) {
	lit, rest := numberLiteral(b)
	return rest, lit != nil
}

// numberLiteral splits the JSON number b starts with from what follows;
// lit is nil when b does not start with a number.
func numberLiteral(b []byte) (lit, rest []byte) {
	if len(b) == 0 || !(b[0] == '-' || (b[0] >= '0' && b[0] <= '9')) {
		return nil, b
	}
	i := 1
	for i < len(b) && strings.IndexByte("0123456789.eE+-", b[i]) >= 0 {
		i++
	}
	return b[:i], b[i:]
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

// topoArcDepth is, for each TopoJSON geometry type (lower case) read
// from arcs, how deeply its "arcs" nest arrays around the arc indices: a
// Polygon's rings of arcs 2. Points are read from "coordinates" instead.
var topoArcDepth = map[string]int{"linestring": 1, "multilinestring": 2, "polygon": 2, "multipolygon": 3}

// topoPointDepth is geoJSONDepth for TopoJSON's types read from
// "coordinates".
var topoPointDepth = map[string]int{"point": 1, "multipoint": 2}

// brokenTopoJSON is brokenJSON for the layer named layer of the
// TopoJSON file at path. GDAL reads each object that is a
// GeometryCollection as a layer of that name, each of its geometries a
// feature, and the objects that are one geometry as the features of a
// layer "TopoJSON"; features are numbered here 1 for the first. GDAL
// reads none of a geometry whose type is unknown or absent, or whose
// "arcs" are not arrays (the feature is left out of the layer, or comes
// without geometry), leaves out a ring or a polygon that refers to an arc
// the file does not have or whose "arcs" are not indices (a Polygon with
// none left comes empty), and reads each position of an arc that is not
// numbers as 0, 0. The file is read twice, as a stream: once for the arcs
// (which may come last), once for the objects.
func brokenTopoJSON(path, layer string) (fid int, problem string) {
	nArcs, badArc, ok := topoArcs(path)
	if !ok {
		return 0, ""
	}
	check := func(raw json.RawMessage) string { return topoGeometryProblem(raw, nArcs, badArc) }
	dec, closeFile, err := jsonStream(path)
	if err != nil {
		return 0, ""
	}
	defer closeFile()
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return 0, ""
	}
	for dec.More() {
		key, err := dec.Token()
		if err != nil {
			return 0, ""
		}
		if key != "objects" {
			if skipValue(dec) != nil {
				return 0, ""
			}
			continue
		}
		if t, err := dec.Token(); err != nil || t != json.Delim('{') {
			return 0, ""
		}
		n := 0 // features of the layer seen
		for dec.More() {
			name, err := dec.Token()
			if err != nil {
				return 0, ""
			}
			var member func(json.RawMessage) bool // nil: the collection is skipped
			if name == layer {
				member = func(g json.RawMessage) bool {
					n++
					fid, problem = n, check(g)
					return problem == ""
				}
			}
			single, ok := readTopoObject(dec, member)
			switch {
			case !ok:
				return 0, ""
			case problem != "":
				return fid, problem
			case single != nil && layer == "TopoJSON":
				n++
				if p := check(single); p != "" {
					return n, p
				}
			}
		}
		return 0, ""
	}
	return 0, ""
}

// readTopoObject reads one TopoJSON object from dec: a
// GeometryCollection, whose geometries it hands to member one at a time
// until member returns false (it skips them when member is nil), or one
// geometry, whose members it returns as JSON in single (nil for a
// collection). ok is false when dec does not hold an object there.
func readTopoObject(dec *json.Decoder, member func(json.RawMessage) bool) (single json.RawMessage, ok bool) {
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return nil, false
	}
	members := map[string]json.RawMessage{}
	collection := false
	for dec.More() {
		key, err := dec.Token()
		if err != nil {
			return nil, false
		}
		if key != "geometries" {
			var raw json.RawMessage
			if err := dec.Decode(&raw); err != nil {
				return nil, false
			}
			members[key.(string)] = raw
			continue
		}
		collection = true
		if member == nil {
			if skipValue(dec) != nil {
				return nil, false
			}
			continue
		}
		if t, err := dec.Token(); err != nil || t != json.Delim('[') {
			return nil, false
		}
		for dec.More() {
			var g json.RawMessage
			if err := dec.Decode(&g); err != nil {
				return nil, false
			}
			if !member(g) {
				return nil, true
			}
		}
		if _, err := dec.Token(); err != nil {
			return nil, false
		}
	}
	if _, err := dec.Token(); err != nil {
		return nil, false
	}
	if collection {
		return nil, true
	}
	one, err := json.Marshal(members)
	return one, err == nil
}

// topoArcs reads the "arcs" of the TopoJSON file at path, one arc at a
// time: how many there are, and which cannot be decoded (an arc must be
// an array of positions of two or more numbers).
func topoArcs(path string) (n int, bad map[int]bool, ok bool) {
	dec, closeFile, err := jsonStream(path)
	if err != nil {
		return 0, nil, false
	}
	defer closeFile()
	if t, err := dec.Token(); err != nil || t != json.Delim('{') {
		return 0, nil, false
	}
	bad = map[int]bool{}
	for dec.More() {
		key, err := dec.Token()
		if err != nil {
			return 0, nil, false
		}
		if key != "arcs" {
			if skipValue(dec) != nil {
				return 0, nil, false
			}
			continue
		}
		if t, err := dec.Token(); err != nil || t != json.Delim('[') {
			return 0, nil, false
		}
		for ; dec.More(); n++ {
			var arc json.RawMessage
			if err := dec.Decode(&arc); err != nil {
				return 0, nil, false
			}
			if rest, ok := nestsNumbers(arc, 2); !ok || len(skipSpace(rest)) != 0 {
				bad[n] = true
			}
		}
		return n, bad, true
	}
	return 0, nil, false
}

// topoGeometryProblem is geometryProblem for a TopoJSON geometry, whose
// rings are lists of indices into the file's nArcs arcs (i for arc i,
// ~i, that is -i-1, for arc i reversed); badArc holds the arcs that
// cannot be decoded. A type null is a null geometry.
func topoGeometryProblem(raw json.RawMessage, nArcs int, badArc map[int]bool) string {
	var g struct {
		Type        json.RawMessage   `json:"type"`
		Arcs        json.RawMessage   `json:"arcs"`
		Coordinates json.RawMessage   `json:"coordinates"`
		Geometries  []json.RawMessage `json:"geometries"`
	}
	if err := json.Unmarshal(raw, &g); err != nil {
		return "it cannot be read (" + err.Error() + ")"
	}
	if strings.TrimSpace(string(g.Type)) == "null" {
		return ""
	}
	var typ string
	if err := json.Unmarshal(g.Type, &typ); err != nil || typ == "" {
		return "its geometry has no \"type\" (Polygon, MultiPolygon, ...)"
	}
	lower := strings.ToLower(typ)
	if lower == "geometrycollection" {
		for i, m := range g.Geometries {
			if p := topoGeometryProblem(m, nArcs, badArc); p != "" {
				return fmt.Sprintf("member %d of its GeometryCollection: %s", i+1, strings.TrimPrefix(p, "its "))
			}
		}
		return ""
	}
	if depth, ok := topoPointDepth[lower]; ok {
		if rest, ok := nestsNumbers(g.Coordinates, depth); !ok || len(skipSpace(rest)) != 0 {
			return fmt.Sprintf("its %s's \"coordinates\" are not numbers nested as %s", typ, geoJSONShape[lower])
		}
		return ""
	}
	depth, ok := topoArcDepth[lower]
	if !ok {
		return fmt.Sprintf("its geometry type %q is not a TopoJSON type (Point, MultiPoint, LineString, MultiLineString, Polygon, MultiPolygon, GeometryCollection)", typ)
	}
	if a := strings.TrimSpace(string(g.Arcs)); a == "" || a == "null" {
		return fmt.Sprintf("its %s has no \"arcs\"", typ)
	}
	problem := ""
	index := func(b []byte) ([]byte, bool) {
		lit, rest := numberLiteral(b)
		i, err := strconv.Atoi(string(lit))
		if err != nil {
			return nil, false
		}
		arc := i
		if i < 0 {
			arc = -i - 1
		}
		switch {
		case arc >= nArcs:
			problem = fmt.Sprintf("its %s refers to arc %d, but the file's \"arcs\" hold %d (numbered from 0)", typ, i, nArcs)
			if i < 0 {
				problem = fmt.Sprintf("its %s refers to arc %d (arc %d reversed), but the file's \"arcs\" hold %d (numbered from 0)", typ, i, arc, nArcs)
			}
			return nil, false
		case badArc[arc]:
			problem = fmt.Sprintf("its %s refers to arc %d, whose positions are not numbers nested as an array of [x, y] pairs (the file's \"arcs\" are numbered from 0)", typ, arc)
			return nil, false
		}
		return rest, true
	}
	if rest, ok := nestedArrays(g.Arcs, depth, 0, index); !ok || len(skipSpace(rest)) != 0 {
		if problem != "" {
			return problem
		}
		return fmt.Sprintf("its %s's \"arcs\" are not arc indices nested as %s", typ, topoArcShape[lower])
	}
	return ""
}

// topoArcShape says, for the message, how each type's "arcs" nest.
var topoArcShape = map[string]string{
	"linestring":      "one array of arc indices",
	"multilinestring": "an array of lines, each an array of arc indices",
	"polygon":         "an array of rings, each an array of arc indices",
	"multipolygon":    "an array of polygons, each an array of rings of arc indices",
}

// geoJSONOpenRing names the first ring of a GeoJSON geometry (raw JSON,
// as geometryProblem takes it) whose last position is not its first
// (compared on x and y, as GDAL tests a ring for being closed): "" when
// every ring is closed or the geometry is no polygon.
func geoJSONOpenRing(raw json.RawMessage) string {
	var g struct {
		Type        string            `json:"type"`
		Coordinates json.RawMessage   `json:"coordinates"`
		Geometries  []json.RawMessage `json:"geometries"`
	}
	if json.Unmarshal(raw, &g) != nil {
		return ""
	}
	switch strings.ToLower(g.Type) {
	case "polygon":
		var rings [][][]float64
		if json.Unmarshal(g.Coordinates, &rings) == nil {
			return openRing(rings, "its Polygon")
		}
	case "multipolygon":
		var polys [][][][]float64
		if json.Unmarshal(g.Coordinates, &polys) == nil {
			for i, rings := range polys {
				if w := openRing(rings, fmt.Sprintf("polygon %d of its MultiPolygon", i+1)); w != "" {
					return w
				}
			}
		}
	case "geometrycollection":
		for i, m := range g.Geometries {
			if w := geoJSONOpenRing(m); w != "" {
				return fmt.Sprintf("member %d of its GeometryCollection: %s", i+1, strings.TrimPrefix(w, "its "))
			}
		}
	}
	return ""
}

// esriOpenRing is geoJSONOpenRing for an ArcGIS JSON geometry's "rings".
func esriOpenRing(raw json.RawMessage) string {
	var g struct {
		Rings [][][]float64 `json:"rings"`
	}
	if json.Unmarshal(raw, &g) != nil {
		return ""
	}
	return openRing(g.Rings, "its \"rings\"")
}

// openRing names the first of rings (each a list of positions) whose last
// position differs from its first in x or y, as "ring k of what ends at
// (x, y), not at its first point (x0, y0)"; "" when there is none.
func openRing(rings [][][]float64, what string) string {
	for k, r := range rings {
		if len(r) == 0 || len(r[0]) < 2 || len(r[len(r)-1]) < 2 {
			continue
		}
		a, b := r[0], r[len(r)-1]
		if a[0] != b[0] || a[1] != b[1] {
			return fmt.Sprintf("ring %d of %s ends at (%s, %s), not at its first point (%s, %s)", k+1, what,
				strconv.FormatFloat(b[0], 'g', -1, 64), strconv.FormatFloat(b[1], 'g', -1, 64),
				strconv.FormatFloat(a[0], 'g', -1, 64), strconv.FormatFloat(a[1], 'g', -1, 64))
		}
	}
	return ""
}
