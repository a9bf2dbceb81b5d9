package scenario

import (
	"math"
	"math/rand/v2"
	"slices"
	"sort"
)

// Sampling design of the invented survey.
const (
	nRecords     = 300   // distinct-cell presence records before duplicates
	nDuplicates  = 4     // extra records placed in a cell that already has one, same role
	trainShare   = 0.7   // share of the distinct records used for training
	biasKm       = 250.0 // scale of the survey effort kernel around the field station
	biasFloor    = 0.002 // survey effort far from the station, relative to the station
	regionGrowKm = 150.0 // buffer of the presence hull that makes the base region
	nUnits       = 40    // ecoregion units
	coarseFloor  = 0.25  // floor value of the coarse model
	coarseLevels = 10    // distinct values of the coarse model
	// coarseFloorShare is the share of land below which the coarse model's raw
	// score is cut to the floor (rounding adds a little more).
	coarseFloorShare = 0.45
)

// record is one presence: a point and whether it is for training or testing.
type record struct {
	lon, lat float64
	train    bool
	cell     int
}

// unit is one ecoregion polygon.
type unit struct {
	id   int
	name string
	ring []pt
}

// scene is everything a scenario seed determines.
type scene struct {
	ls      *landscape
	truth   []float64 // true suitability on land, 0 at sea
	real    niche
	core    int
	station pt
	records []record
	good    []float32 // good model, noData at sea
	coarse  []float32 // coarse model, noData at sea
	region  []pt
	units   []unit
}

func newScene(seed uint64) *scene {
	ls := newLandscape(seed)
	sc := &scene{ls: ls}
	rc := newRand(seed, streamCore)
	sc.core = ls.pickCore(rc)
	sc.real = ls.trueNiche(sc.core)
	sc.truth = make([]float64, len(ls.land))
	for i, l := range ls.land {
		if l {
			sc.truth[i] = sc.real.at(ls.temp[i], ls.moist[i])
		}
	}
	sc.station = sc.pickStation(rc)
	sc.sample(newRand(seed, streamSample))
	sc.goodModel(seed)
	sc.coarseModel(seed)
	ps := make([]pt, len(sc.records))
	for i, r := range sc.records {
		ps[i] = pt{r.lon, r.lat}
	}
	sc.region = clipBox(growHull(ps, regionGrowKm), gridWest, gridSouth, gridEast, gridNorth)
	sc.units = makeUnits(seed)
	return sc
}

// pickStation puts the field station up to 80 km from the core cell, on a
// land cell; after 50 misses it uses the core cell centre.
func (sc *scene) pickStation(r *rand.Rand) pt {
	clon, clat := cellLon(sc.core%gridCols), cellLat(sc.core/gridCols)
	for range 50 {
		d := 80 * math.Sqrt(r.Float64()) / kmPerDegree
		th := 2 * math.Pi * r.Float64()
		lon := clon + d*math.Cos(th)/math.Cos(clat*math.Pi/180)
		lat := clat + d*math.Sin(th)
		if i, ok := cellAt(lon, lat); ok && sc.ls.land[i] {
			return pt{lon, lat}
		}
	}
	return pt{clon, clat}
}

// cellAt returns the row-major index of the cell containing (lon, lat).
func cellAt(lon, lat float64) (int, bool) {
	c := int(math.Floor((lon - gridWest) / cellSize))
	r := int(math.Floor((gridNorth - lat) / cellSize))
	if c < 0 || c >= gridCols || r < 0 || r >= gridRows {
		return 0, false
	}
	return r*gridCols + c, true
}

// sample draws nRecords distinct land cells, each with probability
// proportional to
//
//	w = s_true * (biasFloor + exp(-(d_station / biasKm)^2)) * cos(lat)
//
// (suitability times survey effort times cell area), places a point uniformly
// in the inner 90% of each cell, splits them trainShare / rest at random, and
// then adds nDuplicates more points in the cells of randomly chosen records,
// with the same role.
func (sc *scene) sample(r *rand.Rand) {
	ls := sc.ls
	cum := make([]float64, len(ls.land))
	total := 0.0
	for i, l := range ls.land {
		if l {
			lon, lat := cellLon(i%gridCols), cellLat(i/gridCols)
			d := haversineKm(lon, lat, sc.station.x, sc.station.y)
			total += sc.truth[i] * (biasFloor + math.Exp(-(d/biasKm)*(d/biasKm))) * math.Cos(lat*math.Pi/180)
		}
		cum[i] = total
	}
	taken := make(map[int]bool, nRecords)
	cells := make([]int, 0, nRecords)
	for try := 0; len(cells) < nRecords && try < 100*nRecords && total > 0; try++ {
		u := r.Float64() * total
		// The first cell whose cumulative weight exceeds u has positive weight.
		i := sort.Search(len(cum), func(k int) bool { return cum[k] > u })
		if i == len(cum) || taken[i] {
			continue
		}
		taken[i] = true
		cells = append(cells, i)
	}
	perm := r.Perm(len(cells))
	nTrain := int(math.Round(trainShare * float64(len(cells))))
	sc.records = make([]record, 0, len(cells)+nDuplicates)
	for k, i := range cells {
		sc.records = append(sc.records, sc.pointIn(r, i, perm[k] < nTrain))
	}
	for _, k := range r.Perm(len(cells))[:min(nDuplicates, len(cells))] {
		src := sc.records[k]
		sc.records = append(sc.records, sc.pointIn(r, src.cell, src.train))
	}
	r.Shuffle(len(sc.records), func(a, b int) {
		sc.records[a], sc.records[b] = sc.records[b], sc.records[a]
	})
}

// pointIn returns a record at a uniform random point in the inner 90% of
// cell i, rounded to the 6 decimals the CSV carries.
func (sc *scene) pointIn(r *rand.Rand, i int, train bool) record {
	c, row := i%gridCols, i/gridCols
	lon := gridWest + (float64(c)+0.05+0.9*r.Float64())*cellSize
	lat := gridNorth - (float64(row)+0.05+0.9*r.Float64())*cellSize
	round6 := func(v float64) float64 { return math.Round(v*1e6) / 1e6 }
	return record{lon: round6(lon), lat: round6(lat), train: train, cell: i}
}

// goodModel is a smooth, slightly mis-specified copy of the truth: the niche
// centre shifted by 0.35 sT and -0.3 sP, widths scaled by 1.2 and 0.85, then
// a gentle smooth multiplicative and additive noise,
//
//	g = clamp( s'(T, P) (1 + 0.12 F1) + 0.04 (F2 + 1) / 2, 0, 1 )
func (sc *scene) goodModel(seed uint64) {
	r := newRand(seed, streamGood)
	f1, f2 := newFBM(r, 3), newFBM(r, 3)
	n := niche{
		t0: sc.real.t0 + 0.2*sc.real.st, p0: sc.real.p0 - 0.15*sc.real.sp,
		st: 1.15 * sc.real.st, sp: 1.1 * sc.real.sp,
	}
	ls := sc.ls
	sc.good = make([]float32, len(ls.land))
	for i, l := range ls.land {
		if !l {
			sc.good[i] = noData
			continue
		}
		x, y := noiseXY(i/gridCols, i%gridCols)
		v := n.at(ls.temp[i], ls.moist[i])*(1+0.12*f1.at(x, y)) + 0.04*(f2.at(x, y)+1)/2
		sc.good[i] = float32(math.Min(1, math.Max(0, v)))
	}
}

// coarseModel is a poor model: far too broad and off centre in both
// variables, especially moisture, with strong noise. Its raw score is stretched so that the
// coarseFloorShare quantile of land maps to coarseFloor and the maximum to 1;
// everything below that quantile becomes coarseFloor, and the rest is rounded
// to coarseLevels equal steps on [coarseFloor, 1]:
//
//	raw = exp(-(a^2 + b^2) / 2) (0.55 + 0.45 F),
//	a = (T - T0 - 0.8 sT) / (2.2 sT),  b = (P - P0 + 0.5 sP) / (3 sP)
//	v   = f + (1 - f) max(0, raw - q) / (max raw - q),   q = land quantile of raw
//	m   = f + (1 - f) round(9 (v - f) / (1 - f)) / 9,    f = coarseFloor
func (sc *scene) coarseModel(seed uint64) {
	f := newFBM(newRand(seed, streamCoarse), 4)
	ls := sc.ls
	raw := make([]float64, len(ls.land))
	vals := make([]float64, 0, ls.nLand)
	for i, l := range ls.land {
		if !l {
			continue
		}
		x, y := noiseXY(i/gridCols, i%gridCols)
		a := (ls.temp[i] - sc.real.t0 - 0.8*sc.real.st) / (2.2 * sc.real.st)
		b := (ls.moist[i] - sc.real.p0 + 0.5*sc.real.sp) / (3 * sc.real.sp)
		raw[i] = math.Exp(-0.5*(a*a+b*b)) * (0.55 + 0.45*f.at(x+11, y+5))
		vals = append(vals, raw[i])
	}
	slices.Sort(vals)
	q := vals[int(coarseFloorShare*float64(len(vals)))]
	top := vals[len(vals)-1]
	span := math.Max(top-q, 1e-12)
	steps := float64(coarseLevels - 1)
	sc.coarse = make([]float32, len(ls.land))
	for i, l := range ls.land {
		if !l {
			sc.coarse[i] = noData
			continue
		}
		v := coarseFloor + (1-coarseFloor)*math.Max(0, raw[i]-q)/span
		m := coarseFloor + (1-coarseFloor)*math.Round(steps*(v-coarseFloor)/(1-coarseFloor))/steps
		sc.coarse[i] = float32(m)
	}
}

// makeUnits scatters nUnits seeds over the grid by best-candidate sampling
// (Mitchell 1991, Spectrally optimal sampling for distribution ray tracing,
// SIGGRAPH 25(4):157-164; 12 candidates each, planar degrees), numbers them
// north to south, and cuts the grid box into their Voronoi cells.
func makeUnits(seed uint64) []unit {
	r := newRand(seed, streamUnits)
	seeds := make([]pt, 0, nUnits)
	for len(seeds) < nUnits {
		var best pt
		bestD := -1.0
		for range 12 {
			c := pt{gridWest + r.Float64()*(gridEast-gridWest), gridSouth + r.Float64()*(gridNorth-gridSouth)}
			d := math.Inf(1)
			for _, s := range seeds {
				d = math.Min(d, math.Hypot(c.x-s.x, c.y-s.y))
			}
			if d > bestD {
				best, bestD = c, d
			}
		}
		seeds = append(seeds, best)
	}
	slices.SortFunc(seeds, func(a, b pt) int {
		switch {
		case a.y > b.y:
			return -1
		case a.y < b.y:
			return 1
		case a.x < b.x:
			return -1
		case a.x > b.x:
			return 1
		}
		return 0
	})
	cells := voronoiCells(seeds, gridWest, gridSouth, gridEast, gridNorth)
	names := unitNames(newRand(seed, streamNames), len(seeds))
	units := make([]unit, len(seeds))
	for i, c := range cells {
		units[i] = unit{id: i + 1, name: names[i], ring: c}
	}
	return units
}
