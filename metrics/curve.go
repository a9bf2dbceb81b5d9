package metrics

import "math"

// MaxCurvePoints is the largest number of vertices Scores.Curve holds.
const MaxCurvePoints = 400

// thinCurve keeps at most max vertices of pts (max >= 2): the first, the
// last, and at each of max-2 equally spaced marks along the curve's length
// (measured as |dx|+|dy|) the first vertex at or past the mark. Kept
// vertices are exact vertices of the input.
func thinCurve(pts []Point, max int) []Point {
	if len(pts) <= max {
		return pts
	}
	cum := make([]float64, len(pts))
	for i := 1; i < len(pts); i++ {
		cum[i] = cum[i-1] + math.Abs(pts[i].X-pts[i-1].X) + math.Abs(pts[i].Y-pts[i-1].Y)
	}
	total := cum[len(pts)-1]
	out := make([]Point, 0, max)
	out = append(out, pts[0])
	mark := 1
	last := 0
	for i := 1; i < len(pts)-1 && mark <= max-2; i++ {
		target := total * float64(mark) / float64(max-1)
		if cum[i] < target {
			continue
		}
		if i != last {
			out = append(out, pts[i])
			last = i
		}
		for mark <= max-2 && total*float64(mark)/float64(max-1) <= cum[i] {
			mark++
		}
	}
	return append(out, pts[len(pts)-1])
}
