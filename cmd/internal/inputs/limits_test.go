package inputs

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestTooLargeNamesFileOnce: a text input over its size limit, or an
// occurrence table with a line over MaxLineBytes, is refused naming the
// file once and the line too long (the message said "occ.csv: text input
// too large: occ.csv line 3 is longer than 1024 KiB", the file twice).
// The line is the physical line, with line feeds, carriage returns and
// line feeds, or carriage returns alone. A header line over the limit is
// refused as such (its first MiB was read as the header, which then had
// "no longitude/latitude columns").
func TestTooLargeNamesFileOnce(t *testing.T) {
	long := strings.Repeat("x", MaxLineBytes+1)
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	cases := []struct {
		name string
		read func() error
		file string
		want string
	}{
		{"occurrences, line feeds", func() error {
			_, err := ParseOccurrences(strings.NewReader("lon,lat,role\n1,2,train\n1,2,"+long+"\n"), "occ.csv", true)
			return err
		}, "occ.csv", "occ.csv line 3: text input too large: the line is longer than 1024 KiB"},
		{"occurrences, carriage returns alone", func() error {
			_, err := ParseOccurrences(strings.NewReader("lon,lat,role\r1,2,train\r1,2,test\r"+long+"\r"), "occ.csv", true)
			return err
		}, "occ.csv", "occ.csv line 4: text input too large: the line is longer than 1024 KiB"},
		{"occurrences, long header", func() error {
			_, err := ParseOccurrences(strings.NewReader(long+"\n1,2,train\n"), "occ.csv", true)
			return err
		}, "occ.csv", "occ.csv line 1: text input too large: the line is longer than 1024 KiB"},
		{"study file", func() error {
			_, err := LoadStudy(write("big.yaml", "# "+strings.Repeat("x", MaxStudyBytes)+"\n"))
			return err
		}, "big.yaml", "big.yaml: text input too large: the file is larger than 1 MiB"},
		{"study table", func() error {
			_, err := LoadBatch(write("big.csv", "# "+strings.Repeat("x", 16*MaxStudyBytes)+"\n"))
			return err
		}, "big.csv", "big.csv: text input too large: the file is larger than 16 MiB"},
	}
	for _, c := range cases {
		err := c.read()
		if err == nil || !errors.Is(err, ErrTooLarge) {
			t.Errorf("%s: %v, want ErrTooLarge", c.name, err)
			continue
		}
		msg := err.Error()
		if !strings.Contains(msg, c.want) || strings.Count(msg, c.file) != 1 {
			t.Errorf("%s: %q, want %q with the file named once", c.name, msg, c.want)
		}
	}
}
