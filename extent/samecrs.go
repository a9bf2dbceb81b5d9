package extent

import (
	"math"

	"github.com/airbusgeo/godal"
)

// sameCRS reports whether the grids' CRSs put the grid's cells at the same
// places. GDAL's IsSame already says so for most pairs; it says no when
// one CRS is written differently, as an ESRI .prj (an ASCII grid's
// "GCS_WGS_1984", longitude first) against EPSG:4326 in a GeoTIFF (whose
// authority axis order is latitude first, though GDAL reads both as
// longitude, latitude). Then the CRSs are the same when they are of one
// kind (geographic or projected), on one ellipsoid, and PROJ carries the
// corners, edge midpoints and centre of a's grid onto themselves within a
// millionth of a cell: PROJ finds a datum shift between datums it knows
// apart (ED50 and WGS84 move points by about 100 m), and any projection
// parameter that differs moves some of these points.
func sameCRS(a, b *Grid) bool {
	if a.srs.IsSame(b.srs) {
		return true
	}
	if a.srs.Geographic() != b.srs.Geographic() || a.srs.Projected() != b.srs.Projected() {
		return false
	}
	for _, f := range []func(*godal.SpatialRef) (float64, error){(*godal.SpatialRef).SemiMajor, (*godal.SpatialRef).SemiMinor} {
		x, err1 := f(a.srs)
		y, err2 := f(b.srs)
		if err1 != nil || err2 != nil || math.Abs(x-y) > 1e-6 {
			return false
		}
	}
	t, err := godal.NewTransform(a.srs, b.srs)
	if err != nil {
		return false
	}
	defer t.Close()
	gt := a.GeoTransform
	var xs, ys []float64
	for _, fx := range []float64{0, 0.5, 1} {
		for _, fy := range []float64{0, 0.5, 1} {
			xs = append(xs, gt[0]+fx*float64(a.Width)*gt[1])
			ys = append(ys, gt[3]+fy*float64(a.Height)*gt[5])
		}
	}
	tx, ty := append([]float64(nil), xs...), append([]float64(nil), ys...)
	ok := make([]bool, len(xs))
	if err := t.TransformEx(tx, ty, make([]float64, len(xs)), ok); err != nil {
		return false
	}
	tol := 1e-6 * math.Min(math.Abs(gt[1]), math.Abs(gt[5]))
	for i := range xs {
		dx := tx[i] - xs[i]
		if a.Geographic {
			dx = math.Remainder(dx, 360) // a grid east of 180 may come back a turn west
		}
		if !ok[i] || math.Abs(dx) > tol || math.Abs(ty[i]-ys[i]) > tol {
			return false
		}
	}
	return true
}
