package pipeline

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"

	"areasweep/cmd/internal/fault"
	"areasweep/cmd/internal/inputs"
	"areasweep/cmd/internal/settings"
	"areasweep/cmd/internal/shardfile"
	"areasweep/extent"
	"areasweep/extent/vocab"
	"areasweep/metrics"
	"areasweep/report/outfile"
)

// ShardFileName is the name of the partial file shard i of n writes into
// its output folder.
func ShardFileName(i, n int) string { return fmt.Sprintf("shard-%d-of-%d.aspf", i, n) }

// ShardLogName is the name of the log shard i of n writes beside its
// partial file.
func ShardLogName(i, n int) string { return fmt.Sprintf("shard-%d-of-%d.log", i, n) }

// shardFiles are the names a shard's run writes into its --out (its
// partial file and log), nil for a run that is not a shard's.
func (s *Study) shardFiles() []string {
	i, n := s.o.Shard[0], s.o.Shard[1]
	if n == 0 {
		return nil
	}
	return []string{ShardFileName(i, n), ShardLogName(i, n)}
}

// recordedRun is what a shard records of its Options so that a merge can
// prepare the very same run: every input path and every setting that
// changes an output. The paths are as given (results.json records them
// so); settingsHash leaves them out.
type recordedRun struct {
	Models              []string  `json:"models"`
	Nulls               []string  `json:"nulls"`
	NoDistanceNull      bool      `json:"no_distance_null"`
	Occurrences         string    `json:"occurrences"`
	OccurrencesCRS      string    `json:"occurrences_crs"`
	Region              string    `json:"region"`
	Ecoregions          string    `json:"ecoregions"`
	EcoregionField      string    `json:"ecoregion_field"`
	EcoregionMinPoints  int       `json:"ecoregion_min_points"`
	EcoregionClip       bool      `json:"ecoregion_clip"`
	Extra               []string  `json:"extra"`
	RegionBuffers       []float64 `json:"region_buffers"`
	PointBuffers        []float64 `json:"point_buffers"`
	PointBuffersAll     bool      `json:"point_buffers_all"`
	HullBuffers         []float64 `json:"hull_buffers"`
	E                   []float64 `json:"e"`
	Iterations          int       `json:"iterations"`
	Fraction            float64   `json:"fraction"`
	Thresholds          []float64 `json:"thresholds"`
	Seed                uint64    `json:"seed"`
	NoThin              bool      `json:"no_thin"`
	MembershipTIFF      bool      `json:"membership_tif"`
	ToleranceAUC        float64   `json:"tolerance_auc"`
	TolerancePartialROC float64   `json:"tolerance_partial_roc"`
	ToleranceOmission   float64   `json:"tolerance_omission"`
	ToleranceBoyce      float64   `json:"tolerance_boyce"`
	// Dir is the folder the shard ran in, from which its relative input
	// paths are read: named by a merge that cannot find them or finds
	// other files there. Not compared (shards given absolute paths may
	// run anywhere), not a setting.
	Dir string `json:"dir,omitempty"`
}

func recordRun(o *Options) recordedRun {
	return recordedRun{Models: o.Models, Nulls: o.Nulls, NoDistanceNull: o.NoDistanceNull, Occurrences: o.Occurrences,
		OccurrencesCRS: o.OccurrencesCRS, Region: o.Region, Ecoregions: o.Ecoregions, EcoregionField: o.EcoregionField,
		EcoregionMinPoints: o.EcoregionMinPoints, EcoregionClip: o.EcoregionClip, Extra: o.Extra, RegionBuffers: o.RegionBuffers,
		PointBuffers: o.PointBuffers, PointBuffersAll: o.PointBuffersAll, HullBuffers: o.HullBuffers, E: o.E, Iterations: o.Iterations,
		Fraction: o.Fraction, Thresholds: o.Thresholds, Seed: o.Seed, NoThin: o.NoThin, MembershipTIFF: o.MembershipTIFF,
		ToleranceAUC: o.ToleranceAUC, TolerancePartialROC: o.TolerancePartialROC, ToleranceOmission: o.ToleranceOmission, ToleranceBoyce: o.ToleranceBoyce}
}

// apply copies the recorded run into o (the merge's own output settings
// are left alone).
func (r recordedRun) apply(o *Options) {
	o.Models, o.Nulls, o.NoDistanceNull, o.Occurrences = r.Models, r.Nulls, r.NoDistanceNull, r.Occurrences
	o.OccurrencesCRS, o.Region, o.Ecoregions, o.EcoregionField = r.OccurrencesCRS, r.Region, r.Ecoregions, r.EcoregionField
	o.EcoregionMinPoints, o.EcoregionClip, o.Extra, o.RegionBuffers = r.EcoregionMinPoints, r.EcoregionClip, r.Extra, r.RegionBuffers
	o.PointBuffers, o.PointBuffersAll, o.HullBuffers, o.E, o.Iterations = r.PointBuffers, r.PointBuffersAll, r.HullBuffers, r.E, r.Iterations
	o.Fraction, o.Thresholds, o.Seed, o.NoThin, o.MembershipTIFF = r.Fraction, r.Thresholds, r.Seed, r.NoThin, r.MembershipTIFF
	o.ToleranceAUC, o.TolerancePartialROC, o.ToleranceOmission, o.ToleranceBoyce = r.ToleranceAUC, r.TolerancePartialROC, r.ToleranceOmission, r.ToleranceBoyce
}

// settingsHash is the hex SHA-256 of the run's canonical settings: the
// recorded run as JSON (fields in a fixed order, numbers in Go's shortest
// exact form) with every path left out, so that shards run from other
// folders or machines still match. The inputs themselves are compared by
// checksum (ShardHeader.Inputs), the seed on its own.
func (r recordedRun) settingsHash() string {
	sum := sha256.Sum256(r.canonical())
	return hex.EncodeToString(sum[:])
}

// canonical is the JSON the settings hash is taken of: the run as
// compared (compared).
func (r recordedRun) canonical() []byte {
	b, _ := json.Marshal(r.compared()) // plain values: cannot fail
	return b
}

// compared is the run as shards are compared: input paths left out (the
// names of NAME=PATH items kept), and the seed (compared on its own,
// ShardHeader.Seed).
func (r recordedRun) compared() recordedRun {
	names := func(items []string) []string {
		out := []string{}
		for _, it := range items {
			name, _, _ := inputs.ParseNamedPath(it)
			out = append(out, name)
		}
		return out
	}
	c := r
	c.Models, c.Nulls, c.Extra = names(r.Models), names(r.Nulls), names(r.Extra)
	c.Occurrences, c.Region, c.Ecoregions = "", "", ""
	c.Seed = 0
	c.Dir = ""
	return c
}

// settingsDiff names the settings in which two recorded runs (partial
// files' run sections) differ, as compared (compared), "iterations 200
// vs 300" (settings.Changes, in the settings table's order); "" when they
// cannot be read or do not differ.
func settingsDiff(a, b []byte) string {
	var ra, rb recordedRun
	if json.Unmarshal(a, &ra) != nil || json.Unmarshal(b, &rb) != nil {
		return ""
	}
	var oa, ob Options
	ra.compared().apply(&oa)
	rb.compared().apply(&ob)
	var diffs []string
	for _, c := range settings.Changes(&oa.Values, &ob.Values) {
		diffs = append(diffs, c.Name+" "+c.A+" vs "+c.B)
	}
	return strings.Join(diffs, ", ")
}

// shardHeader is the partial-file header of shard i of n of the prepared
// study s.
func (s *Study) shardHeader(i, n int, blocks []metrics.BlockRange) metrics.ShardHeader {
	h := metrics.ShardHeader{Tool: ToolID(s.o.Version, s.o.Build), Settings: recordRun(s.o).settingsHash(), Seed: s.o.Seed,
		Shard: i, Shards: n, TotalBlocks: s.grid.Height, Blocks: blocks}
	for _, in := range s.res.Inputs {
		h.Inputs = append(h.Inputs, metrics.InputChecksum{Name: in.Role, SHA256: in.SHA256, Sidecars: sidecarsDigest(in)})
	}
	return h
}

// RunShard runs shard i of n of the study o. It prepares exactly as Run
// does (inputs, grid, points, output folder, family), then runs every
// pass over the shard's rows of the grid only (shardfile.Rows) and writes
// what a merge needs into o.Out: the partial file ShardFileName(i, n) and
// the log ShardLogName(i, n). It scores nothing: Merge does, once every
// shard has run.
//
// After the first pass the family is clipped as far as the shard can know
// it: to the valid cells found in its rows, every cell of the other rows
// kept. A member that is ok in the whole run is then ok here too, with
// exactly its cells in the shard's rows, so its sums over those rows are
// the single run's; members that only look ok here are dropped by the
// merge's own clip.
func RunShard(ctx context.Context, o Options, io IO, i, n int) error {
	if o.ExtentsOnly {
		return fault.BadInput(fmt.Errorf("a shard splits the scoring passes; an extents-only run scores nothing"))
	}
	if n < 1 || i < 1 || i > n {
		return fault.BadInput(fmt.Errorf("--shard %d/%d: give I/N with 1 <= I <= N", i, n))
	}
	// The merge reads every input again: one it cannot (a pipe) is
	// refused before the shard's work.
	for _, p := range o.InputPaths() {
		if p == "" {
			continue
		}
		if err := notRereadable(p); err != nil {
			return fault.BadInput(fmt.Errorf("--shard: %w", err))
		}
	}
	o.Shard = [2]int{i, n}
	s, err := Prepare(ctx, o, io, nil)
	if err != nil {
		return err
	}
	defer s.Close()
	s.dir.Shard = true
	blocks, rows := shardfile.Rows(i, n, s.grid.Height)
	s.rows = &rows
	if rows.End > rows.First {
		s.logf("shard %d of %d: grid rows %d to %d (of %d rows)", i, n, rows.First, rows.End-1, s.grid.Height)
	} else {
		s.logf("shard %d of %d: no grid row (more shards than the grid's %d rows); the partial file holds empty sums", i, n, s.grid.Height)
	}
	sh := &shardfile.Shard{Header: s.shardHeader(i, n, blocks), Width: s.grid.Width, Height: s.grid.Height}
	run := recordRun(s.o)
	if wd, werr := os.Getwd(); werr == nil {
		run.Dir = wd
	}
	if sh.Run, err = json.Marshal(run); err != nil {
		return fault.Internal(err)
	}
	for _, m := range s.fam.Members {
		sh.Members = append(sh.Members, m.ID)
	}
	for k := range s.Passes() {
		if err := s.shardPass(ctx, k, sh); err != nil {
			return err
		}
	}
	data, err := shardfile.Encode(sh)
	if err != nil {
		return fault.Internal(err)
	}
	if err := outfile.Write(filepath.Join(s.stage, ShardFileName(i, n)), data, 0o666); err != nil {
		return s.writeFailed(err)
	}
	s.libraryMessages()
	s.logf("shard finished in %.2f s (before moving the partial file into place)", time.Since(s.start).Seconds())
	if err := outfile.Write(filepath.Join(s.stage, ShardLogName(i, n)), []byte(s.log.String()), 0o666); err != nil {
		return s.writeFailed(err)
	}
	if err := s.seal(); err != nil {
		return err
	}
	return s.dir.Finish()
}

// shardPass runs pass k over the shard's rows and records its sums in sh;
// after the first pass it clips the family as far as the shard knows it.
func (s *Study) shardPass(ctx context.Context, k int, sh *shardfile.Shard) error {
	p, err := s.Plan(k)
	if err != nil || p == nil {
		return err
	}
	defer p.Close()
	sums, err := s.Stream(ctx, p)
	if err != nil {
		return err
	}
	if sums.Valid != nil {
		sh.Valid = shardfile.ValidRuns(sums.Valid, *s.rows)
		sh.PreviewWidth, sh.PreviewHeight = sums.Preview.Width, sums.Preview.Height
		sh.Preview = shardfile.PreviewCells(sums.Preview)
		s.timed("family clipped as far as the shard's rows tell", func() error { s.shardClip(sums.Valid); return nil })
	}
	sh.Passes = append(sh.Passes, shardfile.Pass{Name: p.Model.Name, Layout: p.Layout, Accs: sums.Accs, Stats: sums.Stats})
	if p.null != nil {
		sh.Background = &p.null.bg
	}
	return nil
}

// shardClip clips the family to found, the valid cells the first pass
// met in the shard's rows, keeping every cell of the other rows (see
// RunShard).
func (s *Study) shardClip(found *extent.Valid) {
	g := s.grid
	v := extent.NewValid(g.Width, g.Height)
	all := []int32{0, int32(g.Width)}
	for row := 0; row < g.Height; row++ {
		if row >= s.rows.First && row < s.rows.End {
			v.SetRow(row, found.Row(row, nil))
		} else {
			v.SetRow(row, all)
		}
	}
	_, trainCells, _ := s.scoredPoints(vocab.RoleTrain)
	_, testCells, _ := s.scoredPoints(vocab.RoleTest)
	s.valid = v
	s.fam.Clip(v, trainCells, testCells)
}
