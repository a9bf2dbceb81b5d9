package report

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"sort"
	"strings"
	"testing"
)

// jsonField is one field of a results type as encoding/json sees it.
type jsonField struct {
	t         reflect.Type
	omitEmpty bool
}

// fieldsOf lists the JSON fields of struct type t by key.
func fieldsOf(t reflect.Type) map[string]jsonField {
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	out := map[string]jsonField{}
	for i := 0; i < t.NumField(); i++ {
		f := t.Field(i)
		name, opts, _ := strings.Cut(f.Tag.Get("json"), ",")
		if !f.IsExported() || name == "-" {
			continue
		}
		out[name] = jsonField{f.Type, opts == "omitempty"}
	}
	return out
}

// deletion is one field deleted from a results file: where, and whether
// a run always writes it there (it must then be refused, named by path).
type deletion struct {
	path     string
	required bool
	data     []byte
}

// eachDeletion deletes, one at a time, every field of the first object
// found at each place of the sample (the first score, its first partial
// ROC entry, ...), and of the first unscored score, and says whether the
// rule of CheckShape makes it required: declared without omitempty,
// outside the recomputed sensitivity, and for an unscored score one of
// the fields the report reads of it.
func eachDeletion(t *testing.T, data []byte) []deletion {
	t.Helper()
	var out []deletion
	seen := map[string]bool{}
	var walk func(v any, path, pattern string, typ reflect.Type, unscored bool, del func(func()) []byte)
	walk = func(v any, path, pattern string, typ reflect.Type, unscored bool, del func(func()) []byte) {
		for typ != nil && typ.Kind() == reflect.Pointer {
			typ = typ.Elem()
		}
		switch x := v.(type) {
		case map[string]any:
			key := pattern
			if unscored {
				key += " (unscored)"
			}
			if seen[key] || typ == nil || typ.Kind() != reflect.Struct {
				return
			}
			seen[key] = true
			fields := fieldsOf(typ)
			keys := make([]string, 0, len(x))
			for k := range x {
				keys = append(keys, k)
			}
			sort.Strings(keys)
			for _, k := range keys {
				f, known := fields[k]
				if !known {
					continue
				}
				at := k
				if path != "" {
					at = path + "." + k
				}
				required := !f.omitEmpty && !strings.HasPrefix(at, "sensitivity") &&
					(!unscored || k == "model" || k == "extent" || k == "scored" || k == "area_km2")
				kept := x[k]
				b := del(func() { delete(x, k) })
				x[k] = kept
				out = append(out, deletion{at, required, b})
				if k != "sensitivity" {
					walk(x[k], at, pattern+"."+k, f.t, false, del)
				}
			}
		case []any:
			for i, e := range x {
				u := false
				if typ == reflect.TypeOf([]Score{}) {
					if m, ok := e.(map[string]any); ok && m["scored"] == false {
						u = true
					}
				}
				walk(e, fmt.Sprintf("%s[%d]", path, i), pattern+"[]", typ.Elem(), u, del)
			}
		}
	}
	var doc map[string]any
	if err := json.Unmarshal(data, &doc); err != nil {
		t.Fatal(err)
	}
	// Lists longer than 8 cut to their first two elements (and the first
	// unscored score), so that each of the few hundred files stays small.
	var shrink func(v any) any
	shrink = func(v any) any {
		switch x := v.(type) {
		case map[string]any:
			for k, e := range x {
				x[k] = shrink(e)
			}
		case []any:
			if len(x) <= 8 {
				// Short lists stay whole: fixed-size ones (the
				// geotransform, the preview's bounds) among them.
				for i := range x {
					x[i] = shrink(x[i])
				}
				return x
			}
			keep := x[:2]
			for _, e := range x[len(keep):] {
				if m, ok := e.(map[string]any); ok && m["scored"] == false {
					keep = append(keep, e)
					break
				}
			}
			for i := range keep {
				keep[i] = shrink(keep[i])
			}
			return keep
		}
		return v
	}
	shrink(doc)
	del := func(edit func()) []byte {
		edit()
		b, err := json.Marshal(doc)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	walk(doc, "", "", reflect.TypeOf(Results{}), false, del)
	return out
}

// TestMissingFieldRefused deletes each field of the sample results file in
// turn (every field of the first object at each place, and of an unscored
// score): reading the file must refuse every field a run always writes,
// naming the file, the field's JSON path and what to do, and let every
// optional one through.
func TestMissingFieldRefused(t *testing.T) {
	data, err := os.ReadFile(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Decode("sample/results.json", data); err != nil {
		t.Fatalf("the sample itself: %v", err)
	}
	dels := eachDeletion(t, data)
	nReq := 0
	for _, d := range dels {
		_, err := Decode("study/out/results.json", d.data)
		if !d.required {
			if err != nil && strings.Contains(err.Error(), "is missing") {
				t.Errorf("optional %s deleted: refused: %v", d.path, err)
			}
			continue
		}
		nReq++
		msg := fmt.Sprint(err)
		missing := d.path + " is missing"
		if d.path == "schema_version" {
			missing = "it has no schema_version"
		}
		for _, want := range []string{"study/out/results.json", missing, "a run always writes it", "restore it", "rerun areasweep run"} {
			if d.path == "schema_version" && (want == "a run always writes it" || want == "restore it" || want == "rerun areasweep run") {
				continue // named as not a results file at all
			}
			if !strings.Contains(msg, want) {
				t.Errorf("required %s deleted: %q lacks %q", d.path, msg, want)
				break
			}
		}
	}
	// Every top-level field without omitempty, and fields of each part.
	if nReq < 150 {
		t.Errorf("only %d required fields tried", nReq)
	}
}

// TestValidateEmptyLists: a results file with no model or no extent (the
// lists emptied by hand) is refused; a run always has both.
func TestValidateEmptyLists(t *testing.T) {
	for _, c := range []struct {
		name string
		edit func(r *Results)
		want string
	}{
		{"no models", func(r *Results) {
			r.Models, r.Scores, r.Rings, r.Curves, r.Paired, r.Omissions = nil, nil, nil, nil, nil, nil
		}, "models: the list is empty"},
		{"no extents", func(r *Results) {
			r.Extents, r.Scores, r.Rings, r.Curves, r.Paired, r.Preview = nil, nil, nil, nil, nil, nil
		}, "extents: the list is empty"},
	} {
		r := loadSample(t)
		c.edit(r)
		if err := Validate(r); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want %q", c.name, err, c.want)
		}
	}
}

// TestShortFixedList: a fixed-size list cut by hand (the geotransform's
// six numbers, the preview's four bounds) is refused naming it; decoding
// would fill the missing numbers with 0.
func TestShortFixedList(t *testing.T) {
	data, err := os.ReadFile(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	var doc map[string]any
	if err := json.Unmarshal(data, &doc); err != nil {
		t.Fatal(err)
	}
	grid := doc["grid"].(map[string]any)
	grid["geotransform"] = grid["geotransform"].([]any)[:5]
	b, _ := json.Marshal(doc)
	if _, err := Decode("r/results.json", b); err == nil || !strings.Contains(err.Error(), "grid.geotransform holds 5 values; a run writes 6 there") {
		t.Errorf("geotransform of 5: %v", err)
	}
	grid["geotransform"] = append(grid["geotransform"].([]any), 0.0, 0.0)
	b, _ = json.Marshal(doc)
	if _, err := Decode("r/results.json", b); err == nil || !strings.Contains(err.Error(), "grid.geotransform holds 7 values") {
		t.Errorf("geotransform of 7: %v", err)
	}
}
