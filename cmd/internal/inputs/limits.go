package inputs

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"unicode/utf8"
)

// Size limits of the text inputs. They are far above any real table or
// study file and exist so that a wrong path (a device, a multi-gigabyte
// file) is refused with a message instead of filling the memory.
const (
	// MaxOccurrenceBytes is the largest occurrence table read (512 MiB).
	MaxOccurrenceBytes = 512 << 20
	// MaxLineBytes is the longest line of an occurrence table (1 MiB).
	MaxLineBytes = 1 << 20
	// MaxStudyBytes is the largest study file read (1 MiB).
	MaxStudyBytes = 1 << 20
	// MaxShownChars is how much of a cell an error message quotes.
	MaxShownChars = 60
)

// ErrTooLarge: a text input is larger than its limit, or has a line longer
// than MaxLineBytes.
var ErrTooLarge = errors.New("inputs: text input too large")

// lineTooLong is the error of a line longer than its limit, with the
// line's number, so that the message names the file and the line once
// (the caller's error names the file).
type lineTooLong struct {
	line    int
	maxLine int64
}

func (e *lineTooLong) Error() string {
	return fmt.Sprintf("%v: the line is longer than %d KiB; is this the right file (a text table with one record per line)?", ErrTooLarge, e.maxLine>>10)
}

// Unwrap lets errors.Is find ErrTooLarge.
func (e *lineTooLong) Unwrap() error { return ErrTooLarge }

// tooLongLine returns the number of the line err says is too long, or 0.
func tooLongLine(err error) int {
	var l *lineTooLong
	if errors.As(err, &l) {
		return l.line
	}
	return 0
}

// limitedReader returns ErrTooLarge-wrapping errors once more than max
// bytes in total, or more than maxLine bytes without a line break, have
// been read. It counts lines so the error can name one. Its errors do
// not name the file: the caller's error does.
type limitedReader struct {
	r             io.Reader
	max, maxLine  int64
	n, sinceBreak int64
	line          int
}

func newLimitedReader(r io.Reader, max, maxLine int64) *limitedReader {
	return &limitedReader{r: r, max: max, maxLine: maxLine, line: 1}
}

func (l *limitedReader) Read(p []byte) (int, error) {
	n, err := l.r.Read(p)
	for _, c := range p[:n] {
		l.n++
		l.sinceBreak++
		if c == '\n' {
			l.line++
			l.sinceBreak = 0
		}
		if l.n > l.max {
			return 0, fmt.Errorf("%w: the file is larger than %d MiB; is this the right file?", ErrTooLarge, l.max>>20)
		}
		if l.maxLine > 0 && l.sinceBreak > l.maxLine {
			return 0, &lineTooLong{line: l.line, maxLine: l.maxLine}
		}
	}
	return n, err
}

// checkRegular refuses paths that are not regular files (devices, fifos
// and directories), since they have no end or no text.
func checkRegular(path, what string) error {
	st, err := os.Stat(path)
	if err != nil {
		return nil // the open that follows reports it
	}
	if st.IsDir() {
		return fmt.Errorf("inputs: %s %s is a directory, not a file; give the path of the file itself", what, path)
	}
	if !st.Mode().IsRegular() && st.Mode()&os.ModeNamedPipe == 0 {
		return fmt.Errorf("inputs: %s %s is not a regular file (it is a device or socket); give the path of a text file", what, path)
	}
	return nil
}

// shown returns s for an error message: quoted, and cut to MaxShownChars
// characters with the full length said when longer.
func shown(s string) string {
	r := []rune(s)
	if len(r) <= MaxShownChars {
		return fmt.Sprintf("%q", s)
	}
	return fmt.Sprintf("%q... (%d characters)", string(r[:MaxShownChars]), len(r))
}

// notUTF8 returns the line of the first byte of data that is not UTF-8
// text and what to say about it, or 0 and "" when data is UTF-8 (a UTF-8
// byte-order mark allowed). A UTF-16 file is named as such; another byte
// is most likely Latin-1 or Windows-1252, as older editors save.
func notUTF8(data []byte) (int, string) {
	if len(data) >= 2 && ((data[0] == 0xFF && data[1] == 0xFE) || (data[0] == 0xFE && data[1] == 0xFF)) {
		return 1, "it is UTF-16 text (it starts with a UTF-16 byte-order mark); save it as UTF-8"
	}
	if i := bytes.IndexByte(data, 0); i >= 0 {
		// A raster or a GeoPackage given as text: its bytes are no
		// accented letters, as the message below would say.
		return 1 + bytes.Count(data[:i], []byte("\n")), "it holds NUL bytes, so it is not text: a binary file (a raster, a GeoPackage, ...) or UTF-16 text without a byte-order mark; give the text file, saved as UTF-8"
	}
	if utf8.Valid(data) {
		return 0, ""
	}
	line := 1
	for len(data) > 0 {
		r, n := utf8.DecodeRune(data)
		if r == utf8.RuneError && n <= 1 {
			return line, fmt.Sprintf("the byte 0x%02X is not UTF-8 text (it is likely Latin-1 or Windows-1252, e.g. an accented letter); save the file as UTF-8", data[0])
		}
		if r == '\n' {
			line++
		}
		data = data[n:]
	}
	return 0, ""
}
