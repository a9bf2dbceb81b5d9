package extent

import (
	"errors"
	"fmt"
	"os"
	"strings"

	"github.com/airbusgeo/godal"

	"areasweep/extent/gdalmsg"
	"areasweep/report/outfile"
)

// LayerField is an attribute column of a GeoPackage layer.
type LayerField struct {
	Name string
	Type godal.FieldType
}

// Feature is one feature to write: its geometry as WKB, in the layer's
// CRS, and one value per field in field order (string, int, int64 or
// float64).
type Feature struct {
	WKB    []byte
	Values []any
}

// WriteLayer writes a new GeoPackage at path (which must not exist) with
// one layer, name, of geometry type gtype in the CRS srs, with the given
// fields and features in order. It is the program's one GeoPackage
// writer: the extents (WriteGeoPackage) and the omitted test points use
// it. The file's timestamp is the process's OGR_CURRENT_DATE (Configure
// fixes it, so the same features give the same bytes).
func WriteLayer(path, name string, srs *godal.SpatialRef, gtype godal.GeometryType, fields []LayerField, feats []Feature) error {
	Register()
	if _, err := os.Stat(path); err == nil {
		return fmt.Errorf("extent: %s exists", path)
	}
	ds, err := godal.CreateVector(godal.GeoPackage, path)
	if err != nil {
		return fmt.Errorf("extent: create %s: %w", path, err)
	}
	opts := make([]godal.CreateLayerOption, len(fields), len(fields)+1)
	for i, fd := range fields {
		opts[i] = godal.NewFieldDefinition(fd.Name, fd.Type)
	}
	// GDAL may report an error while creating a layer and create it all
	// the same: GDAL 3.6's GeoPackage driver cannot write some CRSs as
	// WKT1 (Equal Earth: "Unsupported conversion method"), says so and
	// stores them as WKT2. Such messages go to the run log; only a layer
	// GDAL did not create fails (godal then raises "unknown error"), with
	// what GDAL said.
	var said []string
	opts = append(opts, godal.ErrLogger(func(ec godal.ErrorCategory, code int, msg string) error {
		if msg == "unknown error" {
			return errors.New(strings.Join(append(said, "the layer was not created"), "; "))
		}
		said = append(said, msg)
		gdalmsg.Record(gdalmsg.Level(ec), code, msg)
		return nil
	}))
	layer, err := ds.CreateLayer(name, srs, gtype, opts...)
	if err != nil {
		ds.Close()
		return fmt.Errorf("extent: create layer %s in %s: %w", name, path, err)
	}
	// One transaction for all features: SQLite otherwise commits, and
	// syncs the file, after each one (50,000 points took 5 s).
	if err := ds.StartTransaction(); err != nil {
		ds.Close()
		return fmt.Errorf("extent: write %s: %w", path, err)
	}
	for n, f := range feats {
		if err := writeFeature(layer, srs, fields, f); err != nil {
			ds.Close()
			return fmt.Errorf("extent: write feature %d of %s to %s: %w", n+1, name, path, err)
		}
	}
	if err := ds.CommitTransaction(); err != nil {
		ds.Close()
		return fmt.Errorf("extent: write %s: %w", path, err)
	}
	if err := ds.Close(); err != nil {
		return fmt.Errorf("extent: close %s: %w", path, err)
	}
	// SQLite creates its files 0644 less the umask; areasweep's other
	// files are 0666 less the umask (0664 under umask 002, not 0644).
	if err := os.Chmod(path, 0o666&^outfile.Umask); err != nil {
		return fmt.Errorf("extent: %s: %w", path, err)
	}
	return nil
}

// writeFeature adds one feature to layer: its fields and geometry are set
// on a feature that is not yet in the layer, then inserted once
// (CreateFeature). Inserting the geometry first and updating the fields
// afterwards wrote every geometry twice, with its spatial index entry.
func writeFeature(layer godal.Layer, srs *godal.SpatialRef, fields []LayerField, f Feature) error {
	geom, err := godal.NewGeometryFromWKB(f.WKB, srs)
	if err != nil {
		return err
	}
	defer geom.Close()
	ft, err := layer.NewFeature(nil) // no geometry: not inserted
	if err != nil {
		return err
	}
	defer ft.Close()
	fl := ft.Fields()
	for i, fd := range fields {
		if err := ft.SetFieldValue(fl[fd.Name], f.Values[i]); err != nil {
			return fmt.Errorf("field %s: %w", fd.Name, err)
		}
	}
	if err := ft.SetGeometry(geom); err != nil {
		return err
	}
	return layer.CreateFeature(ft)
}
