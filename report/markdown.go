package report

import (
	"strings"
	"unicode"
)

// mdText escapes s for a Markdown paragraph, heading or list item of
// methods.md or summary_methods.md, so that a Markdown viewer shows it as
// the literal text: input paths, model and null names, extent and unit ids
// and error messages are the user's, and an ecoregion unit "<b>" read as
// a tag, or a path "*data*" read as emphasis, would change what the text
// says. Each character that could start Markdown (CommonMark with GitHub's
// tables and strikethrough) is preceded by a backslash, which every such
// viewer drops; a character that cannot start anything where it stands is
// left as it is, so that the raw file, pasted as plain text, stays as
// readable as the sentence: an underscore between two letters or digits
// (region_100km, x_E) cannot open or close emphasis, "<" before a space
// ("P < 0.001") opens no tag, "&" before a space names no entity. Every
// line of s is read as a line of the output: "#", ">", "-", "+", "=" and
// "1." mean something only at a line's start.
func mdText(s string) string {
	rs := []rune(s)
	var b strings.Builder
	b.Grow(len(s))
	lineStart := true
	for i, c := range rs {
		if c == '\n' {
			b.WriteRune(c)
			lineStart = true
			continue
		}
		if mdSpecial(rs, i, lineStart) {
			b.WriteByte('\\')
		}
		b.WriteRune(c)
		if lineStart && !(c == ' ' || unicode.IsDigit(c)) {
			lineStart = false
		}
	}
	return b.String()
}

// mdSpecial tells whether rs[i] must be escaped to be read literally;
// lineStart says that only spaces and digits precede it on its line.
func mdSpecial(rs []rune, i int, lineStart bool) bool {
	prev, next := rune(' '), rune(' ')
	if i > 0 {
		prev = rs[i-1]
	}
	if i+1 < len(rs) {
		next = rs[i+1]
	}
	alnum := func(r rune) bool { return unicode.IsLetter(r) || unicode.IsDigit(r) }
	switch rs[i] {
	case '\\', '`', '*', '[', ']', '|', '~':
		return true
	case '_':
		// Intraword: neither opens nor closes emphasis.
		return !(alnum(prev) && alnum(next))
	case '<':
		// A tag, comment, processing instruction or autolink.
		return unicode.IsLetter(next) || next == '/' || next == '!' || next == '?'
	case '&':
		// An entity or numeric character reference.
		return alnum(next) || next == '#'
	case '#', '>', '-', '+', '=':
		// A heading, block quote, list item, thematic break or setext
		// underline, at a line's start only.
		return lineStart && !unicode.IsDigit(prev)
	case '.', ')':
		// "1. " or "1) " at a line's start is an ordered list item.
		return lineStart && unicode.IsDigit(prev) && (next == ' ' || i+1 == len(rs))
	}
	return false
}
