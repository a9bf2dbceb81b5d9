package main

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"errors"
	"fmt"
	"hash/fnv"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/airbusgeo/godal"

	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/pass"
	"areasweep/extent"
	"areasweep/extent/gdalmsg"
	"areasweep/metrics"
	"areasweep/report"
)

// histBins is the size of the fine histogram used for the Boyce index and
// curve drawing.
const histBins = 4096

// previewSide is the longer side of the coarse map copy in results.json.
const previewSide = 240

// session carries one run's state from inputs to outputs.
type session struct {
	o      *RunOptions
	log    *strings.Builder
	models []namedPath
	grid   *extent.Grid
	points []report.Point
	lonlat []extent.LonLat // per point
	cell   []int           // per point, -1 outside
	fam    *extent.Family
	res    *report.Results
	stage  string
	valid  extent.Valid // nil until known: the family is then unclipped
	nWarn  int          // family warnings already reported
	// evals holds the paired-resample evaluator of every scored model x
	// extent (paired.go).
	evals map[[2]string]*metrics.Evaluator
	// rawDegrees: the table's coordinates, declared projected, all lie in
	// degree ranges.
	rawDegrees bool
}

// recordedPath is the path written into results.json for an input: as
// given, or for generated demo inputs, where they end up (OUT/inputs/...).
func (s *session) recordedPath(p string) string {
	if d := s.o.inputsDir; d != "" {
		if rel, err := filepath.Rel(d, p); err == nil && !strings.HasPrefix(rel, "..") {
			return filepath.Join(s.o.Out, "inputs", rel)
		}
	}
	return p
}

// namedPath is a model raster by name; Null marks one the user gave as a
// null (--null).
type namedPath struct {
	Name, Path string
	Null       bool
}

// logf writes a line to the run log and, unless quiet, to stderr.
func (s *session) logf(format string, args ...any) {
	line := fmt.Sprintf(format, args...)
	s.log.WriteString(line + "\n")
	if !s.o.Quiet {
		fmt.Fprintln(s.o.IO.ErrOut, line)
	}
}

func (s *session) warn(msg string) {
	s.res.Warnings = append(s.res.Warnings, msg)
	s.logf("warning: %s", msg)
}

// sweep runs the whole analysis described by o.
func sweep(o *RunOptions) error { return sweepInto(o, nil) }

// sweepInto runs the analysis into d, an output directory already opened
// (the demo's, which holds the generated inputs), or opens --out itself.
// Everything that can be checked is checked before the output directory is
// touched: the settings, every input file, the grids, the occurrences and
// the memory the run needs.
func sweepInto(o *RunOptions, d *outDir) error {
	s := &session{o: o, log: &strings.Builder{}, res: &report.Results{
		SchemaVersion: report.SchemaVersion,
		Software:      report.Software{Name: "areasweep", Version: version},
		Seed:          o.Seed,
		Warnings:      []string{},
	}}
	setRunLog(s.log)
	defer setRunLog(nil)
	if d != nil {
		defer d.abort() // nothing once finished
	}
	start := time.Now()
	if err := s.readInputs(); err != nil {
		return err
	}
	if d == nil {
		var err error
		if d, err = openOut(o.Out, o.Force, o.inputPaths()); err != nil {
			return err
		}
		defer d.abort()
	}
	if d.cleaned > 0 {
		s.logf("removed %d staging folder(s) left in or beside %s by earlier runs that were stopped", d.cleaned, o.Out)
	}
	s.stage = d.Stage
	stage := d.Stage
	if err := s.buildFamily(); err != nil {
		return err
	}
	if o.ExtentsOnly {
		if err := s.writeFamily(); err != nil {
			return err
		}
		if err := writeAtomic(filepath.Join(stage, "extents.csv"), extentsCSV(s.res.Extents)); err != nil {
			return writeFailed(err)
		}
		fmt.Fprint(o.IO.Out, extentsTable(s.res.Extents))
	} else {
		for i, m := range s.models {
			if err := s.scoreModel(i, m); err != nil {
				return err
			}
		}
		if !o.NoDistanceNull {
			if err := s.scoreDistanceNull(len(s.models)); err != nil {
				return err
			}
		}
		if err := s.writeFamily(); err != nil {
			return err
		}
		if err := s.timed("analysis", s.finishResults); err != nil {
			return err
		}
		if err := s.timed("results.json, scores.csv and omitted_points.gpkg written", func() error {
			data, err := s.res.Encode()
			if err != nil {
				return internal(err)
			}
			if err := writeAtomic(filepath.Join(stage, "results.json"), data); err != nil {
				return writeFailed(err)
			}
			if err := writeAtomic(filepath.Join(stage, "scores.csv"), scoresCSV(s.res)); err != nil {
				return writeFailed(err)
			}
			if err := writeOmittedGPKG(filepath.Join(stage, "omitted_points.gpkg"), s.res); err != nil {
				return writeFailed(err)
			}
			return nil
		}); err != nil {
			return err
		}
		t0 := time.Now()
		if err := report.Write(stage, s.res); err != nil {
			return writeFailed(err)
		}
		s.logf("report written in %.2f s", time.Since(t0).Seconds())
	}
	s.libraryMessages()
	s.logf("run finished in %.2f s (before moving the outputs into place)", time.Since(start).Seconds())
	if err := writeAtomic(filepath.Join(stage, "run.log"), []byte(s.log.String())); err != nil {
		return writeFailed(err)
	}
	if err := d.finish(); err != nil {
		return err
	}
	if o.ExtentsOnly {
		fmt.Fprintf(o.IO.Out, "extents written to %s\n", filepath.Join(o.Out, "extents.gpkg"))
	} else {
		fmt.Fprintf(o.IO.Out, "report: %s\n", filepath.Join(o.Out, "report.html"))
	}
	return nil
}

// writeFailed words an error while writing the outputs (exit 1).
func writeFailed(err error) error {
	return fmt.Errorf("writing the results failed: %s; nothing in --out was changed", gdalmsg.Cause(errText(err)))
}

// libraryMessages moves the messages GDAL and its libraries raised outside
// any call that reported them as errors into the run log (not the
// terminal), one line each.
func (s *session) libraryMessages() {
	msgs, dropped := gdalmsg.Drain()
	for _, m := range msgs {
		s.log.WriteString(m.String() + "\n")
	}
	if dropped > 0 {
		fmt.Fprintf(s.log, "library messages: %d more not kept\n", dropped)
	}
}

// inputPaths lists every input file, for the --out check.
func (o *RunOptions) inputPaths() []string {
	p := []string{o.Study, o.Occurrences, o.Region, o.Ecoregions}
	for _, m := range append(append([]string{}, o.Models...), o.Extra...) {
		if _, path, err := inputs.ParseNamedPath(m); err == nil {
			p = append(p, path)
		}
	}
	return p
}

// writeFamily exports the (clipped) family: extents.gpkg and, when asked,
// extents.tif.
func (s *session) writeFamily() error {
	if err := s.timed("extents.gpkg written", func() error {
		return s.fam.WriteGeoPackage(filepath.Join(s.stage, "extents.gpkg"))
	}); err != nil {
		return writeFailed(err)
	}
	if s.o.MembershipTIFF {
		if err := s.fam.WriteMembershipTIFF(filepath.Join(s.stage, "extents.tif")); err != nil {
			return writeFailed(err)
		}
	}
	return nil
}

// readInputs opens the models, checks their grids, reads the occurrences
// and the valid cells of the first model.
func (s *session) readInputs() error {
	o := s.o
	for _, m := range o.Models {
		name, path, _ := inputs.ParseNamedPath(m)
		if err := mustExist("model "+name, path); err != nil {
			return err
		}
		s.models = append(s.models, namedPath{Name: name, Path: path})
	}
	for _, m := range o.Nulls {
		name, path, _ := inputs.ParseNamedPath(m)
		if err := mustExist("null "+name, path); err != nil {
			return err
		}
		s.models = append(s.models, namedPath{Name: name, Path: path, Null: true})
	}
	for _, p := range []struct{ what, path string }{{"occurrences", o.Occurrences}, {"region", o.Region}, {"ecoregions", o.Ecoregions}} {
		if p.path != "" {
			if err := mustExist(p.what, p.path); err != nil {
				return err
			}
		}
	}
	for _, m := range o.Extra {
		name, path, _ := inputs.ParseNamedPath(m)
		if err := mustExist("extra extent "+name, path); err != nil {
			return err
		}
	}
	if len(s.models) == 0 {
		return badInput(errors.New("no model raster given (--model NAME=PATH); even 'extents' needs one for the grid"))
	}
	for i, m := range s.models {
		g, err := extent.OpenGrid(m.Path)
		if err != nil {
			return badInput(fmt.Errorf("model %s: %w", m.Name, err))
		}
		if i == 0 {
			s.grid = g
			continue
		}
		if d := s.grid.SameAs(g); d != "" {
			return badInput(fmt.Errorf("%w: %s (%s) and %s (%s) differ in %s; resample them onto one grid (e.g. gdalwarp -tr/-te)",
				extent.ErrGridsDiff, s.models[0].Name, s.models[0].Path, m.Name, m.Path, d))
		}
		g.Close()
	}
	g := s.grid
	s.res.Grid = report.Grid{Width: g.Width, Height: g.Height, GeoTransform: g.GeoTransform, CRS: g.CRS, Geographic: g.Geographic, CellAreaNote: g.AreaMethod}
	s.logf("grid: %dx%d cells, %s, %s", g.Width, g.Height, shortText(g.CRS, 40), g.AreaMethod)
	if err := s.checkMemory(); err != nil {
		return err
	}
	if err := s.timed("occurrences read, placed and sampled", s.readPoints); err != nil {
		return err
	}
	return s.timed("input checksums (SHA-256)", s.checksums)
}

func mustExist(what, path string) error {
	st, err := os.Stat(path)
	if err != nil {
		return badInput(fmt.Errorf("%s: %s does not exist or cannot be read; check the path", what, path))
	}
	if st.IsDir() && !strings.HasSuffix(strings.ToLower(path), ".gdb") {
		return badInput(fmt.Errorf("%s: %s is a directory, not a file", what, path))
	}
	return nil
}

func shortText(s string, n int) string {
	if len(s) > n {
		return s[:n] + "..."
	}
	return s
}

// readPoints reads the occurrence table, places each record on the grid,
// drops those outside the raster or on no-data, and thins duplicates.
func (s *session) readPoints() error {
	o, g := s.o, s.grid
	geographic := true
	var toLL *godal.Transform
	if o.OccurrencesCRS != "" {
		sr, err := godal.NewSpatialRef(o.OccurrencesCRS)
		if err != nil {
			return badInput(fmt.Errorf("--occurrences-crs %q is not a CRS PROJ knows: %v", o.OccurrencesCRS, err))
		}
		geographic = sr.Geographic()
		// Any CRS other than WGS84 itself is transformed, a geographic one
		// on another datum (e.g. EPSG:4258) included.
		wgs, _ := godal.NewSpatialRefFromEPSG(4326)
		if !sr.IsSame(wgs) {
			if toLL, err = godal.NewTransform(sr, wgs); err != nil {
				return badInput(fmt.Errorf("--occurrences-crs %q cannot be transformed to WGS84: %v", o.OccurrencesCRS, err))
			}
			defer toLL.Close()
		}
	}
	recs, err := inputs.ReadOccurrences(o.Occurrences, geographic)
	if err != nil {
		return badInput(err)
	}
	n := len(recs)
	// Projected coordinates that all fit in degree ranges are most likely
	// degrees given the wrong --occurrences-crs (used for a hint).
	s.rawDegrees = !geographic
	for _, r := range recs {
		if math.Abs(r.X) > 180 || math.Abs(r.Y) > 90 {
			s.rawDegrees = false
		}
	}
	lons := make([]float64, n)
	lats := make([]float64, n)
	for i, r := range recs {
		lons[i], lats[i] = r.X, r.Y
	}
	if toLL != nil {
		okv := make([]bool, n)
		if err := toLL.TransformEx(lons, lats, nil, okv); err != nil {
			return badInput(fmt.Errorf("%s: coordinates cannot be transformed from %s to WGS84: %v", o.Occurrences, o.OccurrencesCRS, err))
		}
	}
	xs := make([]float64, n)
	ys := make([]float64, n)
	g.FromLonLat(lons, lats, xs, ys)
	s.points = make([]report.Point, n)
	s.lonlat = make([]extent.LonLat, n)
	s.cell = make([]int, n)
	for i, r := range recs {
		p := report.Point{ID: r.Line, Role: string(r.Role), Lon: round6(lons[i]), Lat: round6(lats[i]), Row: -1, Col: -1, Status: report.PointScored}
		s.lonlat[i] = extent.LonLat{Lon: lons[i], Lat: lats[i]}
		s.cell[i] = -1
		if col, row, ok := g.CellOf(xs[i], ys[i]); ok {
			p.Row, p.Col = row, col
			s.cell[i] = row*g.Width + col
		} else {
			p.Status = report.PointOutsideRaster
		}
		s.points[i] = p
	}
	// Points on no-data of the reference (first) model, from point reads.
	// A run learns the valid cells in its first scoring pass; 'extents',
	// which scores nothing, reads them once here.
	r, err := pass.Open(s.models[0].Path)
	if err != nil {
		return badInput(err)
	}
	defer r.Close()
	_, pointValid, err := r.Sample(g, s.cell)
	if err != nil {
		return badInput(err)
	}
	if o.ExtentsOnly {
		bar := s.progress("reading "+s.models[0].Name+" (valid cells)", r.Blocks())
		s.valid, err = r.ReadValid(g, bar.update)
		bar.finish()
		if err != nil {
			return badInput(err)
		}
	}
	var outside, nodata []string
	for i := range s.points {
		p := &s.points[i]
		if p.Status == report.PointOutsideRaster {
			outside = append(outside, fmt.Sprintf("line %d (%.5f, %.5f)", p.ID, p.Lon, p.Lat))
			s.cell[i] = -1
			continue
		}
		if !pointValid[i] {
			p.Status = report.PointNoData
			nodata = append(nodata, fmt.Sprintf("line %d (%.5f, %.5f)", p.ID, p.Lon, p.Lat))
			s.cell[i] = -1
		}
	}
	if len(outside) > 0 {
		s.warn(fmt.Sprintf("%d occurrence(s) outside the raster, not scored: %s", len(outside), listSome(outside, 10)))
	}
	if len(nodata) > 0 {
		s.warn(fmt.Sprintf("%d occurrence(s) on no-data cells of %s, not scored: %s", len(nodata), s.models[0].Name, listSome(nodata, 10)))
	}
	// Thinning: one presence per cell and role, the first line kept.
	if !o.NoThin {
		seen := map[[2]int]int{}
		thinned := 0
		var pairs []string
		for i := range s.points {
			p := &s.points[i]
			if s.cell[i] < 0 {
				continue
			}
			key := [2]int{s.cell[i], roleIndex(p.Role)}
			if first, dup := seen[key]; dup {
				p.Status = report.PointThinned
				thinned++
				pairs = append(pairs, fmt.Sprintf("line %d shares a cell with line %d (%s)", p.ID, s.points[first].ID, p.Role))
				s.cell[i] = -1
				continue
			}
			seen[key] = i
		}
		if thinned > 0 {
			s.logf("thinned: %s", listSome(pairs, 10))
			s.warn(fmt.Sprintf("%d duplicate presence(s) in an occupied cell thinned to one per cell and role (common practice; --no-thin keeps them)", thinned))
		}
	}
	c := &s.res.PointCounts
	for _, p := range s.points {
		switch p.Status {
		case report.PointScored:
			if p.Role == "train" {
				c.Train++
			} else {
				c.Test++
			}
		case report.PointThinned:
			c.Thinned++
		case report.PointOutsideRaster:
			c.OutsideRaster++
		case report.PointNoData:
			c.NoData++
		}
	}
	if c.Test == 0 {
		return badInput(s.noTestPoint(r))
	}
	if c.Train == 0 {
		s.warn("no training point falls on a valid cell; training-presence thresholds, hulls, point buffers and ecoregion extents are skipped")
	}
	s.logf("occurrences: %d training and %d test points scored (%d thinned, %d outside the raster, %d on no-data)", c.Train, c.Test, c.Thinned, c.OutsideRaster, c.NoData)
	return nil
}

// noTestPoint explains why no test point can be scored, blaming the input
// that is at fault: a raster without data, points outside the raster (with
// a hint when degrees were given a projected --occurrences-crs, or the
// other way round), or test points on no-data cells.
func (s *session) noTestPoint(r *pass.Raster) error {
	o, c := s.o, s.res.PointCounts
	if c.NoData > 0 {
		if _, _, ok, err := r.ExactRange(); err == nil && !ok {
			return fmt.Errorf("model %s: %w: every cell of %s is no data (the band's nodata value, NaN or infinite); check the file, or its nodata setting (gdalinfo)", s.models[0].Name, pass.ErrNoData, r.Path)
		}
	}
	msg := fmt.Sprintf("%s: no test point falls on a cell with data of %s (%s); nothing can be scored", o.Occurrences, s.models[0].Name, s.models[0].Path)
	if c.OutsideRaster > 0 && c.NoData == 0 && c.Thinned == 0 {
		msg = fmt.Sprintf("%s: every point lies outside the raster %s; nothing can be scored", o.Occurrences, s.models[0].Path)
		if o.OccurrencesCRS != "" && s.rawDegrees {
			msg += fmt.Sprintf(". The coordinates look like degrees but --occurrences-crs is %s: if they are longitude/latitude, leave --occurrences-crs out", o.OccurrencesCRS)
		} else if o.OccurrencesCRS == "" && !s.grid.Geographic {
			msg += "; the raster is projected: if the table holds projected coordinates, give their CRS with --occurrences-crs (e.g. EPSG:3035)"
		} else {
			msg += "; check that the points and the raster cover the same area"
		}
	}
	return errors.New(msg)
}

func roleIndex(r string) int {
	if r == "train" {
		return 0
	}
	return 1
}

func listSome(items []string, n int) string {
	if len(items) <= n {
		return strings.Join(items, "; ")
	}
	return strings.Join(items[:n], "; ") + fmt.Sprintf("; and %d more (see results.json points)", len(items)-n)
}

func round6(v float64) float64 { return math.Round(v*1e6) / 1e6 }

// checksums records the SHA-256 of every input file.
func (s *session) checksums() error {
	o := s.o
	add := func(role, path string) error {
		sum, err := fileSHA256(path)
		if err != nil {
			return badInput(fmt.Errorf("%s: %w", role, err))
		}
		s.res.Inputs = append(s.res.Inputs, report.Input{Role: role, Path: s.recordedPath(path), SHA256: sum})
		return nil
	}
	for _, m := range s.models {
		role := "model:" + m.Name
		if m.Null {
			role = "null:" + m.Name
		}
		if err := add(role, m.Path); err != nil {
			return err
		}
	}
	if err := add("occurrences", o.Occurrences); err != nil {
		return err
	}
	if err := add("region", o.Region); err != nil {
		return err
	}
	if o.Ecoregions != "" {
		if err := add("ecoregions", o.Ecoregions); err != nil {
			return err
		}
	}
	for _, m := range o.Extra {
		name, path, _ := inputs.ParseNamedPath(m)
		if err := add("extra:"+name, path); err != nil {
			return err
		}
	}
	return nil
}

func fileSHA256(path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", fmt.Errorf("read %s: %w", path, err)
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// scoredPoints returns lon/lat and cells of the scored points of role.
func (s *session) scoredPoints(role string) ([]extent.LonLat, []int, []int) {
	var ll []extent.LonLat
	var cells, idx []int
	for i, p := range s.points {
		if p.Status == report.PointScored && p.Role == role {
			ll = append(ll, s.lonlat[i])
			cells = append(cells, s.cell[i])
			idx = append(idx, i)
		}
	}
	return ll, cells, idx
}

// buildFamily builds the extent family and fills Results.Extents.
func (s *session) buildFamily() error {
	o := s.o
	train, trainCells, _ := s.scoredPoints("train")
	test, testCells, _ := s.scoredPoints("test")
	spec := extent.Spec{
		Region:             o.Region,
		RegionBuffersKm:    o.RegionBuffers,
		Train:              train,
		Test:               test,
		PointBuffersAll:    o.PointBuffersAll,
		Ecoregions:         o.Ecoregions,
		EcoregionField:     o.EcoregionField,
		EcoregionMinPoints: o.EcoregionMinPoints,
		EcoregionClip:      o.EcoregionClip,
	}
	if len(train) > 0 {
		spec.PointBuffersKm = o.PointBuffers
		spec.HullBuffersKm = o.HullBuffers
	} else {
		spec.Ecoregions = ""
	}
	for _, m := range o.Extra {
		name, path, _ := inputs.ParseNamedPath(m)
		spec.Extra = append(spec.Extra, extent.Named{Name: name, Path: path})
	}
	s.logf("building the extent family")
	t0 := time.Now()
	fam, err := extent.Build(s.grid, s.valid, spec, trainCells, testCells)
	if err != nil {
		// Every failure here comes from the region, point or polygon inputs
		// or from settings asking for too many extents.
		return badInput(err)
	}
	s.logf("extent family: %d members built in %.2f s", len(fam.Members), time.Since(t0).Seconds())
	s.fam = fam
	for _, w := range fam.Warnings {
		s.warn(w)
	}
	s.nWarn = len(fam.Warnings)
	if fam.Members[0].Cells == 0 {
		return badInput(fmt.Errorf("%w: %s covers no cell of %s; check that both are in the same area and CRS", extent.ErrNoOverlap, o.Region, s.models[0].Path))
	}
	if s.valid != nil {
		if err := s.recordExtents(); err != nil {
			return err
		}
	}
	s.res.Settings = report.Settings{
		RegionBuffersKm: nonNil(o.RegionBuffers), PointBuffersKm: nonNil(spec.PointBuffersKm), PointBufferAll: o.PointBuffersAll,
		HullBuffersKm: nonNil(spec.HullBuffersKm), EcoregionMinPoints: o.EcoregionMinPoints, EcoregionField: o.EcoregionField,
		E: nonNil(o.E), Iterations: o.Iterations, ResampleFraction: o.Fraction, FixedThresholds: nonNil(o.Thresholds),
		ThinPerCell: !o.NoThin, BoyceWindow: 0.1, BoyceSteps: 100, PairedResamples: o.Iterations,
		ToleranceAUC: o.ToleranceAUC, TolerancePartialROC: o.TolerancePartialROC, ToleranceOmission: o.ToleranceOmission, ToleranceBoyce: o.ToleranceBoyce,
		EcoregionClip: o.EcoregionClip, OccurrencesCRS: o.OccurrencesCRS, Extra: []string{},
	}
	for _, m := range o.Extra {
		name, path, _ := inputs.ParseNamedPath(m)
		s.res.Settings.Extra = append(s.res.Settings.Extra, name+"="+s.recordedPath(path))
	}
	return nil
}

// clip restricts the family to the valid cells found by the first model's
// pass and records it.
func (s *session) clip(valid extent.Valid) error {
	_, trainCells, _ := s.scoredPoints("train")
	_, testCells, _ := s.scoredPoints("test")
	s.valid = valid
	s.fam.Clip(valid, trainCells, testCells)
	for _, w := range s.fam.Warnings[s.nWarn:] {
		s.warn(w)
	}
	s.nWarn = len(s.fam.Warnings)
	return s.recordExtents()
}

// recordExtents copies the (clipped) family into Results.Extents.
func (s *session) recordExtents() error {
	fam := s.fam
	if fam.Members[0].Cells == 0 {
		return badInput(fmt.Errorf("%w: %s covers no valid cell of %s; check that both are in the same area and CRS", extent.ErrNoOverlap, s.o.Region, s.models[0].Path))
	}
	s.res.Extents = s.res.Extents[:0]
	for _, m := range fam.Members {
		s.res.Extents = append(s.res.Extents, report.Extent{
			ID: m.ID, Kind: m.Kind, Params: m.Params, Cells: m.Cells, AreaKm2: m.AreaKm2,
			TrainPoints: m.TrainPoints, TestPoints: m.TestPoints, ShareOfRaster: m.Share,
			Status: report.ExtentStatus(m.Status), DuplicateOf: m.DuplicateOf, Chain: m.Chain,
		})
		s.logf("extent %-28s %-14s %10d cells %14.1f km2  train %4d  test %4d  %s", m.ID, m.Kind, m.Cells, m.AreaKm2, m.TrainPoints, m.TestPoints, m.Status)
	}
	return nil
}

func nonNil(v []float64) []float64 {
	if v == nil {
		return []float64{}
	}
	return v
}

// deriveSeed gives each model x extent its own bootstrap stream, fixed by
// the run seed and the names alone (not by order or core count).
func deriveSeed(seed uint64, model, ext string) uint64 {
	h := fnv.New64a()
	var b [8]byte
	binary.LittleEndian.PutUint64(b[:], seed)
	h.Write(b[:])
	h.Write([]byte(model))
	h.Write([]byte{0})
	h.Write([]byte(ext))
	return h.Sum64()
}
