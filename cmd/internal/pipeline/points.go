package pipeline

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"
	"unicode"
	"unicode/utf8"

	"github.com/airbusgeo/godal"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/outdir"
	"areasweep/cmd/internal/pass"
	"areasweep/extent"
	"areasweep/extent/gdalmsg"
	"areasweep/extent/place"
	"areasweep/extent/vocab"
	"areasweep/report"
)

// checkFiles checks that every input file exists and lists the models
// and raster nulls.
func (s *Study) checkFiles() error {
	o := s.o
	for _, m := range o.Models {
		name, path, _ := inputs.ParseNamedPath(m)
		if err := mustExist("model "+name, path); err != nil {
			return err
		}
		if err := checkHDF5("model "+name, path, true); err != nil {
			return err
		}
		if err := checkASCIIGrid("model "+name, path); err != nil {
			return err
		}
		s.models = append(s.models, namedPath{Name: name, Path: path})
	}
	for _, m := range o.Nulls {
		name, path, _ := inputs.ParseNamedPath(m)
		if err := mustExist("null "+name, path); err != nil {
			return err
		}
		if err := checkHDF5("null "+name, path, true); err != nil {
			return err
		}
		if err := checkASCIIGrid("null "+name, path); err != nil {
			return err
		}
		s.models = append(s.models, namedPath{Name: name, Path: path, Null: true})
	}
	for _, p := range []struct{ what, path string }{{"occurrences", o.Occurrences}, {"region", o.Region}, {"ecoregions", o.Ecoregions}} {
		if p.path != "" {
			if err := mustExist(p.what, p.path); err != nil {
				return err
			}
			if p.what != "occurrences" {
				if err := checkHDF5(p.what, p.path, false); err != nil {
					return err
				}
			}
		}
	}
	for _, m := range o.Extra {
		name, path, _ := inputs.ParseNamedPath(m)
		if err := mustExist("extra extent "+name, path); err != nil {
			return err
		}
		if err := checkHDF5("extra extent "+name, path, false); err != nil {
			return err
		}
	}
	if len(s.models) == 0 {
		return fault.BadInput(errors.New("no model raster given (--model NAME=PATH); even 'extents' needs one for the grid"))
	}
	return nil
}

// openGrid takes the grid from the first model and checks that every other
// model and null lies on the same grid.
func (s *Study) openGrid() error {
	for i, m := range s.models {
		aux := auxFile(m.Path)
		if what, declared := aux.what, aux.declared; what != "" {
			out := strings.TrimSuffix(m.Path, filepath.Ext(m.Path)) + "_own.tif"
			first := ""
			if declared {
				// GDAL skips such a file: the copy would lack it too.
				first = "remove its first line (the XML declaration <?xml ...?>, which makes GDAL skip the file too), then "
			}
			vrt := ""
			if strings.Contains(what, "the CRS") {
				// GDAL writes a CRS that GeoTIFF keys cannot hold (Equal
				// Earth, with GDAL 3.6) into an .aux.xml: a GeoTIFF copy
				// would get one too. A virtual raster holds any CRS.
				own := strings.TrimSuffix(m.Path, filepath.Ext(m.Path)) + "_own.vrt"
				vrt = fmt.Sprintf("; if the copy gets an .aux.xml of its own (a GeoTIFF cannot hold every CRS), make a virtual raster instead, which holds any CRS and reads the cells from %s (gdal_translate -of VRT %s %s), and give %s", m.Path, shellArg(m.Path), shellArg(own), own)
			}
			return fault.BadInput(fmt.Errorf("%s: %s.aux.xml sets %s of %s, which the raster itself does not hold; areasweep never reads .aux.xml files (nor writes them beside inputs), so it would read the cells as if that file were not there: "+
				"%scopy the raster with GDAL's own tools, which read the .aux.xml and write what it sets into the copy (e.g. gdal_translate %s %s), and give %s%s", m.who(), m.Path, what, m.Path, first, shellArg(m.Path), shellArg(out), out, vrt))
		}
		if what := aux.broken; what != "" {
			s.warn(fmt.Sprintf("%s: %s.aux.xml appears to set %s of %s, but it is not well-formed XML, so GDAL skips it (and areasweep reads no .aux.xml files): the cells are read as if it were not there; if it was meant to set them, repair the file, copy the raster with GDAL's own tools (e.g. gdal_translate %s %s), and give the copy",
				m.who(), m.Path, what, m.Path, shellArg(m.Path), shellArg(strings.TrimSuffix(m.Path, filepath.Ext(m.Path))+"_own.tif")))
		}
		g, err := extent.OpenGrid(m.Path)
		if err != nil {
			if ext := strings.ToLower(filepath.Ext(m.Path)); errors.Is(err, extent.ErrNoCRS) && ext != ".tif" && ext != ".tiff" {
				// gdal_edit.py records the CRS of other formats in an
				// .aux.xml file, which areasweep does not read.
				hint := "convert it with the CRS, e.g. gdal_translate -a_srs EPSG:4326 " + shellArg(m.Path) + " " + shellArg(convertedName(m.Path))
				if ext == ".asc" {
					hint = "write its CRS into " + strings.TrimSuffix(m.Path, filepath.Ext(m.Path)) + ".prj beside it (as modelling tools do), or " + hint
				}
				return fault.BadInput(fmt.Errorf("%s: %s has no coordinate reference system; %s", m.who(), m.Path, hint))
			}
			if errors.Is(err, extent.ErrCRSMissing) {
				// A GeoTIFF without a CRS (not an undefined one): GDAL reads no .prj beside it (a desktop GIS
				// export's .tif, .tfw and .prj), so name the one there is.
				stem := strings.TrimSuffix(m.Path, filepath.Ext(m.Path))
				own := shellArg(stem + "_crs.tif")
				for _, prj := range []string{stem + ".prj", m.Path + ".prj"} {
					if st, serr := os.Stat(prj); serr == nil && st.Mode().IsRegular() {
						return fault.BadInput(fmt.Errorf("%s: %s has no coordinate reference system of its own, and GDAL does not read the %s beside a GeoTIFF; "+
							"write that CRS into a copy, e.g. gdal_translate -a_srs %s %s %s, and give the copy", m.who(), m.Path, prj, shellArg(prj), shellArg(m.Path), own))
					}
				}
				return fault.BadInput(fmt.Errorf("%s: %s has no coordinate reference system; write the one its coordinates are in into a copy, e.g. gdal_translate -a_srs EPSG:4326 %s %s, and give the copy",
					m.who(), m.Path, shellArg(m.Path), own))
			}
			if v, verr := godal.Open(m.Path, godal.VectorOnly()); verr == nil {
				v.Close()
				return fault.BadInput(fmt.Errorf("%s: %s is a vector file or a table (GDAL reads features from it, not cells), not a raster; give the raster itself (GeoTIFF or any raster GDAL reads)", m.who(), m.Path))
			}
			return fault.BadInput(fmt.Errorf("%s: %w", m.who(), err))
		}
		msg, band, nBands, colours := maskProblem(m.Path)
		if band != "" {
			g.Close()
			return fault.BadInput(fmt.Errorf("%s: %s %s", m.who(), m.Path, band))
		}
		if msg != "" {
			g.Close()
			return fault.BadInput(fmt.Errorf("%s: %s %s; areasweep reads no data from the band's nodata value only, so it would score the cells the mask alone marks as data: "+
				"write them as nodata, e.g. gdalwarp -ot Float32 -dstnodata -9999 %s %s", m.who(), m.Path, msg, shellArg(m.Path), shellArg(strings.TrimSuffix(m.Path, filepath.Ext(m.Path))+"_nodata.tif")))
		}
		if colours > 0 {
			s.warn(colourTableWarning(m.who(), m.Path, colours))
		}
		if nBands > 1 {
			stem := strings.TrimSuffix(m.Path, filepath.Ext(m.Path))
			s.warn(fmt.Sprintf("%s: %s has %d bands; only the first is scored (to score another, extract it, e.g. gdal_translate -b 2 %s %s, and give that file)", m.who(), m.Path, nBands, shellArg(m.Path), shellArg(stem+"_b2.tif")))
		}
		if i == 0 {
			s.grid = g
			if s.o.MembershipTIFF && !g.GeoTIFFHoldsCRS() {
				s.warn(fmt.Sprintf("extents.tif will hold the grid of %s (its geotransform) but no CRS: GDAL's GeoTIFF writer cannot store this raster's CRS (%s) and areasweep writes no .aux.xml, so read extents.tif with the CRS of %s (extents.gpkg has it)",
					m.Path, shortText(g.CRS, 40), m.Path))
			}
			if g.DatumShiftM >= 1 {
				s.warn(fmt.Sprintf("%s: %s is in latitude and longitude on another datum than WGS84 (%s); areasweep reads them as WGS84's, so the occurrences lie about %.0f m (%.2g of a cell side) from where that datum puts them: if that matters at this resolution, warp the raster to WGS84 (e.g. gdalwarp -t_srs EPSG:4326 %s %s)",
					m.who(), m.Path, shortText(g.CRS, 40), g.DatumShiftM, g.DatumShiftM/g.MinCellSideM(), shellArg(m.Path), shellArg(strings.TrimSuffix(m.Path, filepath.Ext(m.Path))+"_wgs84.tif")))
			}
			continue
		}
		if d := s.grid.SameAs(g); d != "" {
			rounded := ""
			if shift := s.grid.GridShift(g); s.grid.Width == g.Width && s.grid.Height == g.Height && !strings.Contains(d, "CRS ") && shift < 0.5 {
				// Less than half a cell: most likely one grid whose
				// header (an ESRI ASCII grid's, with few decimals) is
				// rounded, which only the user can tell.
				rounded = fmt.Sprintf("; or, if %s holds the values of the cells of %s and only the numbers of its header are rounded, give it the grid of %s: %s", m.Path, s.models[0].Name, s.models[0].Name, ullrCommand(s.grid, m.Path))
			}
			return fault.BadInput(fmt.Errorf("%w: %s (%s) and %s (%s) differ in %s; resample them onto one grid, e.g. %s onto the grid of %s: %s%s",
				extent.ErrGridsDiff, s.models[0].Name, s.models[0].Path, m.Name, m.Path, d, m.Name, s.models[0].Name,
				onGridCommand(s.grid, s.models[0].Path, m.Path, strings.Contains(d, "CRS ")), rounded))
		}
		if shift := s.grid.GridShift(g); shift > 1e-6 {
			s.warn(fmt.Sprintf("%s: the cells of %s lie up to %.2g of a cell from those of %s (%s), whose grid is used for both (within the %g of a cell we take for one grid: a header's numbers written with few decimals, as an ESRI ASCII grid's 0.008333 for 1/120 degree)",
				m.who(), m.Path, shift, s.models[0].Name, s.models[0].Path, extent.SameGridTolerance))
		}
		g.Close()
	}
	g := s.grid
	s.res.Grid = report.Grid{Width: g.Width, Height: g.Height, GeoTransform: g.GeoTransform, CRS: g.CRS, Geographic: g.Geographic, CellAreaNote: g.AreaMethod, Unit: g.Unit, UnitM: g.UnitM}
	s.logf("grid: %dx%d cells, %s, %s", g.Width, g.Height, shortText(g.CRS, 40), g.AreaMethod)
	if g.FactorTime > 0 {
		s.logf("cell area ratios of the blocks computed in %.2f s (once for every model of the run, and every study of a batch, on this grid)", g.FactorTime.Seconds())
	}
	return nil
}

// onGridCommand is the gdalwarp command that resamples the raster at
// path onto grid g (the first model's, read from first): its extent
// (-te) and cell size (-tr), bilinear, and its CRS when crs is set (as
// EPSG:N when it has that code, else named by the first model).
func onGridCommand(g *extent.Grid, first, path string, crs bool) string {
	gt, b := g.GeoTransform, g.Bounds() // west, south, east, north
	num := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	t := ""
	if crs {
		if strings.HasPrefix(g.CRS, "EPSG:") {
			t = " -t_srs " + g.CRS
		} else {
			t = " -t_srs CRS (the CRS of " + first + ")"
		}
	}
	out := strings.TrimSuffix(path, filepath.Ext(path)) + "_on_grid.tif"
	return fmt.Sprintf("gdalwarp%s -te %s %s %s %s -tr %s %s -r bilinear %s %s (-r near for a model of classes), and give %s",
		t, num(b[0]), num(b[1]), num(b[2]), num(b[3]),
		num(math.Abs(gt[1])), num(math.Abs(gt[5])), shellArg(path), shellArg(out), out)
}

// ullrCommand is the gdal_translate command that gives the raster at
// path the corners of grid g (-a_ullr), its cells unchanged, and the
// file to give then.
func ullrCommand(g *extent.Grid, path string) string {
	b := g.Bounds() // west, south, east, north
	num := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	out := strings.TrimSuffix(path, filepath.Ext(path)) + "_grid.tif"
	return fmt.Sprintf("gdal_translate -a_ullr %s %s %s %s %s %s, and give %s", num(b[0]), num(b[3]), num(b[2]), num(b[1]), shellArg(path), shellArg(out), out)
}

// shellArg is path as a shell command's argument in the commands the
// messages suggest: as it is when it holds only letters, digits and
// "_-+./:=,@%" (every path of the demo and of most studies), else in
// single quotes, a quote inside written '\” (a path with a space would
// otherwise be two arguments).
func shellArg(path string) string {
	for _, r := range path {
		if !(r < utf8.RuneSelf && (r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("_-+./:=,@%", r))) {
			return "'" + strings.ReplaceAll(path, "'", `'\''`) + "'"
		}
	}
	if path == "" {
		return "''"
	}
	return path
}

// maskProblem says how the first band of the raster at path marks cells
// without data other than by a nodata value (an alpha band, a .msk file
// or an internal mask, as gdalwarp -dstalpha and some exports write
// them), or "" when it does not: GDAL's mask flags are then all-valid or
// nodata. From the same open it also returns pass.BandProblem of the
// first band (complex values, a scale of 0, ...) and the raster's number
// of bands (0 when it cannot be opened: OpenGrid has read it, and a later
// read reports its own error).
func maskProblem(path string) (mask, band string, nBands, colours int) {
	ds, err := extent.OpenRaster(path)
	if err != nil {
		return "", "", 0, 0
	}
	defer ds.Close()
	bands := ds.Bands()
	if len(bands) > 0 {
		band = pass.BandProblem(bands[0])
		colours = len(bands[0].ColorTable().Entries)
	}
	mask = maskOf(bands)
	if mask != "" {
		if nd, ok := bands[0].NoData(); ok {
			// GDAL takes a mask before a nodata value: the mask may mark
			// cells the value does not.
			mask += fmt.Sprintf(", which GDAL takes instead of its nodata value (%g)", nd)
		}
	}
	return mask, band, len(bands), colours
}

// colourTableWarning says that the model or null who (its raster at path,
// whose first band has a colour table of colours entries: a classified
// map, or an image saved for display) is scored on its raw cell values,
// the palette's indexes, as every raster is: right when the indexes are
// the suitability scale, wrong when the colours stand for other values
// (the classes of a legend in another order, a colour ramp drawn over a
// scale the indexes do not keep).
func colourTableWarning(who, path string, colours int) string {
	stem := strings.TrimSuffix(path, filepath.Ext(path))
	return fmt.Sprintf("%s: %s has a colour table (%d colours, as a classified map or an image saved for display has); it is scored on its raw cell values, the palette indexes, which is right only if those indexes are the suitability scale (higher meaning more suitable); if not, give a copy holding the real values: the palette's grey shades as values (gdal_translate -expand gray %s %s), or each index turned into its value with a calculation (e.g. gdal_calc.py -A %s --outfile=%s --calc=\"A/200.0\" for indexes 0 to 200 standing for 0 to 1)",
		who, path, colours, shellArg(path), shellArg(stem+"_gray.tif"), shellArg(path), shellArg(stem+"_values.tif"))
}

// maskOf is maskProblem's reading of a raster's bands.
func maskOf(bands []godal.Band) string {
	if len(bands) == 0 {
		return ""
	}
	const allValid, alpha, nodata = 0x01, 0x04, 0x08 // GMF_ALL_VALID, GMF_ALPHA, GMF_NODATA
	f := bands[0].MaskFlags()
	if f&nodata != 0 {
		return "" // a nodata value: areasweep's own rule
	}
	// GDAL takes only a Byte or UInt16 alpha band as the mask; gdalwarp
	// -dstalpha writes a Float32 raster's alpha as Float32.
	for _, b := range bands[1:] {
		if b.ColorInterp() == godal.CIAlpha {
			return "marks its cells without data by an alpha band"
		}
	}
	switch {
	case f&allValid != 0:
		return ""
	case f&alpha != 0:
		return "marks its cells without data by an alpha band"
	default:
		return "marks its cells without data by a mask (a .msk file or a mask inside the file)"
	}
}

// crsAdvice says how to write a CRS, suggesting EPSG:N for a bare number
// and saying what a file named there must hold.
func crsAdvice(crs string) string {
	if namesFile(crs) {
		return fmt.Sprintf("%s is a file, read for the CRS, whose text GDAL does not take as one: it should hold the CRS's WKT (as the .prj beside a shapefile does) or a PROJ string; or write an authority code such as EPSG:3035", crs)
	}
	if _, err := strconv.ParseUint(strings.TrimSpace(crs), 10, 32); err == nil {
		return fmt.Sprintf("an EPSG code is written with its authority: EPSG:%s", strings.TrimSpace(crs))
	}
	if ext := strings.ToLower(filepath.Ext(crs)); ext == ".prj" || ext == ".wkt" {
		return fmt.Sprintf("it reads as the name of a CRS file, but there is no file %s (a relative path is read from the study file's or table's folder, else from the working folder): check the path, or write an authority code such as EPSG:3035", crs)
	}
	return "write an authority code such as EPSG:3035, a PROJ string such as +proj=utm +zone=33 +datum=WGS84, or the CRS's WKT"
}

// convertedName returns the GeoTIFF a conversion of the raster at path
// is advised to write: STEM.tif, or STEM_crs.tif when STEM.tif exists
// (as the GeoTIFF an ASCII grid was exported from often does), so that
// the advice never overwrites a file of the user's.
func convertedName(path string) string {
	stem := strings.TrimSuffix(path, filepath.Ext(path))
	if _, err := os.Lstat(stem + ".tif"); err == nil {
		return stem + "_crs.tif"
	}
	return stem + ".tif"
}

// authorityCode matches a CRS written as an authority code at the start
// of a text (EPSG:3035, ESRI:54009, IAU_2015:49900, OGC:CRS84, or a
// compound EPSG:4326+5773), and what follows it. EPSG's codes are
// numbers, so the letters of EPSG:4326xyz follow the code.
var authorityCode = regexp.MustCompile(`^((?i:EPSG):[0-9]+(?:\+[0-9]+)?|[A-Za-z][A-Za-z0-9_]*:[A-Za-z0-9_.]+(?:\+[A-Za-z0-9_.]+)?)(.*)$`)

// crsTrailingText refuses an --occurrences-crs written as an authority
// code followed by more text ("EPSG:4326,EPSG:3857", "EPSG:32633 UTM
// 33N", "EPSG:3035;"): GDAL reads the number at the start of the code
// and ignores the rest without a word, so a second code, or a typo after
// the first digits, would place the points in a CRS nobody chose. A URN
// (urn:ogc:def:crs:EPSG::4326), a URL and GDAL's AUTO:ID,UNIT,LON,LAT
// are left to GDAL, which reads them whole.
func crsTrailingText(crs string) error {
	text := strings.TrimSpace(crs)
	m := authorityCode.FindStringSubmatch(text)
	if m == nil || m[2] == "" {
		return nil
	}
	switch auth, _, _ := strings.Cut(strings.ToUpper(text), ":"); auth {
	case "URN", "HTTP", "HTTPS", "AUTO", "AUTO2":
		return nil
	}
	return fmt.Errorf("--occurrences-crs %q has text after the CRS code %s (%q), which GDAL would ignore: give one CRS, e.g. --occurrences-crs %s",
		crs, m[1], m[2], m[1])
}

// namedItem finds a second NAME=PATH item inside a path: a list written
// with commas in one --model, --null or --extra flag.
var namedItem = regexp.MustCompile(`,[A-Za-z0-9_.-]{1,40}=`)

// gdalSubdataset matches GDAL's name of one raster in a container file,
// DRIVER:file:variable, such as NETCDF:"clim.nc":bio1 or
// HDF5:"x.h5"://grid (a driver name of two letters or more, so that a
// Windows drive letter is not one).
var gdalSubdataset = regexp.MustCompile(`^[A-Z][A-Z0-9_]+:.+:`)

// windowsDrive matches a Windows drive letter starting a path or a
// path's part (a study file's C:\data\x.tif is joined to its folder).
var windowsDrive = regexp.MustCompile(`(^|/)[A-Za-z]:/`)

// WindowsPath reports whether path is written as on Windows: with
// backslashes, or with a drive letter (a study file's C:/data/x.tif is
// joined to its folder).
func WindowsPath(path string) bool {
	return strings.Contains(path, `\`) || windowsDrive.MatchString(path)
}

// BackslashAdvice says what to do with a path that holds backslashes
// (written on Windows, as in a study file made there) and does not
// exist: on this system a backslash is part of a file's name.
func BackslashAdvice(path string) string {
	slashed := strings.ReplaceAll(path, `\`, "/")
	if windowsDrive.MatchString(slashed) {
		return "it is a Windows path (it starts with a drive letter); give the path of the file on this machine, with / between folders"
	}
	advice := "a backslash (\\) separates folders on Windows only; write the path with / between folders"
	if st, err := os.Stat(slashed); err == nil && !st.IsDir() {
		advice += fmt.Sprintf(" (%s exists)", filepath.Clean(slashed))
	}
	return advice
}

// layerInPath splits a path that names a layer of an existing file the
// way QGIS writes a layer's source (regions.gpkg|layername=m or
// |layerid=1) or as FILE:LAYER, and returns the file and the layer
// (LAYER for a layer id, which names no layer ogr2ogr takes).
func layerInPath(path string) (file, layer string, ok bool) {
	exists := func(f string) bool {
		st, err := os.Stat(f)
		return err == nil && (st.Mode().IsRegular() || (st.IsDir() && strings.HasSuffix(strings.ToLower(f), ".gdb")))
	}
	if i := strings.Index(path, "|"); i > 0 && exists(path[:i]) {
		layer = "LAYER"
		for _, opt := range strings.Split(path[i+1:], "|") {
			if name, found := strings.CutPrefix(opt, "layername="); found && name != "" {
				layer = shellArg(name)
			}
		}
		return path[:i], layer, true
	}
	if i := strings.LastIndex(path, ":"); i > 0 && i < len(path)-1 && exists(path[:i]) {
		return path[:i], shellArg(path[i+1:]), true
	}
	return "", "", false
}

// tildeFlag is the flag of the input mustExist names as what ("model
// m", "occurrences", "region", "extra x"), for TildeAdvice.
func tildeFlag(what string) string {
	name, _, _ := strings.Cut(what, " ")
	return "--" + name
}

// layerExts are the file extensions folderFiles names in a folder given
// for a polygon layer (the formats the README lists and the common ones
// OGR reads from one file), and tableExts those it names for the
// occurrence table.
var (
	layerExts = []string{".shp", ".gpkg", ".geojson", ".json", ".fgb", ".kml", ".gml", ".sqlite"}
	tableExts = []string{".csv", ".txt", ".tsv"}
)

// folderFiles returns the end of the message refusing a folder given for
// the occurrences or a polygon layer: the files in it that could be meant
// (a Shapefile's folder holds the .shp to give), at most three and in
// name order, with what to do; or what to give when there is none.
func folderFiles(what, dir string) string {
	exts, kind := layerExts, "the file of the polygon layer"
	if what == "occurrences" {
		exts, kind = tableExts, "the occurrence table's file"
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		return "; give " + kind + " itself"
	}
	var found []string
	for _, e := range entries {
		if e.Type().IsRegular() && slices.Contains(exts, strings.ToLower(filepath.Ext(e.Name()))) {
			found = append(found, shellArg(filepath.Join(dir, e.Name())))
		}
	}
	switch {
	case len(found) == 0:
		return "; give " + kind + " itself"
	case len(found) > 3:
		return fmt.Sprintf("; give %s itself, e.g. one of the %d in it: %s, ...", kind, len(found), strings.Join(found[:3], ", "))
	}
	return fmt.Sprintf("; give %s itself, e.g. %s", kind, strings.Join(found, " or "))
}

// maxRasterPath is the longest path of a raster input: our cut-off, below
// the 2,048 bytes of GDAL's buffer for file names by the longest suffix
// it adds (".aux.xml" and its kin), with room to spare (measured with
// GDAL 3.6: a GeoTIFF at 2,031 bytes opens whole, one at 2,041 without
// its georeferencing).
const maxRasterPath = 2000

// shortPath shows a long path by its first and last 60 bytes.
func shortPath(p string) string {
	if len(p) <= 160 {
		return p
	}
	return p[:60] + "..." + p[len(p)-60:]
}

func mustExist(what, path string) error {
	if strings.ContainsAny(path, "\n\r") {
		// Every message naming the file, and run.log, would break
		// there; --out refuses a line break too.
		return fault.BadInput(fmt.Errorf("%s: the path %q holds a line break, which no message could show on one line; rename the file (or its folder)", what, path))
	}
	// HDF5:"x.h5"://grid holds "://" too: it is named as the subdataset
	// it is, with the gdal_translate that extracts it, not as a URL.
	if (strings.HasPrefix(path, "/vsi") || strings.Contains(path, "://")) && !gdalSubdataset.MatchString(path) {
		return fault.BadInput(fmt.Errorf("%s: %s is a GDAL virtual path or a URL; areasweep reads local files only (it records and rechecks each input's SHA-256): "+
			"download or unzip the file and give its path", what, path))
	}
	st, err := os.Stat(path)
	if err != nil {
		if strings.Contains(what, " ") && namedItem.MatchString(path) {
			return fault.BadInput(fmt.Errorf("%s: %s does not exist: several NAME=PATH items were given in one flag; "+
				"give each its own flag (--model a=x.tif --model b=y.tif) or, in a study file, a list", what, path))
		}
		if gdalSubdataset.MatchString(path) {
			return fault.BadInput(fmt.Errorf("%s: %s is a GDAL subdataset name, not a file; areasweep reads local files only (it records and rechecks each input's SHA-256): "+
				"extract it into a file of its own (e.g. gdal_translate %s OUT.tif) and give that file", what, path, shellArg(path)))
		}
		if WindowsPath(path) {
			return fault.BadInput(fmt.Errorf("%s: %s does not exist: %s", what, path, BackslashAdvice(path)))
		}
		if outdir.UnexpandedTilde(path) {
			return fault.BadInput(fmt.Errorf("%s: %s does not exist: %s", what, path, outdir.TildeAdvice(tildeFlag(what), path)))
		}
		if file, layer, ok := layerInPath(path); ok && !strings.HasPrefix(what, "model ") && !strings.HasPrefix(what, "null ") && what != "occurrences" {
			return fault.BadInput(fmt.Errorf("%s: %s names a layer inside the path (as a GIS shows a layer's source); areasweep takes a file and uses its first layer of polygons: "+
				"save that layer alone and give its file (e.g. ogr2ogr OUT.gpkg %s %s; ogrinfo %s lists the layers)", what, path, shellArg(file), layer, shellArg(file)))
		}
		return fault.BadInput(fmt.Errorf("%s: %s does not exist or cannot be read; check the path", what, path))
	}
	if st.IsDir() && (strings.HasPrefix(what, "model ") || strings.HasPrefix(what, "null ")) {
		// GDAL reads some rasters stored as a folder (a Zarr store, an
		// ArcInfo binary grid); areasweep hashes one file per input.
		return fault.BadInput(fmt.Errorf("%s: %s is a directory, not a file; areasweep reads a raster from one file (it records and rechecks each input's SHA-256): "+
			"if it is a raster stored as a folder (a Zarr store, an ArcInfo binary grid), copy it into one file (e.g. gdal_translate %s OUT.tif) and give that file", what, path, shellArg(path)))
	}
	if st.IsDir() && strings.HasSuffix(strings.ToLower(strings.TrimRight(path, "/")), ".gdb") {
		// An Esri File Geodatabase, a folder of files: the checksums
		// read it as one file and failed ("read r.gdb: is a directory").
		return fault.BadInput(fmt.Errorf("%s: %s is a File Geodatabase, a folder of many files; areasweep reads a polygon layer from one file (it records and rechecks each input's SHA-256): export the layer to a GeoPackage (e.g. ogr2ogr -f GPKG OUT.gpkg %s LAYER; ogrinfo %s lists the layers) and give that file", what, path, shellArg(path), shellArg(path)))
	}
	if st.IsDir() {
		return fault.BadInput(fmt.Errorf("%s: %s is a directory, not a file%s", what, path, folderFiles(what, path)))
	}
	if !st.IsDir() && !st.Mode().IsRegular() && what != "occurrences" {
		// GDAL would wait forever for a named pipe's writer, and reads a
		// raster or layer by seeking in it: the occurrence table alone is
		// read as a stream (a shell's <(...) included).
		return fault.BadInput(fmt.Errorf("%s: %s is not a regular file (a named pipe, device or socket); GDAL reads rasters and layers from files: give the path of the file", what, path))
	}
	if (strings.HasPrefix(what, "model ") || strings.HasPrefix(what, "null ")) && len(path) > maxRasterPath {
		// GDAL forms the names of the files beside a raster (its
		// .aux.xml, .ovr, world file) in a buffer of 2,048 bytes; past
		// it the raster opened without its georeferencing, and the run
		// said "has no geotransform".
		return fault.BadInput(fmt.Errorf("%s: the path %s is %d bytes long; GDAL reads a raster at a path of at most about 2,000 bytes (it names the files beside it, such as its .aux.xml, in a buffer of 2,048): "+
			"give a shorter path (move the file, or link it from a short folder, e.g. ln -s %s /tmp/%s)", what, shortPath(path), len(path), shellArg(path), filepath.Base(path)))
	}
	if st.Mode().IsRegular() {
		f, err := os.Open(path)
		if err != nil {
			return fault.BadInput(fmt.Errorf("%s: %s cannot be read (%w); check the file's permissions", what, path, outdir.Cause(err)))
		}
		f.Close()
	}
	if st.Mode().IsRegular() && st.Size() == 0 && what != "occurrences" { // the table reader says what an empty table needs
		return fault.BadInput(fmt.Errorf("%s: %s is empty (0 bytes); it was probably cut off while being written, copied or downloaded: give the complete file", what, path))
	}
	if wal := path + "-wal"; what != "occurrences" {
		// A GeoPackage (an SQLite file) in WAL mode keeps its latest
		// changes in this file until they are written into it. GDAL's
		// reading, though read-only, wrote them into the input and
		// removed the -wal and -shm files when it closed the file: the
		// input changed after its SHA-256 was taken, and files the run
		// did not create were removed.
		if ws, err := os.Stat(wal); err == nil && ws.Mode().IsRegular() && ws.Size() > 0 {
			return fault.BadInput(fmt.Errorf("%s: %s has changes not yet written into it, kept in %s beside it (a program such as QGIS has the file open, or stopped while it had): reading it would write them into %s and remove that file; close the program, or open and close the file once in it, and run again",
				what, path, filepath.Base(wal), filepath.Base(path)))
		}
	}
	return nil
}

// checkHDF5 refuses a damaged HDF5 file before GDAL's drivers are tried
// on it (extent.CheckHDF5: the HDF5 library would print its error stack
// on the terminal), and a classic netCDF file cut short
// (extent.CheckNetCDFClassic: GDAL reads its missing values as 0).
func checkHDF5(what, path string, raster bool) error {
	err := extent.CheckHDF5(path, raster)
	if err == nil {
		err = extent.CheckNetCDFClassic(path)
	}
	if err != nil {
		give := "a GeoTIFF (or another raster GDAL reads) and check that it opens in a GIS"
		if !raster {
			give = "a GeoPackage, shapefile (.shp with its .shx and .dbf) or GeoJSON file of polygons"
		}
		return fault.BadInput(fmt.Errorf("%s: %s: %s; give %s", what, path, err, give))
	}
	return nil
}

func shortText(s string, n int) string {
	if len(s) > n {
		return s[:n] + "..."
	}
	return s
}

// readLonLat reads the occurrence table and returns its coordinates as
// WGS84 longitudes and latitudes (transformed from --occurrences-crs when
// that is another CRS, a geographic one on another datum included). It
// notes when projected coordinates all fit in degree ranges (most likely
// degrees given the wrong --occurrences-crs; used for a hint).
func (s *Study) readLonLat() (lons, lats []float64, recs []inputs.Record, err error) {
	o := s.o
	geographic := true
	var toLL, fromLL *godal.Transform
	if o.OccurrencesCRS != "" {
		sr, err := godal.NewSpatialRef(o.OccurrencesCRS)
		if err != nil {
			cause := gdalmsg.Cause(err.Error())
			if strings.Contains(cause, "ogr error") { // OGRERR_UNSUPPORTED_SRS's number says nothing more
				cause = ""
			} else {
				cause = " (" + cause + ")"
			}
			return nil, nil, nil, fault.BadInput(fmt.Errorf("--occurrences-crs %q is not a CRS PROJ knows%s; %s",
				o.OccurrencesCRS, cause, crsAdvice(o.OccurrencesCRS)))
		}
		if !sr.Geographic() && !sr.Projected() {
			// A geocentric (EPSG:4978), vertical (EPSG:5703) or local
			// engineering CRS has no longitude-latitude or easting-northing
			// pair on the Earth: PROJ fails on every point, knows no
			// transformation, or passes them through unchanged.
			return nil, nil, nil, fault.BadInput(fmt.Errorf("--occurrences-crs %q is neither a geographic nor a projected CRS (a geocentric, vertical or local engineering one, say), so the X and Y columns cannot be longitudes and latitudes or eastings and northings in it; give the horizontal CRS of the coordinates, e.g. EPSG:4326 for degrees",
				o.OccurrencesCRS))
		}
		geographic = sr.Geographic()
		wgs, _ := godal.NewSpatialRefFromEPSG(4326)
		if !sr.IsSame(wgs) {
			if toLL, err = godal.NewTransform(sr, wgs); err != nil {
				return nil, nil, nil, fault.BadInput(fmt.Errorf("--occurrences-crs %q cannot be transformed to WGS84 longitudes and latitudes (%s); areasweep places the occurrences on the Earth: give the CRS the coordinates are in, a CRS of the Earth with a known datum",
					o.OccurrencesCRS, gdalmsg.Cause(err.Error())))
			}
			defer toLL.Close()
			if fromLL, err = godal.NewTransform(wgs, sr); err == nil {
				defer fromLL.Close()
			}
		}
	}
	recs, err = s.readOccurrences(geographic)
	if err != nil {
		return nil, nil, nil, fault.BadInput(err)
	}
	if w := taxaWarning(o.Occurrences, recs); w != "" {
		s.warn(w)
	}
	if w := zeroWarning(o.Occurrences, recs, geographic); w != "" {
		s.warn(w)
	}
	s.rawDegrees = !geographic
	lons, lats = make([]float64, len(recs)), make([]float64, len(recs))
	for i, r := range recs {
		if math.Abs(r.X) > 180 || math.Abs(r.Y) > 90 {
			s.rawDegrees = false
		}
		lons[i], lats[i] = r.X, r.Y
	}
	if toLL != nil {
		okv := make([]bool, len(recs))
		terr := toLL.TransformEx(lons, lats, nil, okv)
		if bad := offEarth(recs, lons, lats, okv, fromLL); len(bad) > 0 {
			return nil, nil, nil, fault.BadInput(offEarthError(o.Occurrences, o.OccurrencesCRS, recs, bad))
		}
		if terr != nil {
			return nil, nil, nil, fault.BadInput(fmt.Errorf("%s: coordinates cannot be transformed from %s to WGS84: %w", o.Occurrences, o.OccurrencesCRS, terr))
		}
	}
	return lons, lats, recs, nil
}

// roundTripTol is how far (in the units of --occurrences-crs) a
// coordinate pair may come back from WGS84 before offEarth takes it for a
// point off the Earth: our choice, far above a round trip's error
// (nanometres; a datum grid's, millimetres; metres should PROJ pick
// transformations of different accuracy the two ways) and far below the
// thousands of kilometres a wrapped point lands away.
const roundTripTol = 1000.0

// offEarth returns the indexes of the records that are not on the Earth:
// those PROJ could not transform (ok false, or no finite result), and,
// with fromLL (WGS84 back to the table's CRS), those whose longitude and
// latitude do not map back to their coordinates within roundTripTol. On
// Equal Earth, Eckert IV or sinusoidal world maps PROJ's inverse gives a
// point beyond the map's outline a position on the other side of the
// Earth instead of failing, and the point would be placed there.
func offEarth(recs []inputs.Record, lons, lats []float64, ok []bool, fromLL *godal.Transform) []int {
	var bad []int
	xs, ys := slices.Clone(lons), slices.Clone(lats)
	back := make([]bool, len(xs))
	if fromLL == nil || fromLL.TransformEx(xs, ys, nil, back) != nil && !slices.Contains(back, true) {
		back = nil
	}
	for i, r := range recs {
		finite := !math.IsNaN(lons[i]) && !math.IsInf(lons[i], 0) && !math.IsNaN(lats[i]) && !math.IsInf(lats[i], 0)
		if !ok[i] || !finite {
			bad = append(bad, i)
			continue
		}
		if back != nil && (!back[i] || !(math.Abs(xs[i]-r.X) <= roundTripTol && math.Abs(ys[i]-r.Y) <= roundTripTol)) {
			bad = append(bad, i)
		}
	}
	return bad
}

// offEarthError names the records offEarth found (the first five, by
// line) and says what to do.
func offEarthError(path, crs string, recs []inputs.Record, bad []int) error {
	var lines []string
	for _, i := range bad[:min(len(bad), 5)] {
		lines = append(lines, fmt.Sprintf("line %d (%s, %s)", recs[i].Line,
			strconv.FormatFloat(recs[i].X, 'f', -1, 64), strconv.FormatFloat(recs[i].Y, 'f', -1, 64)))
	}
	more := ""
	if len(bad) > 5 {
		more = fmt.Sprintf(" and %d more", len(bad)-5)
	}
	return fmt.Errorf("%s: %s%s: not on the Earth in %s (PROJ finds no longitude and latitude for them, or one that maps back elsewhere: beyond the outline of a world map); check those coordinates and that --occurrences-crs is the CRS they are in",
		path, strings.Join(lines, ", "), more, crs)
}

// taxaWarning says, when the table's species column (inputs.TaxonNames)
// names more than one taxon, that every line is scored as one species:
// a portal's export of a genus, or of several species, scored as is
// mixes their records. "" otherwise.
func taxaWarning(path string, recs []inputs.Record) string {
	count := map[string]int{}
	for _, r := range recs {
		if r.Taxon != "" {
			count[r.Taxon]++
		}
	}
	if len(count) < 2 {
		return ""
	}
	names := make([]string, 0, len(count))
	for n := range count {
		names = append(names, n)
	}
	slices.SortFunc(names, func(a, b string) int {
		if count[a] != count[b] {
			return count[b] - count[a]
		}
		return strings.Compare(a, b)
	})
	var list []string
	for i, n := range names {
		if i == 5 {
			list = append(list, fmt.Sprintf("and %d more", len(names)-5))
			break
		}
		lines := "lines"
		if count[n] == 1 {
			lines = "line"
		}
		// A name in Latin-1 (a table not saved as UTF-8) is shown as
		// results.json holds it, not as raw bytes on the terminal.
		name := strings.ToValidUTF8(n, "\uFFFD")
		if len(name) > 60 {
			cut := 60
			for cut > 0 && !utf8.RuneStart(name[cut]) {
				cut--
			}
			name = name[:cut] + "..."
		}
		// A name holding a line break or another control character (a
		// quoted cell over two lines) is quoted with it escaped, so that
		// the warning stays one line on the terminal and in run.log.
		if strings.IndexFunc(name, unicode.IsControl) >= 0 {
			name = strconv.Quote(name)
		}
		list = append(list, fmt.Sprintf("%s on %d %s", name, count[n], lines))
	}
	return fmt.Sprintf("occurrences: the species column of %s names %d taxa (%s); areasweep scores every line of the table as one species (it has no species filter): "+
		"unless they are names of one species (its subspecies or synonyms), keep only the lines of the modelled species", path, len(names), strings.Join(list, ", "))
}

// zeroWarning names the records at longitude 0 and latitude 0 exactly
// (in degrees), the placeholder that exports and databases hold for a
// missing coordinate (a portal flags them as zero coordinates): they are
// scored wherever a model has data there. "" when there are none.
func zeroWarning(path string, recs []inputs.Record, geographic bool) string {
	if !geographic {
		return ""
	}
	var lines []string
	n := 0
	for _, r := range recs {
		if r.X == 0 && r.Y == 0 {
			if n++; n <= 10 {
				lines = append(lines, strconv.Itoa(r.Line))
			}
		}
	}
	if n == 0 {
		return ""
	}
	more, word := "", "lines"
	if n > 10 {
		more = fmt.Sprintf(" and %d more", n-10)
	} else if n == 1 {
		word = "line"
	}
	return fmt.Sprintf("occurrences: %d record(s) of %s lie at longitude 0, latitude 0 exactly (%s %s%s), where exports put records whose coordinates are missing; "+
		"they are used like any other (scored where the models have data there): delete them unless the species was recorded there", n, path, word, strings.Join(lines, ", "), more)
}

// readOccurrences reads the occurrence table. One given as a pipe (a
// shell's <(...), standard input from a pipe, a named pipe) can be read
// only once: it is read into memory here, parsed from there, and its
// checksum is taken of those bytes (s.occPiped, for checksums). Read
// again, the pipe would be empty (results.json recorded the SHA-256 of
// nothing) or, a named pipe, wait for a writer forever.
func (s *Study) readOccurrences(geographic bool) ([]inputs.Record, error) {
	path := s.o.Occurrences
	st, err := os.Stat(path)
	if err != nil || st.Mode()&os.ModeNamedPipe == 0 {
		return inputs.ReadOccurrences(path, geographic)
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("inputs: cannot open occurrence table: %w", err)
	}
	defer f.Close()
	// One byte past the limit, for the parser to refuse the table as too
	// large in its own words.
	data, err := io.ReadAll(io.LimitReader(f, inputs.MaxOccurrenceBytes+1))
	if err != nil {
		return nil, fmt.Errorf("occurrences: %s cannot be read (%w)", path, outdir.Cause(err))
	}
	sum := sha256.Sum256(data)
	s.occPiped = &InputFile{Path: path, Size: int64(len(data)), ModTime: st.ModTime().UnixNano(), SHA256: hex.EncodeToString(sum[:])}
	return inputs.ParseOccurrences(bytes.NewReader(data), path, geographic)
}

// readPoints reads the occurrence table, places each record on the grid,
// drops those outside the raster or on no-data, and thins duplicates.
func (s *Study) readPoints() error {
	lons, lats, recs, err := s.readLonLat()
	if err != nil {
		return err
	}
	s.placeOnGrid(lons, lats, recs)
	pointVals, pointValid, err := s.sampleFirst()
	if err != nil {
		return err
	}
	pl := s.choose(pointVals, pointValid)
	s.warnDropped(pl)
	s.countPoints()
	c := s.res.PointCounts
	if c.Test == 0 {
		return fault.BadInput(s.noTestPoint(s.first))
	}
	if c.Train == 0 {
		s.warn("no training point falls on a valid cell; training-presence thresholds, hulls, point buffers and ecoregion extents are skipped")
	}
	s.logf("occurrences: %d training and %d test points scored (%d thinned, %d outside the raster, %d on no-data)", c.Train, c.Test, c.Thinned, c.OutsideRaster, c.NoData)
	return nil
}

// placeOnGrid records each occurrence as a point with its cell (-1 and
// status outside_raster when it lies off the grid).
func (s *Study) placeOnGrid(lons, lats []float64, recs []inputs.Record) {
	g := s.grid
	n := len(recs)
	xs := make([]float64, n)
	ys := make([]float64, n)
	g.FromLonLat(lons, lats, xs, ys)
	s.points = make([]report.Point, n)
	s.lonlat = make([]extent.LonLat, n)
	s.cell = make([]int, n)
	for i, r := range recs {
		p := report.Point{ID: r.Line, Role: r.Role, Lon: round6(lons[i]), Lat: round6(lats[i]), Row: -1, Col: -1, Status: vocab.PointScored}
		s.lonlat[i] = extent.LonLat{Lon: lons[i], Lat: lats[i]}
		s.cell[i] = -1
		if col, row, ok := g.CellOf(xs[i], ys[i]); ok {
			p.Row, p.Col = row, col
			s.cell[i] = row*g.Width + col
		} else {
			p.Status = vocab.PointOutsideRaster
		}
		s.points[i] = p
	}
}

// sampleFirst opens the reference (first) model and reads its values and
// validity at the points' cells; for 'extents', which scores nothing, it
// also reads the valid cells. The raster is kept as s.first.
func (s *Study) sampleFirst() (vals []float64, valid []bool, err error) {
	o, g := s.o, s.grid
	// Points on no-data of the reference (first) model, from point reads.
	// A run learns the valid cells in its first scoring pass; 'extents',
	// which scores nothing, reads them once here.
	first := s.models[0]
	r, err := pass.Open(first.Path)
	if err != nil {
		return nil, nil, fault.BadInput(fmt.Errorf("model %s: %w", first.Name, err))
	}
	if !o.ExtentsOnly {
		// The blocks the points lie in are decoded here: kept (within
		// keptBlockBytes), they serve the first pass, which takes this
		// raster over (planModel).
		r.KeepBlocks(keptBlockBytes, nil)
	}
	pointVals, pointValid, err := r.Sample(g, s.cell)
	if err != nil {
		r.Close()
		return nil, nil, fault.BadInput(fmt.Errorf("model %s: %w", first.Name, err))
	}
	s.first = r
	if o.ExtentsOnly {
		bar := s.progress("reading "+s.models[0].Name+" (valid cells)", r.Blocks())
		s.valid, err = r.ReadValid(g, bar.update)
		bar.finish()
		if err != nil {
			return nil, nil, fault.BadInput(fmt.Errorf("model %s: %w", first.Name, err))
		}
	}
	return pointVals, pointValid, nil
}

// choose decides which records are scored (extent/place): none outside
// the raster or on no data, and one per cell and role unless --no-thin;
// it keeps the first model's values at the scored cells (vals, valid) so
// that its pass does not read them again.
func (s *Study) choose(pointVals []float64, pointValid []bool) place.Placement {
	o := s.o
	rr := place.Records{Cell: s.cell, Valid: pointValid, Role: make([]int, len(s.points))}
	for i, p := range s.points {
		if p.Role != vocab.RoleTrain {
			rr.Role[i] = place.Test
		}
	}
	pl := place.Place(rr, !o.NoThin)
	s.cell = pl.Cell
	// The first model's values at the scored cells (a cell not scored is
	// -1, which Sample reports as 0, not valid): its pass does not read
	// them again.
	s.firstVals, s.firstValid = pointVals, pointValid
	for i, c := range s.cell {
		if c < 0 {
			s.firstVals[i], s.firstValid[i] = 0, false
		}
	}
	return pl
}

// warnDropped marks the points not scored (no data, thinned) and warns
// about them and those outside the raster, naming their lines.
func (s *Study) warnDropped(pl place.Placement) {
	where := func(i int) string {
		p := s.points[i]
		return fmt.Sprintf("line %d (%.5f, %.5f)", p.ID, p.Lon, p.Lat)
	}
	var outside, nodata, pairs []string
	for _, i := range pl.Outside {
		outside = append(outside, where(i))
	}
	for _, i := range pl.NoData {
		s.points[i].Status = vocab.PointNoData
		nodata = append(nodata, where(i))
	}
	for _, d := range pl.Thinned {
		p := &s.points[d.Record]
		p.Status = vocab.PointThinned
		pairs = append(pairs, fmt.Sprintf("line %d shares a cell with line %d (%s)", p.ID, s.points[d.First].ID, p.Role))
	}
	if len(outside) > 0 {
		s.warn(fmt.Sprintf("%d occurrence(s) outside the raster, not scored: %s", len(outside), listSome(outside, 10)))
	}
	if len(nodata) > 0 {
		s.warn(fmt.Sprintf("%d occurrence(s) on no-data cells of %s, not scored: %s", len(nodata), s.models[0].Name, listSome(nodata, 10)))
	}
	if len(pairs) > 0 {
		s.logf("thinned: %s", listSome(pairs, 10))
		s.warn(fmt.Sprintf("%d duplicate presence(s) in an occupied cell thinned to one per cell and role (common practice; --no-thin keeps them)", len(pairs)))
	}
	s.warnSharedTestCells()
}

// warnSharedTestCells warns when scored test points share cells (only
// under --no-thin): every interval and test of the run counts each test
// point as an independent record, and points of one cell take the same
// value from every model and extent, so those intervals are too narrow
// (as narrow as zero with all points in one cell).
func (s *Study) warnSharedTestCells() {
	seen := map[int]bool{}
	scored, shared := 0, 0
	for i, p := range s.points {
		if p.Role == vocab.RoleTrain || s.cell[i] < 0 {
			continue
		}
		scored++
		if seen[s.cell[i]] {
			shared++
		}
		seen[s.cell[i]] = true
	}
	if shared == 0 {
		return
	}
	s.warn(fmt.Sprintf("%d of the %d test points scored lie in a cell with another test point (--no-thin keeps them: %d distinct cell%s): the bootstrap and paired intervals, the binomial tests and the cut-off of %d common test points count every point as an independent record, which points of one cell are not (each model gives them one value), so the intervals are too narrow and differences read as beyond noise too readily; for inference leave out --no-thin",
		shared, scored, len(seen), report.Plural(len(seen)), report.MinPairedPoints))
}

// countPoints fills Results.PointCounts from the points' statuses.
func (s *Study) countPoints() {
	c := &s.res.PointCounts
	for _, p := range s.points {
		switch p.Status {
		case vocab.PointScored:
			if p.Role == vocab.RoleTrain {
				c.Train++
			} else {
				c.Test++
			}
		case vocab.PointThinned:
			c.Thinned++
		case vocab.PointOutsideRaster:
			c.OutsideRaster++
		case vocab.PointNoData:
			c.NoData++
		}
	}
}

// noTestPoint explains why no test point can be scored, blaming the input
// that is at fault: a raster without data, points outside the raster (with
// a hint when degrees were given a projected --occurrences-crs, or the
// other way round), or test points on no-data cells.
func (s *Study) noTestPoint(r *pass.Raster) error {
	o, c := s.o, s.res.PointCounts
	if c.NoData > 0 {
		if any, known, err := r.HasData(explainCells); err == nil && known && !any {
			return fmt.Errorf("model %s: %w: every cell of %s is no data (the band's nodata value, NaN or infinite); check the file, or its nodata setting (gdalinfo)", s.models[0].Name, pass.ErrNoData, r.Path)
		}
	}
	msg := fmt.Sprintf("%s: no test point falls on a cell with data of %s (%s); nothing can be scored", o.Occurrences, s.models[0].Name, s.models[0].Path)
	if c.Train > 0 && c.OutsideRaster > 0 && c.NoData == 0 && c.Thinned == 0 {
		// The training points lie on the raster: only the test points
		// miss it (it was said of every point).
		test := roleOnly(s.points, vocab.RoleTest)
		return fmt.Errorf("%s: every test point (%d) lies outside the raster %s, while %d training point(s) lie on it; nothing can be scored; check the test records' coordinates, or hold out records that lie on the raster as role test%s", o.Occurrences, len(test), s.models[0].Path, c.Train, pointsBeside(test, s.grid))
	}
	if c.OutsideRaster > 0 && c.NoData == 0 && c.Thinned == 0 {
		msg = fmt.Sprintf("%s: every point lies outside the raster %s; nothing can be scored", o.Occurrences, s.models[0].Path)
		if o.OccurrencesCRS != "" && s.rawDegrees {
			msg += fmt.Sprintf(". The coordinates look like degrees but --occurrences-crs is %s: if they are longitude/latitude, leave --occurrences-crs out", o.OccurrencesCRS)
		} else if o.OccurrencesCRS == "" && !s.grid.Geographic {
			msg += "; the raster is projected: if the table holds projected coordinates, give their CRS with --occurrences-crs (e.g. EPSG:3035)"
		} else if n := swappedOnData(r, s.points, s.grid); s.grid.Geographic && 2*n >= len(s.points) && n > 0 {
			// Longitudes and latitudes both in range, in each other's
			// columns: the range check cannot see it.
			msg += fmt.Sprintf("; with longitude and latitude swapped, %d of the %d points would lie on cells with data: the table's longitude and latitude columns probably hold each other's values (rename or swap them)", n, len(s.points))
		} else {
			msg += "; check that the points and the raster cover the same area" + pointsBeside(s.points, s.grid)
		}
		return errors.New(msg)
	}
	return errors.New(msg + testFates(s.points, s.models[0].Name))
}

// testFates says where the test records lie when none falls on a cell
// with data while some point lies on a no-data cell (counts and lines, on
// no-data cells of the first model and off the raster) and what to do:
// the refusal said only that nothing could be scored.
func testFates(pts []report.Point, model string) string {
	var nodata, outside []string
	n := 0
	for _, p := range pts {
		if p.Role != vocab.RoleTest {
			continue
		}
		n++
		switch p.Status {
		case vocab.PointNoData:
			nodata = append(nodata, strconv.Itoa(p.ID))
		case vocab.PointOutsideRaster:
			outside = append(outside, strconv.Itoa(p.ID))
		}
	}
	var parts []string
	if len(nodata) > 0 {
		parts = append(parts, fmt.Sprintf("%d on no-data cells of %s (line%s %s)", len(nodata), model, report.Plural(len(nodata)), firstOf(nodata, 10)))
	}
	if len(outside) > 0 {
		parts = append(parts, fmt.Sprintf("%d outside the raster (line%s %s)", len(outside), report.Plural(len(outside)), firstOf(outside, 10)))
	}
	if len(parts) == 0 {
		return ""
	}
	return fmt.Sprintf(": of the %d test record%s, %s; hold out records that lie on cells with data as role test, or, if those cells should hold data, check the raster's nodata value (gdalinfo)", n, report.Plural(n), strings.Join(parts, " and "))
}

// roleOnly returns the points of role r.
func roleOnly(pts []report.Point, r vocab.Role) []report.Point {
	var out []report.Point
	for _, p := range pts {
		if p.Role == r {
			out = append(out, p)
		}
	}
	return out
}

// swappedOnGrid returns the cells (row*width+col) of the latitude-longitude
// grid g that the points would lie in with their longitude and latitude
// swapped (longitudes taken modulo 360 degrees), -1 for a point that
// would still miss g.
func swappedOnGrid(pts []report.Point, g *extent.Grid) []int {
	west := g.Bounds()[0]
	cells := make([]int, len(pts))
	for i, p := range pts {
		lon, lat := p.Lat, p.Lon
		lon = west + math.Mod(math.Mod(lon-west, 360)+360, 360)
		cells[i] = -1
		if col, row, ok := g.CellOf(lon, lat); ok {
			cells[i] = row*g.Width + col
		}
	}
	return cells
}

// swappedOnData counts the points that would lie on cells with data of r
// (on grid g) with their longitude and latitude swapped. Landing on the
// grid alone is no sign of swapped columns: points south of a grid that
// stops at 60 S (an Antarctic species on a land-only layout) swap onto
// it in numbers when their longitudes lie within +-90, but mostly onto
// the ocean's no data, where real occurrences swapped back would not be.
// A read error counts none (the message then gives no hint).
func swappedOnData(r *pass.Raster, pts []report.Point, g *extent.Grid) int {
	_, valid, err := r.Sample(g, swappedOnGrid(pts, g))
	if err != nil {
		return 0
	}
	n := 0
	for _, ok := range valid {
		if ok {
			n++
		}
	}
	return n
}

// pointsBeside returns, on a latitude-longitude grid, the ranges of the
// points' latitudes and longitudes and of the grid's, for a message about
// points that all miss it ("" on a projected grid, whose edges are not in
// degrees).
func pointsBeside(pts []report.Point, g *extent.Grid) string {
	if !g.Geographic || len(pts) == 0 {
		return ""
	}
	w, e := math.Inf(1), math.Inf(-1)
	s, n := w, e
	for _, p := range pts {
		w, e = min(w, p.Lon), max(e, p.Lon)
		s, n = min(s, p.Lat), max(n, p.Lat)
	}
	b := g.Bounds()
	return fmt.Sprintf(" (the points lie at latitudes %g to %g, longitudes %g to %g; the raster covers latitudes %g to %g, longitudes %g to %g)", s, n, w, e, round6(b[1]), round6(b[3]), round6(b[0]), round6(b[2]))
}

// explainCells is the most cells noTestPoint reads to tell a raster of
// no data from points that miss its data: 2^28 (268 million, a few
// seconds; our choice). Past it the message says only that no test point
// falls on data.
const explainCells = 1 << 28

func listSome(items []string, n int) string {
	if len(items) <= n {
		return strings.Join(items, "; ")
	}
	return strings.Join(items[:n], "; ") + fmt.Sprintf("; and %d more (see results.json points)", len(items)-n)
}

func round6(v float64) float64 { return math.Round(v*1e6) / 1e6 }

// checksums records the SHA-256 of every input file, in the order of
// the roles below, and of the other files GDAL or OGR may read with it
// (sidecarFiles: a raster's .prj, .aux.xml, .ovr, world file, a virtual
// raster's sources; a shapefile's .shx, .dbf, .prj, .cpg), each on its own
// (report.Input). The occurrence table is read by areasweep itself and has
// none. The inputs are hashed at once on up to GOMAXPROCS goroutines (the
// models are the large ones: a billion-cell study's two models are
// 6.4 GB); the records and the first error reported follow that order
// whatever finishes first.
func (s *Study) checksums() error {
	ins := s.inputFiles()
	recs := make([]report.Input, len(ins))
	files := make([][]InputFile, len(ins))
	errs := make([]error, len(ins))
	sem := make(chan struct{}, max(1, runtime.GOMAXPROCS(0)))
	var wg sync.WaitGroup
	for i, in := range ins {
		wg.Add(1)
		sem <- struct{}{}
		go func() {
			defer func() { <-sem; wg.Done() }()
			r := report.Input{Role: in.role, Path: s.recordedPath(in.path)}
			var f InputFile
			var err error
			if in.role == "occurrences" && s.occPiped != nil {
				f = *s.occPiped // a pipe, read once (readOccurrences)
			} else {
				f, err = fileSHA256(in.path)
			}
			if errs[i] = err; err != nil {
				return
			}
			r.SHA256, f.Role = f.SHA256, in.role
			files[i] = append(files[i], f)
			if in.kind >= 0 {
				for _, p := range sidecarFiles(in.path, in.kind) {
					sc, err := fileSHA256(p)
					if err != nil {
						errs[i] = fmt.Errorf("sidecar of %s: %w", in.path, err)
						return
					}
					sc.Role = in.role
					files[i] = append(files[i], sc)
					r.Sidecars = append(r.Sidecars, report.Sidecar{Path: s.recordedPath(p), SHA256: sc.SHA256})
				}
			}
			recs[i] = r
		}()
	}
	wg.Wait()
	for i, in := range ins {
		if errs[i] != nil {
			return fault.BadInput(fmt.Errorf("%s: %w", in.role, errs[i]))
		}
	}
	// Two models or nulls with the same bytes (one file given twice, or a
	// copy) score alike: most likely a path typed wrong.
	for j := range s.models {
		for i := range j {
			if recs[i].SHA256 == recs[j].SHA256 {
				s.warn(fmt.Sprintf("%s (%s) holds the same bytes as %s (%s), so the two score alike; check that each names the file you meant",
					strings.Replace(ins[j].role, ":", " ", 1), ins[j].path, strings.Replace(ins[i].role, ":", " ", 1), ins[i].path))
				break
			}
		}
	}
	for _, f := range files {
		for _, sc := range f[min(1, len(f)):] {
			s.sidecars = append(s.sidecars, sc.Path)
		}
	}
	s.res.Inputs = append(s.res.Inputs, recs...)
	if s.io.Inputs != nil {
		var all []InputFile
		for _, f := range files {
			all = append(all, f...)
		}
		s.io.Inputs(all)
	}
	return nil
}

// inputFile is an input file of the run, its role ("model:NAME",
// "occurrences", ...) and the kind of sidecars it may have
// (inputs.RasterSidecars, VectorSidecars, or -1 for none).
type inputFile struct {
	role, path string
	kind       int
}

// inputFiles lists the run's input files in the order they are recorded:
// the models and nulls, the occurrences, the region, the ecoregions, the
// extra layers.
func (s *Study) inputFiles() []inputFile {
	o := s.o
	var ins []inputFile
	for _, m := range s.models {
		role := "model:" + m.Name
		if m.Null {
			role = "null:" + m.Name
		}
		ins = append(ins, inputFile{role, m.Path, inputs.RasterSidecars})
	}
	ins = append(ins, inputFile{"occurrences", o.Occurrences, -1})
	if crs := o.CRSFile(); crs != "" {
		ins = append(ins, inputFile{"occurrences-crs", crs, -1})
	}
	ins = append(ins, inputFile{"region", o.Region, inputs.VectorSidecars})
	if o.Ecoregions != "" {
		ins = append(ins, inputFile{"ecoregions", o.Ecoregions, inputs.VectorSidecars})
	}
	for _, m := range o.Extra {
		name, path, _ := inputs.ParseNamedPath(m)
		ins = append(ins, inputFile{"extra:" + name, path, inputs.VectorSidecars})
	}
	return ins
}

// sidecarFiles are the files read with the input at path other than
// path itself, sorted: those GDAL lists for it when it opens it
// (extent.DatasetFiles: a virtual raster's sources, a shapefile's .dbf)
// and those found beside it by name (inputs.Sidecars: external overviews
// and masks, which GDAL lists only once it has read them, and an
// .aux.xml, which areasweep's GDAL never reads).
func sidecarFiles(path string, kind int) []string {
	files := inputs.Sidecars(path, kind)
	// On an error the list is empty: the stage that reads the file says
	// why it cannot be opened.
	listed, _ := extent.DatasetFiles(path, kind == inputs.VectorSidecars)
	// A file both name is hashed and recorded once, as Sidecars spells it
	// (GDAL may write it ./x or dir//x).
	seen := map[string]bool{filepath.Clean(path): true}
	for _, f := range files {
		seen[filepath.Clean(f)] = true
	}
	for _, f := range listed {
		if c := filepath.Clean(f); !seen[c] {
			seen[c] = true
			files = append(files, f)
		}
	}
	slices.Sort(files)
	return files
}

// sidecarsDigest is the one checksum of in's sidecar files that a shard
// records (metrics.InputChecksum.Sidecars), so that a merge refuses shards
// and inputs whose sidecars differ: the hex SHA-256 of the lines
// "SUFFIX SHA256\n", one per sidecar in in.Sidecars' order, SUFFIX being
// the sidecar's name less the input's name without its extension (".prj",
// ".tif.aux.xml"), so that the same files under another folder or name
// match, as the inputs' own checksums do. Empty when there are none.
func sidecarsDigest(in report.Input) string {
	if len(in.Sidecars) == 0 {
		return ""
	}
	stem := strings.TrimSuffix(filepath.Base(in.Path), filepath.Ext(in.Path))
	h := sha256.New()
	for _, sc := range in.Sidecars {
		fmt.Fprintf(h, "%s %s\n", strings.TrimPrefix(filepath.Base(sc.Path), stem), sc.SHA256)
	}
	return hex.EncodeToString(h.Sum(nil))
}

// fileSHA256 hashes the file at path. Its size and modification time
// are those of the opened file before it is read, so that a file changed
// while it is hashed has a later time than the one recorded with its
// checksum (IO.Inputs).
func fileSHA256(path string) (InputFile, error) {
	in := InputFile{Path: path}
	f, err := os.Open(path)
	if err != nil {
		return in, err
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return in, err
	}
	in.Size, in.ModTime = st.Size(), st.ModTime().UnixNano()
	h := sha256.New()
	// 1 MiB reads (io.Copy would use 32 KiB through the file's WriteTo):
	// about a tenth less CPU on a 3.2 GB model read from the page cache.
	if _, err := io.CopyBuffer(h, struct{ io.Reader }{f}, make([]byte, 1<<20)); err != nil {
		return in, fmt.Errorf("read %s: %w", path, err)
	}
	in.SHA256 = hex.EncodeToString(h.Sum(nil))
	return in, nil
}

// scoredPoints returns lon/lat and cells of the scored points of role.
func (s *Study) scoredPoints(role vocab.Role) ([]extent.LonLat, []int, []int) {
	var ll []extent.LonLat
	var cells, idx []int
	for i, p := range s.points {
		if p.Status == vocab.PointScored && p.Role == role {
			ll = append(ll, s.lonlat[i])
			cells = append(cells, s.cell[i])
			idx = append(idx, i)
		}
	}
	return ll, cells, idx
}
