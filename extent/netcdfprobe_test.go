package extent

import (
	"bytes"
	"encoding/binary"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/airbusgeo/godal"
)

// TestCheckNetCDFClassic: a classic netCDF file cut short is found from
// its header (GDAL read the missing cells as 0, scored as data: a model
// cut to a third of its bytes lost its whole-raster AUC from 0.89 to
// 0.45, without a word), the whole file is not, and files that are not
// classic netCDF (netCDF-4, GeoTIFF) are left to the drivers. The files
// are written by GDAL's netCDF driver in its CDF-1 (FORMAT=NC) and CDF-2
// (FORMAT=NC2) formats.
func TestCheckNetCDFClassic(t *testing.T) {
	Register()
	dir := t.TempDir()
	tif := filepath.Join(dir, "m.tif")
	ds, err := godal.Create(godal.GTiff, tif, 1, godal.Float32, 40, 30)
	if err != nil {
		t.Fatal(err)
	}
	ds.SetGeoTransform([6]float64{10, 0.25, 0, 48, 0, -0.25})
	ds.SetProjection(`GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433]]`)
	buf := make([]float32, 40*30)
	for i := range buf {
		buf[i] = float32(i%97) / 97
	}
	ds.Bands()[0].Write(0, 0, buf, 40, 30)
	ds.Close()
	for _, format := range []string{"NC", "NC2", "NC4"} {
		t.Run(format, func(t *testing.T) {
			src, err := godal.Open(tif)
			if err != nil {
				t.Fatal(err)
			}
			nc := filepath.Join(dir, format+".nc")
			out, err := src.Translate(nc, []string{"-of", "netCDF", "-co", "FORMAT=" + format})
			src.Close()
			if err != nil {
				t.Fatal(err)
			}
			out.Close()
			whole, err := os.ReadFile(nc)
			if err != nil {
				t.Fatal(err)
			}
			if err := CheckNetCDFClassic(nc); err != nil {
				t.Fatalf("the whole file: %v", err)
			}
			classic := format != "NC4"
			if need, ok := netCDFClassicNeed(bytes.NewReader(whole)); ok != classic || classic && (need > int64(len(whole)) || need < 4*40*30) {
				t.Errorf("header read as needing %d bytes (%v) of %d", need, ok, len(whole))
			}
			for _, keep := range []int{len(whole) - 1, len(whole) / 3} {
				cut := filepath.Join(dir, format+"-cut.nc")
				os.WriteFile(cut, whole[:keep], 0o644)
				err := CheckNetCDFClassic(cut)
				if classic && (err == nil || !strings.Contains(err.Error(), "cut short")) {
					t.Errorf("cut to %d of %d bytes: %v", keep, len(whole), err)
				}
				if !classic && err != nil {
					t.Errorf("netCDF-4 cut to %d bytes: %v, want nil (not classic: the drivers judge it)", keep, err)
				}
			}
		})
	}
	if err := CheckNetCDFClassic(tif); err != nil {
		t.Errorf("a GeoTIFF: %v", err)
	}
}

// TestNetCDFClassicRecords: the bytes a CDF-1 file with a record
// (unlimited) dimension needs, on a header written here by the
// specification's layout (NetCDF Users Guide, "The Classic Format
// Specification"): dimensions time (unlimited, 2 records) and x (3); a
// fixed variable b(x) of int (12 bytes) and a record variable a(time, x)
// of short (6 bytes a record, vsize 8 with its padding). b begins at H,
// the records at H + 12, so a's last values end at H + 12 + 8 + 6.
func TestNetCDFClassicRecords(t *testing.T) {
	var h bytes.Buffer
	u32 := func(v uint32) { binary.Write(&h, binary.BigEndian, v) }
	name := func(s string) {
		u32(uint32(len(s)))
		h.WriteString(s)
		for h.Len()%4 != 0 {
			h.WriteByte(0)
		}
	}
	h.WriteString("CDF\x01")
	u32(2) // numrecs
	u32(ncDimension)
	u32(2)
	name("time")
	u32(0)
	name("x")
	u32(3)
	u32(0) // no global attributes
	u32(0)
	u32(ncVariable)
	u32(2)
	headerLen := h.Len() + 2*(4+4+4+4+4+4+4+4) + 8 + 4 // two variables: name, ndims, dimids, attrs, type, vsize, begin
	name("b")
	u32(1)
	u32(1) // x
	u32(0)
	u32(0)
	u32(4) // int
	u32(12)
	u32(uint32(headerLen))
	name("a")
	u32(2)
	u32(0) // time
	u32(1) // x
	u32(0)
	u32(0)
	u32(3) // short
	u32(8)
	u32(uint32(headerLen + 12))
	if h.Len() != headerLen {
		t.Fatalf("header of %d bytes, reckoned %d", h.Len(), headerLen)
	}
	need, ok := netCDFClassicNeed(bytes.NewReader(h.Bytes()))
	if want := int64(headerLen + 12 + 8 + 6); !ok || need != want {
		t.Errorf("need %d (%v), want %d", need, ok, want)
	}
}
