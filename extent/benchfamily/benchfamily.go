// Package benchfamily is the family of extents of the whole-sweep
// benchmark (cmd/sweepbench) and of the extent builder's benchmark on its
// study (extent's BenchmarkBuildStudy), in one place so that both measure
// the same families. No GDAL.
package benchfamily

import "math"

// Buffers returns the region and point buffer distances (km) of a family
// of about n extents: base, whole raster and hull always, then, for the
// n - 3 others, region buffers that grow and shrink alternately in 20 km
// steps (20, -20, 40, -40, ...) alternating with point buffers every 25 km
// (25, 50, ...).
func Buffers(n int) (region, points []float64) {
	for i := 0; i < max(0, n-3); i++ {
		if i%2 == 0 {
			k := float64(i/2 + 1)
			d := 20 * math.Ceil(k/2)
			if int(k)%2 == 0 {
				d = -d
			}
			region = append(region, d)
		} else {
			points = append(points, 25*float64(i/2+1))
		}
	}
	return region, points
}
