package inputs

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"maps"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"unicode"

	"areasweep/cmd/internal/settings"

	"go.yaml.in/yaml/v3"
	"golang.org/x/text/unicode/norm"
)

// A study table lists the studies of a batch: one row per study with an id
// and any study-file key (model, occurrences, region, ecoregions,
// ecoregion-field, seed, ...), plus a shared settings block whose keys every
// row inherits and may override. It is read as YAML when the file name ends
// in .yaml or .yml, else as CSV.
//
// CSV form: the first lines starting with '#' form the shared settings
// block, a study file written after a '#' (the '#' and one space are
// removed, so "## note" is a comment); then a header line whose columns are
// id and study keys (model may be written models); then one line per study.
// Lines starting with '#' after the header are comments. NAME=PATH lists
// (model, null, extra) hold items separated by ';'; number lists are written
// as in a study file ("10, 25, 50", quoted in the CSV). An empty cell falls
// back to the shared setting.
//
//	# iterations: 1000
//	# region-buffers: [100, 250]
//	id,model,occurrences,region
//	oak,gbm=oak/gbm.tif;glm=oak/glm.tif,oak/points.csv,oak/region.gpkg
//
// YAML form: a mapping with "settings" (a study-file mapping) and "studies"
// (a list of mappings, each with id and study keys).
//
// In both forms relative paths are resolved against the table's folder,
// every row needs a model, occurrences and a region (its own or shared),
// and out is not allowed: the batch puts each study into a folder named by
// its id.

// Sentinel errors of the study-table reader, wrapped in *BatchError.
var (
	// ErrBatchSyntax: the table cannot be read as CSV or YAML of the
	// expected shape.
	ErrBatchSyntax = errors.New("inputs: study table is malformed")
	// ErrBatchColumn: a header column is unknown or repeated.
	ErrBatchColumn = errors.New("inputs: bad column in study table")
	// ErrBatchID: a study id is missing, unsafe as a folder name, or
	// repeated.
	ErrBatchID = errors.New("inputs: bad study id")
	// ErrBatchMissing: a row lacks a required setting.
	ErrBatchMissing = errors.New("inputs: study row lacks a required setting")
	// ErrBatchEmpty: the table lists no study.
	ErrBatchEmpty = errors.New("inputs: study table lists no study")
)

// BatchError is one problem in a study table: the file, the line (0 when
// none applies), the column or key (empty when none applies) and the study
// id when known. Err wraps a sentinel of this package.
type BatchError struct {
	File   string
	Line   int
	Column string
	Study  string
	// Shared is true when the value at fault is a shared setting's, not
	// the row's: Line is then the shared settings' line that gives it and
	// Column its key, and Studies the studies it concerns (the rows that
	// do not give their own value; Study is then empty).
	Shared  bool
	Studies []string
	Err     error
}

// Error formats the error as `inputs: FILE line N, study "ID", column "C": message`,
// or for a shared setting `inputs: FILE line N (shared settings), key "C",
// for studies a and b: message`.
// A value refused as a study file's (ErrBadValue) reads "bad value: ...":
// the table, not a study file, holds it.
func (e *BatchError) Error() string {
	s := located(e.File, e.Line, e.Study, "column", e.Column, e.Err)
	if e.Shared {
		s = located(fmt.Sprintf("%s line %d (shared settings), key %q, %s", e.File, e.Line, e.Column, forStudies(e.Studies)), 0, "", "", "", e.Err)
	}
	return strings.Replace(s, ": "+strings.TrimPrefix(ErrBadValue.Error(), "inputs: ")+": ", ": bad value: ", 1)
}

// maxStudiesNamed is how many studies a shared setting's problem names
// (the rest are counted).
const maxStudiesNamed = 5

// forStudies is "for study a", "for studies a and b", "for studies a, b,
// c, d, e and 7 more".
func forStudies(ids []string) string {
	switch n := len(ids); {
	case n == 1:
		return "for study " + ids[0]
	case n <= maxStudiesNamed:
		return "for studies " + strings.Join(ids[:n-1], ", ") + " and " + ids[n-1]
	default:
		return fmt.Sprintf("for studies %s and %d more", strings.Join(ids[:maxStudiesNamed], ", "), n-maxStudiesNamed)
	}
}

// Unwrap returns the wrapped error.
func (e *BatchError) Unwrap() error { return e.Err }

// BatchErrors is every problem found in a study table, in file order.
type BatchErrors []*BatchError

// MaxBatchErrorsShown is how many problems BatchErrors.Error lists; the
// rest are counted.
const MaxBatchErrorsShown = 50

// Error lists the problems, one per line, after a count (at most
// MaxBatchErrorsShown of them).
func (es BatchErrors) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "inputs: %d problem(s) in the study table; nothing was run:", len(es))
	for i, e := range es {
		if i == MaxBatchErrorsShown {
			fmt.Fprintf(&b, "\n  ... and %d more; fix the ones above and read the table again", len(es)-i)
			break
		}
		b.WriteString("\n  ")
		b.WriteString(e.Error())
	}
	return b.String()
}

// Unwrap returns the problems, so errors.Is and errors.As look at each.
func (es BatchErrors) Unwrap() []error {
	out := make([]error, len(es))
	for i, e := range es {
		out[i] = e
	}
	return out
}

// Batch is a parsed study table.
type Batch struct {
	// File is the table's name as given.
	File string
	// Shared is the shared settings block.
	Shared *Study
	// Studies are the rows in file order.
	Studies []BatchStudy
	// Refused are the rows with a problem of the table's (a cell that
	// does not read, an id refused, a required key missing), with their
	// settings as far as they were read, when LoadBatch returns
	// problems: the caller checks them too, so that every problem of a
	// row is listed in one round.
	Refused []RefusedStudy
}

// RefusedStudy is a row with a problem: the row as far as it was read and
// the keys already reported for it (a refused value, a missing required
// key), which the caller must not report again.
type RefusedStudy struct {
	BatchStudy
	Reported map[string]bool
}

// BatchStudy is one row: its id, its line in the table, and its settings
// (the shared block with the row's own values laid over it).
type BatchStudy struct {
	ID    string
	Line  int
	Study *Study
	// SharedLines are the keys the row takes from the shared settings
	// (it gives no value of its own), each with the line that sets it.
	SharedLines map[string]int
}

// MaxBatchStudies caps the rows of a study table.
const MaxBatchStudies = 100000

var batchIDRE = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9_.\-]{0,63}$`)

// requiredKeys must be set in every row, by the row or the shared block.
var requiredKeys = []string{"model", "occurrences", "region"}

// LoadBatch reads the study table at path (YAML for .yaml/.yml, else CSV)
// and resolves relative paths against its folder, made absolute. Lines may end in a line
// feed, a carriage return and line feed, or a carriage return alone
// (Excel's "CSV (Macintosh)"; crLines, as for the occurrence table). Every
// problem is reported, as BatchErrors in line order, before anything
// runs; with them comes the batch of the rows without a problem (nil when
// the table could not be read at all), for the caller's own checks only:
// such a batch must not run.
func LoadBatch(path string) (*Batch, error) {
	if err := checkRegular(path, "study table"); err != nil {
		return nil, err
	}
	f, err := os.Open(path)
	switch {
	case errors.Is(err, os.ErrNotExist):
		return nil, fmt.Errorf("inputs: study table %s does not exist; check the path (areasweep batch --template prints an example table)", path)
	case errors.Is(err, os.ErrPermission):
		return nil, fmt.Errorf("inputs: study table %s cannot be read (permission denied); check its permissions", path)
	case err != nil:
		return nil, fmt.Errorf("inputs: cannot read study table %s: %w", path, err)
	}
	defer f.Close()
	data, err := io.ReadAll(newLimitedReader(f, MaxStudyBytes*16, 0))
	if err != nil {
		if errors.Is(err, ErrTooLarge) {
			return nil, BatchErrors{{File: path, Err: err}}
		}
		return nil, fmt.Errorf("inputs: cannot read study table: %w", err)
	}
	// The folder is made absolute, so that a study's recorded input paths
	// (results.json) do not depend on how the table was named: a local
	// batch and a scheduler task (which names the table absolutely) write
	// the same bytes. A table read from a pipe or standard input has no
	// folder of its own: its relative paths are taken from the current
	// folder, as a study file's (they were joined to /dev/fd or /dev).
	dir := filepath.Dir(path)
	if st, err := f.Stat(); err == nil && !st.Mode().IsRegular() || isStreamPath(path) {
		dir = "."
	}
	if abs, err := filepath.Abs(dir); err == nil {
		dir = abs
	}
	ext := strings.ToLower(filepath.Ext(path))
	return ParseBatch(data, path, dir, ext == ".yaml" || ext == ".yml")
}

// StreamPath reports whether path names a pipe or a process's open file
// (/dev/stdin, /dev/fd/N, a shell's <(...), a named pipe) rather than a
// file that can be read again by its name.
func StreamPath(path string) bool {
	if isStreamPath(path) {
		return true
	}
	st, err := os.Stat(path)
	return err == nil && st.Mode()&os.ModeNamedPipe != 0
}

// ParseBatch reads a study table from data; name is used in messages,
// relative paths are resolved against baseDir, and isYAML picks the form.
// See LoadBatch.
func ParseBatch(data []byte, name string, baseDir string, isYAML bool) (*Batch, error) {
	if name == "" {
		name = "study table"
	}
	if head := data[:min(len(data), 512)]; bytes.IndexByte(head, 0) >= 0 && !bytes.HasPrefix(head, []byte{0xFF, 0xFE}) && !bytes.HasPrefix(head, []byte{0xFE, 0xFF}) {
		return nil, BatchErrors{{File: name, Err: fmt.Errorf("%w: this is a binary file%s, not a study table; give the CSV or YAML table of the studies (areasweep batch --template prints an example)",
			ErrBatchSyntax, binaryKind(head))}}
	}
	data, _ = io.ReadAll(crLines(bytes.NewReader(data))) // from memory: cannot fail
	// After crLines, so that the line counts carriage-return-only lines.
	if line, msg := notUTF8(data); line > 0 {
		return nil, BatchErrors{{File: name, Line: line, Err: fmt.Errorf("%w: %s", ErrBatchSyntax, msg)}}
	}
	p := &batchParser{name: name, dir: baseDir, b: &Batch{File: name, Shared: &Study{}}}
	if isYAML {
		p.parseYAML(data)
	} else {
		p.parseCSV(data)
	}
	p.finish()
	if len(p.errs) > 0 {
		// The rows without a problem are returned too, so that the
		// caller's own checks (input files, settings) can report theirs
		// in the same round.
		var ok []BatchStudy
		for i, s := range p.b.Studies {
			if !p.bad[i] {
				ok = append(ok, s)
				continue
			}
			reported := map[string]bool{}
			if i < len(p.failed) {
				maps.Copy(reported, p.failed[i])
			}
			p.b.Refused = append(p.b.Refused, RefusedStudy{BatchStudy: s, Reported: reported})
		}
		p.b.Studies = ok
		SortBatchErrors(p.errs)
		return p.b, p.errs
	}
	return p.b, nil
}

// SortBatchErrors orders problems by line (problems of the whole table,
// line 0, first), keeping the order of those on one line.
func SortBatchErrors(es BatchErrors) {
	slices.SortStableFunc(es, func(a, b *BatchError) int { return a.Line - b.Line })
}

type batchParser struct {
	name string
	dir  string
	b    *Batch
	errs BatchErrors
	// failed holds, per study, the keys whose value was refused, so that
	// a bad value is not reported a second time as missing.
	failed []map[string]bool
	row    map[string]bool
	// bad marks, per study, a row with some problem.
	bad []bool
	// sharedLine is the line of each key of the shared settings.
	sharedLine map[string]int
}

func (p *batchParser) add(line int, column, study string, err error) {
	var le *lineErr
	if errors.As(err, &le) {
		line, err = le.line, le.err
	}
	p.errs = append(p.errs, &BatchError{File: p.name, Line: line, Column: column, Study: study, Err: err})
}

// setKey decodes one study key into st, reporting a problem against the
// given line, column and study.
func (p *batchParser) setKey(st *Study, key string, v *yaml.Node, study string) {
	if !contains(studyKeys, key) {
		if namesStudyFile(key) {
			p.add(v.Line, key, study, fmt.Errorf("%w: %q is not a study key: %s as the row's keys (and those every study shares under settings:)", ErrBatchColumn, key, noStudyFile))
			return
		}
		hint := ""
		if s := closestKey(key); s != "" {
			hint = fmt.Sprintf("did you mean %q? ", s)
		}
		p.add(v.Line, key, study, fmt.Errorf("%w: %q is not a study key; %sallowed keys are id, %s", ErrBatchColumn, key, hint, strings.Join(batchKeys(), ", ")))
		return
	}
	if key == "out" {
		p.add(v.Line, key, study, fmt.Errorf("%w: out is not allowed in a study table: each study goes into the batch's output folder, in a folder named by its id", ErrBatchColumn))
		return
	}
	if err := st.set(key, v, p.dir); err != nil {
		p.add(v.Line, key, study, err)
		if p.row != nil {
			p.row[key] = true
		}
		return
	}
	if st == p.b.Shared {
		if p.sharedLine == nil {
			p.sharedLine = map[string]int{}
		}
		p.sharedLine[key] = v.Line
	}
}

// noStudyFile says, after "... is not a study key: ", that a table names
// no study file, and how its keys are given instead.
const noStudyFile = "a study table cannot name a study file; give the file's keys"

// namesStudyFile reports whether a column or key (lower case) reads as a
// study file's ("study", "study file", "study_file", "studyfile"): each
// row naming its own, which a table does not do.
func namesStudyFile(c string) bool {
	c = strings.NewReplacer(" ", "", "-", "", "_", "").Replace(strings.ToLower(c))
	return c == "study" || c == "studyfile" || c == "studyyaml"
}

// batchKeys are the study keys a table accepts.
func batchKeys() []string {
	var out []string
	for _, k := range studyKeys {
		if k != "out" {
			out = append(out, k)
		}
	}
	return out
}

// normKey maps the column alias models to model.
func normKey(k string) string {
	k = strings.TrimSpace(k)
	if k == "models" {
		return "model"
	}
	return k
}

// mapping decodes a YAML mapping of study keys (the shared block) into st,
// collecting every problem.
func (p *batchParser) mapping(st *Study, m *yaml.Node, study string, skip string) {
	seen := map[string]int{}
	for i := 0; i+1 < len(m.Content); i += 2 {
		k, v := deref(m.Content[i]), deref(m.Content[i+1])
		if k.Kind != yaml.ScalarNode {
			p.add(k.Line, "", study, fmt.Errorf("%w: a key must be a plain name, found %s", ErrBatchSyntax, kindName(k)))
			continue
		}
		key := normKey(k.Value)
		if key == skip {
			continue
		}
		if first, dup := seen[key]; dup {
			p.add(k.Line, key, study, fmt.Errorf("%w: %q already given at line %d; keep only one", ErrBatchColumn, key, first))
			continue
		}
		seen[key] = k.Line
		if isNull(v) {
			continue
		}
		if v.Line == 0 {
			v.Line = k.Line
		}
		p.setKey(st, key, v, study)
	}
}

func (p *batchParser) parseYAML(data []byte) {
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		line, msg := yamlSyntax(err, data)
		p.add(line, "", "", fmt.Errorf("%w: not valid YAML%s; indent with spaces (not tabs) and quote values that contain ': '", ErrBatchSyntax, msg))
		return
	}
	root := deref(&doc)
	if root.Kind == yaml.DocumentNode && len(root.Content) > 0 {
		root = deref(root.Content[0])
	}
	const shape = "write a mapping with 'settings:' (shared study keys) and 'studies:' (a list of rows, each with id: and study keys)"
	if isNull(root) || root.Kind != yaml.MappingNode {
		p.add(root.Line, "", "", fmt.Errorf("%w: %s", ErrBatchSyntax, shape))
		return
	}
	// A study file given as a table: its keys are study keys, and none
	// is settings or studies. One message says so instead of one per key.
	isStudy, hasTableKey := false, false
	for i := 0; i+1 < len(root.Content); i += 2 {
		switch k := deref(root.Content[i]).Value; {
		case k == "settings" || k == "studies":
			hasTableKey = true
		case contains(studyKeys, k):
			isStudy = true
		}
	}
	if isStudy && !hasTableKey {
		p.add(root.Line, "", "", fmt.Errorf("%w: this is a study file (one study's key: value lines), not a study table; "+
			"run it with areasweep run --study FILE, or %s (areasweep batch --template prints an example)", ErrBatchSyntax, shape))
		return
	}
	var studies *yaml.Node
	for i := 0; i+1 < len(root.Content); i += 2 {
		k, v := deref(root.Content[i]), deref(root.Content[i+1])
		switch k.Value {
		case "settings":
			if isNull(v) {
				continue
			}
			if v.Kind != yaml.MappingNode {
				p.add(v.Line, "settings", "", fmt.Errorf("%w: settings must be a mapping of study keys, found %s", ErrBatchSyntax, kindName(v)))
				continue
			}
			p.mapping(p.b.Shared, v, "", "")
		case "studies":
			studies = v
		default:
			p.add(k.Line, k.Value, "", fmt.Errorf("%w: unknown top-level key %q; %s", ErrBatchSyntax, k.Value, shape))
		}
	}
	if studies == nil || isNull(studies) {
		return // finish reports the empty table
	}
	if studies.Kind != yaml.SequenceNode {
		p.add(studies.Line, "studies", "", fmt.Errorf("%w: studies must be a list, found %s; %s", ErrBatchSyntax, kindName(studies), shape))
		return
	}
	for _, item := range studies.Content {
		item = deref(item)
		if item.Kind != yaml.MappingNode {
			p.add(item.Line, "", "", fmt.Errorf("%w: each study is a mapping with id: and study keys, found %s", ErrBatchSyntax, kindName(item)))
			continue
		}
		id, idLine, idSeen, idTwice, idKind := "", item.Line, false, 0, ""
		for i := 0; i+1 < len(item.Content); i += 2 {
			if k := deref(item.Content[i]); k.Kind == yaml.ScalarNode && k.Value == "id" {
				if idSeen {
					idTwice = k.Line // the first stays: mapping() skips "id"
					continue
				}
				idSeen = true
				v := deref(item.Content[i+1])
				idLine = k.Line
				if v.Kind == yaml.ScalarNode {
					id = v.Value
				} else {
					idKind = kindName(v) // a list or mapping: named as such, not as an empty id
				}
			}
		}
		if idTwice > 0 {
			p.add(idTwice, "id", id, fmt.Errorf("%w: %q already given at line %d; keep only one", ErrBatchColumn, "id", idLine))
		}
		if len(p.b.Studies) == MaxBatchStudies {
			p.add(item.Line, "", "", fmt.Errorf("%w: more than %d studies; split the table", ErrBatchSyntax, MaxBatchStudies))
			return
		}
		st := &Study{}
		p.row = map[string]bool{}
		before := len(p.errs)
		if idKind != "" {
			p.add(idLine, "id", "", fmt.Errorf("%w: the id must be one word, found %s; write for example id: oak", ErrBatchID, idKind))
			p.row["id"] = true
		}
		p.mapping(st, item, id, "id")
		p.b.Studies = append(p.b.Studies, BatchStudy{ID: id, Line: idLine, Study: st})
		p.failed = append(p.failed, p.row)
		p.bad = append(p.bad, len(p.errs) > before)
		p.row = nil
	}
}

func (p *batchParser) parseCSV(data []byte) {
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	// Split off the leading '#' lines (the shared block), keeping line
	// numbers: the block is parsed with the same line count.
	var block bytes.Buffer
	rest := data
	lines := 0
	for len(rest) > 0 && rest[0] == '#' {
		line, after, _ := bytes.Cut(rest, []byte("\n"))
		text := bytes.TrimPrefix(bytes.TrimSuffix(line, []byte("\r")), []byte("#"))
		text = bytes.TrimPrefix(text, []byte(" "))
		block.Write(text)
		block.WriteByte('\n')
		lines++
		rest = after
	}
	if lines > 0 {
		var doc yaml.Node
		if err := yaml.Unmarshal(block.Bytes(), &doc); err != nil {
			line, msg := yamlSyntax(err, block.Bytes())
			p.add(line, "", "", fmt.Errorf("%w: the shared settings (the '#' lines at the top) are not valid YAML%s; write one study key per line, for example\n    # iterations: 1000", ErrBatchSyntax, msg))
		} else if root := deref(&doc); root.Kind == yaml.DocumentNode && len(root.Content) > 0 {
			m := deref(root.Content[0])
			switch {
			case isNull(m):
			case m.Kind != yaml.MappingNode:
				p.add(m.Line, "", "", fmt.Errorf("%w: the '#' lines at the top are the shared settings, one study key per line (# iterations: 1000), found %s", ErrBatchSyntax, kindName(m)))
			default:
				p.mapping(p.b.Shared, m, "", "")
			}
		}
	}
	p.lateSettings(rest, lines)
	header, _, _ := bytes.Cut(rest, []byte("\n"))
	delim := detectDelimiter(header)
	r := csv.NewReader(bytes.NewReader(rest))
	r.Comma = delim
	r.FieldsPerRecord = -1
	r.Comment = '#'
	r.ReuseRecord = false
	var cols []string
	colOK := true
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			var pe *csv.ParseError
			line := 0
			if errors.As(err, &pe) {
				line = pe.StartLine + lines
				err = pe.Err
			}
			p.add(line, "", "", fmt.Errorf("%w: %w; quote cells that hold the delimiter or quotes (\"a,b\")", ErrBatchSyntax, err))
			return
		}
		line, _ := r.FieldPos(0)
		line += lines
		if cols == nil {
			cols = p.header(rec, line, delim)
			if cols == nil {
				colOK = false
				cols = []string{}
			}
			continue
		}
		if !colOK || allBlank(rec) {
			continue
		}
		if len(rec) != len(cols) {
			p.add(line, "", strings.TrimSpace(rec[0]), fmt.Errorf("%w: %d cells, the header has %d columns; every row needs one cell per column (empty cells are allowed)%s",
				ErrBatchSyntax, len(rec), len(cols), rowHint(delim, rec, len(cols))))
			continue
		}
		if len(p.b.Studies) == MaxBatchStudies {
			p.add(line, "", "", fmt.Errorf("%w: more than %d studies; split the table", ErrBatchSyntax, MaxBatchStudies))
			return
		}
		id := strings.TrimSpace(rec[0])
		st := &Study{}
		p.row = map[string]bool{}
		before := len(p.errs)
		for j := 1; j < len(rec); j++ {
			cell := strings.TrimSpace(rec[j])
			if cell == "" {
				continue
			}
			cl, _ := r.FieldPos(j)
			if cols[j] == "" {
				p.add(cl+lines, "", id, fmt.Errorf("%w: column %d has no name in the header but holds %s on this row; name the column with a study key, or clear the cell", ErrBatchColumn, j+1, shown(cell)))
				continue
			}
			if err := decimalCommaCell(delim, cols[j], cell); err != nil {
				p.add(cl+lines, cols[j], id, err)
				p.row[cols[j]] = true
				continue
			}
			p.setKey(st, cols[j], cellNode(cols[j], cell, cl+lines), id)
		}
		p.b.Studies = append(p.b.Studies, BatchStudy{ID: id, Line: line, Study: st})
		p.failed = append(p.failed, p.row)
		p.bad = append(p.bad, len(p.errs) > before)
		p.row = nil
	}
	if cols == nil {
		p.add(lines+1, "", "", fmt.Errorf("%w: no header line; write id,model,occurrences,region (and any other study key) as the first line after the '#' settings", ErrBatchSyntax))
	}
}

// header checks the header line: id first, then distinct study keys. It
// returns nil when the header is unusable.
func (p *batchParser) header(rec []string, line int, delim rune) []string {
	cols := make([]string, len(rec))
	ok := true
	seen := map[string]int{}
	for j, c := range rec {
		c = normKey(strings.ToLower(c))
		cols[j] = c
		switch {
		case j == 0 && c != "id":
			hint := commaHint(delim, len(rec), 4)
			if cols, _ := findColumns(rec, delim); cols.lon.name != "" && cols.lat.name != "" {
				// An occurrence table given to batch: named as one, and
				// its other columns are not listed one by one.
				p.add(line, c, "", fmt.Errorf("%w: this is an occurrence table (columns %q and %q), not a study table; give it to areasweep run --occurrences, or name it in a study table's occurrences column (areasweep batch --template prints an example table)", ErrBatchColumn, cols.lon.name, cols.lat.name))
				return nil
			}
			p.add(line, c, "", fmt.Errorf("%w: the first column must be id, found %q%s", ErrBatchColumn, rec[0], hint))
			ok = false
		case j == 0:
		case c == "":
			// A column without a name, as a spreadsheet exports the
			// empty columns right of the table ("id,...,seed,,"): its
			// cells must be empty (the rows check it).
			continue
		case c == "id":
			p.add(line, c, "", fmt.Errorf("%w: id appears again in column %d", ErrBatchColumn, j+1))
			ok = false
		case namesStudyFile(c):
			p.add(line, c, "", fmt.Errorf("%w: column %d %q is not a study key: %s as the row's columns (and those every study shares as the '# key: value' lines at the top)", ErrBatchColumn, j+1, rec[j], noStudyFile))
			ok = false
		case c == "out" || !contains(studyKeys, c):
			hint := ""
			if s := closestKey(c); s != "" && s != "out" && c != "out" {
				hint = fmt.Sprintf("did you mean %q? ", s)
			}
			why := "is not a study key"
			if c == "out" {
				why = "is not allowed: each study goes into the batch's output folder, in a folder named by its id"
			}
			p.add(line, c, "", fmt.Errorf("%w: column %d %q %s; %sallowed columns are id, %s", ErrBatchColumn, j+1, rec[j], why, hint, strings.Join(batchKeys(), ", ")))
			ok = false
		}
		if first, dup := seen[c]; dup && j > 0 && c != "id" {
			both := fmt.Sprintf("are both %q", c)
			if a, b := strings.TrimSpace(rec[first-1]), strings.TrimSpace(rec[j]); a != b {
				// Two spellings of one key (model and models).
				both = fmt.Sprintf("%q and %q both give %q", a, b, c)
			}
			p.add(line, c, "", fmt.Errorf("%w: columns %d and %d %s; keep one of them", ErrBatchColumn, first, j+1, both))
			ok = false
		}
		seen[c] = j + 1
	}
	if !ok {
		return nil
	}
	return cols
}

// yamlSyntax returns the message of a YAML reader error on data without
// its "yaml: line N:" prefix, saying "near line N" instead (yamlNear): the
// reader's line is where it noticed the problem (see syntaxError), so no
// exact line is claimed (the returned line is 0).
func yamlSyntax(err error, data []byte) (int, string) {
	near := yamlNear(err, data, true)
	msg := strings.TrimPrefix(err.Error(), "yaml: ")
	return 0, near + ": " + yamlWords(yamlLineRE.ReplaceAllString(msg, ""))
}

// lateSettings refuses each '#' line of rest (the table after its shared
// block, which starts after line skip) that reads as a shared setting
// ("# iterations: 20", a study key then ':'): past the block (after a
// blank line, the header or a row) a '#' line is a comment, and such a
// setting was ignored without a word (the studies ran 1000 iterations).
// A "## ..." line stays a comment.
func (p *batchParser) lateSettings(rest []byte, skip int) {
	for i, line := range bytes.Split(rest, []byte("\n")) {
		text, ok := bytes.CutPrefix(bytes.TrimSpace(line), []byte("#"))
		if !ok || bytes.HasPrefix(text, []byte("#")) {
			continue
		}
		k, _, ok := bytes.Cut(text, []byte(":"))
		key := string(bytes.TrimSpace(k))
		if row, known := settings.Lookup(key); !ok || !(known && row.Study || key == "models") {
			continue
		}
		p.add(skip+i+1, "", "", fmt.Errorf("%w: this '#' line reads as the shared setting %q, but only the '#' lines at the very top of the table, before any blank line and the header, are shared settings: "+
			"here it is a comment, and the studies would run without it; move it up into that block (with no blank line above it), or write it with '##' to keep it as a comment", ErrBatchSyntax, key))
	}
}

// cellNode turns a CSV cell into the YAML node a study file would hold:
// NAME=PATH lists split at ';' into a list, number lists too when the
// cell holds a ';' (the same separator, and no quotes needed around
// "20;50"; "20,50" in quotes still works), anything else a plain scalar
// whose type is resolved as in YAML.
func cellNode(key, cell string, line int) *yaml.Node {
	split := false
	switch key {
	case "model", "null", "extra":
		split = true
	default:
		row, ok := settings.Lookup(key)
		split = ok && row.Kind == settings.FloatList && strings.Contains(cell, ";")
	}
	if split {
		n := &yaml.Node{Kind: yaml.SequenceNode, Line: line, LineComment: tableCell}
		for _, part := range strings.Split(cell, ";") {
			n.Content = append(n.Content, &yaml.Node{Kind: yaml.ScalarNode, Value: strings.TrimSpace(part), Line: line})
		}
		return n
	}
	return &yaml.Node{Kind: yaml.ScalarNode, Value: cell, Line: line, LineComment: tableCell}
}

// decimalCommaCell refuses a number-list cell of a table delimited by
// semicolons or tabs that holds one comma and neither a ';' nor a dot: such
// a table is what a spreadsheet writes where the decimal separator is a
// comma, so "12,5" is as likely the number 12.5 (the occurrence table
// reads it so) as the list 12 and 5, which a comma separates elsewhere;
// it was read as the list without a word ("0,05" for e became 0 and 5,
// refused as "e value 0 is outside (0,1)"). nil for any other cell.
func decimalCommaCell(delim rune, key, cell string) error {
	if delim == ',' || strings.Count(cell, ",") != 1 || strings.ContainsAny(cell, ";.") {
		return nil // two commas or more: a list, which no number is
	}
	if row, ok := settings.Lookup(key); !ok || row.Kind != settings.FloatList {
		return nil
	}
	list := strings.ReplaceAll(cell, ",", ";")
	if delim == ';' {
		list = `"` + list + `"` // its ';' would split the cell unquoted
	}
	return badValue("%s in a table delimited by %s could be a number with a decimal comma (%s) or a list (%s); "+
		"write %s for the number, or %s for the list",
		shown(cell), map[rune]string{';': "semicolons", '\t': "tabs"}[delim],
		strings.ReplaceAll(cell, ",", "."), strings.Join(strings.Split(cell, ","), " and "),
		strings.ReplaceAll(cell, ",", "."), list)
}

// tableCell marks (as its LineComment, which nothing writes out) a node
// made from a CSV table's cell, so that a message can show how a value is
// written there rather than in a study file.
const tableCell = "table cell"

// finish checks ids and required keys and lays every row over the shared
// block.
func (p *batchParser) finish() {
	if len(p.b.Studies) == 0 && len(p.errs) == 0 {
		p.add(0, "", "", fmt.Errorf("%w: add one row per study", ErrBatchEmpty))
		return
	}
	seen := map[string]int{}
	for i := range p.b.Studies {
		s := &p.b.Studies[i]
		before := len(p.errs)
		switch {
		case s.ID == "" && i < len(p.failed) && p.failed[i]["id"]:
			// Its id was refused as it was read.
		case s.ID == "":
			p.add(s.Line, "id", "", fmt.Errorf("%w: the id is empty; give every study an id (letters, digits, '_', '-', '.')", ErrBatchID))
		case !batchIDRE.MatchString(s.ID):
			p.add(s.Line, "id", "", fmt.Errorf("%w: %s cannot name a folder; use 1 to 64 ASCII letters (A-Z, a-z: no accents), digits, '_', '-' or '.', starting with a letter or digit%s", ErrBatchID, shown(s.ID), idSuggestion(s.ID)))
		default:
			low := strings.ToLower(s.ID)
			if first, dup := seen[low]; dup {
				p.add(s.Line, "id", s.ID, fmt.Errorf("%w: the id is already used on line %d (ids are compared ignoring case, as folder names on some systems); give each study its own id", ErrBatchID, first))
			} else {
				seen[low] = s.Line
			}
		}
		s.SharedLines = map[string]int{}
		for k := range *p.b.Shared {
			if _, own := (*s.Study)[k]; !own && p.sharedLine[k] > 0 {
				s.SharedLines[k] = p.sharedLine[k]
			}
		}
		merged := overlay(p.b.Shared, s.Study)
		for _, k := range requiredKeys {
			if p.failed[i][k] {
				continue // its bad value is already reported
			}
			if v, present := merged.flagValues(k, func(float64) string { return "" }); !present || len(v) == 0 {
				p.add(s.Line, k, s.ID, fmt.Errorf("%w: no %s for this study; give it in the row or in the shared settings", ErrBatchMissing, k))
			}
		}
		s.Study = merged
		if len(p.errs) > before {
			p.bad[i] = true
		}
	}
}

var idUnsafe = regexp.MustCompile(`[^A-Za-z0-9_.\-]+`)

// idSuggestion proposes a folder-safe id for a refused one: accents
// removed from letters (ö is o: "Quercus röbur" is Quercus_robur, not
// Quercus_r_bur), runs of other characters (spaces, '/', letters of
// other scripts) replaced by '_', leading and trailing '_', '.' and '-'
// removed, cut to 64 characters; "" when nothing usable is left.
func idSuggestion(id string) string {
	s := strings.Trim(idUnsafe.ReplaceAllString(foldAccents(id), "_"), "_.-")
	if len(s) > 64 {
		s = strings.TrimRight(s[:64], "_.-")
	}
	if s == "" || !batchIDRE.MatchString(s) || 2*alnum(s) < alnum(id) {
		// Nothing left, or less than half of the id's letters and digits
		// (ü, ï ... are replaced): no longer a name for the same study.
		return ""
	}
	return fmt.Sprintf(", for example %q", s)
}

// foldAccents returns s with the combining marks of its canonical
// decomposition (NFD) removed: é, ö, ñ, å read as e, o, n, a. Letters
// without one (ß, ø, ł) stay.
func foldAccents(s string) string {
	var b strings.Builder
	for _, r := range norm.NFD.String(s) {
		if !unicode.Is(unicode.Mn, r) {
			b.WriteRune(r)
		}
	}
	return norm.NFC.String(b.String())
}

// alnum counts the letters and digits of s, in any script.
func alnum(s string) int {
	n := 0
	for _, r := range s {
		if unicode.IsLetter(r) || unicode.IsDigit(r) {
			n++
		}
	}
	return n
}

// overlay returns a copy of base with every setting present in top laid
// over it (a list in top replaces base's list as a whole).
func overlay(base, top *Study) *Study {
	out := Study{}
	for k, v := range *base {
		out[k] = v
	}
	for k, v := range *top {
		out[k] = v
	}
	return &out
}

// WriteBatchTemplate writes an example CSV study table to w, for users to
// start from.
func WriteBatchTemplate(w io.Writer) error {
	bw := bufio.NewWriter(w)
	fmt.Fprint(bw, `# iterations: 1000
# region-buffers: [100, 250]
## Shared settings above ('#' lines, study-file keys); one study per row below.
id,model,occurrences,region,ecoregions,ecoregion-field
oak,gbm=oak/gbm.tif;glm=oak/glm.tif,oak/points.csv,oak/region.gpkg,,
lynx,gbm=lynx/gbm.tif,lynx/points.csv,lynx/region.gpkg,eco.gpkg,ECO_NAME
`)
	return bw.Flush()
}

// rowHint explains a row with more cells than the header in a
// comma-separated table by its likely cause: NAME=PATH items of one cell
// separated by commas instead of ';', a decimal comma (commaHint) when
// two neighbouring cells end and start with a digit (0,05 split in two),
// else a cell holding a comma that needs double quotes (a path through a
// folder "Smith, J"). In a table delimited by semicolons, the ';' between a cell's items (two
// models, a list 20;50) splits the cell unless it is in double quotes.
func rowHint(delim rune, rec []string, header int) string {
	if delim == ';' && len(rec) > header {
		return `. In a table delimited by semicolons, a cell of several items separated by ';' (gbm=a.tif;glm=b.tif, or 20;50) goes in double quotes ("gbm=a.tif;glm=b.tif"), or else its items fall into the next columns`
	}
	if delim != ',' || len(rec) <= header {
		return ""
	}
	named := 0
	for _, c := range rec[1:] {
		if strings.Contains(c, "=") {
			named++
		}
	}
	if named >= 2 {
		return ". Several NAME=PATH items in one cell are separated by ';' (gbm=a.tif;glm=b.tif): with ',' they fall into the next columns"
	}
	for j := 1; j+1 < len(rec); j++ {
		a, b := strings.TrimSpace(rec[j]), strings.TrimSpace(rec[j+1])
		if a != "" && b != "" && isDigit(a[len(a)-1]) && isDigit(b[0]) && !strings.Contains(a, "/") {
			return commaHint(delim, len(rec), header) // "0,05" split into 0 and 05
		}
	}
	return `. A cell that holds a comma (a path such as "/data/Smith, J/m.tif") goes in double quotes, or else it falls into the next columns`
}

// isDigit reports whether c is an ASCII digit.
func isDigit(c byte) bool { return '0' <= c && c <= '9' }
