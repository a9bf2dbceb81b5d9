package pass

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"runtime/debug"
	"slices"
	"strings"
	"sync"
	"sync/atomic"

	"github.com/airbusgeo/godal"

	"areasweep/extent"
	"areasweep/extent/gdalmsg"
	"areasweep/metrics"
)

// AreaUnitsPerKm2 converts km^2 to the integer area units the accumulators
// sum: 1/4096 m^2, so that the whole Earth (5.1e14 m^2) is 2.1e18 units,
// inside int64, while a 30 m cell keeps 7 significant digits. AreaUnits
// refines it on grids of small cells.
const AreaUnitsPerKm2 = 1e6 * 4096

// maxGridUnits bounds the units of a whole grid (the whole Earth's at
// AreaUnitsPerKm2, 2.1e18), inside int64.
const maxGridUnits = 2.1e18

// AreaUnits returns the integer area units per km^2 the passes over grid g
// use: AreaUnitsPerKm2, doubled while g's smallest cell holds fewer than
// 2^30 units (a rounding of up to 4.7e-10 of its area) and the whole grid
// stays within maxGridUnits. Cells of 0.26 km2 and more (about 512 m)
// keep AreaUnitsPerKm2; on a grid of 1 m cells AreaUnitsPerKm2 rounded a
// cell's area by up to 1.6e-4 of it, which moved an AUC by 3e-7. The
// units depend on the grid alone, so every worker and shard of a run uses
// the same.
func AreaUnits(g *extent.Grid) float64 {
	lo, hi := g.CellAreaRange()
	u := float64(AreaUnitsPerKm2)
	total := hi * float64(g.Width) * float64(g.Height)
	for lo > 0 && lo*u < 1<<30 && total*u*2 <= maxGridUnits {
		u *= 2
	}
	return u
}

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
	// near is set on Float32 and Float64 bands: cells within GDAL's
	// tolerance of nodata are no data too (nodata.go).
	near noDataNear
	// scale and offset turn stored values into model values
	// (value = stored*scale + offset), as the band declares.
	scale, offset float64
	// width, height and the block size lay out the pass's blocks: the
	// band's own blocks, or windows of them (readWindows) when they are
	// strips too large to read whole; fileW and fileH are the band's.
	width, height, blockW, blockH int
	fileW, fileH                  int
	// windowed: the blocks are windows of whole rows of the band's
	// strips, read through this handle alone (readMu) while GDAL's block
	// cache holds the strips they lie in (holdCache: held bytes, ended by
	// releases).
	windowed bool
	planes   int // the bands a block of the file holds (pixel interleaving)
	readMu   sync.Mutex
	held     int64
	releases []func()
	// narrow: every stored value is a float32 (the band's type is Byte,
	// Int8, UInt16, Int16 or Float32), so a kept block can be float32.
	narrow bool
	// dtype is the band's data type.
	dtype godal.DataType
	// signedByte: a Byte band that declares its bytes signed (a GeoTIFF
	// with SampleFormat signed, which GDAL before 3.7 opens as Byte with
	// PIXELTYPE=SIGNEDBYTE and reads as 0..255): decode reads 128..255 as
	// -128..-1, as GDAL 3.7 and later read the Int8 band.
	signedByte bool
	// open gives each worker of a pass its own Source.
	open func() (Source, error)
	// keep is the budget (bytes) of blocks Sample keeps for the next
	// Score, keepRows the rows that pass reads (KeepBlocks); kept holds
	// them until that Score takes them.
	keep     int64
	keepRows RowRange
	kept     *keptBlocks
	// reused is the number of blocks the last Score took from kept.
	reused int
}

// Source fills blocks of stored values for one worker of a pass. A GDAL
// band is one (each worker opens its own dataset handle); a value field
// computed on the fly (Virtual) is another.
type Source interface {
	// ReadBlock fills buf[:w*h], row by row, with the stored values of
	// the w x h cells whose top-left cell is column x0, row y0.
	ReadBlock(x0, y0, w, h int, buf []float64) error
	// Close releases the source.
	Close() error
}

// gdalSource reads band 1 of its own handle on a raster file, or, when
// mu is set, of the Raster's handle, which its sources share (ds is then
// nil: not theirs to close).
type gdalSource struct {
	path string
	ds   *godal.Dataset
	band godal.Band
	mu   *sync.Mutex
}

func openGDALSource(path string) (Source, error) {
	ds, err := extent.OpenRaster(path)
	if err != nil {
		return nil, fmt.Errorf("pass: %s is not a raster GDAL can read (%s)", path, gdalmsg.Cause(err.Error()))
	}
	bands := ds.Bands()
	if len(bands) == 0 {
		ds.Close()
		return nil, fmt.Errorf("pass: %s has no band", path)
	}
	return &gdalSource{path: path, ds: ds, band: bands[0]}, nil
}

func (s *gdalSource) ReadBlock(x0, y0, w, h int, buf []float64) error {
	return s.read(x0, y0, w, h, buf[:w*h])
}

// readBlock32 is ReadBlock into float32 values, for a band whose values
// are all float32 (Raster.narrow): the same values.
func (s *gdalSource) readBlock32(x0, y0, w, h int, buf []float32) error {
	return s.read(x0, y0, w, h, buf[:w*h])
}

func (s *gdalSource) read(x0, y0, w, h int, buf any) error {
	if s.mu != nil {
		s.mu.Lock()
		defer s.mu.Unlock()
	}
	if err := s.band.Read(x0, y0, buf, w, h); err != nil {
		return blockError(s.path, x0, y0, err)
	}
	return nil
}

func (s *gdalSource) Close() error {
	if s.ds == nil {
		return nil
	}
	return s.ds.Close()
}

// blockError words GDAL's error err reading the block at column x0, row
// y0 of the raster at path: a library that ran out of memory is a
// *MemoryError, a missing file it reads from (a virtual raster's source)
// is named as such, anything else is a file that may be truncated or
// damaged.
func blockError(path string, x0, y0 int, err error) error {
	cause := gdalmsg.Cause(err.Error())
	if gdalmsg.IsOutOfMemory(cause) {
		return &MemoryError{fmt.Errorf("%s: reading the block at column %d row %d, %s; free some memory, raise the process's limit of virtual memory (ulimit -v, a cluster job's h_vmem) or remove it, or use fewer --workers", path, x0, y0, cause)}
	}
	if strings.Contains(cause, "No such file or directory") {
		// A source of a virtual raster (or a sidecar GDAL reads the
		// values from) is gone: the file itself is not damaged.
		return fmt.Errorf("pass: %s: the block at column %d row %d cannot be read (%s): a file the raster reads its values from is missing; restore it, or rebuild %s from the files that exist", path, x0, y0, cause, path)
	}
	return fmt.Errorf("pass: %s: the block at column %d row %d cannot be read (%s); the file may be truncated or damaged", path, x0, y0, cause)
}

// MemoryError is an error of the pass caused by the machine's memory,
// not by the file: the command exits 1, not 2.
type MemoryError struct{ Err error }

func (e *MemoryError) Error() string { return e.Err.Error() }

// Unwrap returns the wrapped error.
func (e *MemoryError) Unwrap() error { return e.Err }

// NotInput marks the error as never the input's fault (fault.BadInput).
func (e *MemoryError) NotInput() {}

// Open opens the first band of the raster at path.
func Open(path string) (*Raster, error) {
	extent.Register()
	ds, err := extent.OpenRaster(path)
	if err != nil {
		return nil, fmt.Errorf("pass: %s is not a raster GDAL can read (%s)", path, gdalmsg.Cause(err.Error()))
	}
	bands := ds.Bands()
	if len(bands) == 0 {
		ds.Close()
		return nil, fmt.Errorf("pass: %s has no band", path)
	}
	if msg := BandProblem(bands[0]); msg != "" {
		ds.Close()
		return nil, fmt.Errorf("pass: %s %s", path, msg)
	}
	r := &Raster{Path: path, ds: ds, band: bands[0]}
	st := r.band.Structure()
	r.nodata, r.hasNodata = NoData(r.band)
	r.near = newNoDataNear(st.DataType, r.nodata)
	r.scale, r.offset = st.Scale, st.Offset
	r.width, r.height, r.fileW, r.fileH = st.SizeX, st.SizeY, st.BlockSizeX, st.BlockSizeY
	r.blockW, r.blockH, r.windowed = readWindows(r.width, r.fileW, r.fileH)
	r.planes = 1
	if ds.Metadata("INTERLEAVE", godal.Domain("IMAGE_STRUCTURE")) == "PIXEL" {
		// A block holds every band's values, which GDAL decodes and
		// caches together.
		r.planes = len(bands)
	}
	switch st.DataType {
	case godal.Byte, godal.Int8, godal.UInt16, godal.Int16, godal.Float32:
		r.narrow = true
	}
	r.signedByte = st.DataType == godal.Byte && r.band.Metadata("PIXELTYPE", godal.Domain("IMAGE_STRUCTURE")) == "SIGNEDBYTE"
	r.dtype = st.DataType
	r.open = func() (Source, error) { return openGDALSource(path) }
	if r.windowed {
		r.open = func() (Source, error) { return r.sharedSource(), nil }
	}
	return r, nil
}

// BandProblem says why band b cannot be scored as it declares its values,
// or "" when it can: a band of complex numbers (a model is one real value
// per cell; GDAL would hand over the real part alone), of a type areasweep
// does not read (64-bit integers), or a declared scale
// of 0 (every cell would be the offset) or a scale or offset that is not a
// finite number. The text follows the raster's path in a message.
func BandProblem(b godal.Band) string {
	st := b.Structure()
	switch st.DataType {
	case godal.CInt16, godal.CInt32, godal.CFloat32, godal.CFloat64:
		return fmt.Sprintf("holds complex numbers (%s); a model must hold one real value per cell: write the values you mean into a real raster (gdal_translate -ot Float32 keeps the real part alone)", st.DataType)
	case godal.Byte, godal.Int8, godal.UInt16, godal.Int16, godal.UInt32, godal.Int32, godal.Float32, godal.Float64:
	default:
		// GDAL 3.5's 64-bit integers (Int64, UInt64), which the GDAL
		// binding areasweep reads blocks with does not know: it stopped
		// the run with an internal error (exit 3).
		return fmt.Sprintf("holds values of type %s, which areasweep does not read; convert it to 64-bit reals (gdal_translate -ot Float64 IN OUT, exact for whole numbers up to 2^53) or, when its values fit, to 32-bit integers (-ot Int32)", st.DataType)
	}
	switch {
	case st.Scale == 0:
		return fmt.Sprintf("declares a scale of 0 for its band, so every cell would read as its offset (%g); give the raster the scale it should have (e.g. gdal_translate -a_scale 1 IN OUT)", st.Offset)
	case math.IsNaN(st.Scale) || math.IsInf(st.Scale, 0):
		return fmt.Sprintf("declares a scale that is %s for its band; give the raster a finite scale (e.g. gdal_translate -a_scale 1 IN OUT)", notFinite(st.Scale))
	case math.IsNaN(st.Offset) || math.IsInf(st.Offset, 0):
		return fmt.Sprintf("declares an offset that is %s for its band; give the raster a finite offset (e.g. gdal_translate -a_offset 0 IN OUT)", notFinite(st.Offset))
	}
	return ""
}

// notFinite words a NaN or infinite number for a message.
func notFinite(v float64) string {
	switch {
	case math.IsInf(v, 1):
		return "infinite"
	case math.IsInf(v, -1):
		return "minus infinity"
	}
	return "not a number (NaN)"
}

// scaleOverflow is the error of a stored value v that the band's scale
// and offset take beyond the largest float64 (about 1.8e308): a model
// value no score can rank.
func (r *Raster) scaleOverflow(v float64) error {
	return fmt.Errorf("pass: %s declares a scale of %g and an offset of %g for its band, which take its stored value %g beyond the largest number a float64 holds (about 1.8e308); give the raster the scale and offset it should have (e.g. gdal_translate -a_scale 1 -a_offset 0 IN OUT)",
		r.Path, r.scale, r.offset, v)
}

// decode turns stored values into model values in place: a signed Byte
// band's bytes are read as signed (signedByte), no-data, NaN and
// infinite values become NaN, the others are scaled and offset when the
// band declares a scale or offset. A zero is always +0: -0 and +0 are one
// value, and keeping both would let the order in which blocks reach a
// worker decide which one a minimum or maximum reports. A finite stored
// value that the scale and offset make infinite is an error
// (scaleOverflow).
func (r *Raster) decode(buf []float64) error {
	if r.signedByte {
		for i, v := range buf {
			if v > 127 {
				buf[i] = v - 256
			}
		}
	}
	nan := math.NaN()
	if r.scale == 1 && r.offset == 0 {
		nodata, has, near := r.nodata, r.hasNodata, r.near
		for i, v := range buf {
			switch {
			case v-v != 0 || has && (v == nodata || near.bits != 0 && v >= near.lo && v <= near.hi && near.match(v, nodata)): // v-v is NaN for NaN and ±Inf
				buf[i] = nan
			case v == 0:
				buf[i] = 0 // -0 becomes +0
			}
		}
		return nil
	}
	for i, v := range buf {
		switch {
		case math.IsNaN(v) || math.IsInf(v, 0) || r.hasNodata && (v == r.nodata || r.near.bits != 0 && v >= r.near.lo && v <= r.near.hi && r.near.match(v, r.nodata)):
			buf[i] = math.NaN()
		default:
			buf[i] = v*r.scale + r.offset
			if math.IsInf(buf[i], 0) {
				return r.scaleOverflow(v)
			}
		}
		if buf[i] == 0 {
			buf[i] = 0 // -0 becomes +0
		}
	}
	return nil
}

// NoData returns the nodata value the raster's cells are compared with
// (see the function NoData) and whether its band declares one.
func (r *Raster) NoData() (float64, bool) { return r.nodata, r.hasNodata }

// NoDataUnheld returns, when the band declares a nodata value that its
// integer type cannot hold (not a whole number, or outside the type's
// range), the type and its range ("Byte band (0 to 255)"); "" otherwise.
// No cell equals such a value, so no cell is no data: a raster converted
// with gdal_translate -ot Byte keeps the declared -9999 while its cells
// without data now hold 0 (the value -9999 is clamped to), all scored as
// data.
func (r *Raster) NoDataUnheld() string {
	if !r.hasNodata {
		return ""
	}
	lo, hi := 0.0, 0.0
	switch r.dtype {
	case godal.Byte:
		lo, hi = 0, 255
		if r.signedByte {
			lo, hi = -128, 127
		}
	case godal.Int8:
		lo, hi = -128, 127
	case godal.UInt16:
		lo, hi = 0, 65535
	case godal.Int16:
		lo, hi = -32768, 32767
	case godal.UInt32:
		lo, hi = 0, 4294967295
	case godal.Int32:
		lo, hi = -2147483648, 2147483647
	default:
		return ""
	}
	if v := r.nodata; v >= lo && v <= hi && v == math.Trunc(v) {
		return ""
	}
	return fmt.Sprintf("%s band (whole numbers from %.0f to %.0f)", r.dtype, lo, hi)
}

// Close closes the raster (and drops the blocks Sample kept).
func (r *Raster) Close() error {
	r.kept.release()
	r.kept = nil
	r.releaseCache()
	return r.ds.Close()
}

// KeepBlocks lets the next Sample keep up to maxBytes of the blocks it
// reads, among those meeting rows (every row when nil), for the next
// Score to take instead of reading and decoding them again; maxBytes <= 0
// keeps none and drops those kept. The values the pass sees are the same
// either way: a kept block holds exactly what the pass's read of it gives.
// Score drops each kept block once it has taken it, and unmaps their
// memory when it returns.
func (r *Raster) KeepBlocks(maxBytes int64, rows *RowRange) {
	r.keep, r.keepRows = maxBytes, allRows
	if rows != nil {
		r.keepRows = *rows
	}
	if maxBytes <= 0 {
		r.kept.release()
		r.kept = nil
	}
}

// Reused returns the number of blocks the last Score took from those
// Sample kept instead of reading them.
func (r *Raster) Reused() int { return r.reused }

// valid reports whether a decoded value is one to score.
func (r *Raster) valid(v float64) bool { return !math.IsNaN(v) }

// Sample returns the raster's value at each cell index (row*width+col) and
// whether it is valid. Cells < 0 are reported invalid. The blocks that
// hold cells are shared out in file order among up to GOMAXPROCS workers,
// each with its own handle on the file (as a pass's workers); each reads
// a block whole, as the pass does, once whatever the order of the cells,
// and keeps it for the next Score when KeepBlocks allows. A value does not
// depend on the worker that read it.
func (r *Raster) Sample(g *extent.Grid, cells []int) ([]float64, []bool, error) {
	vals := make([]float64, len(cells))
	ok := make([]bool, len(cells))
	bw, bh := max(r.blockW, 1), max(r.blockH, 1)
	nbx := (g.Width + bw - 1) / bw
	blockOf := func(c int) int { return (c/g.Width)/bh*nbx + (c%g.Width)/bw }
	var order []int
	for i, c := range cells {
		if c >= 0 {
			order = append(order, i)
		}
	}
	slices.SortStableFunc(order, func(a, b int) int { return blockOf(cells[a]) - blockOf(cells[b]) })
	// groups[k] = order[starts[k]:starts[k+1]]: the cells of one block.
	var starts []int
	for k, i := range order {
		if k == 0 || blockOf(cells[i]) != blockOf(cells[order[k-1]]) {
			starts = append(starts, k)
		}
	}
	starts = append(starts, len(order))
	nb := len(starts) - 1
	r.kept.release()
	r.kept = nil
	if r.keep > 0 && !r.windowed {
		// The slab holds every block with a point in the kept rows, or
		// as many as the budget allows. A windowed raster's strips stay
		// decoded in GDAL's cache for the pass instead (holdCache).
		var need int64
		for k := range nb {
			bi := blockOf(cells[order[starts[k]]])
			x0, y0 := (bi%nbx)*bw, (bi/nbx)*bh
			if h := min(bh, g.Height-y0); y0 < r.keepRows.End && y0+h > r.keepRows.First {
				need += keptBytes(min(bw, g.Width-x0)*h, r.narrow)
			}
		}
		r.kept = newKeptBlocks(r.keep, need, r.keepRows, g.Width, g.Height, bw, bh)
	}
	workers := min(runtime.GOMAXPROCS(0), nb)
	// Held until the pass ends: the strips decoded here serve it.
	r.holdCache(readers(0))
	errs := make([]error, max(workers, 1))
	var wg sync.WaitGroup
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			src, err := r.open()
			if err != nil {
				errs[w] = err
				return
			}
			defer src.Close()
			buf := make([]float64, bw*bh)
			one := make([]float64, 1)
			// Worker w reads a contiguous share of the blocks, in file
			// order, each whole.
			for k := nb * w / workers; k < nb*(w+1)/workers; k++ {
				group := order[starts[k]:starts[k+1]]
				bi := blockOf(cells[group[0]])
				x0, y0 := (bi%nbx)*bw, (bi/nbx)*bh
				b := block{x0: x0, y0: y0, w: min(bw, g.Width-x0), h: min(bh, g.Height-y0)}
				// Read into a buffer to keep for the pass when the
				// budget allows, else into the worker's own.
				gs, isGDAL := src.(*gdalSource)
				kb, keep := r.kept.reserve(bi, b.y0, b.h, b.w*b.h, r.narrow && isGDAL)
				var err error
				switch {
				case kb.f32 != nil:
					err = gs.readBlock32(b.x0, b.y0, b.w, b.h, kb.f32)
				case kb.f64 != nil:
					err = src.ReadBlock(b.x0, b.y0, b.w, b.h, kb.f64)
				default:
					kb.f64 = buf[:b.w*b.h]
					err = src.ReadBlock(b.x0, b.y0, b.w, b.h, kb.f64)
				}
				if err != nil {
					errs[w] = err
					return
				}
				for _, i := range group {
					c := cells[i]
					one[0] = kb.at((c/g.Width-y0)*b.w + c%g.Width - x0)
					if err := r.decode(one); err != nil {
						errs[w] = err
						return
					}
					vals[i], ok[i] = one[0], r.valid(one[0])
				}
				if keep {
					r.kept.put(bi, kb)
				}
			}
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			r.kept.release()
			r.kept = nil
			return nil, nil, err
		}
	}
	return vals, ok, nil
}

// ErrNoData is returned when a raster has no cell with data (HasData
// finds no valid value, or a pass's Stats.AnyValid is false).
var ErrNoData = errors.New("pass: the raster has no cell with data")

// block is one block of cells read from the raster.
type block struct {
	x0, y0, w, h int
	buf          []float64
	shown        []float64 // what Options.Rows and the preview see (nil: buf)
}

// shower is a Source whose blocks show Options.Rows and the preview other
// values than those scored (a Virtual on a BoundedField: see Virtual).
type shower interface {
	shownValues(n int) []float64
}

// planned is a Source that reads a block by its plan (a Virtual's: the
// cells to compute are those of the block's segments): the pass plans
// each block before reading it and hands the plan over with usePlan.
type planned interface {
	usePlan(ws *workerState)
}

// each reads every block in order and sends it to out, still encoded (the
// consumer decodes, so that decoding runs on the workers); buffers come
// back through free. It stops at the first read error.
func (r *Raster) each(out chan<- block, free chan []float64) error {
	defer close(out)
	src := r.sharedSource()
	for b := range r.readBlocks() {
		b.buf = (<-free)[:b.w*b.h]
		if err := src.ReadBlock(b.x0, b.y0, b.w, b.h, b.buf); err != nil {
			return err
		}
		out <- b
	}
	return nil
}

// Blocks returns the number of blocks of the raster, for progress.
func (r *Raster) Blocks() int {
	nx := (r.width + r.blockW - 1) / r.blockW
	ny := (r.height + r.blockH - 1) / r.blockH
	return nx * ny
}

// BlocksIn returns the number of blocks a pass over rows reads (every
// block when rows is nil), for run.log: a shard's pass reads only the
// block rows meeting its rows.
func (r *Raster) BlocksIn(rows *RowRange) int {
	return blocksIn(r.width, r.height, r.blockW, r.blockH, rows)
}

// blocksIn returns the number of blocks of bw x bh cells of a width x
// height grid that meet rows (all when rows is nil), as passRun.blockRange
// takes them.
func blocksIn(width, height, bw, bh int, rows *RowRange) int {
	nx := (width + bw - 1) / bw
	first, end := 0, height
	if rows != nil {
		first, end = max(rows.First, 0), min(rows.End, height)
	}
	if end <= first {
		return 0
	}
	return nx * ((end+bh-1)/bh - first/bh)
}

// ReadValid returns the cells with a valid value.
func (r *Raster) ReadValid(g *extent.Grid, progress func(done, total int)) (*extent.Valid, error) {
	v := extent.NewValid(g.Width, g.Height)
	rec := newValidRec(v, r.width, r.blockW, r.blockH)
	blocks := make(chan block)
	free := make(chan []float64, 1)
	free <- make([]float64, r.blockW*r.blockH)
	defer r.holdCache(1)()
	errc := make(chan error, 1)
	go func() { errc <- r.each(blocks, free) }()
	done, total := 0, r.Blocks()
	var runs, off []int32
	var bad error // a value the scale makes infinite: the rest is only drained
	for b := range blocks {
		if bad == nil {
			bad = r.decode(b.buf)
		}
		if bad != nil {
			free <- b.buf
			continue
		}
		runs, off = runs[:0], off[:0]
		for y := 0; y < b.h; y++ {
			from := len(runs)
			off = append(off, int32(from))
			for x := 0; x < b.w; x++ {
				if r.valid(b.buf[y*b.w+x]) {
					runs = appendCells(runs, from, int32(b.x0+x), int32(b.x0+x+1))
				}
			}
		}
		rec.add(b, runs, append(off, int32(len(runs))))
		free <- b.buf
		done++
		if progress != nil {
			progress(done, total)
		}
	}
	if err := <-errc; err != nil {
		return v, err
	}
	return v, bad
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
	// AnyValid is true when some cell of the raster, in an extent or not,
	// has a value. (A Virtual source computes only cells in some extent.)
	AnyValid bool
	// Values are the distinct values on cells of any extent while they
	// are few (metrics.ValueSet); a Virtual source gathers none.
	Values metrics.ValueSet
	// Lowest are the metrics.LowestValues smallest distinct values on
	// cells of any extent, each with the exact area (units) of its cells
	// there (its first is Min with FloorArea).
	Lowest metrics.MassList
	// Runs are the values held by a run of at least metrics.RunCells
	// equal valid cells in a row of one of the pass's blocks (the file's
	// own tiles or strips, cut to the cells of some extent), each with the
	// area of those runs (a lower bound of its cells' area), at most
	// metrics.MaxRunValues of them (the smallest; Cut when there were
	// more). Together with Lowest they are where a large area may sit at
	// one value that no test point takes (metrics.Settings.ModelLowest).
	Runs metrics.MassList
}

// Merge adds to s the statistics of a pass over other cells (another
// shard's rows): the result is that of one pass over both, whatever the
// order of merges.
func (s *Stats) Merge(o Stats) { s.merge(o) }

func (s *Stats) merge(o Stats) {
	values := s.Values
	values.Merge(o.Values)
	lowest, runs := s.Lowest, s.Runs
	lowest.Merge(o.Lowest, metrics.LowestValues)
	runs.Merge(o.Runs, metrics.MaxRunValues)
	defer func() { s.Values, s.Lowest, s.Runs = values, lowest, runs }()
	anyValid := s.AnyValid || o.AnyValid
	s.AnyValid = anyValid
	if o.Area == 0 {
		return
	}
	if s.Area == 0 {
		*s = o
		s.AnyValid = anyValid
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
	// Valid, when set (empty, on the grid), receives every valid cell that
	// belongs to some extent, so that the first model's pass also yields
	// the cells the family is clipped to (no separate read).
	Valid *extent.Valid
	// Rows, when set, sees every row of every block that holds a cell of
	// some member, once its values are known: the row, its first column,
	// the values (NaN: no value) and the cells' integer area weights.
	// Which member holds a cell the caller asks the family (Family.Span,
	// Family.Has). It is called from the workers at once and must not keep
	// the slices. For a Virtual on a BoundedField the values are the
	// midpoints of each cell's own bounds (see Virtual): the same in a
	// pass over a RowRange as over every row.
	Rows func(row, c0 int, vals []float64, weights []int64)
	// RowRange, when set, restricts the pass to the grid rows it covers
	// (one shard's share of a run): blocks outside are not read, a block
	// across an edge is read and scored for its rows inside only. The
	// accumulators, Stats, Preview, Valid and Rows then cover those rows
	// alone; rows of different ranges add up exactly to the whole pass.
	RowRange *RowRange
}

// RowRange is the half-open range of grid rows First <= row < End.
type RowRange struct{ First, End int }

// plan is what a pass needs of a model: its size and block layout, a
// Source for each worker, and how stored values become model values.
type plan struct {
	width, height, blockW, blockH int
	open                          func() (Source, error)
	// decode turns stored values into model values in place, NaN for no
	// value.
	decode func(buf []float64) error
	// kept, when set, holds blocks already read (by Sample): the pass
	// takes those instead of reading them.
	kept *keptBlocks
	// midpoints: a block's values are the midpoints of some cells'
	// bounds, not their own (a Virtual with bounds: only the extremes and
	// the cells near a bin's edge are computed), so the pass gathers no
	// smallest values or runs (Stats.Lowest, Stats.Runs), which would
	// depend on the blocks.
	midpoints bool
}

// Score streams the raster once and returns one accumulator per family
// member (empty for members that are not ok) and the pass statistics.
//
// Each worker opens its own Source (one dataset handle each), takes the
// next block index, reads, decodes and scores it. Within a block, every
// cell is located in the layout once; then, for each nested sequence of
// members (Family.Groups), the cell is added only to the smallest member
// of the sequence that holds it, and after the pass the accumulators are
// merged up each sequence. Every sum is an integer, so the result is the
// same for any number of workers and any block order.
//
// A worker that panics (a bug) makes the pass return an *InternalError.
func (r *Raster) Score(g *extent.Grid, fam *extent.Family, layout *metrics.Layout, opt Options) ([]*metrics.Accumulator, Stats, error) {
	kept := r.kept
	r.kept = nil // this pass's alone: unmapped when it returns
	r.holdCache(readers(opt.Workers))
	defer r.releaseCache()
	accs, st, err := score(plan{width: r.width, height: r.height, blockW: r.blockW, blockH: r.blockH, open: r.open, decode: r.decode, kept: kept},
		g, fam, fam.Groups(), layout, opt)
	r.reused = 0
	if kept != nil {
		r.reused = int(kept.taken.Load())
		kept.release() // every worker is done with it
	}
	return accs, st, err
}

// score is one streaming pass over the blocks of p (see Raster.Score);
// groups is fam.Groups().
func score(p plan, g *extent.Grid, fam *extent.Family, groups [][]int, layout *metrics.Layout, opt Options) ([]*metrics.Accumulator, Stats, error) {
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	n := len(fam.Members)
	r := &passRun{p: p, g: g, layout: layout, opt: opt, nx: (p.width + p.blockW - 1) / p.blockW}
	r.first, r.end, r.rows = r.blockRange()
	r.bands = newBands(fam, groups, p.width, r.nx, p.blockH, r.rows)
	if opt.Valid != nil {
		r.valid = newValidRec(opt.Valid, p.width, p.blockW, p.blockH)
	}
	// No more workers than blocks: each holds a block's buffer, hundreds
	// of MB for a raster stored as one strip, and one with no block to
	// take would hold it for nothing.
	workers = max(min(workers, r.end-r.first), 1)
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
		go func(pt *partial) {
			defer wg.Done()
			r.work(pt, doneBlocks)
		}(&parts[w])
	}
	go func() { wg.Wait(); close(doneBlocks) }()
	done := 0
	for range doneBlocks {
		done++
		if opt.Progress != nil {
			opt.Progress(done, r.end-r.first)
		}
	}
	return mergeParts(parts, groups)
}

// passRun is one pass's shared state: the plan, the blocks to score
// (indices [first, end), row-major with nx a row, restricted to rows),
// the band plans, the next block to take and whether a worker failed.
type passRun struct {
	p          plan
	g          *extent.Grid
	layout     *metrics.Layout
	opt        Options
	nx         int
	first, end int
	rows       RowRange
	bands      *bands
	valid      *validRec // nil unless Options.Valid
	next       atomic.Int64
	failed     atomic.Bool
}

// partial is one worker's sums, statistics and error.
type partial struct {
	accs  []*metrics.Accumulator
	stats Stats
	err   error
}

// blockRange returns the indices [first, end) of the blocks to score and
// the rows they are scored for: every block, or those meeting
// Options.RowRange.
func (r *passRun) blockRange() (first, end int, rows RowRange) {
	p := r.p
	first, end = 0, r.nx*((p.height+p.blockH-1)/p.blockH)
	rows = RowRange{0, p.height}
	if rr := r.opt.RowRange; rr != nil {
		// Blocks are numbered row-major, so the blocks meeting rows
		// [First, End) are one range of indices.
		rows = RowRange{max(rr.First, 0), min(rr.End, p.height)}
		first, end = 0, 0
		if rows.End > rows.First {
			first, end = rows.First/p.blockH*r.nx, (rows.End+p.blockH-1)/p.blockH*r.nx
		}
	}
	return first, end, rows
}

// work is one worker: it opens its own source and scores blocks taken
// from the shared counter into pt until none is left or a worker failed,
// sending a token on done for each block scored.
func (r *passRun) work(pt *partial, done chan<- struct{}) {
	defer func() {
		// A bug in a worker becomes an error of the pass instead of
		// killing the process; the other workers stop at their next
		// block.
		if v := recover(); v != nil {
			pt.err = &InternalError{fmt.Errorf("pass: internal error in a scoring worker: %v\n%s", v, debug.Stack())}
			r.failed.Store(true)
		}
	}()
	src, err := r.p.open()
	if err != nil {
		pt.err = err
		r.failed.Store(true)
		return
	}
	defer src.Close()
	ws := newWorkerState(r.p.blockW, r.p.blockH)
	ws.noMasses = r.p.midpoints
	// Statistics stay local until the end: workers' partials sit side by
	// side in memory and per-cell writes would share cache lines.
	var st Stats
	for !r.failed.Load() {
		i := r.first + int(r.next.Add(1)-1)
		if i >= r.end {
			break
		}
		if err := r.block(i, src, ws, pt.accs, &st); err != nil {
			pt.err = err
			r.failed.Store(true)
			break
		}
		done <- struct{}{}
	}
	pt.stats = st
}

// block scores block i: its plan first (a planned source reads by it),
// then its cells (kept from sampling, or read), added to accs.
func (r *passRun) block(i int, src Source, ws *workerState, accs []*metrics.Accumulator, st *Stats) error {
	p, opt := r.p, r.opt
	x0, y0 := (i%r.nx)*p.blockW, (i/r.nx)*p.blockH
	b := block{x0: x0, y0: y0, w: min(p.blockW, p.width-x0), h: min(p.blockH, p.height-y0)}
	if b.y0 < r.rows.First || b.y0+b.h > r.rows.End {
		b.y0 = max(b.y0, r.rows.First)
		b.h = min(y0+b.h, r.rows.End) - b.y0
	}
	b.buf = ws.buf[:b.w*b.h]
	by := i / r.nx
	bd := r.bands.get(by, ws)
	ws.planBlock(bd, b)
	if ps, ok := src.(planned); ok {
		ps.usePlan(ws)
	}
	if !p.kept.take(i, b) {
		if err := src.ReadBlock(b.x0, b.y0, b.w, b.h, b.buf); err != nil {
			return err
		}
	}
	if err := p.decode(b.buf); err != nil {
		return err
	}
	if sh, ok := src.(shower); ok && (opt.Preview != nil || opt.Rows != nil) {
		// Only the preview and the row hook see them.
		b.shown = sh.shownValues(b.w * b.h)
	}
	if !st.AnyValid {
		st.AnyValid = slices.ContainsFunc(b.buf, valid)
	}
	if err := scoreBlock(r.g, r.layout, b, accs, st, ws, opt); err != nil {
		return err
	}
	if r.valid != nil {
		r.valid.add(b, ws.validRuns, ws.validOff)
	}
	r.bands.done(by, bd)
	return nil
}

// mergeParts merges the workers' sums and statistics, then each nested
// sequence's sums up the sequence: each member so far holds only the
// cells where it is the smallest of its sequence, and merging gives it
// all of its cells.
func mergeParts(parts []partial, groups [][]int) ([]*metrics.Accumulator, Stats, error) {
	for w := range parts {
		if parts[w].err != nil {
			return nil, Stats{}, parts[w].err
		}
	}
	out := parts[0].accs
	stats := parts[0].stats
	for w := 1; w < len(parts); w++ {
		for k := range out {
			if err := out[k].Merge(parts[w].accs[k]); err != nil {
				return nil, Stats{}, &InternalError{fmt.Errorf("pass: merging the workers' sums: %w", err)}
			}
		}
		stats.merge(parts[w].stats)
	}
	for _, seq := range groups {
		for j := 1; j < len(seq); j++ {
			if err := out[seq[j]].Merge(out[seq[j-1]]); err != nil {
				return nil, Stats{}, &InternalError{fmt.Errorf("pass: merging the sums up a nested sequence: %w", err)}
			}
		}
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
	units := AreaUnits(g)
	for x, a := range areas {
		if a != lastA { // constant along rows of most grids
			lastA, lastW = a, int64(math.Round(a*units))
			if lastW < 1 && a > 0 {
				// A sliver of a cell at a world map's edge still weighs:
				// the pass takes a weight of 0 for no cell at all.
				lastW = 1
			}
		}
		weights[x] = lastW
	}
	return areas, weights
}

// valid reports whether a decoded value is one to score.
func valid(v float64) bool { return !math.IsNaN(v) }
