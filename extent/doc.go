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
// measured from the cell centre to the boundary densified every cell side
// (a distance is then overestimated by less than half a side), so a cell
// whose centre lies farther than half a cell diagonal from a buffer's edge
// is always classified correctly.
//
// Every member is clipped to the valid cells of the reference model; a
// member with no cell is reported "empty" and one with exactly the cells of
// an earlier member "duplicate", and neither is silently dropped.
package extent
