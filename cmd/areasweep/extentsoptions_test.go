package main

import (
	"path/filepath"
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
