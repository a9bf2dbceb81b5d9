package pipeline

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"areasweep/cmd/internal/pass"
	"areasweep/extent"
)

// pamDataset is the part of a GDAL auxiliary metadata file (NAME.aux.xml,
// GDAL's "PAM" format) that changes how a raster's cells are read: the
// CRS, the georeferencing, and the first band's nodata value, scale and
// offset. Statistics, histograms and other metadata do not.
type pamDataset struct {
	XMLName      xml.Name  `xml:"PAMDataset"`
	SRS          *string   `xml:"SRS"`
	GeoTransform *string   `xml:"GeoTransform"`
	Bands        []pamBand `xml:"PAMRasterBand"`
}

type pamBand struct {
	Band   string  `xml:"band,attr"`
	NoData *string `xml:"NoDataValue"`
	Offset *string `xml:"Offset"`
	Scale  *string `xml:"Scale"`
}

// auxReport is what a raster's auxiliary file path+".aux.xml" holds that
// the run must tell (auxFile): what it sets that the raster does not
// (auxProblem, with declared), or, for a file that is not well-formed,
// what it appears to set (auxBroken).
type auxReport struct {
	what     string
	declared bool
	broken   string
}

// auxFile reads the raster's auxiliary file path+".aux.xml" once and
// reports it: nothing when there is none or it cannot be read, auxBroken's
// report when it is not well-formed, else auxProblem's.
func auxFile(path string) auxReport {
	data, err := os.ReadFile(path + ".aux.xml")
	if err != nil {
		return auxReport{}
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	pam, err := decodePAM(data)
	if err != nil {
		return auxReport{broken: auxBroken(data)}
	}
	what, declared := auxProblem(path, data, pam)
	return auxReport{what: what, declared: declared}
}

// auxProblem says what the raster's auxiliary file path+".aux.xml" (data,
// decoded as pam) sets
// that the raster itself does not, or "" when there is no such file or it
// sets nothing of the kind. areasweep turns GDAL's auxiliary files off (so
// that reading an input never writes one beside it; extent.Register), so
// a nodata value, scale, offset, CRS or georeferencing kept only there
// would be ignored: nodata cells scored as data, values unscaled, the
// grid without a CRS. A file that repeats what the raster holds (as
// desktop GIS tools write it, with statistics) is no problem. A file that
// is not GDAL's XML is left alone: GDAL would not read it either.
//
// declared reports that the file begins with an XML declaration
// (<?xml ...?>): GDAL (3.6) does not read such a file either (it takes
// the declaration for the document's root), so GDAL's tools would not
// apply what it sets until that line is removed. It is named all the
// same: the user meant the values it holds.
func auxProblem(path string, data []byte, pam pamDataset) (what string, declared bool) {
	declared = bytes.HasPrefix(bytes.TrimLeft(data, " \t\r\n"), []byte("<?xml"))
	ds, err := extent.OpenRaster(path)
	if err != nil {
		return "", false // OpenGrid reports it
	}
	defer ds.Close()
	var set []string
	if pam.SRS != nil && strings.TrimSpace(*pam.SRS) != "" && strings.TrimSpace(ds.Projection()) == "" {
		set = append(set, "the CRS")
	}
	if pam.GeoTransform != nil {
		if gt, ok := parseGeoTransform(*pam.GeoTransform); ok {
			own, err := ds.GeoTransform()
			if err != nil || !sameGeoTransform(gt, own) {
				set = append(set, "the georeferencing")
			}
		}
	}
	bands := ds.Bands()
	for _, b := range pam.Bands {
		if strings.TrimSpace(b.Band) != "1" || len(bands) == 0 {
			continue
		}
		if b.NoData != nil {
			if v, ok := parsePAMNumber(*b.NoData); ok {
				// Both as the cells are compared with them: a Float32
				// band's own -9999.99 is held as a float32.
				own, has := pass.NoData(bands[0])
				v := pass.NoDataAs(bands[0].Structure().DataType, v)
				if !has || !(own == v || math.IsNaN(own) && math.IsNaN(v)) {
					set = append(set, fmt.Sprintf("the nodata value %s", strings.TrimSpace(*b.NoData)))
				}
			}
		}
		st := bands[0].Structure()
		scale, offset := st.Scale, st.Offset
		if scale == 0 {
			scale = 1
		}
		if b.Scale != nil {
			if v, ok := parsePAMNumber(*b.Scale); ok && v != scale {
				set = append(set, fmt.Sprintf("the scale %s", strings.TrimSpace(*b.Scale)))
			}
		}
		if b.Offset != nil {
			if v, ok := parsePAMNumber(*b.Offset); ok && v != offset {
				set = append(set, fmt.Sprintf("the offset %s", strings.TrimSpace(*b.Offset)))
			}
		}
	}
	if len(set) == 0 {
		return "", false
	}
	what = set[0]
	if len(set) > 1 {
		what = strings.Join(set[:len(set)-1], ", ") + " and " + set[len(set)-1]
	}
	return what, declared
}

// decodePAM reads the data of an auxiliary file. A file that declares a
// one-byte encoding (ISO-8859-1, windows-1252, as some tools write) is
// read as ISO-8859-1: the elements and numbers read here are ASCII, the
// same bytes in all of them.
func decodePAM(data []byte) (pamDataset, error) {
	var pam pamDataset
	dec := xml.NewDecoder(bytes.NewReader(data))
	dec.CharsetReader = func(_ string, r io.Reader) (io.Reader, error) {
		b, err := io.ReadAll(r)
		if err != nil {
			return nil, err
		}
		u := make([]rune, len(b))
		for i, c := range b {
			u[i] = rune(c)
		}
		return strings.NewReader(string(u)), nil
	}
	err := dec.Decode(&pam)
	return pam, err
}

// pamTags are the elements of an auxiliary file that change how the
// cells are read (pamDataset's), as auxBroken looks for them.
var pamTags = []struct{ tag, what string }{
	{"<SRS", "a CRS"}, {"<GeoTransform", "a georeferencing"}, {"<NoDataValue", "a nodata value"}, {"<Scale", "a scale"}, {"<Offset", "an offset"},
}

// auxBroken says what the raster's auxiliary file path+".aux.xml" appears
// to set when GDAL cannot read it: a file that is not well-formed XML (cut
// short, edited by hand) but holds the elements of a CRS, georeferencing,
// nodata value, scale or offset. GDAL skips such a file (and areasweep
// reads none), so what it was meant to set is not applied; the file's
// other content (statistics) does not matter. "" when it names none of
// those elements. Which of
// them the raster holds already cannot be told from a broken file, so the
// run warns rather than refuses. data is the file, which auxFile found
// not well-formed.
func auxBroken(data []byte) string {
	var set []string
	for _, t := range pamTags {
		if bytes.Contains(data, []byte(t.tag+">")) || bytes.Contains(data, []byte(t.tag+" ")) {
			set = append(set, t.what)
		}
	}
	if len(set) == 0 {
		return ""
	}
	if len(set) > 1 {
		return strings.Join(set[:len(set)-1], ", ") + " and " + set[len(set)-1]
	}
	return set[0]
}

// parsePAMNumber reads a number as GDAL writes it in an auxiliary file
// ("-9999", "3.4e+38", "nan", "inf", "-inf").
func parsePAMNumber(s string) (float64, bool) {
	s = strings.TrimSpace(s)
	switch strings.ToLower(s) {
	case "nan":
		return math.NaN(), true
	case "inf", "+inf":
		return math.Inf(1), true
	case "-inf":
		return math.Inf(-1), true
	}
	v, err := strconv.ParseFloat(s, 64)
	return v, err == nil
}

// parseGeoTransform reads GDAL's "a, b, c, d, e, f" geotransform text.
func parseGeoTransform(s string) ([6]float64, bool) {
	var gt [6]float64
	parts := strings.Split(s, ",")
	if len(parts) != 6 {
		return gt, false
	}
	for i, p := range parts {
		v, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil {
			return gt, false
		}
		gt[i] = v
	}
	return gt, true
}

// sameGeoTransform reports whether two geotransforms place every cell at
// the same point up to the 16 significant digits GDAL writes them with:
// each coefficient equal within 1e-12 of the largest magnitude of its
// pair (our choice, far below any cell size).
func sameGeoTransform(a, b [6]float64) bool {
	for i := range a {
		if math.Abs(a[i]-b[i]) > 1e-12*math.Max(math.Abs(a[i]), math.Abs(b[i])) {
			return false
		}
	}
	return true
}
