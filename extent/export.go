package extent

import (
	"fmt"

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
	// Outlines are traced from the members' runs, members in parallel, and
	// written in family order.
	outlines := make([][]byte, len(f.Members))
	errs := make([]error, len(f.Members))
	parallelRows(len(f.Members), func() func(k int) {
		// Each worker traces in buffers of its own (outlineScratch); the
		// WKB is a copy of its own.
		sc := &outlineScratch{}
		return func(k int) {
			if f.Members[k].Status != vocab.StatusOK {
				return
			}
			outlines[k], errs[k] = wkb.Marshal(f.outline(k, sc))
		}
	})
	fields := []LayerField{{"id", godal.FTString}, {"kind", godal.FTString}, {"params", godal.FTString},
		{"status", godal.FTString}, {"cells", godal.FTInt64}, {"area_km2", godal.FTReal}}
	var feats []Feature
	for k, m := range f.Members {
		if m.Status != vocab.StatusOK {
			continue
		}
		if errs[k] != nil {
			return fmt.Errorf("extent: outline of %s: %w", m.ID, errs[k])
		}
		feats = append(feats, Feature{WKB: outlines[k], Values: []any{m.ID, string(m.Kind), m.Params, string(m.Status), m.Cells, m.AreaKm2}})
	}
	return WriteLayer(path, LayerName, f.Grid.srs, godal.GTMultiPolygon, fields, feats)
}

// GeoTIFFHoldsCRS reports whether a GeoTIFF that GDAL writes keeps a CRS
// for the grid (written to memory and read back; a CRS read back at all
// counts, since GeoTIFF keys may word an equivalent CRS differently). GDAL 3.6 cannot write
// some CRSs as GeoTIFF keys (Equal Earth, EPSG:8857) and puts them in an
// .aux.xml file instead, which areasweep never writes: WriteMembershipTIFF
// then writes the grid without its CRS.
func (g *Grid) GeoTIFFHoldsCRS() bool {
	Register()
	path := fmt.Sprintf("/vsimem/areasweep-crs-check-%p.tif", g)
	defer func() {
		godal.VSIUnlink(path)
		godal.VSIUnlink(path + ".aux.xml") // where GDAL's PAM is on (not in a run: Configure)
	}()
	ds, err := godal.Create(godal.GTiff, path, 1, godal.Byte, 1, 1)
	if err != nil {
		return false
	}
	if ds.SetGeoTransform(g.GeoTransform) != nil || ds.SetSpatialRef(g.srs) != nil {
		ds.Close()
		return false
	}
	if ds.Close() != nil {
		return false
	}
	back, err := godal.Open(path, godal.RasterOnly())
	if err != nil {
		return false
	}
	defer back.Close()
	sr := back.SpatialRef() // empty, not nil, when the file has none
	if sr == nil {
		return false
	}
	defer sr.Close()
	wkt, err := sr.WKT()
	return err == nil && wkt != ""
}

// membershipTIFFOptions are extents.tif's GeoTIFF creation options.
// BIGTIFF=IF_SAFER makes a BigTIFF (64-bit offsets) whenever the bands
// uncompressed exceed about 2 GB: GDAL's default (IF_NEEDED) never does
// for a compressed file, and a classic TIFF, whose offsets are 32-bit,
// fails once its compressed bands pass 4 GB, at the end of a long run (a
// billion-cell grid with tens of extents). Smaller files stay classic
// TIFFs, byte for byte as before.
var membershipTIFFOptions = []string{"COMPRESS=DEFLATE", "TILED=YES", "INTERLEAVE=BAND", "BIGTIFF=IF_SAFER"}

// WriteMembershipTIFF writes a GeoTIFF at path with one Byte band per member
// (1 inside, 0 outside; band description = member id), deflate-compressed,
// each band in its own tiles: written band by band into pixel-interleaved
// tiles, each band recompressed those of the bands before it (minutes on a
// global 2.5 arc-minute grid).
// A duplicate holds no runs of its own (setStatus empties them) but has the
// cells of the member it equals, so its band is that member's.
func (f *Family) WriteMembershipTIFF(path string) error {
	Register()
	g := f.Grid
	ds, err := godal.Create(godal.GTiff, path, len(f.Members), godal.Byte, g.Width, g.Height,
		godal.CreationOption(membershipTIFFOptions...))
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
		if err := f.fillMemberBand(band, f.cellsOf(k)); err != nil {
			ds.Close()
			return fmt.Errorf("extent: write %s: %w", path, err)
		}
	}
	return ds.Close()
}

// cellsOf returns the member whose runs hold member k's cells: k itself,
// or for a duplicate the earlier member it equals.
func (f *Family) cellsOf(k int) int {
	m := f.Members[k]
	if m.Status != vocab.StatusDuplicate {
		return k
	}
	for j := 0; j < k; j++ {
		if f.Members[j].ID == m.DuplicateOf {
			return j
		}
	}
	return k
}
