package main

import (
	"bytes"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestRunFlags checks argv -> RunOptions: defaults, flags, the study file
// under the flags, and validation messages (by construction).
func TestRunFlags(t *testing.T) {
	dir := t.TempDir()
	study := filepath.Join(dir, "study.yaml")
	os.WriteFile(study, []byte("model:\n  - a=a.tif\noccurrences: occ.csv\nregion: r.gpkg\ne: [0.1, 0.2]\niterations: 77\nregion-buffers: [-10, 20]\nseed: 5\n"), 0o644)
	cases := []struct {
		name  string
		args  []string
		check func(t *testing.T, o *RunOptions)
		err   string
	}{
		{"defaults", []string{"--model", "m=x.tif", "--occurrences", "o.csv", "--region", "r.gpkg"}, func(t *testing.T, o *RunOptions) {
			if o.Iterations != 1000 || o.Fraction != 0.5 || !reflect.DeepEqual(o.E, []float64{0.05}) || o.Out != "areasweep-out" {
				t.Errorf("defaults %+v", o)
			}
		}, ""},
		{"study file", []string{"--study", study}, func(t *testing.T, o *RunOptions) {
			if o.Iterations != 77 || o.Seed != 5 || !reflect.DeepEqual(o.E, []float64{0.1, 0.2}) || !reflect.DeepEqual(o.RegionBuffers, []float64{-10, 20}) {
				t.Errorf("study values not applied: %+v", o)
			}
			if o.Models[0] != "a="+filepath.Join(dir, "a.tif") || o.Occurrences != filepath.Join(dir, "occ.csv") {
				t.Errorf("paths not resolved against the study file: %v %s", o.Models, o.Occurrences)
			}
		}, ""},
		{"flags override study", []string{"--study", study, "--iterations", "9", "--e", "0.3", "--region-buffers=-5,5"}, func(t *testing.T, o *RunOptions) {
			if o.Iterations != 9 || !reflect.DeepEqual(o.E, []float64{0.3}) || !reflect.DeepEqual(o.RegionBuffers, []float64{-5, 5}) || o.Seed != 5 {
				t.Errorf("override %+v", o)
			}
		}, ""},
		{"no model", []string{"--occurrences", "o.csv", "--region", "r.gpkg"}, nil, "no model given"},
		{"duplicate model", []string{"--model", "m=a.tif", "--model", "m=b.tif", "--occurrences", "o", "--region", "r"}, nil, "given twice"},
		{"bad fraction", []string{"--model", "m=a.tif", "--occurrences", "o", "--region", "r", "--fraction", "1.5"}, nil, "--fraction 1.5 is outside (0,1]"},
		{"negative point buffer", []string{"--model", "m=a.tif", "--occurrences", "o", "--region", "r", "--point-buffers=-5"}, nil, "must be positive"},
		{"nulls", []string{"--model", "m=a.tif", "--null", "effort=e.tif", "--no-distance-null", "--occurrences", "o", "--region", "r"}, func(t *testing.T, o *RunOptions) {
			if !reflect.DeepEqual(o.Nulls, []string{"effort=e.tif"}) || !o.NoDistanceNull {
				t.Errorf("nulls %+v", o)
			}
		}, ""},
		{"null named like a model", []string{"--model", "m=a.tif", "--null", "m=b.tif", "--occurrences", "o", "--region", "r"}, nil, "already used by a model"},
		{"model names differing in case", []string{"--model", "A=a.tif", "--model", "a=b.tif", "--occurrences", "o", "--region", "r"}, nil, "differ only in case"},
		{"null named like a model but for case", []string{"--model", "m=a.tif", "--null", "M=b.tif", "--occurrences", "o", "--region", "r"}, nil, "differs only in case"},
		{"reserved null name", []string{"--model", "distance_null=a.tif", "--occurrences", "o", "--region", "r"}, nil, `--model: the name "distance_null" is kept for the distance-only null; rename that model`},
		{"reserved null name for a null", []string{"--model", "m=a.tif", "--null", "distance_null=b.tif", "--occurrences", "o", "--region", "r"}, nil, `--null: the name "distance_null" is kept for the distance-only null; rename that null`},
		// From the study file: named with the file and key, as the other
		// names are (it said "rename that model" with no word of the file).
		{"reserved null name in the study file", []string{"--study", write(t, dir, "dn.yaml", "model:\n  - distance_null=a.tif\noccurrences: o.csv\nregion: r.gpkg\n")}, nil,
			"kept for the distance-only null; rename that model (or add --no-distance-null) (the value comes from the study file " + filepath.Join(dir, "dn.yaml") + ", key model)"},
		{"extra names differing in case", []string{"--model", "m=a.tif", "--extra", "Lake=a.gpkg", "--extra", "lake=b.gpkg", "--occurrences", "o", "--region", "r"}, nil, `names "Lake" and "lake" differ only in case`},
		{"extra name twice", []string{"--model", "m=a.tif", "--extra", "lake=a.gpkg", "--extra", "lake=b.gpkg", "--occurrences", "o", "--region", "r"}, nil, `name "lake" is given twice`},
		// A whole number in exponent or decimal form, as the study file
		// takes it (inputs.ParseWhole).
		{"iterations in exponent form", []string{"--model", "m=a.tif", "--occurrences", "o", "--region", "r", "--iterations", "1e3", "--ecoregion-min-points", "4.0"}, func(t *testing.T, o *RunOptions) {
			if o.Iterations != 1000 || o.EcoregionMinPoints != 4 {
				t.Errorf("--iterations 1e3 gave %d, --ecoregion-min-points 4.0 gave %d", o.Iterations, o.EcoregionMinPoints)
			}
		}, ""},
		// Leading zeros mean nothing: pflag's own int flags and YAML's
		// resolver read 0701 as octal 449.
		{"leading zeros", []string{"--model", "m=a.tif", "--occurrences", "o", "--region", "r", "--seed", "0701", "--iterations", "010"}, func(t *testing.T, o *RunOptions) {
			if o.Seed != 701 || o.Iterations != 10 {
				t.Errorf("--seed 0701 gave %d, --iterations 010 gave %d", o.Seed, o.Iterations)
			}
		}, ""},
		{"leading zeros in the study file", []string{"--study", write(t, dir, "zeros.yaml", "model:\n  - a=a.tif\noccurrences: o.csv\nregion: r.gpkg\nseed: 0701\niterations: 010\n")}, func(t *testing.T, o *RunOptions) {
			if o.Seed != 701 || o.Iterations != 10 {
				t.Errorf("seed: 0701 gave %d, iterations: 010 gave %d", o.Seed, o.Iterations)
			}
		}, ""},
		{"study file in exponent form", []string{"--study", write(t, dir, "exp.yaml", "model:\n  - a=a.tif\noccurrences: o.csv\nregion: r.gpkg\niterations: 2e2\n")}, func(t *testing.T, o *RunOptions) {
			if o.Iterations != 200 {
				t.Errorf("iterations: 2e2 gave %d", o.Iterations)
			}
		}, ""},
		{"unknown study key", []string{"--study", write(t, dir, "bad.yaml", "modle: x\n")}, nil, "modle"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var got *RunOptions
			var out, errOut bytes.Buffer
			cmd := newRunCmd(&IO{Out: &out, ErrOut: &errOut}, func(o *RunOptions) error { got = o; return nil })
			cmd.SetArgs(c.args)
			cmd.SetOut(&out)
			cmd.SetErr(&errOut)
			err := cmd.Execute()
			if c.err != "" {
				if err == nil || !strings.Contains(err.Error(), c.err) {
					t.Fatalf("error %v, want %q", err, c.err)
				}
				if !fault.IsBadInput(err) {
					t.Errorf("error %v is not an input error (exit 2)", err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			c.check(t, got)
		})
	}
}

func write(t *testing.T, dir, name, body string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestHelpHasExamples: every command's --help shows a worked example.
func TestHelpHasExamples(t *testing.T) {
	for _, name := range []string{"run", "extents", "report", "demo", "version"} {
		var out bytes.Buffer
		code := Main([]string{name, "--help"}, nil, &out, &out)
		if code != 0 || !strings.Contains(out.String(), "Examples:") || !strings.Contains(out.String(), "areasweep "+name) {
			t.Errorf("%s --help (exit %d) has no worked example:\n%s", name, code, out.String())
		}
	}
}

// TestMergeHelpNamesBuild: merge --help says the shards must come from one
// build, as the merge checks (README, Shards). Before, it named only the
// version, so shards of one version number rebuilt between two tasks,
// which the merge refuses, looked mergeable from the help.
func TestMergeHelpNamesBuild(t *testing.T) {
	var out bytes.Buffer
	if code := Main([]string{"merge", "--help"}, nil, &out, &out); code != 0 {
		t.Fatalf("merge --help: exit %d\n%s", code, out.String())
	}
	help := strings.Join(strings.Fields(out.String()), " ")
	for _, want := range []string{"same areasweep version and build", "with one executable (or copies of it)"} {
		if !strings.Contains(help, want) {
			t.Errorf("merge --help lacks %q:\n%s", want, out.String())
		}
	}
}

// TestEmptyArguments: an empty folder for report, and a table given with
// batch --template (which prints one and read none), are refused in
// words: the first said "areasweep:  does not exist", the second was
// ignored.
func TestEmptyArguments(t *testing.T) {
	study := write(t, t.TempDir(), "s.yaml", "model:\n  - a=a.tif\noccurrences: o.csv\nregion: r.gpkg\n")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"report", ""}, "the folder to report on is empty"},
		{[]string{"batch", "--template", "mine.csv"}, `--template prints an example table and takes no table, got "mine.csv"`},
		// An empty path flag (a shell variable left unset) read as not
		// given: over a study file's value it said "no occurrences
		// given", or dropped the study's ecoregions without a word.
		{[]string{"run", "--study", study, "--occurrences", ""}, "--occurrences is empty; name a file, or leave the flag out (a study file's value is then used)"},
		{[]string{"run", "--study", study, "--ecoregions="}, "--ecoregions is empty"},
		{[]string{"run", "--study", ""}, "--study is empty; name a study file"},
		{[]string{"extents", "--study", study, "--region", ""}, "--region is empty"},
	} {
		out, se, code := runBin(t, c.args...)
		if code != 2 || !strings.Contains(se, c.want) || out != "" {
			t.Errorf("%q: exit %d, stdout %q, stderr %q; want 2 and %q", c.args, code, out, se, c.want)
		}
	}
}
