package metrics

import "math"

// placements returns the placement of each presence (layout indices idx, in
// the given order) in the background:
//
//	V_i = ( W(< v_i) + W(= v_i)/2 ) / W_total
//
// with W the area (cell count when cells is true). The mean of the V_i is
// the full AUC (Hanley & McNeil 1982); V_i is the "placement value" of
// DeLong, DeLong & Clarke-Pearson (1988).
func (c *cumulative) placements(idx []int, cells bool) []float64 {
	lt, eq, total := c.ltA, c.eqA, c.w
	if cells {
		lt, eq, total = c.ltN, c.eqN, c.n
	}
	out := make([]float64, len(idx))
	t := float64(total)
	for i, j := range idx {
		out[i] = (float64(lt[j]) + float64(eq[j])/2) / t
	}
	return out
}

// PlacementSE is the standard error of an AUC from the placements v of its
// n test presences, the background being taken as the complete population
// of cells (it is not a sample, so only the test presences vary):
//
//	SE(AUC) = sqrt( sum_i (V_i - AUC)^2 / (n (n - 1)) )
//
// This is the presence component of DeLong's variance (DeLong, DeLong &
// Clarke-Pearson 1988, Biometrics 44:837-845). auc is the mean of v
// (passed so that the exactly summed AUC is used). It returns 0 for n < 2.
func PlacementSE(v []float64, auc float64) float64 {
	n := len(v)
	if n < 2 {
		return 0
	}
	var ss float64
	for _, x := range v {
		ss += (x - auc) * (x - auc)
	}
	return math.Sqrt(ss / (float64(n) * float64(n-1)))
}

// delongVariance is DeLong's variance of the unweighted AUC theta with the
// background cells treated as a sample, each counted once (DeLong, DeLong &
// Clarke-Pearson 1988, Biometrics 44:837-845):
//
//	V10_i = placement of presence i among the N cells (vu, unweighted)
//	V01_c = ( #{presences > y_c} + #{presences = y_c}/2 ) / m   for cell c
//	S10 = sum_i (V10_i - theta)^2 / (m - 1)
//	S01 = sum_c (V01_c - theta)^2 / (N - 1)
//	Var = S10/m + S01/N
//
// V01 is the same for every cell of one exact bin, so S01 is a sum over
// bins weighted by their cell counts: exact, with no cell held. It returns
// 0 when m < 2 or N < 2.
func (c *cumulative) delongVariance(p *presences, vu []float64, theta float64) float64 {
	m := p.n
	if m < 2 || c.n < 2 {
		return 0
	}
	var s10 float64
	for _, x := range vu {
		s10 += (x - theta) * (x - theta)
	}
	s10 /= float64(m - 1)

	// Presence counts per layout value, then at-or-above counts.
	nv := len(c.values)
	at := make([]int, nv)
	for g, j := range p.j {
		at[j] += p.count[g]
	}
	ge := make([]int, nv+1)
	for j := nv - 1; j >= 0; j-- {
		ge[j] = ge[j+1] + at[j]
	}
	mf := float64(m)
	var s01 float64
	add := func(cells int64, v01 float64) {
		if cells > 0 {
			d := v01 - theta
			s01 += float64(cells) * d * d
		}
	}
	prevLt := int64(0)
	for j := 0; j < nv; j++ {
		// Cells strictly between d_{j-1} and d_j (below d_0 for j = 0).
		add(c.ltN[j]-prevLt, float64(ge[j])/mf)
		add(c.eqN[j], (float64(ge[j+1])+float64(at[j])/2)/mf)
		prevLt = c.ltN[j] + c.eqN[j]
	}
	add(c.n-prevLt, 0) // cells above the largest layout value
	s01 /= float64(c.n - 1)
	return s10/mf + s01/float64(c.n)
}
