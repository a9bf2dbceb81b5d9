package pipeline

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestShardGivenTwice: a partial file named twice, by its folder and its
// path or by one of them twice, is refused as one file given twice (the
// check of the shard set said "X and X are both shard 1"); two files, or
// a file and its folder's other file, are not.
func TestShardGivenTwice(t *testing.T) {
	dir := t.TempDir()
	a := filepath.Join(dir, "s1", "shard-1-of-2.aspf")
	b := filepath.Join(dir, "s2", "shard-2-of-2.aspf")
	for _, f := range []string{a, b} {
		os.MkdirAll(filepath.Dir(f), 0o755)
		os.WriteFile(f, []byte("x"), 0o644)
	}
	link := filepath.Join(dir, "link.aspf")
	os.Symlink(a, link)
	for _, tc := range []struct {
		name string
		args []string
		want string // "" for no error
	}{
		{"folder and its file", []string{filepath.Dir(a), a, b}, "partial file " + a + " is given twice (its folder or its path given twice)"},
		{"folder twice", []string{filepath.Dir(a), filepath.Dir(a), b}, "is given twice (its folder or its path given twice)"},
		{"other spelling", []string{a, filepath.Join(dir, "s1", ".", "shard-1-of-2.aspf"), b}, "is given twice"},
		{"a link to it", []string{a, link, b}, "is given twice (as " + a + " and as " + link + ")"},
		{"two files", []string{a, b}, ""},
		{"two folders", []string{filepath.Dir(a), filepath.Dir(b)}, ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := shardPaths(tc.args)
			if tc.want == "" {
				if err != nil {
					t.Fatal(err)
				}
				return
			}
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("got %v, want %q", err, tc.want)
			}
		})
	}
}
