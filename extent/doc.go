// Package extent builds the family of alternative evaluation extents
// (backgrounds) of a study and puts each one on the model raster's grid
// as cell membership.
//
// A Grid is the model raster's north-up grid with true (ellipsoidal) cell
// areas. Build makes the Family from a Spec: the base study region, its
// geodesic buffers in and out, discs around occurrences, the occurrences'
// convex hull and its buffers, occupied ecoregion units (and those touching
// them), user polygons and the whole raster. Each member's cells are held
// as runs of columns per row (Family.Runs, Family.Span, Family.Has), built
// straight from the polygons' fill, the distance fields (one band of rows
// at a time) and the hull test: memory follows the members' boundaries,
// not the number of cells, and up to MaxMembers (1024) extents are held.
// Members nest in chains, so a scoring pass adds each cell once per chain
// (Family.Groups) rather than once per member.
//
// A cell belongs to a polygon when its centre is inside (even-odd rule over
// all rings; a centre exactly on an edge follows the half-open rule of Fill,
// so two polygons sharing an edge never share a cell). Buffer distances are
// geodesic on the WGS84 ellipsoid (PROJ's implementation of Karney 2013),
// measured from the cell centre to points cut along the boundary (the
// region's edges straight in the grid's CRS, the hull's ellipsoidal
// geodesics) close enough on the ground that a distance at a buffer's d
// is overestimated by at most bufferTol (1 m), whatever the grid and the
// projection (bufferStep, boundaryLonLat); point buffers are exact. So a
// cell whose centre lies farther than 1 m from a buffer's edge is always
// classified correctly.
//
// Every member is clipped to the valid cells of the reference model; a
// member with no cell is reported "empty" and one with exactly the cells of
// an earlier member "duplicate", and neither is silently dropped.
package extent
