package report

import "bytes"

// indentJSON appends to dst the compact JSON src indented as
// encoding/json's Indent(dst, src, "", "  ") indents it, byte for byte:
// each element of a non-empty object or array on a line of its own at two
// spaces a level, ": " after a key, empty objects and arrays kept as {} and
// [], everything else (strings, numbers, literals, whitespace after the
// value) copied unchanged.
//
// Why not encoding/json's own: it steps its validating scanner over every
// byte and took three fifths of encoding a 60-extent results.json (14 MB).
// Here src must be valid compact JSON, as json.Marshal and json.Encoder
// write it (no whitespace between tokens); only strings need scanning, for
// their closing quote.
func indentJSON(dst, src []byte) []byte {
	var in indenter
	return in.indent(dst, src)
}

// indenter is indentJSON over a document given in pieces: indent appends
// each piece indented, carrying the nesting between calls, so that the
// pieces together come out as indentJSON of their concatenation. A piece
// must end between tokens (a string, number or literal is never split).
type indenter struct {
	depth int
	open  bool // the last token opened an object or array
}

// indent appends to dst the piece src indented (see indenter).
func (in *indenter) indent(dst, src []byte) []byte {
	const spaces = "\n                                                                " // a newline and 64 spaces
	newline := func(dst []byte, depth int) []byte {
		if n := 1 + 2*depth; n <= len(spaces) {
			return append(dst, spaces[:n]...)
		}
		dst = append(dst, '\n')
		for range depth {
			dst = append(dst, "  "...)
		}
		return dst
	}
	depth, open := in.depth, in.open
	for i := 0; i < len(src); {
		c := src[i]
		if open && c != '}' && c != ']' {
			open = false
			depth++
			dst = newline(dst, depth)
		}
		switch c {
		case '{', '[':
			open = true
			dst = append(dst, c)
			i++
		case '}', ']':
			if open {
				open = false
			} else {
				depth--
				dst = newline(dst, depth)
			}
			dst = append(dst, c)
			i++
		case ',':
			dst = newline(append(dst, c), depth)
			i++
		case ':':
			dst = append(dst, ':', ' ')
			i++
		case '"':
			j := i + 1
			for {
				k := bytes.IndexAny(src[j:], `"\`)
				if k < 0 { // unterminated: copy the rest
					j = len(src)
					break
				}
				j += k
				if src[j] == '"' {
					j++
					break
				}
				j += 2 // a backslash and the byte it escapes
				if j > len(src) {
					j = len(src)
					break
				}
			}
			dst = append(dst, src[i:j]...)
			i = j
		default: // a number or literal, up to the next delimiter
			j := i + 1
			for j < len(src) && !jsonDelim[src[j]] {
				j++
			}
			dst = append(dst, src[i:j]...)
			i = j
		}
	}
	in.depth, in.open = depth, open
	return dst
}

// jsonDelim marks the bytes that end a number or literal in compact JSON.
var jsonDelim = [256]bool{',': true, '}': true, ']': true, ':': true, '"': true, '{': true, '[': true}
