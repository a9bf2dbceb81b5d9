package inputs

import "regexp"

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
