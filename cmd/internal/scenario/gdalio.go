package scenario

import (
	"errors"
	"fmt"
	"os"
	"slices"
	"strconv"
	"strings"

	"github.com/airbusgeo/godal"

	"areasweep/report/outfile"
)

// epsgWGS84 is the EPSG code of geographic WGS 84 (longitude/latitude).
const epsgWGS84 = 4326

// rasterOptions: tiled 64 x 64, deflate with the floating-point predictor.
var rasterOptions = []string{"TILED=YES", "BLOCKXSIZE=64", "BLOCKYSIZE=64", "COMPRESS=DEFLATE", "PREDICTOR=3"}

// writeRaster writes vals (row-major, gridRows x gridCols) as a one-band
// Float32 GeoTIFF on the scenario grid with nodata noData.
func writeRaster(path string, vals []float32, desc string) (err error) {
	if len(vals) != gridRows*gridCols {
		panic("scenario: writeRaster: wrong buffer size")
	}
	ds, err := godal.Create(godal.GTiff, path, 1, godal.Float32, gridCols, gridRows,
		godal.CreationOption(rasterOptions...))
	if err != nil {
		return fmt.Errorf("scenario: create raster %s: %w", path, err)
	}
	defer func() {
		if cerr := ds.Close(); cerr != nil && err == nil {
			err = fmt.Errorf("scenario: close raster %s: %w", path, cerr)
		}
	}()
	sr, err := godal.NewSpatialRefFromEPSG(epsgWGS84)
	if err != nil {
		return fmt.Errorf("scenario: EPSG:%d: %w", epsgWGS84, err)
	}
	defer sr.Close()
	if err := ds.SetSpatialRef(sr); err != nil {
		return fmt.Errorf("scenario: raster %s: set CRS: %w", path, err)
	}
	if err := ds.SetGeoTransform([6]float64{gridWest, cellSize, 0, gridNorth, 0, -cellSize}); err != nil {
		return fmt.Errorf("scenario: raster %s: set geotransform: %w", path, err)
	}
	band := ds.Bands()[0]
	if err := band.SetNoData(noData); err != nil {
		return fmt.Errorf("scenario: raster %s: set nodata: %w", path, err)
	}
	if err := band.SetDescription(desc); err != nil {
		return fmt.Errorf("scenario: raster %s: set description: %w", path, err)
	}
	if err := band.Write(0, 0, vals, gridCols, gridRows); err != nil {
		return fmt.Errorf("scenario: raster %s: write: %w", path, err)
	}
	return nil
}

// fieldDef is one attribute column of a vector layer.
type fieldDef struct {
	name string
	typ  godal.FieldType
}

// fieldValue is one attribute value: int for FTInt, string for FTString.
type fieldValue struct {
	name  string
	value any
}

// polyFeature is a polygon with one ring (lon/lat) and its attributes.
type polyFeature struct {
	ring   []pt
	values []fieldValue
}

// ringWKT renders a ring as a WKT polygon, counter-clockwise and closed, with
// shortest round-trip decimals.
func ringWKT(ring []pt) string {
	r := slices.Clone(ring)
	if polygonArea(r) < 0 {
		slices.Reverse(r)
	}
	r = append(r, r[0])
	var b strings.Builder
	b.WriteString("POLYGON ((")
	for i, p := range r {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(strconv.FormatFloat(p.x, 'f', -1, 64))
		b.WriteByte(' ')
		b.WriteString(strconv.FormatFloat(p.y, 'f', -1, 64))
	}
	b.WriteString("))")
	return b.String()
}

// writePolygons writes feats to a new GeoPackage at path, in one EPSG:4326
// polygon layer with the given attribute columns, mode 0666 less the
// umask, as every file areasweep writes (SQLite makes it 0644 less the
// umask).
func writePolygons(path, layer string, defs []fieldDef, feats []polyFeature) (err error) {
	ds, err := godal.CreateVector(godal.GeoPackage, path)
	if err != nil {
		return fmt.Errorf("scenario: create GeoPackage %s: %w", path, err)
	}
	defer func() {
		if cerr := ds.Close(); cerr != nil && err == nil {
			err = fmt.Errorf("scenario: close GeoPackage %s: %w", path, cerr)
		}
		if err == nil {
			if cerr := os.Chmod(path, 0o666&^outfile.Umask); cerr != nil {
				err = fmt.Errorf("scenario: %w", cerr)
			}
		}
	}()
	sr, err := godal.NewSpatialRefFromEPSG(epsgWGS84)
	if err != nil {
		return fmt.Errorf("scenario: EPSG:%d: %w", epsgWGS84, err)
	}
	defer sr.Close()
	opts := make([]godal.CreateLayerOption, len(defs))
	for i, d := range defs {
		opts[i] = godal.NewFieldDefinition(d.name, d.typ)
	}
	lyr, err := ds.CreateLayer(layer, sr, godal.GTPolygon, opts...)
	if err != nil {
		return fmt.Errorf("scenario: GeoPackage %s: create layer %q: %w", path, layer, err)
	}
	if err := ds.StartTransaction(); err != nil {
		return fmt.Errorf("scenario: GeoPackage %s: start transaction: %w", path, err)
	}
	for k, f := range feats {
		if err := writeFeature(lyr, sr, f); err != nil {
			_ = ds.RollbackTransaction()
			return fmt.Errorf("scenario: GeoPackage %s: layer %q feature %d: %w", path, layer, k, err)
		}
	}
	if err := ds.CommitTransaction(); err != nil {
		return fmt.Errorf("scenario: GeoPackage %s: commit: %w", path, err)
	}
	return nil
}

func writeFeature(lyr godal.Layer, sr *godal.SpatialRef, f polyFeature) error {
	if len(f.ring) < 3 {
		return errors.New("polygon has fewer than 3 vertices")
	}
	g, err := godal.NewGeometryFromWKT(ringWKT(f.ring), sr)
	if err != nil {
		return err
	}
	defer g.Close()
	feat, err := lyr.NewFeature(g)
	if err != nil {
		return err
	}
	defer feat.Close()
	fields := feat.Fields()
	for _, v := range f.values {
		fld, ok := fields[v.name]
		if !ok {
			return fmt.Errorf("no field %q", v.name)
		}
		if err := feat.SetFieldValue(fld, v.value); err != nil {
			return fmt.Errorf("field %q: %w", v.name, err)
		}
	}
	return lyr.UpdateFeature(feat)
}
