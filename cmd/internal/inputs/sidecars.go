package inputs

import (
	"os"
	"path/filepath"
	"slices"
	"strings"
)

// Sidecar kinds: which files beside an input Sidecars looks for.
const (
	// RasterSidecars are a raster's auxiliary files: PAM metadata, external
	// overviews and masks, an ESRI or ENVI header, a projection file and
	// world files.
	RasterSidecars = iota
	// VectorSidecars are a vector layer's other files: those of an ESRI
	// shapefile (.shx, .dbf, .prj, .cpg) when the input is a .shp; a
	// single-file format (GeoPackage, GeoJSON) has none.
	VectorSidecars
)

// Sidecars returns the files beside path that GDAL or OGR may read as part
// of the same dataset, those that exist as regular files, sorted by name.
// path itself is never among them.
//
// The candidates are formed the way GDAL names them, from the full name
// (model.tif.aux.xml, model.tif.ovr, model.tif.msk, model.img.hdr) or from
// the name without its extension (model.prj, model.hdr, model.tfw,
// model.wld; region.shx, region.dbf, region.prj, region.cpg). A world file
// takes the extension's first and last letters and a w (.tfw for .tif) or
// the extension and a w (.tifw). The new extensions take the case of the
// input's own (MODEL.TIF: MODEL.TFW), as GDAL tries them on a
// case-sensitive file system.
//
// The list is a superset of what GDAL reads for a given file (GDAL reads a
// world file only when the raster holds no georeferencing, and areasweep
// turns PAM off, so an .aux.xml is not read): recording a file that was not
// read costs nothing but a checksum, missing one that was read would let a
// change go unnoticed. It looks only at names (a few stat calls), not into
// the dataset.
func Sidecars(path string, kind int) []string {
	ext := filepath.Ext(path)
	stem := strings.TrimSuffix(path, ext)
	upper := ext != "" && ext == strings.ToUpper(ext) && ext != strings.ToLower(ext)
	c := func(s string) string {
		if upper {
			return strings.ToUpper(s)
		}
		return strings.ToLower(s)
	}
	var names []string
	switch kind {
	case RasterSidecars:
		names = append(names, path+c(".aux.xml"), path+c(".ovr"), path+c(".msk"), path+c(".hdr"),
			stem+c(".aux"), stem+c(".hdr"), stem+c(".prj"), stem+c(".wld"))
		if len(ext) >= 3 { // a dot and at least two letters
			names = append(names, stem+ext[:2]+ext[len(ext)-1:]+c("w"), path+c("w"))
		}
	case VectorSidecars:
		if strings.EqualFold(ext, ".shp") {
			names = append(names, stem+c(".shx"), stem+c(".dbf"), stem+c(".prj"), stem+c(".cpg"))
		}
	}
	var out []string
	for _, n := range names {
		if n == path || slices.Contains(out, n) {
			continue
		}
		if fi, err := os.Stat(n); err == nil && fi.Mode().IsRegular() {
			out = append(out, n)
		}
	}
	slices.Sort(out)
	return out
}
