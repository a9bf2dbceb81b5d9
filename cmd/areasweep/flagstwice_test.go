package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestFileFlagGivenTwice: a flag of one value (an input file, --out,
// --study, the ecoregion field) given twice with two values is refused,
// naming both; only the last was used, and the other file left out
// without a word (two --occurrences files do not make one table, two
// --region layers do not make one region). The same value twice still
// runs, and a list flag still appends. Nothing is written.
func TestFileFlagGivenTwice(t *testing.T) {
	s := newSmallStudy(t)
	dir := t.TempDir()
	other := filepath.Join(dir, "other.csv")
	cases := []struct {
		name  string
		extra []string
		want  string
	}{
		{"occurrences", []string{"--occurrences", other}, `--occurrences is given twice ("` + s.occ + `", then "` + other + `")`},
		{"region", []string{"--region", filepath.Join(dir, "b.gpkg")}, "--region is given twice"},
		{"out", []string{"--out", filepath.Join(dir, "b")}, "--out is given twice"},
		{"study", []string{"--study", "a.yaml", "--study", "b.yaml"}, `--study is given twice ("a.yaml", then "b.yaml")`},
		{"ecoregion field", []string{"--ecoregion-field", "a", "--ecoregion-field", "b"}, "--ecoregion-field is given twice"},
	}
	for _, c := range cases {
		for _, cmd := range []string{"run", "extents"} {
			out := filepath.Join(dir, cmd+"-"+strings.ReplaceAll(c.name, " ", "_"))
			args := s.args(out)
			args[0] = cmd
			args = append(args, c.extra...)
			var so, se strings.Builder
			code := Main(args, nil, &so, &se)
			msg := se.String()
			if code != 2 || !strings.Contains(msg, c.want) || !strings.Contains(msg, "give it once") || strings.Contains(msg, "invalid argument") {
				t.Errorf("%s, %s twice: exit %d: %s", cmd, c.name, code, msg)
			}
			if _, err := os.Stat(out); err == nil {
				t.Errorf("%s, %s twice: %s was created", cmd, c.name, out)
			}
		}
	}
	out := filepath.Join(dir, "same")
	args := append(s.args(out), "--region", s.region, "--occurrences", s.occ, "--quiet")
	args[0] = "extents"
	if _, se, code := runBin(t, args...); code != 0 {
		t.Fatalf("the same value twice: exit %d: %s", code, se)
	}
}

// TestLongFlagValueCut: a flag value of 100,000 characters is shown
// by its first 60 and its length; pflag's message quoted it in full
// (twice: 200 kB on the terminal). The message stays in our words.
func TestLongFlagValueCut(t *testing.T) {
	long := strings.Repeat("9", 100000)
	for _, args := range [][]string{
		{"run", "--seed", long},
		{"run", "--iterations", long},
		{"extents", "--fraction", long},
		{"run", "--region-buffers=" + long},
		{"run", "--out", long, "--out", "b"},
	} {
		var so, se strings.Builder
		code := Main(args, nil, &so, &se)
		msg := se.String()
		if code != 2 || len(msg) > 600 || !strings.Contains(msg, " (100000 characters)") || strings.Contains(msg, "strconv") {
			t.Errorf("%s %s: exit %d, %d bytes: %.400s", args[0], args[1], code, len(msg), msg)
		}
	}
}

// TestShardAndMergeFlagsGivenTwice: --shard of run and --out of merge
// given twice with two values are refused as the file flags are (only the
// last was used: "--shard 1/3 --shard 2/3" wrote shard 2 alone, "merge
// --out a --out b" wrote into b). The same value twice still runs.
// Nothing is written.
func TestShardAndMergeFlagsGivenTwice(t *testing.T) {
	s := newSmallStudy(t)
	dir := t.TempDir()
	shardOut := filepath.Join(dir, "shard")
	mergeA, mergeB := filepath.Join(dir, "a"), filepath.Join(dir, "b")
	for _, c := range []struct {
		args []string
		want string
	}{
		{append(s.args(shardOut), "--shard", "1/3", "--shard", "2/3"), `--shard is given twice ("1/3", then "2/3"); only one is used: give it once`},
		{[]string{"merge", "--out", mergeA, "--out", mergeB, dir}, `--out is given twice ("` + mergeA + `", then "` + mergeB + `"); only one is used: give it once`},
	} {
		var so, se strings.Builder
		code := Main(c.args, nil, &so, &se)
		if msg := se.String(); code != 2 || !strings.Contains(msg, c.want) || strings.Contains(msg, "invalid argument") {
			t.Errorf("%v: exit %d: %s", c.args, code, msg)
		}
	}
	for _, p := range []string{shardOut, mergeA, mergeB} {
		if _, err := os.Stat(p); err == nil {
			t.Errorf("%s was created", p)
		}
	}
	args := append(s.args(shardOut), "--shard", "1/3", "--shard", "1/3")
	if _, se, code := runBin(t, args...); code != 0 {
		t.Fatalf("the same --shard twice: exit %d: %s", code, se)
	}
}
