package shardfile

import (
	"encoding/binary"
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"

	"areasweep/cmd/internal/pass"
	"areasweep/extent"
	"areasweep/extent/nullmodel"
	"areasweep/metrics"
)

// Pass is one scoring pass of a shard: a model, a user null or the
// distance-only null.
type Pass struct {
	// Name is the model's name.
	Name string
	// Layout is the layout the accumulators were made on: the model's
	// values at the points and the fixed thresholds, with no value range,
	// so every shard makes the same one without reading the raster.
	Layout *metrics.Layout
	// Accs holds one accumulator per family member, on Layout; each fine
	// histogram sits on the dyadic grid of its own cells' range.
	Accs []*metrics.Accumulator
	// Stats are the pass statistics over the shard's rows (AnyValid: some
	// cell of those rows has data).
	Stats pass.Stats
}

// Shard is the content of one shard's partial file (see the package
// comment).
type Shard struct {
	// Header identifies the run and the shard; Blocks is the one range of
	// rows, TotalBlocks the grid height.
	Header metrics.ShardHeader
	// Run is the run's recorded options, as JSON; the caller defines it.
	Run json.RawMessage
	// Width and Height are the grid's size in cells.
	Width, Height int
	// Members are the family's member ids, in family order.
	Members []string
	// Valid holds, per row of the shard (Rows().First + i), the runs
	// c0, c1, ... of valid cells in some member: ascending, disjoint, not
	// touching, inside [0, Width).
	Valid [][]int32
	// PreviewWidth and PreviewHeight size the preview; Preview holds the
	// preview cells the shard's rows set (index into the preview, value).
	PreviewWidth, PreviewHeight int
	Preview                     []PreviewCell
	// Passes are the run's passes in order.
	Passes []Pass
	// Background is the distance-only null's sorting-bias tally (nil when
	// the run has no such null).
	Background *nullmodel.Background
}

// PreviewCell is one preview cell's value.
type PreviewCell struct {
	Index int
	Value float64
}

// Rows returns the shard's rows.
func (s *Shard) Rows() pass.RowRange {
	if len(s.Header.Blocks) == 0 {
		return pass.RowRange{}
	}
	return pass.RowRange{First: s.Header.Blocks[0].First, End: s.Header.Blocks[0].End}
}

// Rows returns shard i of n's share of a grid of height rows, as a header's
// block ranges (metrics.ShardBlocks over the rows) and as a row range
// (empty when the shard has no row: more shards than rows).
func Rows(i, n, height int) ([]metrics.BlockRange, pass.RowRange) {
	b := metrics.ShardBlocks(i, n, height)
	if len(b) == 0 {
		return b, pass.RowRange{}
	}
	return b, pass.RowRange{First: b[0].First, End: b[0].End}
}

// ValidRuns returns the runs of valid cells of v in each row of rows.
func ValidRuns(v *extent.Valid, rows pass.RowRange) [][]int32 {
	out := make([][]int32, 0, max(0, rows.End-rows.First))
	for row := rows.First; row < rows.End; row++ {
		out = append(out, v.Row(row, nil))
	}
	return out
}

// PreviewCells returns the preview cells of pv that hold a value.
func PreviewCells(pv *pass.Preview) []PreviewCell {
	var out []PreviewCell
	for i, v := range pv.Values {
		if !math.IsNaN(v) {
			out = append(out, PreviewCell{i, v})
		}
	}
	return out
}

// meta is the JSON section that describes the binary ones.
type meta struct {
	Width         int        `json:"width"`
	Height        int        `json:"height"`
	Members       []string   `json:"members"`
	Passes        []passMeta `json:"passes"`
	PreviewWidth  int        `json:"preview_width"`
	PreviewHeight int        `json:"preview_height"`
	Background    bool       `json:"background"`
}

type passMeta struct {
	Name string `json:"name"`
}

// Section names.
const (
	secMeta       = "meta"
	secRun        = "run"
	secValid      = "valid"
	secPreview    = "preview"
	secBackground = "background"
)

func passSection(p int, what string) string { return "pass/" + strconv.Itoa(p) + "/" + what }
func accSection(p, k int) string            { return passSection(p, "acc/"+strconv.Itoa(k)) }

// Encode returns the partial file of s (metrics.EncodePartial). Empty
// accumulators are left out (a missing one reads back empty).
func Encode(s *Shard) ([]byte, error) {
	m := meta{Width: s.Width, Height: s.Height, Members: s.Members, PreviewWidth: s.PreviewWidth, PreviewHeight: s.PreviewHeight, Background: s.Background != nil}
	for _, p := range s.Passes {
		m.Passes = append(m.Passes, passMeta{Name: p.Name})
	}
	mj, err := json.Marshal(m)
	if err != nil {
		return nil, fmt.Errorf("shardfile: encoding the description: %w", err)
	}
	pf := &metrics.PartialFile{Header: s.Header}
	add := func(name string, data []byte) {
		pf.Sections = append(pf.Sections, metrics.PartialSection{Name: name, Data: data})
	}
	add(secMeta, mj)
	add(secRun, s.Run)
	add(secValid, encodeValid(s.Valid))
	add(secPreview, encodePreview(s.Preview))
	for i, p := range s.Passes {
		add(passSection(i, "layout"), metrics.EncodeLayout(p.Layout))
		add(passSection(i, "stats"), encodeStats(p.Stats))
		for k, a := range p.Accs {
			if a.Cells() > 0 || a.Skipped() > 0 {
				add(accSection(i, k), metrics.EncodeAccumulator(a))
			}
		}
	}
	if s.Background != nil {
		add(secBackground, nullmodel.EncodeBackground(s.Background))
	}
	return metrics.EncodePartial(pf)
}

// Decode reads a partial file written by Encode; source (the file's name)
// is used in messages. Every section is decoded and checked: the header
// (metrics.DecodePartial), the description, the valid runs against the
// shard's rows and the grid width, each layout, each accumulator on its
// layout, the statistics, the preview cells and the background. Errors
// are *metrics.ShardError naming source.
func Decode(data []byte, source string) (*Shard, error) {
	pf, err := metrics.DecodePartial(data, source)
	if err != nil {
		return nil, err
	}
	bad := func(format string, a ...any) error {
		return &metrics.ShardError{Source: source, Err: metrics.ErrPartialFormat, Detail: fmt.Sprintf(format, a...)}
	}
	section := func(name string) ([]byte, error) {
		d, ok := pf.Section(name)
		if !ok {
			return nil, bad("section %q is missing", name)
		}
		return d, nil
	}
	s := &Shard{Header: pf.Header}
	mj, err := section(secMeta)
	if err != nil {
		return nil, err
	}
	var m meta
	dec := json.NewDecoder(strings.NewReader(string(mj)))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&m); err != nil {
		return nil, bad("description: %v", err)
	}
	if m.Width < 1 || m.Height < 1 || m.Height != s.Header.TotalBlocks || len(s.Header.Blocks) > 1 {
		return nil, bad("grid %d x %d does not match the header's %d rows in %d range(s)", m.Width, m.Height, s.Header.TotalBlocks, len(s.Header.Blocks))
	}
	if len(m.Members) == 0 || len(m.Members) > extent.MaxMembers {
		return nil, bad("%d extents; a family holds 1 to %d", len(m.Members), extent.MaxMembers)
	}
	if m.PreviewWidth < 0 || m.PreviewHeight < 0 || m.PreviewWidth > m.Width || m.PreviewHeight > m.Height {
		return nil, bad("preview %d x %d does not fit the grid", m.PreviewWidth, m.PreviewHeight)
	}
	s.Width, s.Height, s.Members = m.Width, m.Height, m.Members
	s.PreviewWidth, s.PreviewHeight = m.PreviewWidth, m.PreviewHeight
	if s.Run, err = section(secRun); err != nil {
		return nil, err
	}
	d, err := section(secValid)
	if err != nil {
		return nil, err
	}
	if s.Valid, err = decodeValid(d, s.Rows(), s.Width); err != nil {
		return nil, bad("valid cells: %v", err)
	}
	if d, err = section(secPreview); err != nil {
		return nil, err
	}
	if s.Preview, err = decodePreview(d, s.PreviewWidth*s.PreviewHeight); err != nil {
		return nil, bad("preview: %v", err)
	}
	for i, pm := range m.Passes {
		p := Pass{Name: pm.Name}
		if d, err = section(passSection(i, "layout")); err != nil {
			return nil, err
		}
		if p.Layout, err = metrics.DecodeLayout(d); err != nil {
			return nil, bad("pass %d (%s): %v", i+1, p.Name, err)
		}
		if d, err = section(passSection(i, "stats")); err != nil {
			return nil, err
		}
		if p.Stats, err = decodeStats(d); err != nil {
			return nil, bad("pass %d (%s) statistics: %v", i+1, p.Name, err)
		}
		for k := range s.Members {
			d, ok := pf.Section(accSection(i, k))
			if !ok {
				p.Accs = append(p.Accs, p.Layout.NewAccumulator())
				continue
			}
			a, err := metrics.DecodeAccumulator(d, p.Layout)
			if err != nil {
				return nil, bad("pass %d (%s), extent %s: %v", i+1, p.Name, s.Members[k], err)
			}
			p.Accs = append(p.Accs, a)
		}
		s.Passes = append(s.Passes, p)
	}
	if m.Background {
		if d, err = section(secBackground); err != nil {
			return nil, err
		}
		if s.Background, err = nullmodel.DecodeBackground(d); err != nil {
			return nil, bad("%v", err)
		}
	}
	known := len(pf.Sections) - 4 - 2*len(s.Passes)
	if m.Background {
		known--
	}
	for _, p := range s.Passes {
		for _, a := range p.Accs {
			if a.Cells() > 0 || a.Skipped() > 0 {
				known--
			}
		}
	}
	if known != 0 {
		return nil, bad("%d section(s) this areasweep does not know", known)
	}
	return s, nil
}

// encodeValid writes, per row, the run count (uint32) and the runs
// (uint32 pairs).
func encodeValid(rows [][]int32) []byte {
	var b []byte
	for _, r := range rows {
		b = binary.LittleEndian.AppendUint32(b, uint32(len(r)/2))
		for _, c := range r {
			b = binary.LittleEndian.AppendUint32(b, uint32(c))
		}
	}
	return b
}

func decodeValid(b []byte, rows pass.RowRange, width int) ([][]int32, error) {
	var out [][]int32
	for row := rows.First; row < rows.End; row++ {
		if len(b) < 4 {
			return nil, fmt.Errorf("row %d: truncated", row)
		}
		n := uint64(binary.LittleEndian.Uint32(b))
		b = b[4:]
		if n*8 > uint64(len(b)) {
			return nil, fmt.Errorf("row %d: %d runs do not fit", row, n)
		}
		runs := make([]int32, 2*n)
		prev := int64(-1)
		for i := range runs {
			c := int64(binary.LittleEndian.Uint32(b[4*i:]))
			// Runs are ascending and not touching (c0 > previous c1,
			// c1 > c0) and inside the row.
			if c <= prev || c > int64(width) {
				return nil, fmt.Errorf("row %d: runs out of order or outside the %d columns", row, width)
			}
			prev = c
			runs[i] = int32(c)
		}
		b = b[8*n:]
		out = append(out, runs)
	}
	if len(b) != 0 {
		return nil, fmt.Errorf("%d stray bytes after the last row", len(b))
	}
	return out, nil
}

// encodePreview writes (index uint32, value float64 bits) pairs.
func encodePreview(cells []PreviewCell) []byte {
	var b []byte
	for _, c := range cells {
		b = binary.LittleEndian.AppendUint32(b, uint32(c.Index))
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(c.Value))
	}
	return b
}

func decodePreview(b []byte, size int) ([]PreviewCell, error) {
	if len(b)%12 != 0 {
		return nil, fmt.Errorf("%d bytes is not a whole number of cells", len(b))
	}
	out := make([]PreviewCell, 0, len(b)/12)
	prev := -1
	for ; len(b) > 0; b = b[12:] {
		c := PreviewCell{int(binary.LittleEndian.Uint32(b)), math.Float64frombits(binary.LittleEndian.Uint64(b[4:]))}
		if c.Index <= prev || c.Index >= size || math.IsNaN(c.Value) || math.IsInf(c.Value, 0) {
			return nil, fmt.Errorf("cell %d (value %v) out of order, outside the preview or not a number", c.Index, c.Value)
		}
		prev = c.Index
		out = append(out, c)
	}
	return out, nil
}

// encodeStats writes Min and Max (float64 bits), FloorArea, Area and
// AnyValid (uint64 0 or 1), the smallest values and the values of long
// runs (metrics.MassList.Encode; since partial format 4), then the value
// set (metrics.ValueSet.Encode).
func encodeStats(st pass.Stats) []byte {
	b := binary.LittleEndian.AppendUint64(nil, math.Float64bits(st.Min))
	b = binary.LittleEndian.AppendUint64(b, math.Float64bits(st.Max))
	b = binary.LittleEndian.AppendUint64(b, uint64(st.FloorArea))
	b = binary.LittleEndian.AppendUint64(b, uint64(st.Area))
	var flag uint64
	if st.AnyValid {
		flag = 1
	}
	b = binary.LittleEndian.AppendUint64(b, flag)
	b = append(b, st.Lowest.Encode()...)
	b = append(b, st.Runs.Encode()...)
	return append(b, st.Values.Encode()...)
}

func decodeStats(b []byte) (pass.Stats, error) {
	if len(b) < 40 {
		return pass.Stats{}, fmt.Errorf("%d bytes, want at least 40", len(b))
	}
	lowest, rest, err := metrics.DecodeMassList(b[40:], metrics.LowestValues)
	if err != nil {
		return pass.Stats{}, fmt.Errorf("smallest values: %w", err)
	}
	runs, rest, err := metrics.DecodeMassList(rest, metrics.MaxRunValues)
	if err != nil {
		return pass.Stats{}, fmt.Errorf("values of long runs: %w", err)
	}
	values, err := metrics.DecodeValueSet(rest)
	if err != nil {
		return pass.Stats{}, err
	}
	st := pass.Stats{Min: math.Float64frombits(binary.LittleEndian.Uint64(b)), Max: math.Float64frombits(binary.LittleEndian.Uint64(b[8:])),
		FloorArea: int64(binary.LittleEndian.Uint64(b[16:])), Area: int64(binary.LittleEndian.Uint64(b[24:])), Values: values, Lowest: lowest, Runs: runs}
	anyValid := binary.LittleEndian.Uint64(b[32:])
	st.AnyValid = anyValid == 1
	switch {
	case st.Area < 0 || st.FloorArea < 0 || st.FloorArea > st.Area:
		return st, fmt.Errorf("areas %d (floor %d) are impossible", st.Area, st.FloorArea)
	case st.Area > 0 && !(st.Min <= st.Max):
		return st, fmt.Errorf("range [%v, %v] is impossible", st.Min, st.Max)
	case anyValid > 1 || (st.Area > 0 && !st.AnyValid):
		return st, fmt.Errorf("flag of a cell with data is %d with area %d: impossible", anyValid, st.Area)
	case !massesFit(st.Lowest, st.Area) || !massesFit(st.Runs, st.Area):
		return st, fmt.Errorf("the listed values' areas add up to more than the area %d", st.Area)
	}
	return st, nil
}

// massesFit tells whether the areas of l add up to at most area.
func massesFit(l metrics.MassList, area int64) bool {
	var sum int64
	for _, m := range l.Masses {
		if m.Area > area-sum {
			return false
		}
		sum += m.Area
	}
	return true
}
