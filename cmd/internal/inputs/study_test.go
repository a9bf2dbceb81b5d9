package inputs

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"areasweep/cmd/internal/settings"
)

// All expected values in this file are by construction: each study file is
// written in the test and the expected settings are read off it by hand.

// fullStudy uses every key once, with relative and absolute paths.
const fullStudy = `# a complete study
model:
  - gbm=models/gbm.tif
  - glm=/abs/glm.tif
null:
  - effort=effort.tif
no-distance-null: false
occurrences: occ/points.csv
occurrences-crs: EPSG:32633
region: region.gpkg
ecoregions: ../shared/ecoregions.gpkg
ecoregion-field: ECO_NAME
ecoregion-min-points: 3
ecoregion-clip: true
extra:
  - mask=masks/mask.gpkg
region-buffers: [10, 25.5, 50]
point-buffers: [5]
point-buffers-all: false
hull-buffers: []
e: [5, 10]
iterations: 1000
fraction: 0.5
thresholds: [0, 0.1]
seed: 18446744073709551615
out: results
no-thin: true
membership-tif: false
tolerance-auc: 0.03
tolerance-partial-roc: 0.1
tolerance-omission: 0.04
tolerance-boyce: 0.2
`

func fullStudyWant(dir string) *Study {
	j := func(p string) string { return filepath.Join(dir, p) }
	return &Study{
		"model":                []string{"gbm=" + j("models/gbm.tif"), "glm=/abs/glm.tif"},
		"null":                 []string{"effort=" + j("effort.tif")},
		"no-distance-null":     false,
		"occurrences":          j("occ/points.csv"),
		"occurrences-crs":      "EPSG:32633",
		"region":               j("region.gpkg"),
		"ecoregions":           j("../shared/ecoregions.gpkg"),
		"ecoregion-field":      "ECO_NAME",
		"ecoregion-min-points": 3,
		"ecoregion-clip":       true,
		"extra":                []string{"mask=" + j("masks/mask.gpkg")},
		"region-buffers":       []float64{10, 25.5, 50},
		"point-buffers":        []float64{5},
		"point-buffers-all":    false,
		"hull-buffers":         []float64{},
		"e":                    []float64{5, 10},
		"iterations":           1000,
		"fraction":             0.5,
		"thresholds":           []float64{0, 0.1},
		"seed":                 uint64(18446744073709551615),
		"out":                  j("results"),
		"no-thin":              true,
		"membership-tif":       false,

		"tolerance-auc":         0.03,
		"tolerance-partial-roc": 0.1,
		"tolerance-omission":    0.04,
		"tolerance-boyce":       0.2,
	}
}

func TestParseStudy(t *testing.T) {
	cases := []struct {
		name string
		in   string
		dir  string
		want *Study
	}{
		{"full", fullStudy, "/base/study", fullStudyWant("/base/study")},
		{"no base dir keeps paths relative", fullStudy, "", fullStudyWant("")},
		{"empty file", "", "/b", &Study{}},
		{"comments only", "# nothing yet\n", "/b", &Study{}},
		{"null document", "~\n", "/b", &Study{}},
		{"null values are absent", "iterations:\nregion: ~\nmodel: null\n", "/b", &Study{}},
		{"model as mapping keeps order", "model:\n  zeta: z.tif\n  alpha: a.tif\n", "/b",
			&Study{"model": []string{"zeta=/b/z.tif", "alpha=/b/a.tif"}}},
		{"model as single text", "model: rf=rf.tif\n", "/b", &Study{"model": []string{"rf=/b/rf.tif"}}},
		{"model spaces around =", "model: [\" rf = rf.tif \"]\n", "/b", &Study{"model": []string{"rf=/b/rf.tif"}}},
		{"float list as text", "region-buffers: \"10, 20,30\"\n", "/b", &Study{"region-buffers": []float64{10, 20, 30}}},
		{"float list as single number", "e: 5\n", "/b", &Study{"e": []float64{5}}},
		{"float list empty text", "thresholds: \"\"\n", "/b", &Study{"thresholds": []float64{}}},
		{"flow list with negative and exponent", "thresholds: [-1, 1e-3]\n", "/b", &Study{"thresholds": []float64{-1, 0.001}}},
		{"whole float for int", "iterations: 1e3\n", "/b", &Study{"iterations": 1000}},
		{"int for float", "fraction: 1\n", "/b", &Study{"fraction": 1.0}},
		{"url and vsi paths unchanged", "region: https://example.org/r.gpkg\necoregions: /vsizip/e.zip/e.shp\n", "/b",
			&Study{"region": "https://example.org/r.gpkg", "ecoregions": "/vsizip/e.zip/e.shp"}},
		{"anchor and alias", "e: &l [1, 2]\nthresholds: *l\n", "/b", &Study{"e": []float64{1, 2}, "thresholds": []float64{1, 2}}},
		{"numeric text for string key", "ecoregion-field: 12\n", "/b", &Study{"ecoregion-field": "12"}},
		{"document start marker", "---\nseed: 0\n", "/b", &Study{"seed": uint64(0)}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ParseStudy(strings.NewReader(tc.in), "study.yaml", tc.dir)
			if err != nil {
				t.Fatalf("unexpected error: %v", err)
			}
			if !reflect.DeepEqual(got, tc.want) {
				t.Fatalf("study\n got %s\nwant %s", dump(got), dump(tc.want))
			}
		})
	}
}

// dump prints a study's settings in table order for failure messages.
func dump(s *Study) string {
	var b strings.Builder
	for _, k := range StudyKeys() {
		if v, ok := (*s)[k]; ok {
			fmt.Fprintf(&b, "%s=%v ", k, v)
		}
	}
	return b.String()
}

func TestParseStudyErrors(t *testing.T) {
	cases := []struct {
		name     string
		in       string
		is       error
		line     int
		key      string
		contains []string
	}{
		{"unknown key", "iterations: 10\nregion_buffers: [1]\n", ErrUnknownKey, 2, "region_buffers",
			[]string{`did you mean "region-buffers"?`, "allowed keys are model, occurrences,", "membership-tif"}},
		{"unknown key typo", "\n\niteration: 10\n", ErrUnknownKey, 3, "iteration", []string{`did you mean "iterations"?`}},
		{"unknown key no suggestion", "colour: red\n", ErrUnknownKey, 1, "colour", []string{"allowed keys are"}},
		{"unknown key case", "Seed: 1\n", ErrUnknownKey, 1, "Seed", []string{`did you mean "seed"?`}},
		{"duplicate key", "seed: 1\nout: o\nseed: 2\n", ErrDuplicateKey, 3, "seed", []string{"already given at line 1"}},
		{"model name twice in a mapping", "model:\n  good: a.tif\n  good: b.tif\n", ErrBadValue, 3, "model", []string{`the name "good" is already given at line 2`}},
		{"model name twice in a list", "model: [good=a.tif, coarse=c.tif,\n  good=b.tif]\n", ErrBadValue, 2, "model", []string{`"good" is already given at line 1`}},
		{"text for int", "iterations: many\n", ErrBadValue, 1, "iterations", []string{`"many" is not a whole number`, "iterations: 1000"}},
		{"quoted int", "iterations: \"1000\"\n", ErrBadValue, 1, "iterations", []string{"(remove the quotes)"}},
		{"quoted bool", "no-thin: 'true'\n", ErrBadValue, 1, "no-thin", []string{"(remove the quotes)"}},
		{"short unknown key gets no guess", "x: 1\n", ErrUnknownKey, 1, "x", []string{"unknown key in study file: allowed keys"}},
		{"fraction for int", "ecoregion-min-points: 2.5\n", ErrBadValue, 1, "ecoregion-min-points", []string{`"2.5" is not a whole number`}},
		{"list for int", "iterations: [1, 2]\n", ErrBadValue, 1, "iterations", []string{"found a list"}},
		{"negative seed", "seed: -1\n", ErrBadValue, 1, "seed", []string{`"-1" is not a whole number from 0`}},
		{"seed too large", "seed: 18446744073709551616\n", ErrBadValue, 1, "seed", nil},
		{"yes for bool", "no-thin: yes\n", ErrBadValue, 1, "no-thin", []string{`"yes" is not true or false`, "no-thin: true"}},
		{"nan fraction", "fraction: .nan\n", ErrBadValue, 1, "fraction", []string{"not a finite number"}},
		{"text fraction", "fraction: half\n", ErrBadValue, 1, "fraction", []string{`"half" is not a number`}},
		{"mapping for string", "region:\n  a: b\n", ErrBadValue, 2, "region", []string{"found a mapping"}},
		{"empty path", "out: \"\"\n", ErrBadValue, 1, "out", []string{"path is empty"}},
		{"bad list item names its line", "region-buffers:\n  - 10\n  - ten\n", ErrBadValue, 3, "region-buffers", []string{`item 2: "ten" is not a number`}},
		{"nested list item", "e: [[1]]\n", ErrBadValue, 1, "e", []string{"item 1 is a list"}},
		// The example holds values the key takes: it was e: [10, 25, 50]
		// for every list, and E lies in (0,1).
		{"bad e item", "e: [0.05, x]\n", ErrBadValue, 1, "e", []string{`item 2: "x" is not a number`, "e: [0.05, 0.1]"}},
		{"bad thresholds item", "thresholds:\n  - x\n", ErrBadValue, 2, "thresholds", []string{"thresholds: [0.25, 0.5]"}},
		{"bad buffer item", "hull-buffers: [x]\n", ErrBadValue, 1, "hull-buffers", []string{"hull-buffers: [10, 25, 50]"}},
		// A study file's list is written as the file writes it, not as
		// the flag (--e=...) is: the line and key name it already.
		{"bad list text", "e: \"5,,10\"\n", ErrFloatList, 1, "e", []string{"not a list of numbers: item 2", "is empty", "for example e: [0.05, 0.1]"}},
		{"bad list item", "region-buffers: 10,x\n", ErrFloatList, 1, "region-buffers", []string{"item 2 \"x\" is not a finite number", "for example region-buffers: [10, 25, 50]"}},
		{"mapping for list", "e:\n  a: 1\n", ErrBadValue, 2, "e", []string{"expected a list of numbers"}},
		{"model without =", "model:\n  - gbm.tif\n", ErrNamedPath, 2, "model", []string{`"gbm.tif" has no '='`, "gbm=models/gbm.tif"}},
		{"model bad name", "model:\n  - ok=a.tif\n  - \"my model=b.tif\"\n", ErrNamedPath, 3, "model", []string{`name "my model"`}},
		{"extra without path", "extra: mask=\n", ErrNamedPath, 1, "extra", []string{"no PATH"}},
		// An extra layer's example is a polygon layer: it was a model
		// raster, gbm=models/gbm.tif.
		{"extra without =", "extra:\n  - lakes.gpkg\n", ErrNamedPath, 2, "extra", []string{`"lakes.gpkg" has no '='`, "for example lakes=layers/lakes.gpkg"}},
		{"extra bad name", "extra: \"my lakes=l.gpkg\"\n", ErrNamedPath, 1, "extra", []string{`name "my lakes"`, "for example lakes=layers/lakes.gpkg"}},
		{"model mapping bad entry", "model:\n  a: [x]\n", ErrBadValue, 2, "model", []string{"NAME: PATH"}},
		// A mapping's key is the name alone: "good=x" was split at its
		// '=' into the name good and the path x=a.tif, which "did not
		// exist".
		{"model mapping key holds =", "model: {\"good=x\": a.tif}\n", ErrBadValue, 1, "model", []string{`the key "good=x" is not a name: it holds '='`, "the key is the name alone", `"gbm: models/gbm.tif" under "model:"`}},
		{"null mapping key holds =", "null:\n  a=b: c.tif\n", ErrBadValue, 2, "null", []string{`the key "a=b" is not a name: it holds '='`}},
		{"extra mapping key with a space", "extra:\n  my mask: m.gpkg\n", ErrBadValue, 2, "extra", []string{`the key "my mask" is not a name: it holds ' '`}},
		{"extra mapping key empty", "extra:\n  \"\": m.gpkg\n", ErrBadValue, 2, "extra", []string{`the key "" is not a name: it is empty`}},
		{"model mapping key too long", "model:\n  " + strings.Repeat("a", 41) + ": m.tif\n", ErrBadValue, 2, "model", []string{"is 41 characters long"}},
		{"syntax error tab", "iterations: 10\n\tseed: 3\n", ErrStudySyntax, 0, "", []string{"near line 2", "spaces (not tabs)"}},
		{"syntax error on line 1", "a: b: c\n", ErrStudySyntax, 0, "", []string{"near line 1:", "a second ': ' on one line", "key: value"}},
		{"syntax error unclosed", "e: [1, 2\n", ErrStudySyntax, 0, "", []string{"key: value"}},
		{"two documents", "seed: 1\n---\nseed: 2\n", ErrStudySyntax, 2, "", []string{"second YAML document", "'---'"}},
		{"root is a list", "- seed: 1\n", ErrStudySyntax, 1, "", []string{"found a list", "iterations: 1000"}},
		{"root is text", "hello\n", ErrStudySyntax, 1, "", []string{`"hello"`}},
		// An occurrence table given as the study file: named as a table,
		// with its first line only (the whole table was quoted).
		{"occurrence table", "longitude,latitude,role\n-138.95,-39.96,train\n" + strings.Repeat("-137.85,-41.15,test\n", 300), ErrStudySyntax, 1, "",
			[]string{`found a delimited table (its first line "longitude,latitude,role")`, "goes to --occurrences"}},
		{"long single value", strings.Repeat("word ", 100) + "\n", ErrStudySyntax, 1, "", []string{`... (499 characters)`}}, // 100 times "word " less the last space, which YAML drops
		{"key is a list", "[a]: 1\n", ErrStudySyntax, 1, "", []string{"plain name"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			st, err := ParseStudy(strings.NewReader(tc.in), "study.yaml", "/b")
			if st != nil {
				t.Errorf("study returned with an error")
			}
			checkStudyError(t, err, tc.is, "study.yaml", tc.line, tc.key, tc.contains)
		})
	}
}

func checkStudyError(t *testing.T, err error, want error, file string, line int, key string, fragments []string) {
	t.Helper()
	if err == nil {
		t.Fatalf("no error, want %v", want)
	}
	if !errors.Is(err, want) {
		t.Fatalf("error %q does not wrap %q", err, want)
	}
	var se *StudyError
	if !errors.As(err, &se) {
		t.Fatalf("error %q is not a *StudyError", err)
	}
	if se.File != file || se.Key != key || se.Line != line {
		t.Fatalf("StudyError{File:%q Line:%d Key:%q}, want {%q %d %q}; message %q", se.File, se.Line, se.Key, file, line, key, err)
	}
	msg := err.Error()
	if !strings.HasPrefix(msg, "inputs: "+file) || strings.Count(msg, "inputs:") != 1 {
		t.Errorf("message %q lacks a single package prefix and the file", msg)
	}
	if line > 0 && !strings.Contains(msg, fmt.Sprintf(" line %d", line)) {
		t.Errorf("message %q does not name line %d", msg, line)
	}
	if key != "" && !strings.Contains(msg, fmt.Sprintf("key %q", key)) {
		t.Errorf("message %q does not name key %q", msg, key)
	}
	for _, f := range fragments {
		if !strings.Contains(msg, f) {
			t.Errorf("message %q lacks %q", msg, f)
		}
	}
}

func TestQuoteHintOnlyWhenQuoted(t *testing.T) {
	_, err := ParseStudy(strings.NewReader("iterations: many\n"), "s.yaml", "")
	if err == nil || strings.Contains(err.Error(), "quotes") {
		t.Fatalf("unquoted value got quote advice: %v", err)
	}
}

func TestBadListTextWrapsBoth(t *testing.T) {
	_, err := ParseStudy(strings.NewReader("e: \"5,x\"\n"), "s.yaml", "")
	if !errors.Is(err, ErrBadValue) || !errors.Is(err, ErrFloatList) {
		t.Fatalf("got %v", err)
	}
}

func TestLoadStudyResolvesAgainstFileDir(t *testing.T) {
	dir := t.TempDir()
	sub := filepath.Join(dir, "studies")
	if err := os.Mkdir(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(sub, "puma.yaml")
	abs := filepath.Join(dir, "abs.csv")
	body := "model: [m=../models/m.tif]\noccurrences: " + abs + "\nregion: r.gpkg\nextra: [x=./x.gpkg]\nout: ../out\n"
	if err := os.WriteFile(path, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	st, err := LoadStudy(path)
	if err != nil {
		t.Fatal(err)
	}
	want := &Study{
		"model":       []string{"m=" + filepath.Join(dir, "models", "m.tif")},
		"occurrences": abs,
		"region":      filepath.Join(sub, "r.gpkg"),
		"extra":       []string{"x=" + filepath.Join(sub, "x.gpkg")},
		"out":         filepath.Join(dir, "out"),
	}
	if !reflect.DeepEqual(st, want) {
		t.Fatalf("got %s\nwant %s", dump(st), dump(want))
	}

	// A study file read from a pipe (/dev/stdin, a shell's <(...)) has
	// no folder: its relative paths stay relative, to the current folder
	// (they were joined to /dev/fd: "/dev/fd/model_good.tif does not
	// exist").
	t.Run("pipe", func(t *testing.T) {
		r, w, err := os.Pipe()
		if err != nil {
			t.Fatal(err)
		}
		defer r.Close()
		go func() {
			w.WriteString("model: [m=models/m.tif]\noccurrences: occ.csv\nregion: " + abs + "\n")
			w.Close()
		}()
		st, err := LoadStudy(fmt.Sprintf("/dev/fd/%d", r.Fd()))
		if err != nil {
			t.Fatal(err)
		}
		want := &Study{"model": []string{"m=models/m.tif"}, "occurrences": "occ.csv", "region": abs}
		if !reflect.DeepEqual(st, want) {
			t.Fatalf("got %s\nwant %s", dump(st), dump(want))
		}
	})

	// A file the shell opened for the command ('< study.yaml' read as
	// /dev/stdin) is a regular file named in /dev: the same.
	t.Run("file opened as a descriptor", func(t *testing.T) {
		f, err := os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		st, err := LoadStudy(fmt.Sprintf("/dev/fd/%d", f.Fd()))
		if err != nil {
			t.Fatal(err)
		}
		if got := (*st)["region"]; got != "r.gpkg" {
			t.Fatalf("region %q, want r.gpkg (relative to the current folder)", got)
		}
	})

	// A symbolic link to a study file: its paths are taken from the link's
	// folder, as the README says (a link to a shared study file beside
	// one's own inputs uses them).
	t.Run("symbolic link", func(t *testing.T) {
		mine := filepath.Join(dir, "mine")
		if err := os.Mkdir(mine, 0o755); err != nil {
			t.Fatal(err)
		}
		link := filepath.Join(mine, "study.yaml")
		if err := os.Symlink(path, link); err != nil {
			t.Fatal(err)
		}
		st, err := LoadStudy(link)
		if err != nil {
			t.Fatal(err)
		}
		if got := (*st)["region"]; got != filepath.Join(mine, "r.gpkg") {
			t.Fatalf("region %q, want %q (the link's folder)", got, filepath.Join(mine, "r.gpkg"))
		}
	})

	t.Run("tilde is the home folder", func(t *testing.T) {
		home := t.TempDir()
		t.Setenv("HOME", home)
		p := filepath.Join(sub, "home.yaml")
		if err := os.WriteFile(p, []byte("occurrences: ~/data/occ.csv\nmodel:\n  m: ~/m.tif\nout: ~\nregion: ./~x/r.gpkg\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		st, err := LoadStudy(p)
		if err != nil {
			t.Fatal(err)
		}
		want := &Study{
			"occurrences": filepath.Join(home, "data", "occ.csv"),
			"model":       []string{"m=" + filepath.Join(home, "m.tif")},
			"region":      filepath.Join(sub, "~x", "r.gpkg"),
		}
		// out: ~ is YAML's null: absent.
		if !reflect.DeepEqual(st, want) {
			t.Fatalf("got %s\nwant %s", dump(st), dump(want))
		}
	})
	t.Run("tilde without a home folder", func(t *testing.T) {
		// HOME unset: "~/data/occ.csv" was joined to the study's folder
		// and reported as SUB/~/data/occ.csv not existing.
		t.Setenv("HOME", "")
		os.Unsetenv("HOME")
		for i, body := range []string{"iterations: 5\noccurrences: ~/data/occ.csv\n", "iterations: 5\nmodel:\n  m: ~/m.tif\n"} {
			p := filepath.Join(sub, fmt.Sprintf("nohome%d.yaml", i))
			os.WriteFile(p, []byte(body), 0o644)
			_, err := LoadStudy(p)
			key := []string{"occurrences", "model"}[i]
			checkStudyError(t, err, ErrBadValue, p, 2+i, key, []string{"HOME is not set", "give the full path"})
		}
	})
	t.Run("a study table given as a study file", func(t *testing.T) {
		for i, body := range []string{"# iterations: 5\nid,model,occurrences,region\na,m=x.tif,o.csv,r.gpkg\n", "\ufeff\"id\";\"model\"\n"} {
			p := filepath.Join(sub, fmt.Sprintf("table%d.csv", i))
			os.WriteFile(p, []byte(body), 0o644)
			_, err := LoadStudy(p)
			checkStudyError(t, err, ErrStudySyntax, p, 2-i, "", []string{"this is a study table", "areasweep batch " + p})
		}
		p := filepath.Join(sub, "id.yaml")
		os.WriteFile(p, []byte("id: 5\n"), 0o644)
		if _, err := LoadStudy(p); !errors.Is(err, ErrUnknownKey) {
			t.Errorf("a study file with the key id: %v, want an unknown key", err)
		}
	})
	t.Run("not UTF-8", func(t *testing.T) {
		latin1 := filepath.Join(sub, "latin1.yaml")
		os.WriteFile(latin1, []byte("iterations: 10\n# \xe9tude\n"), 0o644)
		_, err := LoadStudy(latin1)
		checkStudyError(t, err, ErrStudySyntax, latin1, 2, "", []string{"0xE9 is not UTF-8", "save the file as UTF-8"})
		utf16 := filepath.Join(sub, "utf16.yaml")
		os.WriteFile(utf16, []byte("\xff\xfei\x00t\x00"), 0o644)
		_, err = LoadStudy(utf16)
		checkStudyError(t, err, ErrStudySyntax, utf16, 1, "", []string{"UTF-16", "save it as UTF-8"})
		table := filepath.Join(sub, "latin1.csv")
		os.WriteFile(table, []byte("id,model,occurrences,region\n\xe9,m=x.tif,o.csv,r.gpkg\n"), 0o644)
		if _, err := LoadBatch(table); !errors.Is(err, ErrBatchSyntax) || !strings.Contains(err.Error(), "line 2") || !strings.Contains(err.Error(), "0xE9") {
			t.Errorf("LoadBatch of a Latin-1 table: %v", err)
		}
	})
	t.Run("error names path", func(t *testing.T) {
		bad := filepath.Join(sub, "bad.yaml")
		if err := os.WriteFile(bad, []byte("iterations: 10\nbogus: 1\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		_, err := LoadStudy(bad)
		checkStudyError(t, err, ErrUnknownKey, bad, 2, "bogus", nil)
	})
	t.Run("missing file", func(t *testing.T) {
		_, err := LoadStudy(filepath.Join(sub, "none.yaml"))
		if !errors.Is(err, os.ErrNotExist) || !strings.HasPrefix(err.Error(), "inputs: ") {
			t.Fatalf("got %v", err)
		}
		// In our words, as for a study table (it was "cannot read study
		// file: open ...: no such file or directory").
		if want := "study file " + filepath.Join(sub, "none.yaml") + " does not exist; check the path"; !strings.Contains(err.Error(), want) || strings.Contains(err.Error(), "open ") {
			t.Errorf("got %v, want %q", err, want)
		}
	})
}

// TestStudyKeysMatchTable checks that the study keys are the table's
// study settings, that the full study file gives every one of them (so
// each kind decodes) with the Go type of its field, and that StudyKeys
// returns a copy.
func TestStudyKeysMatchTable(t *testing.T) {
	keys := StudyKeys()
	full := fullStudyWant("/b")
	if len(*full) != len(keys) {
		t.Fatalf("the full study gives %d keys, the table has %d study keys", len(*full), len(keys))
	}
	var v settings.Values
	for _, k := range keys {
		row, ok := settings.Lookup(k)
		if !ok || !row.Study {
			t.Fatalf("key %q is not a study setting of the table", k)
		}
		val, ok := (*full)[k]
		if !ok {
			t.Errorf("key %q absent from the full study", k)
			continue
		}
		if want := reflect.TypeOf(row.Field(&v)).Elem(); reflect.TypeOf(val) != want {
			t.Errorf("key %q decodes to %T, its field is %v", k, val, want)
		}
	}
	got, err := ParseStudy(strings.NewReader(fullStudy), "study.yaml", "/b")
	if err != nil || !reflect.DeepEqual(got, full) {
		t.Fatalf("full study: %v\n got %s\nwant %s", err, dump(got), dump(full))
	}
	keys[0] = "changed"
	if StudyKeys()[0] != "model" {
		t.Error("StudyKeys shares storage with the package")
	}
}

func TestParseNamedPath(t *testing.T) {
	cases := []struct {
		name, in, wantName, wantPath string
		wantErr                      string // fragment; "" means success
	}{
		{"simple", "gbm=models/m.tif", "gbm", "models/m.tif", ""},
		{"allowed characters", "A-b_c.9=x", "A-b_c.9", "x", ""},
		{"first = splits", "m=a=b.tif", "m", "a=b.tif", ""},
		{"spaces trimmed", "  m =  p.tif ", "m", "p.tif", ""},
		{"40 characters", strings.Repeat("a", 40) + "=p", strings.Repeat("a", 40), "p", ""},
		{"windows path", `m=C:\data\m.tif`, "m", `C:\data\m.tif`, ""},
		{"41 characters", strings.Repeat("a", 41) + "=p", "", "", "is 41 characters long"},
		{"no =", "m.tif", "", "", "has no '='"},
		{"empty name", "=p.tif", "", "", "no NAME"},
		{"empty path", "m= ", "", "", "no PATH"},
		{"bad character", "m/n=p", "", "", `name "m/n" holds '/', which is none of the ASCII letters`},
		// An accented letter is a letter to its writer: the message names
		// it and says that only A-Z and a-z are taken.
		{"accented letter", "gööd=p", "", "", `name "gööd" holds 'ö', which is none of the ASCII letters A-Z and a-z (no accents)`},
		{"space inside", "my model=p", "", "", `name "my model" holds ' ', which is none`},
		{"empty", "", "", "", "has no '='"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			n, p, err := ParseNamedPath(tc.in)
			if tc.wantErr == "" {
				if err != nil || n != tc.wantName || p != tc.wantPath {
					t.Fatalf("got (%q, %q, %v), want (%q, %q)", n, p, err, tc.wantName, tc.wantPath)
				}
				return
			}
			if !errors.Is(err, ErrNamedPath) || !strings.Contains(err.Error(), tc.wantErr) ||
				!strings.Contains(err.Error(), "NAME=PATH") || !strings.HasPrefix(err.Error(), "inputs: ") {
				t.Fatalf("error %v, want one containing %q and the advice", err, tc.wantErr)
			}
		})
	}
}

func TestParseFloatList(t *testing.T) {
	cases := []struct {
		name    string
		in      string
		want    []float64
		wantErr string
	}{
		{"three", "10,25,50", []float64{10, 25, 50}, ""},
		{"spaces", " 10 , 25.5,\t50 ", []float64{10, 25.5, 50}, ""},
		{"one", "5", []float64{5}, ""},
		{"signs and exponent", "-1,+2,3e-1", []float64{-1, 2, 0.3}, ""},
		{"empty", "", nil, ""},
		{"blank", "   ", nil, ""},
		{"empty item", "10,,20", nil, "item 2 of \"10,,20\" is empty"},
		{"trailing comma", "10,", nil, "item 2"},
		{"not a number", "10,abc", nil, `item 2 "abc" is not a finite number`},
		{"nan", "NaN", nil, `item 1 "NaN"`},
		{"inf", "1,inf", nil, `item 2 "inf"`},
		{"space separated", "10 20", nil, `item 1 "10 20"`},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ParseFloatList("region-buffers", tc.in)
			if tc.wantErr == "" {
				if err != nil || !reflect.DeepEqual(got, tc.want) {
					t.Fatalf("got (%v, %v), want %v", got, err, tc.want)
				}
				return
			}
			msg := fmt.Sprint(err)
			if !errors.Is(err, ErrFloatList) || !strings.Contains(msg, "--region-buffers") ||
				!strings.Contains(msg, tc.wantErr) || !strings.Contains(msg, "for example --region-buffers=10,25,50") {
				t.Fatalf("error %q, want one naming the flag and containing %q", msg, tc.wantErr)
			}
		})
	}
}

func TestApply(t *testing.T) {
	given := func(names ...string) func(string) bool {
		return func(n string) bool {
			for _, g := range names {
				if g == n {
					return true
				}
			}
			return false
		}
	}
	t.Run("study fills settings not given, command line wins", func(t *testing.T) {
		v := settings.Defaults()
		v.Models, v.Iterations, v.E = []string{"cli=cli.tif"}, 7, []float64{1}
		fullStudyWant("/b").Apply(&v, given("model", "iterations", "e", "no-thin"))
		want := settings.Defaults()
		want.Models, want.Iterations, want.E, want.NoThin = []string{"cli=cli.tif"}, 7, []float64{1}, false
		want.Nulls, want.Occurrences, want.OccurrencesCRS = []string{"effort=/b/effort.tif"}, "/b/occ/points.csv", "EPSG:32633"
		want.Region, want.Ecoregions, want.EcoregionField = "/b/region.gpkg", "/shared/ecoregions.gpkg", "ECO_NAME"
		want.EcoregionMinPoints, want.EcoregionClip, want.Extra = 3, true, []string{"mask=/b/masks/mask.gpkg"}
		want.RegionBuffers, want.PointBuffers, want.HullBuffers = []float64{10, 25.5, 50}, []float64{5}, []float64{}
		want.Fraction, want.Thresholds, want.Seed, want.Out = 0.5, []float64{0, 0.1}, 18446744073709551615, "/b/results"
		want.ToleranceAUC, want.TolerancePartialROC, want.ToleranceOmission, want.ToleranceBoyce = 0.03, 0.1, 0.04, 0.2
		if !reflect.DeepEqual(v, want) {
			t.Fatalf("after Apply\n got %+v\nwant %+v", v, want)
		}
	})
	t.Run("absent settings leave defaults", func(t *testing.T) {
		v := settings.Defaults()
		(&Study{"seed": uint64(9)}).Apply(&v, given())
		want := settings.Defaults()
		want.Seed = 9
		if !reflect.DeepEqual(v, want) {
			t.Fatalf("got %+v", v)
		}
	})
	t.Run("nil study", func(t *testing.T) {
		var st *Study
		v := settings.Defaults()
		st.Apply(&v, given())
		if !reflect.DeepEqual(v, settings.Defaults()) {
			t.Fatalf("got %+v", v)
		}
	})
}

func TestStudyErrorFormat(t *testing.T) {
	e := &StudyError{File: "s.yaml", Line: 4, Key: "seed", Err: fmt.Errorf("%w: x", ErrBadValue)}
	if got, want := e.Error(), `inputs: s.yaml line 4, key "seed": bad value in study file: x`; got != want {
		t.Fatalf("got %q want %q", got, want)
	}
	if !errors.Is(e, ErrBadValue) {
		t.Fatal("Unwrap does not reach the sentinel")
	}
}

func TestEditDistance(t *testing.T) {
	cases := []struct {
		a, b string
		want int
	}{
		// Textbook Levenshtein distances (no adjacent swap in them), by
		// construction.
		{"", "", 0}, {"a", "", 1}, {"kitten", "sitting", 3}, {"flaw", "lawn", 2}, {"seed", "seed", 0},
		// An adjacent swap is one edit (two for Levenshtein), by
		// construction; "ca" to "abc" is 3 in the optimal string
		// alignment distance (a substring is not edited twice), 2 in
		// the unrestricted Damerau-Levenshtein distance: the usual
		// example of the difference (recalled from memory).
		{"modle", "model", 1}, {"ab", "ba", 1}, {"ca", "abc", 3},
	}
	for _, tc := range cases {
		t.Run(tc.a+"-"+tc.b, func(t *testing.T) {
			if got := editDistance(tc.a, tc.b); got != tc.want {
				t.Fatalf("got %d want %d", got, tc.want)
			}
		})
	}
}

func BenchmarkParseStudy(b *testing.B) {
	b.Run("keys=21", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := ParseStudy(strings.NewReader(fullStudy), "study.yaml", "/b"); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// FuzzParseStudy checks that no study text makes the reader panic, and that
// every error carries the package prefix.
func FuzzParseStudy(f *testing.F) {
	f.Add(fullStudy)
	for _, s := range []string{"", "~", "model:\n  a: b\n", "e: &x [1]\nthresholds: *x\n", "seed: -1\n", "a: b: c\n", "- 1\n", "---\n---\n"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, in string) {
		st, err := ParseStudy(strings.NewReader(in), "fuzz.yaml", "/b")
		if err != nil {
			if st != nil || !strings.HasPrefix(err.Error(), "inputs: ") {
				t.Fatalf("bad error result %v %v", st, err)
			}
			return
		}
		if st == nil {
			t.Fatal("nil study without error")
		}
	})
}

// TestParseWhole: a whole-number flag takes what the study file takes for
// the same key (decimal digits, leading zeros meaning nothing, and whole
// numbers in decimal or exponent form, YAML's float forms); anything else,
// base prefixes and underscores included, keeps
// strconv.ParseInt's error, which the command words for the user. The
// expected values are the literals' own values under Go's number syntax
// (the Go specification's integer and floating-point literals) and our
// bound of 2^53, the largest range where a float64 holds every whole
// number (IEEE 754 binary64, 53-bit significand).
func TestParseWhole(t *testing.T) {
	cases := []struct {
		in   string
		want int
		err  error // strconv.ErrSyntax or ErrRange; nil: parsed
	}{
		{"1000", 1000, nil},
		{"1e3", 1000, nil},
		{"1000.0", 1000, nil},
		{"-2e0", -2, nil},
		{"0701", 701, nil}, // decimal: Go's base-0 parsing and YAML read octal 449
		{"08", 8, nil},
		{"-0012", -12, nil},
		{"0x10", 0, strconv.ErrSyntax},
		{"0o17", 0, strconv.ErrSyntax},
		{"0b101", 0, strconv.ErrSyntax},
		{"1_000", 0, strconv.ErrSyntax},
		{"0x1p4", 0, strconv.ErrSyntax}, // a hexadecimal float ParseFloat takes
		{"9007199254740992", 1 << 53, nil},
		{"9.007199254740992e15", 1 << 53, nil},
		{"1.5", 0, strconv.ErrSyntax},
		{"1e-3", 0, strconv.ErrSyntax},
		{"abc", 0, strconv.ErrSyntax},
		{"NaN", 0, strconv.ErrSyntax},
		{"Inf", 0, strconv.ErrSyntax},
		{"", 0, strconv.ErrSyntax},
		{"1e300", 0, strconv.ErrRange},
		{"99999999999999999999", 0, strconv.ErrRange},
	}
	for _, c := range cases {
		got, err := ParseWhole(c.in)
		if c.err == nil {
			if err != nil || got != c.want {
				t.Errorf("ParseWhole(%q) = %d, %v; want %d", c.in, got, err, c.want)
			}
			continue
		}
		var ne *strconv.NumError
		if !errors.As(err, &ne) || ne.Func != "ParseInt" || !errors.Is(err, c.err) {
			t.Errorf("ParseWhole(%q) = %d, %v; want strconv.ParseInt's %v", c.in, got, err, c.err)
		}
	}
	// The study file reads the same forms as the same numbers, and
	// refuses the others.
	for _, c := range cases {
		if c.in == "" {
			continue // a key without a value is YAML's null: the key unset
		}
		st, err := ParseStudy(strings.NewReader("iterations: "+c.in+"\n"), "s.yaml", ".")
		if c.err != nil {
			if err == nil {
				t.Errorf("study iterations: %s read as %v; want it refused", c.in, (*st)["iterations"])
			}
			continue
		}
		if err != nil {
			t.Errorf("study iterations: %s: %v", c.in, err)
			continue
		}
		if got, ok := (*st)["iterations"].(int); !ok || got != c.want {
			t.Errorf("study iterations: %s gave %v; want %d", c.in, (*st)["iterations"], c.want)
		}
	}
	// The seed (0 or more) too: decimal digits only.
	for in, want := range map[string]uint64{"0701": 701, "42": 42, "18446744073709551615": 1<<64 - 1} {
		st, err := ParseStudy(strings.NewReader("seed: "+in+"\n"), "s.yaml", ".")
		if err != nil {
			t.Errorf("study seed: %s: %v", in, err)
			continue
		}
		if got, ok := (*st)["seed"].(uint64); !ok || got != want {
			t.Errorf("study seed: %s gave %v; want %d", in, (*st)["seed"], want)
		}
		if got, err := ParseWholeUint(in); err != nil || got != want {
			t.Errorf("ParseWholeUint(%q) = %d, %v; want %d", in, got, err, want)
		}
	}
	for _, in := range []string{"0x10", "0o17", "0b1", "1_000", "-1", "+1", "18446744073709551616"} {
		if st, err := ParseStudy(strings.NewReader("seed: "+in+"\n"), "s.yaml", "."); err == nil {
			t.Errorf("study seed: %s read as %v; want it refused", in, (*st)["seed"])
		}
		if got, err := ParseWholeUint(in); err == nil {
			t.Errorf("ParseWholeUint(%q) = %d; want an error", in, got)
		}
	}
}

// TestLoadStudyTilde: --study=~/study.yaml reaches areasweep with its ~
// (a shell expands it only at the start of a word): the refusal says so.
func TestLoadStudyTilde(t *testing.T) {
	t.Setenv("HOME", t.TempDir())
	_, err := LoadStudy("~/study.yaml")
	if err == nil || !strings.Contains(err.Error(), "not after --study=): write --study and the path apart (--study ~/study.yaml)") {
		t.Fatalf("got %v", err)
	}
}

// TestClosest: the suggestion for a mistyped name (study keys and flags),
// by the rules Closest states; the names are made up for the test.
func TestClosest(t *testing.T) {
	names := []string{"model", "models-dir", "iterations", "region-buffers", "point-buffers", "point-thin", "out", "e"}
	for _, c := range []struct{ in, want string }{
		{"model", "model"},
		{"Model", "model"},                   // case
		{"region_buffers", "region-buffers"}, // '_' for '-'
		{"modle", "model"},                   // one adjacent swap
		{"iteratons", "iterations"},          // one letter left out
		{"iter", "iterations"},               // the start of one name
		{"point", ""},                        // the start of two: no guess
		{"ou", ""},                           // too short for a guess
		{"xyzzy", ""},                        // nothing near
		{"regoin-bufers", "region-buffers"},
		{"modelsdirectory", ""}, // too far from models-dir
	} {
		if got := Closest(c.in, names); got != c.want {
			t.Errorf("Closest(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}

// TestLoadStudyCRSFileBesideIt: occurrences-crs naming a .prj beside the
// study file is resolved against the study file's folder, like its other
// paths (it was kept relative to the working folder, and the run said
// `"occ.prj" is not a CRS PROJ knows`); an authority code, a WKT string,
// and a relative name that is no file there stay as written.
func TestLoadStudyCRSFileBesideIt(t *testing.T) {
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "occ.prj"), []byte(`GEOGCS["WGS 84"]`), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Mkdir(filepath.Join(dir, "folder.prj"), 0o755); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ value, want string }{
		{"occ.prj", filepath.Join(dir, "occ.prj")},
		{"./occ.prj", filepath.Join(dir, "occ.prj")},
		{"EPSG:3035", "EPSG:3035"},
		{`'PROJCS["x"]'`, `PROJCS["x"]`},
		{"missing.prj", "missing.prj"},
		{"folder.prj", "folder.prj"},
	} {
		path := filepath.Join(dir, "study.yaml")
		if err := os.WriteFile(path, []byte("occurrences-crs: "+c.value+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		st, err := LoadStudy(path)
		if err != nil {
			t.Fatalf("%s: %v", c.value, err)
		}
		if got := (*st)["occurrences-crs"]; got != c.want {
			t.Errorf("occurrences-crs: %s read as %q, want %q", c.value, got, c.want)
		}
	}
}
