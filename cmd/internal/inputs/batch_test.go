package inputs

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"syscall"
	"testing"
	"unicode/utf8"
)

// Expected values are by construction: each table is written here and the
// expected settings and errors are read off it by hand.

const batchCSV = `# iterations: 1000
# region-buffers: [100, 250]
# seed: 7
## a comment inside the shared block
id,models,occurrences,region,ecoregions,ecoregion-field,seed,region-buffers
oak,gbm=oak/gbm.tif; glm=/abs/glm.tif,oak/points.csv,oak/region.gpkg,,,,
# a row commented out
lynx,gbm=lynx/gbm.tif,lynx/points.csv,lynx/region.gpkg,eco.gpkg,ECO_NAME,42,"5, 10"
`

const batchYAML = `settings:
  iterations: 1000
  region-buffers: [100, 250]
  seed: 7
studies:
  - id: oak
    model: [gbm=oak/gbm.tif, glm=/abs/glm.tif]
    occurrences: oak/points.csv
    region: oak/region.gpkg
  - id: lynx
    models:
      gbm: lynx/gbm.tif
    occurrences: lynx/points.csv
    region: lynx/region.gpkg
    ecoregions: eco.gpkg
    ecoregion-field: ECO_NAME
    seed: 42
    region-buffers: [5, 10]
`

func wantBatch(dir string) []BatchStudy {
	j := func(p string) string { return filepath.Join(dir, p) }
	return []BatchStudy{
		{ID: "oak", Study: &Study{
			"model": []string{"gbm=" + j("oak/gbm.tif"), "glm=/abs/glm.tif"}, "occurrences": j("oak/points.csv"),
			"region": j("oak/region.gpkg"), "iterations": 1000, "region-buffers": []float64{100, 250}, "seed": uint64(7),
		}},
		{ID: "lynx", Study: &Study{
			"model": []string{"gbm=" + j("lynx/gbm.tif")}, "occurrences": j("lynx/points.csv"),
			"region": j("lynx/region.gpkg"), "ecoregions": j("eco.gpkg"), "ecoregion-field": "ECO_NAME",
			"iterations": 1000, "region-buffers": []float64{5, 10}, "seed": uint64(42),
		}},
	}
}

// sharedCSV and sharedYAML are the shared settings' keys each study of
// batchCSV and batchYAML takes (it gives no value of its own), with the
// line that sets each (worked by hand from the tables).
var (
	sharedCSV  = []map[string]int{{"iterations": 1, "region-buffers": 2, "seed": 3}, {"iterations": 1}}
	sharedYAML = []map[string]int{{"iterations": 2, "region-buffers": 3, "seed": 4}, {"iterations": 2}}
)

func TestBatchCSVAndYAMLAgree(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		file, text string
		lines      []int
		shared     []map[string]int // the shared settings' lines each row takes (worked by hand from the tables)
	}{
		{"studies.csv", batchCSV, []int{6, 8}, sharedCSV},
		{"studies.yaml", batchYAML, []int{6, 10}, sharedYAML},
	} {
		path := filepath.Join(dir, c.file)
		if err := os.WriteFile(path, []byte(c.text), 0o644); err != nil {
			t.Fatal(err)
		}
		b, err := LoadBatch(path)
		if err != nil {
			t.Fatalf("%s: %v", c.file, err)
		}
		want := wantBatch(dir)
		for i := range want {
			want[i].Line, want[i].SharedLines = c.lines[i], c.shared[i]
		}
		if !reflect.DeepEqual(b.Studies, want) {
			for i := range b.Studies {
				t.Logf("got %+v %+v", b.Studies[i], *b.Studies[i].Study)
			}
			t.Fatalf("%s: studies differ", c.file)
		}
		if (*b.Shared)["iterations"] != 1000 || (*b.Shared)["model"] != nil {
			t.Fatalf("%s: shared %+v", c.file, *b.Shared)
		}
	}
}

// TestBatchCarriageReturns: a table whose lines end in a carriage return
// alone (Excel's "CSV (Macintosh)") or in CR LF (Windows) reads as the
// same table with line feeds, line numbers included, through LoadBatch
// and ParseBatch, in CSV and YAML; a problem is reported on its own line.
func TestBatchCarriageReturns(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		name, text string
		lines      []int
		shared     []map[string]int
	}{
		{"mac.csv", batchCSV, []int{6, 8}, sharedCSV},
		{"mac.yaml", batchYAML, []int{6, 10}, sharedYAML},
	} {
		for _, end := range []string{"\r", "\r\n"} {
			text := strings.ReplaceAll(c.text, "\n", end)
			path := filepath.Join(dir, c.name)
			if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
				t.Fatal(err)
			}
			want := wantBatch(dir)
			for i := range want {
				want[i].Line, want[i].SharedLines = c.lines[i], c.shared[i]
			}
			b, err := LoadBatch(path)
			if err != nil {
				t.Fatalf("%s ending %q: %v", c.name, end, err)
			}
			if !reflect.DeepEqual(b.Studies, want) || (*b.Shared)["iterations"] != 1000 {
				t.Errorf("%s ending %q: got %d studies %+v, shared %+v", c.name, end, len(b.Studies), b.Studies, *b.Shared)
			}
			b, err = ParseBatch([]byte(text), path, dir, strings.HasSuffix(c.name, ".yaml"))
			if err != nil || !reflect.DeepEqual(b.Studies, want) {
				t.Errorf("%s ending %q, ParseBatch: %v", c.name, end, err)
			}
		}
	}
	bad := "id,model,occurrences,region,seed\roak,gbm=a.tif,p.csv,r.gpkg,1\rlynx,gbm=b.tif,q.csv,s.gpkg,many\r"
	_, err := ParseBatch([]byte(bad), "mac.csv", "", false)
	var errs BatchErrors
	if !errors.As(err, &errs) || len(errs) != 1 || errs[0].Line != 3 || errs[0].Study != "lynx" {
		t.Fatalf("want one error on line 3, study lynx: %v", err)
	}
}

func TestBatchTemplateParses(t *testing.T) {
	var buf bytes.Buffer
	if err := WriteBatchTemplate(&buf); err != nil {
		t.Fatal(err)
	}
	b, err := ParseBatch(buf.Bytes(), "template.csv", "/data", false)
	if err != nil {
		t.Fatal(err)
	}
	if len(b.Studies) != 2 || b.Studies[1].ID != "lynx" || (*b.Studies[1].Study)["ecoregions"] != "/data/eco.gpkg" {
		t.Fatalf("template: %+v", b.Studies)
	}
}

func TestBatchSemicolonTable(t *testing.T) {
	text := "id;model;occurrences;region;fraction\noak;gbm=a.tif;p.csv;r.gpkg;0.5\n"
	b, err := ParseBatch([]byte(text), "t.csv", "", false)
	if err != nil {
		t.Fatal(err)
	}
	if got := *b.Studies[0].Study; got["model"].([]string)[0] != "gbm=a.tif" || got["fraction"] != 0.5 {
		t.Fatalf("%+v", got)
	}
	// Two models in one cell: their ';' is the delimiter unless the cell
	// is quoted. The refusal of the longer row says so; the quoted cell
	// reads as two models.
	_, err = ParseBatch([]byte("id;model;occurrences;region\noak;gbm=a.tif;glm=b.tif;p.csv;r.gpkg\n"), "t.csv", "", false)
	if err == nil || !strings.Contains(err.Error(), "5 cells, the header has 4 columns") || !strings.Contains(err.Error(), `goes in double quotes ("gbm=a.tif;glm=b.tif")`) {
		t.Errorf("two models unquoted in a semicolon table: %v", err)
	}
	b, err = ParseBatch([]byte("id;model;occurrences;region\noak;\"gbm=a.tif;glm=b.tif\";p.csv;r.gpkg\n"), "t.csv", "", false)
	if err != nil || len((*b.Studies[0].Study)["model"].([]string)) != 2 {
		t.Errorf("two models quoted in a semicolon table: %v", err)
	}
}

// TestBatchCollectsEveryError: one table with many bad rows reports every
// one of them, each with its line and column.
func TestBatchCollectsEveryError(t *testing.T) {
	text := `# iterations: 1000
id,model,occurrences,region,seed,fraction
oak,gbm=a.tif,p.csv,r.gpkg,,
oak,gbm=b.tif,p.csv,r.gpkg,,
../up,gbm=c.tif,p.csv,r.gpkg,,
,gbm=d.tif,p.csv,r.gpkg,,
fir,gbm,p.csv,r.gpkg,,
pine,gbm=e.tif,p.csv,r.gpkg,-1,
ash,gbm=f.tif,p.csv,,,half
elm,gbm=g.tif,p.csv
OAK,gbm=h.tif,p.csv,r.gpkg,,
yew,,p.csv,r.gpkg,,
`
	b, err := ParseBatch([]byte(text), "t.csv", "", false)
	var es BatchErrors
	if !errors.As(err, &es) {
		t.Fatalf("not BatchErrors: %v", err)
	}
	// The rows without a problem come with the errors, for the caller's
	// own checks: the first oak only (OAK repeats it, yew has no model).
	if b == nil || len(b.Studies) != 1 || b.Studies[0].ID != "oak" || b.Studies[0].Line != 3 {
		t.Errorf("rows without a problem: %+v", b)
	}
	type want struct {
		line   int
		column string
		kind   error
	}
	// In line order (one line's problems in the order found).
	wants := []want{
		{4, "id", ErrBatchID},          // second oak
		{5, "id", ErrBatchID},          // ../up
		{6, "id", ErrBatchID},          // empty id
		{7, "model", ErrBadValue},      // fir: gbm has no '='
		{8, "seed", ErrBadValue},       // pine: negative seed
		{9, "fraction", ErrBadValue},   // ash: not a number
		{9, "region", ErrBatchMissing}, // ash: no region
		{10, "", ErrBatchSyntax},       // elm: 3 cells
		{11, "id", ErrBatchID},         // OAK repeats oak ignoring case
		{12, "model", ErrBatchMissing}, // yew: no model (fir's bad model is not reported again as missing)
	}
	if len(es) != len(wants) {
		t.Fatalf("%d errors, want %d:\n%v", len(es), len(wants), err)
	}
	for i, w := range wants {
		e := es[i]
		if e.Line != w.line || e.Column != w.column || !errors.Is(e, w.kind) || e.File != "t.csv" {
			t.Errorf("error %d: %v (line %d column %q); want line %d column %q %v", i, e, e.Line, e.Column, w.line, w.column, w.kind)
		}
	}
	if !errors.Is(err, ErrBatchID) || !strings.Contains(err.Error(), "10 problem(s)") {
		t.Errorf("joined error: %v", err)
	}
	if !strings.Contains(err.Error(), `t.csv line 4, study "oak", column "id": bad study id: the id is already used on line 3`) {
		t.Errorf("message for the repeated id:\n%v", err)
	}
}

func TestBatchErrorsCapped(t *testing.T) {
	text := "id" + strings.Repeat(",x", 70) + "\n"
	_, err := ParseBatch([]byte(text), "t.csv", "", false)
	var es BatchErrors
	if !errors.As(err, &es) || len(es) < 70 {
		t.Fatalf("got %v", err)
	}
	msg := err.Error()
	if n := strings.Count(msg, "\n  inputs: "); n != MaxBatchErrorsShown || !strings.Contains(msg, fmt.Sprintf("... and %d more", len(es)-MaxBatchErrorsShown)) {
		t.Fatalf("%d problems listed, message ends %q", n, msg[len(msg)-80:])
	}
}

func TestBatchRefuses(t *testing.T) {
	cases := []struct {
		name, text string
		yaml       bool
		want       error
		words      string
	}{
		{"empty csv", "", false, ErrBatchSyntax, "no header line"},
		{"header only", "id,model,occurrences,region\n", false, ErrBatchEmpty, "no study"},
		{"first column", "name,model\n", false, ErrBatchColumn, "first column must be id"},
		{"unknown column", "id,modell,occurrences,region\n", false, ErrBatchColumn, `did you mean "model"?`},
		{"out column", "id,model,out\n", false, ErrBatchColumn, "out"},
		{"duplicate column", "id,model,models\n", false, ErrBatchColumn, "columns 2 and 3"},
		{"bad shared", "# iterations: many\nid,model,occurrences,region\na,m=x,p,r\n", false, ErrBadValue, "line 1"},
		{"shared not yaml", "# : : [\nid,model\n", false, ErrBatchSyntax, "shared settings"},
		{"models separated by commas", "id,model,occurrences,region\na,gbm=a.tif,glm=b.tif,p,r\n", false, ErrBatchSyntax, "separated by ';'"},
		{"bad quote", "id,model,occurrences,region\na,\"m=x,p,r\n", false, ErrBatchSyntax, "quote"},
		{"yaml list root", "- a\n", true, ErrBatchSyntax, "settings:"},
		{"yaml unknown top", "studys: []\n", true, ErrBatchSyntax, `"studys"`},
		{"yaml out", "settings:\n  out: x\nstudies:\n  - {id: a, model: m=x, occurrences: p, region: r}\n", true, ErrBatchColumn, "out is not allowed"},
		{"yaml row scalar", "studies:\n  - oak\n", true, ErrBatchSyntax, "mapping with id"},
		// An id that is a list or mapping was refused as "the id is empty".
		{"yaml id list", "studies:\n  - {id: [oak], model: m=x, occurrences: p, region: r}\n", true, ErrBatchID, `t line 2, column "id": bad study id: the id must be one word, found a list; write for example id: oak`},
		{"yaml id mapping", "studies:\n  - id: {oak: 1}\n    model: m=x\n    occurrences: p\n    region: r\n", true, ErrBatchID, "found a mapping (key: value pairs)"},
		{"yaml bad key", "studies:\n  - {id: a, model: m=x, occurrences: p, region: r, iteration: 5}\n", true, ErrBatchColumn, `did you mean "iterations"`},
		{"yaml dup key", "studies:\n  - id: a\n    model: m=x\n    models: m=y\n", true, ErrBatchColumn, "already given"},
		{"yaml syntax", "studies: [\n", true, ErrBatchSyntax, "not valid YAML"},
		{"yaml empty", "", true, ErrBatchSyntax, "settings:"},
		{"yaml no studies", "settings: {iterations: 5}\n", true, ErrBatchEmpty, "no study"},
		{"yaml study file", "model:\n  - good=m.tif\noccurrences: o.csv\nregion: r.gpkg\niterations: 5\n", true, ErrBatchSyntax, "this is a study file"},
		// A cell's value is the table's, not a study file's, and a name
		// given twice in one cell is not "already given at" its own line.
		{"bad cell", "id,model,occurrences,region,e\na,m=x,p,r,abc\n", false, ErrBadValue, `column "e": bad value: not a list of numbers: item 1 "abc" is not a finite number; give numbers separated by ';' with a dot as decimal separator, for example 0.05;0.1`},
		{"name twice in a cell", "id,model,occurrences,region\na,g=x;g=y,p,r\n", false, ErrBadValue, `the name "g" is given twice on this line`},
		{"column twice", "id,model,occurrences,region,model\na,m=x,p,r,m=y\n", false, ErrBatchColumn, `columns 2 and 5 are both "model"; keep one of them`},
		{"model and models", "id,model,models,occurrences,region\na,m=x,m=y,p,r\n", false, ErrBatchColumn, `columns 2 and 3 "model" and "models" both give "model"; keep one of them`},
		// A column naming each row's study file was refused with the list
		// of columns only, as if a typo (found by the batch audit of
		// 2026-12-05): it says that a table cannot name one.
		{"study column", "id,study\na,oak.yaml\n", false, ErrBatchColumn, `column 2 "study" is not a study key: a study table cannot name a study file; give the file's keys as the row's columns`},
		{"study file column", "id,Study File\na,oak.yaml\n", false, ErrBatchColumn, "a study table cannot name a study file"},
		// A row with one cell too many: a decimal comma is named only
		// where two cells split at it look like the halves of a number;
		// a path holding a comma (a folder "Smith, J") is told to go in
		// quotes (the comma hint was given for any extra cell).
		{"decimal comma split", "id,model,occurrences,region,e\na,m=x,p,r,0,05\n", false, ErrBatchSyntax, "a decimal comma (12,5) splits a number in two"},
		{"comma in a path", "id,model,occurrences,region\na,m=/data/Smith, J/m.tif,p,r\n", false, ErrBatchSyntax, `5 cells, the header has 4 columns; every row needs one cell per column (empty cells are allowed). A cell that holds a comma (a path such as "/data/Smith, J/m.tif") goes in double quotes`},
		{"yaml study key", "studies:\n  - id: a\n    study: oak.yaml\n", true, ErrBatchColumn, `"study" is not a study key: a study table cannot name a study file; give the file's keys as the row's keys (and those every study shares under settings:)`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseBatch([]byte(c.text), "t", "", c.yaml)
			if !errors.Is(err, c.want) || !strings.Contains(err.Error(), c.words) {
				t.Fatalf("got %v; want %v with %q", err, c.want, c.words)
			}
			if strings.Contains(c.name, "yaml id") && strings.Contains(err.Error(), "the id is empty") {
				t.Errorf("the id is named empty too: %v", err)
			}
			if strings.Contains(err.Error(), "in study file") {
				t.Errorf("a table's problem is called a study file's: %v", err)
			}
		})
	}
}

// FuzzParseBatch: any bytes, as CSV and as YAML, give either a batch whose
// ids are unique, safe folder names with the required settings, or
// BatchErrors; never a panic.
func FuzzParseBatch(f *testing.F) {
	f.Add([]byte(batchCSV))
	f.Add([]byte(batchYAML))
	f.Add([]byte("# seed: 1\nid;model;occurrences;region\na;m=x;p;r\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		for _, isYAML := range []bool{false, true} {
			b, err := ParseBatch(data, "f", "/base", isYAML)
			if err != nil {
				var es BatchErrors
				if !errors.As(err, &es) || len(es) == 0 {
					t.Fatalf("error is not BatchErrors: %v", err)
				}
				if !utf8.ValidString(err.Error()) && utf8.Valid(data) {
					t.Fatalf("message is not UTF-8")
				}
				continue
			}
			seen := map[string]bool{}
			for _, s := range b.Studies {
				low := strings.ToLower(s.ID)
				if !batchIDRE.MatchString(s.ID) || seen[low] {
					t.Fatalf("accepted id %q", s.ID)
				}
				seen[low] = true
				if m, _ := (*s.Study)["model"].([]string); len(m) == 0 || (*s.Study)["occurrences"] == nil || (*s.Study)["region"] == nil || (*s.Study)["out"] != nil {
					t.Fatalf("accepted study %q without model/occurrences/region or with out", s.ID)
				}
			}
		}
	})
}

// TestBatchIDSuggestion: a refused id comes with a folder-safe one when
// one can be made from it.
func TestBatchIDSuggestion(t *testing.T) {
	for id, want := range map[string]string{
		"Quercus robur":  `, for example "Quercus_robur"`,
		"Lynx lynx (EU)": `, for example "Lynx_lynx_EU"`,
		"sp/x":           `, for example "sp_x"`,
		"Abies_alba_é":   `, for example "Abies_alba_e"`,
		"_hidden":        `, for example "hidden"`,
		"..":             "",
		// Accents are removed (the letter's canonical decomposition
		// without its combining mark, Unicode NFD): ü is u, ï is i.
		"ü":             `, for example "u"`,
		"ünï":           `, for example "uni"`,
		"Ursus_ürsus":   `, for example "Ursus_ursus"`,
		"Quercus röbur": `, for example "Quercus_robur"`,
		// Letters without a decomposition are replaced as before.
		"Жук": "",
	} {
		if got := idSuggestion(id); got != want {
			t.Errorf("idSuggestion(%q) = %q, want %q", id, got, want)
		}
	}
	_, err := ParseBatch([]byte("id,model,occurrences,region\nQuercus robur,m=a.tif,p.csv,r.gpkg\n"), "t.csv", "", false)
	if err == nil || !strings.Contains(err.Error(), `"Quercus robur" cannot name a folder`) || !strings.Contains(err.Error(), `for example "Quercus_robur"`) {
		t.Errorf("got %v", err)
	}
}

// TestLoadBatchAbsolutePaths: a table named by a relative path resolves
// its rows' relative paths to absolute ones, so that the studies' recorded
// inputs do not depend on the working directory or on how the table was
// named.
func TestLoadBatchAbsolutePaths(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "studies.csv")
	if err := os.WriteFile(path, []byte("id,model,occurrences,region\noak,m=oak/m.tif,oak/p.csv,/abs/r.gpkg\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	wd, err := os.Getwd()
	if err != nil {
		t.Fatal(err)
	}
	rel, err := filepath.Rel(wd, path)
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{path, rel} {
		b, err := LoadBatch(name)
		if err != nil {
			t.Fatal(err)
		}
		st := *b.Studies[0].Study
		if st["occurrences"] != filepath.Join(dir, "oak", "p.csv") || st["region"] != "/abs/r.gpkg" {
			t.Errorf("table named %s: occurrences %v, region %v", name, st["occurrences"], st["region"])
		}
		if m, _ := st["model"].([]string); len(m) != 1 || m[0] != "m="+filepath.Join(dir, "oak", "m.tif") {
			t.Errorf("table named %s: model %v", name, st["model"])
		}
	}
}

// TestLoadBatchFromPipe: a table read from a pipe (areasweep batch
// <(...) --out DIR, or /dev/stdin) had its relative paths joined to
// /dev/fd or /dev, so every study failed with "/dev/fd/in/model.tif does
// not exist" (found by the batch audit of 2026-12-05). As for a study
// file read so, they are taken from the current folder, made absolute.
func TestLoadBatchFromPipe(t *testing.T) {
	wd := t.TempDir()
	t.Chdir(wd)
	fifo := filepath.Join(t.TempDir(), "table.csv")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Fatal(err)
	}
	go func() {
		f, err := os.OpenFile(fifo, os.O_WRONLY, 0)
		if err != nil {
			return
		}
		f.WriteString("id,model,occurrences,region\noak,m=in/m.tif,in/p.csv,/abs/r.gpkg\n")
		f.Close()
	}()
	b, err := LoadBatch(fifo)
	if err != nil {
		t.Fatal(err)
	}
	st := *b.Studies[0].Study
	if st["occurrences"] != filepath.Join(wd, "in", "p.csv") || st["region"] != "/abs/r.gpkg" {
		t.Errorf("occurrences %v, region %v; want them from the current folder %s", st["occurrences"], st["region"], wd)
	}
	if !StreamPath(fifo) || !StreamPath("/dev/stdin") || StreamPath(filepath.Join(wd)) {
		t.Errorf("StreamPath: a pipe, /dev/stdin and a folder read %v, %v, %v", StreamPath(fifo), StreamPath("/dev/stdin"), StreamPath(wd))
	}
}

// TestLoadBatchWrongFile: a missing table and a binary file given as the
// table are named with what to do, not with Go's or a decoder's words.
func TestLoadBatchWrongFile(t *testing.T) {
	dir := t.TempDir()
	_, err := LoadBatch(filepath.Join(dir, "nope.csv"))
	if err == nil || !strings.Contains(err.Error(), "nope.csv does not exist; check the path") || strings.Contains(err.Error(), "no such file") {
		t.Errorf("missing table: %v", err)
	}
	tif := filepath.Join(dir, "model.tif")
	if err := os.WriteFile(tif, []byte("II*\x00\x08\x00\x00\x00\xfa\x01"), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err = LoadBatch(tif)
	if !errors.Is(err, ErrBatchSyntax) || !strings.Contains(err.Error(), "binary file (a TIFF image, such as a GeoTIFF raster), not a study table") || strings.Contains(err.Error(), "Latin-1") {
		t.Errorf("GeoTIFF as the table: %v", err)
	}
}

// TestBatchNumberListSemicolons: in a comma-separated table a number list
// may be written with ';' between its items, the separator the NAME=PATH
// lists use, without quotes; "a, b" in quotes still reads; a bad item is
// named.
func TestBatchNumberListSemicolons(t *testing.T) {
	text := "id,model,occurrences,region,region-buffers,e\n" +
		"oak,gbm=a.tif,p.csv,r.gpkg,5; -10,0.05;0.1\n" +
		"elm,gbm=a.tif,p.csv,r.gpkg,\"5, -10\",0.05\n"
	b, err := ParseBatch([]byte(text), "t.csv", "", false)
	if err != nil {
		t.Fatal(err)
	}
	for i, want := range [][]float64{{5, -10}, {5, -10}} {
		if got := (*b.Studies[i].Study)["region-buffers"]; !reflect.DeepEqual(got, want) {
			t.Errorf("row %d: region-buffers %v, want %v", i+1, got, want)
		}
	}
	if got := (*b.Studies[0].Study)["e"]; !reflect.DeepEqual(got, []float64{0.05, 0.1}) {
		t.Errorf("e %v", got)
	}
	_, err = ParseBatch([]byte("id,model,occurrences,region,point-buffers\noak,gbm=a.tif,p.csv,r.gpkg,5;x\n"), "t.csv", "", false)
	if err == nil || !strings.Contains(err.Error(), "line 2") || !strings.Contains(err.Error(), "point-buffers") || !strings.Contains(err.Error(), "item 2") {
		t.Errorf("bad item: %v", err)
	}
}

// TestBatchCellExamples: a bad value in a study table's cell is answered
// with the cell's text to write, not with a study file's line (a cell of
// the seed column was told "write for example\n    seed: 42", one of the
// no-thin column "no-thin: true", one of the e column "e: [10, 25, 50]",
// values E does not take); the shared '#' lines, which are study-file
// lines, keep the study file's form.
func TestBatchCellExamples(t *testing.T) {
	for _, tc := range []struct {
		name, shared, column, cell string
		want                       []string
		not                        string
	}{
		{"seed", "", "seed", "x", []string{`"x" is not a whole number; write for example 42 in the cell`}, "seed: 42"},
		{"iterations", "", "iterations", "20.5", []string{`"20.5" is not a whole number; write for example 1000 in the cell`}, "iterations: 1000"},
		{"fraction", "", "fraction", "half", []string{`"half" is not a number; write for example 0.5 in the cell`}, "fraction: 0.5"},
		{"no-thin", "", "no-thin", "maybe", []string{`"maybe" is not true or false; write true or false in the cell`}, "no-thin: true"},
		{"e item", "", "e", "0.05;x", []string{`item 2: "x" is not a number; write for example 0.05;0.1 in the cell`}, "[10, 25, 50]"},
		{"e one value", "", "e", "x", []string{`"x" is not a finite number`, "0.05;0.1"}, "[10, 25, 50]"},
		{"region-buffers item", "", "region-buffers", "10;x", []string{"write for example 10;25;50 in the cell"}, "region-buffers: ["},
		{"shared line", "# seed: x\n", "", "", []string{"write for example\n    seed: 42"}, "in the cell"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			hdr, row := "id,model,occurrences,region", "oak,gbm=a.tif,p.csv,r.gpkg"
			if tc.column != "" {
				hdr += "," + tc.column
				row += "," + tc.cell
			}
			_, err := ParseBatch([]byte(tc.shared+hdr+"\n"+row+"\n"), "t.csv", "", false)
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("got %v\nwant it to hold %q", err, w)
				}
			}
			if strings.Contains(err.Error(), tc.not) {
				t.Errorf("got %v\nwant no %q", err, tc.not)
			}
		})
	}
}

// TestBatchLateSharedSetting: a '#' line that reads as a shared setting
// below the shared block (after a blank line, or after the header) is
// refused, naming its line: it was a comment, and the studies ran
// without it ("# iterations: 20" after a blank line ran 1000). A '##'
// comment, a '#' comment that is no setting, and the block at the top
// still read.
func TestBatchLateSharedSetting(t *testing.T) {
	const hdr = "id,model,occurrences,region\noak,gbm=a.tif,p.csv,r.gpkg\n"
	for _, tc := range []struct {
		name, text string
		line       int // 0: no error
	}{
		{"after a blank line", "# seed: 4\n\n# iterations: 20\n" + hdr, 3},
		{"after the header", "id,model,occurrences,region\n# iterations: 20\noak,gbm=a.tif,p.csv,r.gpkg\n", 2},
		{"after the rows", hdr + "# e: [0.1]\n", 3},
		{"models spelled so", hdr + "#models: gbm=b.tif\n", 3},
		{"CRLF", "# seed: 4\r\n\r\n# iterations: 20\r\n" + strings.ReplaceAll(hdr, "\n", "\r\n"), 3},
		{"double hash comment", hdr + "## iterations: 20 was too few\n", 0},
		{"plain comment", hdr + "# checked: by hand\n# note 2026-01-02\n", 0},
		{"block at the top", "# iterations: 20\n# seed: 4\n" + hdr, 0},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ParseBatch([]byte(tc.text), "t.csv", "", false)
			if tc.line == 0 {
				if err != nil {
					t.Fatal(err)
				}
				return
			}
			var es BatchErrors
			if !errors.As(err, &es) || len(es) != 1 || es[0].Line != tc.line || !errors.Is(es[0], ErrBatchSyntax) ||
				!strings.Contains(err.Error(), "reads as the shared setting") || !strings.Contains(err.Error(), "move it up") {
				t.Fatalf("got %v, want one error on line %d", err, tc.line)
			}
		})
	}
}

// TestBatchUnnamedColumns: columns without a name, as a spreadsheet
// exports the empty columns right of a table ("id,...,region,,"), are
// ignored while their cells are empty (they were refused as column ""
// that is not a study key); a cell with text under one is refused,
// naming its line, study and column number.
func TestBatchUnnamedColumns(t *testing.T) {
	b, err := ParseBatch([]byte("# seed: 4\nid,model,occurrences,region,,\noak,gbm=a.tif,p.csv,r.gpkg,,\nfir,gbm=b.tif,p.csv,r.gpkg, ,\n"), "t.csv", "", false)
	if err != nil || len(b.Studies) != 2 || (*b.Studies[1].Study)["model"].([]string)[0] != "gbm=b.tif" {
		t.Fatalf("empty unnamed columns: %v", err)
	}
	_, err = ParseBatch([]byte("id,model,occurrences,region,,\noak,gbm=a.tif,p.csv,r.gpkg,,\nfir,gbm=b.tif,p.csv,r.gpkg,,note\n"), "t.csv", "", false)
	var es BatchErrors
	if !errors.As(err, &es) || len(es) != 1 || es[0].Line != 3 || !errors.Is(es[0], ErrBatchColumn) ||
		!strings.Contains(err.Error(), `study "fir"`) || !strings.Contains(err.Error(), `column 6 has no name in the header but holds "note"`) {
		t.Fatalf("text under an unnamed column: %v", err)
	}
}

// TestBatchGivenOccurrences: an occurrence table given to batch is named
// as one (it was refused column by column: "the first column must be id,
// found longitude", then each other column as no study key).
func TestBatchGivenOccurrences(t *testing.T) {
	for _, text := range []string{"longitude,latitude,role\n1,2,train\n", "lon;lat\n1;2\n"} {
		_, err := ParseBatch([]byte(text), "occ.csv", "", false)
		var es BatchErrors
		if !errors.As(err, &es) || len(es) != 1 || !strings.Contains(err.Error(), "this is an occurrence table") || !strings.Contains(err.Error(), "areasweep run --occurrences") {
			t.Errorf("%q: %v", text, err)
		}
	}
}

// TestBatchDecimalCommaList: in a table delimited by semicolons or tabs
// (as a spreadsheet writes where the decimal separator is a comma), a
// number-list cell with one comma, "0,05" or "12,5", is refused with both
// readings, line and column; it was read as the list 0 and 5 (refused as
// "e value 0 is outside (0,1)") or, for a buffer, silently as 12 and 5 km
// (the batch audit). Two commas or more are a list; a ';' list, a dot and
// a comma-delimited table's quoted list read as before.
func TestBatchDecimalCommaList(t *testing.T) {
	for _, c := range []struct {
		name, text string
		want       []string // in the error; nil: parses
		key        string
		list       []float64
	}{
		{"e semicolons", "id;model;occurrences;region;e\noak;g=a.tif;p.csv;r.gpkg;0,05\n",
			[]string{"t.csv", "line 2", `"0,05" in a table delimited by semicolons could be a number with a decimal comma (0.05) or a list (0 and 05); write 0.05 for the number, or "0;05" for the list`}, "", nil},
		{"buffer tabs", "id\tmodel\toccurrences\tregion\tregion-buffers\noak\tg=a.tif\tp.csv\tr.gpkg\t12,5\n",
			[]string{"line 2", "region-buffers", `(12.5) or a list (12 and 5); write 12.5 for the number, or 12;5 for the list`}, "", nil},
		{"three items", "id;model;occurrences;region;region-buffers\noak;g=a.tif;p.csv;r.gpkg;10,25,50\n", nil, "region-buffers", []float64{10, 25, 50}},
		{"semicolon list", "id;model;occurrences;region;region-buffers\noak;g=a.tif;p.csv;r.gpkg;\"12;5\"\n", nil, "region-buffers", []float64{12, 5}},
		{"dot", "id;model;occurrences;region;e\noak;g=a.tif;p.csv;r.gpkg;0.05\n", nil, "e", []float64{0.05}},
		{"comma table", "id,model,occurrences,region,region-buffers\noak,g=a.tif,p.csv,r.gpkg,\"12,5\"\n", nil, "region-buffers", []float64{12, 5}},
	} {
		b, err := ParseBatch([]byte(c.text), "t.csv", "", false)
		if c.want != nil {
			if err == nil {
				t.Errorf("%s: parsed: %+v", c.name, *b.Studies[0].Study)
				continue
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("%s: %q lacks %q", c.name, err, w)
				}
			}
			continue
		}
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if got, _ := (*b.Studies[0].Study)[c.key].([]float64); !slices.Equal(got, c.list) {
			t.Errorf("%s: %s = %v, want %v", c.name, c.key, got, c.list)
		}
	}
}
