package report

import (
	"bytes"
	"fmt"
	"regexp"
	"strconv"
	"strings"
)

// utf8BOM is the byte-order mark some editors put at the start of a
// file saved as "UTF-8 with BOM"; JSON does not allow it.
var utf8BOM = []byte("\xef\xbb\xbf")

// jsonCharRE takes encoding/json's "invalid character 'c' context"
// apart.
var jsonCharRE = regexp.MustCompile(`^invalid character '(.+)' (.+)$`)

// jsonSyntaxWords says in our words where and why the JSON of a results
// file stops being JSON, from encoding/json's syntax error err at byte
// offset of data: the line, the character found and what JSON expects
// there. encoding/json's own phrasing ("invalid character 'N' looking
// for beginning of value") never reaches the user.
func jsonSyntaxWords(data []byte, offset int64, err error) string {
	at := fmt.Sprintf("at line %d, byte %d", lineAt(data, offset), offset)
	msg := err.Error()
	m := jsonCharRE.FindStringSubmatch(msg)
	if m == nil {
		switch {
		case strings.Contains(msg, "expected comma"):
			return at + ": a ',' or a closing bracket should come next"
		case strings.Contains(msg, "expected colon"):
			return at + ": a ':' should follow the key"
		}
		return at + ": the text there is not JSON"
	}
	ch, ctx := m[1], m[2]
	found := "a character"
	if ch == `\'` {
		ch = "'"
	} else if u, err := strconv.Unquote(`"` + ch + `"`); err == nil {
		ch = u
	}
	if r := []rune(ch); len(r) == 1 {
		switch c := r[0]; {
		case c == '\t':
			found = "a tab"
		case c == '\n' || c == '\r':
			found = "a line break"
		case c == '\'':
			found = `the character "'"`
		case c > ' ' && c < 0x7f:
			found = fmt.Sprintf("the character '%c'", c)
		case c < 0x100: // encoding/json names a byte as the rune of its value
			found = fmt.Sprintf("the byte 0x%02X", c)
		}
	}
	where := "where JSON does not allow it"
	switch {
	case ctx == "looking for beginning of value":
		where = "where a value should begin"
	case ctx == "looking for beginning of object key string":
		where = "where a quoted key should begin"
	case ctx == "after object key":
		where = "after a key, where ':' should follow"
	case ctx == "after object key:value pair":
		where = "after a value in an object, where ',' or '}' should follow"
	case ctx == "after array element":
		where = "after an item of a list, where ',' or ']' should follow"
	case ctx == "after top-level value":
		where = "after the end of the results object"
	case ctx == "in string literal":
		where = "inside a quoted text, where a tab, line break or other control character must be written as an escape (\\t, \\n)"
	case ctx == "in string escape code":
		where = "in an escape (\\) inside a quoted text"
	case strings.HasPrefix(ctx, "in literal "):
		where = "inside a true, false or null"
	case strings.Contains(ctx, "numeric literal"):
		where = "inside a number"
	}
	s := fmt.Sprintf("%s: %s %s", at, found, where)
	if ch == "N" || ch == "I" {
		s += "; JSON has no NaN or Infinity"
	}
	return s
}

// lineAt is the 1-based line of byte offset in data.
func lineAt(data []byte, offset int64) int {
	if offset > int64(len(data)) {
		offset = int64(len(data))
	}
	if offset < 0 {
		offset = 0
	}
	return 1 + bytes.Count(data[:offset], []byte("\n"))
}
