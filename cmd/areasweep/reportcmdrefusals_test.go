package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"areasweep/report"
)

// deleteField returns the JSON of doc with the field at path removed;
// path is a list of keys and list indices.
func deleteField(t *testing.T, data []byte, path ...any) []byte {
	t.Helper()
	var doc any
	if err := json.Unmarshal(data, &doc); err != nil {
		t.Fatal(err)
	}
	v := doc
	for i, p := range path {
		switch k := p.(type) {
		case string:
			m := v.(map[string]any)
			if i == len(path)-1 {
				if _, ok := m[k]; !ok {
					t.Fatalf("the run's results.json has no %v", path)
				}
				delete(m, k)
			}
			v = m[k]
		case int:
			v = v.([]any)[k]
		}
	}
	b, err := json.MarshalIndent(doc, "", "  ")
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestReportRefusesDeletedFields: a real run's results.json with one
// field deleted (each required top-level field, and nested ones) is
// refused by `areasweep report` with exit 2, naming the file, the
// field's JSON path and what to do, and nothing in the folder changes.
// An optional field (an input's sidecars, the preview, the recomputed
// sensitivity analysis) may be deleted.
func TestReportRefusesDeletedFields(t *testing.T) {
	s := newSmallStudy(t)
	out := filepath.Join(t.TempDir(), "res")
	if _, se, code := runBin(t, s.args(out)...); code != 0 {
		t.Fatalf("run: exit %d: %s", code, se)
	}
	resPath := filepath.Join(out, "results.json")
	good, err := os.ReadFile(resPath)
	if err != nil {
		t.Fatal(err)
	}
	var top map[string]json.RawMessage
	json.Unmarshal(good, &top)
	type cut struct {
		path []any
		want string // "" when the field is optional
	}
	var cuts []cut
	rt := reflect.TypeFor[report.Results]()
	for i := 0; i < rt.NumField(); i++ {
		name, opts, _ := strings.Cut(rt.Field(i).Tag.Get("json"), ",")
		if opts == "omitempty" || name == "schema_version" {
			continue
		}
		cuts = append(cuts, cut{[]any{name}, name + " is missing"})
	}
	if len(cuts) < 15 {
		t.Fatalf("only %d required top-level fields", len(cuts))
	}
	cuts = append(cuts,
		cut{[]any{"schema_version"}, "it has no schema_version"},
		cut{[]any{"settings", "iterations"}, "settings.iterations is missing"},
		cut{[]any{"grid", "width"}, "grid.width is missing"},
		cut{[]any{"models", 1, "value_max"}, "models[1].value_max is missing"},
		cut{[]any{"extents", 2, "area_km2"}, "extents[2].area_km2 is missing"},
		cut{[]any{"scores", 5, "auc"}, "scores[5].auc is missing (model m, extent "},
		cut{[]any{"scores", 3, "partial_roc", 1, "ratio"}, "scores[3].partial_roc[1].ratio is missing"},
		cut{[]any{"points", 0, "lat"}, "points[0].lat is missing"},
		cut{[]any{"paired", 4, "diff"}, "paired[4].diff is missing"},
		cut{[]any{"rings", 0, "auc_ring"}, "rings[0].auc_ring is missing"},
		cut{[]any{"curves", 0, "y"}, "curves[0].y is missing"},
		cut{[]any{"preview", "masks"}, "preview.masks is missing"},
		// Optional: written only when there is something to write, or
		// recomputed by the report.
		cut{[]any{"preview"}, ""},
		cut{[]any{"sensitivity"}, ""},
		cut{[]any{"sensitivity", "verdicts"}, ""},
	)
	for _, c := range cuts {
		t.Run(fmtPath(c.path), func(t *testing.T) {
			dir := filepath.Join(t.TempDir(), "res")
			os.Mkdir(dir, 0o755)
			p := filepath.Join(dir, "results.json")
			os.WriteFile(p, deleteField(t, good, c.path...), 0o644)
			before := treeSums(t, dir)
			_, se, code := runBin(t, "report", dir, "--force", "--quiet")
			if c.want == "" {
				if code != 0 {
					t.Errorf("optional field deleted: exit %d: %s", code, se)
				}
				return
			}
			if code != 2 {
				t.Errorf("exit %d, want 2; stderr %s", code, se)
			}
			for _, w := range []string{p, c.want} {
				if !strings.Contains(se, w) {
					t.Errorf("stderr %q lacks %q", se, w)
				}
			}
			if c.path[0] != "schema_version" && !strings.Contains(se, "rerun areasweep run") {
				t.Errorf("stderr %q does not say what to do", se)
			}
			if forbidden.MatchString(se) {
				t.Errorf("raw message in stderr: %s", se)
			}
			if !sameSums(before, treeSums(t, dir)) {
				t.Error("the folder changed after a refusal")
			}
		})
	}
}

// fmtPath writes a field path as keys and indices.
func fmtPath(path []any) string {
	b, _ := json.Marshal(path)
	return strings.NewReplacer(`"`, "", ",", " ").Replace(string(b))
}

// TestReportQuiet: `report` logs its steps on standard error as `run`
// does, and --quiet drops them; the report's path is still printed.
func TestReportQuiet(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "results.json"), []byte(sampleResults(t)), 0o644)
	so, se, code := runBin(t, "report", dir)
	if code != 0 || !strings.Contains(se, "report written in") || !strings.Contains(so, "report.html") {
		t.Fatalf("report: exit %d, stdout %q, stderr %q", code, so, se)
	}
	so, se, code = runBin(t, "report", dir, "--force", "--quiet")
	if code != 0 || se != "" || !strings.Contains(so, "report.html") {
		t.Errorf("report --quiet: exit %d, stdout %q, stderr %q (want none)", code, so, se)
	}
}

// TestReportFolderInTheWay: a folder where the report writes a file
// (report.html, methods.md, a figure) is refused with exit 2 before
// anything is moved, naming it (the move used to stop half-way with the
// system's "file exists", exit 1, some figures already replaced).
func TestReportFolderInTheWay(t *testing.T) {
	for _, name := range []string{"report.html", "methods.md", filepath.Join("figures", "metrics_vs_area.svg")} {
		t.Run(name, func(t *testing.T) {
			dir := t.TempDir()
			os.WriteFile(filepath.Join(dir, "results.json"), []byte(sampleResults(t)), 0o644)
			if code := Main([]string{"report", dir, "--quiet"}, nil, &strings.Builder{}, &strings.Builder{}); code != 0 {
				t.Fatalf("first report: exit %d", code)
			}
			p := filepath.Join(dir, name)
			os.Remove(p)
			if err := os.MkdirAll(filepath.Join(p, "mine"), 0o755); err != nil {
				t.Fatal(err)
			}
			before := treeSums(t, dir)
			_, se, code := runBin(t, "report", dir, "--force", "--quiet")
			if code != 2 || !strings.Contains(se, p+" is a folder") || !strings.Contains(se, "move it out of the way") || strings.Contains(se, "file exists") {
				t.Errorf("exit %d, want 2 naming %s: %s", code, p, se)
			}
			if !sameSums(before, treeSums(t, dir)) {
				t.Error("the folder changed after the refusal")
			}
			if l := leftovers(dir); len(l) > 0 {
				t.Errorf("left behind: %v", l)
			}
		})
	}
}

// TestReportEmptyResults: an empty results.json is named as empty.
func TestReportEmptyResults(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "results.json"), nil, 0o644)
	_, se, code := runBin(t, "report", dir)
	if code != 2 || !strings.Contains(se, "results.json is empty") {
		t.Errorf("exit %d, want 2 saying the file is empty: %s", code, se)
	}
}
