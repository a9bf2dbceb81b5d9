package extent

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/airbusgeo/godal"

	"areasweep/extent/gdalmsg"
	"areasweep/extent/geodesy"
	"areasweep/extent/vocab"
)

var registerOnce sync.Once

// Configure sets GDAL's configuration for areasweep and registers the
// drivers. A program calls it once at start, before any GDAL use; the
// library itself never changes the process environment. (Under a limit of
// address space the package keeps the C heap to MallocArenasUnderLimit
// arenas from the program's start.)
//
//	GDAL_PAM_ENABLED=NO    reading a user's raster never writes a .aux.xml
//	                       beside it
//	OGR_CURRENT_DATE=2000-01-01T00:00:00.000Z
//	                       GeoPackages carry this date instead of the
//	                       clock's, so the same run writes the same bytes
//	                       (GDAL GPKG driver option); a user's value is kept
//	GDAL_CACHEMAX=16       (MB) each block of a model is read whole, once
//	                       per pass (and once at the points), so GDAL's
//	                       block cache (5% of the RAM by default) would
//	                       only grow the process with the raster. Every
//	                       block cached is fresh memory, and filling a
//	                       larger cache costs its page faults on every
//	                       pass: 64 MB cost about 0.4 s more CPU than 16
//	                       in a 27-million-cell run (about 30,000 more
//	                       faults at about 11 us each on the 2-core VM of
//	                       the README's figures). 16 MB still holds a row
//	                       of 256 x 256 Float32 tiles 16,000 cells wide,
//	                       which a virtual raster (VRT) whose blocks do not
//	                       line up with its sources' tiles reads again for
//	                       the next block row; a user's value is kept,
//	                       except a negative number, which GDAL refuses
//	                       with an error at the first block read (as
//	                       BlockCacheBytes counts it: BlockCacheMB)
//	CPL_DEBUG=OFF          a user's CPL_DEBUG=ON would make the GDAL
//	                       binding print GDAL's debug lines on standard
//	                       error
//	OGR_SQLITE_JOURNAL, OGR_SQLITE_PRAGMA
//	                       unset: a user's journal mode (WAL) or pragmas
//	                       (page_size) would change the bytes of the
//	                       GeoPackages written
//	OSR_WKT_FORMAT, GDAL_TIFF_ENDIANNESS
//	                       unset: a user's WKT1_ESRI would drop the EPSG
//	                       code of the grid's CRS in results.json and
//	                       write other CRS text in the GeoPackages, and
//	                       BIG would write extents.tif in other bytes
func Configure() {
	os.Setenv("GDAL_PAM_ENABLED", "NO")
	if os.Getenv("OGR_CURRENT_DATE") == "" {
		os.Setenv("OGR_CURRENT_DATE", "2000-01-01T00:00:00.000Z")
	}
	if v := os.Getenv("GDAL_CACHEMAX"); v == "" || cacheMaxNegative(v) {
		os.Setenv("GDAL_CACHEMAX", strconv.Itoa(BlockCacheMB))
	}
	os.Setenv("CPL_DEBUG", "OFF")
	os.Unsetenv("OGR_SQLITE_JOURNAL")
	os.Unsetenv("OGR_SQLITE_PRAGMA")
	os.Unsetenv("OSR_WKT_FORMAT")
	os.Unsetenv("GDAL_TIFF_ENDIANNESS")
	Register()
}

// cacheMaxNegative reports whether GDAL reads v as a negative
// GDAL_CACHEMAX, which it refuses: without a "%", GDAL 3.6 reads the
// leading integer as atoll does (spaces, a sign, digits; "-5MB" is -5).
func cacheMaxNegative(v string) bool {
	if strings.Contains(v, "%") {
		return false
	}
	s, ok := strings.CutPrefix(strings.TrimLeft(v, " \t\n\v\f\r"), "-")
	if !ok {
		return false
	}
	digits := len(s) - len(strings.TrimLeft(s, "0123456789"))
	return strings.Trim(s[:digits], "0") != ""
}

// BlockCacheMB is the size (MB) of GDAL's block cache that Configure sets
// when GDAL_CACHEMAX is not set (see Configure).
const BlockCacheMB = 16

// BlockCacheBytes returns the size of GDAL's block cache that
// GDAL_CACHEMAX asks for, read as GDAL reads it (its configuration
// options page, recalled from memory): a number below 100,000 is in MB, a
// larger one in bytes, "N%" is N percent of the physical memory (physical,
// bytes; BlockCacheMB when that is not known). Unset or unreadable, it is
// BlockCacheMB, what Configure sets.
func BlockCacheBytes(physical int64) int64 {
	v := strings.TrimSpace(os.Getenv("GDAL_CACHEMAX"))
	if pct, ok := strings.CutSuffix(v, "%"); ok {
		if p, err := strconv.ParseFloat(strings.TrimSpace(pct), 64); err == nil && p >= 0 && p <= 100 && physical > 0 {
			return int64(p / 100 * float64(physical))
		}
		return BlockCacheMB << 20
	}
	n, err := strconv.ParseInt(v, 10, 64)
	switch {
	case err != nil || n < 0:
		return BlockCacheMB << 20
	case n < 100000:
		return n << 20
	}
	return n
}

// CheckSetup reports, in a user's words, a GDAL or PROJ that the
// environment made unable to run areasweep: CheckDrivers, then CheckPROJ.
func CheckSetup() error {
	if err := CheckDrivers(); err != nil {
		return err
	}
	return CheckPROJ()
}

// neededDrivers are GDAL's drivers areasweep itself writes with: GTiff
// for the demo's models and extents.tif (and most models), GPKG for every
// GeoPackage. (The vector Memory driver, used for layers with curves
// only, is not required: later GDALs name it otherwise.)
var neededDrivers = []struct {
	name   godal.DriverName
	vector bool
	what   string
}{
	{godal.GTiff, false, "GeoTIFF rasters"},
	{godal.GeoPackage, true, "GeoPackages"},
}

// CheckDrivers reports a driver of neededDrivers that is not registered:
// GDAL_SKIP (or OGR_SKIP) in the environment names it. The run would
// otherwise refuse every GeoTIFF as "not a raster GDAL can read", or read
// a GeoPackage with GDAL's plain SQLite driver and refuse its first table
// as "gpkg_contents has no geometry".
func CheckDrivers() error {
	Register()
	for _, d := range neededDrivers {
		var ok bool
		if d.vector {
			_, ok = godal.VectorDriver(d.name)
		} else {
			_, ok = godal.RasterDriver(d.name)
		}
		if ok {
			continue
		}
		var set []string
		for _, k := range []string{"GDAL_SKIP", "OGR_SKIP"} {
			if v, ok := os.LookupEnv(k); ok {
				set = append(set, fmt.Sprintf("%s=%q", k, v))
			}
		}
		if len(set) > 0 {
			return fmt.Errorf("GDAL's %s driver, which areasweep needs for %s, is turned off by %s in the environment: take %s out of it (or unset it) and run again", d.name, d.what, strings.Join(set, " and "), d.name)
		}
		return fmt.Errorf("GDAL's %s driver, which areasweep needs for %s, is missing from the installed GDAL: install a GDAL built with it (Debian's libgdal has it)", d.name, d.what)
	}
	return nil
}

// CheckPROJ reports, in a user's words, a PROJ that cannot make WGS84
// (EPSG:4326) from its database, proj.db: every coordinate system a run
// meets goes through it. It fails when PROJ_DATA or PROJ_LIB in the
// environment names a folder without PROJ's database (PROJ's own words:
// "proj_create_from_database: Cannot find proj.db"), or without that
// variable when PROJ's data is not installed.
func CheckPROJ() error {
	Register()
	sr, err := godal.NewSpatialRefFromEPSG(4326)
	if err == nil {
		sr.Close()
		return nil
	}
	cause := gdalmsg.Cause(err.Error())
	var set []string
	for _, k := range []string{"PROJ_DATA", "PROJ_LIB"} {
		if v, ok := os.LookupEnv(k); ok {
			set = append(set, fmt.Sprintf("%s=%q", k, v))
		}
	}
	if len(set) > 0 {
		return fmt.Errorf("PROJ, the library that handles coordinate systems, cannot read its database (%s) with %s in the environment: unset it, or point it to the folder that holds the proj.db of the PROJ installed with GDAL", cause, strings.Join(set, " and "))
	}
	return fmt.Errorf("PROJ, the library that handles coordinate systems, cannot read its database (%s): install its data (the proj-data package on Debian and Ubuntu), or set PROJ_DATA to the folder that holds proj.db", cause)
}

// Register makes GDAL's drivers available. It is safe to call many times
// and sets no configuration (see Configure).
func Register() {
	registerOnce.Do(godal.RegisterAll)
}

// Errors about the model grid.
var (
	ErrNoCRS     = errors.New("extent: raster has no coordinate reference system")
	ErrRotated   = errors.New("extent: raster geotransform is rotated; warp it to a north-up grid first (gdalwarp)")
	ErrWideGrid  = errors.New("extent: raster spans more than 360 degrees of longitude, so some cells lie over others; clip it to one turn, e.g. gdal_translate -projwin -180 90 180 -90 IN OUT")
	ErrGridsDiff = errors.New("extent: model rasters are not on one grid")
	// ErrCRSMissing is ErrNoCRS for a raster that holds no CRS at all (not
	// an undefined one, nor one PROJ cannot read): it has ErrNoCRS's
	// words, and errors.Is finds both.
	ErrCRSMissing = fmt.Errorf("%w", ErrNoCRS)
)

// Grid is the model raster grid: size, north-up geotransform and CRS. Cell
// (col,row) covers x in [gt0+col*gt1, gt0+(col+1)*gt1) and y from the row's
// top edge gt3+row*gt5 down to the next. Cell areas are true areas on the
// WGS84 ellipsoid in km^2.
type Grid struct {
	Width, Height int
	GeoTransform  [6]float64
	// CRS is "EPSG:n" when GDAL identifies the code, else the WKT.
	CRS string
	// WKT is the CRS in WKT.
	WKT string
	// Geographic is true for latitude-longitude grids.
	Geographic bool
	// EqualArea is true for projections that preserve area, whose planar
	// cell area is the true area.
	EqualArea bool
	// unitArea is, on an equal-area grid, the square metres in one square
	// of the CRS's linear unit (1e6 for kilometres, 0.0929 for US survey
	// feet); 0 means 1 (metres).
	unitArea float64
	// rowFactor holds, on an equal-area grid whose projection PROJ
	// computes on a sphere while the CRS's latitudes are read as WGS84's
	// (Mollweide, Eckert IV and VI, Goode, quartic authalic on the WGS84
	// datum), the square metres of true area per square CRS unit of each
	// row (sphereRowFactors); nil when the planar area is the true area.
	rowFactor []float64
	// edges holds, on an equal-area world map whose outline crosses the
	// grid, the cells the outline cuts and the planar area of their part
	// on the map (mapedge.go); nil on other grids.
	edges *mapEdges
	// areaRange caches CellAreaRange.
	areaRange  sync.Once
	minCellKm2 float64
	maxCellKm2 float64
	// AreaMethod describes in words how cell areas are computed.
	AreaMethod string
	// DatumShiftM is, for a latitude-longitude grid on another datum than
	// WGS84, the distance in metres between the grid's centre and the
	// point with the same longitude and latitude in WGS84 (the datum
	// shift PROJ applies there): its longitudes and latitudes are taken
	// as WGS84's, so cells, points and polygons may be off by about that.
	// 0 on WGS84 and on projected grids (which are transformed).
	DatumShiftM float64
	// Unit and UnitM are a projected grid's coordinate unit as its CRS
	// names it ("metre", "US survey foot") and its length in metres; ""
	// and 0 on latitude-longitude grids and when the CRS does not say.
	Unit  string
	UnitM float64

	// blockFactor holds, for projected grids that are not equal-area, the
	// ratio true/planar area of each factorStep x factorStep block of cells.
	blockFactor []float64
	factorStep  int
	factorW     int
	// colSeg and colT hold, when blocks hold several cells, each column's
	// pair of blocks (colSeg, colSeg+1) whose centres bracket it and its
	// position t between them (factorBracket).
	colSeg []int32
	colT   []float64
	// FactorTime is how long computing blockFactor took, once for every
	// grid of this geometry the process opens (computeFactors); 0 when
	// the grid needs none.
	FactorTime time.Duration

	toLL  *transforms // grid CRS -> WGS84 lon/lat
	frLL  *transforms // WGS84 lon/lat -> grid CRS
	srs   *godal.SpatialRef
	wgs84 *godal.SpatialRef
}

// equalAreaMethods are WKT1 projection names of area-preserving projections
// (and "equal earth", the name GDAL gives Equal Earth, which has no WKT1 one).
var equalAreaMethods = []string{
	"albers_conic_equal_area", "lambert_azimuthal_equal_area", "mollweide",
	"sinusoidal", "cylindrical_equal_area", "eckert_iv", "eckert_vi",
	"goode_homolosine", "equal_earth", "equal earth", "quartic_authalic",
}

// OpenGrid reads the grid of the raster at path (first band).
func OpenGrid(path string) (*Grid, error) {
	Register()
	ds, err := OpenRaster(path)
	if err != nil {
		return nil, fmt.Errorf("extent: %s is not a raster GDAL can read (%s); give a GeoTIFF (or another raster GDAL reads: ASCII grid, ERDAS .img, ...) and check that it opens in a GIS (a file cut short or renamed from another format does not)", path, gdalmsg.Cause(err.Error()))
	}
	defer ds.Close()
	if len(ds.Bands()) == 0 {
		if subs := subdatasets(ds); len(subs) > 0 {
			// A NetCDF or HDF file of several variables: each is a raster
			// of its own, named by a GDAL path, which is no local file.
			names := make([]string, len(subs))
			for i, sd := range subs {
				names[i] = sd[strings.LastIndexByte(sd, ':')+1:]
			}
			more := ""
			if len(names) > 8 {
				names, more = names[:8], fmt.Sprintf(" and %d more", len(subs)-8)
			}
			return nil, fmt.Errorf("extent: %s holds %d rasters (%s%s), not one; extract the one to score into a file of its own (e.g. gdal_translate '%s' %s.tif) and give that file",
				path, len(subs), strings.Join(names, ", "), more, subs[0], names[0])
		}
		return nil, fmt.Errorf("extent: %s has no raster band", path)
	}
	gt, err := ds.GeoTransform()
	if err != nil {
		if n := len(ds.GCPs()); n == 1 {
			// GDAL reads a GeoTIFF with a tie point and no cell size, as
			// one whose cell size was written as 0 is stored, as one
			// ground control point: "by 1 ground control points" and
			// advice to warp it, which needs three.
			return nil, fmt.Errorf("extent: %s is georeferenced by one tie point only, without a cell size (as a GeoTIFF written with a cell size of 0 holds it); give it its bounds, e.g. gdal_translate -a_ullr ULX ULY LRX LRY IN OUT with the corners' coordinates", path)
		} else if n > 1 {
			return nil, fmt.Errorf("extent: %s is georeferenced by %d ground control points, not by a grid (geotransform); warp it onto a north-up grid first (e.g. gdalwarp -t_srs EPSG:4326 IN OUT)", path, n)
		}
		return nil, fmt.Errorf("extent: %s has no geotransform; it must be a georeferenced raster (check it with gdalinfo: it prints no Origin and Pixel Size)", path)
	}
	sr := ds.SpatialRef()
	if sr == nil {
		return nil, fmt.Errorf("%s: %w", path, ErrCRSMissing)
	}
	wkt, err := sr.WKT()
	if err != nil || wkt == "" {
		return nil, fmt.Errorf("%s: %w", path, ErrCRSMissing)
	}
	if undefinedCRS(wkt) {
		return nil, fmt.Errorf("%s: its CRS is undefined (%s): %w; assign the one it is in, e.g. gdal_translate -a_srs EPSG:4326 %s %s", path, crsName(wkt), ErrNoCRS, path, strings.TrimSuffix(path, filepath.Ext(path))+"_crs.tif")
	}
	st := ds.Structure()
	g, err := NewGrid(st.SizeX, st.SizeY, gt, wkt)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return g, nil
}

// NewGrid makes a grid from its size, geotransform and CRS (WKT or any
// string GDAL's SetFromUserInput reads, such as "EPSG:4326").
func NewGrid(width, height int, gt [6]float64, crs string) (*Grid, error) {
	Register()
	if err := CheckGeoTransform(width, height, gt); err != nil {
		return nil, err
	}
	sr, err := godal.NewSpatialRef(crs)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrNoCRS, err)
	}
	wkt, err := sr.WKT()
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrNoCRS, err)
	}
	wgs, err := godal.NewSpatialRefFromEPSG(4326)
	if err != nil {
		return nil, fmt.Errorf("extent: PROJ cannot make EPSG:4326 (is proj-data installed?): %w", err)
	}
	g := &Grid{Width: width, Height: height, GeoTransform: gt, WKT: wkt, srs: sr, wgs84: wgs}
	g.Geographic = sr.Geographic()
	g.CRS = wkt
	if code := sr.AuthorityCode(""); code != "" && sr.AuthorityName("") == "EPSG" {
		g.CRS = "EPSG:" + code
	}
	if g.Geographic {
		if float64(width)*gt[1] > 360+1e-9 {
			return nil, ErrWideGrid
		}
		if gt[0] < -540 || gt[0] > 540 {
			return nil, fmt.Errorf("extent: raster's west edge is at longitude %g; a latitude-longitude grid must start within -540..540 degrees", gt[0])
		}
		if gt[3] > 90+1e-9 || gt[3]+float64(height)*gt[5] < -90-1e-9 {
			return nil, fmt.Errorf("extent: raster latitudes run past the poles (top %.6f, bottom %.6f), where no cell can lie; check its geotransform (gdalinfo), or clip it to -90..90, e.g. gdal_translate -projwin WEST 90 EAST -90 IN OUT", gt[3], gt[3]+float64(height)*gt[5])
		}
		// Its longitudes and latitudes are taken as WGS84's: a CRS that
		// PROJ cannot relate to WGS84 (another planet's) is not on Earth.
		if !sr.IsSame(wgs) {
			t, err := godal.NewTransform(sr, wgs)
			if err != nil {
				return nil, notOnEarth(wkt, err)
			}
			// How far WGS84 puts the grid's centre from where the grid's
			// own datum does (0 for a CRS that PROJ takes as WGS84, such
			// as ETRS89 without a grid of shifts).
			x, y := []float64{gt[0] + float64(width)*gt[1]/2}, []float64{gt[3] + float64(height)*gt[5]/2}
			ok := []bool{false}
			if t.TransformEx(x, y, nil, ok) == nil && ok[0] {
				g.DatumShiftM = geodesy.Distance(gt[3]+float64(height)*gt[5]/2, gt[0]+float64(width)*gt[1]/2, y[0], x[0])
			}
			t.Close()
		}
		g.AreaMethod = "exact ellipsoidal area of each latitude-longitude cell (WGS84)"
		return g, nil
	}
	// No place on the Earth lies this far from a projected CRS's origin,
	// and PROJ takes time in proportion to a coordinate's size to bring it
	// back to the globe: a raster whose corner lay at 1e20 in EPSG:3857
	// kept the run computing its cell areas for more than a minute.
	if far := math.Max(math.Max(math.Abs(gt[0]), math.Abs(gt[0]+float64(width)*gt[1])), math.Max(math.Abs(gt[3]), math.Abs(gt[3]+float64(height)*gt[5]))); far > vocab.MaxProjected {
		return nil, fmt.Errorf("extent: the raster reaches %g units from the origin of its CRS, more than %g, beyond any place on the Earth; the raster's georeferencing is broken (check it with gdalinfo)", far, vocab.MaxProjected)
	}
	if g.toLL, err = newTransforms(sr, wgs); err != nil {
		return nil, notOnEarth(wkt, err)
	}
	if g.frLL, err = newTransforms(wgs, sr); err != nil {
		g.toLL.close()
		return nil, notOnEarth(wkt, err)
	}
	if name, ok := sr.AttrValue("PROJCS|UNIT", 0); ok {
		if m, ok := sr.AttrValue("PROJCS|UNIT", 1); ok {
			if u, err := strconv.ParseFloat(m, 64); err == nil && u > 0 && !math.IsInf(u, 0) {
				g.Unit, g.UnitM = name, u
			}
		}
	}
	lname := ""
	if name, ok := sr.AttrValue("PROJECTION", 0); ok {
		lname = strings.ToLower(name)
		for _, m := range equalAreaMethods {
			if strings.Contains(lname, m) {
				g.EqualArea = true
			}
		}
	}
	if g.EqualArea {
		g.AreaMethod = "planar cell area of an equal-area projection"
		// The planar area is in the CRS's unit squared: a grid in
		// kilometres or feet (+units=km, US survey feet) has its areas
		// converted to square metres.
		if s, ok := sr.AttrValue("PROJCS|UNIT", 1); ok {
			if u, err := strconv.ParseFloat(s, 64); err == nil && u > 0 && u != 1 && !math.IsInf(u, 0) {
				g.unitArea = u * u
				g.AreaMethod = fmt.Sprintf("planar cell area of an equal-area projection (CRS unit %g m)", u)
			}
		}
		g.sphereRowFactors(lname)
		if b, err := sr.SemiMinor(); g.rowFactor == nil && err == nil && b == sphereRadius(sr) {
			// An azimuthal or conic equal-area projection on a sphere
			// (+proj=laea +R=...) is equal-area on that sphere only,
			// and its ratio to the WGS84 area (whose latitudes areasweep
			// reads) varies along the rows too: block ratios as on other
			// projections, where PROJ can invert every block (else the
			// planar area, as before).
			// (computeFactors sets nothing when it fails.)
			if err := g.computeFactors(); err == nil {
				g.EqualArea, g.unitArea = false, 0
				return g, nil
			}
		}
		g.setMapEdges()
		if g.edges != nil {
			g.AreaMethod += fmt.Sprintf("; cells cut by the map's outline take the area of their part on the map (outline within %.3g m)", g.edges.tol*g.unitM())
		}
		return g, nil
	}
	if err := g.computeFactors(); err != nil {
		return nil, err
	}
	return g, nil
}

// subdatasets returns the GDAL names of the rasters a container file
// (NetCDF, HDF) holds, in GDAL's order: SUBDATASET_1_NAME, ...
func subdatasets(ds *godal.Dataset) []string {
	md := ds.Metadatas(godal.Domain("SUBDATASETS"))
	var out []string
	for i := 1; ; i++ {
		name, ok := md[fmt.Sprintf("SUBDATASET_%d_NAME", i)]
		if !ok {
			return out
		}
		out = append(out, name)
	}
}

// notOnEarth is the error for a raster CRS that PROJ cannot transform to
// or from WGS84 (err): the points, the polygons and the cell areas are all
// WGS84's.
func notOnEarth(wkt string, err error) error {
	return fmt.Errorf("extent: the raster's CRS (%s) cannot be transformed to or from WGS84 (%s); areasweep places the occurrences and measures the cells on the Earth's WGS84 ellipsoid: give the raster in a CRS of the Earth (check it with gdalinfo)", crsName(wkt), gdalmsg.Cause(err.Error()))
}

// MaxGridSide is the largest number of columns or rows a grid may have,
// and MaxGridCells the largest number of cells: far beyond any model
// raster, but small enough that cell indices and bitsets fit in memory
// arithmetic without overflow. Memory itself is checked by the caller.
const (
	MaxGridSide  = 1 << 24
	MaxGridCells = 1 << 36
)

// CheckGeoTransform checks a grid's size and geotransform before anything
// is derived from them: a positive size within MaxGridSide and
// MaxGridCells, finite coefficients, north-up (no rotation, positive cell
// width, negative cell height) and finite corners.
func CheckGeoTransform(width, height int, gt [6]float64) error {
	if width <= 0 || height <= 0 {
		return fmt.Errorf("extent: grid size %dx%d is empty", width, height)
	}
	if width > MaxGridSide || height > MaxGridSide || int64(width)*int64(height) > MaxGridCells {
		return fmt.Errorf("extent: grid size %dx%d is beyond the %d cells per side and %d cells areasweep handles; resample the raster coarser (gdalwarp -tr)", width, height, MaxGridSide, int64(MaxGridCells))
	}
	for i, v := range gt {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("extent: geotransform coefficient %d is %v; the raster's georeferencing is broken (check it with gdalinfo)", i, v)
		}
	}
	switch {
	case gt[2] != 0 || gt[4] != 0:
		return ErrRotated
	case gt[1] == 0 || gt[5] == 0:
		return fmt.Errorf("extent: geotransform %v gives cells of %g x %g, with no width or no height; the raster's georeferencing is broken (check it with gdalinfo)", gt, math.Abs(gt[1]), math.Abs(gt[5]))
	case gt[5] > 0:
		// Rows from south to north, as some NetCDF and HDF exports hold
		// them.
		return fmt.Errorf("extent: geotransform %v runs its rows from south to north (south-up: a positive cell height); warp it to a north-up grid first (gdalwarp IN OUT writes one)", gt)
	case gt[1] < 0:
		return fmt.Errorf("extent: geotransform %v runs its columns from east to west (a negative cell width); warp it to a north-up grid first (gdalwarp IN OUT writes one)", gt)
	}
	east, south := gt[0]+float64(width)*gt[1], gt[3]+float64(height)*gt[5]
	if math.IsInf(east, 0) || math.IsInf(south, 0) || east == gt[0] || south == gt[3] {
		return fmt.Errorf("extent: geotransform %v gives no usable extent for %dx%d cells; the raster's georeferencing is broken (check it with gdalinfo)", gt, width, height)
	}
	// Cell sides must stay distinguishable in float64 at the grid's
	// coordinates, or cell centres and edges collapse onto each other.
	far := math.Max(math.Max(math.Abs(gt[0]), math.Abs(east)), math.Max(math.Abs(gt[3]), math.Abs(south)))
	if gt[1] < far*1e-9 || -gt[5] < far*1e-9 {
		return fmt.Errorf("extent: cells of %g x %g are too small for coordinates as large as %g (below float precision); the raster's georeferencing is broken (check it with gdalinfo)", gt[1], -gt[5], far)
	}
	return nil
}

// Close releases the grid's coordinate transformations.
func (g *Grid) Close() {
	if g.toLL != nil {
		g.toLL.close()
	}
	if g.frLL != nil {
		g.frLL.close()
	}
}

// SpatialRef returns the grid's CRS. The grid owns it.
func (g *Grid) SpatialRef() *godal.SpatialRef { return g.srs }

// Cells returns Width*Height.
func (g *Grid) Cells() int { return g.Width * g.Height }

// Centre returns the grid-CRS coordinates of the centre of cell (col,row).
func (g *Grid) Centre(col, row int) (x, y float64) {
	gt := g.GeoTransform
	return gt[0] + (float64(col)+0.5)*gt[1], gt[3] + (float64(row)+0.5)*gt[5]
}

// CellOf returns the cell holding grid-CRS point (x,y). A point on a cell's
// west or north edge belongs to that cell. ok is false outside the grid.
func (g *Grid) CellOf(x, y float64) (col, row int, ok bool) {
	gt := g.GeoTransform
	fc := snapEdge((x - gt[0]) / gt[1])
	fr := snapEdge((y - gt[3]) / gt[5])
	if g.Geographic && y == -90 && fr >= float64(g.Height) && math.Abs(gt[3]+float64(g.Height)*gt[5]+90) < 1e-9 {
		// The South Pole on a grid that reaches it: nothing lies south of
		// the bottom edge there, so it is in the last row (as the North
		// Pole is in the first).
		fr = float64(g.Height) - 0.5
	}
	if math.IsNaN(fc) || math.IsNaN(fr) || fc < 0 || fr < 0 || fc >= float64(g.Width) || fr >= float64(g.Height) {
		return 0, 0, false
	}
	return int(fc), int(fr), true
}

// edgeSnap is how near a whole number of cells (in cells) a point's
// position is taken to lie on that cell edge: a billionth of a cell, a
// tenth of a millimetre on a grid of 0.1 degrees, far below any
// coordinate's precision and far above the rounding of the division.
const edgeSnap = 1e-9

// snapEdge rounds f, a position in cells from the grid's origin, to the
// nearest whole number when it lies within edgeSnap of it. A coordinate
// written in decimals on a cell edge is not one in binary: -137.9 on a
// grid of 0.1 degrees from -150 comes out as 120.99999999999994 cells,
// and -40.1 from -28 as 121.00000000000001, so a plain floor put 120 of
// the 300 column edges and 96 of the 240 row edges of such a grid into the
// cell west or north of the edge rather than the one whose west or north
// edge it is (and a point on the east edge inside the raster).
func snapEdge(f float64) float64 {
	if r := math.Round(f); math.Abs(f-r) < edgeSnap {
		return r
	}
	return f
}

// Bounds returns west, south, east, north in grid CRS.
func (g *Grid) Bounds() [4]float64 {
	gt := g.GeoTransform
	return [4]float64{gt[0], gt[3] + float64(g.Height)*gt[5], gt[0] + float64(g.Width)*gt[1], gt[3]}
}

// CellSizeKm returns an approximate cell width in km at the grid's centre,
// for messages and thresholds of "a few cells".
func (g *Grid) CellSizeKm() float64 {
	c, r := g.Width/2, g.Height/2
	lons := make([]float64, 2)
	lats := make([]float64, 2)
	x0, y0 := g.Centre(c, r)
	x1, _ := g.Centre(c+1, r)
	g.ToLonLat([]float64{x0, x1}, []float64{y0, y0}, lons, lats)
	return geodesy.Distance(lats[0], lons[0], lats[1], lons[1]) / 1000
}

// MinCellSideM returns, in metres, the shortest cell side on the grid: for
// latitude-longitude grids the east-west side of the row nearest a pole
// (along its equatorward edge when the row reaches the pole), for
// projected grids the shorter side at the four corner cells and the
// centre.
func (g *Grid) MinCellSideM() float64 {
	best := math.Inf(1)
	for _, rc := range [][2]int{{0, 0}, {g.Width - 1, 0}, {0, g.Height - 1}, {g.Width - 1, g.Height - 1}, {g.Width / 2, g.Height / 2}} {
		c, r := rc[0], rc[1]
		gt := g.GeoTransform
		x0, y0 := gt[0]+float64(c)*gt[1], gt[3]+float64(r)*gt[5]
		xs := []float64{x0, x0 + gt[1], x0}
		ys := []float64{y0 + gt[5]/2, y0 + gt[5]/2, y0 + gt[5]}
		if g.Geographic {
			// East-west along the cell's poleward edge, the shorter one;
			// north-south from that edge to the other one. (Point 2 was
			// the south edge whatever the hemisphere, which in the
			// southern one is the poleward edge itself: a side of 0, and
			// no densification of the hull's edges.)
			top, bot := math.Max(-90, math.Min(90, y0)), math.Max(-90, math.Min(90, y0+gt[5]))
			pole, other := top, bot
			if math.Abs(bot) > math.Abs(top) {
				pole, other = bot, top
			}
			if 90-math.Abs(pole) < 1e-9 {
				// A cell on a pole (to the rounding of the geotransform:
				// 90 - 2160/12 is not -90) has no poleward side (measured,
				// the rounding left 2e-12 m; the hull's edges, cut at this
				// side then, were cut every 2e-12 m until memory ran out):
				// its shortest east-west side is along its other edge.
				pole, other = other, pole
			}
			ys[0], ys[1], ys[2] = pole, pole, other
		}
		lons := make([]float64, 3)
		lats := make([]float64, 3)
		g.ToLonLat(xs, ys, lons, lats)
		if math.IsNaN(lats[0]) || math.IsNaN(lats[1]) || math.IsNaN(lats[2]) {
			continue
		}
		ew := geodesy.Distance(lats[0], lons[0], lats[1], lons[1])
		ns := geodesy.Distance(lats[0], lons[0], lats[2], lons[2])
		if ew > 0 {
			best = math.Min(best, ew)
		}
		best = math.Min(best, ns)
	}
	if math.IsInf(best, 1) {
		return g.CellSizeKm() * 1000
	}
	return best
}

// ToLonLat converts grid-CRS coordinates to WGS84 longitude and latitude.
// Points that cannot be converted get NaN, and so do points beyond the
// outline of a world map that crosses the grid (dropOffMap). xs and ys may
// be lons and lats.
func (g *Grid) ToLonLat(xs, ys, lons, lats []float64) {
	if g.edges != nil && !g.Geographic {
		g.toLonLatOnMap(xs, ys, lons, lats, g.edges)
		return
	}
	copy(lons, xs)
	copy(lats, ys)
	if g.Geographic {
		return
	}
	g.transform(g.toLL, lons, lats)
}

// toLonLatOnMap is ToLonLat on a grid crossed by a world map's outline:
// PROJ's inverse, then dropOffMap's round trip of the points that may lie
// off the map (every point when edges is nil, as mapEdges.setInner has
// it before the grid's edges are set). xs and ys may be lons and lats.
func (g *Grid) toLonLatOnMap(xs, ys, lons, lats []float64, edges *mapEdges) {
	// The points as given, for the round trip.
	sc := offMapPool.Get().(*offMapScratch)
	sc.ox, sc.oy = append(sc.ox[:0], xs...), append(sc.oy[:0], ys...)
	copy(lons, xs)
	copy(lats, ys)
	g.transform(g.toLL, lons, lats)
	g.dropOffMap(sc.ox, sc.oy, lons, lats, edges, sc)
	offMapPool.Put(sc)
}

// offMapPool holds ToLonLat's and dropOffMap's scratch on grids with a
// world map's outline.
var offMapPool = sync.Pool{New: func() any { return new(offMapScratch) }}

// offMapScratch is that scratch: the points as given (ox, oy), the
// indices of those checked and their round trips (fx, fy).
type offMapScratch struct {
	ox, oy []float64
	idx    []int
	fx, fy []float64
}

// roundTripRelTol is how far, as a share of the shorter cell side, a
// point's longitude and latitude may map back from where they came from
// before dropOffMap takes it for a point off the map: our choice, far
// above PROJ's round-trip error on the map (nanometres) and far below the
// thousands of kilometres a wrapped point lands away.
const roundTripRelTol = 1e-3

// dropOffMap sets to NaN each point whose longitude and latitude (lons,
// lats, from PROJ's inverse of (xs, ys)) do not map back to (xs, ys)
// within roundTripRelTol of a cell side. On Equal Earth, Eckert IV or
// sinusoidal world maps PROJ's inverse gives a point beyond the outline a
// position on the other side of the Earth instead of failing (Equal Earth
// (17,300 km, 8,000 km) came back as 79 W, 75 N), so a cell there with
// data would be placed by the buffers and the distance-only null where it
// is not; Mollweide's inverse fails there already. Points in a cell of
// e's inner runs (wholly on the map, see mapEdges.setInner) are not
// checked: on a world map nearly every cell with data, so the round trip
// costs PROJ's forward transformation only near the outline and off the
// map (it doubled the transformations of a run on a Mollweide map). e
// nil checks every point. xs and ys must not be lons and lats; sc is the
// scratch (its ox and oy untouched).
func (g *Grid) dropOffMap(xs, ys, lons, lats []float64, e *mapEdges, sc *offMapScratch) {
	sc.idx = sc.idx[:0]
	for i := range lons {
		if math.IsNaN(lons[i]) || e != nil && e.surelyOnMap(&g.GeoTransform, g.Width, g.Height, xs[i], ys[i]) {
			continue
		}
		sc.idx = append(sc.idx, i)
	}
	if len(sc.idx) == 0 {
		return
	}
	sc.fx, sc.fy = sc.fx[:0], sc.fy[:0]
	for _, i := range sc.idx {
		sc.fx, sc.fy = append(sc.fx, lons[i]), append(sc.fy, lats[i])
	}
	g.transform(g.frLL, sc.fx, sc.fy)
	tol := roundTripRelTol * math.Min(math.Abs(g.GeoTransform[1]), math.Abs(g.GeoTransform[5]))
	for k, i := range sc.idx {
		if !(math.Abs(sc.fx[k]-xs[i]) <= tol && math.Abs(sc.fy[k]-ys[i]) <= tol) {
			lons[i], lats[i] = math.NaN(), math.NaN()
		}
	}
}

// FromLonLat converts WGS84 longitude and latitude to grid-CRS coordinates.
// Points that cannot be converted get NaN.
func (g *Grid) FromLonLat(lons, lats, xs, ys []float64) {
	copy(xs, lons)
	copy(ys, lats)
	if g.Geographic {
		for i := range xs {
			xs[i] = wrapInto(xs[i], g.GeoTransform[0])
		}
		return
	}
	g.transform(g.frLL, xs, ys)
}

// wrapInto shifts longitude lon by whole turns so that it lies in
// [west, west+360).
func wrapInto(lon, west float64) float64 {
	if math.IsNaN(lon) || math.IsInf(lon, 0) {
		return math.NaN()
	}
	if math.Abs(lon-west) > 3600 {
		// Far outside any grid: one exact remainder instead of thousands
		// of turns (adding 360 to 1e300 would never move it).
		r := math.Mod(lon-west, 360)
		if r < 0 {
			r += 360
		}
		if r >= 360 {
			r = 0
		}
		return west + r
	}
	for lon < west {
		lon += 360
	}
	for lon >= west+360 {
		lon -= 360
	}
	return lon
}

// transform transforms the points (xs, ys) in place with one of p's
// transformations, NaN where it fails. No points is nothing to do (godal
// indexes the first of them).
func (g *Grid) transform(p *transforms, xs, ys []float64) {
	if len(xs) == 0 {
		return
	}
	ok := make([]bool, len(xs))
	t := p.get()
	err := t.TransformEx(xs, ys, nil, ok)
	p.put(t)
	for i := range xs {
		if err != nil && !ok[i] || !ok[i] {
			xs[i], ys[i] = math.NaN(), math.NaN()
		}
	}
}

// transforms hands out coordinate transformations from one CRS to
// another, one caller at a time each (a GDAL transformation is not safe
// for concurrent use): as many as callers ask at once, made on demand, so
// that the workers of a pass or of the extents' distance fields on a
// projected grid convert their cells at the same time instead of taking
// turns on one. Every transformation is made from the same two CRSs, so
// each gives the same coordinates.
type transforms struct {
	src, dst *godal.SpatialRef
	mu       sync.Mutex
	cond     *sync.Cond
	free     []*godal.Transform
	all      []*godal.Transform
}

func newTransforms(src, dst *godal.SpatialRef) (*transforms, error) {
	t, err := godal.NewTransform(src, dst)
	if err != nil {
		return nil, err
	}
	p := &transforms{src: src, dst: dst, free: []*godal.Transform{t}, all: []*godal.Transform{t}}
	p.cond = sync.NewCond(&p.mu)
	return p, nil
}

// get returns a transformation no other caller holds: a free one, a new
// one, or, when making one fails, the next one put back.
func (p *transforms) get() *godal.Transform {
	p.mu.Lock()
	defer p.mu.Unlock()
	if len(p.free) == 0 {
		if t, err := godal.NewTransform(p.src, p.dst); err == nil {
			p.all = append(p.all, t)
			return t
		}
		for len(p.free) == 0 {
			p.cond.Wait()
		}
	}
	t := p.free[len(p.free)-1]
	p.free = p.free[:len(p.free)-1]
	return t
}

// put gives back a transformation from get.
func (p *transforms) put(t *godal.Transform) {
	p.mu.Lock()
	p.free = append(p.free, t)
	p.mu.Unlock()
	p.cond.Signal()
}

// close releases every transformation; none may be held.
func (p *transforms) close() {
	p.mu.Lock()
	defer p.mu.Unlock()
	for _, t := range p.all {
		t.Close()
	}
	p.all, p.free = nil, nil
}

// RowLonLat fills lons and lats (length Width) with the WGS84 coordinates
// of the centres of the cells of row.
func (g *Grid) RowLonLat(row int, lons, lats []float64) {
	// The centres are converted in place: no allocation per row.
	for c := 0; c < g.Width; c++ {
		lons[c], lats[c] = g.Centre(c, row)
	}
	g.ToLonLat(lons[:g.Width], lats[:g.Width], lons, lats)
}

// RowAreas fills dst (length Width) with the true area in km^2 of each
// cell of row and returns it. It is safe for concurrent use.
//
// For latitude-longitude grids this is the exact area on the WGS84
// ellipsoid of the quadrangle between the cell's bounding parallels and
// meridians (geodesy.CellArea). For equal-area projections it is the planar
// cell area, and for a cell cut by the outline of a world map (Mollweide,
// Equal Earth, ...) the planar area of its part on the map (mapedge.go);
// cells wholly off the map keep their planar area. For other projections
// it is the planar area times the ratio of true to planar area of the
// cell's block of cells, where the true area of a block comes from the
// ellipsoidal area of its outline (densified along the block edges) after
// transforming to WGS84; on grids of more than about a million cells,
// whose blocks hold several cells, the ratio is interpolated bilinearly
// between the centres of the blocks around the cell.
func (g *Grid) RowAreas(row int, dst []float64) []float64 {
	return g.RowAreasRange(row, 0, g.Width, dst)
}

// CellAreaRange returns the smallest and the largest area of a whole
// cell of the grid in km^2 (computed once): on a latitude-longitude grid
// those of the rows farthest from and nearest to the equator; on an
// equal-area grid the planar area (times each row's factor on a
// sphere-based one); otherwise the planar area times the smallest and
// largest block ratio (cells whose ratio is interpolated between blocks
// lie between those). Cells cut by a world map's outline are smaller: the
// range is that of the whole cells, which AreaUnits sizes its units by
// (a sliver of a cell at the map's edge would otherwise set them).
func (g *Grid) CellAreaRange() (lo, hi float64) {
	g.areaRange.Do(func() {
		var one [1]float64
		at := func(row int) float64 { return g.RowAreasRange(row, 0, 1, one[:0])[0] }
		switch {
		case g.Geographic:
			rows := []int{0, g.Height - 1}
			if eq := int(g.GeoTransform[3] / -g.GeoTransform[5]); eq >= 0 && eq < g.Height {
				rows = append(rows, eq)
			}
			g.minCellKm2, g.maxCellKm2 = math.Inf(1), 0
			for _, r := range rows {
				a := at(r)
				g.minCellKm2, g.maxCellKm2 = math.Min(g.minCellKm2, a), math.Max(g.maxCellKm2, a)
			}
		case g.EqualArea && g.rowFactor == nil:
			g.minCellKm2 = g.wholeCellArea(0)
			g.maxCellKm2 = g.minCellKm2
		default:
			f := g.rowFactor
			if f == nil {
				f = g.blockFactor
			}
			lo, hi := math.Inf(1), 0.0
			for _, v := range f {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
			planar := math.Abs(g.GeoTransform[1]*g.GeoTransform[5]) / 1e6
			g.minCellKm2, g.maxCellKm2 = planar*lo, planar*hi
		}
	})
	return g.minCellKm2, g.maxCellKm2
}

// RowCellsEqual reports whether the cells c0 <= c < c1 of row all have
// one area: on a latitude-longitude grid always, on an equal-area grid
// unless the outline of a world map cuts one of them (Grid.edges), on
// other projections never (each cell has its own factor).
func (g *Grid) RowCellsEqual(row, c0, c1 int) bool {
	switch {
	case g.Geographic:
		return true
	case !g.EqualArea:
		return false
	}
	return !g.edges.cut(row, c0, c1)
}

// rowArea returns the area of every cell of row when all of them have the
// same area (latitude-longitude grids, and equal-area grids on the rows
// no world map's outline cuts): the value RowAreasRange would repeat.
func (g *Grid) rowArea(row int) (float64, bool) {
	if !g.RowCellsEqual(row, 0, g.Width) {
		return 0, false
	}
	var one [1]float64
	return g.RowAreasRange(row, 0, 1, one[:0])[0], true
}

// areaScale returns, on an equal-area grid, the square metres of true
// area per square CRS unit of row: the row's factor on a sphere-based
// projection, else the unit's square.
func (g *Grid) areaScale(row int) float64 {
	switch {
	case g.rowFactor != nil:
		return g.rowFactor[row]
	case g.unitArea != 0:
		return g.unitArea
	}
	return 1
}

// wholeCellArea returns, on an equal-area grid, the area in km^2 of a
// whole cell of row (one the map's outline does not cut).
func (g *Grid) wholeCellArea(row int) float64 {
	gt := g.GeoTransform
	return math.Abs(gt[1]*gt[5]) * g.areaScale(row) / 1e6
}

// RowAreasRange is RowAreas for the cells c0 <= c < c1 of row only:
// dst[c-c0] is the area of cell c.
func (g *Grid) RowAreasRange(row, c0, c1 int, dst []float64) []float64 {
	gt := g.GeoTransform
	n := c1 - c0
	if cap(dst) < n {
		dst = make([]float64, n)
	}
	dst = dst[:n]
	if g.Geographic {
		top := gt[3] + float64(row)*gt[5]
		bot := top + gt[5]
		a := geodesy.CellArea(math.Max(bot, -90), math.Min(top, 90), gt[1]) / 1e6
		for i := range dst {
			dst[i] = a
		}
		return dst
	}
	planar := math.Abs(gt[1]*gt[5]) / 1e6
	if g.EqualArea {
		planar = g.wholeCellArea(row)
		for i := range dst {
			dst[i] = planar
		}
		if g.edges != nil {
			// Cells the map's outline cuts: their part on the map.
			g.edges.fill(row, c0, c1, g.areaScale(row)/1e6, dst)
		}
		return dst
	}
	if g.factorStep == 1 {
		// One block per cell: its own true/planar ratio.
		for i := range dst {
			dst[i] = planar * g.blockFactor[row*g.factorW+c0+i]
		}
		return dst
	}
	// Blocks of several cells: the ratio interpolated bilinearly between
	// the blocks' centres (linearly extrapolated in the outer half of the
	// edge blocks). A block's ratio is its mean, which equals the value at
	// its centre where the ratio varies linearly, so the interpolation
	// follows the ratio's change across a block (first order) where one
	// ratio per block would not: on a Web Mercator grid of 30 km cells in
	// blocks of 2x2 cells the worst cell was 0.47% off with one ratio per
	// block, 0.0045% with the interpolation (TestBlockAreas).
	step, n := g.factorStep, g.factorW
	fh := len(g.blockFactor) / n
	j0, j1, tv := factorBracket(float64(row)+0.5, step, fh, g.Height)
	f0 := g.blockFactor[j0*n : (j0+1)*n]
	f1 := g.blockFactor[j1*n : (j1+1)*n]
	// Each cell's column bracket (colSeg, colT) is fixed per grid, and the
	// interpolation f = p + t q is evaluated the same way whatever range
	// [c0, c1) is asked, so a cell's area does not depend on the call.
	seg, p, q := int32(-1), 0.0, 0.0
	for c := c0; c < c1; c++ {
		if k := g.colSeg[c]; k != seg {
			seg = k
			i0, i1 := int(k), min(int(k)+1, n-1)
			// a(t), b(t): the two block rows' ratios interpolated at t;
			// f(t) = a(t) + tv (b(t) - a(t)) = p + t q.
			p = f0[i0] + tv*(f1[i0]-f0[i0])
			q = (f0[i1] - f0[i0]) + tv*((f1[i1]-f1[i0])-(f0[i1]-f0[i0]))
		}
		f := p + g.colT[c]*q
		if !(f > 0) || math.IsInf(f, 0) {
			f = g.blockFactor[(row/step)*n+c/step]
		}
		dst[c-c0] = planar * f
	}
	return dst
}

// blockCentre returns the centre, in cells, of block k of step cells along
// an axis of size cells (the last block may be shorter).
func blockCentre(k, step, size int) float64 {
	return float64(k*step+min((k+1)*step, size)) / 2
}

// factorBracket returns the two blocks (of n blocks of step cells along
// an axis of size cells; the last one may be shorter) whose centres
// bracket coordinate x (in cells), and x's position between those centres
// (0 at the first, 1 at the second; outside [0, 1] in the outer half of
// the edge blocks). With one block, both are block 0 and t is 0.
func factorBracket(x float64, step, n, size int) (k0, k1 int, t float64) {
	if n < 2 {
		return 0, 0, 0
	}
	k0 = min(int(x)/step, n-1)
	if x < blockCentre(k0, step, size) {
		k0--
	}
	k0 = max(0, min(k0, n-2))
	m0, m1 := blockCentre(k0, step, size), blockCentre(k0+1, step, size)
	return k0, k0 + 1, (x - m0) / (m1 - m0)
}

// sphereMethods are WKT1 names of equal-area projections that PROJ
// computes on a sphere of the CRS's semi-major axis (taking the datum's
// latitudes as the sphere's) and that are pseudo-cylindrical: a row of
// cells spans one band of latitudes.
var sphereMethods = []string{"mollweide", "eckert_iv", "eckert_vi", "goode_homolosine", "quartic_authalic"}

// sphereCylindrical are equal-area projections, pseudo-cylindrical or
// cylindrical, that PROJ computes on the ellipsoid when the CRS has one:
// only a CRS on a sphere needs sphereRowFactors.
var sphereCylindrical = []string{"sinusoidal", "cylindrical_equal_area", "equal_earth", "equal earth"}

// sphereRowFactors sets rowFactor on a grid in one of sphereMethods, or
// in one of sphereCylindrical on a sphere. The
// planar area of such a grid is the area on the sphere of radius a (the
// CRS's semi-major axis), not the true area on the WGS84 ellipsoid, whose
// latitudes areasweep reads: on the WGS84 datum 0.67% less at the equator
// and 0.67% more near the poles. The true area of an area element is its
// planar area times
//
//	ratio(phi) = M N / a^2 = aw^2 (1 - e^2) / (a^2 (1 - e^2 sin^2 phi)^2)
//
// (M, N the WGS84 radii of curvature, aw its semi-major axis), which
// depends on the latitude alone, so a row's factor is the mean of ratio
// over the row's height: 8-point Gauss-Legendre in y, with the latitude of
// each node from PROJ's inverse at the central meridian (or, beyond the
// map there, at the first column centre PROJ can invert). Rows PROJ cannot
// invert anywhere (beyond the poles) take the nearest row's factor.
func (g *Grid) sphereRowFactors(method string) {
	a, err := g.srs.SemiMajor()
	if err != nil || !(a > 0) {
		return
	}
	listed := false
	for _, m := range sphereMethods {
		listed = listed || strings.Contains(method, m)
	}
	if b, err := g.srs.SemiMinor(); err == nil && b == a {
		// On a sphere (MODIS's sinusoidal grid, R = 6371007.181 m) the
		// pseudo-cylindrical and cylindrical projections that PROJ also
		// computes on an ellipsoid are equal-area on that sphere only.
		for _, m := range sphereCylindrical {
			listed = listed || strings.Contains(method, m)
		}
	}
	if !listed {
		return
	}
	unit := 1.0
	if g.unitArea != 0 {
		unit = g.unitArea
	}
	const aw, fw = 6378137.0, 1 / 298.257223563
	e2 := fw * (2 - fw)
	k := aw * aw / (a * a) * (1 - e2) * unit
	gt := g.GeoTransform
	// Candidate x: the central meridian's (where PROJ maps longitude
	// lon_0, as the WKT gives it, at the equator), then column centres
	// from the middle out.
	var xs []float64
	lon0 := 0.0
	if m := centralMeridian.FindStringSubmatch(g.WKT); m != nil {
		if v, err := strconv.ParseFloat(m[1], 64); err == nil {
			lon0 = v
		}
	}
	cx, cy := []float64{lon0}, []float64{0}
	g.FromLonLat(cx, cy, cx, cy)
	if !math.IsNaN(cx[0]) {
		xs = append(xs, cx[0])
	}
	for d := 0; d <= g.Width/2; d += max(1, g.Width/32) {
		for _, c := range []int{g.Width/2 - d, g.Width/2 + d} {
			if c >= 0 && c < g.Width {
				xs = append(xs, gt[0]+(float64(c)+0.5)*gt[1])
			}
		}
	}
	one, lon, lat := make([]float64, 1), make([]float64, 1), make([]float64, 1)
	latAt := func(y float64) float64 {
		for _, x := range xs {
			one[0], lat[0] = x, y
			g.ToLonLat(one, lat, lon, lat)
			if !math.IsNaN(lat[0]) && !math.IsNaN(lon[0]) && math.Abs(lat[0]) <= 90 {
				return lat[0]
			}
		}
		return math.NaN()
	}
	// 8-point Gauss-Legendre nodes and weights on [-1, 1].
	nodes := [8]float64{-0.9602898564975363, -0.7966664774136267, -0.5255324099163290, -0.1834346424956498, 0.1834346424956498, 0.5255324099163290, 0.7966664774136267, 0.9602898564975363}
	weights := [8]float64{0.1012285362903763, 0.2223810344533745, 0.3137066458778873, 0.3626837833783620, 0.3626837833783620, 0.3137066458778873, 0.2223810344533745, 0.1012285362903763}
	f := make([]float64, g.Height)
	found := make([]bool, g.Height)
	any := false
	for r := range f {
		mid, half := gt[3]+(float64(r)+0.5)*gt[5], gt[5]/2
		sum := 0.0
		found[r] = true
		for n, t := range nodes {
			phi := latAt(mid+half*t) * math.Pi / 180
			if math.IsNaN(phi) {
				found[r] = false
				break
			}
			s := math.Sin(phi)
			d := 1 - e2*s*s
			sum += weights[n] * k / (d * d)
		}
		f[r] = sum / 2
		any = any || found[r]
	}
	if !any {
		return
	}
	last := -1
	for r := range f {
		if found[r] {
			for j := last + 1; j < r; j++ {
				if last < 0 || r-j < j-last {
					f[j] = f[r]
				} else {
					f[j] = f[last]
				}
			}
			last = r
		}
	}
	for j := last + 1; j < len(f); j++ {
		f[j] = f[last]
	}
	g.rowFactor = f
	g.AreaMethod = "planar cell area of an equal-area projection computed on a sphere, scaled row by row to the true area on the WGS84 ellipsoid"
}

// sphereRadius returns the semi-major axis of sr, or -1 when it has none.
func sphereRadius(sr *godal.SpatialRef) float64 {
	a, err := sr.SemiMajor()
	if err != nil || !(a > 0) {
		return -1
	}
	return a
}

// centralMeridian finds a WKT1 projection's central meridian.
var centralMeridian = regexp.MustCompile(`(?i)PARAMETER\["(?:central_meridian|longitude_of_center)",\s*([-+0-9.eE]+)\]`)

// blockFactors are the block factors of a projected grid that is not
// equal-area (see Grid.blockFactor), with the words of its AreaMethod.
// Once made they are only read, so grids of one geometry share them.
type blockFactors struct {
	factor      []float64
	step, width int
	colSeg      []int32
	colT        []float64
	method      string
	took        time.Duration
	err         error
}

// geometryCache holds values computed per grid geometry (the CRS's WKT,
// the geotransform and the size) for the last few geometries, so that the
// grids a run opens on one geometry (the memory estimate's, the study's
// and each model's) compute them once, even when they open at once.
type geometryCache[T any] struct {
	sync.Mutex
	keys    []string
	entries []*geometryEntry[T]
}

type geometryEntry[T any] struct {
	once sync.Once
	v    T
}

// geometryCacheSize is how many geometries a geometryCache keeps: enough
// for the studies a batch runs at once (our choice; block factors hold at
// most about 8 MB each, map edges less).
const geometryCacheSize = 4

// get returns the value for g's geometry, computing it with compute once.
func (c *geometryCache[T]) get(g *Grid, compute func() T) T {
	key := fmt.Sprintf("%s\x00%v\x00%dx%d", g.WKT, g.GeoTransform, g.Width, g.Height)
	c.Lock()
	var e *geometryEntry[T]
	for i, k := range c.keys {
		if k == key {
			e = c.entries[i]
			break
		}
	}
	if e == nil {
		e = &geometryEntry[T]{}
		c.keys = append(c.keys, key)
		c.entries = append(c.entries, e)
		if n := len(c.keys); n > geometryCacheSize {
			c.keys = append([]string(nil), c.keys[n-geometryCacheSize:]...)
			c.entries = append([]*geometryEntry[T](nil), c.entries[n-geometryCacheSize:]...)
		}
	}
	c.Unlock()
	e.once.Do(func() { e.v = compute() })
	return e.v
}

// factorCache holds the block factors of the last few grid geometries: on
// a grid of a million blocks they take seconds.
var factorCache geometryCache[blockFactors]

// computeFactors fills blockFactor for projected grids that are not
// equal-area, from factorCache or by makeFactors, and FactorTime.
func (g *Grid) computeFactors() error {
	f := factorCache.get(g, g.makeFactors)
	if f.err != nil {
		return f.err
	}
	g.blockFactor, g.factorStep, g.factorW, g.colSeg, g.colT = f.factor, f.step, f.width, f.colSeg, f.colT
	g.AreaMethod, g.FactorTime = f.method, f.took
	return nil
}

// makeFactors computes the block factors of g. Blocks are small enough
// that at most about a million blocks cover the grid; the rows of blocks
// are shared among GOMAXPROCS workers (each block on its own, so the
// factors are the same on any number), and an error is that of the first
// block in row order that fails.
func (g *Grid) makeFactors() blockFactors {
	t0 := time.Now()
	step := 1
	for (g.Width/step+1)*(g.Height/step+1) > 1<<20 {
		step *= 2
	}
	fw := (g.Width + step - 1) / step
	fh := (g.Height + step - 1) / step
	f := blockFactors{factor: make([]float64, fw*fh), step: step, width: fw}
	rowErr := make([]error, fh)
	chunks := (fh + factorChunk - 1) / factorChunk
	var next atomic.Int64
	var wg sync.WaitGroup
	for w := 0; w < min(runtime.GOMAXPROCS(0), chunks); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			bf := newBlockFactorer(g, step, fw)
			for {
				k := int(next.Add(1)) - 1
				if k >= chunks {
					return
				}
				for br := k * factorChunk; br < min((k+1)*factorChunk, fh); br++ {
					rowErr[br] = bf.row(br, br == k*factorChunk, f.factor[br*fw:(br+1)*fw])
				}
			}
		}()
	}
	wg.Wait()
	for _, err := range rowErr {
		if err != nil {
			f.err = err
			return f
		}
	}
	f.method = fmt.Sprintf("planar area scaled by the true/planar area ratio of %dx%d-cell blocks (WGS84 ellipsoid)", step, step)
	if step > 1 {
		f.colSeg = make([]int32, g.Width)
		f.colT = make([]float64, g.Width)
		for c := range f.colSeg {
			k0, _, t := factorBracket(float64(c)+0.5, step, fw, g.Width)
			f.colSeg[c], f.colT[c] = int32(k0), t
		}
		f.method = fmt.Sprintf("planar area scaled by the true/planar area ratio of %dx%d-cell blocks (WGS84 ellipsoid), interpolated bilinearly between block centres", step, step)
	}
	f.took = time.Since(t0)
	return f
}

// factorSub is the number of points per block edge of a block's outline.
// The outline's edges are geodesics between its points, not the straight
// lines of the grid CRS, an error that falls as 1/n^2 with n points per
// side (3.5e-7 of a 40 km Web Mercator cell at n = 4, the number once
// used). Richardson's extrapolation from n = 2 and n = 1 (the corners
// alone) removes that term: within 5e-11 of the true area on cells of up
// to 40 km (Web Mercator to 72 degrees, polar stereographic cells holding
// the pole, UTM), 2e-9 on 200 km polar cells (pyproj,
// testdata/geodesy/projected_cells.py). Where the two differ by more than
// 1% (a block so distorted that the extrapolation is not to be trusted)
// the n = 2 area is kept.
const factorSub = 2

// factorChunk is the number of block rows a worker of makeFactors takes
// at a time: each row shares its top line's points and edges with the row
// above, computed again only at a chunk's first row (our choice: 3% more
// edges for chunks that balance two to a few dozen workers).
const factorChunk = 32

// blockFactorer is one worker's state for the block factors: the grid,
// the blocks' columns, and the points and edge areas of the line of
// block corners and edge midpoints on top of the current block row
// (kept from the row above) and at its bottom.
type blockFactorer struct {
	g        *Grid
	step, fw int
	xb, xm   []float64 // block column edges (fw+1) and midpoints (fw)
	top, bot factorLine
	mid      factorLine // the points at the rows' mid height on each xb
	vLo, vHi []float64  // S12 of the vertical half edges, south to north
	vFull    []float64  // S12 of the whole vertical edges
	e1, e2   []float64  // scratch: edge ends
	e3, e4   []float64
	poly     blockPolygon
}

// factorLine holds the points of one horizontal line of the block grid
// (2 fw + 1: corner, midpoint, corner, ..., corner; fw + 1 for mid) and
// the S12 of its half edges and whole edges, west to east.
type factorLine struct {
	xs, ys, lons, lats []float64
	half, full         []float64
}

// blockPolygon is the scratch of one block's outline for PolygonArea.
type blockPolygon struct {
	lons, lats   [4 * factorSub]float64
	lons1, lats1 [4]float64
}

func newBlockFactorer(g *Grid, step, fw int) *blockFactorer {
	gt := g.GeoTransform
	b := &blockFactorer{g: g, step: step, fw: fw, xb: make([]float64, fw+1), xm: make([]float64, fw)}
	for bc := 0; bc <= fw; bc++ {
		b.xb[bc] = gt[0] + float64(min(bc*step, g.Width))*gt[1]
	}
	for bc := 0; bc < fw; bc++ {
		x0, x1 := b.xb[bc], b.xb[bc+1]
		b.xm[bc] = x0 + 0.5*(x1-x0)
	}
	line := func(n int) factorLine {
		return factorLine{xs: make([]float64, n), ys: make([]float64, n), lons: make([]float64, n), lats: make([]float64, n),
			half: make([]float64, 2*fw), full: make([]float64, fw)}
	}
	b.top, b.bot, b.mid = line(2*fw+1), line(2*fw+1), line(fw+1)
	b.vLo, b.vHi, b.vFull = make([]float64, fw+1), make([]float64, fw+1), make([]float64, fw+1)
	n := 2 * fw
	b.e1, b.e2, b.e3, b.e4 = make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	return b
}

// fill transforms the points of the line at height y: the block corners
// and edge midpoints (mid false) or the corners alone (mid true), then
// (mid false) the S12 of its half and whole edges west to east.
func (b *blockFactorer) fill(l *factorLine, y float64, mid bool) {
	if mid {
		copy(l.xs, b.xb)
	} else {
		for bc := 0; bc < b.fw; bc++ {
			l.xs[2*bc], l.xs[2*bc+1] = b.xb[bc], b.xm[bc]
		}
		l.xs[2*b.fw] = b.xb[b.fw]
	}
	for i := range l.ys {
		l.ys[i] = y
	}
	b.g.ToLonLat(l.xs, l.ys, l.lons, l.lats)
	if mid {
		return
	}
	n := 2 * b.fw
	geodesy.EdgeAreas(l.lats[:n], l.lons[:n], l.lats[1:], l.lons[1:], l.half)
	for bc := 0; bc < b.fw; bc++ {
		b.e1[bc], b.e2[bc], b.e3[bc], b.e4[bc] = l.lats[2*bc], l.lons[2*bc], l.lats[2*bc+2], l.lons[2*bc+2]
	}
	geodesy.EdgeAreas(b.e1, b.e2, b.e3, b.e4, l.full)
}

// row computes the factors of block row br into dst (first: the row
// above's bottom line is not at hand). A block's area is that of its
// outline through its corners and edge midpoints, Richardson-extrapolated
// with that through its corners alone (see factorSub), each the sum of
// its edges' S12 (geodesy.EdgeAreas; minus the area, which only its
// magnitude is taken of), every edge shared with the
// neighbouring block computed once; a block whose outline could cross the
// prime meridian or hold a pole (its corners' longitudes of both signs,
// or a latitude beyond 89 degrees) takes geodesy.PolygonArea, which
// corrects for both.
func (b *blockFactorer) row(br int, first bool, dst []float64) error {
	g, step, fw := b.g, b.step, b.fw
	gt := g.GeoTransform
	r0, r1 := br*step, min(br*step+step, g.Height)
	y0, y1 := gt[3]+float64(r0)*gt[5], gt[3]+float64(r1)*gt[5]
	if first {
		b.fill(&b.top, y0, false)
	}
	b.fill(&b.bot, y1, false)
	b.fill(&b.mid, y1+0.5*(y0-y1), true)
	for j := 0; j <= fw; j++ {
		b.e1[j], b.e2[j], b.e3[j], b.e4[j] = b.bot.lats[2*j], b.bot.lons[2*j], b.mid.lats[j], b.mid.lons[j]
	}
	geodesy.EdgeAreas(b.e1[:fw+1], b.e2[:fw+1], b.e3[:fw+1], b.e4[:fw+1], b.vLo)
	for j := 0; j <= fw; j++ {
		b.e1[j], b.e2[j], b.e3[j], b.e4[j] = b.mid.lats[j], b.mid.lons[j], b.top.lats[2*j], b.top.lons[2*j]
	}
	geodesy.EdgeAreas(b.e1[:fw+1], b.e2[:fw+1], b.e3[:fw+1], b.e4[:fw+1], b.vHi)
	for j := 0; j <= fw; j++ {
		b.e1[j], b.e2[j], b.e3[j], b.e4[j] = b.bot.lats[2*j], b.bot.lons[2*j], b.top.lats[2*j], b.top.lons[2*j]
	}
	geodesy.EdgeAreas(b.e1[:fw+1], b.e2[:fw+1], b.e3[:fw+1], b.e4[:fw+1], b.vFull)
	defer func() { b.top, b.bot = b.bot, b.top }()
	p := &b.poly
	for bc := range dst {
		c0 := bc * step
		x0, x1 := b.xb[bc], b.xb[bc+1]
		// The outline counter-clockwise in (x,y): bottom edge west->east,
		// east edge south->north, top edge east->west, west edge
		// north->south.
		p.lons = [4 * factorSub]float64{b.bot.lons[2*bc], b.bot.lons[2*bc+1], b.bot.lons[2*bc+2], b.mid.lons[bc+1],
			b.top.lons[2*bc+2], b.top.lons[2*bc+1], b.top.lons[2*bc], b.mid.lons[bc]}
		p.lats = [4 * factorSub]float64{b.bot.lats[2*bc], b.bot.lats[2*bc+1], b.bot.lats[2*bc+2], b.mid.lats[bc+1],
			b.top.lats[2*bc+2], b.top.lats[2*bc+1], b.top.lats[2*bc], b.mid.lats[bc]}
		east, west, polar := false, false, false
		for i, lon := range p.lons {
			if math.IsNaN(lon) {
				return fmt.Errorf("extent: cells near column %d row %d cannot be transformed to WGS84: they lie outside the map of the raster's CRS (%s), as the corners of a world map in a projection that is not equal-area do, and areasweep needs the true area of every cell; warp the raster to an equal-area CRS, whose cells outside its map may stay (e.g. gdalwarp -t_srs ESRI:54009 IN OUT, Mollweide), or clip it to the map (gdalwarp -te)", c0, r0, crsName(g.WKT))
			}
			east, west = east || lon > 0, west || !(lon > 0)
			polar = polar || math.Abs(p.lats[i]) > 89
		}
		var area, area1 float64
		if east && west || polar {
			area, _ = geodesy.PolygonArea(p.lats[:], p.lons[:])
			for i := range p.lons1 {
				p.lons1[i], p.lats1[i] = p.lons[factorSub*i], p.lats[factorSub*i]
			}
			area1, _ = geodesy.PolygonArea(p.lats1[:], p.lons1[:])
		} else {
			area = exactSum(b.bot.half[2*bc], b.bot.half[2*bc+1], b.vLo[bc+1], b.vHi[bc+1],
				-b.top.half[2*bc+1], -b.top.half[2*bc], -b.vHi[bc], -b.vLo[bc])
			area1 = exactSum(b.bot.full[bc], b.vFull[bc+1], -b.top.full[bc], -b.vFull[bc], 0, 0, 0, 0)
		}
		if math.Abs(area-area1) < 0.01*math.Abs(area) {
			area += (area - area1) / 3
		}
		planar := (x1 - x0) * (y0 - y1)
		fac := math.Abs(area) / planar
		if !(fac > 0) || math.IsInf(fac, 0) {
			return fmt.Errorf("extent: cells near column %d row %d lie outside the area where the raster CRS is defined (their true area is %g); check the raster's CRS and georeferencing with gdalinfo", c0, r0, math.Abs(area))
		}
		dst[bc] = fac
	}
	return nil
}

// exactSum returns the sum of eight terms, Neumaier's compensated
// summation (as PolygonArea's own accumulator, the edges' S12 are far
// larger than their sum, a block's area).
func exactSum(v0, v1, v2, v3, v4, v5, v6, v7 float64) float64 {
	sum, c := 0.0, 0.0
	for _, v := range [8]float64{v0, v1, v2, v3, v4, v5, v6, v7} {
		t := sum + v
		if math.Abs(sum) >= math.Abs(v) {
			c += (sum - t) + v
		} else {
			c += (v - t) + sum
		}
		sum = t
	}
	return sum + c
}

// SameGridTolerance is how far apart, in cells, the cells of two grids of
// one size may lie and still be one grid (SameAs): our choice, a
// hundredth of a cell, so that a header that writes the origin and cell
// size in few digits (an ESRI ASCII grid with 6 decimals: a 30 arcsecond
// cell, 1/120 degree, as 0.008333, which moves the far edge of a grid 250
// cells wide by 0.01 cell) is the grid it was made from while it is
// within that, and a value is never read more than 1% of a cell from the
// place its own file gives it. Further apart, the cells are another grid
// and the scores would mix values from other places: the run stops.
const SameGridTolerance = 0.01

// GridShift returns how far apart the cells of g and o (of one size)
// lie: the largest distance, in cells of g (across and down apart), of
// any corner of a cell of o from the same corner of g's, which is
// largest at the grids' corners (both are affine). +Inf when a rotation
// term differs by more than 1e-9 of a cell.
func (g *Grid) GridShift(o *Grid) float64 {
	a, b := g.GeoTransform, o.GeoTransform
	cell := math.Max(math.Abs(a[1]), math.Abs(a[5]))
	if math.Abs(a[2]-b[2]) > 1e-9*cell || math.Abs(a[4]-b[4]) > 1e-9*cell {
		return math.Inf(1)
	}
	w, h := float64(g.Width), float64(g.Height)
	shift := 0.0
	for _, c := range [][2]float64{{0, 0}, {w, 0}, {0, h}, {w, h}} {
		dx := math.Abs((b[0] + c[0]*b[1]) - (a[0] + c[0]*a[1]))
		dy := math.Abs((b[3] + c[1]*b[5]) - (a[3] + c[1]*a[5]))
		shift = math.Max(shift, math.Max(dx/math.Abs(a[1]), dy/math.Abs(a[5])))
	}
	if math.IsNaN(shift) {
		return math.Inf(1)
	}
	return shift
}

// SameAs reports how g and o differ, or "" when they are one grid.
func (g *Grid) SameAs(o *Grid) string {
	var diffs []string
	if g.Width != o.Width || g.Height != o.Height {
		diffs = append(diffs, fmt.Sprintf("size %dx%d vs %dx%d", g.Width, g.Height, o.Width, o.Height))
	}
	// The cells must lie at the same places: every cell of the two grids
	// within SameGridTolerance of a cell of each other (GridShift), so
	// that a header that writes the origin and cell size in fewer
	// digits (an ESRI ASCII grid as GDAL writes it, 12 decimals: a
	// 1/24 degree cell as 0.041666666667, some 1e-9 of a cell off; or
	// as other tools write it, 6 decimals) is the same grid as the
	// GeoTIFF it was made from. The rotation terms are compared as before.
	if d := g.GridShift(o); math.IsInf(d, 1) {
		diffs = append(diffs, fmt.Sprintf("geotransform %v vs %v (their rotation terms differ)", g.GeoTransform, o.GeoTransform))
	} else if d > SameGridTolerance {
		diffs = append(diffs, fmt.Sprintf("geotransform %v vs %v (cells up to %s of a cell apart, more than the %g of a cell we take for one grid)", g.GeoTransform, o.GeoTransform, strconv.FormatFloat(d, 'g', 2, 64), SameGridTolerance))
	}
	if !sameCRS(g, o) {
		diffs = append(diffs, fmt.Sprintf("CRS %s vs %s", cutText(g.CRS), cutText(o.CRS)))
	}
	return strings.Join(diffs, "; ")
}

// cutText is s cut to its first 60 bytes, for a message.
func cutText(s string) string {
	if len(s) > 60 {
		return s[:60] + "..."
	}
	return s
}
