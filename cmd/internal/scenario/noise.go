package scenario

import (
	"math"
	"math/rand/v2"
)

// Random streams. Each part of the scenario draws from its own PCG stream
// (same seed, different stream constant), so changing how many numbers one
// part consumes never shifts the numbers another part sees.
const (
	streamLand uint64 = iota + 0x5ce0
	streamMoisture
	streamTemperature
	streamCore
	streamSample
	streamGood
	streamCoarse
	streamUnits
	streamNames
)

// newRand returns the PCG generator of one stream for a scenario seed.
func newRand(seed, stream uint64) *rand.Rand {
	return rand.New(rand.NewPCG(seed, stream))
}

// latticeSize is the period of a noise lattice, in lattice units.
const latticeSize = 64

// lattice is a periodic square grid of independent uniform values in [-1, 1].
type lattice struct {
	v [latticeSize * latticeSize]float64
}

func newLattice(r *rand.Rand) *lattice {
	l := new(lattice)
	for i := range l.v {
		l.v[i] = 2*r.Float64() - 1
	}
	return l
}

// fade is the quintic smoothstep 6t^5 - 15t^4 + 10t^3, whose first and second
// derivatives vanish at 0 and 1, so the interpolated field has no visible
// lattice creases.
func fade(t float64) float64 { return t * t * t * (t*(t*6-15) + 10) }

func wrap(i int) int {
	i %= latticeSize
	if i < 0 {
		i += latticeSize
	}
	return i
}

// at is value noise: the lattice values at the four corners around (x, y),
// blended with fade weights.
func (l *lattice) at(x, y float64) float64 {
	x0, y0 := math.Floor(x), math.Floor(y)
	sx, sy := fade(x-x0), fade(y-y0)
	i0, j0 := wrap(int(x0)), wrap(int(y0))
	i1, j1 := wrap(i0+1), wrap(j0+1)
	a := l.v[j0*latticeSize+i0]
	b := l.v[j0*latticeSize+i1]
	c := l.v[j1*latticeSize+i0]
	d := l.v[j1*latticeSize+i1]
	top := a + (b-a)*sx
	bot := c + (d-c)*sx
	return top + (bot-top)*sy
}

// fbm is fractal Brownian motion built from value noise: octave k has
// frequency 2^k and amplitude 0.5^k, each on its own lattice and shifted by
// its own offset, and the sum is divided by the total amplitude:
//
//	F(x, y) = sum_k 0.5^k N_k(2^k x + a_k, 2^k y + b_k) / sum_k 0.5^k
//
// so F stays in [-1, 1].
type fbm struct {
	oct []*lattice
	off [][2]float64
}

func newFBM(r *rand.Rand, octaves int) *fbm {
	f := &fbm{oct: make([]*lattice, octaves), off: make([][2]float64, octaves)}
	for k := range octaves {
		f.oct[k] = newLattice(r)
		f.off[k] = [2]float64{r.Float64() * latticeSize, r.Float64() * latticeSize}
	}
	return f
}

func (f *fbm) at(x, y float64) float64 {
	sum, norm := 0.0, 0.0
	freq, amp := 1.0, 1.0
	for k, l := range f.oct {
		sum += amp * l.at(x*freq+f.off[k][0], y*freq+f.off[k][1])
		norm += amp
		freq *= 2
		amp *= 0.5
	}
	return sum / norm
}
