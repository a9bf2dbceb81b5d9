package pipeline

import (
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
			got := auxProblem(p)
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
