package inputs

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"areasweep/extent/vocab"
)

// Record is one occurrence read from the table.
type Record struct {
	// Line is the 1-based physical line number of the record in the file
	// (the header is line 1 unless blank lines precede it).
	Line int
	// X and Y are the coordinates as given: longitude and latitude in
	// degrees, or easting and northing when the table has a projected CRS.
	X, Y float64
	// Role is vocab.RoleTrain (a record used to calibrate the model) or
	// vocab.RoleTest (a record held out to evaluate it).
	Role vocab.Role
	// Taxon is the record's name in the table's species column (the
	// first of TaxonNames in the header; "" without one), which only a
	// warning reads: every record is scored as one species.
	Taxon string
}

// TaxonNames are the headers of a species column, in order of
// preference (case ignored): a portal's export has several, and
// "species" is the name without author or subspecies.
var TaxonNames = []string{"species", "scientificname", "scientific_name", "species_name", "taxon"}

// Sentinel errors of the occurrence reader. They are wrapped inside a
// *ParseError; test for them with errors.Is.
var (
	// ErrNoCoordinates: the header has no longitude or no latitude column.
	ErrNoCoordinates = errors.New("inputs: header has no longitude/latitude columns")
	// ErrNoRole: the header has no role column.
	ErrNoRole = errors.New("inputs: header has no role column")
	// ErrAmbiguousColumn: two header fields name the same column.
	ErrAmbiguousColumn = errors.New("inputs: header has two columns for the same value")
	// ErrBadNumber: a coordinate cell is empty, not a number, NaN or infinite.
	ErrBadNumber = errors.New("inputs: value is not a finite number")
	// ErrBadRole: a role cell is not one of the accepted spellings.
	ErrBadRole = errors.New("inputs: role is not train or test")
	// ErrOutOfRange: a geographic coordinate lies outside its valid range.
	ErrOutOfRange = errors.New("inputs: coordinate outside the valid range for degrees")
	// ErrFarCoordinate: a projected coordinate lies beyond vocab.MaxProjected.
	ErrFarCoordinate = errors.New("inputs: coordinate beyond the Earth")
	// ErrSwapped: the longitude and latitude columns look exchanged.
	ErrSwapped = errors.New("inputs: longitude and latitude columns look swapped")
	// ErrMalformed: the text is not valid delimited text (quotes, missing cells).
	ErrMalformed = errors.New("inputs: malformed table")
	// ErrEncoding: the file is not UTF-8 text.
	ErrEncoding = errors.New("inputs: file is not UTF-8 text")
	// ErrNoRecords: the file has no record below the header (or no header).
	ErrNoRecords = errors.New("inputs: file has no records")
	// ErrNoTest: no record has role test.
	ErrNoTest = errors.New("inputs: no record has role test")
	// ErrNoTrain: no record has role train.
	ErrNoTrain = errors.New("inputs: no record has role train")
	// ErrAbsence: records of the table's occurrence status column say
	// the species was absent.
	ErrAbsence = errors.New("inputs: records of absences")
)

// StatusNames are the headers of an occurrence status column (Darwin
// Core's occurrenceStatus, as a GBIF download holds it), whose value
// "absent" marks a record of an absence.
var StatusNames = []string{"occurrencestatus", "occurrence_status"}

// ParseError reports a problem in an input file: which file, which line,
// which column (header field name) and, in the wrapped error, what is wrong
// and what to do. Line is 0 when the problem concerns the whole file, and
// Field is empty when it concerns no single column.
type ParseError struct {
	File  string
	Line  int
	Field string
	Err   error
}

// Error formats the error as "inputs: FILE line N, column "F": message".
func (e *ParseError) Error() string {
	return located(e.File, e.Line, "", "column", e.Field, e.Err)
}

// Unwrap returns the wrapped error, so errors.Is finds the sentinel.
func (e *ParseError) Unwrap() error { return e.Err }

// located formats the package's structured errors as
// `inputs: FILE line N, study "ID", WHAT "NAME": message`, leaving out the
// line when it is 0, the study and the named place when they are empty,
// and the wrapped error's own "inputs: " prefix.
func located(file string, line int, study, what, name string, err error) string {
	var b strings.Builder
	b.WriteString("inputs: ")
	b.WriteString(file)
	if line > 0 {
		fmt.Fprintf(&b, " line %d", line)
	}
	if study != "" {
		fmt.Fprintf(&b, ", study %q", study)
	}
	if name != "" {
		fmt.Fprintf(&b, ", %s %q", what, name)
	}
	b.WriteString(": ")
	if err != nil {
		b.WriteString(strings.TrimPrefix(err.Error(), "inputs: "))
	}
	return b.String()
}

// Accepted header spellings, lower case.
var (
	lonNames  = []string{"lon", "long", "lng", "longitude", "x", "decimallongitude", "decimal_longitude"}
	latNames  = []string{"lat", "latitude", "y", "decimallatitude", "decimal_latitude"}
	roleNames = []string{"role"}
)

// LongitudeHeaders returns the accepted spellings of the longitude column
// (lower case; matching ignores case and surrounding spaces).
func LongitudeHeaders() []string { return append([]string(nil), lonNames...) }

// LatitudeHeaders returns the accepted spellings of the latitude column
// (lower case; matching ignores case and surrounding spaces).
func LatitudeHeaders() []string { return append([]string(nil), latNames...) }

const roleAdvice = "allowed values are train, training, test and testing (any case)"

// ReadOccurrences reads the occurrence table at path. When geographic is
// true the coordinates are WGS84 degrees and are range-checked; otherwise
// they are taken as given. See the package documentation for the accepted
// layout and ParseOccurrences for the errors.
func ReadOccurrences(path string, geographic bool) ([]Record, error) {
	if err := checkRegular(path, "occurrence table"); err != nil {
		return nil, err
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("inputs: cannot open occurrence table: %w", err)
	}
	defer f.Close()
	return ParseOccurrences(f, path, geographic)
}

// ParseOccurrences reads an occurrence table from r; name is used in error
// messages in place of a file name. It returns the records in file order.
//
// Errors are *ParseError values wrapping one of ErrNoCoordinates, ErrNoRole,
// ErrAmbiguousColumn, ErrBadNumber, ErrBadRole, ErrOutOfRange, ErrSwapped,
// ErrMalformed, ErrEncoding, ErrNoRecords, ErrNoTest or ErrNoTrain, or a
// read error from r. When several lines are wrong, the first problem found
// is reported: problems of form (numbers, roles, quoting) are found in a
// first pass, range problems after it, and missing roles last.
//
// A tab-separated table is first read with CSV quoting; when that fails on
// a quote (a GBIF download quotes nothing, so a locality such as
// 5 km N of "Big Rock" holds bare quotes) and r can seek, it is read again
// with quotes as ordinary characters, one record per line (see plainRows).
func ParseOccurrences(r io.Reader, name string, geographic bool) ([]Record, error) {
	if name == "" {
		name = "input"
	}
	recs, err := parseOccurrences(r, name, geographic, false)
	var qe *tabQuoteError
	if !errors.As(err, &qe) {
		return recs, err
	}
	s, ok := r.(io.Seeker)
	if !ok {
		return nil, qe.err
	}
	if _, serr := s.Seek(0, io.SeekStart); serr != nil {
		return nil, qe.err
	}
	recs, err = parseOccurrences(r, name, geographic, true)
	var pe *ParseError
	if errors.As(err, &pe) {
		pe.Err = fmt.Errorf("%w (the table was read with quotes as ordinary characters, as in a GBIF download, "+
			"because line %d is not valid CSV quoting)", pe.Err, qe.line)
	}
	return recs, err
}

// crLines returns a reader of r's text in which, when its lines end in a
// carriage return alone (Excel's "CSV (Macintosh)", classic Mac OS: no
// line feed but some carriage return in the first 64 KiB), every return
// reads as a line feed; any other text reads unchanged. The occurrence
// table and the study table read through it.
func crLines(r io.Reader) io.Reader {
	pr := bufio.NewReaderSize(r, 64<<10)
	if head, _ := pr.Peek(64 << 10); bytes.IndexByte(head, '\n') < 0 && bytes.IndexByte(head, '\r') >= 0 {
		return crReader{pr}
	}
	return pr
}

// crReader turns every carriage return into a line feed.
type crReader struct{ r io.Reader }

func (c crReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	for i, b := range p[:n] {
		if b == '\r' {
			p[i] = '\n'
		}
	}
	return n, err
}

// tabQuoteError marks a quoting error in a tab-separated table, which
// ParseOccurrences answers by reading the table again without quoting.
type tabQuoteError struct {
	err  error
	line int
}

func (e *tabQuoteError) Error() string { return e.err.Error() }
func (e *tabQuoteError) Unwrap() error { return e.err }

// plainRows reads a tab-separated table with no quoting, as GBIF writes
// its downloads: each physical line is one record, cells are split at
// every tab, and a cell that starts and ends with a double quote loses
// them (with "" inside read as "), so that a header or role written
// "role" still reads. It returns the cells and the line number, skipping
// lines whose cells are all blank; io.EOF at the end.
//
// A row with more cells than the header is refused: a tab inside a quoted
// cell would shift every later cell, and the coordinates would be read
// from the wrong columns.
func plainRows(br *bufio.Reader, name string, perr func(int, string, error) error) func() ([]string, int, error) {
	line, width := 0, -1
	return func() ([]string, int, error) {
		for {
			s, err := br.ReadString('\n')
			if err != nil && err != io.EOF {
				return nil, 0, tooLarge(err, perr, name)
			}
			if s == "" && err == io.EOF {
				return nil, 0, io.EOF
			}
			line++
			s = strings.TrimSuffix(strings.TrimSuffix(s, "\n"), "\r")
			rec := strings.Split(s, "\t")
			for i, c := range rec {
				if t := strings.TrimSpace(c); len(t) >= 2 && t[0] == '"' && t[len(t)-1] == '"' {
					rec[i] = strings.ReplaceAll(t[1:len(t)-1], `""`, `"`)
				}
			}
			if allBlank(rec) {
				continue
			}
			if width < 0 {
				width = len(rec)
			} else if len(rec) > width {
				return nil, 0, perr(line, "", fmt.Errorf("%w: the line has %d tab-separated cells but the header %d; "+
					"a cell holding a tab must be in double quotes, and then every quote inside a cell must be doubled", ErrMalformed, len(rec), width))
			}
			return rec, line, nil
		}
	}
}

// parseOccurrences is ParseOccurrences reading CSV quoting, or none when
// plain (a tab-separated table only).
func parseOccurrences(r io.Reader, name string, geographic, plain bool) ([]Record, error) {
	perr := func(line int, field string, err error) error {
		return &ParseError{File: name, Line: line, Field: field, Err: err}
	}

	lim := newLimitedReader(crLines(r), MaxOccurrenceBytes, MaxLineBytes)
	br := bufio.NewReader(lim)
	if b, _ := br.Peek(4); bytes.HasPrefix(b, []byte{0xEF, 0xBB, 0xBF}) {
		_, _ = br.Discard(3)
	} else if bytes.HasPrefix(b, []byte{0xFF, 0xFE, 0, 0}) || bytes.HasPrefix(b, []byte{0, 0, 0xFE, 0xFF}) {
		return nil, perr(1, "", fmt.Errorf("%w: it starts with a UTF-32 byte-order mark; "+
			"save the table as \"CSV UTF-8\" (or plain UTF-8 text) and run again", ErrEncoding))
	} else if len(b) >= 2 && ((b[0] == 0xFF && b[1] == 0xFE) || (b[0] == 0xFE && b[1] == 0xFF)) {
		return nil, perr(1, "", fmt.Errorf("%w: it starts with a UTF-16 byte-order mark; "+
			"save the table as \"CSV UTF-8\" (or plain UTF-8 text) and run again", ErrEncoding))
	}
	if head, _ := br.Peek(512); bytes.IndexByte(head, 0) >= 0 {
		if order := utf16WithoutBOM(head); order != "" && binaryKind(head) == "" {
			return nil, perr(0, "", fmt.Errorf("%w: it is UTF-16 text (%s) without a byte-order mark: every other byte is 0; "+
				"save the table as \"CSV UTF-8\" (or plain UTF-8 text) and run again", ErrEncoding, order))
		}
		return nil, perr(0, "", fmt.Errorf("%w: it is a binary file%s, not a text table; "+
			"give the occurrence table as CSV or tab-separated text (in a spreadsheet: save as \"CSV UTF-8\")", ErrEncoding, binaryKind(head)))
	}

	// Find the header line (the first non-blank one) to choose the delimiter.
	// The lines read here are fed back to the CSV reader so that line
	// numbers stay physical.
	var pre []byte
	var header []byte
	var declared rune // Excel's "sep=;" line before the header
	for {
		line, err := br.ReadBytes('\n')
		if err != nil && err != io.EOF {
			// A line over the limit: its first MiB is no header.
			return nil, tooLarge(err, perr, name)
		}
		if t := bytes.TrimRight(line, "\r\n"); declared == 0 && len(pre) == 0 && len(t) == 5 && bytes.HasPrefix(t, []byte("sep=")) && bytes.IndexByte([]byte(",;\t"), t[4]) >= 0 {
			// Excel writes (and reads) "sep=;" as a first line naming
			// the delimiter; it is no header. Kept as a blank line, so
			// that line numbers stay physical.
			declared = rune(t[4])
			line = []byte("\n")
		}
		pre = append(pre, line...)
		if len(bytes.TrimSpace(line)) > 0 {
			header = line
			break
		}
		if err == io.EOF {
			break
		}
	}
	if header == nil {
		return nil, perr(0, "", fmt.Errorf("%w: the file is empty; write a header line "+
			"(for example lon,lat,role) and one line per occurrence below it", ErrNoRecords))
	}
	if t := bytes.TrimSpace(header); len(t) > 0 && (t[0] == '{' || t[0] == '[') {
		return nil, perr(0, "", fmt.Errorf("%w: it is JSON (GeoJSON?), not a delimited table; write the points as CSV with their coordinates "+
			"and a role column, e.g. ogr2ogr -f CSV -lco GEOMETRY=AS_XY points.csv %s, then add role", ErrNoCoordinates, name))
	}
	delim := detectDelimiter(header)
	if declared != 0 {
		delim = declared
	} else if delim == ',' {
		delim = commaInHeaderName(header)
	}
	if plain && delim == '\t' {
		return readRecords(plainRows(bufio.NewReader(io.MultiReader(bytes.NewReader(pre), br)), name, perr), delim, perr, geographic)
	}

	cr := csv.NewReader(io.MultiReader(bytes.NewReader(pre), br))
	cr.Comma = delim
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	// With a white-space delimiter, TrimLeadingSpace would merge empty cells.
	cr.TrimLeadingSpace = delim != '\t'

	readRow := func() ([]string, int, error) {
		for {
			rec, err := cr.Read()
			if err == io.EOF {
				return nil, 0, io.EOF
			}
			if err != nil {
				var pe *csv.ParseError
				if errors.As(err, &pe) {
					e := perr(pe.Line, "", fmt.Errorf("%w: %w (at character %d of the line); "+
						"put double quotes around a cell that contains the delimiter or a quote, "+
						"and write a quote inside such a cell as two quotes", ErrMalformed, pe.Err, pe.Column))
					if pe.StartLine > 0 && pe.StartLine < pe.Line && errors.Is(pe.Err, csv.ErrQuote) {
						// A quote opened and not closed at its cell's end
						// takes in the lines after it: the reader fails
						// where it gives up (the last line, for a quote
						// never closed), far from the quote to fix.
						e = perr(pe.StartLine, "", fmt.Errorf("%w: a cell on this line starts with a double quote that does not end the cell, "+
							"so the cell runs on over the next lines, up to line %d where the reader gave up; "+
							"close the quote at the end of the cell or remove it (write a quote inside a quoted cell as two quotes)", ErrMalformed, pe.Line))
					}
					if delim == '\t' && !plain && (errors.Is(pe.Err, csv.ErrBareQuote) || errors.Is(pe.Err, csv.ErrQuote)) {
						e = &tabQuoteError{err: e, line: pe.Line}
					}
					return nil, 0, e
				}
				return nil, 0, tooLarge(err, perr, name)
			}
			if allBlank(rec) {
				continue
			}
			line, _ := cr.FieldPos(0)
			return rec, line, nil
		}
	}
	return readRecords(readRow, delim, perr, geographic)
}

// readRecords reads the header and the records from readRow, which returns
// each non-blank row with its physical line number, and io.EOF at the end.
func readRecords(readRow func() ([]string, int, error), delim rune, perr func(int, string, error) error, geographic bool) ([]Record, error) {
	hdr, hdrLine, err := readRow()
	if err == io.EOF {
		return nil, perr(0, "", fmt.Errorf("%w: no header line found", ErrNoRecords))
	}
	if err != nil {
		return nil, err
	}
	cols, err := findColumns(hdr, delim)
	if err != nil {
		if len(hdr) > 0 && strings.HasPrefix(strings.TrimSpace(hdr[0]), "#") {
			// A comment above the header (an export's date, a note) is
			// read as the header, and its words were all the message
			// gave to go on.
			if k, _, ok := strings.Cut(strings.TrimLeft(strings.TrimSpace(hdr[0]), "# "), ":"); ok && contains(studyKeys, strings.TrimSpace(k)) {
				// A study table's shared settings: the table goes to
				// batch, and deleting those lines is no advice.
				err = fmt.Errorf("%w. This line is a study table's shared setting (# %s: ...): a study table is run with areasweep batch TABLE --out DIR; --occurrences takes the table of records", err, strings.TrimSpace(k))
			} else {
				err = fmt.Errorf("%w. This line starts with '#': the table has no comment lines, and its first line that is not blank is the header; delete the lines above the header", err)
			}
		}
		return nil, perr(hdrLine, "", err)
	}

	var recs []Record
	var absent []int // lines of records of absences
	taxa := map[string]string{}
	for {
		row, line, err := readRow()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		get := func(c column) (string, error) {
			if c.index >= len(row) {
				return "", perr(line, c.name, fmt.Errorf("%w: the line has %d cells but %q is cell %d of the header; "+
					"check for a missing delimiter or a cell cut off at the end of the line",
					ErrMalformed, len(row), c.name, c.index+1))
			}
			return strings.TrimSpace(row[c.index]), nil
		}
		if err := otherDelimiter(row, len(hdr), delim); err != nil {
			return nil, perr(line, "", err)
		}
		if err := shiftedCoordinates(row, len(hdr), cols, delim); err != nil {
			return nil, perr(line, "", err)
		}
		if repeatsHeader(row, cols) {
			// Two tables joined into one (cat a.csv b.csv): the second
			// one's header is a record that no column can read.
			return nil, perr(line, "", fmt.Errorf("%w: it repeats the header (line %d), as when two tables are joined into one; delete it", ErrMalformed, hdrLine))
		}
		var rec Record
		rec.Line = line
		for _, c := range []struct {
			col  column
			dst  *float64
			what string
		}{{cols.lon, &rec.X, "longitude"}, {cols.lat, &rec.Y, "latitude"}} {
			s, err := get(c.col)
			if err != nil {
				return nil, err
			}
			v, err := parseNumber(s, delim != ',')
			if err != nil && missingValue(s) {
				// A portal's export holds records without coordinates,
				// often many: name them all at once, not one per run.
				return nil, perr(line, c.col.name, fmt.Errorf("%w: %s; %s", ErrBadNumber, err, emptyCoordinates(line, row, cols, readRow)))
			}
			if err != nil {
				return nil, perr(line, c.col.name, fmt.Errorf("%w: %s; write the %s as a decimal number "+
					"such as -12.5 (dot as decimal separator), or delete the line%s", ErrBadNumber, err, c.what, commaHint(delim, len(row), len(hdr))))
			}
			*c.dst = v
		}
		s, err := get(cols.role)
		if err != nil {
			return nil, err
		}
		role, ok := parseRole(s)
		if !ok {
			return nil, perr(line, cols.role.name, fmt.Errorf("%w: found %s; %s%s", ErrBadRole, shown(s), roleAdvice, commaHint(delim, len(row), len(hdr))))
		}
		rec.Role = role
		if i := cols.taxon.index; i >= 0 && i < len(row) {
			if rec.Taxon = strings.TrimSpace(row[i]); rec.Taxon != "" {
				if t, ok := taxa[rec.Taxon]; ok {
					rec.Taxon = t // one copy of each name
				} else {
					taxa[rec.Taxon] = rec.Taxon
				}
			}
		}
		if i := cols.status.index; i >= 0 && i < len(row) && strings.EqualFold(strings.TrimSpace(row[i]), "absent") {
			absent = append(absent, line)
		}
		recs = append(recs, rec)
	}

	if len(absent) > 0 {
		return nil, perr(0, cols.status.name, fmt.Errorf("%w: %d record(s) say ABSENT in column %s (%s); "+
			"areasweep scores presences only and would read each as a presence where the species was not found: delete those lines (keep the PRESENT ones)",
			ErrAbsence, len(absent), cols.status.name, lineList(absent)))
	}
	if len(recs) == 0 {
		return nil, perr(0, "", fmt.Errorf("%w: only a header was found (line %d); "+
			"add one line per occurrence below the header", ErrNoRecords, hdrLine))
	}
	if geographic {
		if err := checkDegrees(recs, cols, perr); err != nil {
			return nil, err
		}
	} else if err := checkProjected(recs, cols, perr); err != nil {
		return nil, err
	}
	var nTrain, nTest int
	for _, r := range recs {
		if r.Role == vocab.RoleTrain {
			nTrain++
		} else {
			nTest++
		}
	}
	if nTest == 0 {
		return nil, perr(0, cols.role.name, fmt.Errorf("%w: %s train; "+
			"mark the occurrences held out for evaluation with role test", ErrNoTest, allRecords(nTrain)))
	}
	if nTrain == 0 {
		return nil, perr(0, cols.role.name, fmt.Errorf("%w: %s test; "+
			"mark the occurrences used to calibrate the model with role train", ErrNoTrain, allRecords(nTest)))
	}
	return recs, nil
}

// lineList names the first ten of lines ("lines 5, 9 and 3 more",
// "line 5").
func lineList(lines []int) string {
	if len(lines) == 1 {
		return "line " + strconv.Itoa(lines[0])
	}
	n := min(len(lines), 10)
	list := make([]string, n)
	for i, l := range lines[:n] {
		list[i] = strconv.Itoa(l)
	}
	if len(lines) > n {
		return fmt.Sprintf("lines %s and %d more", strings.Join(list, ", "), len(lines)-n)
	}
	return "lines " + strings.Join(list, ", ")
}

// missingValue reports whether a coordinate cell holds no value: empty,
// or a word for a missing value as R (NA), pandas or a database (NaN,
// null, None) write it.
func missingValue(s string) bool {
	for _, w := range []string{"", "na", "n/a", "nan", "null", "none"} {
		if strings.EqualFold(s, w) {
			return true
		}
	}
	return false
}

// emptyCoordinates says what to do about a record whose longitude or
// latitude is empty (row, at line), as a biodiversity portal's export
// holds for records without coordinates: it reads the rest of the table
// for more such lines and names how many there are and the first ten.
func emptyCoordinates(line int, row []string, cols columns, readRow func() ([]string, int, error)) string {
	empty := func(r []string) bool {
		for _, c := range []column{cols.lon, cols.lat} {
			if c.index >= len(r) || missingValue(strings.TrimSpace(r[c.index])) {
				return true
			}
		}
		return false
	}
	lines := []int{line}
	n := 1
	for {
		r, l, err := readRow()
		if err != nil {
			break // the end, or a line the next run names
		}
		if empty(r) {
			if n++; len(lines) < 10 {
				lines = append(lines, l)
			}
		}
	}
	if n == 1 {
		return "a record without coordinates cannot be placed: write its longitude and latitude as decimal numbers such as -12.5, or delete the line"
	}
	list := make([]string, len(lines))
	for i, l := range lines {
		list[i] = strconv.Itoa(l)
	}
	more := ""
	if n > len(lines) {
		more = fmt.Sprintf(" and %d more", n-len(lines))
	}
	return fmt.Sprintf("%d lines have an empty (or NA) longitude or latitude (lines %s%s), as an export holds records without coordinates; "+
		"such a record cannot be placed: delete those lines, or fill in their coordinates", n, strings.Join(list, ", "), more)
}

// utf16WithoutBOM returns "little-endian" or "big-endian" when head reads
// as UTF-16 text of mostly ASCII letters without a byte-order mark (as R's
// write.csv(fileEncoding = "UTF-16LE") writes it): nine in ten of its odd
// bytes are 0 (little-endian) and none of its even ones, or the other way
// round; "" otherwise. Such a file was named "a binary file".
func utf16WithoutBOM(head []byte) string {
	pairs := len(head) / 2
	if pairs < 2 {
		return ""
	}
	var evenZero, oddZero int
	for i := 0; i < 2*pairs; i += 2 {
		if head[i] == 0 {
			evenZero++
		}
		if head[i+1] == 0 {
			oddZero++
		}
	}
	switch {
	case evenZero == 0 && oddZero*10 >= pairs*9:
		return "little-endian"
	case oddZero == 0 && evenZero*10 >= pairs*9:
		return "big-endian"
	}
	return ""
}

// binaryKind names the kind of binary file by its first bytes, as
// " (a ... file)", or "" when it is not one a user is likely to give by
// mistake.
func binaryKind(head []byte) string {
	for _, k := range []struct{ magic, what string }{
		{"PK\x03\x04", "ZIP archive, such as an Excel .xlsx workbook or a zipped download"},
		{"\x00\x00\x27\x0a", "shapefile: convert its points with ogr2ogr -f CSV -lco GEOMETRY=AS_XY points.csv FILE.shp and add a role column"},
		{"\xD0\xCF\x11\xE0", "legacy Excel .xls workbook"},
		{"II*\x00", "TIFF image, such as a GeoTIFF raster"},
		{"MM\x00*", "TIFF image, such as a GeoTIFF raster"},
		{"II+\x00", "BigTIFF raster"},
		{"MM\x00+", "BigTIFF raster"},
		{"SQLite format 3\x00", "SQLite database, such as a GeoPackage"},
		{"\x1f\x8b", "gzip archive"},
		{"%PDF", "PDF document"},
	} {
		if bytes.HasPrefix(head, []byte(k.magic)) {
			return " (a " + k.what + ")"
		}
	}
	return ""
}

// tooLarge turns a size-limit error from the reader into a ParseError
// naming the file (and the line too long), and wraps other read errors.
func tooLarge(err error, perr func(int, string, error) error, name string) error {
	if errors.Is(err, ErrTooLarge) {
		return perr(tooLongLine(err), "", err)
	}
	return fmt.Errorf("inputs: reading %s: %w", name, err)
}

// shiftedCoordinates refuses a row with more cells than the header (the
// extra ones not all blank) when the role column comes before a
// coordinate column. A delimiter inside an unquoted cell (a decimal comma,
// 12,5, in a comma-separated table; a comma in a locality) splits the cell
// in two and shifts every cell after it: with the role first, the role
// still reads and the coordinates are read from the wrong cells, which may
// hold numbers in range ("train,12,5,45,3" under role,lon,lat read as
// longitude 12, latitude 5). With the role after both coordinates a shift
// before it makes the role unreadable, and one after it harms nothing.
func shiftedCoordinates(row []string, header int, cols columns, delim rune) error {
	if len(row) <= header || allBlank(row[header:]) || cols.role.index > max(cols.lon.index, cols.lat.index) {
		return nil
	}
	return fmt.Errorf("%w: the line has %d cells but the header only %d, and the role column (%q) comes before the coordinates: "+
		"a %s inside a cell that is not in double quotes (a decimal comma such as 12,5, or one in a text) splits it in two and shifts the cells after it, "+
		"so the coordinates would be read from the wrong cells; put such cells in double quotes, write decimals with a dot, or delete the extra cells",
		ErrMalformed, len(row), header, cols.role.name, delimiterName(delim))
}

// commaHint explains a line with more cells than the header in a
// comma-separated table: the usual cause is a decimal comma (12,5), which
// splits a number into two cells.
func commaHint(delim rune, cells, header int) string {
	if delim != ',' || cells <= header {
		return ""
	}
	return fmt.Sprintf(". The line has %d cells but the header only %d: in a comma-separated table a decimal comma (12,5) splits a number in two; "+
		"write decimals with a dot, or save the table with semicolons as the delimiter (then 12,5 is read as 12.5)", cells, header)
}

// commaInHeaderName returns ';' or '\t' for a header that holds a comma
// but is delimited by semicolons or tabs, as Excel in a locale with
// decimal commas writes a column named "site, notes" (quoting only cells
// that hold the delimiter): read at its commas it has no longitude and
// latitude column, read at its semicolons (or tabs) it has both. It
// returns ',' otherwise.
func commaInHeaderName(header []byte) rune {
	hasCoords := func(delim rune) bool {
		cr := csv.NewReader(bytes.NewReader(header))
		cr.Comma, cr.FieldsPerRecord, cr.LazyQuotes = delim, -1, true
		rec, err := cr.Read()
		if err != nil {
			return false
		}
		lon, lat := false, false
		for _, h := range rec {
			key := strings.ToLower(strings.TrimSpace(h))
			lon = lon || contains(lonNames, key)
			lat = lat || contains(latNames, key)
		}
		return lon && lat
	}
	if hasCoords(',') {
		return ','
	}
	for _, d := range []rune{';', '\t'} {
		if bytes.ContainsRune(header, d) && hasCoords(d) {
			return d
		}
	}
	return ','
}

// column is a header field found by name.
type column struct {
	index int    // 0-based cell index
	name  string // header spelling as written (trimmed)
}

type columns struct{ lon, lat, role, taxon, status column }

// otherDelimiter refuses a line read as one cell, under a header of
// several, that holds another delimiter than the header's at least
// header-1 times: its cells are separated by another delimiter (a header
// written by hand with ';' above rows exported with ','). Its longitude
// was the whole line, refused as "looks like degrees, minutes and
// seconds".
func otherDelimiter(row []string, header int, delim rune) error {
	if len(row) != 1 || header < 2 {
		return nil
	}
	for _, d := range []rune{',', ';', '\t'} {
		if d != delim && strings.Count(row[0], string(d)) >= header-1 {
			return fmt.Errorf("%w: the line is one cell, its parts separated by %s, while the header's %d columns are separated by %s; "+
				"write the header and every line with one delimiter", ErrMalformed, delimiterWord(d), header, delimiterWord(delim))
		}
	}
	return nil
}

// delimiterWord names delimiter d in a message: "commas (,)".
func delimiterWord(d rune) string {
	switch d {
	case ';':
		return "semicolons (;)"
	case '\t':
		return "tabs"
	}
	return "commas (,)"
}

// detectDelimiter returns ',' when the header line contains a comma, else
// ';' or '\t', whichever the line holds more of (';' on a tie). A header
// with none of the three keeps ',' so that it is reported as one field.
func detectDelimiter(header []byte) rune {
	if bytes.IndexByte(header, ',') >= 0 {
		return ','
	}
	semi := bytes.Count(header, []byte{';'})
	tab := bytes.Count(header, []byte{'\t'})
	switch {
	case semi == 0 && tab == 0:
		return ','
	case tab > semi:
		return '\t'
	default:
		return ';'
	}
}

func delimiterName(d rune) string {
	switch d {
	case ';':
		return "semicolon"
	case '\t':
		return "tab"
	default:
		return "comma"
	}
}

// findColumns locates the longitude, latitude and role columns.
func findColumns(hdr []string, delim rune) (columns, error) {
	c := columns{taxon: column{index: -1}, status: column{index: -1}}
	found := [3]bool{}
	targets := []struct {
		names []string
		dst   *column
		what  string
	}{{lonNames, &c.lon, "longitude column"}, {latNames, &c.lat, "latitude column"}, {roleNames, &c.role, "role column"}}
	for i, h := range hdr {
		name := strings.TrimSpace(h)
		key := strings.ToLower(name)
		for t, tg := range targets {
			if !contains(tg.names, key) {
				continue
			}
			if found[t] {
				return c, fmt.Errorf("%w: columns %q and %q both look like the %s; "+
					"rename or delete one of them", ErrAmbiguousColumn, tg.dst.name, name, tg.what)
			}
			found[t] = true
			*tg.dst = column{index: i, name: name}
		}
	}
	for _, want := range TaxonNames {
		for i, h := range hdr {
			if c.taxon.index < 0 && strings.ToLower(strings.TrimSpace(h)) == want {
				c.taxon = column{index: i, name: strings.TrimSpace(h)}
			}
		}
	}
	for i, h := range hdr {
		if c.status.index < 0 && contains(StatusNames, strings.ToLower(strings.TrimSpace(h))) {
			c.status = column{index: i, name: strings.TrimSpace(h)}
		}
	}
	// At most 12 fields are quoted (a GBIF download has some 250), each
	// cut as shown() cuts cells.
	const maxFields = 12
	var seen []string
	for i, h := range hdr {
		if i == maxFields {
			seen = append(seen, fmt.Sprintf("and %d more", len(hdr)-maxFields))
			break
		}
		seen = append(seen, shown(strings.TrimSpace(h)))
	}
	foundHeader := fmt.Sprintf("the header read as %d %s-separated fields [%s]", len(hdr), delimiterName(delim), strings.Join(seen, " "))
	if !found[0] || !found[1] {
		var missing string
		switch {
		case !found[0] && !found[1]:
			missing = "neither a longitude nor a latitude column"
		case !found[0]:
			missing = "no longitude column"
		default:
			missing = "no latitude column"
		}
		return c, fmt.Errorf("%w: found %s in %s; name the longitude column one of %s "+
			"and the latitude column one of %s (case does not matter); "+
			"the delimiter must be a comma, a semicolon or a tab",
			ErrNoCoordinates, missing, foundHeader,
			strings.Join(lonNames, ", "), strings.Join(latNames, ", "))
	}
	if !found[2] {
		return c, fmt.Errorf("%w: no field named role in %s; add a column named role "+
			"holding train or test on every line (training and test records kept in two files go into one table: "+
			"add the column to each, train in one and test in the other, and join them under one header); %s", ErrNoRole, foundHeader, roleAdvice)
	}
	return c, nil
}

func contains(list []string, s string) bool {
	for _, v := range list {
		if v == s {
			return true
		}
	}
	return false
}

// repeatsHeader reports whether row holds, in the coordinate and role
// columns, the header's own names (case aside).
func repeatsHeader(row []string, c columns) bool {
	for _, col := range []column{c.lon, c.lat, c.role} {
		// The second table's byte-order mark (cat of two files saved
		// as UTF-8 with one) starts its header's first cell.
		if col.index >= len(row) || !strings.EqualFold(strings.TrimSpace(strings.TrimPrefix(row[col.index], "\ufeff")), col.name) {
			return false
		}
	}
	return true
}

func allBlank(rec []string) bool {
	for _, s := range rec {
		if strings.TrimSpace(s) != "" {
			return false
		}
	}
	return true
}

func parseRole(s string) (vocab.Role, bool) {
	switch strings.ToLower(s) {
	case "train", "training":
		return vocab.RoleTrain, true
	case "test", "testing":
		return vocab.RoleTest, true
	}
	return "", false
}

// parseNumber parses a plain decimal number (optional sign, digits, optional
// fraction, optional exponent). Hexadecimal, NaN, infinities, digit
// separators and out-of-range values are rejected. With decimalComma, a
// single comma in a value without a dot is read as the decimal separator.
func parseNumber(s string, decimalComma bool) (float64, error) {
	if s == "" {
		return 0, errors.New("the cell is empty")
	}
	t := s
	// The minus sign U+2212 (typography, word processors, some locales'
	// spreadsheets) reads as the ASCII hyphen-minus it looks like.
	if rest, ok := strings.CutPrefix(t, "\u2212"); ok {
		t = "-" + rest
	}
	if decimalComma && strings.Count(t, ",") == 1 && !strings.Contains(t, ".") {
		t = strings.Replace(t, ",", ".", 1)
	}
	if !isDecimal(t) {
		if strings.ContainsAny(s, "°º'′\"″") || strings.ContainsAny(strings.ToUpper(strings.TrimRight(s, " ")), "NSEW") && strings.ContainsAny(s, "0123456789") {
			return 0, fmt.Errorf("found %s, which looks like degrees, minutes and seconds or a hemisphere letter; "+
				"convert it to signed decimal degrees (12°30'S is -12.5, 8°15'W is -8.25)", shown(s))
		}
		return 0, fmt.Errorf("found %s", shown(s))
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, fmt.Errorf("found %s, which is out of range", shown(s))
	}
	return v, nil
}

// isDecimal reports whether s matches [+-]?(d+(.d*)?|.d+)([eE][+-]?d+)?.
func isDecimal(s string) bool {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			digits++
		}
	}
	if digits == 0 {
		return false
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		i++
		if i < len(s) && (s[i] == '+' || s[i] == '-') {
			i++
		}
		exp := 0
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			exp++
		}
		if exp == 0 {
			return false
		}
	}
	return i == len(s)
}

// checkDegrees range-checks geographic coordinates and detects swapped
// longitude/latitude columns: the columns are reported as swapped when some
// latitude lies outside [-90, 90] while every longitude lies within
// [-90, 90] and every latitude within [-180, 360], i.e. when the table is
// valid read the other way round.
func checkDegrees(recs []Record, c columns, perr func(int, string, error) error) error {
	inLat := func(v float64) bool { return v >= -90 && v <= 90 }
	inLon := func(v float64) bool { return v >= -180 && v <= 360 }
	firstBadLat := -1
	lonAllLat, latAllLon := true, true
	for i, r := range recs {
		if !inLat(r.Y) && firstBadLat < 0 {
			firstBadLat = i
		}
		if !inLat(r.X) {
			lonAllLat = false
		}
		if !inLon(r.Y) {
			latAllLon = false
		}
	}
	if firstBadLat >= 0 && lonAllLat && latAllLon {
		r := recs[firstBadLat]
		return perr(r.Line, c.lat.name, fmt.Errorf("%w: latitude %s is outside [-90, 90] while every value "+
			"in column %q lies within [-90, 90]; the columns %q and %q appear to be exchanged: "+
			"rename the two header fields (or swap the two columns) and run again",
			ErrSwapped, fmtNum(r.Y), c.lon.name, c.lon.name, c.lat.name))
	}
	for _, r := range recs {
		if !inLat(r.Y) {
			return perr(r.Line, c.lat.name, fmt.Errorf("%w: latitude %s is outside [-90, 90]; "+
				"correct or delete the line, or, if the coordinates are projected (not degrees), "+
				"give their CRS with --occurrences-crs", ErrOutOfRange, fmtNum(r.Y)))
		}
		if !inLon(r.X) {
			return perr(r.Line, c.lon.name, fmt.Errorf("%w: longitude %s is outside [-180, 360]; "+
				"correct or delete the line, or, if the coordinates are projected (not degrees), "+
				"give their CRS with --occurrences-crs", ErrOutOfRange, fmtNum(r.X)))
		}
	}
	return nil
}

// checkProjected refuses projected coordinates beyond vocab.MaxProjected.
func checkProjected(recs []Record, c columns, perr func(int, string, error) error) error {
	for _, r := range recs {
		for _, v := range []struct {
			col  string
			what string
			x    float64
		}{{c.lon.name, "easting", r.X}, {c.lat.name, "northing", r.Y}} {
			if math.Abs(v.x) > vocab.MaxProjected {
				return perr(r.Line, v.col, fmt.Errorf("%w: %s %s is more than %g units from the origin of --occurrences-crs, beyond any place on the Earth; correct or delete the line",
					ErrFarCoordinate, v.what, fmtNum(v.x), vocab.MaxProjected))
			}
		}
	}
	return nil
}

// allRecords phrases "all n records are" with the right number: "the
// only record is" for 1, "both records are" for 2 ("all 2 records are"
// was written).
func allRecords(n int) string {
	switch n {
	case 1:
		return "the only record is"
	case 2:
		return "both records are"
	}
	return fmt.Sprintf("all %d records are", n)
}

// fmtNum formats v in plain decimal notation unless it is very large.
func fmtNum(v float64) string {
	if math.Abs(v) >= 1e15 {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}
