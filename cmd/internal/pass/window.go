package pass

import (
	"fmt"
	"iter"
	"runtime"

	"areasweep/extent"
)

// MaxReadCells bounds the cells of one read of a band stored in strips
// (blocks of whole rows): 4 Mi cells, 32 MiB as the float64 values a
// worker reads into (our choice: a few times a strip of 64 rows of a
// global 30 arc-second grid, 2.8 Mi cells, which is read whole).
const MaxReadCells = 1 << 22

// readCells is MaxReadCells, lowered by tests to window small rasters.
var readCells = MaxReadCells

// readWindows returns the blocks a pass reads a band of width columns
// stored in fileW x fileH blocks in: its own blocks, or, when they are
// strips (the whole width) of more than MaxReadCells cells, windows of
// whole rows of at most MaxReadCells cells (one row at least) inside
// them, and windowed true.
//
// A strip is decoded whole by GDAL however little of it is read (a
// GeoTIFF written as one compressed strip is one block of the whole
// raster), and a worker read a block whole into its own buffer of
// float64 values: a raster of 100 million cells stored as one strip took
// 3.3 GB (32 bytes a cell), against 216 MB tiled. Read in windows, the
// strip is decoded once into GDAL's block cache (holdCache) and every
// window is copied out of it, so the pass holds the strip as stored (4
// bytes a cell for Float32), its compressed bytes while GDAL decodes it,
// and a window per worker. Tiles narrower than the grid are read whole as
// before: their size, not the raster's, bounds a worker's buffer.
func readWindows(width, fileW, fileH int) (w, h int, windowed bool) {
	if fileW < width || int64(fileW)*int64(fileH) <= int64(readCells) {
		return fileW, fileH, false
	}
	return width, min(fileH, max(1, readCells/width)), true
}

// sharedSource returns a Source on the raster's own handle, which all
// the workers of a windowed raster read through, one window at a time:
// one handle decodes each strip once, where a handle per worker would
// decode it once per worker and push the others' strips out of the
// cache.
func (r *Raster) sharedSource() Source {
	return &gdalSource{path: r.Path, band: r.band, mu: &r.readMu}
}

// storedBytes returns the bytes of one of the file's blocks (a windowed
// raster's strips) as stored, which GDAL's block cache holds decoded:
// every band's, when the bands are interleaved by pixel (GDAL decodes and
// caches them together).
func (r *Raster) storedBytes() int64 {
	return int64(r.fileW) * int64(r.fileH) * int64(max(r.dtype.Size(), 1)) * int64(max(r.planes, 1))
}

// cacheBytes returns how much GDAL's block cache must hold beyond its own
// size for workers reading windows of a windowed raster at once (0 for a
// raster read in its own blocks): every strip the windows in flight can
// lie in. Workers take windows in order, so those in flight are at most
// workers consecutive windows, which meet at most workers/(windows per
// strip) + 1 strips (a window may also straddle two strips).
func (r *Raster) cacheBytes(workers int) int64 {
	if !r.windowed {
		return 0
	}
	strips := (r.height + r.fileH - 1) / r.fileH
	per := (r.fileH + r.blockH - 1) / r.blockH // windows per strip
	span := min(strips, (max(workers, 1)+per-1)/per+1)
	return int64(span) * r.storedBytes()
}

// ReadBytes returns the memory that workers workers reading the raster
// hold: each worker's buffer of float64 values for a block the pass reads
// and, while GDAL decodes it, the block as stored (a tile of 4096 x 4096
// Float32 cells: 128 MiB and 64 MiB a worker); for a windowed raster,
// instead of the blocks as stored, the strips GDAL's cache holds decoded
// (cacheBytes) and one strip's compressed bytes, which the library reads
// whole before decoding it (taken as large as the strip decoded).
func (r *Raster) ReadBytes(workers int) int64 {
	workers = max(workers, 1)
	b := int64(workers) * int64(r.blockW) * int64(r.blockH) * 8
	if r.windowed {
		return b + r.cacheBytes(workers) + r.storedBytes()
	}
	return b + int64(workers)*r.storedBytes()
}

// holdCache raises GDAL's block cache for workers readers of a windowed
// raster until releaseCache (or Close), by what the raise already held
// lacks: from a model's sampling at the points to the end of its pass,
// so that the strips decoded for the points serve the pass, as kept
// blocks do. It returns releaseCache when it raised the cache, else a
// function that does nothing, for a read that ends its own raise alone.
func (r *Raster) holdCache(workers int) (release func()) {
	need := r.cacheBytes(workers)
	if need <= r.held {
		return func() {}
	}
	r.releases = append(r.releases, extent.HoldBlockCache(need-r.held))
	r.held = need
	return r.releaseCache
}

// releaseCache ends holdCache's raises; GDAL then drops the strips.
func (r *Raster) releaseCache() {
	for _, f := range r.releases {
		f()
	}
	r.releases, r.held = nil, 0
}

// readers is the number of workers that read a raster at once when opt
// asks for workers (0: every core), as score starts them.
func readers(workers int) int {
	if workers <= 0 {
		return runtime.GOMAXPROCS(0)
	}
	return workers
}

// readBlocks yields the position and size of every block a pass reads
// (the band's blocks, or its windows), row by row.
func (r *Raster) readBlocks() iter.Seq[block] {
	return func(yield func(block) bool) {
		for y0 := 0; y0 < r.height; y0 += r.blockH {
			for x0 := 0; x0 < r.width; x0 += r.blockW {
				if !yield(block{x0: x0, y0: y0, w: min(r.blockW, r.width-x0), h: min(r.blockH, r.height-y0)}) {
					return
				}
			}
		}
	}
}

// Strips describes how a windowed raster is read by a pass over rows (nil:
// every row), for run.log ("in 24 windows of 341 rows inside its 1 strip
// of 8165 rows, each strip decoded once (400 MB)"; a shard's pass reads
// only the windows meeting its rows), or returns "" for a raster read in
// its own blocks. A tile as wide as the grid or wider, or taller than it
// (4096 x 4096 cells on a grid of 3000 x 2400), is named a block of its
// size, not a strip of more rows than the grid has.
func (r *Raster) Strips(rows *RowRange) string {
	if !r.windowed {
		return ""
	}
	strips := (r.height + r.fileH - 1) / r.fileH
	unit, size := "strip", fmt.Sprintf("%d rows", r.fileH)
	if r.fileW != r.width || r.fileH > r.height {
		unit, size = "block", fmt.Sprintf("%d x %d cells", r.fileW, r.fileH)
	}
	return fmt.Sprintf("in %s of %d rows inside its %s of %s, each %s decoded once (%.0f MB)",
		counted(r.BlocksIn(rows), "window"), r.blockH, counted(strips, unit), size, unit, float64(r.storedBytes())/1e6)
}

// counted returns "1 noun" or "n nouns".
func counted(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

// ReadBytes returns Raster.ReadBytes of the raster at path, and whether
// it is read in windows of its strips; 0 when the raster cannot be
// opened (the run then says why when it opens it).
func ReadBytes(path string, workers int) (n int64, windowed bool) {
	r, err := Open(path)
	if err != nil {
		return 0, false
	}
	defer r.Close()
	return r.ReadBytes(workers), r.windowed
}
