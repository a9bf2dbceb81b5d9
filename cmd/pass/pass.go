package pass

import (
	"errors"
	"fmt"
	"math"
	"math/bits"
	"runtime"
	"runtime/debug"
	"sync"

	"github.com/airbusgeo/godal"

	"areasweep/extent"
	"areasweep/extent/gdalmsg"
	"areasweep/metrics"
)

// AreaUnitsPerKm2 converts km^2 to the integer area units the accumulators
// sum: 1/4096 m^2, so that the whole Earth (5.1e14 m^2) is 2.1e18 units,
// inside int64, while a 30 m cell keeps 7 significant digits.
const AreaUnitsPerKm2 = 1e6 * 4096

// InternalError is an error of the pass that is a bug, not a problem of
// the raster: a worker that failed, or sums that would not merge.
type InternalError struct{ Err error }

func (e *InternalError) Error() string { return e.Err.Error() }

// Unwrap returns the underlying error.
func (e *InternalError) Unwrap() error { return e.Err }

// Raster is an open single-band model raster.
type Raster struct {
	Path      string
	ds        *godal.Dataset
	band      godal.Band
	nodata    float64
	hasNodata bool
	// scale and offset turn stored values into model values
	// (value = stored*scale + offset), as the band declares.
	scale, offset float64
}

// Open opens the first band of the raster at path.
func Open(path string) (*Raster, error) {
	extent.Register()
	ds, err := godal.Open(path, godal.RasterOnly())
	if err != nil {
		return nil, fmt.Errorf("pass: %s is not a raster GDAL can read (%s)", path, gdalmsg.Cause(err.Error()))
	}
	bands := ds.Bands()
	if len(bands) == 0 {
		ds.Close()
		return nil, fmt.Errorf("pass: %s has no band", path)
	}
	r := &Raster{Path: path, ds: ds, band: bands[0]}
	r.nodata, r.hasNodata = r.band.NoData()
	st := r.band.Structure()
	r.scale, r.offset = st.Scale, st.Offset
	if r.scale == 0 {
		r.scale = 1
	}
	return r, nil
}

// decode turns stored values into model values in place: no-data, NaN and
// infinite values become NaN, the others are scaled and offset when the
// band declares a scale or offset.
func (r *Raster) decode(buf []float64) {
	plain := r.scale == 1 && r.offset == 0
	for i, v := range buf {
		switch {
		case math.IsNaN(v) || math.IsInf(v, 0) || r.hasNodata && v == r.nodata:
			buf[i] = math.NaN()
		case !plain:
			buf[i] = v*r.scale + r.offset
		}
	}
}

// Close closes the raster.
func (r *Raster) Close() error { return r.ds.Close() }

// valid reports whether a decoded value is one to score.
func (r *Raster) valid(v float64) bool { return !math.IsNaN(v) }

// Sample returns the raster's value at each cell index (row*width+col) and
// whether it is valid. Cells < 0 are reported invalid.
func (r *Raster) Sample(g *extent.Grid, cells []int) ([]float64, []bool, error) {
	vals := make([]float64, len(cells))
	ok := make([]bool, len(cells))
	buf := make([]float64, 1)
	for i, c := range cells {
		if c < 0 {
			continue
		}
		if err := r.band.Read(c%g.Width, c/g.Width, buf, 1, 1); err != nil {
			return nil, nil, fmt.Errorf("pass: %s: the cell at column %d row %d cannot be read (%s); the file may be truncated or damaged", r.Path, c%g.Width, c/g.Width, gdalmsg.Cause(err.Error()))
		}
		r.decode(buf)
		vals[i], ok[i] = buf[0], r.valid(buf[0])
	}
	return vals, ok, nil
}

// ErrNoData is returned when a raster has no cell with data (ExactRange
// finds no valid value).
var ErrNoData = errors.New("pass: the raster has no cell with data")

// block is one block of cells read from the raster.
type block struct {
	x0, y0, w, h int
	buf          []float64
}

// each reads every block in order and sends it to out, still encoded (the
// consumer decodes, so that decoding runs on the workers); buffers come
// back through free. It stops at the first read error.
func (r *Raster) each(out chan<- block, free chan []float64) error {
	defer close(out)
	st := r.band.Structure()
	for b, ok := st.FirstBlock(), true; ok; b, ok = b.Next() {
		buf := <-free
		buf = buf[:b.W*b.H]
		if err := r.band.Read(b.X0, b.Y0, buf, b.W, b.H); err != nil {
			return fmt.Errorf("pass: %s: the block at column %d row %d cannot be read (%s); the file may be truncated or damaged", r.Path, b.X0, b.Y0, gdalmsg.Cause(err.Error()))
		}
		out <- block{b.X0, b.Y0, b.W, b.H, buf}
	}
	return nil
}

// Blocks returns the number of blocks of the raster, for progress.
func (r *Raster) Blocks() int {
	st := r.band.Structure()
	nx := (st.SizeX + st.BlockSizeX - 1) / st.BlockSizeX
	ny := (st.SizeY + st.BlockSizeY - 1) / st.BlockSizeY
	return nx * ny
}

// ReadValid returns the bitset of cells with a valid value.
func (r *Raster) ReadValid(g *extent.Grid, progress func(done, total int)) (extent.Valid, error) {
	v := extent.NewValid(g.Cells())
	blocks := make(chan block)
	free := make(chan []float64, 1)
	st := r.band.Structure()
	free <- make([]float64, st.BlockSizeX*st.BlockSizeY)
	errc := make(chan error, 1)
	go func() { errc <- r.each(blocks, free) }()
	done, total := 0, r.Blocks()
	for b := range blocks {
		r.decode(b.buf)
		for y := 0; y < b.h; y++ {
			base := (b.y0+y)*g.Width + b.x0
			for x := 0; x < b.w; x++ {
				if r.valid(b.buf[y*b.w+x]) {
					v.Set(base + x)
				}
			}
		}
		free <- b.buf
		done++
		if progress != nil {
			progress(done, total)
		}
	}
	return v, <-errc
}

// Stats are whole-raster facts gathered in the pass.
type Stats struct {
	// Min and Max are the smallest and largest valid values on cells of any
	// extent.
	Min, Max float64
	// FloorArea is the area (units) of valid cells at value Min.
	FloorArea int64
	// Area is the area (units) of valid cells in any extent.
	Area int64
}

func (s *Stats) merge(o Stats) {
	if o.Area == 0 {
		return
	}
	if s.Area == 0 {
		*s = o
		return
	}
	switch {
	case o.Min < s.Min:
		s.Min, s.FloorArea = o.Min, o.FloorArea
	case o.Min == s.Min:
		s.FloorArea += o.FloorArea
	}
	s.Max = math.Max(s.Max, o.Max)
	s.Area += o.Area
}

// Preview asks the pass to copy a coarse sample of the raster: preview cell
// (pc,pr) takes the value of source cell (floor((pc+0.5)*W/PW),
// floor((pr+0.5)*H/PH)); NaN marks no data.
type Preview struct {
	Width, Height int
	Values        []float64
	srcCol        []int // source column -> preview column, -1 when not sampled
	srcRow        []int
}

// NewPreview makes a preview at most maxSide cells on its longer side.
func NewPreview(g *extent.Grid, maxSide int) *Preview {
	s := math.Max(float64(g.Width), float64(g.Height)) / float64(maxSide)
	if s < 1 {
		s = 1
	}
	pw := max(1, int(float64(g.Width)/s))
	ph := max(1, int(float64(g.Height)/s))
	p := &Preview{Width: pw, Height: ph, Values: make([]float64, pw*ph), srcCol: make([]int, g.Width), srcRow: make([]int, g.Height)}
	for i := range p.Values {
		p.Values[i] = math.NaN()
	}
	for i := range p.srcCol {
		p.srcCol[i] = -1
	}
	for i := range p.srcRow {
		p.srcRow[i] = -1
	}
	for pc := 0; pc < pw; pc++ {
		p.srcCol[int((float64(pc)+0.5)*float64(g.Width)/float64(pw))] = pc
	}
	for pr := 0; pr < ph; pr++ {
		p.srcRow[int((float64(pr)+0.5)*float64(g.Height)/float64(ph))] = pr
	}
	return p
}

// SourceCell returns the source cell index of preview cell i.
func (p *Preview) SourceCell(g *extent.Grid, i int) int {
	pc, pr := i%p.Width, i/p.Width
	return int((float64(pr)+0.5)*float64(g.Height)/float64(p.Height))*g.Width + int((float64(pc)+0.5)*float64(g.Width)/float64(p.Width))
}

// Options tune a scoring pass.
type Options struct {
	// Workers is the number of scoring goroutines; 0 means GOMAXPROCS.
	Workers int
	// Progress, when set, is called after each block from one goroutine.
	Progress func(done, total int)
	// Preview, when set, receives the coarse copy of this raster.
	Preview *Preview
	// Valid, when set, receives a bit for every valid cell that belongs to
	// some extent, so that the first model's pass also yields the cells the
	// family is clipped to (no separate read).
	Valid extent.Valid
	// Rows, when set, sees every row of every block once its values are
	// known: the row, its first column, the values (NaN: no value), the
	// cells' membership words and integer area weights. It is called from
	// the workers at once and must not keep the slices.
	Rows func(row, c0 int, vals []float64, mask []uint64, weights []int64)
}

// source is where a pass gets its blocks: a GDAL band (Raster) or a
// computed field (Virtual).
type source interface {
	// blockSize is the size of the blocks each sends.
	blockSize() (w, h int)
	// Blocks is the number of blocks, for progress.
	Blocks() int
	// each sends every block in order to out, taking buffers from free.
	each(out chan<- block, free chan []float64) error
	// prepare turns a block as each sent it into model values (NaN: no
	// value) on a worker; fam's mask tells which cells are scored.
	prepare(fam *extent.Family, b block)
}

func (r *Raster) blockSize() (int, int) {
	st := r.band.Structure()
	return st.BlockSizeX, st.BlockSizeY
}

func (r *Raster) prepare(_ *extent.Family, b block) { r.decode(b.buf) }

// Score streams the raster once and returns one accumulator per family
// member (nil for members with no bit) and the pass statistics.
func (r *Raster) Score(g *extent.Grid, fam *extent.Family, layout *metrics.Layout, opt Options) ([]*metrics.Accumulator, Stats, error) {
	return score(r, g, fam, layout, opt)
}

// score is one streaming pass over src (see Raster.Score).
func score(src source, g *extent.Grid, fam *extent.Family, layout *metrics.Layout, opt Options) ([]*metrics.Accumulator, Stats, error) {
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	n := len(fam.Members)
	bw, bh := src.blockSize()
	blocks := make(chan block, workers)
	free := make(chan []float64, 2*workers)
	for i := 0; i < 2*workers; i++ {
		free <- make([]float64, bw*bh)
	}
	type partial struct {
		accs  []*metrics.Accumulator
		stats Stats
		err   error
	}
	parts := make([]partial, workers)
	doneBlocks := make(chan struct{}, workers)
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		accs := make([]*metrics.Accumulator, n)
		for k := range accs {
			accs[k] = layout.NewAccumulator()
		}
		parts[w].accs = accs
		wg.Add(1)
		go func(p *partial) {
			defer wg.Done()
			defer func() {
				// A bug in a worker becomes an error of the pass instead of
				// killing the process; the remaining blocks are drained.
				if v := recover(); v != nil {
					p.err = fmt.Errorf("pass: internal error in a scoring worker: %v\n%s", v, debug.Stack())
					for b := range blocks {
						free <- b.buf
						doneBlocks <- struct{}{}
					}
				}
			}()
			areas := make([]float64, g.Width)
			weights := make([]int64, g.Width)
			// Statistics stay local until the end: workers' partials sit
			// side by side in memory and per-cell writes would share cache lines.
			var st Stats
			for b := range blocks {
				scoreBlock(src, g, fam, layout, b, p.accs, &st, areas, weights, opt)
				free <- b.buf
				doneBlocks <- struct{}{}
			}
			p.stats = st
		}(&parts[w])
	}
	errc := make(chan error, 1)
	go func() { errc <- src.each(blocks, free) }()
	go func() { wg.Wait(); close(doneBlocks) }()
	done, total := 0, src.Blocks()
	for range doneBlocks {
		done++
		if opt.Progress != nil {
			opt.Progress(done, total)
		}
	}
	if err := <-errc; err != nil {
		return nil, Stats{}, err
	}
	for w := range parts {
		if parts[w].err != nil {
			return nil, Stats{}, &InternalError{parts[w].err}
		}
	}
	out := parts[0].accs
	stats := parts[0].stats
	for w := 1; w < workers; w++ {
		for k := range out {
			if err := out[k].Merge(parts[w].accs[k]); err != nil {
				return nil, Stats{}, &InternalError{fmt.Errorf("pass: merging the workers' sums: %w", err)}
			}
		}
		stats.merge(parts[w].stats)
	}
	return out, stats, nil
}

// RowWeights fills weights (length c1-c0) with the integer area units of
// cells c0 <= c < c1 of row, the weights the pass adds, using areas as
// scratch, and returns both.
func RowWeights(g *extent.Grid, row, c0, c1 int, areas []float64, weights []int64) ([]float64, []int64) {
	areas = g.RowAreasRange(row, c0, c1, areas)
	if cap(weights) < len(areas) {
		weights = make([]int64, len(areas))
	}
	weights = weights[:len(areas)]
	lastA, lastW := -1.0, int64(0)
	for x, a := range areas {
		if a != lastA { // constant along rows of most grids
			lastA, lastW = a, int64(math.Round(a*AreaUnitsPerKm2))
		}
		weights[x] = lastW
	}
	return areas, weights
}

// scoreBlock adds every valid cell of b to the accumulators of its extents.
func scoreBlock(src source, g *extent.Grid, fam *extent.Family, layout *metrics.Layout, b block, accs []*metrics.Accumulator, st *Stats, areas []float64, weights []int64, opt Options) {
	pv, valid := opt.Preview, opt.Valid
	src.prepare(fam, b)
	for y := 0; y < b.h; y++ {
		row := b.y0 + y
		areas, weights = RowWeights(g, row, b.x0, b.x0+b.w, areas, weights)
		base := row*g.Width + b.x0
		vals := b.buf[y*b.w : (y+1)*b.w]
		mask := fam.Mask[base : base+b.w]
		if opt.Rows != nil {
			opt.Rows(row, b.x0, vals, mask, weights)
		}
		prow := -1
		if pv != nil {
			prow = pv.srcRow[row]
		}
		for x, v := range vals {
			if prow >= 0 {
				if pc := pv.srcCol[b.x0+x]; pc >= 0 && !math.IsNaN(v) {
					pv.Values[prow*pv.Width+pc] = v
				}
			}
			m := mask[x]
			if m == 0 || math.IsNaN(v) {
				continue
			}
			if valid != nil {
				valid.SetAtomic(base + x)
			}
			w := weights[x]
			switch {
			case st.Area == 0 || v < st.Min:
				if st.Area == 0 {
					st.Max = v
				}
				st.Min, st.FloorArea = v, w
			case v == st.Min:
				st.FloorArea += w
			}
			if v > st.Max {
				st.Max = v
			}
			st.Area += w
			bin, hist := layout.Locate(v)
			for m != 0 {
				k := bits.TrailingZeros64(m)
				m &= m - 1
				accs[k].AddLocated(bin, hist, v, w)
			}
		}
	}
}
