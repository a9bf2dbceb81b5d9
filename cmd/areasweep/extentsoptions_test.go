package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestBufferBeyondEarth: a buffer distance beyond 20,004 km (half the
// WGS84 meridian, 20,003.93 km from pole to pole by pyproj's
// Geod(ellps="WGS84").inv(0, 90, 0, -90), rounded up: no two places lie
// farther apart) is refused (exit 2), naming the flag, or the study
// file's key it came from. It was accepted: the member took every cell
// (or none) and 1e300 made an id of 300 digits; metres given as km look
// like this. 20004 itself still runs.
func TestBufferBeyondEarth(t *testing.T) {
	f := &badFixture{smallStudy: newSmallStudy(t), outs: t.TempDir()}
	words := func(flag string) []string {
		return []string{flag + " value", "no two places on Earth lie more than 20004 km apart", "give distances in km"}
	}
	ext := func(extra ...string) []string { return append([]string{"extents"}, f.run(extra...)[1:]...) }
	study := f.file("big.yaml", "region-buffers: [100, 50000]\n")
	runBadCasesH26(t, f, []badCase{
		{name: "region buffer 1e300", args: ext("--region-buffers=1e300"), code: 2, words: words("--region-buffers")},
		{name: "region buffer -30000", args: ext("--region-buffers=-30000,100"), code: 2, words: words("--region-buffers")},
		{name: "point buffer 50000 (metres)", args: f.run("--point-buffers", "50000"), code: 2, words: words("--point-buffers")},
		{name: "hull buffer 20004.5", args: ext("--hull-buffers", "0,20004.5"), code: 2, words: words("--hull-buffers")},
		{name: "from the study file", args: []string{"extents", "--study", study, "--model", "m=" + f.model, "--occurrences", f.occ, "--region", f.region}, code: 2, words: append(words("--region-buffers"), "study file "+study+", key region-buffers")},
	})
	out := filepath.Join(f.outs, "edge")
	if _, se, code := runBin(t, append(ext("--region-buffers=20004", "--hull-buffers", "0,20004"), "--out", out, "--quiet")...); code != 0 {
		t.Fatalf("20004 km: exit %d: %s", code, se)
	}
}

// TestExtentsNamesScoringFlags: scoring flags typed for extents (accepted
// so that a run's command line works) get one line on standard error
// naming them as checked but not used; family flags, a study file's
// scoring keys and --quiet get none. Before, they were taken silently, so
// a user could expect --iterations or --e to change what extents wrote.
func TestExtentsNamesScoringFlags(t *testing.T) {
	f := &badFixture{smallStudy: newSmallStudy(t), outs: t.TempDir()}
	base := []string{"extents", "--model", "m=" + f.model, "--occurrences", f.occ, "--region", f.region, "--region-buffers=-40,60"}
	study := f.file("s.yaml", "iterations: 50\n")
	const note = "scoring flags are checked but not used"
	for _, c := range []struct {
		name  string
		extra []string
		want  string // "" for no note
	}{
		{"two scoring flags", []string{"--iterations", "50", "--e", "0.1"}, "(they take effect in 'areasweep run'): --e, --iterations"},
		{"family flags only", []string{"--point-buffers", "40"}, ""},
		{"scoring key of a study file", []string{"--study", study}, ""},
		{"quiet", []string{"--iterations", "50", "--quiet"}, ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			out := filepath.Join(f.outs, strings.ReplaceAll(c.name, " ", "_"))
			_, se, code := runBin(t, append(append(append([]string{}, base...), c.extra...), "--out", out)...)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, se)
			}
			if got := strings.Count(se, note); c.want == "" && got != 0 || c.want != "" && (got != 1 || !strings.Contains(se, c.want)) {
				t.Errorf("standard error %q: want note %q (empty: none)", se, c.want)
			}
		})
	}
}
