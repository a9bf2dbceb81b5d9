package inputs

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"
)

// Study holds the settings a study file can give. Every field is a pointer
// or a slice so that "absent" differs from "zero": a nil field was not in
// the file, a non-nil empty slice was given as an empty list. Keys are
// exactly the long flag names of the command.
//
// Paths (the PATH part of model, null and extra, occurrences, region,
// ecoregions, out) are already resolved against the study file's directory.
type Study struct {
	Model              []string  `yaml:"model"` // "NAME=PATH"
	Occurrences        *string   `yaml:"occurrences"`
	OccurrencesCRS     *string   `yaml:"occurrences-crs"`
	Region             *string   `yaml:"region"`
	Ecoregions         *string   `yaml:"ecoregions"`
	EcoregionField     *string   `yaml:"ecoregion-field"`
	EcoregionMinPoints *int      `yaml:"ecoregion-min-points"`
	EcoregionClip      *bool     `yaml:"ecoregion-clip"`
	Extra              []string  `yaml:"extra"` // "NAME=PATH"
	RegionBuffers      []float64 `yaml:"region-buffers"`
	PointBuffers       []float64 `yaml:"point-buffers"`
	PointBuffersAll    *bool     `yaml:"point-buffers-all"`
	HullBuffers        []float64 `yaml:"hull-buffers"`
	E                  []float64 `yaml:"e"`
	Iterations         *int      `yaml:"iterations"`
	Fraction           *float64  `yaml:"fraction"`
	Thresholds         []float64 `yaml:"thresholds"`
	Seed               *uint64   `yaml:"seed"`
	Out                *string   `yaml:"out"`
	NoThin             *bool     `yaml:"no-thin"`
	MembershipTIFF     *bool     `yaml:"membership-tif"`
	Null               []string  `yaml:"null"` // "NAME=PATH"
	NoDistanceNull     *bool     `yaml:"no-distance-null"`
	// Tolerances of the equivalence verdicts.
	ToleranceAUC        *float64 `yaml:"tolerance-auc"`
	TolerancePartialROC *float64 `yaml:"tolerance-partial-roc"`
	ToleranceOmission   *float64 `yaml:"tolerance-omission"`
	ToleranceBoyce      *float64 `yaml:"tolerance-boyce"`
}

// studyKeys lists the accepted keys in the order of the Study fields.
var studyKeys = []string{
	"model", "occurrences", "occurrences-crs", "region", "ecoregions", "ecoregion-field",
	"ecoregion-min-points", "ecoregion-clip", "extra", "region-buffers", "point-buffers",
	"point-buffers-all", "hull-buffers", "e", "iterations", "fraction", "thresholds", "seed",
	"out", "no-thin", "membership-tif", "null", "no-distance-null",
	"tolerance-auc", "tolerance-partial-roc", "tolerance-omission", "tolerance-boyce",
}

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
// against the directory holding the study file.
func LoadStudy(path string) (*Study, error) {
	if err := checkRegular(path, "study file"); err != nil {
		return nil, err
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("inputs: cannot read study file: %w", err)
	}
	defer f.Close()
	data, err := io.ReadAll(newLimitedReader(f, path, MaxStudyBytes, 0))
	if err != nil {
		if errors.Is(err, ErrTooLarge) {
			return nil, &StudyError{File: path, Err: err}
		}
		return nil, fmt.Errorf("inputs: cannot read study file: %w", err)
	}
	return ParseStudy(bytes.NewReader(data), path, filepath.Dir(path))
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
	dec := yaml.NewDecoder(r)
	var doc yaml.Node
	st := &Study{}
	if err := dec.Decode(&doc); err != nil {
		if err == io.EOF {
			return st, nil // empty file: nothing set
		}
		return nil, syntaxError(name, err)
	}
	var second yaml.Node
	if err := dec.Decode(&second); err != io.EOF {
		if err != nil {
			return nil, syntaxError(name, err)
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

// lineErr carries a more precise line (a list item) out of set.
type lineErr struct {
	line int
	err  error
}

func (e *lineErr) Error() string { return e.err.Error() }
func (e *lineErr) Unwrap() error { return e.err }

var yamlLineRE = regexp.MustCompile(`line (\d+)`)

// syntaxError wraps an error of the YAML reader. The reader's line numbers
// can be one line early, so the line is given as "near line N" in the text
// and StudyError.Line is left 0.
func syntaxError(name string, err error) error {
	near := ""
	if m := yamlLineRE.FindStringSubmatch(err.Error()); m != nil {
		near = " near line " + m[1]
	}
	msg := strings.TrimPrefix(err.Error(), "yaml: ")
	msg = yamlLineRE.ReplaceAllString(msg, "")
	msg = strings.Trim(msg, " :")
	return &StudyError{File: name, Err: fmt.Errorf("%w: %s%s; write one setting per line as key: value, "+
		"indent with spaces (not tabs), and quote values that contain ': ' or start with a special character",
		ErrStudySyntax, msg, near)}
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
		return fmt.Sprintf("the single value %q", n.Value)
	default:
		return "an unexpected YAML node"
	}
}

// set decodes value node v for key into the study.
func (s *Study) set(key string, v *yaml.Node, dir string) error {
	var err error
	switch key {
	case "model":
		s.Model, err = namedPaths(key, v, dir)
	case "null":
		s.Null, err = namedPaths(key, v, dir)
	case "no-distance-null":
		s.NoDistanceNull, err = boolValue(key, v)
	case "extra":
		s.Extra, err = namedPaths(key, v, dir)
	case "occurrences":
		s.Occurrences, err = pathValue(key, v, dir)
	case "region":
		s.Region, err = pathValue(key, v, dir)
	case "ecoregions":
		s.Ecoregions, err = pathValue(key, v, dir)
	case "out":
		s.Out, err = pathValue(key, v, dir)
	case "occurrences-crs":
		s.OccurrencesCRS, err = stringValue(key, v)
	case "ecoregion-field":
		s.EcoregionField, err = stringValue(key, v)
	case "ecoregion-min-points":
		s.EcoregionMinPoints, err = intValue(key, v)
	case "iterations":
		s.Iterations, err = intValue(key, v)
	case "ecoregion-clip":
		s.EcoregionClip, err = boolValue(key, v)
	case "point-buffers-all":
		s.PointBuffersAll, err = boolValue(key, v)
	case "no-thin":
		s.NoThin, err = boolValue(key, v)
	case "membership-tif":
		s.MembershipTIFF, err = boolValue(key, v)
	case "region-buffers":
		s.RegionBuffers, err = floatList(key, v)
	case "point-buffers":
		s.PointBuffers, err = floatList(key, v)
	case "hull-buffers":
		s.HullBuffers, err = floatList(key, v)
	case "e":
		s.E, err = floatList(key, v)
	case "thresholds":
		s.Thresholds, err = floatList(key, v)
	case "fraction":
		s.Fraction, err = floatValue(key, v)
	case "tolerance-auc":
		s.ToleranceAUC, err = floatValue(key, v)
	case "tolerance-partial-roc":
		s.TolerancePartialROC, err = floatValue(key, v)
	case "tolerance-omission":
		s.ToleranceOmission, err = floatValue(key, v)
	case "tolerance-boyce":
		s.ToleranceBoyce, err = floatValue(key, v)
	case "seed":
		s.Seed, err = uintValue(key, v)
	default:
		// studyKeys and this switch must agree.
		panic("inputs: study key without decoder: " + key)
	}
	return err
}

func badValue(format string, a ...any) error {
	return fmt.Errorf("%w: "+format, append([]any{ErrBadValue}, a...)...)
}

func scalar(key string, v *yaml.Node, want, example string) (*yaml.Node, error) {
	if v.Kind != yaml.ScalarNode {
		return nil, badValue("expected %s, found %s; write for example\n    %s: %s", want, kindName(v), key, example)
	}
	return v, nil
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
	p := resolvePath(dir, n.Value)
	return &p, nil
}

// resolvePath joins a relative path to dir. Absolute paths, URLs and GDAL
// virtual paths (/vsi...) are returned unchanged.
func resolvePath(dir, p string) string {
	if dir == "" || p == "" || filepath.IsAbs(p) || strings.Contains(p, "://") || strings.HasPrefix(p, "/vsi") {
		return p
	}
	return filepath.Join(dir, p)
}

func intValue(key string, v *yaml.Node) (*int, error) {
	n, err := scalar(key, v, "a whole number", "1000")
	if err != nil {
		return nil, err
	}
	var out int
	switch n.ShortTag() {
	case "!!int":
		if err := n.Decode(&out); err != nil {
			return nil, badValue("%q is too large; write for example\n    %s: 1000", n.Value, key)
		}
	case "!!float":
		var f float64
		if err := n.Decode(&f); err != nil || f != math.Trunc(f) || math.Abs(f) > 1<<53 {
			return nil, badValue("%q is not a whole number; write for example\n    %s: 1000", n.Value, key)
		}
		out = int(f)
	default:
		return nil, badValue("%q is not a whole number%s; write for example\n    %s: 1000", n.Value, quotedHint(n), key)
	}
	return &out, nil
}

func uintValue(key string, v *yaml.Node) (*uint64, error) {
	n, err := scalar(key, v, "a whole number", "42")
	if err != nil {
		return nil, err
	}
	if n.ShortTag() != "!!int" {
		return nil, badValue("%q is not a whole number%s; write for example\n    %s: 42", n.Value, quotedHint(n), key)
	}
	var out uint64
	if err := n.Decode(&out); err != nil {
		return nil, badValue("%q is not a whole number from 0 to %d; write for example\n    %s: 42", n.Value, uint64(math.MaxUint64), key)
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
		return nil, badValue("%v; write for example\n    %s: 0.5", err, key)
	}
	return &f, nil
}

// yamlNumber decodes a finite number from a scalar node tagged int or float.
func yamlNumber(n *yaml.Node) (float64, error) {
	tag := n.ShortTag()
	if tag != "!!int" && tag != "!!float" {
		return 0, fmt.Errorf("%q is not a number%s", n.Value, quotedHint(n))
	}
	var f float64
	if err := n.Decode(&f); err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
		return 0, fmt.Errorf("%q is not a finite number", n.Value)
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
		return nil, badValue("%q is not true or false%s; write\n    %s: true\nor\n    %s: false", n.Value, quotedHint(n), key, key)
	}
	var b bool
	if err := n.Decode(&b); err != nil {
		return nil, badValue("%q is not true or false", n.Value)
	}
	return &b, nil
}

// floatList accepts a YAML list of numbers, a single number, or a text
// value "a, b, c" as on the command line. An empty list gives a non-nil
// empty slice.
func floatList(key string, v *yaml.Node) ([]float64, error) {
	switch v.Kind {
	case yaml.SequenceNode:
		out := make([]float64, 0, len(v.Content))
		for i, item := range v.Content {
			item = deref(item)
			if item.Kind != yaml.ScalarNode {
				return nil, &lineErr{item.Line, badValue("item %d is %s, expected a number; write for example\n    %s: [10, 25, 50]", i+1, kindName(item), key)}
			}
			f, err := yamlNumber(item)
			if err != nil {
				return nil, &lineErr{item.Line, badValue("item %d: %v; write for example\n    %s: [10, 25, 50]", i+1, err, key)}
			}
			out = append(out, f)
		}
		return out, nil
	case yaml.ScalarNode:
		if tag := v.ShortTag(); tag == "!!int" || tag == "!!float" {
			f, err := yamlNumber(v)
			if err != nil {
				return nil, badValue("%v; write for example\n    %s: [10, 25, 50]", err, key)
			}
			return []float64{f}, nil
		}
		out, err := ParseFloatList(key, v.Value)
		if err != nil {
			return nil, fmt.Errorf("%w: %w", ErrBadValue, noPrefix{err})
		}
		if out == nil {
			out = []float64{}
		}
		return out, nil
	default:
		return nil, badValue("expected a list of numbers, found %s; write for example\n    %s: [10, 25, 50]", kindName(v), key)
	}
}

// namedPaths accepts a list of "NAME=PATH" texts, a single such text, or a
// mapping NAME: PATH (kept in file order). Paths are resolved against dir.
func namedPaths(key string, v *yaml.Node, dir string) ([]string, error) {
	example := fmt.Sprintf("write for example\n    %s:\n      - gbm=models/gbm.tif\n      - glm=models/glm.tif", key)
	one := func(n *yaml.Node, text string) (string, error) {
		name, p, err := ParseNamedPath(text)
		if err != nil {
			return "", &lineErr{n.Line, fmt.Errorf("%w: %w", ErrBadValue, noPrefix{err})}
		}
		return name + "=" + resolvePath(dir, p), nil
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
	const advice = "write NAME=PATH, where NAME is 1 to 40 letters, digits, '_', '-' or '.', for example gbm=models/gbm.tif"
	i := strings.IndexByte(s, '=')
	if i < 0 {
		return "", "", fmt.Errorf("%w: %q has no '='; %s", ErrNamedPath, s, advice)
	}
	name, path = strings.TrimSpace(s[:i]), strings.TrimSpace(s[i+1:])
	if name == "" {
		return "", "", fmt.Errorf("%w: %q has no NAME before '='; %s", ErrNamedPath, s, advice)
	}
	if !nameRE.MatchString(name) {
		return "", "", fmt.Errorf("%w: the name %q in %q is not allowed; %s", ErrNamedPath, name, s, advice)
	}
	if path == "" {
		return "", "", fmt.Errorf("%w: %q has no PATH after '='; %s", ErrNamedPath, s, advice)
	}
	return name, path, nil
}

// ParseFloatList parses a comma-separated list of numbers such as
// "10, 25, 50" given to flag (named without dashes, for messages). Spaces
// around items are allowed. An empty or all-space s gives an empty (nil)
// list. An empty item, a non-number, NaN or an infinity is an error naming
// the flag and the item.
func ParseFloatList(flag, s string) ([]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, nil
	}
	parts := strings.Split(s, ",")
	out := make([]float64, 0, len(parts))
	for i, p := range parts {
		p = strings.TrimSpace(p)
		if p == "" {
			return nil, fmt.Errorf("%w: --%s: item %d of %q is empty; give numbers separated by commas, "+
				"for example --%s=10,25,50", ErrFloatList, flag, i+1, s, flag)
		}
		v, err := parseNumber(p, false)
		if err != nil {
			return nil, fmt.Errorf("%w: --%s: item %d %q is not a finite number; give numbers separated by commas "+
				"with a dot as decimal separator, for example --%s=10,25,50", ErrFloatList, flag, i+1, p, flag)
		}
		out = append(out, v)
	}
	return out, nil
}

// FlagSetter is the part of a command-line flag set that Study.Apply needs.
// *pflag.FlagSet (as returned by cobra's Command.Flags) satisfies it.
type FlagSetter interface {
	// Changed reports whether the flag was given on the command line.
	Changed(name string) bool
	// Set gives the flag a value as if it had been given on the command line.
	Set(name, value string) error
}

// Apply copies every setting present in the study into fs, skipping flags
// already given on the command line, so that command-line flags override
// the study file. A list flag given on the command line replaces the
// study's list as a whole. Call it after parsing the command line and
// before reading the flag values.
//
// Values are given to fs.Set in command-line form: NAME=PATH lists (model,
// extra) with one Set call per item, as for a repeated flag; number lists
// with one Set call holding "a,b,c" (as ParseFloatList reads; an empty list
// is ""); numbers in shortest round-trip form; booleans as true/false.
func (s *Study) Apply(fs FlagSetter) error {
	if s == nil {
		return nil
	}
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	for _, key := range studyKeys {
		vals, present := s.flagValues(key, f)
		if !present || fs.Changed(key) {
			continue
		}
		for _, v := range vals {
			if err := fs.Set(key, v); err != nil {
				return fmt.Errorf("inputs: study key %q: flag --%s rejected %q: %w", key, key, v, err)
			}
		}
	}
	return nil
}

// flagValues returns the command-line form of the setting key, and whether
// it is present in the study.
func (s *Study) flagValues(key string, f func(float64) string) ([]string, bool) {
	str := func(p *string) ([]string, bool) {
		if p == nil {
			return nil, false
		}
		return []string{*p}, true
	}
	boolean := func(p *bool) ([]string, bool) {
		if p == nil {
			return nil, false
		}
		return []string{strconv.FormatBool(*p)}, true
	}
	integer := func(p *int) ([]string, bool) {
		if p == nil {
			return nil, false
		}
		return []string{strconv.Itoa(*p)}, true
	}
	float := func(p *float64) ([]string, bool) {
		if p == nil {
			return nil, false
		}
		return []string{f(*p)}, true
	}
	list := func(l []float64) ([]string, bool) {
		if l == nil {
			return nil, false
		}
		parts := make([]string, len(l))
		for i, v := range l {
			parts[i] = f(v)
		}
		return []string{strings.Join(parts, ",")}, true
	}
	switch key {
	case "model":
		return s.Model, s.Model != nil
	case "null":
		return s.Null, s.Null != nil
	case "no-distance-null":
		return boolean(s.NoDistanceNull)
	case "extra":
		return s.Extra, s.Extra != nil
	case "occurrences":
		return str(s.Occurrences)
	case "occurrences-crs":
		return str(s.OccurrencesCRS)
	case "region":
		return str(s.Region)
	case "ecoregions":
		return str(s.Ecoregions)
	case "ecoregion-field":
		return str(s.EcoregionField)
	case "out":
		return str(s.Out)
	case "ecoregion-min-points":
		return integer(s.EcoregionMinPoints)
	case "iterations":
		return integer(s.Iterations)
	case "ecoregion-clip":
		return boolean(s.EcoregionClip)
	case "point-buffers-all":
		return boolean(s.PointBuffersAll)
	case "no-thin":
		return boolean(s.NoThin)
	case "membership-tif":
		return boolean(s.MembershipTIFF)
	case "region-buffers":
		return list(s.RegionBuffers)
	case "point-buffers":
		return list(s.PointBuffers)
	case "hull-buffers":
		return list(s.HullBuffers)
	case "e":
		return list(s.E)
	case "thresholds":
		return list(s.Thresholds)
	case "fraction":
		return float(s.Fraction)
	case "tolerance-auc":
		return float(s.ToleranceAUC)
	case "tolerance-partial-roc":
		return float(s.TolerancePartialROC)
	case "tolerance-omission":
		return float(s.ToleranceOmission)
	case "tolerance-boyce":
		return float(s.ToleranceBoyce)
	case "seed":
		if s.Seed == nil {
			return nil, false
		}
		return []string{strconv.FormatUint(*s.Seed, 10)}, true
	}
	panic("inputs: study key without flag form: " + key)
}

// closestKey suggests the allowed key nearest to k, or "": first ignoring
// case and reading '_' as '-', then, for keys of 4 or more characters, by
// edit distance of at most a third of the key's length.
func closestKey(k string) string {
	norm := strings.ToLower(strings.ReplaceAll(k, "_", "-"))
	for _, s := range studyKeys {
		if s == norm {
			return s
		}
	}
	if len(norm) < 4 {
		return ""
	}
	best, bestD := "", max(1, len(norm)/3)+1
	for _, s := range studyKeys {
		if d := editDistance(norm, s); d < bestD {
			best, bestD = s, d
		}
	}
	return best
}

// editDistance is the Levenshtein distance between a and b (bytes).
func editDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			c := prev[j-1]
			if a[i-1] != b[j-1] {
				c++
			}
			cur[j] = min(c, prev[j]+1, cur[j-1]+1)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
