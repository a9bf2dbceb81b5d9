package inputs

import (
	"regexp"
	"strconv"
	"unicode/utf8"
)

// yamlRewords are the YAML reader's problems (go.yaml.in/yaml/v3, its
// "yaml: line N:" prefix already cut) in our words, tried in order; the
// first that matches is used ($1 is the pattern's group).
var yamlRewords = []struct {
	re   *regexp.Regexp
	ours string
}{
	{regexp.MustCompile(`mapping values are not allowed in this context`), "a second ': ' on one line (a value holding ': ' must be quoted, e.g. region: \"a: b.gpkg\")"},
	{regexp.MustCompile(`could not find expected ':'`), "a line that is not key: value"},
	{regexp.MustCompile(`did not find expected key`), "a line indented differently from the keys above it"},
	{regexp.MustCompile(`did not find expected ',' or '\]'`), "a list in [ ] not closed by ']', or whose items are not separated by commas"},
	{regexp.MustCompile(`did not find expected ',' or '\}'`), "a mapping in { } not closed by '}', or whose entries are not separated by commas"},
	{regexp.MustCompile(`did not find expected node content`), "a value missing where one should be (after a comma or an open bracket)"},
	{regexp.MustCompile(`found unexpected end of stream`), "the file ends inside a quoted value or an open bracket: close it"},
	{regexp.MustCompile(`unknown anchor '(.*)' referenced`), "*$1 names an anchor &$1 that is not defined above it (a value starting with '*' must be quoted)"},
	{regexp.MustCompile(`anchor '(.*)' value contains itself`), "the anchor &$1 refers to itself"},
	{regexp.MustCompile(`found character that cannot start any token`), "a character that cannot start a value (a tab used to indent, or a value starting with @ or ` that is not quoted)"},
	{regexp.MustCompile(`found a tab character`), "a tab used to indent"},
	{regexp.MustCompile(`did not find expected <document start>`), "text after the settings that is not key: value"},
	{regexp.MustCompile(`block sequence entries are not allowed in this context`), "a '- ' list item where a value should be: put the items on the lines below the key, indented, or write [a, b]"},
	{regexp.MustCompile(`mapping keys are not allowed in this context`), "a '? ' key where none is allowed"},
	{regexp.MustCompile(`did not find expected '-' indicator`), "the items of a list not indented alike"},
	{regexp.MustCompile(`found unknown escape character`), "an unknown escape (\\) in a double-quoted value: write a Windows path in single quotes ('C:\\data\\m.tif') or with /"},
	{regexp.MustCompile(`control characters are not allowed`), "a control character"},
	{regexp.MustCompile(`did not find expected alphabetic or numeric character`), "an '&' or '*' without a name after it (a value starting with & or * must be quoted)"},
	{regexp.MustCompile(`found undefined tag handle|did not find expected tag URI|did not find expected '!'|cannot decode !!`), "a tag (a word starting with '!') that is not understood here: remove it, or quote the value"},
	{regexp.MustCompile(`found unexpected document indicator`), "a line starting with '---' or '...' inside a value"},
	{regexp.MustCompile(`did not find expected comment or line break`), "more text after a value where the line should end"},
	{regexp.MustCompile(`directive|found unexpected non-alphabetical character`), "a line starting with '%' (a YAML directive) that is not understood: quote a value starting with %"},
	{regexp.MustCompile(`found an indentation indicator equal to 0`), "a value starting with '|' or '>' (a block of text) not written as one: quote the value"},
	{regexp.MustCompile(`did not find expected whitespace or line break`), "a value starting with '!', '|' or '>' followed by other text: quote the value"},
}

// yamlWords puts a YAML reader's problem in our words; one we do not
// know is said plainly, without the reader's wording.
func yamlWords(msg string) string {
	for _, w := range yamlRewords {
		if m := w.re.FindStringSubmatchIndex(msg); m != nil {
			return string(w.re.ExpandString(nil, w.ours, msg, m))
		}
	}
	return "text that is not valid YAML"
}

// yamlNear says near which line of data a YAML reader error err is: the
// "line N" it names. The reader names none when the problem is on the
// first line (its marks count from 0 and 0 is left out), nor for a
// character it refuses ("control characters are not allowed"), which it
// finds before it counts lines: that one is looked up in data, and any
// other error without a line is on line 1 when it is in the first
// document (first). "" when the line is not known.
//
// The reader counts a parser's lines from 0 and a scanner's from 1
// (go.yaml.in/yaml/v3's parser.fail adds 1 for a scanner error only), so
// a parser's problem (yamlParserRE: an unclosed [ or {, a line indented
// unlike its neighbours) was said one line early: "near line 1" for a [
// on line 2 (found by the README probe of 2026-12-05).
func yamlNear(err error, data []byte, first bool) string {
	if m := yamlLineRE.FindStringSubmatch(err.Error()); m != nil {
		if n, e := strconv.Atoi(m[1]); e == nil && yamlParserRE.MatchString(err.Error()) {
			return " near line " + strconv.Itoa(n+1)
		}
		return " near line " + m[1]
	}
	if yamlControlRE.MatchString(err.Error()) {
		if line := yamlControlLine(data); line > 0 {
			return " near line " + strconv.Itoa(line)
		}
		return ""
	}
	if first {
		return " near line 1"
	}
	return ""
}

// yamlParserRE matches the problems go.yaml.in/yaml/v3's parser (not its
// scanner) reports (parserc.go), whose line it counts from 0.
var yamlParserRE = regexp.MustCompile(`did not find expected (<document start>|key|node content|'-' indicator|',' or '\]'|',' or '\}')|found undefined tag handle|found duplicate %(YAML|TAG) directive|found incompatible YAML document`)

var yamlControlRE = regexp.MustCompile(`control characters are not allowed`)

// yamlControlLine returns the line of the first character of data that
// the YAML reader refuses as a control character (go.yaml.in/yaml/v3's
// readerc.go allows tab, line feed, carriage return, 0x20-0x7E, 0x85,
// 0xA0-0xD7FF, 0xE000-0xFFFD and 0x10000-0x10FFFF), counting lines as
// the reader does (a line feed, a carriage return alone or before a line
// feed, U+0085, U+2028 and U+2029 end a line); 0 when there is none.
func yamlControlLine(data []byte) int {
	line := 1
	for i := 0; i < len(data); {
		r, n := utf8.DecodeRune(data[i:])
		switch {
		case r == utf8.RuneError && n <= 1:
			return 0 // not UTF-8: the reader says so otherwise
		case r == '\r':
			if i+1 >= len(data) || data[i+1] != '\n' {
				line++
			}
		case r == '\n', r == 0x85, r == 0x2028, r == 0x2029:
			line++
		case r == '\t', r >= 0x20 && r <= 0x7E, r >= 0xA0 && r <= 0xD7FF, r >= 0xE000 && r <= 0xFFFD, r >= 0x10000 && r <= 0x10FFFF:
		default:
			return line
		}
		i += n
	}
	return 0
}
