// Command sweepbench measures a full areasweep run against the physical
// limit of the machine: a bare block read of the same rasters through GDAL
// on all cores. It generates a synthetic study at each requested size
// (Float32 deflate GeoTIFFs with 256 x 256 tiles, EPSG:4326, 500 training
// and 500 test records, two models), then measures, interleaved:
//
//	a  bare GDAL block read of every model raster on all cores, touching each value
//	b  the full `areasweep run` (family, passes, scores, analysis, report, outputs)
//	c  a straightforward per-extent implementation (mask, collect, sort, score),
//	   written here as a baseline (AUC only; up to -baseline-max-cells)
//
// and prints b/a, c/b, the run's peak RSS, cells per second, the CPU
// seconds (user + system) of a and b and their ratio (steadier than wall
// times when other jobs share the machine), and how b grows with the number
// of cells and of extents. `make bench` runs it. With -bare it only times
// the bare read (a) of the rasters it names, for a study of one's own.
package main

import (
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/airbusgeo/godal"
)

func main() {
	var (
		cellsFlag   = flag.String("cells", "25e6,100e6", "comma-separated grid sizes in cells")
		extentsFlag = flag.String("extents", "5,13,20,60", "comma-separated family sizes (about this many extents)")
		bin         = flag.String("bin", "bin/areasweep", "areasweep binary to measure")
		dir         = flag.String("dir", filepath.Join(os.TempDir(), "areasweep-bench"), "where the synthetic studies are generated (kept and reused)")
		baseMax     = flag.Float64("baseline-max-cells", 30e6, "largest grid on which the per-extent baseline runs")
		reps        = flag.Int("reps", 1, "repetitions of each measurement (the fastest is kept)")
		iterations  = flag.Int("iterations", 1000, "partial ROC bootstrap iterations of the run")
		runFlags    = flag.String("run-flags", "", "extra flags for the measured run, space-separated (e.g. --no-distance-null)")
		global      = flag.Bool("global", false, "synthetic grids of the whole world (2:1; 933e6 cells is 30 arc-seconds) instead of a 60 x 40 degree window")
		bare        = flag.String("bare", "", "only time a bare block read of these comma-separated rasters (a study of your own) and exit")
	)
	flag.Parse()
	if *bare != "" {
		godal.RegisterAll()
		best := 0.0
		for i := range max(1, *reps) {
			sec, err := bareRead(strings.Split(*bare, ","))
			if err != nil {
				fail("%v", err)
			}
			if i == 0 || sec < best {
				best = sec
			}
		}
		fmt.Printf("bare block read on all cores: %.2f s (fastest of %d)\n", best, max(1, *reps))
		return
	}
	cells, err := parseList(*cellsFlag)
	if err != nil {
		fail("-cells: %v", err)
	}
	extents, err := parseList(*extentsFlag)
	if err != nil {
		fail("-extents: %v", err)
	}
	if _, err := os.Stat(*bin); err != nil {
		fail("%s not found: build it first (make build)", *bin)
	}
	b := &bench{bin: *bin, reps: max(1, *reps), iterations: *iterations, baselineMax: *baseMax, runFlags: strings.Fields(*runFlags), global: *global}
	if err := b.runAll(*dir, cells, extents); err != nil {
		fail("%v", err)
	}
}

func parseList(s string) ([]float64, error) {
	var out []float64
	for _, f := range strings.Split(s, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
		if err != nil || v <= 0 {
			return nil, fmt.Errorf("%q is not a positive number", f)
		}
		out = append(out, v)
	}
	return out, nil
}

func fail(format string, args ...any) {
	fmt.Fprintf(os.Stderr, "sweepbench: "+format+"\n", args...)
	os.Exit(2)
}
