// Package vocab is the typed vocabulary of the extent family and the
// occurrence records, shared by every package: extent kinds, extent
// statuses, point roles and point statuses. It imports nothing, so report
// (which must stay free of GDAL) and extent (which needs GDAL) use the
// same declarations instead of each spelling its own.
//
// The values are the strings written to results.json, extents.csv and
// scores.csv; changing one changes the output schema. A GDAL feature
// writer takes string(...) of them.
//
// Threshold rules are not here: they belong to the scoring engine and are
// metrics.ThresholdRule (metrics is free of GDAL too).
package vocab

// Kind is the kind of a member of the extent family.
type Kind string

// The extent kinds.
const (
	// KindBase is the study region as given.
	KindBase Kind = "base"
	// KindRegionBuffer is the base grown or shrunk by a geodesic distance.
	KindRegionBuffer Kind = "region_buffer"
	// KindPointBuffer is the union of geodesic discs around the points.
	KindPointBuffer Kind = "point_buffer"
	// KindHull is the training points' convex hull on the sphere, or a
	// geodesic buffer of it.
	KindHull Kind = "hull"
	// KindEcoregions is a union of ecoregion units that hold training
	// points (and variants: touching units, clipped to the base).
	KindEcoregions Kind = "ecoregions"
	// KindWholeRaster is every valid cell of the raster.
	KindWholeRaster Kind = "whole_raster"
	// KindUser is a polygon file the user added.
	KindUser Kind = "user"
)

// Kinds lists every extent kind, in the order of the list above.
var Kinds = []Kind{KindBase, KindRegionBuffer, KindPointBuffer, KindHull, KindEcoregions, KindWholeRaster, KindUser}

// Fixed member ids: the base region and the whole raster, whatever the
// settings.
const (
	BaseID        = "base"
	WholeRasterID = "whole_raster"
)

// Status says whether a member of the extent family is used: StatusOK, or
// StatusEmpty (no valid cell) or StatusDuplicate (the cells of an earlier
// member).
type Status string

// The extent statuses.
const (
	StatusOK        Status = "ok"
	StatusEmpty     Status = "empty"
	StatusDuplicate Status = "duplicate"
)

// Role says what an occurrence record is for: fitting the model
// (RoleTrain) or evaluating it (RoleTest).
type Role string

// The point roles.
const (
	RoleTrain Role = "train"
	RoleTest  Role = "test"
)

// PointStatus says what became of an occurrence record: scored, or left
// out because it fell outside the raster, on a no-data cell, or was
// thinned (another record of its role in the same cell came first).
type PointStatus string

// The point statuses.
const (
	PointScored        PointStatus = "scored"
	PointOutsideRaster PointStatus = "outside_raster"
	PointNoData        PointStatus = "nodata"
	PointThinned       PointStatus = "thinned"
)

// MaxProjected bounds the coordinates of projected inputs (occurrence
// records, raster corners, polygon vertices), in their CRS's unit: no
// place on the Earth lies farther from a projected CRS's origin (the
// Earth's circumference is 4e7 m, 4e10 mm), and PROJ takes time in
// proportion to a coordinate's size to bring it back to the globe (an
// easting of 1e20 metres kept a run transforming it for more than 10
// minutes). Inputs beyond it are refused.
const MaxProjected = 1e12
