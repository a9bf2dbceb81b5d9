package extent

import (
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"sort"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/airbusgeo/godal"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/encoding/wkb"
	"golang.org/x/text/cases"
	"golang.org/x/text/unicode/norm"

	"areasweep/extent/gdalmsg"
	"areasweep/extent/vocab"
)

// ErrNoOverlap is returned when a polygon layer covers no cell of the grid.
var ErrNoOverlap = errors.New("extent: region covers no cell of the raster")

// Shape is a polygon area read from a vector layer and put in the grid's
// CRS (Grid) and in WGS84 longitude/latitude (LonLat), both as orb values.
type Shape struct {
	Grid   orb.MultiPolygon
	LonLat orb.MultiPolygon
}

// Unit is one feature group of a polygon layer sharing an id value.
type Unit struct {
	ID    string
	Shape Shape
	geom  *godal.Geometry // grid CRS, for GEOS predicates
}

// ReadShape reads every polygon feature of the first layer of the vector
// file at path, repairs invalid ones (with a warning), unions them and puts
// the result in the grid's CRS.
func ReadShape(path string, g *Grid) (Shape, []string, error) {
	units, warns, err := readUnits(path, "", g)
	if err != nil {
		return Shape{}, warns, err
	}
	var all *godal.Geometry
	for _, u := range units {
		if all == nil {
			all = u.geom
			continue
		}
		un, err := all.Union(u.geom)
		if err != nil {
			return Shape{}, warns, fmt.Errorf("extent: %s: union of features failed (%s); check the geometries in a GIS", path, gdalmsg.Cause(err.Error()))
		}
		all = un
	}
	s, err := shapeOf(all, g)
	if err != nil {
		return Shape{}, warns, fmt.Errorf("extent: %s: %w", path, err)
	}
	return s, warns, nil
}

// vectorAdvice says what to do about a polygon file GDAL could not open,
// from GDAL's cause: a ring left open is closed, a file in no format GDAL
// knows (or cut short) is checked or exported again.
func vectorAdvice(cause string) string {
	switch {
	case cause == gdalmsg.OpenRing:
		return "; close each ring (repeat its first point at its end) in the program that made the file; converting it with ogr2ogr, even with -makevalid, does not close a ring"
	case strings.Contains(cause, "SHAPE_RESTORE_SHX"):
		return "; a shapefile is several files (.shp, .shx, .dbf, .prj) that must stay together: copy the missing ones beside it, or export the layer again as a GeoPackage"
	case cause == gdalmsg.UnknownFormat:
		return "; give a GeoPackage, shapefile (.shp with its .shx and .dbf) or GeoJSON file of polygons, and check that it opens in a GIS (a file cut short or renamed from another format does not)"
	}
	return "; check that the file opens in a GIS, or export it again as a GeoPackage"
}

// LayerFields returns the names of the attribute fields of the polygon
// layer areasweep reads from path (see chooseLayer), sorted, as its first
// feature has them (godal reads fields per feature), for a message
// asking which of them holds the unit ids; nil when the file cannot be
// read as such a layer (that is refused later, with its own message).
func LayerFields(path string) []string {
	s, _, err := openPolygons(path, "")
	if err != nil {
		return nil
	}
	defer s.close()
	s.layer.ResetReading()
	f := s.layer.NextFeature()
	if f == nil {
		return nil
	}
	defer f.Close()
	var names []string
	for k := range f.Fields() {
		names = append(names, k)
	}
	sort.Strings(names)
	return names
}

// ReadUnits reads the polygon features of the first layer of path grouped
// by the value of field, each group unioned, in the order ids first appear.
func ReadUnits(path, field string, g *Grid) ([]Unit, []string, error) {
	return readUnits(path, field, g)
}

func readUnits(path, field string, g *Grid) ([]Unit, []string, error) {
	Register()
	src, warns, err := openPolygons(path, field)
	if err != nil {
		return nil, warns, err
	}
	defer src.close()
	byID, order, err := src.unionByID(&warns)
	if err != nil {
		return nil, warns, err
	}
	if w := spacedIDs(path, src.field, order); w != "" {
		warns = append(warns, w)
	}
	units, err := src.onGrid(byID, order, g, &warns)
	if err != nil {
		return nil, warns, err
	}
	return units, warns, nil
}

// spacedIDs warns of ids that differ only in white space around them
// ("A" and " A", or "A" with a no-break space after it, as a spreadsheet
// or a padded text field leaves them), in letter case ("Forest" and
// "forest") or in how the same letters are encoded (an "é" as one
// character or as "e" and a combining accent, Unicode's composed and
// decomposed forms, as text from different systems leaves them): they are
// two units, each occupied or not on its own, which is seldom what was
// meant. Ids that differ in their encoding are quoted with escapes, so
// that the message shows the difference. "" when there are none.
func spacedIDs(path, field string, ids []string) string {
	first := map[string]string{}
	var pairs []string
	n := 0
	fold := cases.Fold()
	for _, id := range ids {
		key := fold.String(norm.NFC.String(strings.TrimSpace(id)))
		if prev, ok := first[key]; ok {
			n++
			if len(pairs) < 3 {
				f := "%q and %q"
				if !norm.NFC.IsNormalString(prev) || !norm.NFC.IsNormalString(id) {
					// Not in composed form: only the escapes show how they
					// differ.
					f = "%+q and %+q"
				}
				pairs = append(pairs, fmt.Sprintf(f, prev, id))
			}
			continue
		}
		first[key] = id
	}
	if n == 0 {
		return ""
	}
	more := ""
	if n > len(pairs) {
		more = fmt.Sprintf(" and %d more", n-len(pairs))
	}
	return fmt.Sprintf("%s: ids in field %q that differ only in the spaces around them, in letter case or in the Unicode encoding of the same letters are kept as separate units (%s%s); if they name one unit, make them equal",
		path, field, strings.Join(pairs, ", "), more)
}

// polygonSource is the polygon layer readUnits reads, open and checked:
// its dataset (a copy in memory once flattened), the layer, its CRS, the
// id field (the layer's spelling; "" for none), what close releases,
// last opened first, and the invalid features to repair.
type polygonSource struct {
	path   string
	ds     *godal.Dataset
	layer  godal.Layer
	lsr    *godal.SpatialRef
	field  string
	closes []func()

	// invalid holds the numbers (1 for the first read) of the features
	// that feature repairs.
	invalid map[int]bool

	// driver is the short name of the GDAL driver that opened the file
	// (s.ds may be a flattened copy in memory since).
	driver string

	// dialect is the JSON format of the file as GDAL opened it (s.ds may
	// be a flattened copy in memory since), notJSON for other formats:
	// brokenJSON can then tell a feature without geometry from one whose
	// geometry cannot be decoded.
	dialect jsonDialect
}

func (s *polygonSource) close() {
	for i := len(s.closes) - 1; i >= 0; i-- {
		s.closes[i]()
	}
	s.closes = nil
}

// openPolygons opens the vector file at path and readies its polygon
// layer (see chooseLayer): a layer without geometry or without a CRS is
// refused; Z, M and curved geometries are made plane and linear, the id
// field is resolved and checked for empty ids, and invalid features are
// repaired (GDAL's MakeValid), each with a warning.
func openPolygons(path, field string) (*polygonSource, []string, error) {
	if err := shapefileCutShort(path); err != nil {
		return nil, nil, err
	}
	ds, err := godal.Open(path, godal.VectorOnly(), godal.ErrLogger(func(ec godal.ErrorCategory, code int, msg string) error {
		switch {
		case ec < godal.CE_Warning:
			return nil
		case ec == godal.CE_Warning && strings.Contains(msg, walRetry):
			gdalmsg.Record(gdalmsg.Warning, code, msg) // for the run log
			return nil
		}
		return errors.New(msg) // as godal treats a warning by default
	}))
	if err != nil {
		return nil, nil, openVectorError(path, err)
	}
	s := &polygonSource{path: path, ds: ds, closes: []func(){func() { ds.Close() }}}
	s.driver = ds.Driver().ShortName()
	s.dialect = dialectOfDriver(s.driver)
	if s.driver == "LIBKML" || s.driver == "KML" {
		// Before GDAL's reading: a coordinates text it read in part
		// would otherwise be refused, if at all, for what it made of it.
		if p := brokenKML(path); p != nil {
			s.close()
			return nil, nil, kmlCoordinatesError(path, p)
		}
	}
	warns, err := s.ready(field)
	if err != nil {
		s.close()
		return nil, warns, err
	}
	return s, warns, nil
}

// walRetry ends GDAL's warning for a GeoPackage in WAL mode in a
// read-only folder (as QGIS leaves one it edited), where SQLite cannot
// make the -shm file it reads such a file with: GDAL then opens it
// immutable, which reads it, but the warning made the open fail, and the
// layer was refused as "not a vector file GDAL can read".
const walRetry = "Retrying with IMMUTABLE=YES open option"

// MaxSQLitePath is the longest path of a file SQLite opens (its Unix
// layer's 512 bytes, less room for the "-journal" suffix); GDAL's
// GeoPackage driver then fails with "unable to open database file". Found
// by opening databases with paths of 500 to 519 bytes (Python's sqlite3,
// the system's SQLite): 504 opens, 505 does not.
const MaxSQLitePath = 504

// openVectorError explains why GDAL could not open path as a vector file,
// in our words and with what to do.
func openVectorError(path string, err error) error {
	hint := ""
	if strings.HasSuffix(strings.ToLower(path), ".zip") {
		hint = "; a zipped shapefile must be unzipped first: give the path of its .shp"
	} else if r, rerr := OpenRaster(path); rerr == nil {
		r.Close()
		return fmt.Errorf("extent: %s is a raster, not a vector file of polygons; give the polygons' file (GeoPackage, shapefile, GeoJSON, ...)", path)
	}
	if n, why := brokenJSON(path, sniffDialect(path), -1); n > 0 {
		// GDAL refuses a GeoJSON or ArcGIS JSON file for some broken
		// geometries (coordinates that are text, a Polygon without
		// "coordinates", "rings" that are not an array) naming neither
		// the feature nor the file's line.
		return fmt.Errorf("extent: %s feature %d has a geometry that cannot be decoded: %s; correct it (in a text editor or a GIS), or remove the feature, or set its \"geometry\" to null to have it skipped", path, n, why)
	}
	cause := gdalmsg.Cause(err.Error())
	if cause == gdalmsg.OpenRing {
		if n, ring := openRingJSON(path, sniffDialect(path)); n > 0 {
			return fmt.Errorf("extent: %s feature %d: %s%s", path, n, ring, closeRingAdvice)
		}
	}
	if abs, aerr := filepath.Abs(path); aerr == nil && len(abs) > MaxSQLitePath && strings.Contains(cause, "unable to open database file") {
		// The file may be fine: SQLite, which GDAL reads a GeoPackage
		// with, opens no longer path.
		return fmt.Errorf("extent: %s cannot be opened: its path is %d bytes long, and SQLite, which reads GeoPackages, opens files whose path has at most %d; move it to a folder with a shorter path", path, len(abs), MaxSQLitePath)
	}
	if hint == "" {
		hint = vectorAdvice(cause)
	}
	if cause == "crs not found" {
		// A GeoJSON "crs" member naming a CRS PROJ does not know.
		cause = "the CRS its \"crs\" member names is not one PROJ knows"
		hint = "; correct the \"crs\" member, or remove it if the coordinates are longitudes and latitudes in WGS84 (GeoJSON's own CRS)"
	}
	if strings.Contains(cause, "SHAPE_RESTORE_SHX") {
		// GDAL's advice is a configuration option of its own.
		cause = "the shapefile's index " + strings.TrimSuffix(filepath.Base(path), filepath.Ext(path)) + ".shx is not beside it"
	}
	return fmt.Errorf("extent: %s is not a vector file GDAL can read (%s)%s", path, cause, hint)
}

// chooseLayer returns the layer to read of several: the first whose
// declared geometry type is an area (a GeoPackage often holds the points
// or lines of the same study beside its polygons), else the first, with
// a warning naming the layers; of one, that one without a warning.
func chooseLayer(path string, layers []godal.Layer) (godal.Layer, string) {
	layer := layers[0]
	if len(layers) == 1 {
		return layer, ""
	}
	which, found := "the first", false
	for i, l := range layers {
		if base := (uint32(l.Type()) & 0x7fffffff) % 1000; base == 3 || base == 6 || base == 10 || base == 12 || surfaceBase(base) {
			if i > 0 {
				which = "the first of polygons"
			}
			layer, found = l, true
			break
		}
	}
	if !found {
		// No layer declares polygons (a KML's folders, whose declared
		// type is unknown: Google Earth's pins in one, the area in
		// another): the first whose features hold one.
		for i, l := range layers {
			if holdsPolygon(l) {
				if i > 0 {
					which = "the first holding polygons"
				}
				layer = l
				break
			}
		}
	}
	var names []string
	for i, l := range layers {
		if i == 8 {
			names = append(names, fmt.Sprintf("and %d more", len(layers)-8))
			break
		}
		names = append(names, l.Name())
	}
	return layer, fmt.Sprintf("%s has %d layers (%s); using %s, %q (to use another, save it alone with ogr2ogr OUT.gpkg %s LAYER)",
		path, len(layers), strings.Join(names, ", "), which, layer.Name(), path)
}

// holdsPolygon reports whether a feature of l is a polygon area (as
// checkFeatureTypes takes it).
func holdsPolygon(l godal.Layer) bool {
	return anyGeometry(l, func(g *godal.Geometry) bool { return polygonProblem(g) == "" })
}

// anyGeometry reports whether the geometry of some feature of l (one
// with a geometry) satisfies is; it reads l from its start and leaves it
// there.
func anyGeometry(l godal.Layer, is func(*godal.Geometry) bool) bool {
	found := errors.New("found")
	return eachFeature(l, func(_ int, f *godal.Feature) error {
		if g := f.Geometry(); !noGeometry(g) && is(g) {
			return found
		}
		return nil
	}) == found
}

// eachFeature calls fn with each feature of layer, first to last, and its
// 1-based position (how messages name a feature), closing the feature
// after fn (a geometry of f is valid only inside fn); it stops at the
// first error fn returns and returns it. The layer's reading is reset
// before and after.
func eachFeature(layer godal.Layer, fn func(n int, f *godal.Feature) error) error {
	layer.ResetReading()
	defer layer.ResetReading()
	for n := 1; ; n++ {
		f := layer.NextFeature()
		if f == nil {
			return nil
		}
		err := fn(n, f)
		f.Close()
		if err != nil {
			return err
		}
	}
}

// ready picks the layer and checks and prepares it (see openPolygons).
func (s *polygonSource) ready(field string) ([]string, error) {
	var warns []string
	path := s.path
	layers := s.ds.Layers()
	if len(layers) == 0 {
		// A KML document without a Placemark, a GeoPackage without a
		// table of features.
		return nil, fmt.Errorf("extent: %s holds no layer of features at all, so no polygons; give the file that holds the area's polygons, or export them again from the GIS", path)
	}
	layer, warn := chooseLayer(path, layers)
	if warn != "" {
		warns = append(warns, warn)
	}
	if layer.Type() == godal.GTNone {
		// A table without geometry (a CSV of points, say): it has no
		// polygons and no CRS, and the CRS refusal would mislead.
		return warns, fmt.Errorf("extent: %s layer %q has no geometry (a table, not polygons); give the polygons' file (GeoPackage, shapefile, GeoJSON, ...)", path, layer.Name())
	}
	lsr := layer.SpatialRef()
	wkt := ""
	if lsr != nil {
		if w, err := lsr.WKT(); err == nil {
			wkt = w
		}
	}
	if wkt == "" || undefinedCRS(wkt) {
		if lsr != nil {
			lsr.Close()
		}
		switch {
		case wkt != "":
			return warns, fmt.Errorf("extent: %s layer %q has an undefined CRS (%s); assign the real one (e.g. ogr2ogr -a_srs EPSG:4326 out.gpkg %s)", path, layer.Name(), crsName(wkt), path)
		case s.ds.Driver().ShortName() == "TopoJSON":
			return warns, topoJSONNoCRS(path, layer.Name())
		}
		if err := unreadablePRJ(path, s.ds.Driver().ShortName()); err != nil {
			return warns, err
		}
		return warns, fmt.Errorf("extent: %s layer %q has no CRS; give it the one its coordinates are in (e.g. ogr2ogr -a_srs EPSG:4326 OUT.gpkg %s)", path, layer.Name(), path)
	}
	s.lsr = lsr
	s.closes = append(s.closes, func() { lsr.Close() })
	ds := s.ds
	// Z or M coordinates (a KML with altitudes, a PolygonZ shapefile) and
	// curved geometries (an ArcGIS export's CurvePolygon or MultiSurface)
	// are read as their plane, linear equivalent: a copy of the layer in
	// memory, as ogr2ogr -dim XY -nlt CONVERT_TO_LINEAR makes it.
	if needsFlattening(layer) {
		flat, err := ds.VectorTranslate("", []string{"-dim", "XY", "-nlt", "CONVERT_TO_LINEAR", layer.Name()}, godal.Memory)
		if err != nil {
			return warns, fmt.Errorf("extent: %s layer %q: its 3D or curved geometries could not be made plane and linear (%s); save the layer as 2D polygons in a GIS", path, layer.Name(), gdalmsg.Cause(err.Error()))
		}
		s.closes = append(s.closes, func() { flat.Close() })
		ds, layer = flat, flat.Layers()[0]
		if err := surfacesToAreas(path, layer, lsr); err != nil {
			return warns, err
		}
	}
	if err := checkFeatureTypes(path, layer); err != nil {
		return warns, err
	}
	if field != "" {
		field = fieldName(layer, field)
		if err := checkNullIDs(ds, path, layer, field); err != nil {
			return warns, err
		}
	}
	// Invalid features (self-intersections, bad rings) are repaired as
	// they are read (feature, makeValid), each by GEOS's MakeValid with
	// its structure method, which keeps all of the area a zero-width
	// buffer would drop from a bow-tie and also the overlap of two parts
	// that overlap.
	bad, why, err := invalidFeatures(path, layer)
	if err != nil {
		return warns, err
	}
	if len(bad) > 0 {
		s.invalid = map[int]bool{}
		for _, n := range bad {
			s.invalid[n] = true
		}
		warns = append(warns, repairWarning(path, bad, why))
	}
	s.ds, s.layer, s.field = ds, layer, field
	return warns, nil
}

// unionByID reads every feature of the layer (see feature), the
// geometries of each id unioned, and returns them with the ids in the
// order they first appear. Features without geometry are skipped with one
// warning added to warns.
//
// The geometries of one id are unioned in pairs, neighbours in feature
// order, then those unions in pairs, and so on (unionParts): adding each
// feature to the union of all before it made every step as slow as the
// union so far, so that 2000 features took 19 s and 20000 would take
// about half an hour.
func (s *polygonSource) unionByID(warns *[]string) (map[string]*godal.Geometry, []string, error) {
	partsByID := map[string][]unionPart{}
	var order []string
	var empty []int // features without geometry, skipped
	closeAll := func() {
		for _, ps := range partsByID {
			for _, p := range ps {
				p.geom.Close()
			}
		}
	}
	s.layer.ResetReading()
	fid := 1
	for ; ; fid++ {
		f := s.layer.NextFeature()
		if f == nil {
			break
		}
		id, own, err := s.feature(f, fid)
		if err != nil {
			closeAll()
			return nil, nil, err
		}
		if own == nil {
			empty = append(empty, fid)
			continue
		}
		if _, ok := partsByID[id]; !ok {
			order = append(order, id)
		}
		partsByID[id] = append(partsByID[id], unionPart{own, fid, fid})
	}
	if err := s.allRead(fid - 1); err != nil {
		closeAll()
		return nil, nil, err
	}
	byID := make(map[string]*godal.Geometry, len(order))
	for i, id := range order {
		un, err := unionParts(partsByID[id], s.path)
		if err != nil {
			for _, done := range order[:i] {
				byID[done].Close()
			}
			for _, later := range order[i+1:] {
				for _, p := range partsByID[later] {
					p.geom.Close()
				}
			}
			return nil, nil, err
		}
		byID[id] = un
	}
	if s.dialect != notJSON {
		if err := s.brokenGeometry(fid-1, empty); err != nil {
			for _, un := range byID {
				un.Close()
			}
			return nil, nil, err
		}
	}
	switch len(empty) {
	case 0:
	case 1:
		*warns = append(*warns, fmt.Sprintf("%s feature %d has no geometry; skipped", s.path, empty[0]))
	default:
		*warns = append(*warns, fmt.Sprintf("%s features %s have no geometry; skipped", s.path, featureList(empty)))
	}
	if len(order) == 0 {
		if len(empty) > 0 {
			// Every feature read came without a geometry: empty ones, or
			// geometries GDAL could not decode (it hands those over as
			// none). The warning above would otherwise be the only clue.
			return nil, nil, fmt.Errorf("extent: %s layer %q has no polygon to use: none of its %d feature(s) has a geometry GDAL can read (each is empty or cannot be decoded); open the file in a GIS, check or redraw the polygons, and export them again", s.path, s.layer.Name(), len(empty))
		}
		return nil, nil, s.emptyLayer()
	}
	return byID, order, nil
}

// emptyLayer is the refusal of a layer that holds no features: it said
// only that the layer "has no polygon features", with nothing of what
// the file holds or what to do. An export of a selection with nothing
// selected, or through a filter that matched nothing, writes such a
// file.
func (s *polygonSource) emptyLayer() error {
	what := ""
	if s.driver == "GeoJSON" {
		what = ` (a FeatureCollection whose "features" list is empty)`
	}
	return fmt.Errorf("extent: %s layer %q holds no features at all%s, so no polygons; give the file that holds the area's polygons, or export them again from the GIS (an export of a selection with nothing selected, or through a filter that matched nothing, writes such a file)",
		s.path, s.layer.Name(), what)
}

// topoJSONNoCRS is the refusal of a TopoJSON layer: GDAL reads no CRS
// from one, so the user must convert it, giving it the CRS, and the
// conversion would drop without a word what GDAL cannot decode (see
// brokenTopoJSON): such a feature is named first, to be corrected
// before.
func topoJSONNoCRS(path, layer string) error {
	convert := fmt.Sprintf("save it with the CRS its coordinates are in (e.g. ogr2ogr -a_srs EPSG:4326 OUT.gpkg %s %s if they are longitudes and latitudes) and give that file", path, layer)
	if n, why := brokenTopoJSON(path, layer); n > 0 {
		return fmt.Errorf("extent: %s layer %q feature %d has a geometry that cannot be decoded: %s; correct it (in a text editor) first, as converting the file would leave it or that part out without a word; then %s (GDAL reads no CRS from a TopoJSON file)", path, layer, n, why, convert)
	}
	return fmt.Errorf("extent: %s layer %q has no CRS: GDAL reads none from a TopoJSON file; %s", path, layer, convert)
}

// brokenGeometry refuses a feature of a JSON file whose geometry GDAL
// could not decode whole (see brokenJSON; read features were read, those in
// empty without a geometry): one it handed over as none, or one it read
// without a part.
func (s *polygonSource) brokenGeometry(read int, empty []int) error {
	n, why := brokenJSON(s.path, s.dialect, read)
	if n == 0 {
		return nil
	}
	what := "a geometry that cannot be decoded"
	todo := "correct it (in a text editor or a GIS), or remove the feature, or set its \"geometry\" to null to have it skipped"
	if !slices.Contains(empty, n) {
		what = "a geometry of which a part cannot be decoded (GDAL reads it without that part)"
		todo = "correct that part (in a text editor or a GIS), or remove it from the coordinates"
	}
	return fmt.Errorf("extent: %s feature %d has %s: %s; %s", s.path, n, what, why, todo)
}

// allRead refuses a layer of which fewer features were read than it
// holds: GDAL ends the reading at a part of the file it cannot read (a
// damaged page of a GeoPackage, a .dbf cut short) as at the layer's end,
// logging only a library error, and the features after it were left out
// of the region or the units without a word (22 of 40 of a GeoPackage
// with one damaged page). GDAL counts a layer's features by reading
// them when it must, and gives -1 when it cannot: the file is damaged
// then too. Only a GeoPackage's count is compared: a shapefile's counts
// the records its .dbf marks deleted (as an edit leaves them), which the
// reading skips, and its files cut short are found by shapefileCutShort.
func (s *polygonSource) allRead(read int) error {
	if s.ds.Driver().ShortName() != "GPKG" {
		return nil
	}
	n, err := s.layer.FeatureCount()
	if err != nil || (n >= 0 && n <= read) {
		return nil
	}
	which := fmt.Sprintf("the first %d of its %d features", read, n)
	if n < 0 {
		which = fmt.Sprintf("its first %d features (GDAL cannot count them all)", read)
	}
	return fmt.Errorf("extent: %s layer %q is damaged: only %s could be read, the rest lying past a part of the file that cannot be read (as in a file cut short or copied while it was being written); check that it opens whole in a GIS, or export it again",
		s.path, s.layer.Name(), which)
}

// unionPart is a geometry of one id with the numbers of the first and
// last feature it holds.
type unionPart struct {
	geom        *godal.Geometry
	first, last int
}

// unionParts unions parts (in feature order, each a feature's own
// geometry) in pairs of neighbours, round after round, and returns the
// union; it closes every geometry it is given or makes but the one it
// returns.
func unionParts(parts []unionPart, path string) (*godal.Geometry, error) {
	for len(parts) > 1 {
		next := parts[:0]
		for i := 0; i < len(parts); i += 2 {
			if i+1 == len(parts) {
				next = append(next, parts[i])
				continue
			}
			a, b := parts[i], parts[i+1]
			un, err := a.geom.Union(b.geom)
			a.geom.Close()
			b.geom.Close()
			if err != nil {
				for _, p := range parts[i+2:] {
					p.geom.Close()
				}
				for _, p := range next {
					p.geom.Close()
				}
				return nil, fmt.Errorf("extent: %s features %d to %d: their union failed (%s); check the geometries in a GIS", path, a.first, b.last, gdalmsg.Cause(err.Error()))
			}
			next = append(next, unionPart{un, a.first, b.last})
		}
		parts = next
	}
	return parts[0].geom, nil
}

// feature returns the id of feature number fid (1 for the first read) and
// its own copy of the geometry, checked: an area in the layer's CRS with
// sane coordinates and edges, valid (repaired by makeValid if it was
// not, as ready found); own is nil
// for a feature without geometry. It closes f.
func (s *polygonSource) feature(f *godal.Feature, fid int) (id string, own *godal.Geometry, err error) {
	defer f.Close()
	path := s.path
	if s.field != "" {
		if id, err = s.featureID(f, fid); err != nil {
			return "", nil, err
		}
	}
	geom := f.Geometry()
	if noGeometry(geom) {
		if s.ds.Driver().ShortName() == "CSV" {
			// A table's WKT column holds the geometry as text: one that
			// does not parse (cut short, a typo) reads as no geometry,
			// and the area it drew was skipped as if none were given.
			for k, v := range f.Fields() {
				if strings.EqualFold(k, "WKT") && strings.TrimSpace(v.String()) != "" {
					return "", nil, fmt.Errorf("extent: %s feature %d: its %s text cannot be read as a geometry (%q); correct it (WKT such as POLYGON((x1 y1, x2 y2, x3 y3, x1 y1)), rings closed)", path, fid, k, cutText(strings.TrimSpace(v.String())))
				}
			}
		}
		return id, nil, nil
	}
	if s.invalid[fid] {
		fixed, err := makeValid(geom, s.lsr)
		if err != nil {
			if ring := openRingOf(geom); ring != "" {
				// A driver that reads an open ring without a word (KML):
				// GEOS cannot build it, let alone repair it.
				return "", nil, fmt.Errorf("extent: %s feature %d: %s%s", path, fid, ring, closeRingAdvice)
			}
			return "", nil, fmt.Errorf("extent: %s feature %d has invalid geometry (e.g. a self-intersection) that GDAL could not repair (%v); fix it in a GIS", path, fid, err)
		}
		defer fixed.Close()
		geom = fixed
	}
	t := geom.Type()
	if t != godal.GTPolygon && t != godal.GTMultiPolygon && t != godal.GTPolygon25D && t != godal.GTMultiPolygon25D && t != godal.GTGeometryCollection {
		return "", nil, fmt.Errorf("extent: %s feature %d is a degenerate polygon with no area (repair turned it into a %s); remove or fix it in a GIS", path, fid, strings.ToLower(geom.Name()))
	}
	if !(geom.Area() > 0) {
		return "", nil, fmt.Errorf("extent: %s feature %d is a degenerate polygon with no area (its points lie on a line or repeat); remove or fix it in a GIS", path, fid)
	}
	// Own copy through WKB, so the feature can be closed.
	b, err := geom.WKB()
	if err != nil {
		return "", nil, fmt.Errorf("extent: %s feature %d: %w", path, fid, err)
	}
	own, err = godal.NewGeometryFromWKB(b, s.lsr)
	if err != nil {
		return "", nil, fmt.Errorf("extent: %s feature %d: %s", path, fid, gdalmsg.Cause(err.Error()))
	}
	if msg := coordinateProblem(own, s.lsr.Geographic()); msg != "" {
		return "", nil, fmt.Errorf("extent: %s feature %d %s; check the coordinates and the layer's CRS", path, fid, msg)
	}
	if s.lsr.Geographic() {
		// Each feature's own edges, so that the message can name it.
		if _, err := mapRings(own, s.lsr, func(r orb.Ring) (orb.Ring, bool, error) { return r, false, checkRingLon(r, false) }); err != nil {
			return "", nil, fmt.Errorf("extent: %s feature %d: %w", path, fid, err)
		}
	}
	if ok, why := validity(own); !ok {
		if why != "" {
			why = " (" + why + ", in the layer's coordinates)"
		}
		return "", nil, fmt.Errorf("extent: %s feature %d has invalid geometry that could not be repaired%s; fix it in a GIS", path, fid, why)
	}
	return id, own, nil
}

// featureID returns feature fid's value in the id field as text (a
// Latin-1 DBF's bytes read as Latin-1 letters); a feature without the
// field, or with no value or blank text in it, is refused.
func (s *polygonSource) featureID(f *godal.Feature, fid int) (string, error) {
	path, field := s.path, s.field
	fields := f.Fields()
	v, ok := fields[field]
	if !ok {
		names := make([]string, 0, len(fields))
		for k := range fields {
			names = append(names, k)
		}
		sort.Strings(names)
		if len(names) == 0 {
			if dbf := missingDBF(path); dbf != "" {
				return "", fmt.Errorf("extent: %s has no field %q: its attribute table %s is not beside it; a shapefile is several files (.shp, .shx, .dbf, .prj) that must stay together: copy the .dbf beside it, or export the layer again as a GeoPackage", path, field, dbf)
			}
			return "", fmt.Errorf("extent: %s has no field %q: its features have no attribute fields at all; give the polygon layer that carries the unit ids", path, field)
		}
		fid := ""
		if strings.EqualFold(field, "fid") || strings.EqualFold(field, "ogc_fid") {
			fid = fmt.Sprintf(" (%s names the features' id column, which numbers the features and is no field of their attributes)", field)
		}
		return "", fmt.Errorf("extent: %s has no field %q%s; fields are: %s", path, field, fid, strings.Join(names, ", "))
	}
	id := v.String()
	switch v.Type() {
	case godal.FTInt, godal.FTInt64, godal.FTReal, godal.FTString:
	case godal.FTDate, godal.FTTime, godal.FTDateTime:
		// godal gives these no text (""), so that every feature was one
		// unit of id "": named as OGR writes them, without a time zone.
		if t := v.DateTime(); t != nil && v.IsSet() {
			id = t.Format(map[godal.FieldType]string{godal.FTDate: "2006/01/02", godal.FTTime: "15:04:05", godal.FTDateTime: "2006/01/02 15:04:05"}[v.Type()])
		}
	default:
		// Lists and binary data have no text either, and name no unit.
		return "", fmt.Errorf("extent: %s field %q holds %s, which cannot name a unit; give the field that holds the units' ids (text or numbers)", path, field, fieldTypeName(v.Type()))
	}
	if v.Type() == godal.FTReal && v.IsSet() {
		// godal writes a real with six decimals ("%f"), which gave two
		// ids that differ further on (1.0000001 and 1.0000004) one unit:
		// the shortest text that reads back as the value, without an
		// exponent, and -0 as 0, the value it equals.
		f := v.Float()
		if f == 0 {
			f = 0
		}
		id = strconv.FormatFloat(f, 'f', -1, 64)
	}
	if !utf8.ValidString(id) {
		// A DBF without .cpg whose text is Latin-1 (older shapefiles):
		// its bytes are read as Latin-1 letters, so that "Zoë" and "Zoé"
		// stay two ids in every output.
		r := make([]rune, len(id))
		for i := 0; i < len(id); i++ {
			r[i] = rune(id[i])
		}
		id = string(r)
	}
	if !v.IsSet() || strings.TrimSpace(id) == "" {
		return "", fmt.Errorf("extent: %s feature %d has no value in field %q; give every unit an id, or delete the feature", path, fid, field)
	}
	if i := strings.IndexFunc(id, unicode.IsControl); i >= 0 {
		// A line break or another control character (a text pasted from
		// several lines) went raw into report.html, methods.md and the
		// log, where an id is one line of text.
		r, _ := utf8.DecodeRuneInString(id[i:])
		return "", fmt.Errorf("extent: %s feature %d has the id %q in field %q, which holds a control character (%U, %s); ids name the units in the report, one line each: remove it from the id in a GIS",
			path, fid, id, field, r, controlName(r))
	}
	return id, nil
}

// controlName names a control character in words.
func controlName(r rune) string {
	switch r {
	case '\n', '\r':
		return "a line break"
	case '\t':
		return "a tab"
	}
	return "not text"
}

// fieldTypeName names a field type that cannot name a unit.
func fieldTypeName(t godal.FieldType) string {
	switch t {
	case godal.FTIntList, godal.FTInt64List:
		return "lists of whole numbers"
	case godal.FTRealList:
		return "lists of numbers"
	case godal.FTStringList:
		return "lists of texts"
	case godal.FTBinary:
		return "binary data"
	}
	return "values of an unknown kind"
}

// newTransform makes a transformation between two CRSs (a test counts
// the calls: onGrid makes one per layer).
var newTransform = godal.NewTransform

// onGrid puts each id's geometry in the grid's CRS and returns the units
// in order, appending to warns the units of a layer of units it leaves
// out (see farSideUnit).
func (s *polygonSource) onGrid(byID map[string]*godal.Geometry, order []string, g *Grid, warns *[]string) ([]Unit, error) {
	lsr, path := s.lsr, s.path
	units := make([]Unit, 0, len(order))
	// One transformation and one centre cell for the whole layer: making
	// a transformation looks it up in PROJ's database (tens of
	// milliseconds), which per unit took minutes for a layer of thousands
	// of units. Without one (the CRSs are one, or none can be made),
	// Reproject below does as before and says why it fails.
	var t *godal.Transform
	if !lsr.IsSame(g.srs) {
		if tt, err := newTransform(lsr, g.srs); err == nil {
			t = tt
			defer t.Close()
		}
	}
	var centre, centrePt *godal.Geometry
	if lsr.Geographic() && !g.Geographic {
		if c, err := centreCell(g, lsr, false); err == nil {
			centre = c
			defer centre.Close()
		}
		if c, err := centreCell(g, lsr, true); err == nil {
			centrePt = c
			defer centrePt.Close()
		}
	}
	for _, id := range order {
		geom := byID[id]
		// Whether geom, as the user drew it, holds none of the raster's
		// centre cell: neither the cell nor its centre point (a cell
		// with a corner on a pole, on a polar grid, has no sane outline
		// in degrees).
		missedCentre := false
		if centre != nil && centrePt != nil {
			hit, err := geom.Intersects(centre)
			missedCentre = err == nil && !hit && !geom.Contains(centrePt)
		}
		if lsr.Geographic() && !g.Geographic {
			// Longitude edges are checked here, where they are the
			// user's: on a projected raster one that runs round a pole
			// (polar stereographic) is no crossing.
			if d, err := densifyWholeTurns(geom, lsr); err != nil {
				return nil, fmt.Errorf("extent: %s: %w", unitName(path, id), err)
			} else if d != nil {
				geom = d
			}
		}
		// Whether geom holds the whole of the raster's centre cell.
		hadCentre := centre != nil && geom.Contains(centre)
		// An edge is a straight line in the layer's CRS: vertices are
		// added along it so that, transformed, it still follows that
		// line's image (densifyEdges), not the chord between its ends.
		if d, err := densifyEdges(geom, lsr, t, g); err != nil {
			return nil, fmt.Errorf("extent: %s: %w", unitName(path, id), err)
		} else if d != nil {
			geom = d
		}
		var err error
		if t != nil {
			err = geom.Transform(t)
		} else {
			err = geom.Reproject(g.srs)
		}
		if err != nil {
			return nil, fmt.Errorf("extent: %s: cannot be reprojected to the raster CRS (%s); check that the layer's CRS is right", unitName(path, id), gdalmsg.Cause(err.Error()))
		}
		if hadCentre && !holdsCentre(geom, g) {
			// A polygon round the whole globe (-180 to 180, pole to pole)
			// has no outline in a projected CRS: projected, it was a
			// sliver along the antimeridian, and the run said the region
			// was "smaller or thinner than the cells".
			return nil, fmt.Errorf("extent: %s covers the raster's centre cell in its own CRS but not once projected to the raster's CRS: its outline runs round the globe (along 180 degrees of longitude or over a pole) or beyond what the raster's projection can show; clip it to the study area first (e.g. ogr2ogr -clipsrc WEST SOUTH EAST NORTH OUT.gpkg %s, in degrees)", unitName(path, id), path)
		}
		if missedCentre && holdsCentre(geom, g) {
			// A polygon holding the point the projection sends to the
			// rim of its map (the far side of the globe from an azimuthal
			// projection's centre: 170 W 52 S for LAEA Europe) comes out
			// inside out: its outline encloses the map's centre, and a
			// unit south-east of New Zealand covered all of Europe.
			if s.field != "" {
				// A unit of a world layer of units (ecoregions) on the
				// far side of the globe: left out, with a warning.
				*warns = append(*warns, farSideUnit(path, id))
				continue
			}
			return nil, fmt.Errorf("extent: %s lies away from the raster's centre cell in its own CRS but holds it once projected to the raster's CRS: it holds the point the raster's projection puts on the rim of its map (the far side of the globe from the projection's centre), around which the polygon turns inside out; clip the layer to the study area first (e.g. ogr2ogr -clipsrc WEST SOUTH EAST NORTH OUT.gpkg %s, in degrees)", unitName(path, id), path)
		}
		if !lsr.Geographic() && g.Geographic {
			// A projected layer has no antimeridian of its own: its edges
			// are short wherever they cross 180 degrees.
			if u, err := unwrapRings(geom, g.srs); err != nil {
				return nil, fmt.Errorf("extent: %s: %w", unitName(path, id), err)
			} else if u != nil {
				geom = u
			}
			// A vertex past the edge of the world of the layer's CRS
			// (an easting of 1e8 m in EPSG:3857, whose world ends at
			// about 2e7) lands turns round the globe: the base region's
			// buffers stopped on an internal error, an extra layer came
			// out empty as if off the raster.
			if p := coordinateProblem(geom, true); p != "" {
				return nil, fmt.Errorf("extent: %s: projected to the raster's longitudes and latitudes it %s, so a vertex lies past the edge of the world of the layer's CRS; check the layer's coordinates and CRS, or clip it to the study area (e.g. ogr2ogr -clipsrc XMIN YMIN XMAX YMAX OUT.gpkg %s, in the layer's units)", unitName(path, id), p, path)
			}
		}
		if !lsr.IsSame(g.srs) {
			fixed, err := validProjected(geom, g.srs)
			if err != nil {
				return nil, fmt.Errorf("extent: %s: %w", unitName(path, id), err)
			}
			geom = fixed
		}
		sh, err := shapeOf(geom, g)
		if err != nil {
			return nil, fmt.Errorf("extent: %s: %w", unitName(path, id), err)
		}
		units = append(units, Unit{ID: id, Shape: sh, geom: geom})
	}
	return units, nil
}

// farSideUnit is the warning for a unit of a layer of units (read with an
// id field: ecoregions) left out because it holds the point the raster's
// projection puts on the rim of its map, around which it would turn
// inside out and cover the raster. A region or an extra layer, the study's
// own polygons, is refused for it instead; a world layer of units on a
// regional grid holds such units as a matter of course (an Antarctic unit
// on a north polar grid), and they lie on the far side of the globe from
// the raster's centre, where a unit does not reach the raster short of
// spanning half the globe.
func farSideUnit(path, id string) string {
	return fmt.Sprintf("%s lies on the far side of the globe from the raster: it holds the point the raster's projection puts on the rim of its map, around which it would turn inside out and cover every cell; it is left out (clip the layer to the study area, e.g. ogr2ogr -clipsrc WEST SOUTH EAST NORTH OUT.gpkg %s, in degrees, to leave such units out yourself)", unitName(path, id), path)
}

// validProjected returns geom, a unit valid in its layer's CRS now
// reprojected to the raster's (srs), repaired when the projection left
// it invalid: the parts of a unit stored split at 180 degrees meet along
// that meridian, and projected (with vertices added along their edges)
// they cross each other by rounding there, which GEOS's union and
// touching tests refuse ("side location conflict"). The repair keeps the
// area of every part (makeValid); the user's geometry was valid, so
// nothing is said.
func validProjected(geom *godal.Geometry, srs *godal.SpatialRef) (*godal.Geometry, error) {
	if ok, _ := validity(geom); ok {
		return geom, nil
	}
	fixed, err := makeValid(geom, srs)
	if err != nil {
		return nil, fmt.Errorf("valid in its own CRS, it is not once reprojected to the raster's, and GDAL could not repair it (%v); clip the layer to the raster's area, or give it in the raster's CRS", err)
	}
	return fixed, nil
}

// centreCell returns the raster's centre cell as a polygon in srs (nil:
// in the grid's CRS), or its centre point when point is set.
func centreCell(g *Grid, srs *godal.SpatialRef, point bool) (*godal.Geometry, error) {
	gt := g.GeoTransform
	c, r := float64(g.Width/2), float64(g.Height/2)
	x0, y0 := gt[0]+c*gt[1], gt[3]+r*gt[5]
	x1, y1 := x0+gt[1], y0+gt[5]
	wkt := fmt.Sprintf("POLYGON ((%.17g %.17g, %.17g %.17g, %.17g %.17g, %.17g %.17g, %.17g %.17g))", x0, y0, x1, y0, x1, y1, x0, y1, x0, y0)
	if point {
		wkt = fmt.Sprintf("POINT (%.17g %.17g)", (x0+x1)/2, (y0+y1)/2)
	}
	cell, err := godal.NewGeometryFromWKT(wkt, g.srs)
	if err != nil {
		return nil, err
	}
	if srs != nil {
		if err := cell.Reproject(srs); err != nil {
			cell.Close()
			return nil, err
		}
	}
	return cell, nil
}

// holdsCentre reports whether geom, in the grid's CRS, holds the centre
// of the raster's centre cell (not on its edge).
func holdsCentre(geom *godal.Geometry, g *Grid) bool {
	pt, err := centreCell(g, nil, true)
	if err != nil {
		return true
	}
	defer pt.Close()
	return geom.Contains(pt)
}

// featureList lists feature numbers for one warning about them all: the
// first ten, then how many more (a layer may hold thousands).
func featureList(fids []int) string {
	var b strings.Builder
	for i, n := range fids {
		if i == 10 {
			fmt.Fprintf(&b, " and %d more", len(fids)-10)
			break
		}
		if i > 0 {
			b.WriteString(", ")
		}
		fmt.Fprint(&b, n)
	}
	return b.String()
}

// unitName names the features of path unioned under id in a message:
// the ecoregion unit, or the file alone for a region or extra layer,
// whose features are one area (id "").
func unitName(path, id string) string {
	if id == "" {
		return path
	}
	return fmt.Sprintf("%s unit %q", path, id)
}

// shapefileCutShort refuses a shapefile whose .shp or .dbf ends before
// the records its index or header place in it (cut off while being
// copied or written): GDAL read the features of a .shp cut short as
// features without geometry (skipped with a warning), and stopped at the
// last whole record of a .dbf cut short, the features after it dropped
// without a word, logging only "fread failed on DBF file". nil for any
// other path, or when a file is missing or its header unreadable (the
// open that follows says why).
func shapefileCutShort(path string) error {
	ext := filepath.Ext(path)
	if !strings.EqualFold(ext, ".shp") {
		return nil
	}
	stem := strings.TrimSuffix(path, ext)
	cut := func(file string, size, want int64) error {
		return fmt.Errorf("extent: %s is cut short: its %s holds %d bytes where its records need %d (the file was cut off while being copied or written, and the features past its end would be lost); copy the whole shapefile again (.shp, .shx, .dbf, .prj), or export it again as a GeoPackage",
			path, filepath.Base(file), size, want)
	}
	// The .shx holds, after a header of 100 bytes, each record's offset
	// in the .shp and its content's length, in 16-bit words and
	// big-endian, the record's own header of 8 bytes not counted (ESRI
	// Shapefile Technical Description, 1998).
	if shx := sidecarPath(stem, ext, ".shx"); shx != "" {
		if idx, err := os.ReadFile(shx); err == nil && len(idx) >= 100 {
			// Its header holds its own length in 16-bit words too (bytes
			// 24-27), from which GDAL counts the records.
			if want := 2 * int64(binary.BigEndian.Uint32(idx[24:28])); int64(len(idx)) < want {
				return cut(shx, int64(len(idx)), want)
			}
			var want int64
			for r := idx[100:]; len(r) >= 8; r = r[8:] {
				want = max(want, 2*(int64(binary.BigEndian.Uint32(r[0:4]))+int64(binary.BigEndian.Uint32(r[4:8])))+8)
			}
			if st, err := os.Stat(path); err == nil && st.Size() < want {
				return cut(path, st.Size(), want)
			}
		}
	}
	// A .dbf's header holds its number of records (bytes 4-7), its own
	// length (8-9) and a record's (10-11), little-endian (dBase III).
	if dbf := sidecarPath(stem, ext, ".dbf"); dbf != "" {
		f, err := os.Open(dbf)
		if err != nil {
			return nil
		}
		defer f.Close()
		h := make([]byte, 12)
		st, serr := f.Stat()
		if _, err := io.ReadFull(f, h); err != nil || serr != nil {
			return nil
		}
		want := int64(binary.LittleEndian.Uint16(h[8:10])) + int64(binary.LittleEndian.Uint32(h[4:8]))*int64(binary.LittleEndian.Uint16(h[10:12]))
		if st.Size() < want {
			return cut(dbf, st.Size(), want)
		}
	}
	return nil
}

// sidecarPath returns the file of a shapefile at stem+ext with the
// extension want, in the case of ext (.shx beside .shp, .SHX beside
// .SHP) or else the other, or "" when there is none.
func sidecarPath(stem, ext, want string) string {
	first, second := strings.ToLower(want), strings.ToUpper(want)
	if ext == strings.ToUpper(ext) {
		first, second = second, first
	}
	for _, e := range []string{first, second} {
		if st, err := os.Stat(stem + e); err == nil && st.Mode().IsRegular() {
			return stem + e
		}
	}
	return ""
}

// missingDBF returns the name of the .dbf file a shapefile at path
// lacks (GDAL reads a .shp without one, with no attributes), or "".
func missingDBF(path string) string {
	ext := filepath.Ext(path)
	if !strings.EqualFold(ext, ".shp") {
		return ""
	}
	stem := strings.TrimSuffix(path, ext)
	for _, e := range []string{".dbf", ".DBF"} {
		if _, err := os.Stat(stem + e); err == nil {
			return ""
		}
	}
	return filepath.Base(stem) + ".dbf"
}

// noGeometry reports a feature without geometry: godal returns a Geometry
// holding a NULL handle then, and asking GDAL whether that is empty makes
// it print "Pointer 'hGeom' is NULL"; the handle is read by reflection
// instead.
func noGeometry(g *godal.Geometry) bool {
	if g == nil {
		return true
	}
	if h := reflect.ValueOf(g).Elem().FieldByName("handle"); h.IsValid() && (h.Kind() == reflect.Pointer || h.Kind() == reflect.UnsafePointer) && h.IsNil() {
		return true
	}
	return g.Empty()
}

// coordinateProblem says what is wrong with the coordinates of g, or "":
// not finite, for a projected layer one beyond vocab.MaxProjected, or for a
// latitude-longitude layer a latitude beyond the poles or a longitude
// beyond one and a half turns.
func coordinateProblem(g *godal.Geometry, geographic bool) string {
	b, err := g.Bounds()
	if err != nil {
		return "has coordinates that cannot be read"
	}
	for _, v := range b {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return "has a coordinate that is not a finite number"
		}
	}
	if !geographic {
		// A vertex at an easting of 1e20 in EPSG:3857 kept the run
		// reprojecting the region for more than 2 minutes.
		for _, v := range b {
			if math.Abs(v) > vocab.MaxProjected {
				return fmt.Sprintf("has a vertex at %g, more than %g units from the origin of the layer's CRS, beyond any place on the Earth", v, vocab.MaxProjected)
			}
		}
		return ""
	}
	const eps = 1e-9
	switch {
	case b[1] < -90-eps:
		return fmt.Sprintf("has a vertex at latitude %g, beyond the south pole", b[1])
	case b[3] > 90+eps:
		return fmt.Sprintf("has a vertex at latitude %g, beyond the north pole", b[3])
	case b[0] < -540:
		return fmt.Sprintf("has a vertex at longitude %g, beyond -540 degrees", b[0])
	case b[2] > 540:
		return fmt.Sprintf("has a vertex at longitude %g, beyond 540 degrees", b[2])
	}
	return ""
}

// unreadablePRJ refuses a shapefile (or a CSV table, whose driver reads
// one too) that GDAL gave no CRS although a .prj lies beside it: the
// .prj is empty, holds text that is no CRS, or holds one in a form
// GDAL's reading of a .prj does not take (WKT2, or a blank line before
// the WKT, as gdalsrsinfo writes it). Such a layer was said to have "no
// CRS", and the user looked for a missing file. nil when there is no
// .prj (the refusal for no CRS then says what to do) or for another
// driver.
func unreadablePRJ(path, driver string) error {
	if driver != "ESRI Shapefile" && driver != "CSV" {
		return nil
	}
	ext := filepath.Ext(path)
	prj := sidecarPath(strings.TrimSuffix(path, ext), ext, ".prj")
	if prj == "" {
		return nil
	}
	b, err := os.ReadFile(prj)
	if err != nil {
		return fmt.Errorf("extent: %s has no CRS: its CRS file %s cannot be read (%s); make it readable, or save the layer with its CRS (e.g. ogr2ogr -a_srs EPSG:4326 OUT.gpkg %s)", path, prj, gdalmsg.Cause(err.Error()), path)
	}
	text := strings.TrimSpace(string(b))
	what := fmt.Sprintf("could not be read as a CRS (it holds %q)", cutText(text))
	switch {
	case text == "":
		what = "is empty"
	case crsText(text):
		what = "holds a CRS in a form GDAL does not take from a .prj (WKT2, or a blank line before the WKT)"
	}
	return fmt.Errorf("extent: %s has no CRS: its CRS file %s %s; write the CRS its coordinates are in into it as one line of ESRI WKT (e.g. gdalsrsinfo -o wkt_esri --single-line EPSG:4326 > %s, with that CRS's EPSG code), or save the layer with its CRS (e.g. ogr2ogr -a_srs EPSG:4326 OUT.gpkg %s)",
		path, prj, what, prj, path)
}

// crsText reports whether text is a CRS in WKT (WKT1, ESRI's or WKT2).
func crsText(text string) bool {
	sr, err := godal.NewSpatialRefFromWKT(text)
	if err != nil {
		return false
	}
	sr.Close()
	return true
}

// undefinedCRS reports a CRS that only says it is unknown: the GeoPackage
// "Undefined geographic SRS" (srs_id 0) and "Undefined Cartesian SRS"
// (srs_id -1), and local engineering CRSs.
func undefinedCRS(wkt string) bool {
	w := strings.TrimSpace(wkt)
	return strings.Contains(w, `"Undefined `) || strings.HasPrefix(w, "LOCAL_CS") || strings.HasPrefix(w, "ENGCRS")
}

// crsName is the name in a WKT CRS (the first quoted string).
func crsName(wkt string) string {
	i := strings.IndexByte(wkt, '"')
	if i < 0 {
		return "unnamed"
	}
	j := strings.IndexByte(wkt[i+1:], '"')
	if j < 0 {
		return "unnamed"
	}
	return wkt[i+1 : i+1+j]
}

// checkFeatureTypes refuses, before any repair, features that are not
// areas: points, lines, collections holding them, and polygons with no
// area (degenerate rings). The feature is named by its 1-based position.
func checkFeatureTypes(path string, layer godal.Layer) error {
	return eachFeature(layer, func(n int, f *godal.Feature) error {
		if g := f.Geometry(); !noGeometry(g) {
			if msg := polygonProblem(g); msg != "" {
				return fmt.Errorf("extent: %s feature %d %s; areasweep needs polygon areas: remove or fix the feature in a GIS", path, n, msg)
			}
		}
		return nil
	})
}

// needsFlattening reports whether a feature of the layer has Z or M
// coordinates or a curved geometry type (OGR's geometry type codes: the
// 2.5D flag 0x80000000, ISO codes 1000 and up for Z, M and ZM, and 8 to 12
// for the curve types), which the plane, linear reading of shapeOf does
// not take, or is or holds a triangle, TIN or polyhedral surface, whose
// faces are read as polygons in the copy it asks for (surfacesToAreas).
func needsFlattening(layer godal.Layer) bool {
	return anyGeometry(layer, func(g *godal.Geometry) bool {
		t := uint32(g.Type())
		base := (t & 0x7fffffff) % 1000
		return t&0x80000000 != 0 || t&0x7fffffff >= 1000 || (base >= 8 && base <= 12) || holdsSurface(g)
	})
}

// surfaceBase reports whether base, an OGR geometry type code without
// its Z and M parts, is a polyhedral surface (15), a TIN (16) or a
// triangle (17): areas made of polygon faces.
func surfaceBase(base uint32) bool { return base >= 15 && base <= 17 }

// holdsSurface reports whether g is, or is a collection holding (nested
// or not), a triangle, TIN or polyhedral surface.
func holdsSurface(g *godal.Geometry) bool {
	base := (uint32(g.Type()) & 0x7fffffff) % 1000
	if surfaceBase(base) {
		return true
	}
	if base != 7 { // a geometry collection
		return false
	}
	for i := 0; i < g.GeometryCount(); i++ {
		if sub, err := g.SubGeometry(i); err == nil && holdsSurface(sub) {
			return true
		}
	}
	return false
}

// surfacesToAreas replaces, in layer (the copy in memory ready made),
// each geometry that is or holds a triangle, TIN or polyhedral surface
// by the area its faces cover in the plane (faces): a triangle is a
// polygon of one ring, a TIN or polyhedral surface a set of them (faces
// standing upright in 3D cover no area). Without it a triangle was
// refused as "not a polygon" unless it had Z coordinates (the 3D copy
// turned it into a polygon), and so were a TIN and a polyhedral surface
// of several faces. A collection that also holds a point or a line is
// left as it is, for checkFeatureTypes to refuse.
func surfacesToAreas(path string, layer godal.Layer, srs *godal.SpatialRef) error {
	return eachFeature(layer, func(n int, f *godal.Feature) error {
		g := f.Geometry()
		if noGeometry(g) || !holdsSurface(g) {
			return nil
		}
		area, err := faces(g, srs)
		if err != nil {
			return nil
		}
		err = f.SetGeometry(area)
		area.Close()
		if err == nil {
			err = layer.UpdateFeature(f)
		}
		if err != nil {
			return fmt.Errorf("extent: %s feature %d: its faces (a triangle, TIN or polyhedral surface) could not be read as an area (%s); save the layer as polygons in a GIS (e.g. ogr2ogr -nlt MULTIPOLYGON OUT.gpkg %s)", path, n, gdalmsg.Cause(err.Error()), path)
		}
		return nil
	})
}

// polygonProblem says what makes g unusable as an area, or "".
func polygonProblem(g *godal.Geometry) string {
	switch g.Type() {
	case godal.GTPolygon, godal.GTMultiPolygon, godal.GTPolygon25D, godal.GTMultiPolygon25D:
		// An invalid polygon (a bow-tie's halves cancel) is measured after
		// repair, in readUnits.
		if !(g.Area() > 0) && valid(g) {
			return "is a degenerate polygon with no area (its points lie on a line or repeat)"
		}
		return ""
	case godal.GTGeometryCollection, godal.GTGeometryCollection25D:
		for i := 0; i < g.GeometryCount(); i++ {
			sub, err := g.SubGeometry(i)
			if err != nil {
				return "is a geometry collection that cannot be read"
			}
			if p := polygonProblem(sub); p != "" {
				return "is a geometry collection whose part " + fmt.Sprint(i+1) + " " + p
			}
		}
		return ""
	}
	return "is a " + strings.ToLower(g.Name()) + ", not a polygon"
}

// firstFields returns the fields of the layer's first feature, and
// false for an empty layer.
func firstFields(layer godal.Layer) (map[string]godal.Field, bool) {
	layer.ResetReading()
	defer layer.ResetReading()
	f := layer.NextFeature()
	if f == nil {
		return nil, false
	}
	defer f.Close()
	return f.Fields(), true
}

// fieldName returns the layer's field named name, or, when it has none,
// its one field whose name differs only in case (a shapefile's DBF holds
// ECO_NAME, typed eco_name; OGR's own SQL ignores case too). Otherwise
// name itself, which the reader then reports with the list of fields.
func fieldName(layer godal.Layer, name string) string {
	fields, ok := firstFields(layer)
	if !ok {
		return name
	}
	if _, ok := fields[name]; ok {
		return name
	}
	found := ""
	for k := range fields {
		if strings.EqualFold(k, name) {
			if found != "" {
				return name // two spellings: say which fields there are
			}
			found = k
		}
	}
	if found == "" {
		return name
	}
	return found
}

// hasField reports whether the layer's first feature has a field named
// name (true for an empty layer, which the reader refuses itself).
func hasField(layer godal.Layer, name string) bool {
	fields, ok := firstFields(layer)
	if !ok {
		return true
	}
	_, ok = fields[name]
	return ok
}

// checkNullIDs refuses a unit layer with features whose id field is NULL:
// they would silently merge into one unit.
func checkNullIDs(ds *godal.Dataset, path string, layer godal.Layer, field string) error {
	if !hasField(layer, field) {
		// OGR SQL reads a name it does not know (a GeoPackage's fid,
		// which is the features' id, not a field) as NULL on every
		// feature: the reader says which fields there are.
		return nil
	}
	from := fmt.Sprintf(`FROM "%s"`, strings.ReplaceAll(layer.Name(), `"`, `""`))
	isNull := fmt.Sprintf(`WHERE "%s" IS NULL`, strings.ReplaceAll(field, `"`, `""`))
	q := "SELECT COUNT(*) AS n " + from + " " + isNull
	rs, err := ds.ExecuteSQL(q, godal.OGRSQLDialect())
	if err != nil || rs == nil {
		return nil // an unknown field is reported by the reader with the list of fields
	}
	defer rs.Close()
	f := rs.NextFeature()
	if f == nil {
		return nil
	}
	defer f.Close()
	v, ok := f.Fields()["n"]
	if !ok || v.Int() <= 0 {
		// A count below 0 comes from a file GDAL cannot read whole (a
		// damaged GeoPackage): the reading of its features says so.
		return nil
	}
	which := ""
	if fids := nullFeatures(ds, from, isNull); len(fids) > 0 {
		which = " (feature(s) " + featureList(fids) + ", numbered from 1 in the file's order)"
	}
	return fmt.Errorf("extent: %s has %d feature(s) with no value (NULL) in field %q%s; they would merge into one unit: give every unit an id, or delete those features", path, v.Int(), field, which)
}

// nullFeatures returns the numbers (1 for the first read) of the
// features of the layer (from, an OGR SQL FROM clause) whose id is NULL
// (isNull, the WHERE clause that says so), from their FIDs (a GeoJSON's
// count from 0, a GeoPackage's from 1, and either may skip); nil when
// GDAL cannot list them.
func nullFeatures(ds *godal.Dataset, from, isNull string) []int {
	fids := func(q string) []int64 {
		rs, err := ds.ExecuteSQL(q, godal.OGRSQLDialect())
		if err != nil || rs == nil {
			return nil
		}
		defer rs.Close()
		var out []int64
		for {
			f := rs.NextFeature()
			if f == nil {
				return out
			}
			if v, ok := f.Fields()["n"]; ok {
				out = append(out, v.Int())
			}
			f.Close()
		}
	}
	null := fids("SELECT FID AS n " + from + " " + isNull)
	all := fids("SELECT FID AS n " + from)
	number := make(map[int64]int, len(all))
	for i, id := range all {
		number[id] = i + 1
	}
	var out []int
	for _, id := range null {
		n, ok := number[id]
		if !ok {
			return nil
		}
		out = append(out, n)
	}
	return out
}

// invalidFeatures returns the 1-based numbers of the layer's features whose
// geometry is not valid, and for each why (validity: GEOS's reason in our
// words, or "").
func invalidFeatures(path string, layer godal.Layer) (bad []int, why []string, err error) {
	err = eachFeature(layer, func(n int, f *godal.Feature) error {
		g := f.Geometry()
		if noGeometry(g) {
			return nil
		}
		if ok, reason := validity(g); !ok {
			if p, found := nonFiniteVertex(g); found {
				return fmt.Errorf("extent: %s feature %d has a vertex with a coordinate that is not a finite number (%g %g, in the layer's coordinates); its outline is unknown there: fix or delete the vertex in a GIS", path, n, p[0], p[1])
			}
			bad, why = append(bad, n), append(why, reason)
		}
		return nil
	})
	if err != nil {
		return nil, nil, err
	}
	return bad, why, nil
}

// closeRingAdvice is what to do about a ring that does not end at its
// first point. GDAL's ogr2ogr copies such a ring as it is, and its
// -makevalid fails on it (GEOS cannot build the ring), so neither is
// advised.
const closeRingAdvice = "; close the ring (repeat its first point at its end) in a text editor or in the program that made the file; converting the file with ogr2ogr, even with -makevalid, does not close a ring"

// openRingOf names the first ring of g (a polygon, a multipolygon or a
// collection of them) whose last vertex is not its first, as openRing
// does; "" when there is none.
func openRingOf(g *godal.Geometry) string {
	b, err := g.WKB()
	if err != nil {
		return ""
	}
	og, err := wkb.Unmarshal(b)
	if err != nil {
		return ""
	}
	return orbOpenRing(og)
}

func orbOpenRing(g orb.Geometry) string {
	rings := func(p orb.Polygon) [][][]float64 {
		out := make([][][]float64, len(p))
		for i, r := range p {
			for _, pt := range r {
				out[i] = append(out[i], []float64{pt[0], pt[1]})
			}
		}
		return out
	}
	switch v := g.(type) {
	case orb.Polygon:
		return openRing(rings(v), "its polygon")
	case orb.MultiPolygon:
		for i, p := range v {
			if w := openRing(rings(p), fmt.Sprintf("polygon %d of its multipolygon", i+1)); w != "" {
				return w
			}
		}
	case orb.Collection:
		for i, m := range v {
			if w := orbOpenRing(m); w != "" {
				return fmt.Sprintf("member %d of its collection: %s", i+1, strings.TrimPrefix(w, "its "))
			}
		}
	}
	return ""
}

// nonFiniteVertex returns the first vertex of g with a NaN or infinite
// coordinate. MakeValid drops such a vertex, and what is left (a triangle
// of a square with one vertex NaN) is no outline anyone drew, so a
// feature holding one is refused rather than repaired.
func nonFiniteVertex(g *godal.Geometry) (orb.Point, bool) {
	b, err := g.WKB()
	if err != nil {
		return orb.Point{}, false
	}
	og, err := wkb.Unmarshal(b)
	if err != nil {
		return orb.Point{}, false
	}
	return firstNonFinite(og)
}

func firstNonFinite(g orb.Geometry) (orb.Point, bool) {
	bad := func(p orb.Point) bool {
		return math.IsNaN(p[0]) || math.IsInf(p[0], 0) || math.IsNaN(p[1]) || math.IsInf(p[1], 0)
	}
	points := func(ps []orb.Point) (orb.Point, bool) {
		for _, p := range ps {
			if bad(p) {
				return p, true
			}
		}
		return orb.Point{}, false
	}
	switch v := g.(type) {
	case orb.Point:
		return v, bad(v)
	case orb.MultiPoint:
		return points(v)
	case orb.LineString:
		return points(v)
	case orb.Ring:
		return points(v)
	case orb.MultiLineString:
		for _, l := range v {
			if p, ok := points(l); ok {
				return p, true
			}
		}
	case orb.Polygon:
		for _, r := range v {
			if p, ok := points(r); ok {
				return p, true
			}
		}
	case orb.MultiPolygon:
		for _, pg := range v {
			if p, ok := firstNonFinite(pg); ok {
				return p, true
			}
		}
	case orb.Collection:
		for _, c := range v {
			if p, ok := firstNonFinite(c); ok {
				return p, true
			}
		}
	}
	return orb.Point{}, false
}

// repairWarning is the warning for the features bad of path repaired with
// MakeValid, each with why it was invalid (why[i] of bad[i], "" when GEOS
// gave no reason that reads as one): the reasons of the first three,
// their points in the layer's coordinates.
func repairWarning(path string, bad []int, why []string) string {
	var reasons []string
	for i, n := range bad {
		if len(reasons) == 3 {
			break
		}
		if why[i] == "" {
			continue
		}
		if len(bad) == 1 {
			reasons = append(reasons, why[i])
		} else {
			reasons = append(reasons, fmt.Sprintf("feature %d: %s", n, why[i]))
		}
	}
	detail := ""
	if len(reasons) > 0 {
		more := ""
		if len(bad) > len(reasons) && len(bad) > 1 {
			more = "; ..."
		}
		detail = " (" + strings.Join(reasons, "; ") + more + ", in the layer's coordinates)"
	}
	if len(bad) == 1 {
		return fmt.Sprintf("%s feature %d had invalid geometry%s; repaired with GDAL MakeValid, which keeps all of its area: check the repaired outline in extents.gpkg", path, bad[0], detail)
	}
	return fmt.Sprintf("%s features %s had invalid geometry%s; repaired with GDAL MakeValid, which keeps all of their area: check the repaired outlines in extents.gpkg", path, featureList(bad), detail)
}

// offMapVertex is the error for a polygon vertex (x, y), in the raster's
// CRS, that has no longitude and latitude: it lies off the Earth in that
// CRS, beyond the edge of a world map (a region drawn in Mollweide or
// EASE-Grid coordinates past the map's outline) or, for a layer in
// longitude/latitude, where the projection cannot go. The message said
// only that the vertex "cannot be transformed to WGS84", with no advice.
func offMapVertex(g *Grid, x, y float64) error {
	b := g.Bounds()
	return fmt.Errorf("a vertex (%g, %g), in the raster's CRS (%s), lies off the Earth there: beyond the edge of the map, where PROJ gives no longitude and latitude; clip the layer to the map's outline (ogr2ogr -clipdst XMIN YMIN XMAX YMAX OUT.gpkg IN, with the raster's extent %.0f %.0f %.0f %.0f, is enough where the map fills the raster; on a world map whose corners lie off the Earth, give the polygons in longitude/latitude, split at 180 degrees)", x, y, crsName(g.WKT), b[0], b[1], b[2], b[3])
}

// edgeVertexLonLat returns the WGS84 longitude and latitude of grid-CRS
// vertex (x, y), whose transformation failed, from the vertex moved toward
// the raster's centre by 1e-12, then 1e-10 of its distance from it. A
// vertex on the 180th meridian projected to the edge of a world map
// (Mollweide's ellipse) lands, for about half of the latitudes, a rounding
// error outside it, where PROJ's inverse fails: a latitude-longitude region
// split at 180 degrees, as the README advises, was refused ("a vertex
// (1.39389e+07, 5.72608e+06) cannot be transformed to WGS84"). Moved so,
// it stays within a millimetre of the edge. ok is false when it still
// fails: the vertex is off the map.
func (g *Grid) edgeVertexLonLat(x, y float64) (lon, lat float64, ok bool) {
	cx, cy := g.Centre(g.Width/2, g.Height/2)
	for _, f := range []float64{1e-12, 1e-10} {
		xs, ys := []float64{x + f*(cx-x)}, []float64{y + f*(cy-y)}
		lons, lats := make([]float64, 1), make([]float64, 1)
		g.ToLonLat(xs, ys, lons, lats)
		if !math.IsNaN(lons[0]) && !math.IsNaN(lats[0]) {
			return lons[0], lats[0], true
		}
	}
	return math.NaN(), math.NaN(), false
}

// shapeOf converts a GDAL geometry in the grid CRS to a Shape.
func shapeOf(geom *godal.Geometry, g *Grid) (Shape, error) {
	b, err := geom.WKB()
	if err != nil {
		return Shape{}, err
	}
	og, err := wkb.Unmarshal(b)
	if err != nil {
		return Shape{}, fmt.Errorf("geometry: %w", err)
	}
	var mp orb.MultiPolygon
	switch og.(type) {
	case orb.Polygon, orb.MultiPolygon, orb.Collection:
		mp = polygonsOf(nil, og)
	default:
		return Shape{}, fmt.Errorf("geometry is a %s, not a polygon", og.GeoJSONType())
	}
	if len(mp) == 0 {
		return Shape{}, errors.New("geometry holds no polygon")
	}
	if g.Geographic {
		// Put each ring in the grid's longitude range by whole turns, so a
		// region given in -180..180 lands on a grid running 170..190.
		west := g.GeoTransform[0]
		east := west + float64(g.Width)*g.GeoTransform[1]
		var out orb.MultiPolygon
		for _, p := range mp {
			if len(p) == 0 {
				continue
			}
			// A copy of the polygon, holes and all, goes to each whole
			// turn of longitude at which it meets the grid: one for most
			// polygons; two for one that runs across the grid's edge
			// meridian, such as a polygon round a pole written from -180
			// to 180 on a grid that starts elsewhere, or a projected one
			// across 180 degrees (unwrapRings). A polygon that meets the
			// grid at no turn goes to the turn that puts its middle
			// nearest the grid's, where it may still matter to the
			// buffers.
			bb := p[0].Bound()
			lo, hi := bb.Min[0], bb.Max[0]
			placed := false
			for k := math.Floor((west - hi) / 360); lo+360*k < east; k++ {
				if hi+360*k > west {
					out = append(out, shiftedPolygon(p, 360*k))
					placed = true
				}
			}
			if !placed {
				out = append(out, shiftedPolygon(p, 360*math.Round(((west+east)-(lo+hi))/720)))
			}
		}
		mp = out
	}
	ll := make(orb.MultiPolygon, len(mp))
	for i, p := range mp {
		ll[i] = make(orb.Polygon, len(p))
		for j, r := range p {
			xs := make([]float64, len(r))
			ys := make([]float64, len(r))
			for k, pt := range r {
				xs[k], ys[k] = pt[0], pt[1]
			}
			lons := make([]float64, len(r))
			lats := make([]float64, len(r))
			g.ToLonLat(xs, ys, lons, lats)
			rr := make(orb.Ring, len(r))
			for k := range r {
				if math.IsNaN(lons[k]) {
					var ok bool
					if lons[k], lats[k], ok = g.edgeVertexLonLat(xs[k], ys[k]); !ok {
						return Shape{}, offMapVertex(g, xs[k], ys[k])
					}
				}
				rr[k] = orb.Point{lons[k], lats[k]}
			}
			if g.Geographic {
				if err := checkRingLon(rr, true); err != nil {
					return Shape{}, err
				}
			}
			ll[i][j] = rr
		}
	}
	return Shape{Grid: mp, LonLat: ll}, nil
}

// polygonsOf appends to mp the polygons of geometry x: itself, its
// parts, or those of every collection it holds, however deeply nested (a
// collection inside a collection, as some exports write one feature's
// parts). Points and lines that a repair left beside the polygons hold no
// area and are left out.
func polygonsOf(mp orb.MultiPolygon, x orb.Geometry) orb.MultiPolygon {
	switch v := x.(type) {
	case orb.Polygon:
		mp = append(mp, v)
	case orb.MultiPolygon:
		mp = append(mp, v...)
	case orb.Collection:
		for _, y := range v {
			mp = polygonsOf(mp, y)
		}
	}
	return mp
}

// checkRingLon refuses rings with an edge jumping more than 180 degrees of
// longitude: such a ring crosses the antimeridian in a way the grid cannot
// represent, and filling it would cover the wrong side of the Earth. It
// checks each feature of a layer in longitude/latitude as it is read
// (readUnits, whatever the grid), and the rings on a latitude-longitude
// grid once more (shapeOf); a layer in a projected CRS is not checked on a
// projected grid: a ring there is straight in its coordinates wherever its
// corners' longitudes lie.
//
// On latitude-longitude grids the ring has been shifted by whole turns
// into the grid's range; the message shows the longitudes in -180..180,
// as the user wrote them.
//
// An edge from one copy of the antimeridian to the other (-180 to 180, a
// whole turn) is kept: it runs along a parallel across the whole map, as
// in a polygon around a pole written in one piece; so is an edge along a
// pole (alongPole).
func checkRingLon(r orb.Ring, shifted bool) error {
	for i := 1; i < len(r); i++ {
		if math.Abs(r[i][0]-r[i-1][0]) > 180 && !wholeTurn(r[i-1], r[i]) && !alongPole(r[i-1], r[i]) {
			a, b := r[i-1][0], r[i][0]
			if shifted {
				a, b = wrapInto(a, -180), wrapInto(b, -180)
			}
			return fmt.Errorf("a polygon edge spans %.4g degrees of longitude (from lon %.4f to %.4f, lat %.4f to %.4f), which is how a file crossing the antimeridian writes the short way across 180 degrees, and the grid cannot follow it; if the polygon crosses 180 degrees, split it there; if the edge runs the long way, straight in longitude and latitude, add vertices along it (ogr2ogr -segmentize 10 OUT.gpkg IN adds one every 10 degrees)", math.Abs(r[i][0]-r[i-1][0]), a, b, r[i-1][1], r[i][1])
		}
	}
	return nil
}

// wholeTurnStep is the longitude step (degrees) at which densifyWholeTurns
// cuts a whole-turn edge: our choice, fine enough that the chords stay
// within about 1 m of the parallel per 1000 km of its radius.
const wholeTurnStep = 0.1

// onAntimeridian reports whether longitude lon is 180 degrees east or west
// of Greenwich, in any turn.
func onAntimeridian(lon float64) bool { return math.Mod(math.Abs(lon), 360) == 180 }

// alongPole reports whether the edge a-b lies on a pole (both ends at
// latitude 90, or both at -90): one point of the Earth, whatever the
// longitudes. unwrapRings closes a ring that winds round a pole (one
// drawn in a polar stereographic CRS) along it.
func alongPole(a, b orb.Point) bool {
	return a[1] == b[1] && math.Abs(a[1]) == 90
}

// wholeTurn reports whether the edge a-b runs from one copy of the
// antimeridian to the next: along a parallel across the whole map.
func wholeTurn(a, b orb.Point) bool {
	return math.Abs(b[0]-a[0]) == 360 && onAntimeridian(a[0]) && onAntimeridian(b[0])
}

// densifyWholeTurns returns geom (longitude/latitude in srs, whose
// features readUnits has checked with checkRingLon) with every edge from
// -180 to 180 cut
// into steps of wholeTurnStep degrees, the parallel it stands for, so that
// it keeps its shape on a projected raster instead of joining two copies
// of one point, and without the corners between seam edges (seamEdge):
// projected, those edges are a slit to the pole, not a boundary. nil when
// geom has no such edge.
func densifyWholeTurns(geom *godal.Geometry, srs *godal.SpatialRef) (*godal.Geometry, error) {
	return mapRings(geom, srs, func(r orb.Ring) (orb.Ring, bool, error) {
		var out orb.Ring
		found := false
		for i, pt := range r {
			if i > 0 && wholeTurn(r[i-1], pt) {
				found = true
				a, n := r[i-1], int(360/wholeTurnStep)
				for k := 1; k < n; k++ {
					f := float64(k) / float64(n)
					out = append(out, orb.Point{a[0] + f*(pt[0]-a[0]), a[1] + f*(pt[1]-a[1])})
				}
			}
			out = append(out, pt)
		}
		if !found {
			return r, false, nil
		}
		return dropSeamCorners(out), true, nil
	})
}

// dropSeamCorners returns the closed ring r without the corners whose two
// edges are both seam edges (seamEdge).
func dropSeamCorners(r orb.Ring) orb.Ring {
	n := len(r) - 1 // r[n] == r[0]
	if n < 3 {
		return r
	}
	var out orb.Ring
	for i := range n {
		prev, next := r[(i+n-1)%n], r[i+1]
		if seamEdge(prev, r[i]) && seamEdge(r[i], next) {
			continue
		}
		out = append(out, r[i])
	}
	if len(out) < 3 {
		return r
	}
	return append(out, out[0])
}

// unwrapRings returns geom (longitude/latitude in srs, projected there
// from a layer in a projected CRS) with each ring's longitudes unwrapped:
// every vertex moved by whole turns to within 180 degrees of the one
// before it, so that a ring across the antimeridian runs on past 180 (its
// edges are short in the layer's own CRS). A ring round a pole comes back
// a turn away from where it started: it is closed along that pole's line
// (the pole nearer its mean latitude), as a polygon round a pole written
// in one piece. nil when no vertex moved.
func unwrapRings(geom *godal.Geometry, srs *godal.SpatialRef) (*godal.Geometry, error) {
	return mapRings(geom, srs, func(r orb.Ring) (orb.Ring, bool, error) {
		if len(r) < 2 {
			return r, false, nil
		}
		out := make(orb.Ring, len(r))
		out[0] = r[0]
		moved, meanLat := false, 0.0
		for i := 1; i < len(r); i++ {
			lon := r[i][0]
			for lon-out[i-1][0] > 180 {
				lon -= 360
			}
			for lon-out[i-1][0] < -180 {
				lon += 360
			}
			moved = moved || lon != r[i][0]
			out[i] = orb.Point{lon, r[i][1]}
			meanLat += r[i][1]
		}
		if last := out[len(out)-1]; last[0] != out[0][0] {
			pole := 90.0
			if meanLat < 0 {
				pole = -90
			}
			out = append(out[:len(out)-1:len(out)-1], last, orb.Point{last[0], pole}, orb.Point{out[0][0], pole}, out[0])
		}
		return out, moved, nil
	})
}

// mapRings returns geom (in srs) with each ring of its polygons replaced
// by what edit makes of it, or nil when edit changed none (or geom holds
// no polygon); the first error of edit stops it.
func mapRings(geom *godal.Geometry, srs *godal.SpatialRef, edit func(orb.Ring) (orb.Ring, bool, error)) (*godal.Geometry, error) {
	b, err := geom.WKB()
	if err != nil {
		return nil, err
	}
	og, err := wkb.Unmarshal(b)
	if err != nil {
		return nil, fmt.Errorf("geometry: %w", err)
	}
	changed := false
	poly := func(p orb.Polygon) (orb.Polygon, error) {
		q := make(orb.Polygon, len(p))
		for j, r := range p {
			e, ch, err := edit(r)
			if err != nil {
				return nil, err
			}
			q[j], changed = e, changed || ch
		}
		return q, nil
	}
	var ng orb.Geometry
	switch v := og.(type) {
	case orb.Polygon:
		if ng, err = poly(v); err != nil {
			return nil, err
		}
	case orb.MultiPolygon:
		m := make(orb.MultiPolygon, len(v))
		for i, p := range v {
			if m[i], err = poly(p); err != nil {
				return nil, err
			}
		}
		ng = m
	default:
		return nil, nil
	}
	if !changed {
		return nil, nil
	}
	nb, err := wkb.Marshal(ng)
	if err != nil {
		return nil, fmt.Errorf("geometry: %w", err)
	}
	out, err := godal.NewGeometryFromWKB(nb, srs)
	if err != nil {
		return nil, fmt.Errorf("geometry: %s", gdalmsg.Cause(err.Error()))
	}
	return out, nil
}

// shiftedPolygon returns a copy of p moved by dlon degrees of longitude.
func shiftedPolygon(p orb.Polygon, dlon float64) orb.Polygon {
	out := make(orb.Polygon, len(p))
	for j, r := range p {
		out[j] = make(orb.Ring, len(r))
		for k, pt := range r {
			out[j][k] = orb.Point{pt[0] + dlon, pt[1]}
		}
	}
	return out
}

// edge is a polygon edge in fractional pixel coordinates (col, row).
type edge struct{ x0, y0, x1, y1 float64 }

// pixelEdges converts a grid-CRS multipolygon to pixel-space edges.
func pixelEdges(g *Grid, mp orb.MultiPolygon) []edge {
	gt := g.GeoTransform
	var es []edge
	for _, p := range mp {
		for _, r := range p {
			for i := 1; i < len(r); i++ {
				a, b := r[i-1], r[i]
				e := edge{(a[0] - gt[0]) / gt[1], (a[1] - gt[3]) / gt[5], (b[0] - gt[0]) / gt[1], (b[1] - gt[3]) / gt[5]}
				if e.y0 != e.y1 {
					es = append(es, e)
				}
			}
		}
	}
	return es
}

// Fill calls fn(row, c0, c1) for each run of cells [c0,c1) of row whose
// centres lie inside mp (grid CRS), by the even-odd rule over all rings.
// A centre exactly on an edge is inside when the edge is its west
// boundary, outside when it is its east boundary (half-open rule), so
// adjacent polygons never share a cell.
func Fill(g *Grid, mp orb.MultiPolygon, fn func(row, c0, c1 int)) {
	es := pixelEdges(g, mp)
	sort.Slice(es, func(i, j int) bool { return math.Min(es[i].y0, es[i].y1) < math.Min(es[j].y0, es[j].y1) })
	var active []edge
	next := 0
	xs := make([]float64, 0, 64)
	for row := 0; row < g.Height; row++ {
		yc := float64(row) + 0.5
		for next < len(es) && math.Min(es[next].y0, es[next].y1) <= yc {
			active = append(active, es[next])
			next++
		}
		xs = xs[:0]
		keep := active[:0]
		for _, e := range active {
			lo, hi := math.Min(e.y0, e.y1), math.Max(e.y0, e.y1)
			if hi <= yc {
				continue // finished
			}
			keep = append(keep, e)
			if yc >= lo && yc < hi {
				xs = append(xs, crossX(e.x0, e.y0, e.x1, e.y1, yc))
			}
		}
		active = keep
		if len(xs) < 2 {
			continue
		}
		sort.Float64s(xs)
		for i := 0; i+1 < len(xs); i += 2 {
			c0 := int(math.Ceil(xs[i] - 0.5))
			c1 := int(math.Ceil(xs[i+1] - 0.5))
			c0 = max(c0, 0)
			c1 = min(c1, g.Width)
			if c1 > c0 {
				fn(row, c0, c1)
			}
		}
	}
}

// crossX returns the column at which the edge from (x0,y0) to (x1,y1)
// (pixel coordinates, y0 != y1) crosses row y, interpolated from the
// endpoint nearer the row (of two as near, the one with the smaller y).
// The result depends on the edge, not on its direction, so the two
// polygons that share an edge see it cross a row at the same column and
// a centre on it goes to one of them only; and the edges that meet at a
// vertex near the row cross it in their true order, so a polygon whose
// corner lies on a centre's row (to within rounding) holds no sliver of
// rounding width there that could take the centre from its neighbour.
// Interpolating from the far endpoint, as the edge ran in its ring, put
// the centre at a corner shared by six units of a tiling in two of them,
// and others in none.
func crossX(x0, y0, x1, y1, y float64) float64 {
	if d0, d1 := math.Abs(y-y0), math.Abs(y-y1); d1 < d0 || (d1 == d0 && y1 < y0) {
		x0, y0, x1, y1 = x1, y1, x0, y0
	}
	return x0 + (y-y0)*(x1-x0)/(y1-y0)
}

// Contains reports whether grid-CRS point (x,y) is inside mp by the same
// even-odd, half-open rule that Fill uses for cell centres.
func Contains(g *Grid, mp orb.MultiPolygon, x, y float64) bool {
	gt := g.GeoTransform
	px := (x - gt[0]) / gt[1]
	py := (y - gt[3]) / gt[5]
	in := false
	for _, p := range mp {
		for _, r := range p {
			for i := 1; i < len(r); i++ {
				a, b := r[i-1], r[i]
				y0, y1 := (a[1]-gt[3])/gt[5], (b[1]-gt[3])/gt[5]
				if y0 == y1 {
					continue
				}
				lo, hi := math.Min(y0, y1), math.Max(y0, y1)
				if py < lo || py >= hi {
					continue
				}
				x0, x1 := (a[0]-gt[0])/gt[1], (b[0]-gt[0])/gt[1]
				if crossX(x0, y0, x1, y1, py) <= px {
					in = !in
				}
			}
		}
	}
	return in
}
