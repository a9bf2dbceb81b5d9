package shardfile

import (
	"fmt"
	"math"
	"slices"

	"areasweep/extent"
	"areasweep/extent/nullmodel"
	"areasweep/metrics"
)

// Merged is the sum of shards of one run, added one at a time with Add.
type Merged struct {
	// Width, Height and Members are those of every shard.
	Width, Height int
	Members       []string
	// Valid holds a bit per valid cell in some member, over every shard's
	// rows.
	Valid *extent.Valid
	// Preview holds the preview values (NaN where no shard set one).
	PreviewWidth, PreviewHeight int
	Preview                     []float64
	// Passes hold, per pass, the merged accumulators and statistics (the
	// Layout of the first shard, which every shard must match).
	Passes []Pass
	// Background is the merged sorting-bias tally, nil without the null.
	Background *nullmodel.Background
	// Run is the first shard's recorded options.
	Run []byte
	// Shards counts the shards added.
	Shards int
}

// Add merges shard s into m. The first shard fixes the grid, members,
// passes, layouts and preview size; a later shard that differs in any of
// them is refused (a *metrics.ShardError naming its source, wrapping
// metrics.ErrShardMismatch). Add does not check that the shards are one
// complete set: metrics.CheckShardSet on the headers does.
func (m *Merged) Add(s *Shard) error {
	bad := func(format string, a ...any) error {
		return &metrics.ShardError{Source: s.Header.Source, Err: metrics.ErrShardMismatch, Detail: fmt.Sprintf(format, a...)}
	}
	if m.Shards == 0 {
		m.Width, m.Height, m.Members = s.Width, s.Height, s.Members
		m.PreviewWidth, m.PreviewHeight = s.PreviewWidth, s.PreviewHeight
		m.Valid = extent.NewValid(s.Width, s.Height)
		m.Preview = make([]float64, s.PreviewWidth*s.PreviewHeight)
		for i := range m.Preview {
			m.Preview[i] = math.NaN()
		}
		m.Run = s.Run
		for _, p := range s.Passes {
			q := Pass{Name: p.Name, Layout: p.Layout}
			for range p.Accs {
				q.Accs = append(q.Accs, p.Layout.NewAccumulator())
			}
			m.Passes = append(m.Passes, q)
		}
		if s.Background != nil {
			m.Background = &nullmodel.Background{}
		}
	}
	switch {
	case s.Width != m.Width || s.Height != m.Height:
		return bad("grid %d x %d, the first shard's is %d x %d", s.Width, s.Height, m.Width, m.Height)
	case !slices.Equal(s.Members, m.Members):
		return bad("its extents differ from the first shard's")
	case s.PreviewWidth != m.PreviewWidth || s.PreviewHeight != m.PreviewHeight:
		return bad("preview size differs from the first shard's")
	case len(s.Passes) != len(m.Passes):
		return bad("%d passes, the first shard has %d", len(s.Passes), len(m.Passes))
	case (s.Background == nil) != (m.Background == nil):
		return bad("the distance-only null's background is in one shard only")
	}
	for i, p := range s.Passes {
		q := &m.Passes[i]
		if p.Name != q.Name || p.Layout.Fingerprint() != q.Layout.Fingerprint() || len(p.Accs) != len(q.Accs) {
			return bad("pass %d (%s) differs from the first shard's (%s): name or layout", i+1, p.Name, q.Name)
		}
		for k, a := range p.Accs {
			// Bring the accumulator onto the merged layout object (same
			// fingerprint, so it decodes).
			if a.Layout() != q.Layout {
				var err error
				if a, err = Rebase(a, q.Layout); err != nil {
					return bad("pass %d (%s), extent %s: %v", i+1, p.Name, m.Members[k], err)
				}
			}
			if err := q.Accs[k].Merge(a); err != nil {
				return bad("pass %d (%s), extent %s: %v", i+1, p.Name, m.Members[k], err)
			}
		}
		q.Stats.Merge(p.Stats)
	}
	rows := s.Rows()
	for i, runs := range s.Valid {
		if err := m.Valid.AddRow(rows.First+i, runs); err != nil {
			return bad("%v", err)
		}
	}
	for _, c := range s.Preview {
		if !math.IsNaN(m.Preview[c.Index]) {
			return bad("preview cell %d is in another shard too", c.Index)
		}
		m.Preview[c.Index] = c.Value
	}
	if s.Background != nil {
		if err := m.Background.Merge(s.Background); err != nil {
			return bad("%v", err)
		}
	}
	m.Shards++
	return nil
}

// Rebase returns a copy of a made on layout l, which must have a's
// layout's fingerprint (the same values and histogram): a merged
// accumulator moved onto the layout a merge makes for itself.
func Rebase(a *metrics.Accumulator, l *metrics.Layout) (*metrics.Accumulator, error) {
	return metrics.DecodeAccumulator(metrics.EncodeAccumulator(a), l)
}
