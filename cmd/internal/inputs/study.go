package inputs

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"strconv"
	"strings"
	"unicode/utf8"

	"areasweep/cmd/internal/settings"

	"go.yaml.in/yaml/v3"
)

// Study holds the settings a study file gives, by key (the long flag
// names of the command, settings.Table): a key that is absent was not in
// the file, and an empty list was given as an empty list. Values have the
// Go type of their settings.Kind: string (Text, Path, CRS), []string
// (NamedPaths, "NAME=PATH"), bool, int, uint64, float64 or []float64.
//
// Paths (Path, the PATH part of NamedPaths, and a CRS naming a file
// beside the study file) are already resolved against the study file's
// directory.
type Study map[string]any

// studyKeys lists the accepted keys in table order.
var studyKeys = settings.StudyKeys()

// StudyKeys returns the keys a study file may contain, which are also the
// long flag names they stand for, in a fixed order.
func StudyKeys() []string { return append([]string(nil), studyKeys...) }

// Sentinel errors of the study-file reader, wrapped inside *StudyError.
var (
	// ErrStudySyntax: the file is not valid YAML or not a key: value mapping.
	ErrStudySyntax = errors.New("inputs: study file is not a valid YAML mapping")
	// ErrUnknownKey: a key is not one of StudyKeys.
	ErrUnknownKey = errors.New("inputs: unknown key in study file")
	// ErrDuplicateKey: a key appears twice.
	ErrDuplicateKey = errors.New("inputs: key given twice in study file")
	// ErrBadValue: a value has the wrong type or form for its key.
	ErrBadValue = errors.New("inputs: bad value in study file")
	// ErrNamedPath: a value is not of the form NAME=PATH.
	ErrNamedPath = errors.New("inputs: not of the form NAME=PATH")
	// ErrFloatList: a list value is not a comma-separated list of numbers.
	ErrFloatList = errors.New("inputs: not a list of numbers")
)

// StudyError reports a problem in a study file: which file, which line
// (0 when none applies), which key (empty when none applies) and, in the
// wrapped error, what is wrong and what to do.
type StudyError struct {
	File string
	Line int
	Key  string
	Err  error
}

// Error formats the error as "inputs: FILE line N, key "K": message".
func (e *StudyError) Error() string {
	return located(e.File, e.Line, "", "key", e.Key, e.Err)
}

// Unwrap returns the wrapped error, so errors.Is finds the sentinel.
func (e *StudyError) Unwrap() error { return e.Err }

// LoadStudy reads the study file at path strictly: an unknown key is an
// error naming the key, its line and the allowed keys; a value of the wrong
// type is an error naming the key and the line. Relative paths (model and
// extra paths after '=', occurrences, region, ecoregions, out) are resolved
// against the directory holding the study file (left relative, to the
// current folder, for a study file read from a pipe).
func LoadStudy(path string) (*Study, error) {
	if err := checkRegular(path, "study file"); err != nil {
		return nil, err
	}
	f, err := os.Open(path)
	switch {
	case errors.Is(err, os.ErrNotExist) && (path == "~" || strings.HasPrefix(path, "~/")):
		// --study=~/x: a shell expands ~ only at the start of a word.
		return nil, &worded{fmt.Sprintf("inputs: study file %s does not exist: it starts with ~, which the shell did not turn into your home folder (a shell does so only at the start of a word, not after --study=): write --study and the path apart (--study %s) or give the full path", path, path), err}
	case errors.Is(err, os.ErrNotExist):
		return nil, &worded{fmt.Sprintf("inputs: study file %s does not exist; check the path (a relative one is taken from the current folder)", path), err}
	case errors.Is(err, os.ErrPermission):
		return nil, &worded{fmt.Sprintf("inputs: study file %s cannot be read (permission denied); check its permissions", path), err}
	case err != nil:
		return nil, fmt.Errorf("inputs: cannot read study file %s: %w", path, err)
	}
	defer f.Close()
	data, err := io.ReadAll(newLimitedReader(f, MaxStudyBytes, 0))
	if err != nil {
		if errors.Is(err, ErrTooLarge) {
			return nil, &StudyError{File: path, Err: err}
		}
		return nil, fmt.Errorf("inputs: cannot read study file: %w", err)
	}
	if line, msg := notUTF8(data); line > 0 {
		return nil, &StudyError{File: path, Line: line, Err: fmt.Errorf("%w: %s", ErrStudySyntax, msg)}
	}
	if line := tableHeader(data); line > 0 {
		return nil, &StudyError{File: path, Line: line, Err: fmt.Errorf("%w: this is a study table (a header id,... and one row per study), not a study file; "+
			"run it with areasweep batch %s --out DIR", ErrStudySyntax, path)}
	}
	dir := filepath.Dir(path)
	if st, err := f.Stat(); err == nil && !st.Mode().IsRegular() || isStreamPath(path) {
		// A study file read from a pipe or standard input (/dev/stdin,
		// also when the shell opened a file there with '<', or a shell's
		// <(...)) has no folder of its own: its relative paths are taken
		// from the current folder (they were joined to /dev or /dev/fd,
		// and the message named /dev/model.tif).
		dir = ""
	}
	return ParseStudy(bytes.NewReader(data), path, dir)
}

// tableHeader returns the line of a study table's header (the first line
// that is neither blank nor a '#' comment, starting with id and a comma,
// semicolon or tab), or 0: a table given to --study.
func tableHeader(data []byte) int {
	for i, l := range strings.Split(string(bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))), "\n") {
		l = strings.TrimSpace(l)
		if l == "" || strings.HasPrefix(l, "#") {
			continue
		}
		l = strings.ToLower(strings.Trim(l, `"`))
		if rest, ok := strings.CutPrefix(l, "id"); ok {
			if rest = strings.TrimLeft(rest, `"`); rest != "" && strings.ContainsRune(",;\t", rune(rest[0])) {
				return i + 1
			}
		}
		return 0
	}
	return 0
}

// firstLine is the first line of data that is neither blank nor a '#'
// comment, without its line end.
func firstLine(data []byte) string {
	for _, l := range strings.Split(string(bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))), "\n") {
		if l = strings.TrimSpace(l); l != "" && !strings.HasPrefix(l, "#") {
			return l
		}
	}
	return ""
}

// delimitedTable reports whether data reads as a delimited table: its
// first line (firstLine) and the next one hold a comma, semicolon or tab,
// and neither is a "key: value" line.
func delimitedTable(data []byte) bool {
	n := 0
	for _, l := range strings.Split(string(bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))), "\n") {
		if l = strings.TrimSpace(l); l == "" || strings.HasPrefix(l, "#") {
			continue
		}
		if !strings.ContainsAny(l, ",;\t") || strings.Contains(l, ": ") {
			return false
		}
		if n++; n == 2 {
			return true
		}
	}
	return false
}

// isStreamPath reports whether path names a process's open file rather
// than a file in a folder: /dev/stdin, /dev/fd/N, /proc/self/fd/N.
func isStreamPath(path string) bool {
	c := filepath.Clean(path)
	return c == "/dev/stdin" || strings.HasPrefix(c, "/dev/fd/") || (strings.HasPrefix(c, "/proc/") && strings.Contains(c, "/fd/"))
}

// ParseStudy reads a study file from r; name is used in messages and
// relative paths are resolved against baseDir (left relative when baseDir
// is empty). See LoadStudy.
func ParseStudy(r io.Reader, name, baseDir string) (*Study, error) {
	if name == "" {
		name = "study file"
	}
	serr := func(line int, key string, err error) error {
		return &StudyError{File: name, Line: line, Key: key, Err: err}
	}
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("inputs: cannot read %s: %w", name, err)
	}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	st := &Study{}
	if err := dec.Decode(&doc); err != nil {
		if err == io.EOF {
			return st, nil // empty file: nothing set
		}
		return nil, syntaxError(name, err, data, true)
	}
	var second yaml.Node
	if err := dec.Decode(&second); err != io.EOF {
		if err != nil {
			return nil, syntaxError(name, err, data, false)
		}
		return nil, serr(second.Line, "", fmt.Errorf("%w: a second YAML document starts here; "+
			"a study file holds one mapping: remove the '---' line and what follows, or merge the two", ErrStudySyntax))
	}
	root := deref(&doc)
	if root.Kind == yaml.DocumentNode && len(root.Content) > 0 {
		root = deref(root.Content[0])
	}
	if isNull(root) {
		return st, nil
	}
	if root.Kind != yaml.MappingNode {
		if root.Kind == yaml.ScalarNode && delimitedTable(data) {
			// An occurrence table given to --study was quoted whole
			// (8.9 kB for the demo's) and not named as a table.
			return nil, serr(root.Line, "", fmt.Errorf("%w: found a delimited table (its first line %s), not key: value lines; "+
				"an occurrence table goes to --occurrences (or the study file's occurrences: key), and --study takes a YAML file of settings such as\n    iterations: 1000",
				ErrStudySyntax, shown(firstLine(data))))
		}
		return nil, serr(root.Line, "", fmt.Errorf("%w: found %s instead of key: value lines; "+
			"write one setting per line, for example\n    iterations: 1000", ErrStudySyntax, kindName(root)))
	}

	seen := map[string]int{}
	for i := 0; i+1 < len(root.Content); i += 2 {
		k, v := root.Content[i], deref(root.Content[i+1])
		if k.Kind != yaml.ScalarNode {
			return nil, serr(k.Line, "", fmt.Errorf("%w: a key must be a plain name, found %s", ErrStudySyntax, kindName(k)))
		}
		key := k.Value
		if first, dup := seen[key]; dup {
			return nil, serr(k.Line, key, fmt.Errorf("%w: already given at line %d; keep only one of the two", ErrDuplicateKey, first))
		}
		seen[key] = k.Line
		if flagOnly[key] {
			return nil, serr(k.Line, key, fmt.Errorf("%w: --%s is given on the command line only (--study, --force, --quiet, --workers and --shard cannot be set in a study file): remove the line, and add --%s to the command if you meant it", ErrUnknownKey, key, key))
		}
		if !contains(studyKeys, key) {
			hint := ""
			if s := closestKey(key); s != "" {
				hint = fmt.Sprintf("did you mean %q? ", s)
			}
			return nil, serr(k.Line, key, fmt.Errorf("%w: %sallowed keys are %s", ErrUnknownKey, hint, strings.Join(studyKeys, ", ")))
		}
		if isNull(v) {
			continue // "key:" with no value counts as absent
		}
		if err := st.set(key, v, baseDir); err != nil {
			line := v.Line
			var le *lineErr
			if errors.As(err, &le) {
				line, err = le.line, le.err
			}
			return nil, serr(line, key, err)
		}
	}
	return st, nil
}

// flagOnly are the flags of run that a study file cannot set (README,
// "Commands and options").
var flagOnly = map[string]bool{"study": true, "force": true, "quiet": true, "workers": true, "shard": true}

// worded is err said in our words (msg), still matching errors.Is.
type worded struct {
	msg string
	err error
}

func (e *worded) Error() string { return e.msg }
func (e *worded) Unwrap() error { return e.err }

// lineErr carries a more precise line (a list item) out of set.
type lineErr struct {
	line int
	err  error
}

func (e *lineErr) Error() string { return e.err.Error() }
func (e *lineErr) Unwrap() error { return e.err }

var yamlLineRE = regexp.MustCompile(`line (\d+)`)

// syntaxError wraps an error of the YAML reader on data, the study file's
// text (first: in its first YAML document). The reader names the line
// where it noticed the problem, which may follow the fault (an unclosed
// bracket is noticed at the next key), so the line is given as "near line
// N" in the text (yamlNear) and StudyError.Line is left 0.
func syntaxError(name string, err error, data []byte, first bool) error {
	near := yamlNear(err, data, first)
	msg := strings.TrimPrefix(err.Error(), "yaml: ")
	msg = yamlWords(yamlLineRE.ReplaceAllString(msg, ""))
	return &StudyError{File: name, Err: fmt.Errorf("%w%s: %s; write one setting per line as key: value, "+
		"indent with spaces (not tabs), and quote values that contain ': ' or start with a special character",
		ErrStudySyntax, near, msg)}
}

func deref(n *yaml.Node) *yaml.Node {
	for n != nil && n.Kind == yaml.AliasNode && n.Alias != nil {
		n = n.Alias
	}
	return n
}

func isNull(n *yaml.Node) bool {
	return n == nil || n.Kind == 0 || (n.Kind == yaml.ScalarNode && n.ShortTag() == "!!null")
}

func kindName(n *yaml.Node) string {
	switch n.Kind {
	case yaml.SequenceNode:
		return "a list"
	case yaml.MappingNode:
		return "a mapping (key: value pairs)"
	case yaml.ScalarNode:
		return "the single value " + shown(n.Value)
	default:
		return "an unexpected YAML node"
	}
}

// set decodes value node v for key into the study, by the key's kind in
// settings.Table; paths are resolved against dir.
func (s *Study) set(key string, v *yaml.Node, dir string) error {
	row, ok := settings.Lookup(key)
	if !ok || !row.Study {
		// studyKeys and the table must agree.
		panic("inputs: study key without decoder: " + key)
	}
	var val any
	var err error
	switch row.Kind {
	case settings.Text:
		val, err = value(stringValue(key, v))
	case settings.Path:
		val, err = value(pathValue(key, v, dir))
	case settings.CRS:
		val, err = value(crsValue(key, v, dir))
	case settings.NamedPaths:
		val, err = namedPaths(key, v, dir)
	case settings.Bool:
		val, err = value(boolValue(key, v))
	case settings.Int:
		val, err = value(intValue(key, v))
	case settings.Uint:
		val, err = value(uintValue(key, v))
	case settings.Float:
		val, err = value(floatValue(key, v))
	case settings.FloatList:
		val, err = floatList(key, v)
	default:
		panic(fmt.Sprintf("inputs: setting %s has kind %d without decoder", key, row.Kind))
	}
	if err != nil {
		return err
	}
	if *s == nil {
		*s = Study{}
	}
	(*s)[key] = val
	return nil
}

// value returns *p as a study value.
func value[T any](p *T, err error) (any, error) {
	if err != nil {
		return nil, err
	}
	return *p, nil
}

func badValue(format string, a ...any) error {
	return fmt.Errorf("%w: "+format, append([]any{ErrBadValue}, a...)...)
}

func scalar(key string, v *yaml.Node, want, example string) (*yaml.Node, error) {
	if v.Kind != yaml.ScalarNode {
		return nil, badValue("expected %s, found %s; %s", want, kindName(v), writeExample(key, v, example, example))
	}
	return v, nil
}

// writeExample is the advice to write key's value as value: a study
// file's line "key: value", or for a study table's cell (v made by
// cellNode) the cell's text, cellValue. A table's cell was given a study
// file's line ("seed: 42" for a cell of the seed column).
func writeExample(key string, v *yaml.Node, value, cellValue string) string {
	if v != nil && v.LineComment == tableCell {
		return fmt.Sprintf("write for example %s in the cell", cellValue)
	}
	return fmt.Sprintf("write for example\n    %s: %s", key, value)
}

// listExamples are listExample(key) as a study file's list and as a study
// table's cell writes it.
func listExamples(key string) (value, cellValue string) {
	return "[" + strings.ReplaceAll(listExample(key), ",", ", ") + "]", strings.ReplaceAll(listExample(key), ",", ";")
}

func stringValue(key string, v *yaml.Node) (*string, error) {
	n, err := scalar(key, v, "a single text value", "value")
	if err != nil {
		return nil, err
	}
	s := n.Value
	return &s, nil
}

func pathValue(key string, v *yaml.Node, dir string) (*string, error) {
	n, err := scalar(key, v, "a single path", "data/file.ext")
	if err != nil {
		return nil, err
	}
	if strings.TrimSpace(n.Value) == "" {
		return nil, badValue("the path is empty; give a path or remove the key")
	}
	p, err := resolvePath(dir, n.Value)
	if err != nil {
		return nil, err
	}
	return &p, nil
}

// crsValue is a CRS as the study file writes it: a relative value that
// names a regular file in dir (a .prj or WKT file beside the study file)
// is resolved against dir like any path of the file; an authority code,
// a WKT or PROJ string, or a path that is absolute or names no file
// there is kept as written. Relative to the working folder instead, a
// .prj beside the study file was read as a CRS name that PROJ does not
// know.
func crsValue(key string, v *yaml.Node, dir string) (*string, error) {
	s, err := stringValue(key, v)
	if err != nil || dir == "" || *s == "" || filepath.IsAbs(*s) {
		return s, err
	}
	p, perr := resolvePath(dir, *s)
	if perr != nil {
		return s, nil // not a path areasweep can resolve: a CRS text
	}
	if st, err := os.Stat(p); err == nil && st.Mode().IsRegular() {
		return &p, nil
	}
	return s, nil
}

// resolvePath joins a relative path to dir. A path starting with ~/ is
// in the home folder, as a shell would read it (a study file or table is
// not read by a shell, and a folder named ~ beside it is never meant).
// Absolute paths, URLs and GDAL virtual paths (/vsi...) are returned
// unchanged. With the home folder unknown (HOME not set, as under some
// schedulers and service managers) a path starting with ~/ is refused:
// it was joined to dir, and the message named a file "DIR/~/..." that
// does not exist.
func resolvePath(dir, p string) (string, error) {
	if p == "~" || strings.HasPrefix(p, "~/") {
		home, err := os.UserHomeDir()
		if err != nil {
			return "", badValue("%q starts with ~, the home folder, which is not known here (HOME is not set); give the full path", p)
		}
		return filepath.Join(home, p[1:]), nil
	}
	if dir == "" || p == "" || filepath.IsAbs(p) || strings.Contains(p, "://") || strings.HasPrefix(p, "/vsi") {
		return p, nil
	}
	return filepath.Join(dir, p), nil
}

func intValue(key string, v *yaml.Node) (*int, error) {
	n, err := scalar(key, v, "a whole number", "1000")
	if err != nil {
		return nil, err
	}
	var out int
	switch n.ShortTag() {
	case "!!int":
		// Read from the text, in decimal (ParseWhole): YAML's resolver
		// reads 0701 as octal 449 and takes 0x and 0b forms.
		w, err := ParseWhole(n.Value)
		switch {
		case errors.Is(err, strconv.ErrRange):
			return nil, badValue("%q is too large; %s", n.Value, writeExample(key, n, "1000", "1000"))
		case err != nil:
			return nil, badValue("%s is not a whole number in decimal digits; %s", shown(n.Value), writeExample(key, n, "1000", "1000"))
		}
		out = w
	case "!!float":
		var f float64
		err := n.Decode(&f)
		w, ok := wholeFloat(f)
		if err != nil || !ok {
			return nil, badValue("%s is not a whole number; %s", shown(n.Value), writeExample(key, n, "1000", "1000"))
		}
		out = w
	default:
		return nil, badValue("%s is not a whole number%s; %s", shown(n.Value), quotedHint(n), writeExample(key, n, "1000", "1000"))
	}
	return &out, nil
}

// wholeFloat returns f as an int when it is a whole number that a
// float64 holds exactly (|f| <= 2^53): "1e3" or "1000.0" in a study file
// or on the command line (ParseWhole) means 1000.
func wholeFloat(f float64) (int, bool) {
	if f != math.Trunc(f) || !(math.Abs(f) <= 1<<53) {
		return 0, false
	}
	return int(f), true
}

// ParseWhole parses a whole-number flag value as the study file reads the
// same key: decimal digits with an optional sign (strconv.ParseInt in
// base 10, so "0701" is 701, never octal 449), or a decimal or exponent
// form of a whole number ("1e3", "1000.0"). Base prefixes (0x, 0o, 0b),
// underscores and hexadecimal floats are refused: a seed or a count is
// written as a person reads it. It returns strconv.ParseInt's error
// (invalid syntax, or value out of range for a whole number beyond 2^53)
// for anything else.
func ParseWhole(s string) (int, error) {
	v, err := strconv.ParseInt(s, 10, strconv.IntSize)
	if err == nil {
		return int(v), nil
	}
	if strings.ContainsAny(s, "xX_") {
		return 0, &strconv.NumError{Func: "ParseInt", Num: s, Err: strconv.ErrSyntax}
	}
	if f, ferr := strconv.ParseFloat(s, 64); ferr == nil && !math.IsInf(f, 0) && f == math.Trunc(f) {
		if w, ok := wholeFloat(f); ok {
			return w, nil
		}
		return 0, &strconv.NumError{Func: "ParseInt", Num: s, Err: strconv.ErrRange}
	}
	return 0, err
}

// ParseWholeUint parses a whole number of 0 or more in decimal digits
// (strconv.ParseUint in base 10: "0701" is 701, and base prefixes and
// underscores are refused, as ParseWhole does), returning
// strconv.ParseUint's error otherwise.
func ParseWholeUint(s string) (uint64, error) {
	return strconv.ParseUint(s, 10, 64)
}

func uintValue(key string, v *yaml.Node) (*uint64, error) {
	n, err := scalar(key, v, "a whole number", "42")
	if err != nil {
		return nil, err
	}
	if n.ShortTag() != "!!int" {
		return nil, badValue("%s is not a whole number%s; %s", shown(n.Value), quotedHint(n), writeExample(key, n, "42", "42"))
	}
	// Read from the text, in decimal: YAML's resolver reads 0701 as
	// octal 449 and takes 0x and 0b forms.
	out, err := ParseWholeUint(n.Value)
	if err != nil {
		return nil, badValue("%s is not a whole number from 0 to %d in decimal digits; %s", shown(n.Value), uint64(math.MaxUint64), writeExample(key, n, "42", "42"))
	}
	return &out, nil
}

func floatValue(key string, v *yaml.Node) (*float64, error) {
	n, err := scalar(key, v, "a number", "0.5")
	if err != nil {
		return nil, err
	}
	f, err := yamlNumber(n)
	if err != nil {
		return nil, badValue("%v; %s", err, writeExample(key, n, "0.5", "0.5"))
	}
	return &f, nil
}

// yamlNumber decodes a finite number from a scalar node tagged int or float.
func yamlNumber(n *yaml.Node) (float64, error) {
	tag := n.ShortTag()
	if tag != "!!int" && tag != "!!float" {
		return 0, fmt.Errorf("%s is not a number%s", shown(n.Value), quotedHint(n))
	}
	var f float64
	if err := n.Decode(&f); err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
		return 0, fmt.Errorf("%s is not a finite number", shown(n.Value))
	}
	return f, nil
}

// quotedHint advises removing quotes when the value was quoted.
func quotedHint(n *yaml.Node) string {
	if n.Style&(yaml.DoubleQuotedStyle|yaml.SingleQuotedStyle) != 0 {
		return " (remove the quotes)"
	}
	return ""
}

func boolValue(key string, v *yaml.Node) (*bool, error) {
	n, err := scalar(key, v, "true or false", "true")
	if err != nil {
		return nil, err
	}
	if n.ShortTag() != "!!bool" {
		if n.LineComment == tableCell {
			return nil, badValue("%s is not true or false%s; write true or false in the cell (or leave it empty for the shared setting)", shown(n.Value), quotedHint(n))
		}
		return nil, badValue("%s is not true or false%s; write\n    %s: true\nor\n    %s: false", shown(n.Value), quotedHint(n), key, key)
	}
	var b bool
	if err := n.Decode(&b); err != nil {
		return nil, badValue("%s is not true or false", shown(n.Value))
	}
	return &b, nil
}

// floatList accepts a YAML list of numbers, a single number, or a text
// value "a, b, c" as on the command line. An empty list gives a non-nil
// empty slice.
func floatList(key string, v *yaml.Node) ([]float64, error) {
	// The example holds values the key takes (E in (0,1)): it said
	// "e: [10, 25, 50]" for every list.
	value, cellValue := listExamples(key)
	switch v.Kind {
	case yaml.SequenceNode:
		out := make([]float64, 0, len(v.Content))
		for i, item := range v.Content {
			item = deref(item)
			if item.Kind != yaml.ScalarNode {
				return nil, &lineErr{item.Line, badValue("item %d is %s, expected a number; %s", i+1, kindName(item), writeExample(key, v, value, cellValue))}
			}
			f, err := yamlNumber(item)
			if err != nil {
				return nil, &lineErr{item.Line, badValue("item %d: %v; %s", i+1, err, writeExample(key, v, value, cellValue))}
			}
			out = append(out, f)
		}
		return out, nil
	case yaml.ScalarNode:
		if tag := v.ShortTag(); tag == "!!int" || tag == "!!float" {
			f, err := yamlNumber(v)
			if err != nil {
				return nil, badValue("%v; %s", err, writeExample(key, v, value, cellValue))
			}
			return []float64{f}, nil
		}
		// The file's line and key name the value: the message gives the
		// file's (or the table cell's) way of writing it, not the flag's.
		sep, example := "separated by commas", key+": ["+strings.ReplaceAll(listExample(key), ",", ", ")+"]"
		if v.LineComment == tableCell {
			sep, example = "separated by ';'", strings.ReplaceAll(listExample(key), ",", ";")
		}
		out, err := parseFloatList(v.Value, "", sep, example)
		if err != nil {
			return nil, fmt.Errorf("%w: %w", ErrBadValue, noPrefix{err})
		}
		if out == nil {
			out = []float64{}
		}
		return out, nil
	default:
		return nil, badValue("expected a list of numbers, found %s; %s", kindName(v), writeExample(key, v, value, cellValue))
	}
}

// namedPaths accepts a list of "NAME=PATH" texts, a single such text, or a
// mapping NAME: PATH (kept in file order). Paths are resolved against dir.
func namedPaths(key string, v *yaml.Node, dir string) ([]string, error) {
	exA, exB := namedExamples(key)
	example := fmt.Sprintf("write for example\n    %s:\n      - %s\n      - %s", key, exA, exB)
	seen := map[string]int{}
	one := func(n *yaml.Node, text string) (string, error) {
		name, p, err := ParseNamedPathOf(key, text)
		if err != nil {
			return "", &lineErr{n.Line, fmt.Errorf("%w: %w", ErrBadValue, noPrefix{err})}
		}
		if first, dup := seen[name]; dup {
			where := fmt.Sprintf("already given at line %d", first)
			if first == n.Line {
				where = "given twice on this line" // a table's cell, or a list on one line
			}
			return "", &lineErr{n.Line, badValue("the name %q is %s; give each its own name", name, where)}
		}
		seen[name] = n.Line
		r, err := resolvePath(dir, p)
		if err != nil {
			return "", &lineErr{n.Line, err}
		}
		return name + "=" + r, nil
	}
	switch v.Kind {
	case yaml.ScalarNode:
		s, err := one(v, v.Value)
		if err != nil {
			return nil, err
		}
		return []string{s}, nil
	case yaml.SequenceNode:
		out := make([]string, 0, len(v.Content))
		for i, item := range v.Content {
			item = deref(item)
			if item.Kind != yaml.ScalarNode {
				return nil, &lineErr{item.Line, badValue("item %d is %s, expected NAME=PATH; %s", i+1, kindName(item), example)}
			}
			s, err := one(item, item.Value)
			if err != nil {
				return nil, err
			}
			out = append(out, s)
		}
		return out, nil
	case yaml.MappingNode:
		out := make([]string, 0, len(v.Content)/2)
		for i := 0; i+1 < len(v.Content); i += 2 {
			k, p := deref(v.Content[i]), deref(v.Content[i+1])
			if k.Kind != yaml.ScalarNode || p.Kind != yaml.ScalarNode {
				return nil, &lineErr{k.Line, badValue("each entry must be NAME: PATH; %s", example)}
			}
			// The key is the name alone: joined with its path as
			// NAME=PATH, a key holding '=' ("good=x") was split there,
			// into the name good and a path x=... that did not exist.
			if why := nameMisfit(strings.TrimSpace(k.Value)); why != "" {
				return nil, &lineErr{k.Line, badValue("the key %s is not a name: it %s; in the form NAME: PATH the key is the name alone, 1 to 40 letters, digits, '_', '-' or '.' (for example \"gbm: models/gbm.tif\" under \"%s:\")", shown(k.Value), why, key)}
			}
			s, err := one(k, k.Value+"="+p.Value)
			if err != nil {
				return nil, err
			}
			out = append(out, s)
		}
		return out, nil
	default:
		return nil, badValue("expected NAME=PATH values, found %s; %s", kindName(v), example)
	}
}

// noPrefix shows an error without the package prefix, to nest it in
// another message of this package.
type noPrefix struct{ err error }

func (e noPrefix) Error() string { return strings.TrimPrefix(e.err.Error(), "inputs: ") }
func (e noPrefix) Unwrap() error { return e.err }

var nameRE = regexp.MustCompile(`^[A-Za-z0-9_.\-]{1,40}$`)

// ParseNamedPath splits "NAME=PATH" at the first '='. NAME is 1 to 40
// letters, digits, '_', '-' or '.'; PATH is not empty. Spaces around either
// part are removed.
func ParseNamedPath(s string) (name, path string, err error) {
	return ParseNamedPathOf("model", s)
}

// namedExamples returns two NAME=PATH examples for key (a flag or study
// key without dashes): polygon layers for extra, model rasters otherwise
// (an --extra refused was shown a model raster to give instead).
func namedExamples(key string) (a, b string) {
	if key == "extra" {
		return "lakes=layers/lakes.gpkg", "wetlands=layers/wetlands.gpkg"
	}
	return "gbm=models/gbm.tif", "glm=models/glm.tif"
}

// ParseNamedPathOf is ParseNamedPath for the flag or study key named key
// (without dashes), whose messages show an example of its own values.
func ParseNamedPathOf(key, s string) (name, path string, err error) {
	ex, _ := namedExamples(key)
	advice := "write NAME=PATH, where NAME is 1 to 40 letters, digits, '_', '-' or '.', for example " + ex
	i := strings.IndexByte(s, '=')
	if i < 0 {
		return "", "", fmt.Errorf("%w: %s has no '='; %s", ErrNamedPath, shown(s), advice)
	}
	name, path = strings.TrimSpace(s[:i]), strings.TrimSpace(s[i+1:])
	if name == "" {
		return "", "", fmt.Errorf("%w: %s has no NAME before '='; %s", ErrNamedPath, shown(s), advice)
	}
	if why := nameMisfit(name); why != "" {
		// The value itself is not repeated: every caller names it (a
		// long one was quoted twice, whole and cut).
		return "", "", fmt.Errorf("%w: the name %s %s; %s", ErrNamedPath, shown(name), why, advice)
	}
	if path == "" {
		return "", "", fmt.Errorf("%w: %q has no PATH after '='; %s", ErrNamedPath, s, advice)
	}
	return name, path, nil
}

// nameMisfit says why name is not a NAME of NAME=PATH (1 to 40 ASCII
// letters, digits, '_', '-' or '.'), or "" when it is one.
func nameMisfit(name string) string {
	if nameRE.MatchString(name) {
		return ""
	}
	if n := utf8.RuneCountInString(name); n > 40 {
		return fmt.Sprintf("is %d characters long", n)
	}
	if r, ok := firstNameMisfit(name); ok {
		// Name it: "other than letters" read as wrong for an accented
		// letter (gööd), and a space was invisible.
		return fmt.Sprintf("holds %q, which is none of the ASCII letters A-Z and a-z (no accents), digits, '_', '-' or '.'", r)
	}
	return "is empty"
}

// firstNameMisfit returns the first character of name that a NAME may
// not hold (nameRE), if any.
func firstNameMisfit(name string) (rune, bool) {
	for _, r := range name {
		if !(r < utf8.RuneSelf && nameRE.MatchString(string(r))) {
			return r, true
		}
	}
	return 0, false
}

// ParseFloatList parses a comma-separated list of numbers such as
// "10, 25, 50" given to flag (named without dashes, for messages). Spaces
// around items are allowed. An empty or all-space s gives an empty (nil)
// list. An empty item, a non-number, NaN or an infinity is an error naming
// the flag and the item.
func ParseFloatList(flag, s string) ([]float64, error) {
	return parseFloatList(s, "--"+flag+": ", "separated by commas", "--"+flag+"="+listExample(flag))
}

// parseFloatList is ParseFloatList with the words of its messages: where
// names the value ("--e: ", or "" where a study file's line and key say
// it), sep how the numbers are separated there and example is a whole
// example of the value as written there.
func parseFloatList(s, where, sep, example string) ([]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, nil
	}
	parts := strings.Split(s, ",")
	out := make([]float64, 0, len(parts))
	for i, p := range parts {
		p = strings.TrimSpace(p)
		if p == "" {
			return nil, fmt.Errorf("%w: %sitem %d of %s is empty; give numbers %s, "+
				"for example %s", ErrFloatList, where, i+1, shown(s), sep, example)
		}
		v, err := parseNumber(p, false)
		if err != nil {
			return nil, fmt.Errorf("%w: %sitem %d %s is not a finite number; give numbers %s "+
				"with a dot as decimal separator, for example %s", ErrFloatList, where, i+1, shown(p), sep, example)
		}
		out = append(out, v)
	}
	return out, nil
}

// listExample is a list of values flag accepts, for its messages: the
// partial ROC's E lie in (0,1) and thresholds are model values; the other
// lists are distances in km.
func listExample(flag string) string {
	switch flag {
	case "e":
		return "0.05,0.1"
	case "thresholds":
		return "0.25,0.5"
	}
	return "10,25,50"
}

// Apply copies every setting the study gives into v, except those that
// changed reports as given on the command line: flags win over the file,
// and a list flag replaces the file's whole list.
func (s *Study) Apply(v *settings.Values, changed func(name string) bool) {
	if s == nil {
		return
	}
	for _, row := range settings.Table {
		val, ok := (*s)[row.Name]
		if !ok || changed(row.Name) {
			continue
		}
		reflect.ValueOf(row.Field(v)).Elem().Set(reflect.ValueOf(val))
	}
}

// flagValues returns the command-line form of the setting key, and whether
// it is present in the study: one text per NAME=PATH, "a,b,c" for a number
// list (f formats each number), true/false, or the number.
func (s *Study) flagValues(key string, f func(float64) string) ([]string, bool) {
	v, ok := (*s)[key]
	if !ok {
		return nil, false
	}
	switch x := v.(type) {
	case string:
		return []string{x}, true
	case []string:
		return x, true
	case bool:
		return []string{strconv.FormatBool(x)}, true
	case int:
		return []string{strconv.Itoa(x)}, true
	case uint64:
		return []string{strconv.FormatUint(x, 10)}, true
	case float64:
		return []string{f(x)}, true
	case []float64:
		parts := make([]string, len(x))
		for i, n := range x {
			parts[i] = f(n)
		}
		return []string{strings.Join(parts, ",")}, true
	}
	panic(fmt.Sprintf("inputs: study key %s holds a %T", key, v))
}
