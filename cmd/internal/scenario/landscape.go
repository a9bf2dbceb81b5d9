package scenario

import (
	"math"
	"math/rand/v2"
	"slices"
)

// The grid: EPSG:4326, north-up, 0.1 degree cells, in open South Pacific
// ocean so that the invented land mass overlaps nothing real.
const (
	gridWest  = -150.0
	gridEast  = -120.0
	gridNorth = -28.0
	gridSouth = -52.0
	cellSize  = 0.1
	gridCols  = 300
	gridRows  = 240
	noData    = -9999.0
)

// earthRadiusKm is the IUGG mean Earth radius R1 (Moritz 2000, Geodetic
// Reference System 1980, J. Geodesy 74:128-133), used for all distances here.
const earthRadiusKm = 6371.0088

// kmPerDegree is the length of one degree of a great circle on that sphere.
const kmPerDegree = earthRadiusKm * math.Pi / 180

func cellLon(c int) float64 { return gridWest + (float64(c)+0.5)*cellSize }
func cellLat(r int) float64 { return gridNorth - (float64(r)+0.5)*cellSize }

// haversineKm is the great-circle distance between two lon/lat points in degrees:
//
//	d = 2 R asin( sqrt( sin^2(dphi/2) + cos phi1 cos phi2 sin^2(dlambda/2) ) )
//
// (Sinnott 1984, Virtues of the haversine, Sky and Telescope 68:159).
func haversineKm(lon1, lat1, lon2, lat2 float64) float64 {
	p1, p2 := lat1*math.Pi/180, lat2*math.Pi/180
	dp := p2 - p1
	dl := (lon2 - lon1) * math.Pi / 180
	h := math.Sin(dp/2)*math.Sin(dp/2) + math.Cos(p1)*math.Cos(p2)*math.Sin(dl/2)*math.Sin(dl/2)
	return 2 * earthRadiusKm * math.Asin(math.Min(1, math.Sqrt(h)))
}

// landShare is the share of grid cells that are land.
const landShare = 0.48

// landscape holds every per-cell field of the invented world, row-major,
// row 0 at the north edge.
type landscape struct {
	land  []bool
	elev  []float64 // metres above sea level, 0 at sea
	coast []float64 // km to the nearest sea cell, 0 at sea
	temp  []float64 // mean annual temperature, degrees C
	moist []float64 // annual precipitation, mm
	nLand int
}

// noise coordinates: 100 cells (10 degrees) per lattice unit at octave 0.
func noiseXY(r, c int) (float64, float64) {
	return (float64(c) + 0.5) / 100, (float64(r) + 0.5) / 100
}

// newLandscape builds land, elevation, coast distance and climate.
//
// Height is fBm plus an elliptical falloff around a jittered grid centre,
//
//	h = 1.2 F(x, y) + (1 - d^2) + 1.8 max(0, F_I(3x, 3y) - 0.33),
//	d^2 = (dx/rx)^2 + (dy/ry)^2,  rx = 0.36 W,  ry = 0.38 H
//
// where the last term raises rare peaks of a second field into islands, and h
// is lowered further within 12 cells of the grid edge. Land is the landShare
// of cells with the highest h: one large irregular continent and a few small
// islands. Elevation is a low dome over the land plus mountain ridges along
// the zero lines of a third field F_M:
//
//	elev = 500 e + 1400 max(0, 1 - 2 |F_M|)^2 min(1, 5 e),  e = (h - sea) / (max h - sea)
func newLandscape(seed uint64) *landscape {
	n := gridRows * gridCols
	ls := &landscape{
		land: make([]bool, n), elev: make([]float64, n), coast: make([]float64, n),
		temp: make([]float64, n), moist: make([]float64, n),
	}
	rl := newRand(seed, streamLand)
	hn := newFBM(rl, 7)
	cx := gridCols * (0.5 + 0.06*(2*rl.Float64()-1))
	cy := gridRows * (0.5 + 0.06*(2*rl.Float64()-1))
	rx, ry := 0.36*gridCols, 0.38*gridRows
	in := newFBM(rl, 3)
	h := make([]float64, n)
	for r := range gridRows {
		for c := range gridCols {
			x, y := noiseXY(r, c)
			dx := (float64(c) + 0.5 - cx) / rx
			dy := (float64(r) + 0.5 - cy) / ry
			v := 1.2*hn.at(x, y) + 1.0*(1-dx*dx-dy*dy) + 1.8*math.Max(0, in.at(3*x, 3*y)-0.33)
			if e := min(c, gridCols-1-c, r, gridRows-1-r); e < 12 {
				v -= 0.25 * float64(12-e)
			}
			h[r*gridCols+c] = v
		}
	}
	sorted := slices.Clone(h)
	slices.Sort(sorted)
	sea := sorted[int((1-landShare)*float64(n))]
	top := sorted[n-1]
	mn := newFBM(rl, 5)
	for i, v := range h {
		if v > sea {
			ls.land[i] = true
			ls.nLand++
			x, y := noiseXY(i/gridCols, i%gridCols)
			e0 := (v - sea) / (top - sea)
			ridge := math.Max(0, 1-2*math.Abs(mn.at(x, y)))
			ls.elev[i] = 500*e0 + 1400*ridge*ridge*math.Min(1, 5*e0)
		}
	}
	ls.coastDistance()
	ls.climate(seed)
	return ls
}

// coastDistance fills coast with a two-pass chamfer distance (Borgefors 1986,
// Distance transformations in digital images, CVGIP 34:344-371) to the
// nearest sea cell, with each step weighted by its true length in km at the
// cell's latitude. Cells beyond the grid edge count as sea.
func (ls *landscape) coastDistance() {
	d := ls.coast
	for i, l := range ls.land {
		if l {
			d[i] = math.Inf(1)
		}
	}
	dy := cellSize * kmPerDegree
	step := func(r, dr, dc int) float64 {
		dx := cellSize * kmPerDegree * math.Cos(cellLat(r)*math.Pi/180)
		return math.Hypot(float64(dc)*dx, float64(dr)*dy)
	}
	get := func(r, c int) float64 {
		if r < 0 || r >= gridRows || c < 0 || c >= gridCols {
			return 0
		}
		return d[r*gridCols+c]
	}
	fwd := [][2]int{{-1, -1}, {-1, 0}, {-1, 1}, {0, -1}}
	for r := range gridRows {
		for c := range gridCols {
			i := r*gridCols + c
			if !ls.land[i] {
				continue
			}
			for _, o := range fwd {
				d[i] = math.Min(d[i], get(r+o[0], c+o[1])+step(r, o[0], o[1]))
			}
		}
	}
	for r := gridRows - 1; r >= 0; r-- {
		for c := gridCols - 1; c >= 0; c-- {
			i := r*gridCols + c
			if !ls.land[i] {
				continue
			}
			for _, o := range fwd {
				d[i] = math.Min(d[i], get(r-o[0], c-o[1])+step(r, o[0], o[1]))
			}
		}
	}
}

// climate fills temperature and moisture on land:
//
//	T = 25 - 0.6 (|lat| - 28) - 6.0 elev_km + 1.2 F_T(x, y)      degrees C
//	P = 1500 - 1300 w + 450 F_P(x, y) + 500 exp(-coast_km / 120)   mm, at least 60
//
// with w the east-west position in the grid (0 west, 1 east): the rain comes
// with westerly winds and dries out eastwards.
//
// The 6.0 C/km lapse rate is the standard-atmosphere value rounded
// (common practice); the rest is invented.
func (ls *landscape) climate(seed uint64) {
	tn := newFBM(newRand(seed, streamTemperature), 4)
	pn := newFBM(newRand(seed, streamMoisture), 6)
	for r := range gridRows {
		lat := cellLat(r)
		for c := range gridCols {
			i := r*gridCols + c
			if !ls.land[i] {
				continue
			}
			x, y := noiseXY(r, c)
			ls.temp[i] = 25 - 0.6*(math.Abs(lat)-28) - 6.0*ls.elev[i]/1000 + 1.2*tn.at(x, y)
			west := (cellLon(c) - gridWest) / (gridEast - gridWest)
			ls.moist[i] = math.Max(60, 1500-1300*west+450*pn.at(x+7, y+3)+500*math.Exp(-ls.coast[i]/120))
		}
	}
}

// niche is an axis-aligned Gaussian response in (temperature, moisture):
//
//	s(T, P) = exp( -((T - T0)/sT)^2 / 2 - ((P - P0)/sP)^2 / 2 )
type niche struct {
	t0, p0, st, sp float64
}

func (n niche) at(t, p float64) float64 {
	a := (t - n.t0) / n.st
	b := (p - n.p0) / n.sp
	return math.Exp(-0.5 * (a*a + b*b))
}

// Shape of the true niche before scaling: 1 C of temperature weighs as much
// as nicheMoistPerC mm of precipitation.
const (
	nicheMoistPerC = 110.0
	// nicheShare is the share of land where true suitability is at least 0.5.
	nicheShare = 0.20
)

// pickCore chooses the centre of the species' range: a random inland cell
// (at least 150 km from the coast) between 36 and 44 degrees south, or the
// most inland cell if there is none.
func (ls *landscape) pickCore(r *rand.Rand) int {
	var cand []int
	best := -1
	for i, l := range ls.land {
		if !l {
			continue
		}
		if best < 0 || ls.coast[i] > ls.coast[best] {
			best = i
		}
		lat := cellLat(i / gridCols)
		if ls.coast[i] >= 150 && lat <= -36 && lat >= -44 {
			cand = append(cand, i)
		}
	}
	if len(cand) == 0 {
		return best
	}
	return cand[r.IntN(len(cand))]
}

// trueNiche centres the niche on the environment of the core cell and scales
// its widths so that nicheShare of the land has s >= 1/2. With widths k and
// k nicheMoistPerC, s >= 1/2 exactly when
//
//	q = dT^2 + (dP / nicheMoistPerC)^2 <= 2 ln 2 k^2
//
// so k follows from the nicheShare quantile of q over land cells.
func (ls *landscape) trueNiche(core int) niche {
	t0, p0 := ls.temp[core], ls.moist[core]
	q := make([]float64, 0, ls.nLand)
	for i, l := range ls.land {
		if l {
			dt := ls.temp[i] - t0
			dp := (ls.moist[i] - p0) / nicheMoistPerC
			q = append(q, dt*dt+dp*dp)
		}
	}
	slices.Sort(q)
	k := math.Max(0.25, math.Sqrt(q[int(nicheShare*float64(len(q)))]/(2*math.Ln2)))
	return niche{t0: t0, p0: p0, st: k, sp: k * nicheMoistPerC}
}
