package extent

import (
	"fmt"
	"os"

	"github.com/airbusgeo/godal"
	"github.com/paulmach/orb/encoding/wkb"

	"areasweep/extent/vocab"
)

// LayerName is the name of the GeoPackage layer that holds the family.
const LayerName = "extents"

func (f *Family) fillMemberBand(band godal.Band, k int) error {
	g := f.Grid
	row := make([]byte, g.Width)
	for r := 0; r < g.Height; r++ {
		clear(row)
		runs := f.cells[k].rows[r]
		for i := 0; i < len(runs); i += 2 {
			for c := runs[i]; c < runs[i+1]; c++ {
				row[c] = 1
			}
		}
		if err := band.Write(0, r, row, g.Width, 1); err != nil {
			return err
		}
	}
	return nil
}

// WriteGeoPackage writes every member with Status "ok" as one multipolygon
// feature of layer "extents" in a new GeoPackage at path, with attributes
// id, kind, params, status, cells and area_km2. path must not exist.
func (f *Family) WriteGeoPackage(path string) error {
	Register()
	if _, err := os.Stat(path); err == nil {
		return fmt.Errorf("extent: %s exists", path)
	}
	ds, err := godal.CreateVector(godal.GeoPackage, path)
	if err != nil {
		return fmt.Errorf("extent: create %s: %w", path, err)
	}
	fields := []*godal.FieldDefinition{
		godal.NewFieldDefinition("id", godal.FTString),
		godal.NewFieldDefinition("kind", godal.FTString),
		godal.NewFieldDefinition("params", godal.FTString),
		godal.NewFieldDefinition("status", godal.FTString),
		godal.NewFieldDefinition("cells", godal.FTInt64),
		godal.NewFieldDefinition("area_km2", godal.FTReal),
	}
	opts := make([]godal.CreateLayerOption, len(fields))
	for i, fd := range fields {
		opts[i] = fd
	}
	layer, err := ds.CreateLayer(LayerName, f.Grid.srs, godal.GTMultiPolygon, opts...)
	if err != nil {
		ds.Close()
		return fmt.Errorf("extent: create layer in %s: %w", path, err)
	}
	// Outlines are traced from the members' runs, members in parallel, and
	// written in family order.
	outlines := make([][]byte, len(f.Members))
	errs := make([]error, len(f.Members))
	parallelRows(len(f.Members), func() func(k int) {
		return func(k int) {
			if f.Members[k].Status != vocab.StatusOK {
				return
			}
			mp, err := f.Outline(k)
			if err == nil {
				outlines[k], err = wkb.Marshal(mp)
			}
			errs[k] = err
		}
	})
	for k, m := range f.Members {
		if m.Status != vocab.StatusOK {
			continue
		}
		b, err := outlines[k], errs[k]
		outlines[k] = nil
		if err != nil {
			ds.Close()
			return err
		}
		geom, err := godal.NewGeometryFromWKB(b, f.Grid.srs)
		if err != nil {
			ds.Close()
			return err
		}
		ft, err := layer.NewFeature(geom)
		geom.Close()
		if err != nil {
			ds.Close()
			return fmt.Errorf("extent: write %s to %s: %w", m.ID, path, err)
		}
		fl := ft.Fields()
		vals := map[string]interface{}{"id": m.ID, "kind": m.Kind, "params": m.Params, "status": string(m.Status), "cells": m.Cells, "area_km2": m.AreaKm2}
		for name, v := range vals {
			if err := ft.SetFieldValue(fl[name], v); err != nil {
				ds.Close()
				return fmt.Errorf("extent: set %s of %s: %w", name, m.ID, err)
			}
		}
		if err := layer.UpdateFeature(ft); err != nil {
			ds.Close()
			return fmt.Errorf("extent: write %s to %s: %w", m.ID, path, err)
		}
		ft.Close()
	}
	if err := ds.Close(); err != nil {
		return fmt.Errorf("extent: close %s: %w", path, err)
	}
	return nil
}

// WriteMembershipTIFF writes a GeoTIFF at path with one Byte band per member
// (1 inside, 0 outside; band description = member id), deflate-compressed.
func (f *Family) WriteMembershipTIFF(path string) error {
	Register()
	g := f.Grid
	ds, err := godal.Create(godal.GTiff, path, len(f.Members), godal.Byte, g.Width, g.Height,
		godal.CreationOption("COMPRESS=DEFLATE", "TILED=YES"))
	if err != nil {
		return fmt.Errorf("extent: create %s: %w", path, err)
	}
	if err := ds.SetGeoTransform(g.GeoTransform); err != nil {
		ds.Close()
		return err
	}
	if err := ds.SetSpatialRef(g.srs); err != nil {
		ds.Close()
		return err
	}
	for k, band := range ds.Bands() {
		if err := band.SetDescription(f.Members[k].ID); err != nil {
			ds.Close()
			return err
		}
		if err := f.fillMemberBand(band, k); err != nil {
			ds.Close()
			return fmt.Errorf("extent: write %s: %w", path, err)
		}
	}
	return ds.Close()
}
