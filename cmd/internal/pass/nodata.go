package pass

import (
	"fmt"
	"math"

	"github.com/airbusgeo/godal"
)

// NoData returns the nodata value of band b as GDAL compares it with the
// band's cells, and whether b has one. On a Float32 band GDAL compares
// each cell with the nodata value rounded to float32 (its nodata mask,
// GDALNoDataMaskBand), and a format that keeps the value as text (an ESRI
// BIL's or ENVI file's header: NODATA -9999.99) hands it over unrounded,
// so that no float32 cell would equal it and every cell without data
// would be scored as data: the rounded value is returned (a value just
// beyond the float32 range, as -3.4028235e+38 is, as the nearest float32:
// the lowest float32 as most tools print it). Other types return the value
// as declared.
func NoData(b godal.Band) (float64, bool) {
	v, ok := b.NoData()
	if !ok {
		return v, ok
	}
	return NoDataAs(b.Structure().DataType, v), true
}

// NoDataAs returns the nodata value v as it is compared with the cells of
// a band of type dt (see NoData): rounded to float32 on a Float32 band,
// as declared on the others.
func NoDataAs(dt godal.DataType, v float64) float64 {
	if dt != godal.Float32 {
		return v
	}
	switch a := math.Abs(v); {
	case a <= math.MaxFloat32:
		v = float64(float32(v))
	case a < 1.001*math.MaxFloat32:
		v = math.Copysign(math.MaxFloat32, v)
	}
	return v
}

// NoDataText returns the raster's nodata value (NoData) as messages give
// it; "" when it has none. See NoDataWords.
func (r *Raster) NoDataText() string {
	if !r.hasNodata {
		return ""
	}
	return NoDataWords(r.dtype, r.nodata)
}

// NoDataWords returns the nodata value v of a band of type dt, as NoData
// returns it, in words for a message: the number GDAL holds (%g), and,
// where that is beyond what the band's cells can hold, that said plainly
// rather than printed as Go's "+Inf". A GeoTIFF's nodata value of 1e40 on
// a Float32 band is held by GDAL as infinity (gdalinfo: "NoData
// Value=inf"); a VRT's or an ENVI header's is held as 1e+40, which no
// float32 cell equals.
func NoDataWords(dt godal.DataType, v float64) string {
	switch {
	case math.IsInf(v, 0):
		sign := ""
		if v < 0 {
			sign = "-"
		}
		if dt == godal.Float32 {
			return fmt.Sprintf("%sinf (as GDAL holds it: a value written beyond the range of the Float32 band, such as %s1e40, is read as infinity; only infinite cells equal it)", sign, sign)
		}
		return sign + "inf"
	case dt == godal.Float32 && math.Abs(v) > math.MaxFloat32:
		return fmt.Sprintf("%g, beyond the range of the Float32 band (at most %g either side of 0), so that no cell equals it", v, float64(math.MaxFloat32))
	}
	return fmt.Sprintf("%g", v)
}

// noDataNear tells, on a Float32 or Float64 band, the cells that GDAL's
// nodata mask (GDALNoDataMaskBand) takes for the nodata value v without
// being equal to it: within GDAL's ARE_REAL_EQUAL,
//
//	|x - v| < eps * |x + v| * 2,   eps = FLT_EPSILON = 2^-23,
//
// computed in float32 on a Float32 band, in float64 on a Float64 one
// (integer bands compare exactly, as GDAL does). So a Float64 raster whose
// cells hold a float32's -9999.99 (-9999.990234375) under the declared
// nodata -9999.99 has those cells without data, as every GDAL tool sees
// them.
type noDataNear struct {
	// bits is 0 for an exact test only, 32 or 64 for ARE_REAL_EQUAL in
	// that precision.
	bits int
	// lo and hi bound every cell that matches (|x - v| < 4.8e-7 |v|, or
	// no bound when x + v may overflow): a cell outside them is told apart
	// by two comparisons.
	lo, hi float64
}

// flt32Eps is FLT_EPSILON, 2^-23.
const flt32Eps = 1.0 / (1 << 23)

func newNoDataNear(dt godal.DataType, v float64) noDataNear {
	var n noDataNear
	switch dt {
	case godal.Float32:
		n.bits = 32
	case godal.Float64:
		n.bits = 64
	}
	d := 1e-6 * math.Abs(v)
	if n.bits == 0 || !(d > 0) || math.IsInf(d, 0) {
		// Zero matches only itself (|x| < 2 eps |x| never holds), and an
		// infinite or NaN nodata value matches cells that are no data
		// anyway.
		return noDataNear{}
	}
	n.lo, n.hi = v-d, v+d
	if n.bits == 32 && math.Abs(v) > math.MaxFloat32/4 || n.bits == 64 && math.Abs(v) > math.MaxFloat64/4 {
		// x + v may overflow to an infinity, which makes GDAL's test hold
		// for every x of v's sign beyond it (-3.3e38 is no data under
		// the nodata value -3.4e38): no bounds, every cell is tested.
		n.lo, n.hi = math.Inf(-1), math.Inf(1)
	}
	return n
}

// match reports whether cell value x is within GDAL's tolerance of the
// nodata value v.
func (n noDataNear) match(x, v float64) bool {
	switch n.bits {
	case 32:
		a, b := float32(x), float32(v)
		d, s := a-b, a+b
		return float32(math.Abs(float64(d))) < float32(flt32Eps)*float32(math.Abs(float64(s)))*2
	case 64:
		return math.Abs(x-v) < flt32Eps*math.Abs(x+v)*2
	}
	return x == v
}
