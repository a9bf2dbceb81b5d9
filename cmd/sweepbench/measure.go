package main

import (
	"bufio"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"time"

	"areasweep/extent"
	"areasweep/extent/vocab"

	"github.com/airbusgeo/godal"
)

type bench struct {
	bin         string
	reps        int
	iterations  int
	baselineMax float64
	// runFlags are added to every measured `areasweep run`
	// (e.g. --no-distance-null).
	runFlags []string
	global   bool // whole-world grids (generate)
}

// row is one measured size: times in seconds, RSS in MiB. bareCPU and
// runCPU are CPU seconds (user + system) of the same measurements: on a
// machine other jobs share, they move far less than the wall times.
type row struct {
	cells, extents      int
	bare, run, baseline float64
	bareCPU, runCPU     float64
	runRSS              float64
	members             int // extents in the family built (duplicates included)
	phases              string
}

func (b *bench) runAll(dir string, cells, extents []float64) error {
	extent.Configure()
	var rows []row
	fmt.Printf("machine: %d cores (GOMAXPROCS %d), %s\n", runtime.NumCPU(), runtime.GOMAXPROCS(0), runtime.GOARCH)
	fmt.Printf("%-12s %-8s %-9s %-9s %-7s %-11s %-7s %-10s %-12s %-9s %-9s %-9s\n", "cells", "extents", "a bare s", "b run s", "b/a", "c baseline s", "c/b", "b RSS MiB", "b cells/s", "a CPU s", "b CPU s", "b/a CPU")
	for _, c := range cells {
		sdir := filepath.Join(dir, fmt.Sprintf("cells%.0f", c))
		if b.global {
			sdir += "-global"
		}
		s, err := generate(sdir, c, 2, 20261202, b.global)
		if err != nil {
			return fmt.Errorf("generate %.0f cells: %w", c, err)
		}
		for _, e := range extents {
			r := row{cells: s.width * s.height, extents: int(e)}
			r.bare, r.bareCPU = math.Inf(1), math.Inf(1)
			r.run, r.runCPU = math.Inf(1), math.Inf(1)
			r.baseline = math.NaN()
			for rep := 0; rep < b.reps; rep++ {
				c0 := ownCPU()
				t, err := bareRead(s.models)
				if err != nil {
					return err
				}
				r.bare, r.bareCPU = math.Min(r.bare, t), math.Min(r.bareCPU, ownCPU()-c0)
				t, rss, cpu, err := b.fullRun(s, int(e))
				if err != nil {
					return err
				}
				r.runCPU = math.Min(r.runCPU, cpu)
				if t < r.run {
					r.run, r.runRSS = t, rss
					r.phases = phases(filepath.Join(s.dir, "out", "run.log"))
				}
			}
			if float64(r.cells) <= b.baselineMax {
				t, members, err := b.baselineRun(s, int(e))
				if err != nil {
					return err
				}
				r.baseline, r.members = t, members
			}
			rows = append(rows, r)
			cps := float64(r.cells) * float64(len(s.models)) / r.run
			fmt.Printf("%-12d %-8s %-9.2f %-9.2f %-7.1f %-11s %-7s %-10.0f %-12.3g %-9.2f %-9.2f %-9.1f\n",
				r.cells, extentsLabel(r), r.bare, r.run, r.run/r.bare, orSkipped(r.baseline, 2), orSkipped(r.baseline/r.run, 1), r.runRSS, cps, r.bareCPU, r.runCPU, r.runCPU/r.bareCPU)
			fmt.Printf("  phases (run.log): %s\n", r.phases)
		}
	}
	growth(rows)
	return nil
}

// extentsLabel is the requested family size, with the number built when
// the baseline counted it.
func extentsLabel(r row) string {
	if r.members == 0 {
		return strconv.Itoa(r.extents)
	}
	return fmt.Sprintf("%d/%d", r.extents, r.members)
}

// growth prints how the run's time grows with cells (same extents) and with
// extents (same cells).
func growth(rows []row) {
	fmt.Println()
	for i, a := range rows {
		for _, z := range rows[i+1:] {
			switch {
			case a.extents == z.extents && z.cells != a.cells:
				fmt.Printf("cells %d -> %d at %d extents: run x%.2f (cells x%.2f), RSS %.0f -> %.0f MiB\n",
					a.cells, z.cells, a.extents, z.run/a.run, float64(z.cells)/float64(a.cells), a.runRSS, z.runRSS)
			case a.cells == z.cells && z.extents != a.extents:
				fmt.Printf("extents %d -> %d at %d cells: run x%.2f\n", a.extents, z.extents, a.cells, z.run/a.run)
			}
		}
	}
}

// bareRead reads every block of every raster on all cores, one dataset
// handle per goroutine, and touches each value. It returns seconds.
func bareRead(paths []string) (float64, error) {
	start := time.Now()
	workers := runtime.GOMAXPROCS(0)
	for _, p := range paths {
		var wg sync.WaitGroup
		errs := make([]error, workers)
		sums := make([]float64, workers)
		for w := 0; w < workers; w++ {
			wg.Add(1)
			go func(w int) {
				defer wg.Done()
				ds, err := godal.Open(p, godal.RasterOnly())
				if err != nil {
					errs[w] = err
					return
				}
				defer ds.Close()
				band := ds.Bands()[0]
				st := band.Structure()
				buf := make([]float32, st.BlockSizeX*st.BlockSizeY)
				k := 0
				for blk, ok := st.FirstBlock(), true; ok; blk, ok = blk.Next() {
					if k%workers == w {
						if err := band.Read(blk.X0, blk.Y0, buf[:blk.W*blk.H], blk.W, blk.H); err != nil {
							errs[w] = err
							return
						}
						for _, v := range buf[:blk.W*blk.H] {
							sums[w] += float64(v)
						}
					}
					k++
				}
			}(w)
		}
		wg.Wait()
		for _, err := range errs {
			if err != nil {
				return 0, fmt.Errorf("bare read %s: %w", p, err)
			}
		}
	}
	return time.Since(start).Seconds(), nil
}

// fullRun times `areasweep run` on the study with a family of about n
// extents and returns seconds, the peak RSS in MiB and CPU seconds.
func (b *bench) fullRun(s *synthetic, n int) (float64, float64, float64, error) {
	out := filepath.Join(s.dir, "out")
	args := []string{"run", "--occurrences", s.occurrences, "--region", s.region,
		"--e", "0.05,0.1", "--iterations", strconv.Itoa(b.iterations), "--out", out, "--force", "--quiet"}
	for k, m := range s.models {
		args = append(args, "--model", fmt.Sprintf("m%d=%s", k+1, m))
	}
	args = append(args, familyFlags(n)...)
	args = append(args, b.runFlags...)
	return b.exec(args)
}

// exec runs the binary with args and returns its wall seconds, peak RSS
// (MiB) and CPU seconds (user + system, from the child's own rusage).
func (b *bench) exec(args []string) (float64, float64, float64, error) {
	cmd := exec.Command(b.bin, args...)
	var stderr strings.Builder
	cmd.Stderr = &stderr
	start := time.Now()
	if err := cmd.Start(); err != nil {
		return 0, 0, 0, fmt.Errorf("%s: %w", b.bin, err)
	}
	// The peak RSS is read from /proc while the run lives: the rusage of
	// a child started from this (large) process would report this
	// process's own peak, inherited through the fork before exec.
	done := make(chan struct{})
	peak := make(chan float64, 1)
	go func() {
		hwm := 0.0
		tick := time.NewTicker(20 * time.Millisecond)
		defer tick.Stop()
		for {
			if v := vmHWM(cmd.Process.Pid); v > hwm {
				hwm = v
			}
			select {
			case <-done:
				peak <- hwm
				return
			case <-tick.C:
			}
		}
	}()
	err := cmd.Wait()
	t := time.Since(start).Seconds()
	close(done)
	rss := <-peak
	if err != nil {
		return 0, 0, 0, fmt.Errorf("%s %s: %w\n%s", b.bin, strings.Join(args, " "), err, stderr.String())
	}
	cpu := (cmd.ProcessState.UserTime() + cmd.ProcessState.SystemTime()).Seconds()
	return t, rss, cpu, nil
}

// ownCPU returns this process's CPU seconds so far (user + system).
func ownCPU() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano()).Seconds()
}

// vmHWM returns the peak resident set size (MiB) of process pid from
// /proc/pid/status, or 0 when it cannot be read.
func vmHWM(pid int) float64 {
	data, err := os.ReadFile(fmt.Sprintf("/proc/%d/status", pid))
	if err != nil {
		return 0
	}
	for _, line := range strings.Split(string(data), "\n") {
		if strings.HasPrefix(line, "VmHWM:") {
			var kb float64
			fmt.Sscanf(strings.TrimSpace(strings.TrimPrefix(line, "VmHWM:")), "%g", &kb)
			return kb / 1024
		}
	}
	return 0
}

// baselineRun writes the family's membership with `areasweep extents
// --membership-tif` (not timed), then times the straightforward per-extent
// scoring: read each model whole, and for each extent mask its cells,
// collect values and cell areas, sort, and compute the area-weighted AUC of
// the test points. It returns seconds and the number of extents scored.
func (b *bench) baselineRun(s *synthetic, n int) (float64, int, error) {
	out := filepath.Join(s.dir, "members")
	args := []string{"extents", "--occurrences", s.occurrences, "--region", s.region,
		"--model", "m1=" + s.models[0], "--membership-tif", "--out", out, "--force", "--quiet"}
	args = append(args, familyFlags(n)...)
	if _, _, _, err := b.exec(args); err != nil {
		return 0, 0, err
	}
	tests, err := testCells(s)
	if err != nil {
		return 0, 0, err
	}
	start := time.Now()
	mds, err := godal.Open(filepath.Join(out, "extents.tif"), godal.RasterOnly())
	if err != nil {
		return 0, 0, err
	}
	defer mds.Close()
	members := mds.Bands()
	mask := make([]uint8, s.width*s.height)
	vals := make([]float32, s.width*s.height)
	weights := rowWeights(s)
	for _, m := range s.models {
		ds, err := godal.Open(m, godal.RasterOnly())
		if err != nil {
			return 0, 0, err
		}
		if err := ds.Bands()[0].Read(0, 0, vals, s.width, s.height); err != nil {
			ds.Close()
			return 0, 0, err
		}
		ds.Close()
		for _, band := range members {
			if err := band.Read(0, 0, mask, s.width, s.height); err != nil {
				return 0, 0, err
			}
			_ = weightedAUC(vals, mask, weights, s.width, tests)
		}
	}
	return time.Since(start).Seconds(), len(members), nil
}

// testCells returns the cell index of every test record.
func testCells(s *synthetic) ([]int, error) {
	f, err := os.Open(s.occurrences)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	var cells []int
	sc := bufio.NewScanner(f)
	sc.Scan()
	for sc.Scan() {
		p := strings.Split(sc.Text(), ",")
		if len(p) != 3 || p[2] != string(vocab.RoleTest) {
			continue
		}
		lon, _ := strconv.ParseFloat(p[0], 64)
		lat, _ := strconv.ParseFloat(p[1], 64)
		c := int((lon - s.west) / s.step)
		r := int((s.north - lat) / s.step)
		if c >= 0 && c < s.width && r >= 0 && r < s.height {
			cells = append(cells, r*s.width+c)
		}
	}
	return cells, sc.Err()
}

// rowWeights returns a relative cell area per row (cosine of the latitude).
func rowWeights(s *synthetic) []float64 {
	w := make([]float64, s.height)
	for r := range w {
		w[r] = math.Cos((s.north - (float64(r)+0.5)*s.step) * math.Pi / 180)
	}
	return w
}

// weightedAUC is the straightforward per-extent AUC: collect the extent's
// valid cells, sort by value, prefix-sum the areas and place every test
// value by binary search (ties count one half).
func weightedAUC(vals []float32, mask []uint8, rw []float64, width int, tests []int) float64 {
	type cell struct {
		v float32
		w float64
	}
	var cs []cell
	for i, m := range mask {
		if m == 0 || vals[i] == noData {
			continue
		}
		cs = append(cs, cell{vals[i], rw[i/width]})
	}
	sort.Slice(cs, func(i, j int) bool { return cs[i].v < cs[j].v })
	cum := make([]float64, len(cs)+1)
	for i, c := range cs {
		cum[i+1] = cum[i] + c.w
	}
	total := cum[len(cs)]
	if total == 0 {
		return math.NaN()
	}
	sum, n := 0.0, 0
	for _, t := range tests {
		if mask[t] == 0 || vals[t] == noData {
			continue
		}
		v := vals[t]
		lo := sort.Search(len(cs), func(i int) bool { return cs[i].v >= v })
		hi := sort.Search(len(cs), func(i int) bool { return cs[i].v > v })
		sum += (cum[lo] + 0.5*(cum[hi]-cum[lo])) / total
		n++
	}
	return sum / float64(n)
}

// phases returns the timed phases of a run's log (its "... in 1.23 s"
// lines), in order, as "phase seconds" items.
func phases(path string) string {
	data, err := os.ReadFile(path)
	if err != nil {
		return "(no run.log)"
	}
	short := strings.NewReplacer(" (bootstrap included)", "", "results.json, scores.csv and omitted_points.gpkg", "results files",
		"family clipped to the valid cells", "clip", "input checksums (SHA-256)", "checksums", " (before moving the outputs into place)", "",
		"extent family: ", "family ", " written", "", "occurrences read, placed and sampled", "points")
	var out []string
	for _, line := range strings.Split(string(data), "\n") {
		i := strings.LastIndex(line, " in ")
		if i < 0 {
			continue
		}
		var sec float64
		if _, err := fmt.Sscanf(line[i+4:], "%g s", &sec); err != nil {
			continue
		}
		name := line[:i]
		if j := strings.Index(name, ": one pass over"); j >= 0 {
			name = name[:j] + " pass"
		}
		out = append(out, fmt.Sprintf("%s %.2f", short.Replace(name), sec))
	}
	return strings.Join(out, "; ")
}

// orSkipped formats v with prec decimals, or "skipped" when it is NaN (the
// baseline, not run above -baseline-max-cells).
func orSkipped(v float64, prec int) string {
	if math.IsNaN(v) {
		return "skipped"
	}
	return strconv.FormatFloat(v, 'f', prec, 64)
}
