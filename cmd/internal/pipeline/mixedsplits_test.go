package pipeline

import (
	"fmt"
	"strings"
	"testing"

	"areasweep/metrics"
)

// TestMixedSplitsHint: a merge of shards of different runs says that a
// folder holds the partial files of several splits whenever one folder
// holds files of two shard counts, whatever field CheckShardSet names
// first. Two splits run into one folder with --force and other settings
// (iterations 50 with 2 shards, 60 with 3) were refused for their
// settings alone, without the hint; files of one count per folder get
// none.
func TestMixedSplitsHint(t *testing.T) {
	settings := func(c byte) string { return strings.Repeat(string(c), 64) }
	type file struct {
		path     string
		shard, n int
		settings string
		seed     uint64
	}
	for _, tc := range []struct {
		name  string
		files []file
		field string // what CheckShardSet names
		hint  string // "" when no hint is expected
	}{
		{"another count only", []file{{"sh/shard-1-of-2.aspf", 1, 2, settings('a'), 1}, {"sh/shard-1-of-3.aspf", 1, 3, settings('a'), 1}},
			"shard count (2 vs 3)", "sh holds the partial files of several splits: give the files of one, shard-*-of-2.aspf"},
		{"another count and other settings", []file{{"sh/shard-1-of-2.aspf", 1, 2, settings('a'), 1}, {"sh/shard-1-of-3.aspf", 1, 3, settings('b'), 1}},
			"differ in settings", "sh holds the partial files of several splits: give the files of one, shard-*-of-2.aspf"},
		{"another count and another seed", []file{{"sh/shard-1-of-2.aspf", 1, 2, settings('a'), 1}, {"sh/shard-2-of-2.aspf", 2, 2, settings('a'), 1}, {"sh/shard-1-of-3.aspf", 1, 3, settings('a'), 2}},
			"seed (1 vs 2)", "sh holds the partial files of several splits: give the files of one, shard-*-of-2.aspf"},
		{"other settings, one count per folder", []file{{"a/shard-1-of-2.aspf", 1, 2, settings('a'), 1}, {"b/shard-2-of-2.aspf", 2, 2, settings('b'), 1}},
			"differ in settings", ""},
		{"other counts in two folders", []file{{"a/shard-1-of-2.aspf", 1, 2, settings('a'), 1}, {"b/shard-1-of-3.aspf", 1, 3, settings('a'), 1}},
			"shard count (2 vs 3)", ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var files []string
			var headers []metrics.ShardHeader
			for _, f := range tc.files {
				files = append(files, f.path)
				headers = append(headers, metrics.ShardHeader{Format: metrics.PartialFormatVersion, Tool: "test", Settings: f.settings, Seed: f.seed, Shard: f.shard, Shards: f.n, Source: f.path})
			}
			err := metrics.CheckShardSet(headers)
			if err == nil || !strings.Contains(err.Error(), tc.field) {
				t.Fatalf("CheckShardSet: %v, want it to name %q", err, tc.field)
			}
			mixedSplits(err, files, headers)
			msg := fmt.Sprint(err)
			if tc.hint == "" && strings.Contains(msg, "several splits") {
				t.Errorf("hint given for one count per folder: %s", msg)
			}
			if tc.hint != "" && !strings.Contains(msg, tc.hint) {
				t.Errorf("got %s\nwant it to hold %q", msg, tc.hint)
			}
		})
	}
}
