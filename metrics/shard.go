package metrics

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"regexp"
	"slices"
	"strings"
)

// A partial file holds what one shard of a run computed: the accumulators
// of its share of raster blocks, each encoded with EncodeAccumulator (and
// the layouts with EncodeLayout), as named sections, behind a header that
// says which run and which share they belong to. A merge reads every shard's
// file, checks the set with CheckShardSet, decodes the sections and merges
// them; because accumulators merge exactly, the merged run equals a single
// run byte for byte.
//
// The envelope lives in metrics, beside the accumulator encoding, because
// it is GDAL-free, knows nothing of rasters or outputs, and its payload is
// metrics' own data: a merging process needs only this package to refuse a
// bad set and to rebuild the accumulators.
//
// Binary form (little endian):
//
//	magic     4 bytes   "ASPF"
//	version   uint16    PartialFormatVersion
//	header    uint32 length, then the header as JSON (ShardHeader)
//	sections  uint32 count, then per section: uint16 name length, name,
//	          uint64 data length, data
//	checksum  32 bytes  SHA-256 of every byte before it

// PartialFormatVersion is the version of the partial-file format (the
// envelope and the header's fields, and what its sections carry).
// DecodePartial refuses other versions.
//
// Version 2: the sections carry layouts and accumulators of
// EncodingVersion 2 (no histogram range in the layout; each accumulator's
// histogram on its own grid), so a version 1 file is refused with a
// message naming the format rather than deep inside a section.
// Version 3: layouts of EncodingVersion 3 (with the histogram floor).
// Version 4: each pass's statistics list its model's smallest values and
// the values of long runs of equal cells, with their areas (the point
// masses the area-random test must know), so a version 3 file is refused
// with a message saying which version wrote it.
const PartialFormatVersion = 4

const (
	partialMagic   = "ASPF"
	maxHeaderBytes = 1 << 20
	maxSectionName = 255
)

// Sentinel errors of partial files and shard sets, wrapped in *ShardError.
var (
	// ErrPartialFormat: the file is not a partial file, another version, or
	// truncated or corrupt.
	ErrPartialFormat = errors.New("metrics: not a valid partial file")
	// ErrShardHeader: a header is incomplete or inconsistent in itself.
	ErrShardHeader = errors.New("metrics: bad shard header")
	// ErrNoShards: the set is empty.
	ErrNoShards = errors.New("metrics: no shard files given")
	// ErrShardMismatch: shards of different runs (tool version, inputs,
	// settings, seed, shard count or block count differ).
	ErrShardMismatch = errors.New("metrics: shards come from different runs")
	// ErrShardDuplicate: the same shard twice.
	ErrShardDuplicate = errors.New("metrics: shard given twice")
	// ErrShardMissing: some shard of 1..N is absent.
	ErrShardMissing = errors.New("metrics: shards missing")
	// ErrShardBlocks: the shards' block ranges overlap or leave gaps.
	ErrShardBlocks = errors.New("metrics: shard block ranges do not cover every block exactly once")
)

// ShardError reports a problem with one partial file (Source, when known)
// or with a set of them. Err is one of the sentinels above.
type ShardError struct {
	Source string
	Err    error
	Detail string
}

// Error formats the error as "metrics: SOURCE: reason: detail".
func (e *ShardError) Error() string {
	var b strings.Builder
	b.WriteString("metrics: ")
	if e.Source != "" {
		b.WriteString(e.Source + ": ")
	}
	b.WriteString(trimPrefix(e.Err.Error()))
	if e.Detail != "" {
		b.WriteString(": " + e.Detail)
	}
	return b.String()
}

// Unwrap returns the sentinel.
func (e *ShardError) Unwrap() error { return e.Err }

// BlockRange is a half-open range [First, End) of raster block indices in
// the pass's block order.
type BlockRange struct {
	First int `json:"first"`
	End   int `json:"end"`
}

// InputChecksum names one input file and the SHA-256 of its bytes (hex).
// Sidecars, when the input has files beside it that are read with it (a
// shapefile's .dbf, a raster's .prj), is one hex SHA-256 over those
// files' names and checksums, chosen by the caller; empty when it has none.
type InputChecksum struct {
	Name     string `json:"name"`
	SHA256   string `json:"sha256"`
	Sidecars string `json:"sidecars,omitempty"`
}

// ShardHeader says which run a partial file belongs to and which share of
// it the file holds. Two shards belong to the same run when Tool, Inputs,
// Settings, Seed, Shards and TotalBlocks are equal.
type ShardHeader struct {
	// Format is PartialFormatVersion (EncodePartial sets it).
	Format int `json:"format"`
	// Tool is the areasweep version that wrote the file.
	Tool string `json:"tool"`
	// Inputs are the run's input files with their checksums, in a fixed
	// order chosen by the caller (the same in every shard).
	Inputs []InputChecksum `json:"inputs"`
	// Settings is the hex SHA-256 of the run's canonical settings.
	Settings string `json:"settings"`
	// Seed is the run seed.
	Seed uint64 `json:"seed"`
	// Shard is this file's share, 1..Shards.
	Shard int `json:"shard"`
	// Shards is the number of shards N.
	Shards int `json:"shards"`
	// TotalBlocks is the number of raster blocks of the whole run.
	TotalBlocks int `json:"total_blocks"`
	// Blocks are the block ranges this shard scored, ascending and
	// disjoint.
	Blocks []BlockRange `json:"blocks"`
	// Source is where the header was read from, for messages; not stored.
	Source string `json:"-"`
}

var hexSHA256 = regexp.MustCompile(`^[0-9a-f]{64}$`)

// Validate checks the header in itself: known format, tool and settings
// given, well-formed checksums, 1 <= Shard <= Shards, block ranges
// ascending, disjoint, non-empty and inside [0, TotalBlocks).
func (h *ShardHeader) Validate() error {
	bad := func(format string, a ...any) error {
		return &ShardError{Source: h.Source, Err: ErrShardHeader, Detail: fmt.Sprintf(format, a...)}
	}
	switch {
	case h.Format != PartialFormatVersion:
		return &ShardError{Source: h.Source, Err: ErrPartialFormat,
			Detail: fmt.Sprintf("format %d, this areasweep reads format %d; merge with the areasweep version that wrote the shards", h.Format, PartialFormatVersion)}
	case h.Tool == "":
		return bad("no tool version")
	case !hexSHA256.MatchString(h.Settings):
		return bad("settings hash %q is not 64 lower-case hex digits", h.Settings)
	case h.Shards < 1 || h.Shard < 1 || h.Shard > h.Shards:
		return bad("shard %d/%d: want 1 <= I <= N", h.Shard, h.Shards)
	case h.TotalBlocks < 0:
		return bad("total block count %d is negative", h.TotalBlocks)
	}
	for i, in := range h.Inputs {
		if in.Name == "" || !hexSHA256.MatchString(in.SHA256) || (in.Sidecars != "" && !hexSHA256.MatchString(in.Sidecars)) {
			return bad("input %d (%q): needs a name and a 64-digit lower-case hex SHA-256 (of its sidecar files too, when given)", i+1, in.Name)
		}
	}
	prev := 0
	for i, r := range h.Blocks {
		if r.First < prev || r.End <= r.First || r.End > h.TotalBlocks {
			return bad("block range %d [%d, %d) is empty, out of order or outside [0, %d)", i+1, r.First, r.End, h.TotalBlocks)
		}
		prev = r.End
	}
	return nil
}

// ShardBlocks returns the share of shard i of n over total blocks: the
// contiguous range
//
//	[floor((i-1)·total/n), floor(i·total/n))
//
// or no range when it is empty. Over i = 1..n the ranges cover every block
// exactly once.
func ShardBlocks(i, n, total int) []BlockRange {
	if n < 1 || i < 1 || i > n || total <= 0 {
		return nil
	}
	first := int(int64(i-1) * int64(total) / int64(n))
	end := int(int64(i) * int64(total) / int64(n))
	if end <= first {
		return nil
	}
	return []BlockRange{{first, end}}
}

// PartialSection is one named payload of a partial file, for example an
// encoded layout or accumulator.
type PartialSection struct {
	Name string
	Data []byte
}

// PartialFile is a shard's header and its sections, in the order written.
type PartialFile struct {
	Header   ShardHeader
	Sections []PartialSection
}

// Section returns the data of the section called name.
func (p *PartialFile) Section(name string) ([]byte, bool) {
	for _, s := range p.Sections {
		if s.Name == name {
			return s.Data, true
		}
	}
	return nil, false
}

// EncodePartial returns the binary form of p (see the format above). It sets
// p.Header.Format to PartialFormatVersion and refuses an invalid header or
// section names that are empty, longer than 255 bytes or repeated.
func EncodePartial(p *PartialFile) ([]byte, error) {
	p.Header.Format = PartialFormatVersion
	if err := p.Header.Validate(); err != nil {
		return nil, err
	}
	hdr, err := json.Marshal(&p.Header)
	if err != nil {
		return nil, fmt.Errorf("metrics: encoding shard header: %w", err)
	}
	if len(hdr) > maxHeaderBytes {
		return nil, &ShardError{Err: ErrShardHeader, Detail: fmt.Sprintf("header of %d bytes is larger than %d", len(hdr), maxHeaderBytes)}
	}
	var b bytes.Buffer
	b.WriteString(partialMagic)
	b.Write(binary.LittleEndian.AppendUint16(nil, PartialFormatVersion))
	b.Write(binary.LittleEndian.AppendUint32(nil, uint32(len(hdr))))
	b.Write(hdr)
	b.Write(binary.LittleEndian.AppendUint32(nil, uint32(len(p.Sections))))
	seen := map[string]bool{}
	for _, s := range p.Sections {
		if s.Name == "" || len(s.Name) > maxSectionName || seen[s.Name] {
			return nil, &ShardError{Err: ErrShardHeader, Detail: fmt.Sprintf("section name %q is empty, too long or repeated", s.Name)}
		}
		seen[s.Name] = true
		b.Write(binary.LittleEndian.AppendUint16(nil, uint16(len(s.Name))))
		b.WriteString(s.Name)
		b.Write(binary.LittleEndian.AppendUint64(nil, uint64(len(s.Data))))
		b.Write(s.Data)
	}
	sum := sha256.Sum256(b.Bytes())
	b.Write(sum[:])
	return b.Bytes(), nil
}

// PartialStartBytes is how many first bytes of a file CheckPartialStart
// needs.
const PartialStartBytes = 6

// CheckPartialStart refuses, as DecodePartial does, a file whose first
// bytes (head: up to PartialStartBytes of them, fewer only when the file is
// that short) show that it is empty, not a partial file, or of another
// format, so that a foreign file of gigabytes is refused without being
// read whole. A head that passes may still be refused by DecodePartial.
func CheckPartialStart(head []byte, source string) error {
	bad := func(format string, a ...any) error {
		return &ShardError{Source: source, Err: ErrPartialFormat, Detail: fmt.Sprintf(format, a...)}
	}
	if len(head) == 0 {
		return bad("is empty (0 bytes): its shard did not finish writing it; run that shard again")
	}
	if len(head) < 4 || string(head[:4]) != partialMagic {
		return bad("does not start with %q; give the partial files that `run --shard` wrote", partialMagic)
	}
	if len(head) >= 6 {
		if v := binary.LittleEndian.Uint16(head[4:]); v != PartialFormatVersion {
			return bad("format %d, this areasweep reads format %d; merge with the areasweep version that wrote the shards", v, PartialFormatVersion)
		}
	}
	return nil
}

// partialMinBytes is the size of the shortest partial file: magic,
// version, the header's and the sections' lengths, checksum.
const partialMinBytes = 6 + 4 + 4 + sha256.Size

// partialCutShort and partialSumMismatch are DecodePartial's and
// CheckPartialSum's refusals of a file of size bytes too short to be a
// partial file, and of one whose checksum does not match.
func partialCutShort(source string, size int64) error {
	return &ShardError{Source: source, Err: ErrPartialFormat, Detail: fmt.Sprintf("is cut short (%d bytes): its shard did not finish writing it, or the copy was cut; run that shard again", size)}
}

func partialSumMismatch(source string) error {
	return &ShardError{Source: source, Err: ErrPartialFormat, Detail: "checksum mismatch: the file was cut short or changed; run its shard again"}
}

// CheckPartialSum refuses, as DecodePartial does, a partial file of size
// bytes, read from r from its start, that is cut short or whose checksum
// does not match, reading it in pieces: a damaged file of gigabytes that
// starts like a partial file is refused without being held in memory. A
// file that ends before size bytes (cut while being read) is cut short;
// another read error is returned as it is.
func CheckPartialSum(r io.Reader, size int64, source string) error {
	if size < partialMinBytes {
		return partialCutShort(source, size)
	}
	h := sha256.New()
	var sum [sha256.Size]byte
	_, err := io.CopyN(h, r, size-sha256.Size)
	if err == nil {
		_, err = io.ReadFull(r, sum[:])
	}
	if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) {
		return partialCutShort(source, size)
	}
	if err != nil {
		return err
	}
	if !bytes.Equal(h.Sum(nil), sum[:]) {
		return partialSumMismatch(source)
	}
	return nil
}

// DecodePartial reads a partial file; source (the file name) is used in
// messages and kept in Header.Source. It refuses another format version, a
// truncated or corrupt file (checksum), an unknown header field and an
// invalid header. Section data alias data.
func DecodePartial(data []byte, source string) (*PartialFile, error) {
	bad := func(format string, a ...any) error {
		return &ShardError{Source: source, Err: ErrPartialFormat, Detail: fmt.Sprintf(format, a...)}
	}
	if err := CheckPartialStart(data, source); err != nil {
		return nil, err
	}
	if len(data) < partialMinBytes {
		return nil, partialCutShort(source, int64(len(data)))
	}
	n := len(data) - sha256.Size
	if s := sha256.Sum256(data[:n]); !bytes.Equal(s[:], data[n:]) {
		return nil, partialSumMismatch(source)
	}
	body := data[6:n]
	take := func(k uint64) ([]byte, bool) {
		if k > uint64(len(body)) {
			return nil, false
		}
		out := body[:k]
		body = body[k:]
		return out, true
	}
	u32 := func() (uint32, bool) {
		b, ok := take(4)
		if !ok {
			return 0, false
		}
		return binary.LittleEndian.Uint32(b), true
	}
	hl, ok := u32()
	if !ok || hl > maxHeaderBytes {
		return nil, bad("bad header length")
	}
	hdr, ok := take(uint64(hl))
	if !ok {
		return nil, bad("header runs past the end")
	}
	p := &PartialFile{}
	dec := json.NewDecoder(bytes.NewReader(hdr))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&p.Header); err != nil {
		return nil, bad("header is not valid: %v", err)
	}
	if dec.More() {
		return nil, bad("header has trailing data")
	}
	p.Header.Source = source
	if err := p.Header.Validate(); err != nil {
		return nil, err
	}
	count, ok := u32()
	if !ok {
		return nil, bad("section count missing")
	}
	seen := map[string]bool{}
	for i := range count {
		nb, ok := take(2)
		if !ok {
			return nil, bad("section %d runs past the end", i+1)
		}
		name, ok := take(uint64(binary.LittleEndian.Uint16(nb)))
		if !ok || len(name) == 0 || seen[string(name)] {
			return nil, bad("section %d has a missing, empty or repeated name", i+1)
		}
		seen[string(name)] = true
		lb, ok := take(8)
		if !ok {
			return nil, bad("section %q runs past the end", name)
		}
		d, ok := take(binary.LittleEndian.Uint64(lb))
		if !ok {
			return nil, bad("section %q runs past the end", name)
		}
		p.Sections = append(p.Sections, PartialSection{Name: string(name), Data: d})
	}
	if len(body) != 0 {
		return nil, bad("%d stray bytes after the last section", len(body))
	}
	return p, nil
}

// CheckShardSet checks that headers are exactly the shards 1..N of one run:
// every header valid, the same tool version, inputs (names and checksums),
// settings, seed, shard count and block count (ErrShardMismatch, naming the
// field and both files), no shard twice (ErrShardDuplicate), none missing
// (ErrShardMissing, listing them), and block ranges that together cover
// every block exactly once (ErrShardBlocks). The order of headers does not
// matter.
func CheckShardSet(headers []ShardHeader) error {
	if len(headers) == 0 {
		return &ShardError{Err: ErrNoShards, Detail: "give every partial file of the run"}
	}
	for i := range headers {
		if err := headers[i].Validate(); err != nil {
			return err
		}
	}
	name := func(h *ShardHeader) string {
		if h.Source != "" {
			return fmt.Sprintf("%s (shard %d/%d)", h.Source, h.Shard, h.Shards)
		}
		return fmt.Sprintf("shard %d/%d", h.Shard, h.Shards)
	}
	ref := &headers[0]
	for i := 1; i < len(headers); i++ {
		h := &headers[i]
		field := ""
		switch {
		case h.Tool != ref.Tool:
			field = fmt.Sprintf("areasweep version or build (%s vs %s)", ref.Tool, h.Tool)
		case !slices.Equal(h.Inputs, ref.Inputs):
			field = "input files or their checksums" + inputDiff(ref.Inputs, h.Inputs)
		case h.Settings != ref.Settings:
			field = "settings"
		case h.Seed != ref.Seed:
			field = fmt.Sprintf("seed (%d vs %d)", ref.Seed, h.Seed)
		case h.Shards != ref.Shards:
			field = fmt.Sprintf("shard count (%d vs %d)", ref.Shards, h.Shards)
		case h.TotalBlocks != ref.TotalBlocks:
			field = fmt.Sprintf("raster block count (%d vs %d)", ref.TotalBlocks, h.TotalBlocks)
		}
		if field != "" {
			return &ShardError{Err: ErrShardMismatch, Detail: fmt.Sprintf("%s and %s differ in %s; merge only the shards of one run, or run the odd one again", name(ref), name(h), field)}
		}
	}
	byShard := map[int]*ShardHeader{}
	for i := range headers {
		h := &headers[i]
		if prev, dup := byShard[h.Shard]; dup {
			return &ShardError{Err: ErrShardDuplicate, Detail: fmt.Sprintf("%s and %s are both shard %d; give each shard once", name(prev), name(h), h.Shard)}
		}
		byShard[h.Shard] = h
	}
	// Missing shards, three or more in a row as one range ("3-9"): a
	// merge of 1000 shards missing half would otherwise list 500 numbers.
	var missing []string
	for i := 1; i <= ref.Shards; i++ {
		if byShard[i] != nil {
			continue
		}
		j := i
		for j < ref.Shards && byShard[j+1] == nil {
			j++
		}
		switch j - i {
		case 0:
			missing = append(missing, fmt.Sprint(i))
		case 1:
			missing = append(missing, fmt.Sprint(i), fmt.Sprint(j))
		default:
			missing = append(missing, fmt.Sprintf("%d-%d", i, j))
		}
		i = j
	}
	if len(missing) > 0 {
		return &ShardError{Err: ErrShardMissing, Detail: fmt.Sprintf("shard(s) %s of %d not given; run them (or find their files) and merge again", strings.Join(missing, ", "), ref.Shards)}
	}
	// Each range with the shard it came from, to name the files at a gap
	// or an overlap (shards of one run never make either: a header was
	// altered).
	type owned struct {
		r BlockRange
		h *ShardHeader
	}
	var all []owned
	for i := range headers {
		for _, r := range headers[i].Blocks {
			all = append(all, owned{r, &headers[i]})
		}
	}
	slices.SortStableFunc(all, func(a, b owned) int { return a.r.First - b.r.First })
	const redo = "a partial file was altered or damaged; run the shards named again"
	next := 0
	var prev *ShardHeader
	for _, o := range all {
		if r := o.r; r.First != next {
			if r.First < next {
				return &ShardError{Err: ErrShardBlocks, Detail: fmt.Sprintf("%s and %s both hold block %d of %d; %s", name(prev), name(o.h), r.First, ref.TotalBlocks, redo)}
			}
			if prev == nil {
				return &ShardError{Err: ErrShardBlocks, Detail: fmt.Sprintf("blocks 0 to %d of %d are in no shard (the first, %s, begins at block %d); %s", r.First-1, ref.TotalBlocks, name(o.h), r.First, redo)}
			}
			return &ShardError{Err: ErrShardBlocks, Detail: fmt.Sprintf("blocks %d to %d of %d are in no shard (between %s and %s); %s", next, r.First-1, ref.TotalBlocks, name(prev), name(o.h), redo)}
		}
		next, prev = o.r.End, o.h
	}
	if next != ref.TotalBlocks {
		last := ""
		if prev != nil {
			last = fmt.Sprintf(" (after %s)", name(prev))
		}
		return &ShardError{Err: ErrShardBlocks, Detail: fmt.Sprintf("blocks %d to %d of %d are in no shard%s; %s", next, ref.TotalBlocks-1, ref.TotalBlocks, last, redo)}
	}
	return nil
}

// inputDiff names how the inputs a and b differ: the inputs of one side
// only (by name), else the first that differs in place or checksum.
func inputDiff(a, b []InputChecksum) string {
	// By name first: a model given to one run and not to the other was
	// named by its place ("input 2 is \"model:coarse\" vs
	// \"occurrences\""), which left the user to work out which.
	var only [2][]string
	for k, side := range [2][2][]InputChecksum{{a, b}, {b, a}} {
		for _, x := range side[0] {
			if !slices.ContainsFunc(side[1], func(y InputChecksum) bool { return y.Name == x.Name }) {
				only[k] = append(only[k], fmt.Sprintf("%q", x.Name))
			}
		}
	}
	var parts []string
	if len(only[1]) > 0 {
		parts = append(parts, "extra input "+strings.Join(only[1], ", ")+" in the second")
	}
	if len(only[0]) > 0 {
		parts = append(parts, "input "+strings.Join(only[0], ", ")+" missing in the second")
	}
	if len(parts) > 0 {
		return ": " + strings.Join(parts, "; ")
	}
	if len(a) != len(b) { // one name given more often
		return fmt.Sprintf(": %d inputs vs %d (%s vs %s)", len(a), len(b), inputNames(a), inputNames(b))
	}
	for i := range a {
		switch {
		case a[i].Name != b[i].Name:
			return fmt.Sprintf(": the same inputs in another order (%s vs %s; the --model, --null and --extra flags in another order)", inputNames(a), inputNames(b))
		case a[i].SHA256 != b[i].SHA256:
			return fmt.Sprintf(": %q has another checksum", a[i].Name)
		case a[i] != b[i]:
			return fmt.Sprintf(": %q has other sidecar files (.prj, .dbf, .aux.xml ...) or other checksums of them", a[i].Name)
		}
	}
	return ""
}

// inputNames lists the names of ins, comma-separated.
func inputNames(ins []InputChecksum) string {
	names := make([]string, len(ins))
	for i, in := range ins {
		names[i] = in.Name
	}
	return strings.Join(names, ", ")
}
