package report

import (
	"strings"
	"testing"
)

// TestDecodeSyntaxInOurWords: a results.json that is not JSON, or stops
// being JSON at a field, is named with the line and the character found
// in our words; encoding/json's phrasing ("invalid character 'N'
// looking for beginning of value") used to reach the user as it was. A
// byte-order mark and a null schema_version are named as such (the null
// was reported as "schema_version 0"). The lines are those of the
// texts below, counted by hand.
func TestDecodeSyntaxInOurWords(t *testing.T) {
	cases := []struct {
		name, text string
		want       []string
	}{
		{"plain text", "hello world\n", []string{"not valid JSON at line 1, byte 1: the character 'h' where a value should begin"}},
		{"NaN at a field", "{\n  \"schema_version\": 3,\n  \"x\": NaN\n}\n", []string{"x: not valid JSON there (at line 3,", "the character 'N' where a value should begin; JSON has no NaN or Infinity"}},
		{"-Infinity", "{\"schema_version\": 3, \"x\": -Infinity}", []string{"the character 'I' inside a number; JSON has no NaN or Infinity"}},
		{"missing comma", "{\"schema_version\": 3\n\"x\": 1}", []string{"line 2", "the character '\"' after a value in an object, where ',' or '}' should follow"}},
		{"single quotes", "{'schema_version': 3}", []string{"the character \"'\" where a quoted key should begin"}},
		{"tab in a string", "{\"schema_version\": 3, \"x\": \"a\tb\"}", []string{"a tab inside a quoted text"}},
		{"control byte", "{\"schema_version\": 3, \"x\": \x01}", []string{"the byte 0x01 where a value should begin"}},
		{"Latin-1 byte", "{\"schema_version\": 3, \"x\": \xe9}", []string{"the byte 0xE9 where a value should begin"}},
		{"broken literal", "{\"schema_version\": 3, \"x\": tru}", []string{"inside a true, false or null"}},
		{"byte-order mark", "\xef\xbb\xbf{\"schema_version\": 3}", []string{"starts with a byte-order mark", "save it as UTF-8 without BOM"}},
		{"null schema_version", "{\"schema_version\": null}", []string{"schema_version is null"}},
		// Saved as "Unicode" by an editor, with a byte-order mark or
		// without: named as UTF-16 ("the byte 0xFF where a value should
		// begin").
		{"UTF-16 with BOM", "\xff\xfe{\x00\"\x00", []string{"is UTF-16 text", "save it as UTF-8"}},
		{"UTF-16 without BOM", "{\x00\"\x00s\x00", []string{"is UTF-16 text"}},
		{"UTF-16 big-endian", "\x00{\x00\"", []string{"is UTF-16 text"}},
		// A run's file broken by an edit at its end (a comma before the
		// last '}'): named as edited, not as no results file.
		{"comma before the last brace", "{\n  \"schema_version\": 3,\n  \"x\": 1,\n}\n", []string{"line 4", "as it stands", "the file was edited, damaged or cut short: restore it from a copy"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Decode("dir/results.json", []byte(c.text))
			if err == nil {
				t.Fatal("no error")
			}
			msg := err.Error()
			if !strings.Contains(msg, "dir/results.json") {
				t.Errorf("the file is not named: %s", msg)
			}
			for _, w := range c.want {
				if !strings.Contains(msg, w) {
					t.Errorf("lacks %q: %s", w, msg)
				}
			}
			for _, raw := range []string{"invalid character", "looking for", "literal", "json:", "object key", "schema_version 0"} {
				if strings.Contains(msg, raw) {
					t.Errorf("holds encoding/json's (or a wrong) phrase %q: %s", raw, msg)
				}
			}
		})
	}
}
