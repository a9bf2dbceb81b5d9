package report

import (
	"encoding/json"
	"errors"
	"io"
)

// shapeTokens is what CheckShape reads a file through: a json.Decoder
// (with UseNumber), or fastTokens.
type shapeTokens interface {
	Token() (json.Token, error)
	More() bool
	InputOffset() int64
}

// errNotFast is fastTokens' answer to anything it does not read as a
// json.Decoder would: CheckShape then walks the file again with a
// json.Decoder, which says what is wrong.
var errNotFast = errors.New("report: not read by fastTokens")

// fastTokens gives the tokens of a JSON text as json.Decoder's Token
// does with UseNumber (strings, json.Number, bool, nil and Delim), for a
// text that is valid JSON, without the decoder's cost per value (a
// Decode call per string and number, and an error message made and
// dropped at the end of each: most of the shape walk's time). On
// anything else (a syntax error, the end of the text inside a value, a
// string it does not decode itself that encoding/json refuses) it
// returns errNotFast and is not used further. A token it returns is the
// one the decoder would return at that place (TestFastTokensAsDecoder).
type fastTokens struct {
	data  []byte
	pos   int
	state fastState
	stack []fastState
	// names holds the short strings met, so that the keys and names
	// repeated in every record are made once.
	names map[string]string
}

// fastState mirrors json.Decoder's token states.
type fastState uint8

const (
	fastTopValue fastState = iota
	fastArrayStart
	fastArrayValue
	fastArrayComma
	fastObjectStart
	fastObjectKey
	fastObjectColon
	fastObjectValue
	fastObjectComma
)

// maxNames bounds fastTokens.names (our choice); a string of more than
// maxNameLen bytes is not kept there.
const (
	maxNames   = 1 << 12
	maxNameLen = 64
)

func newFastTokens(data []byte) *fastTokens {
	return &fastTokens{data: data, names: map[string]string{}}
}

// skip moves past white space (JSON's: space, tab, CR, LF).
func (f *fastTokens) skip() {
	for f.pos < len(f.data) {
		switch f.data[f.pos] {
		case ' ', '\t', '\r', '\n':
			f.pos++
		default:
			return
		}
	}
}

// More is json.Decoder's More: another element or member follows.
func (f *fastTokens) More() bool {
	f.skip()
	return f.pos < len(f.data) && f.data[f.pos] != ']' && f.data[f.pos] != '}'
}

// InputOffset is not asked of fastTokens: it answers no syntax error.
func (f *fastTokens) InputOffset() int64 { return int64(f.pos) }

// valueAllowed and valueEnd are json.Decoder's tokenValueAllowed and
// tokenValueEnd.
func (f *fastTokens) valueAllowed() bool {
	switch f.state {
	case fastTopValue, fastArrayStart, fastArrayValue, fastObjectValue:
		return true
	}
	return false
}

func (f *fastTokens) valueEnd() {
	switch f.state {
	case fastArrayStart, fastArrayValue:
		f.state = fastArrayComma
	case fastObjectValue:
		f.state = fastObjectComma
	}
}

// Token is json.Decoder's Token, or errNotFast.
func (f *fastTokens) Token() (json.Token, error) {
	for {
		f.skip()
		if f.pos >= len(f.data) {
			if f.state == fastTopValue && len(f.stack) == 0 {
				return nil, io.EOF // as the decoder at the end of a whole value
			}
			return nil, errNotFast
		}
		c := f.data[f.pos]
		switch c {
		case '[', '{':
			if !f.valueAllowed() {
				return nil, errNotFast
			}
			f.pos++
			f.stack = append(f.stack, f.state)
			if c == '[' {
				f.state = fastArrayStart
			} else {
				f.state = fastObjectStart
			}
			return json.Delim(c), nil
		case ']', '}':
			if (c == ']' && f.state != fastArrayStart && f.state != fastArrayComma) ||
				(c == '}' && f.state != fastObjectStart && f.state != fastObjectComma) {
				return nil, errNotFast
			}
			f.pos++
			f.state = f.stack[len(f.stack)-1]
			f.stack = f.stack[:len(f.stack)-1]
			f.valueEnd()
			return json.Delim(c), nil
		case ':':
			if f.state != fastObjectColon {
				return nil, errNotFast
			}
			f.pos++
			f.state = fastObjectValue
			continue
		case ',':
			switch f.state {
			case fastArrayComma:
				f.state = fastArrayValue
			case fastObjectComma:
				f.state = fastObjectKey
			default:
				return nil, errNotFast
			}
			f.pos++
			continue
		case '"':
			s, ok := f.str()
			if !ok {
				return nil, errNotFast
			}
			if f.state == fastObjectStart || f.state == fastObjectKey {
				f.state = fastObjectColon
				return s, nil
			}
			if !f.valueAllowed() {
				return nil, errNotFast
			}
			f.valueEnd()
			return s, nil
		}
		if !f.valueAllowed() {
			return nil, errNotFast
		}
		var tok json.Token
		switch {
		case c == '-' || (c >= '0' && c <= '9'):
			n, ok := f.number()
			if !ok {
				return nil, errNotFast
			}
			tok = n
		case f.word("true"):
			tok = true
		case f.word("false"):
			tok = false
		case f.word("null"):
			tok = nil
		default:
			return nil, errNotFast
		}
		f.valueEnd()
		return tok, nil
	}
}

// word moves past w if the text goes on with it.
func (f *fastTokens) word(w string) bool {
	if len(f.data)-f.pos >= len(w) && string(f.data[f.pos:f.pos+len(w)]) == w {
		f.pos += len(w)
		return true
	}
	return false
}

// number reads a number as JSON writes it: -?(0|[1-9][0-9]*)(.[0-9]+)?([eE][+-]?[0-9]+)?
func (f *fastTokens) number() (json.Number, bool) {
	d, start := f.data, f.pos
	i := start
	digits := func() int {
		j := i
		for i < len(d) && d[i] >= '0' && d[i] <= '9' {
			i++
		}
		return i - j
	}
	if i < len(d) && d[i] == '-' {
		i++
	}
	switch {
	case i < len(d) && d[i] == '0':
		i++
	case digits() == 0:
		return "", false
	}
	if i < len(d) && d[i] == '.' {
		i++
		if digits() == 0 {
			return "", false
		}
	}
	if i < len(d) && (d[i] == 'e' || d[i] == 'E') {
		i++
		if i < len(d) && (d[i] == '+' || d[i] == '-') {
			i++
		}
		if digits() == 0 {
			return "", false
		}
	}
	// The decoder knows a number has ended at the byte after it; at the
	// end of the text it would read the number, but a results file never
	// ends in one: leave that to the decoder.
	if i >= len(d) {
		return "", false
	}
	f.pos = i
	return json.Number(d[start:i]), true
}

// str reads a string at f.pos (its opening quote). A string of printable
// ASCII without escapes is its own bytes; any other is decoded by
// encoding/json itself, and refused if it refuses it.
func (f *fastTokens) str() (string, bool) {
	d := f.data
	start := f.pos + 1
	i := start
	plain := true
	for ; i < len(d); i++ {
		c := d[i]
		if c == '"' {
			break
		}
		if c == '\\' {
			plain = false
			i++ // the escaped byte is not the end
			continue
		}
		if c < 0x20 || c >= 0x80 {
			plain = false
		}
	}
	if i >= len(d) {
		return "", false
	}
	f.pos = i + 1
	if !plain {
		var s string
		if json.Unmarshal(d[start-1:i+1], &s) != nil {
			return "", false
		}
		return s, true
	}
	b := d[start:i]
	if len(b) <= maxNameLen {
		if s, ok := f.names[string(b)]; ok {
			return s, true
		}
		s := string(b)
		if len(f.names) < maxNames {
			f.names[s] = s
		}
		return s, true
	}
	return string(b), true
}
