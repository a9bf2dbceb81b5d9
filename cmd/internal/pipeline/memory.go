package pipeline

import (
	"bufio"
	"fmt"
	"os"
	"runtime"
	"strconv"
	"strings"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/pass"
	"areasweep/extent"
	"areasweep/metrics"
)

// memoryUse is the estimate of the memory a run needs, by part.
type memoryUse struct {
	Runs, Valid, Accumulators, Blocks, Points, Resamples int64
}

// Total returns the sum of the parts in bytes.
func (m memoryUse) Total() int64 {
	return m.Runs + m.Valid + m.Accumulators + m.Blocks + m.Points + m.Resamples
}

// estimateMemory is the one place that estimates the memory of a run from
// its size; a change to the pass or the family that changes what is held
// in memory changes it here. Parts:
//
//	runs          extents x grid rows x 40 bytes (a row's slice header and,
//	              typically, one or two runs of two int32 each)
//	valid         at most 1 bit per grid cell and 48 bytes per row
//	              (extent.MaxValidBytes; rows of few runs take less)
//	accumulators  workers x (extents + pass.MaxShared) x (2 x layout values
//	              + 1 + 4096) bins x 16 bytes (each member's, and the shared
//	              sums of a block)
//	blocks        readBytes (what reading the model rasters, one at a
//	              time, holds: Options.readBytes), plus GDAL's block cache
//	              (extent.BlockCacheBytes: 16 MB unless GDAL_CACHEMAX says
//	              otherwise), plus (added by checkMemory for a run that
//	              scores) the keptBlockBytes of blocks a model's sampling
//	              keeps for its pass
//	points        about 400 bytes per occurrence record (records, lists, results)
//	resamples     the paired analysis's memo of each model x extent's scores
//	              on every resample (metrics: 8 (E values + thresholds + 1)
//	              + E values + 9 bytes per resample), and the table of the
//	              resamples' counts (metrics.DrawTableBytes: 1 byte per
//	              resample and test point, at most 128 MiB), added by
//	              resampleMemo
//
// layoutValues is the number of presence values plus fixed thresholds.
func estimateMemory(cells, rows int64, extents, workers, layoutValues int, readBytes int64, points int) memoryUse {
	bins := int64(2*layoutValues+1) + histBins
	return memoryUse{
		Runs:         int64(extents) * rows * 40,
		Valid:        extent.MaxValidBytes(int(cells/max(rows, 1)), int(rows)),
		Accumulators: int64(workers) * int64(extents+pass.MaxShared) * bins * 16,
		Blocks:       readBytes + extent.BlockCacheBytes(physicalMemory()),
		Points:       400 * int64(points),
	}
}

// resampleMemo returns the bytes of the paired analysis's memo of
// resampled scores (see estimateMemory) for extents extents: every model,
// null and the distance-only null on every extent, Iterations resamples
// each, with the two percentile thresholds and the fixed ones (the
// memo's bytes without the Boyce index, which the run leaves out of the
// resamples: metrics.CompareOptions); and the table of the resamples'
// counts for at most points test points.
func (o *Options) resampleMemo(extents, points int) int64 {
	models := int64(len(o.Models) + len(o.Nulls) + 1)
	perResample := int64(8*(len(o.E)+2+len(o.Thresholds)+1) + len(o.E))
	// The run's test points are at most points: a table of fewer may fit
	// where one of points would not.
	table := min(int64(max(points, 0))*int64(max(o.Iterations, 0)), metrics.MaxDrawTableBytes)
	return models*int64(extents)*int64(max(o.Iterations, 0))*perResample + table
}

// readBytes returns the most memory that reading one of the rasters (the
// models and --null rasters, read one at a time) on workers workers holds
// (pass.ReadBytes), at least a buffer of 512 x 512 float64 values per
// worker (the distance-only null's blocks, its bounds included, take
// less), and the raster that holds the most when it is read in windows of
// strips that GDAL decodes whole, "" otherwise. A raster that cannot be
// opened counts 0 (the run then says why).
func (o *Options) readBytes(workers int) (most int64, stripped string) {
	most = int64(workers) * 512 * 512 * 8
	for _, m := range append(append([]string{}, o.Models...), o.Nulls...) {
		if _, p, err := inputs.ParseNamedPath(m); err == nil {
			if b, windowed := pass.ReadBytes(p, workers); b > most {
				most, stripped = b, ""
				if windowed {
					stripped = p
				}
			}
		}
	}
	return most, stripped
}

// readWorkers is the number of workers whose block reads the memory
// estimate counts: --workers, or GOMAXPROCS when it is not set, and none
// for `extents`, whose run scores no model.
func (o *Options) readWorkers() int {
	if o.ExtentsOnly {
		return 0
	}
	return o.workers()
}

// workers is the number of goroutines a run's parallel work uses:
// --workers, or GOMAXPROCS when it is not set.
func (o *Options) workers() int {
	if o.Workers > 0 {
		return o.Workers
	}
	return runtime.GOMAXPROCS(0)
}

// maxExtents is an upper bound on the members the settings can make,
// before the family is built.
func (o *Options) maxExtents() int {
	return min(o.requestedExtents(), extent.MaxMembers)
}

// requestedExtents is an upper bound on the members the settings ask for,
// the family's cap aside: base and whole raster, each distinct nonzero
// region buffer, each point and hull buffer, each extra layer, and up to
// 4 ecoregion members.
func (o *Options) requestedExtents() int {
	n := 2 + len(sortedUniqueNonZero(o.RegionBuffers)) + len(o.PointBuffers) + len(o.HullBuffers) + len(o.Extra)
	if o.Ecoregions != "" {
		n += 4
	}
	return n
}

func sortedUniqueNonZero(v []float64) map[float64]bool {
	m := map[float64]bool{}
	for _, x := range v {
		if x != 0 {
			m[x] = true
		}
	}
	return m
}

// availableMemory returns the memory the run may use: the smaller of
// MemAvailable (/proc/meminfo) and a cgroup limit, or 0 when unknown.
func availableMemory() int64 {
	avail := meminfo("MemAvailable:")
	if b, err := os.ReadFile("/sys/fs/cgroup/memory.max"); err == nil {
		if lim, err := strconv.ParseInt(strings.TrimSpace(string(b)), 10, 64); err == nil && lim > 0 && (avail == 0 || lim < avail) {
			avail = lim
		}
	}
	return avail
}

// physicalMemory returns MemTotal (/proc/meminfo), or 0 when unknown:
// what a GDAL_CACHEMAX given in percent is a share of.
func physicalMemory() int64 { return meminfo("MemTotal:") }

// meminfo returns the value of /proc/meminfo's line key ("MemTotal:") in
// bytes, 0 when there is none.
func meminfo(key string) int64 { return procKB("/proc/meminfo", key) }

// procKB returns the value in kB of line key of a /proc file such as
// /proc/meminfo, in bytes, 0 when there is none.
func procKB(path, key string) int64 {
	f, err := os.Open(path)
	if err != nil {
		return 0
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if f := strings.Fields(sc.Text()); len(f) >= 2 && f[0] == key {
			if kb, err := strconv.ParseInt(f[1], 10, 64); err == nil {
				return kb * 1024
			}
		}
	}
	return 0
}

// memoryShare is the share of the available memory a run may plan to use
// (our choice: room for GDAL's block cache and the rest of the system).
const memoryShare = 0.8

// checkMemory refuses a run whose estimate exceeds memoryShare of the
// available memory, with the figure and what to change.
func (s *Study) checkMemory() error {
	o, g := s.o, s.grid
	workers := o.readWorkers()
	est, reads, stripped := o.runMemory(int64(g.Cells()), int64(g.Height), len(s.points))
	s.warnAddressSpace(est.Total(), extent.AddressSpaceLimit(), selfStatus("VmSize:"))
	avail := availableMemory()
	if avail == 0 || float64(est.Total()) <= memoryShare*float64(avail) {
		return nil
	}
	strips := stripsAdvice(stripped, reads)
	return fault.BadInput(fmt.Errorf("this run needs about %s of memory but %s is available: the %dx%d grid alone needs up to %s for the cells with data (at most 1 bit per cell) and the extents' row runs, "+
		"%d worker(s) x %d extents need %s for the scores, and the paired analysis %s for its resamples%s; resample the rasters coarser (gdalwarp -tr) or clip them to the study area (gdalwarp -te), "+
		"or use fewer --workers, extents or --iterations",
		gib(est.Total()), gib(avail), g.Width, g.Height, gib(est.Runs+est.Valid), workers, o.maxExtents(), gib(est.Accumulators), gib(est.Resamples), strips))
}

// runMemory is the estimate of what a run of o needs on a grid of cells
// in rows with points occurrence records: estimateMemory, the paired
// analysis's memo (resampleMemo) and, for a run that scores, the
// keptBlockBytes of blocks a model's sampling keeps for its pass; reads
// and stripped are readBytes's. The run's own check (checkMemory) and a
// batch's need for the study (Estimate) both take it, so that a batch
// budgets what each run then holds.
func (o *Options) runMemory(cells, rows int64, points int) (est memoryUse, reads int64, stripped string) {
	workers := o.readWorkers()
	reads, stripped = o.readBytes(workers)
	est = estimateMemory(cells, rows, o.maxExtents(), workers, points+len(o.Thresholds), reads, points)
	est.Resamples = o.resampleMemo(o.maxExtents(), points)
	if !o.ExtentsOnly {
		est.Blocks += keptBlockBytes
	}
	return est, reads, stripped
}

// stripsAdvice is what a memory refusal says when reading the raster at
// stripped, stored in strips of the whole width (read in windows), holds
// the most (reads bytes), or "" when stripped is "".
func stripsAdvice(stripped string, reads int64) string {
	if stripped == "" {
		return ""
	}
	return fmt.Sprintf(", reading %s, stored in strips of the whole width that GDAL decodes whole, holds %s (a tiled copy is read with a few MB: gdal_translate -co TILED=YES -co COMPRESS=DEFLATE %s TILED.tif)", stripped, gib(reads), stripped)
}

// StripsAdvice returns what a run of o refused for memory says about a
// model or null stored in strips of the whole width when reading it holds
// the most (see checkMemory), or "": a batch adds it to a study too large
// for its budget.
func StripsAdvice(o Options) string {
	workers := o.readWorkers()
	reads, stripped := o.readBytes(workers)
	return stripsAdvice(stripped, reads)
}

func gib(b int64) string {
	if b >= 1<<30 {
		return fmt.Sprintf("%.1f GiB", float64(b)/(1<<30))
	}
	return fmt.Sprintf("%.0f MiB", float64(b)/(1<<20))
}

// addressSlack is what a run may reserve beyond twice its estimate before
// the end (our choice: the C heap's arenas, extent.MallocArenasUnderLimit
// x 64 MiB, and as much again for the rest).
const addressSlack = 512 << 20

// warnAddressSpace warns about a run whose estimate is est bytes when the
// process has a limit of address space (limit, extent.AddressSpaceLimit;
// 0 for none) below used + 2 x est + addressSlack, used being what the
// process reserves already (VmSize). A limit of virtual memory (ulimit
// -v, a scheduler's h_vmem) counts address space reserved, not used, and
// the libraries reserve much more than they use (Go's runtime and glibc's
// heap arenas: 1.6 GiB reserved before the run's own memory on the 2-core
// VM of the README's figures, where VmPeak then grew by 0.1 to 4.3 times
// the estimate: 19 MiB for the demo, 235 MiB for 27 million cells and 60
// extents, 680 MiB for 100,000 occurrences). A run
// that reaches the limit stops with a library's allocation failure, or
// with the Go runtime's "fatal error: out of memory", which nothing in the
// program can catch (the supervisor of cmd/areasweep's
// supervise_linux.go turns it into one line); the warning before says
// why and what to do. It goes to run.log and to standard error even with
// --quiet, not into results.json (the same inputs give the same results
// under any limit). A run is not refused: the estimate is not a
// bound on what a run reserves.
func (s *Study) warnAddressSpace(est, limit, used int64) {
	if limit <= 0 || used <= 0 {
		return
	}
	advised := used + 2*est + addressSlack
	if advised <= limit {
		return
	}
	line := fmt.Sprintf("warning: the process may reserve at most %s of address space (its limit of virtual memory: ulimit -v, or a cluster job's such as h_vmem); areasweep's libraries reserve %s of it that they do not use (Go's runtime and the C heap) before the run, which may need about %s more: if it stops for memory, raise the limit to at least %s (ulimit -v %d) or remove it (ulimit -v unlimited); a limit of resident memory (a cgroup's, as SLURM's --mem sets) does not count reserved space",
		gib(limit), gib(used), gib(advised-used), gib(advised), (advised+1023)/1024)
	s.log.WriteString(line + "\n")
	if s.io.ErrOut != nil {
		fmt.Fprintln(s.io.ErrOut, "areasweep: "+line)
	}
}

// selfStatus returns the value of /proc/self/status's line key ("VmSize:")
// in bytes, 0 when it is not known.
func selfStatus(key string) int64 { return procKB("/proc/self/status", key) }
