// Package nullmodel computes the distance-only null model of a study: a
// virtual model whose value in each cell is minus the geodesic distance on
// the WGS84 ellipsoid from the cell's centre to the nearest training point,
//
//	null(cell) = - min_j s(centre(cell), train_j),
//
// the geographic-distance null that any model must beat and the measure of
// spatial sorting bias of
//
//	Hijmans, R. J. (2012). Cross-validation of species distribution models:
//	removing spatial sorting bias and calibration with a null model.
//	Ecology 93(3):679-688. doi:10.1890/11-0826.1
//
// Field computes the values block by block, without GDAL and without
// holding more than a block: it walks tiles of the block, finds the
// training points that can be nearest to any cell of a tile with one query
// of the geodesic nearest-site index (geodesy.Index, the one the buffers
// use) and the 1-Lipschitz bound of the distance function, and then measures
// each cell exactly against those points only. Every cell so gets its own
// exact distance (the value geodesy.Index.Nearest returns for its centre),
// which is what makes the scoring bins exact at the presence values: a
// point takes its cell's value, as it does on a model raster.
//
// A scoring pass needs less than each value: only the bins of the model's
// layout each cell falls in. On a latitude-longitude grid (NewLonLat),
// Bracket proves an interval around each cell's distance, first from the
// straight ECEF chord to the candidate sites alone (no geodesic: the
// chord bounds the geodesic from below, and Schur's comparison theorem
// with the ellipsoid's largest curvature bounds it from above), then, for
// cells that interval leaves undecided, from a few exact geodesics per
// block (a second-order bound along the geodesic from an anchor cell, with
// the Hessian comparison theorem for the ellipsoid), and measures a cell
// only when its interval still straddles a bin edge (of the exact bins or
// of the histogram's floor grid) or is wider than BracketTol; see Bracket.
//
// Background gathers, per extent, the area-weighted distribution of those
// distances, and SortingBias compares it with the test points' distances.
package nullmodel
