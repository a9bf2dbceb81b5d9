package pipeline

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent"
)

// TestMain sets GDAL's configuration as the program does (auxiliary
// files off) before any test opens a raster.
func TestMain(m *testing.M) {
	extent.Configure()
	os.Exit(m.Run())
}

// tinyRaster writes a 4 x 3 Float32 GeoTIFF at dir/name: EPSG:4326 and a
// geotransform when geo, nodata -9999 when nodata, scale 1 and offset 0.
func tinyRaster(t *testing.T, dir, name string, geo, nodata bool) string {
	t.Helper()
	p := filepath.Join(dir, name)
	ds, err := godal.Create(godal.GTiff, p, 1, godal.Float32, 4, 3)
	if err != nil {
		t.Fatal(err)
	}
	if geo {
		if err := ds.SetGeoTransform([6]float64{10, 0.25, 0, 48, 0, -0.25}); err != nil {
			t.Fatal(err)
		}
		sr, err := godal.NewSpatialRefFromEPSG(4326)
		if err != nil {
			t.Fatal(err)
		}
		if err := ds.SetSpatialRef(sr); err != nil {
			t.Fatal(err)
		}
		sr.Close()
	}
	if nodata {
		if err := ds.Bands()[0].SetNoData(-9999); err != nil {
			t.Fatal(err)
		}
	}
	if err := ds.Close(); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestAuxProblem: what an .aux.xml beside a raster sets that the raster
// does not hold is named (it would be ignored: areasweep turns GDAL's
// auxiliary files off); what repeats the raster, statistics, and a file
// that is not GDAL's XML are no problem. The XML is GDAL's PAM format as
// GDAL 3.6 writes it (gdal_edit.py -a_nodata / -scale / -offset / -a_srs
// on a format that cannot hold them, and QGIS's statistics).
func TestAuxProblem(t *testing.T) {
	const wkt = `GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433],AUTHORITY["EPSG","4326"]]`
	stats := `<PAMRasterBand band="1"><Metadata><MDI key="STATISTICS_MAXIMUM">1</MDI><MDI key="STATISTICS_MINIMUM">0</MDI></Metadata></PAMRasterBand>`
	tests := []struct {
		name        string
		geo, nodata bool
		aux         string // "" writes no file
		want        []string
	}{
		{"no aux file", true, true, "", nil},
		{"statistics only", true, true, `<PAMDataset>` + stats + `</PAMDataset>`, nil},
		{"same nodata as the raster", true, true, `<PAMDataset><PAMRasterBand band="1"><NoDataValue>-9999</NoDataValue></PAMRasterBand></PAMDataset>`, nil},
		{"same nodata, other spelling", true, true, `<PAMDataset><PAMRasterBand band="1"><NoDataValue>-9.999e+03</NoDataValue></PAMRasterBand></PAMDataset>`, nil},
		{"nodata the raster lacks", true, false, `<PAMDataset><PAMRasterBand band="1"><NoDataValue>-9999</NoDataValue></PAMRasterBand></PAMDataset>`, []string{"the nodata value -9999"}},
		{"other nodata", true, true, `<PAMDataset><PAMRasterBand band="1"><NoDataValue>0</NoDataValue></PAMRasterBand></PAMDataset>`, []string{"the nodata value 0"}},
		{"NaN nodata the raster lacks", true, false, `<PAMDataset><PAMRasterBand band="1"><NoDataValue>nan</NoDataValue></PAMRasterBand></PAMDataset>`, []string{"the nodata value nan"}},
		{"scale and offset", true, true, `<PAMDataset><PAMRasterBand band="1"><Offset>0.5</Offset><Scale>0.01</Scale></PAMRasterBand></PAMDataset>`, []string{"the scale 0.01", "the offset 0.5"}},
		{"identity scale and offset", true, true, `<PAMDataset><PAMRasterBand band="1"><Offset>0</Offset><Scale>1</Scale></PAMRasterBand></PAMDataset>`, nil},
		{"another band's nodata", true, true, `<PAMDataset><PAMRasterBand band="2"><NoDataValue>0</NoDataValue></PAMRasterBand></PAMDataset>`, nil},
		{"CRS the raster lacks", false, true, `<PAMDataset><SRS dataAxisToSRSAxisMapping="2,1">` + wkt + `</SRS><GeoTransform>  1.0e+01,  2.5e-01,  0.0e+00,  4.8e+01,  0.0e+00, -2.5e-01</GeoTransform></PAMDataset>`, []string{"the CRS", "the georeferencing"}},
		{"CRS and georeferencing the raster has", true, true, `<PAMDataset><SRS>` + wkt + `</SRS><GeoTransform>1.0000000000000000e+01, 2.5000000000000000e-01, 0.0000000000000000e+00, 4.8000000000000000e+01, 0.0000000000000000e+00, -2.5000000000000000e-01</GeoTransform></PAMDataset>`, nil},
		{"other georeferencing", true, true, `<PAMDataset><GeoTransform>11, 0.25, 0, 48, 0, -0.25</GeoTransform></PAMDataset>`, []string{"the georeferencing"}},
		{"UTF-8 byte order mark", true, true, "\xef\xbb\xbf" + `<PAMDataset><PAMRasterBand band="1"><NoDataValue>0</NoDataValue></PAMRasterBand></PAMDataset>`, []string{"the nodata value 0"}},
		{"XML declaration in ISO-8859-1 (GDAL skips the file: named, declared)", true, true, `<?xml version="1.0" encoding="ISO-8859-1"?>` + "\n" + `<PAMDataset><PAMRasterBand band="1"><Metadata><MDI key="author">J` + "\xfc" + `rg</MDI></Metadata><NoDataValue>0</NoDataValue></PAMRasterBand></PAMDataset>`, []string{"the nodata value 0"}},
		{"XML declaration in UTF-8, same nodata with a decimal point", true, true, `<?xml version="1.0" encoding="UTF-8"?>` + "\n" + `<PAMDataset><PAMRasterBand band="1"><NoDataValue>-9999.0</NoDataValue></PAMRasterBand></PAMDataset>`, nil},
		{"not XML", true, false, "this is not xml <", nil},
		{"another XML document", true, false, `<VRTDataset><NoDataValue>0</NoDataValue></VRTDataset>`, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			p := tinyRaster(t, dir, "m.tif", tc.geo, tc.nodata)
			if tc.aux != "" {
				if err := os.WriteFile(p+".aux.xml", []byte(tc.aux), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			r := auxFile(p)
			got, declared := r.what, r.declared
			if want := strings.Contains(tc.aux, "<?xml") && len(tc.want) > 0; declared != want {
				t.Errorf("declared = %v, want %v", declared, want)
			}
			if len(tc.want) == 0 {
				if got != "" {
					t.Fatalf("auxProblem = %q, want none", got)
				}
				return
			}
			for _, w := range tc.want {
				if !strings.Contains(got, w) {
					t.Errorf("auxProblem = %q, want it to name %q", got, w)
				}
			}
		})
	}
}

// TestAuxProblemOtherRasters: an .aux.xml beside rasters other than a
// GeoTIFF with nodata -9999. An ESRI ASCII grid whose header holds the
// nodata value the .aux.xml repeats passes (QGIS writes such a file with
// statistics); one whose .aux.xml sets another is named. A raster with
// nodata NaN and an .aux.xml saying "nan" passes. An .aux.xml that is a
// folder is not read (nor would GDAL read it): no problem.
func TestAuxProblemOtherRasters(t *testing.T) {
	const asc = "ncols 4\nnrows 3\nxllcorner 10\nyllcorner 47.25\ncellsize 0.25\nNODATA_value -9999\n1 2 3 -9999\n4 5 6 7\n8 9 10 11\n"
	nodataAux := func(v string) string {
		return `<PAMDataset><PAMRasterBand band="1"><NoDataValue>` + v + `</NoDataValue></PAMRasterBand></PAMDataset>`
	}
	tests := []struct {
		name string
		// raster writes the raster into dir and returns its path.
		raster func(t *testing.T, dir string) string
		aux    string // "" a folder named like the file
		want   string // "" no problem
	}{
		{"ASCII grid, same nodata as its header", func(t *testing.T, dir string) string {
			p := filepath.Join(dir, "m.asc")
			os.WriteFile(p, []byte(asc), 0o644)
			return p
		}, nodataAux("-9999"), ""},
		{"ASCII grid, other nodata", func(t *testing.T, dir string) string {
			p := filepath.Join(dir, "m.asc")
			os.WriteFile(p, []byte(asc), 0o644)
			return p
		}, nodataAux("0"), "the nodata value 0"},
		{"nodata NaN, aux nan", func(t *testing.T, dir string) string {
			p := tinyRaster(t, dir, "m.tif", true, false)
			ds, err := godal.Open(p, godal.Update())
			if err != nil {
				t.Fatal(err)
			}
			if err := ds.Bands()[0].SetNoData(math.NaN()); err != nil {
				t.Fatal(err)
			}
			ds.Close()
			return p
		}, nodataAux("nan"), ""},
		{"aux file is a folder", func(t *testing.T, dir string) string {
			return tinyRaster(t, dir, "m.tif", true, false)
		}, "", ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := tc.raster(t, t.TempDir())
			var err error
			if tc.aux == "" {
				err = os.Mkdir(p+".aux.xml", 0o755)
			} else {
				err = os.WriteFile(p+".aux.xml", []byte(tc.aux), 0o644)
			}
			if err != nil {
				t.Fatal(err)
			}
			got := auxFile(p).what
			if tc.want == "" && got != "" || !strings.Contains(got, tc.want) {
				t.Errorf("auxProblem = %q, want %q", got, tc.want)
			}
		})
	}
}

// TestAuxBroken: an auxiliary file GDAL cannot read (not well-formed XML)
// is named by what it appears to set, so the run can warn that it is not
// applied; a readable one, one holding only statistics, or none at all
// gives "". (GDAL 3.6 skips a file that does not parse: checked by hand,
// gdalinfo on a GeoTIFF of nodata -9999 with the cut file below beside it
// shows -9999, and -1 with the whole file.)
func TestAuxBroken(t *testing.T) {
	good := `<PAMDataset><PAMRasterBand band="1"><NoDataValue>-1</NoDataValue></PAMRasterBand></PAMDataset>`
	for _, tc := range []struct {
		name, aux, want string
	}{
		{"none", "", ""},
		{"well-formed", good, ""},
		{"cut short after the nodata value", good[:len(good)-30], "a nodata value"},
		{"a CRS and a georeferencing, unclosed", `<PAMDataset><SRS>GEOGCS["WGS 84"]</SRS><GeoTransform>0, 1, 0, 0, 0, -1</GeoTransform>`, "a CRS and a georeferencing"},
		{"scale and offset with attributes, a stray ampersand", `<PAMDataset><PAMRasterBand band="1"><Scale >2</Scale><Offset >1</Offset> & </PAMRasterBand></PAMDataset>`, "a scale and an offset"},
		{"statistics only, cut short", `<PAMDataset><PAMRasterBand band="1"><Metadata><MDI key="STATISTICS_MAXIMUM">1</MDI>`, ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p := tinyRaster(t, t.TempDir(), "m.tif", true, false)
			if tc.aux != "" {
				if err := os.WriteFile(p+".aux.xml", []byte(tc.aux), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			if got := auxFile(p).broken; got != tc.want {
				t.Errorf("auxBroken = %q, want %q", got, tc.want)
			}
		})
	}
}
