package report

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestCheckShape: the sample results file passes; each hand edit that
// decoding alone would accept silently, or report without its place, is
// refused naming the field's path.
func TestCheckShape(t *testing.T) {
	data, err := os.ReadFile(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := CheckShape(data); err != nil {
		t.Fatalf("sample: %v", err)
	}
	// An unscored entry may lack its scores (the sample with its first
	// score replaced).
	withScore := func(score string) []byte {
		var top map[string]json.RawMessage
		if err := json.Unmarshal(data, &top); err != nil {
			t.Fatal(err)
		}
		top["scores"] = json.RawMessage("[" + score + "]")
		b, err := json.Marshal(top)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	if err := CheckShape(withScore(`{"model": "m", "extent": "e", "scored": false, "not_scored": "no test points inside this extent", "area_km2": 0}`)); err != nil {
		t.Errorf("unscored entry without scores: %v", err)
	}
	if err := CheckShape(withScore(`{"model": "m", "extent": "base", "scored": true, "cells": 4, "area_km2": 1, "test_points": 3, "train_points": 3, "test_points_outside": 0, "train_points_outside": 0, "auc_unweighted": 0.7, "auc_train": 0.7, "auc_se": 0.01, "auc_unweighted_se_delong": 0.01, "auc_boot_sd": 0.01, "test_point_ids": [], "placements": [], "placements_unweighted": [], "partial_roc": [], "thresholds": [], "boyce": null}`)); err == nil || !strings.Contains(err.Error(), "scores[0].auc is missing (model m, extent base)") {
		t.Errorf("scored entry without auc: %v", err)
	}
	for _, c := range []struct {
		name, text, want string
		top              bool
	}{
		{"twice", `{"schema_version": 6, "seed": 1, "seed": 2}`, "seed", false},
		{"wrong kind", `{"schema_version": 6, "scores": [{"auc": "0.8"}]}`, "scores[0].auc", false},
		{"null", `{"schema_version": 6, "scores": [{"auc": null}]}`, "scores[0].auc", false},
		{"nan", `{"schema_version": 6, "scores": [{"auc": NaN}]}`, "JSON has no NaN", false},
		{"trailing", `{"schema_version": 6} {}`, "more JSON follows", false},
		{"deep", `{"schema_version": 6, "x_note": ` + strings.Repeat("[", 40) + strings.Repeat("]", 40) + `}`, "nested more than", false},
		{"array", `[1, 2]`, "the top level", true},
		{"scored without its counts", `{"schema_version": 6, "scores": [{"model": "m", "extent": "base", "scored": true, "auc_unweighted": 0.7, "auc_se": 0.01, "cells": 4, "area_km2": 1, "test_points": 3, "train_points": 3}]}`,
			"scores[0].test_points_outside is missing (model m, extent base)", false},
		{"missing at the top level", `{"schema_version": 6}`, "software is missing", false},
	} {
		err := CheckShape([]byte(c.text))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want %q", c.name, err, c.want)
			continue
		}
		if IsTopLevelShapeError(err) != c.top {
			t.Errorf("%s: top level %v, want %v (%v)", c.name, !c.top, c.top, err)
		}
	}
}

// TestLargestSeed: a run takes --seed up to 2^64 - 1 and writes it in
// results.json, whose seed is a uint64; the shape check parsed whole
// numbers as int64, so `areasweep report` refused the run's own file
// ("seed holds 18446744073709551615; a run writes a whole number there").
// The largest seed passes; one past it, a negative seed and a fraction are
// still refused.
func TestLargestSeed(t *testing.T) {
	data, err := os.ReadFile(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	withSeed := func(seed string) []byte {
		var top map[string]json.RawMessage
		if err := json.Unmarshal(data, &top); err != nil {
			t.Fatal(err)
		}
		top["seed"] = json.RawMessage(seed)
		b, err := json.Marshal(top)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	r, err := Decode("results.json", withSeed("18446744073709551615"))
	if err != nil {
		t.Fatalf("seed 2^64 - 1: %v", err)
	}
	if r.Seed != math.MaxUint64 {
		t.Errorf("seed %d, want 2^64 - 1", r.Seed)
	}
	for _, seed := range []string{"18446744073709551616", "-1", "1.5"} {
		if _, err := Decode("results.json", withSeed(seed)); err == nil || !strings.Contains(err.Error(), "seed") {
			t.Errorf("seed %s: %v, want it refused naming seed", seed, err)
		}
	}
}
