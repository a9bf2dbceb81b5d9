package inputs

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// yamlReaderPhrases are the YAML reader's own words, which must not reach
// the user (an audit of the study files: "mapping values are not allowed in this context",
// "did not find expected key", ... were shown as they were).
var yamlReaderPhrases = []string{"did not find", "could not find", "found unexpected", "found character", "in this context", "yaml: line", "referenced", "token", "<document start>", "end of stream", "node content", "indicator"}

// TestStudySyntaxInOurWords: a study file (and a study table's YAML) that
// the YAML reader refuses is named with the line near the problem and the
// problem in our words.
func TestStudySyntaxInOurWords(t *testing.T) {
	cases := []struct{ name, in, want string }{
		{"second colon", "model: good=m.tif\nregion: a: b\n", "a second ': ' on one line"},
		{"list not closed", "e: [0.05, 0.1\n", "a list in [ ] not closed by ']'"},
		{"mapping not closed", "model: {a: m.tif\n", "a mapping in { } not closed by '}'"},
		{"bad indent", "model:\n  - good=m.tif\n bad: 1\n", "a line indented differently from the keys above it"},
		{"quote not closed", "region: \"r.gpkg\n", "the file ends inside a quoted value or an open bracket"},
		{"unknown anchor", "model: *x\n", "*x names an anchor &x that is not defined above it"},
		{"tab indent", "iterations: 10\n\tseed: 3\n", "a tab used to indent"},
		{"backquote", "region: `r.gpkg`\n", "a value starting with @ or `"},
		{"directive after settings", "seed: 1\n%YAML 1.1\n", "text after the settings that is not key: value"},
		{"list item as value", "e: - 0.05\n", "a '- ' list item where a value should be"},
		{"Windows path in double quotes", "region: \"C:\\data\\r.gpkg\"\n", "write a Windows path in single quotes"},
		{"anchor without a name", "model:\n- a: *,\n", "an '&' or '*' without a name after it"},
		{"list items not aligned", "model:\n  - a=m.tif\n - b=n.tif\n", "near line"},
		// Found by mutating the demo's study file at random (20,000 files).
		{"block scalar of indentation 0", "region: |0\n  r.gpkg\n", "a value starting with '|' or '>' (a block of text) not written as one"},
		{"percent line", "seed: 1\n%x\n", "a line starting with '%'"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseStudy(strings.NewReader(c.in), "s.yaml", "")
			if err == nil {
				t.Fatal("no error")
			}
			msg := err.Error()
			if !strings.Contains(msg, c.want) || !strings.Contains(msg, "s.yaml") {
				t.Errorf("lacks the file or %q: %s", c.want, msg)
			}
			for _, raw := range yamlReaderPhrases {
				if strings.Contains(msg, raw) {
					t.Errorf("holds the YAML reader's %q: %s", raw, msg)
				}
			}
		})
	}
	// The same words in a study table: its YAML form and its '#' lines.
	dir := t.TempDir()
	for name, body := range map[string]string{
		"t.yaml": "settings:\n  seed: 1\nstudies: [{id: a\n",
		"t.csv":  "# e: [0.05, 0.1\nid,model,occurrences,region\na,m=m.tif,o.csv,r.gpkg\n",
	} {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(body), 0o644)
		_, err := LoadBatch(p)
		if err == nil {
			t.Fatalf("%s: no error", name)
		}
		msg := err.Error()
		if !strings.Contains(msg, "not closed by") {
			t.Errorf("%s: lacks our words: %s", name, msg)
		}
		for _, raw := range yamlReaderPhrases {
			if strings.Contains(msg, raw) {
				t.Errorf("%s: holds the YAML reader's %q: %s", name, raw, msg)
			}
		}
	}
}

// TestYAMLWordsOfReader: the reader's problems the study files above do
// not produce, as go.yaml.in/yaml/v3's scanner writes them (its source),
// are said in our words too, and one it may add later plainly.
func TestYAMLWordsOfReader(t *testing.T) {
	for in, want := range map[string]string{
		": did not find expected whitespace or line break":     "a value starting with '!', '|' or '>' followed by other text",
		": found undefined tag handle":                         "a tag (a word starting with '!')",
		": found unknown escape character":                     "write a Windows path in single quotes",
		": control characters are not allowed":                 "a control character",
		": found unexpected document indicator":                "a line starting with '---' or '...' inside a value",
		": some wording the reader may add in a later version": "text that is not valid YAML",
	} {
		if got := yamlWords(in); !strings.Contains(got, want) {
			t.Errorf("yamlWords(%q) = %q, want %q in it", in, got, want)
		}
	}
}

// TestYAMLSyntaxNamesLine: a YAML problem is named with its line also when
// the YAML reader names none: one on the first line (the reader leaves out
// its line 0) and a control character, which the reader refuses before it
// counts lines. The expected lines are where each case writes its fault.
func TestYAMLSyntaxNamesLine(t *testing.T) {
	studies := []struct{ name, in, want string }{
		{"second colon on line 1", "a: b: c\n", "near line 1:"},
		{"control character on line 3", "iterations: 20\nseed: 3\nregion: \"a\x01b\"\n", "near line 3:"},
		{"control character after Windows line ends", "seed: 1\r\niterations: 20\r\nregion: \"a\x0bb\"\r\n", "near line 3:"},
		{"control character after carriage returns alone", "seed: 1\rregion: \"a\x7fb\"\r", "near line 2:"},
		{"C1 control character on line 2", "seed: 1\nregion: \"a\u0090b\"\n", "near line 2:"},
		// Problems of the reader's parser, which it counts from line 0
		// (it said "near line 1" for the [ on line 2).
		{"list opened on line 2 not closed", "seed: 3\ne: [0.05, 0.1\nfraction: 0.5\n", "near line 2:"},
		{"list opened on line 4 not closed", "seed: 3\niterations: 20\nfraction: 0.5\ne: [0.05, 0.1\nworkers: 1\n", "near line 4:"},
		{"mapping opened on line 3 not closed", "seed: 3\niterations: 20\ne: {a: 1\nfraction: 0.5\n", "near line 3:"},
		{"empty list item on line 3", "seed: 3\niterations: 20\ne: [0.05, , 0.1]\n", "near line 3:"},
		{"list item out of line on line 5", "seed: 3\nmodel:\n  - a=m.tif\n  - b=n.tif\n - c=o.tif\n", "near line 5:"},
		{"stray bracket on line 3", "seed: 3\niterations: 20\n]\n", "near line 3:"},
	}
	for _, c := range studies {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseStudy(strings.NewReader(c.in), "s.yaml", "")
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("lacks %q: %s", c.want, err)
			}
		})
	}
	// A study table: its YAML form and its '#' lines (line 1 of the table).
	dir := t.TempDir()
	for name, body := range map[string]string{
		"t.yaml": "studies: a: b\n",
		"u.yaml": "settings:\n  seed: 1\n  region: \"a\x01b\"\nstudies: []\n",
		"t.csv":  "# seed: a: b\nid,model,occurrences,region\na,m=m.tif,o.csv,r.gpkg\n",
	} {
		want := map[string]string{"t.yaml": "near line 1:", "u.yaml": "near line 3:", "t.csv": "near line 1:"}[name]
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(body), 0o644)
		_, err := LoadBatch(p)
		if err == nil {
			t.Fatalf("%s: no error", name)
		}
		if !strings.Contains(err.Error(), want) {
			t.Errorf("%s: lacks %q: %s", name, want, err)
		}
	}
}
