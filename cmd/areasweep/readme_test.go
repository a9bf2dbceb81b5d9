package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"sort"
	"strings"
	"testing"
	"unicode"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"areasweep/report"
)

// The README is followed literally by users and outside checkers. These
// tests hold it to the program: its flags, its flag tables (placeholder
// and default), the command lines it shows, the results.json fields it
// lists against the report.Results type, and the file names and CSV
// headers it lists against a real run. (cmd/internal/settings checks the
// run flag table and the study-file keys against the settings table.)

// otherToolFlags are double-dash options the README names that belong to
// other programs, with the program.
var otherToolFlags = map[string]string{
	"mem":         "sbatch (the array task's memory request)",
	"dependency":  "sbatch (the merge job waits for the array)",
	"array":       "sbatch (the tasks resubmitted)",
	"test":        "scripts/setup.sh (the test set-up)",
	"single-line": "gdalsrsinfo (a .prj GDAL reads: one line, without the blank line it writes first)",
}

func readREADME(t *testing.T) string {
	t.Helper()
	b, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// cliCommands returns every command of the areasweep command line by its
// path without "areasweep" ("" is the root, "completion bash" a
// subcommand), the help and completion commands included.
func cliCommands() map[string]*cobra.Command {
	root := newRootCmd(&IO{In: strings.NewReader(""), Out: io.Discard, ErrOut: io.Discard})
	root.InitDefaultHelpCmd()
	root.InitDefaultHelpFlag()
	root.InitDefaultVersionFlag()
	cmds := map[string]*cobra.Command{}
	var walk func(c *cobra.Command)
	walk = func(c *cobra.Command) {
		c.InitDefaultHelpFlag()
		path := strings.TrimSpace(strings.TrimPrefix(c.CommandPath(), "areasweep"))
		cmds[path] = c
		for _, s := range c.Commands() {
			walk(s)
		}
	}
	walk(root)
	return cmds
}

// cmdFlags are the flags a command accepts: its own and the ones it
// inherits.
func cmdFlags(c *cobra.Command) map[string]*pflag.Flag {
	m := map[string]*pflag.Flag{}
	c.Flags().VisitAll(func(f *pflag.Flag) { m[f.Name] = f })
	c.InheritedFlags().VisitAll(func(f *pflag.Flag) { m[f.Name] = f })
	return m
}

var (
	flagToken = regexp.MustCompile(`(^|[^A-Za-z0-9_#-])--([A-Za-z][A-Za-z0-9-]*)`)
	codeSpan  = regexp.MustCompile("`([^`\n]+)`")
	linkPart  = regexp.MustCompile(`\]\([^)]*\)`)
	headingRe = regexp.MustCompile("(?m)^#{2,4} .*$")
	// flagRow is a flag table's row: "| `--name ...` |".
	flagRow = regexp.MustCompile("(?m)^\\| `--([A-Za-z][A-Za-z0-9-]*)")
	// sensHeading is a field heading below sensitivity: "`spreads[]`: ...".
	sensHeading = regexp.MustCompile("^`([a-z_]+)(\\[\\])?`(:|$)")
)

// readmeCommandLines returns the areasweep command lines the README shows:
// the lines of its sh code blocks (continuations joined) and the inline
// code spans that start with "areasweep ".
func readmeCommandLines(readme string) []string {
	var lines []string
	inSh, inBlock := false, false
	cont := ""
	for _, l := range strings.Split(readme, "\n") {
		if strings.HasPrefix(l, "```") {
			inBlock = !inBlock
			inSh = inBlock && strings.TrimPrefix(l, "```") == "sh"
			continue
		}
		if inSh {
			l = cont + strings.TrimSpace(l)
			if strings.HasSuffix(l, "\\") {
				cont = strings.TrimSuffix(l, "\\") + " "
				continue
			}
			cont = ""
			if i := strings.Index(l, " #"); i >= 0 {
				l = l[:i]
			}
			if strings.HasPrefix(l, "areasweep ") {
				lines = append(lines, l)
			}
			continue
		}
		if inBlock {
			continue
		}
		for _, m := range codeSpan.FindAllStringSubmatch(l, -1) {
			if strings.HasPrefix(m[1], "areasweep ") {
				lines = append(lines, m[1])
			}
		}
	}
	return lines
}

// commandOf finds the command a command line runs: the longest command
// path its leading words name.
func commandOf(cmds map[string]*cobra.Command, line string) (string, *cobra.Command) {
	words := strings.Fields(strings.TrimPrefix(line, "areasweep"))
	best := ""
	for n := 1; n <= len(words); n++ {
		p := strings.Join(words[:n], " ")
		if _, ok := cmds[p]; ok {
			best = p
		}
	}
	return best, cmds[best]
}

// checkREADMEFlags returns what in readme does not match the command
// line cmds: a --flag no command has, a command line using a flag its
// command lacks, a command's flag the README never names, and a row of a
// flag table whose placeholder or default differs from the flag's.
func checkREADMEFlags(readme string, cmds map[string]*cobra.Command) []string {
	var problems []string
	all := map[string]bool{}
	for _, c := range cmds {
		for n := range cmdFlags(c) {
			all[n] = true
		}
	}
	named := map[string]bool{}
	for _, m := range flagToken.FindAllStringSubmatch(linkPart.ReplaceAllString(readme, "]"), -1) {
		name := m[2]
		named[name] = true
		if !all[name] && otherToolFlags[name] == "" {
			problems = append(problems, fmt.Sprintf("README names --%s, which no areasweep command has (nor is it a listed flag of another tool)", name))
		}
	}

	// Command lines: each flag must be one of that command's.
	for _, l := range readmeCommandLines(readme) {
		path, c := commandOf(cmds, l)
		if c == nil {
			problems = append(problems, fmt.Sprintf("README command line %q runs no areasweep command", l))
			continue
		}
		fl := cmdFlags(c)
		for _, m := range flagToken.FindAllStringSubmatch(l, -1) {
			if _, ok := fl[m[2]]; !ok {
				problems = append(problems, fmt.Sprintf("README command line %q: 'areasweep %s' has no flag --%s", l, path, m[2]))
			}
		}
	}

	// Every flag of every command is named somewhere, and listed where a
	// user looks flags up: the Commands and options section, or a flag
	// table's row (batch's is under Many studies).
	listed := map[string]bool{}
	if i := strings.Index(readme, "\n## Commands and options\n"); i >= 0 {
		sec := readme[i+1:]
		if j := strings.Index(sec, "\n## "); j >= 0 {
			sec = sec[:j]
		}
		for _, m := range flagToken.FindAllStringSubmatch(linkPart.ReplaceAllString(sec, "]"), -1) {
			listed[m[2]] = true
		}
	}
	for _, m := range flagRow.FindAllStringSubmatch(readme, -1) {
		listed[m[1]] = true
	}
	var paths []string
	for p := range cmds {
		paths = append(paths, p)
	}
	sort.Strings(paths)
	for _, p := range paths {
		cmds[p].Flags().VisitAll(func(f *pflag.Flag) {
			switch {
			case f.Hidden || f.Name == "help":
			case !named[f.Name]:
				problems = append(problems, fmt.Sprintf("'areasweep %s' has flag --%s, which README.md never names", p, f.Name))
			case !listed[f.Name]:
				problems = append(problems, fmt.Sprintf("'areasweep %s' has flag --%s, which neither README's Commands and options section nor a flag table lists", p, f.Name))
			}
		})
	}

	// Flag tables (header "| flag | default | meaning |") under a heading
	// naming `areasweep CMD`: one row per flag of CMD, each with CMD's
	// placeholder and default.
	heads := headingRe.FindAllStringIndex(readme, -1)
	for i, h := range heads {
		end := len(readme)
		if i+1 < len(heads) {
			end = heads[i+1][0]
		}
		title := readme[h[0]:h[1]]
		sec := readme[h[1]:end]
		if !strings.Contains(sec, "\n| flag | default | meaning |") {
			continue
		}
		m := regexp.MustCompile("`areasweep ([a-z]+)`").FindStringSubmatch(title)
		if m == nil {
			problems = append(problems, fmt.Sprintf("flag table under %q: the heading names no `areasweep CMD`", title))
			continue
		}
		c := cmds[m[1]]
		if c == nil {
			problems = append(problems, fmt.Sprintf("flag table under %q: no command %s", title, m[1]))
			continue
		}
		fl := cmdFlags(c)
		rows := map[string]bool{}
		for _, line := range strings.Split(sec, "\n") {
			if !strings.HasPrefix(line, "| `--") {
				continue
			}
			cells := strings.Split(line, "|")
			name, arg, _ := strings.Cut(strings.TrimPrefix(strings.Trim(strings.TrimSpace(cells[1]), "`"), "--"), " ")
			rows[name] = true
			f, ok := fl[name]
			if !ok {
				problems = append(problems, fmt.Sprintf("flag table of 'areasweep %s': no flag --%s", m[1], name))
				continue
			}
			if want, _ := pflag.UnquoteUsage(f); f.Value.Type() != "bool" && arg != want {
				problems = append(problems, fmt.Sprintf("flag table of 'areasweep %s': --%s shown with %q, the command's help with %q", m[1], name, arg, want))
			}
			def := strings.TrimSpace(cells[2])
			if strings.HasPrefix(def, "`") {
				got := strings.Trim(def, "`")
				want := strings.Trim(f.DefValue, "[]\"")
				if got != want {
					problems = append(problems, fmt.Sprintf("flag table of 'areasweep %s': --%s default %s, the command's %q", m[1], name, def, f.DefValue))
				}
			} else if z := map[string]bool{"": true, "0": true, "false": true, "[]": true}; !z[f.DefValue] {
				problems = append(problems, fmt.Sprintf("flag table of 'areasweep %s': --%s default %q in words, the command's is %q", m[1], name, def, f.DefValue))
			}
		}
		c.Flags().VisitAll(func(f *pflag.Flag) {
			if !f.Hidden && f.Name != "help" && !rows[f.Name] {
				problems = append(problems, fmt.Sprintf("flag table of 'areasweep %s' lacks --%s", m[1], f.Name))
			}
		})
	}

	// The rows of the "Other commands" table: a `--flag VALUE` named after
	// the word "default" is that command's default.
	for _, line := range strings.Split(readme, "\n") {
		if !strings.HasPrefix(line, "| `areasweep ") {
			continue
		}
		path, c := commandOf(cmds, strings.Trim(strings.TrimSpace(strings.Split(line, "|")[1]), "`"))
		i := strings.Index(strings.ToLower(line), "default")
		if c == nil || i < 0 {
			continue
		}
		fl := cmdFlags(c)
		for _, m := range codeSpan.FindAllStringSubmatch(line[i:], -1) {
			name, val, ok := strings.Cut(strings.TrimPrefix(m[1], "--"), " ")
			if f := fl[name]; ok && strings.HasPrefix(m[1], "--") && f != nil && f.DefValue != val {
				problems = append(problems, fmt.Sprintf("README gives 'areasweep %s' the default %s, the command's is %q", path, m[1], f.DefValue))
			}
		}
	}
	return problems
}

func TestREADMEFlags(t *testing.T) {
	for _, p := range checkREADMEFlags(readREADME(t), cliCommands()) {
		t.Error(p)
	}
}

// TestREADMEFlagCheckFails checks that the flag check catches a misspelt
// flag, a flag given to the wrong command, a wrong default in a flag
// table, and a flag the README stops naming.
func TestREADMEFlagCheckFails(t *testing.T) {
	readme := readREADME(t)
	cmds := cliCommands()
	for _, c := range []struct{ old, new, want string }{
		{"--iterations 1000 --seed 7", "--iteratons 1000 --seed 7", "--iteratons"},
		{"areasweep merge --out results", "areasweep merge --seed 3 --out results", "'areasweep merge' has no flag --seed"},
		{"| `--jobs N` | `1` |", "| `--jobs N` | `2` |", "--jobs default `2`"},
		{"--scenario-seed", "--scenario", "--scenario-seed, which README.md never names"},
		{"`--scenario-seed 20261201`", "`--scenario-seed 1`", "the default --scenario-seed 1"},
		{"add `--no-descriptions` to leave out", "add the flag to leave out", "--no-descriptions, which README.md never names"},
		{"| `--summary-only` | off |", "| `--summary-onIy` | off |", "--summary-only, which neither README's Commands and options section nor a flag table lists"},
	} {
		if !strings.Contains(readme, c.old) {
			t.Fatalf("README no longer holds %q: update this test", c.old)
		}
		bad := strings.ReplaceAll(readme, c.old, c.new)
		found := false
		for _, p := range checkREADMEFlags(bad, cmds) {
			found = found || strings.Contains(p, c.want)
		}
		if !found {
			t.Errorf("README with %q for %q: the check did not report %q", c.new, c.old, c.want)
		}
	}
}

// readmeFieldTables returns the results.json field tables of the README:
// the field path of each table and the field names of its first column
// ("metrics[]" read as "metrics"). A table belongs to the heading above
// it: a bold "**`path`**" ("**Top level" is the top level), or, below the
// sensitivity heading, a line starting "`name`" for "sensitivity.name".
// meanings holds each row's meaning cell by "path.field".
func readmeFieldTables(readme string) (tables map[string][]string, meanings map[string]string) {
	sec := readme[strings.Index(readme, "### results.json"):]
	sec = sec[:strings.Index(sec, "\n### scores.csv")]
	tables, meanings = map[string][]string{}, map[string]string{}
	path, open, inTable, parent := "", false, false, ""
	for _, l := range strings.Split(sec, "\n") {
		isRow := strings.HasPrefix(l, "|")
		switch {
		case strings.HasPrefix(l, "**Top level"):
			path, open, parent = "", true, ""
		case strings.HasPrefix(l, "**`"):
			p := l[3:]
			path, open = p[:strings.Index(p, "`")], true
			parent = strings.Split(path, ".")[0]
		case strings.HasPrefix(l, "**"):
			open = false
		case sensHeading.MatchString(l) && parent == "sensitivity":
			path, open = "sensitivity."+sensHeading.FindStringSubmatch(l)[1], true
		case open && isRow && strings.HasPrefix(l, "| `"):
			cells := strings.Split(l, "|")
			for _, m := range codeSpan.FindAllStringSubmatch(cells[1], -1) {
				f := strings.TrimSuffix(m[1], "[]")
				tables[path] = append(tables[path], f)
				meanings[strings.TrimPrefix(path+"."+f, ".")] = strings.Join(cells[2:], "|")
			}
		case !isRow && inTable:
			open = false // one table per heading
		}
		inTable = isRow
	}
	return tables, meanings
}

// jsonFields returns the JSON names of the fields of the type at path
// ("scores[].partial_roc[]") below t.
func jsonFields(t reflect.Type, path string) ([]string, error) {
	elem := func(t reflect.Type) reflect.Type {
		for t.Kind() == reflect.Pointer || t.Kind() == reflect.Slice || t.Kind() == reflect.Map {
			t = t.Elem()
		}
		return t
	}
	t = elem(t)
	if path != "" {
		for _, part := range strings.Split(path, ".") {
			part = strings.TrimSuffix(part, "[]")
			var next reflect.Type
			for i := 0; i < t.NumField(); i++ {
				if name, _, _ := strings.Cut(t.Field(i).Tag.Get("json"), ","); name == part {
					next = elem(t.Field(i).Type)
				}
			}
			if next == nil || next.Kind() != reflect.Struct {
				return nil, fmt.Errorf("%s: no object field %q in %s", path, part, t)
			}
			t = next
		}
	}
	var names []string
	for i := 0; i < t.NumField(); i++ {
		if name, _, _ := strings.Cut(t.Field(i).Tag.Get("json"), ","); name != "" && name != "-" {
			names = append(names, name)
		}
	}
	return names, nil
}

// checkREADMEResults compares every results.json field table of readme
// with the report.Results type: each named field exists at that place,
// and each field of the type is listed.
func checkREADMEResults(readme string) []string {
	var problems []string
	tables, meanings := readmeFieldTables(readme)
	for _, must := range []string{"", "settings", "inputs[]", "grid", "models[]", "scores[]"} {
		if _, ok := tables[must]; !ok {
			problems = append(problems, fmt.Sprintf("README lost the results.json field table of %q", must))
		}
	}
	for path, listed := range tables {
		fields, err := jsonFields(reflect.TypeFor[report.Results](), path)
		if err != nil {
			problems = append(problems, fmt.Sprintf("README results.json table: %v", err))
			continue
		}
		have := map[string]bool{}
		for _, f := range fields {
			have[f] = true
		}
		seen := map[string]bool{}
		for _, f := range listed {
			seen[f] = true
			if !have[f] {
				problems = append(problems, fmt.Sprintf("README results.json table %q lists %q, which report.Results has not there", path, f))
			}
		}
		for _, f := range fields {
			if !seen[f] {
				problems = append(problems, fmt.Sprintf("README results.json table %q lacks field %q", path, f))
			}
		}
	}
	problems = append(problems, checkREADMEInnerFields(tables, meanings)...)
	sort.Strings(problems)
	return problems
}

// checkREADMEInnerFields checks the rows of the results.json tables below
// the top level whose field holds objects without a table of their own
// (sensitivity.metrics[], above_null[].gaps[], chains[].slope, ...):
// the row's meaning must name each of their fields as `name`.
func checkREADMEInnerFields(tables map[string][]string, meanings map[string]string) []string {
	var problems []string
	own := map[string]bool{}
	for path := range tables {
		own[strings.ReplaceAll(path, "[]", "")] = true
	}
	for path, listed := range tables {
		if path == "" {
			continue // each top-level field has its section below
		}
		for _, f := range listed {
			sub := path + "." + f
			if own[strings.ReplaceAll(sub, "[]", "")] {
				continue
			}
			inner, err := jsonFields(reflect.TypeFor[report.Results](), sub)
			if err != nil {
				continue // not an object
			}
			for _, name := range inner {
				if m := meanings[sub]; !strings.Contains(m, "`"+name+"`") && !strings.Contains(m, "`"+name+"[]`") {
					problems = append(problems, fmt.Sprintf("README results.json table %q: the row of %q does not name its field %q", path, f, name))
				}
			}
		}
	}
	return problems
}

func TestREADMEResultsFields(t *testing.T) {
	for _, p := range checkREADMEResults(readREADME(t)) {
		t.Error(p)
	}
}

// TestREADMEFieldCheckFails checks that the field check sees a misnamed
// field, and a field of a row's objects that its meaning leaves out.
func TestREADMEFieldCheckFails(t *testing.T) {
	readme := readREADME(t)
	const old = "| `iterations` |"
	if !strings.Contains(readme, old) {
		t.Fatalf("README no longer holds %q: update this test", old)
	}
	p := strings.Join(checkREADMEResults(strings.Replace(readme, old, "| `iteration` |", 1)), "\n")
	if !strings.Contains(p, `lists "iteration"`) || !strings.Contains(p, `lacks field "iterations"`) {
		t.Errorf("a misnamed settings field was not reported: %s", p)
	}
	// A field of objects listed in a row's meaning (sensitivity.metrics[]).
	const inner = "`higher_is_better`, `tolerance` |"
	if !strings.Contains(readme, inner) {
		t.Fatalf("README no longer holds %q: update this test", inner)
	}
	p = strings.Join(checkREADMEResults(strings.Replace(readme, inner, "`tolerance` |", 1)), "\n")
	if !strings.Contains(p, `the row of "metrics" does not name its field "higher_is_better"`) {
		t.Errorf("a field left out of sensitivity.metrics[]'s row was not reported: %s", p)
	}
}

func csvHeader(t *testing.T, path string) []string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	h, err := csv.NewReader(f).Read()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return h
}

// readmeList returns the comma-separated list in the first code span
// after intro in the README, e.g. "`a, b, c`".
func readmeList(t *testing.T, readme, intro string) []string {
	t.Helper()
	i := strings.Index(readme, intro)
	if i < 0 {
		t.Fatalf("README no longer says %q", intro)
	}
	m := codeSpan.FindStringSubmatch(strings.ReplaceAll(readme[i+len(intro):], "\n", " "))
	if m == nil {
		t.Fatalf("no code span after %q in README", intro)
	}
	var out []string
	for _, p := range strings.Split(m[1], ",") {
		out = append(out, strings.TrimSpace(p))
	}
	return out
}

// TestREADMEOutputs runs a small study, its extents and a one-study batch
// and compares what they write with the README: the files in --out, the
// columns of scores.csv, extents.csv and summary.csv, and the exit codes.
func TestREADMEOutputs(t *testing.T) {
	readme := readREADME(t)
	s := newSmallStudy(t)
	out := filepath.Join(t.TempDir(), "out")
	if _, se, code := runBin(t, s.args(out)...); code != 0 {
		t.Fatalf("run: exit %d\n%s", code, se)
	}

	// Files in --out.
	sec := readme[strings.Index(readme, "### Files in `--out`"):]
	sec = sec[:strings.Index(sec, "\n\n`report.html`")]
	listed := map[string]bool{}
	for _, l := range strings.Split(sec, "\n") {
		if strings.HasPrefix(l, "| `") {
			listed[strings.TrimSuffix(strings.Trim(strings.TrimSpace(strings.Split(l, "|")[1]), "`"), "/")] = true
		}
	}
	entries, err := os.ReadDir(out)
	if err != nil {
		t.Fatal(err)
	}
	wrote := map[string]bool{}
	for _, e := range entries {
		wrote[e.Name()] = true
		if !listed[e.Name()] {
			t.Errorf("run wrote %s, which README's Files in --out does not list", e.Name())
		}
	}
	for f := range listed {
		if !wrote[f] && f != "inputs" { // inputs/: demo only
			t.Errorf("README lists %s in --out; a run with --membership-tif did not write it", f)
		}
	}

	// scores.csv.
	want := readmeList(t, readme, "One row per model, extent and value, for scored pairs only. The columns are\n")
	if got := csvHeader(t, filepath.Join(out, "scores.csv")); !reflect.DeepEqual(got, want) {
		t.Errorf("scores.csv header %v, README %v", got, want)
	}

	// scores.csv metrics and rules: each written one is in README's
	// table, each the table names is written (the null's name read as
	// <NULL>; "…_se" after "a_minus_<NULL>" is "a_minus_<NULL>_se").
	sc := readme[strings.Index(readme, "### scores.csv"):]
	sc = sc[strings.Index(sc, "| metric |"):]
	sc = sc[:strings.Index(sc, "\n\n")]
	documented := map[string]bool{}
	last := ""
	for _, l := range strings.Split(sc, "\n") {
		if !strings.HasPrefix(l, "| `") {
			continue
		}
		cells := strings.Split(l, "|")
		for _, cell := range []string{cells[1], cells[3]} {
			cell = regexp.MustCompile(`\([^)]*\)`).ReplaceAllString(cell, "") // prose
			for _, m := range codeSpan.FindAllStringSubmatch(cell, -1) {
				n := m[1]
				if strings.HasPrefix(n, "…") && last != "" {
					n = last + strings.TrimPrefix(n, "…")
				} else if strings.Contains(n, "<NULL>") {
					last = n
				}
				documented[n] = true
			}
		}
	}
	f, err := os.Open(filepath.Join(out, "scores.csv"))
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(f).ReadAll()
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	written := map[string]bool{}
	for _, r := range recs[1:] {
		metric := strings.Replace(r[5], "distance_null", "<NULL>", 1)
		if !written[metric] && !documented[metric] {
			t.Errorf("scores.csv has metric %s, which README's scores.csv table does not list", r[5])
		}
		written[metric] = true
		if r[7] != "" && !written[r[7]] && !documented[r[7]] {
			t.Errorf("scores.csv has rule %s, which README's scores.csv table does not list", r[7])
		}
		written[r[7]] = true
	}
	for n := range documented {
		if !written[n] && n != "partial_roc_undefined" && n != "fixed_<value>" && n != "E" {
			t.Errorf("README's scores.csv table lists %s; the run wrote no such metric or rule", n)
		}
	}

	// extents.csv.
	ext := filepath.Join(t.TempDir(), "ext")
	if _, se, code := runBin(t, append([]string{"extents"}, s.args(ext)[1:]...)...); code != 0 {
		t.Fatalf("extents: exit %d\n%s", code, se)
	}
	want = readmeList(t, readme, "`extents` writes `extents.gpkg`, `extents.csv` (")
	if got := csvHeader(t, filepath.Join(ext, "extents.csv")); !reflect.DeepEqual(got, want) {
		t.Errorf("extents.csv header %v, README %v", got, want)
	}

	// summary.csv of a batch.
	dir := t.TempDir()
	table := filepath.Join(dir, "studies.csv")
	os.WriteFile(table, []byte("# iterations: 20\n# region-buffers: 60\n# point-buffers: 40\n# hull-buffers: 0\nid,model,occurrences,region\nsp1,m="+s.model+","+s.occ+","+s.region+"\n"), 0o644)
	if _, se, code := runBin(t, "batch", table, "--out", filepath.Join(dir, "runs"), "--quiet"); code != 0 {
		t.Fatalf("batch: exit %d\n%s", code, se)
	}
	i := strings.Index(readme, "| `summary.csv` | one row per study and model (tidy): ")
	if i < 0 {
		t.Fatal("README lost the summary.csv row")
	}
	row := readme[i:]
	row = row[:strings.Index(row, "\n")]
	row = row[:strings.Index(row, "Undefined numbers")]
	var cols []string
	for _, m := range codeSpan.FindAllStringSubmatch(row, -1) {
		c := m[1]
		if c == "summary.csv" {
			continue
		}
		if strings.HasPrefix(c, "_") && len(cols) > 0 { // `a_ci_low`/`_high`
			prev := cols[len(cols)-1]
			c = prev[:strings.LastIndex(prev, "_")] + c
		}
		cols = append(cols, c)
	}
	header := csvHeader(t, filepath.Join(dir, "runs", "summary.csv"))
	hs := map[string]bool{}
	for _, h := range header {
		hs[h] = true
	}
	var named []string
	for _, c := range cols {
		if hs[c] {
			named = append(named, c)
		}
	}
	if !reflect.DeepEqual(named, header) {
		t.Errorf("summary.csv header %v; README names, in order, %v", header, named)
	}

	// summary_verdicts.csv of the same batch: the README names its
	// columns in order.
	i = strings.Index(readme, "| `summary_verdicts.csv` | one row per study, model and metric (tidy): ")
	if i < 0 {
		t.Fatal("README lost the summary_verdicts.csv row")
	}
	row = readme[i:]
	row = row[:strings.Index(row, "\n")]
	row = row[:strings.Index(row, "Undefined numbers")]
	hs = map[string]bool{}
	vheader := csvHeader(t, filepath.Join(dir, "runs", "summary_verdicts.csv"))
	for _, h := range vheader {
		hs[h] = true
	}
	named = nil
	for _, m := range codeSpan.FindAllStringSubmatch(row, -1) {
		if hs[m[1]] {
			named = append(named, m[1])
		}
	}
	if !reflect.DeepEqual(named, vheader) {
		t.Errorf("summary_verdicts.csv header %v; README names, in order, %v", vheader, named)
	}

	// Exit codes: the README table and the root help list the same codes.
	sec = readme[strings.Index(readme, "### Exit codes"):]
	sec = sec[:strings.Index(sec, "\n\n`areasweep --help`")]
	var codes []string
	for _, l := range strings.Split(sec, "\n") {
		if c := strings.Split(l, "|"); len(c) > 2 && strings.HasPrefix(l, "| ") && !strings.HasPrefix(l, "| code") {
			codes = append(codes, strings.TrimSpace(c[1]))
		}
	}
	var help []string
	for _, l := range strings.Split(exitCodesHelp, "\n")[1:] {
		help = append(help, strings.Fields(l)[0])
	}
	if !reflect.DeepEqual(codes, help) || !reflect.DeepEqual(help, []string{"0", "1", "2", "3", "128+N"}) {
		t.Errorf("exit codes: README %v, --help %v", codes, help)
	}
	var so bytes.Buffer
	if code := Main([]string{"--help"}, strings.NewReader(""), &so, io.Discard); code != exitOK || !strings.Contains(so.String(), exitCodesHelp) {
		t.Errorf("areasweep --help (exit %d) does not list the exit codes", code)
	}
}

// TestREADMESetUp checks the README's two set-up commands against the
// scripts: the demo and test commands are scripts/demo.sh and
// scripts/test.sh, CI runs the latter, every package scripts/setup.sh
// installs is named, and what the scripts run is what the README says.
func TestREADMESetUp(t *testing.T) {
	readme := readREADME(t)
	top := readme[:strings.Index(readme, "\n## Walkthrough")]
	read := func(p string) string {
		b, err := os.ReadFile(filepath.Join("../..", p))
		if err != nil {
			t.Fatal(err)
		}
		return string(b)
	}
	var blocks []string
	for _, m := range regexp.MustCompile("(?s)```sh\n(.*?)\n```").FindAllStringSubmatch(top, -1) {
		blocks = append(blocks, m[1])
	}
	if !reflect.DeepEqual(blocks, []string{"scripts/demo.sh", "scripts/test.sh"}) {
		t.Errorf("README's set-up commands are %q, want scripts/demo.sh and scripts/test.sh", blocks)
	}
	if !regexp.MustCompile(`(?m)^scripts/test\.sh\s*$`).MatchString(read(".ci/run")) {
		t.Error(".ci/run does not run scripts/test.sh, as README says")
	}
	flat := strings.Join(strings.Fields(top), " ")
	for _, m := range regexp.MustCompile(`want\+?=\(([^)]*)\)`).FindAllStringSubmatch(read("scripts/setup.sh"), -1) {
		for _, pkg := range strings.Fields(m[1]) {
			if !strings.Contains(flat, pkg) {
				t.Errorf("scripts/setup.sh installs %s, which README's set-up paragraphs do not name", pkg)
			}
		}
	}
	for script, runs := range map[string][]string{
		"scripts/demo.sh": {"scripts/setup.sh", "go build -o bin/areasweep ./cmd/areasweep", `bin/areasweep demo --out "$out" --force`, `out="${1:-areasweep-demo}"`},
		"scripts/test.sh": {"scripts/setup.sh --test", "gofmt -l .", "go vet ./...", "go test -count=1 -timeout 30m ./...", "go test -race -short -count=1"},
	} {
		s := read(script)
		for _, r := range runs {
			if !strings.Contains(s, r) {
				t.Errorf("%s no longer runs %q: update README's set-up paragraphs and this test", script, r)
			}
		}
	}
	for _, says := range []string{"`bin/areasweep`", "bin/areasweep demo --out areasweep-demo --force", "`areasweep-demo`", "`scripts/setup.sh --test`", "`gofmt -l .`", "`go vet ./...`", "`go test -count=1 -timeout 30m ./...`", "`go test -race -short -count=1`"} {
		if !strings.Contains(flat, says) {
			t.Errorf("README's set-up paragraphs no longer say %s", says)
		}
	}
}

var (
	mdHeading    = regexp.MustCompile(`^#{1,6} `)
	mdLink       = regexp.MustCompile(`\[([^\]]*)\]\([^)]*\)`)
	mdLinkTarget = regexp.MustCompile(`\]\(([^)\s]+)\)`)
)

// githubAnchor returns the anchor GitHub gives a heading: its text as
// shown (code spans and links keep their text), in lower case, with every
// character but letters, digits, spaces, '-' and '_' removed and each
// space turned into '-'.
func githubAnchor(heading string) string {
	h := strings.TrimSpace(strings.TrimLeft(heading, "#"))
	h = mdLink.ReplaceAllString(h, "$1")
	var b strings.Builder
	for _, r := range strings.ToLower(h) {
		switch {
		case r == ' ':
			b.WriteRune('-')
		case r == '-' || r == '_' || unicode.IsLetter(r) || unicode.IsDigit(r):
			b.WriteRune(r)
		}
	}
	return b.String()
}

// markdownAnchors returns the anchors of the headings of md outside code
// blocks, a repeated one numbered as GitHub numbers it ("x", "x-1").
func markdownAnchors(md string) map[string]bool {
	anchors := map[string]bool{}
	seen := map[string]int{}
	inBlock := false
	for _, l := range strings.Split(md, "\n") {
		if strings.HasPrefix(l, "```") {
			inBlock = !inBlock
			continue
		}
		if inBlock || !mdHeading.MatchString(l) {
			continue
		}
		a := githubAnchor(l)
		if n := seen[a]; n > 0 {
			anchors[fmt.Sprintf("%s-%d", a, n)] = true
		} else {
			anchors[a] = true
		}
		seen[a]++
	}
	return anchors
}

// checkMarkdownLinks returns the links of the documents docs (by file
// name) that lead nowhere: an "#anchor" no heading of its document has, a
// link to another document that is not among docs, or an anchor that
// document lacks. Code blocks and code spans are not read; links to the
// web are left alone.
func checkMarkdownLinks(docs map[string]string) []string {
	var problems []string
	var names []string
	anchors := map[string]map[string]bool{}
	for name, doc := range docs {
		names = append(names, name)
		anchors[name] = markdownAnchors(doc)
	}
	sort.Strings(names)
	for _, name := range names {
		inBlock := false
		for n, l := range strings.Split(docs[name], "\n") {
			if strings.HasPrefix(l, "```") {
				inBlock = !inBlock
				continue
			}
			if inBlock {
				continue
			}
			for _, m := range mdLinkTarget.FindAllStringSubmatch(codeSpan.ReplaceAllString(l, ""), -1) {
				target := m[1]
				if strings.Contains(target, "://") || strings.HasPrefix(target, "mailto:") {
					continue
				}
				file, anchor, _ := strings.Cut(target, "#")
				if file == "" {
					file = name
				}
				switch {
				case anchors[file] == nil:
					problems = append(problems, fmt.Sprintf("%s line %d: link to %s, which is not one of the documents", name, n+1, target))
				case anchor != "" && !anchors[file][anchor]:
					problems = append(problems, fmt.Sprintf("%s line %d: link to %s, which no heading of %s has", name, n+1, target, file))
				}
			}
		}
	}
	return problems
}

// readDocs returns README.md and DEVELOPERS.md by name.
func readDocs(t *testing.T) map[string]string {
	t.Helper()
	docs := map[string]string{}
	for _, name := range []string{"README.md", "DEVELOPERS.md"} {
		b, err := os.ReadFile(filepath.Join("..", "..", name))
		if err != nil {
			t.Fatal(err)
		}
		docs[name] = string(b)
	}
	return docs
}

// TestDocsLinks checks that every link within README.md and DEVELOPERS.md
// leads to a heading that exists (GitHub's anchors).
func TestDocsLinks(t *testing.T) {
	docs := readDocs(t)
	for _, p := range checkMarkdownLinks(docs) {
		t.Error(p)
	}
}

// TestDocsLinksCheckFails checks that the link check catches a misspelt
// anchor, a renamed heading and a link to a missing document, and that
// the anchors follow GitHub's rules (worked by hand from GitHub's
// rendering of such headings).
func TestDocsLinksCheckFails(t *testing.T) {
	for heading, want := range map[string]string{
		"### Files in `--out`":                                             "files-in---out",
		"### Model rasters (`--model NAME=PATH`, repeatable)":              "model-rasters---model-namepath-repeatable",
		"### Shards: one run split across machines":                        "shards-one-run-split-across-machines",
		"### What `batch` does":                                            "what-batch-does",
		"#### Projected grids that are not equal-area (2026-12-03, night)": "projected-grids-that-are-not-equal-area-2026-12-03-night",
	} {
		if got := githubAnchor(heading); got != want {
			t.Errorf("anchor of %q: %q, want %q", heading, got, want)
		}
	}
	if a := markdownAnchors("## Notes\n```sh\n# not a heading\n```\n## Notes\n"); !a["notes"] || !a["notes-1"] || a["not-a-heading"] {
		t.Errorf("anchors of a repeated heading and a code block's comment: %v", a)
	}
	docs := readDocs(t)
	for _, c := range []struct{ file, old, new, want string }{
		{"README.md", "](#files-in---out)", "](#files-in-out)", "#files-in-out, which no heading of README.md has"},
		{"README.md", "## Many studies", "## Several studies", "#many-studies, which no heading of README.md has"},
		{"DEVELOPERS.md", "](README.md)", "](USAGE.md)", "USAGE.md, which is not one of the documents"},
	} {
		if !strings.Contains(docs[c.file], c.old) {
			t.Fatalf("%s no longer holds %q: update this test", c.file, c.old)
		}
		bad := map[string]string{}
		for k, v := range docs {
			bad[k] = v
		}
		bad[c.file] = strings.Replace(docs[c.file], c.old, c.new, 1)
		got := strings.Join(checkMarkdownLinks(bad), "\n")
		if !strings.Contains(got, c.want) {
			t.Errorf("%s with %q for %q: the check reported %q, not %q", c.file, c.new, c.old, got, c.want)
		}
	}
}

// TestREADMEDemoStudyFile checks that the study file the README shows as
// the demo's is the one the demo writes, byte for byte.
func TestREADMEDemoStudyFile(t *testing.T) {
	readme := readREADME(t)
	const intro = "The demo's study file:\n\n```yaml\n"
	i := strings.Index(readme, intro)
	if i < 0 {
		t.Fatalf("README no longer shows the demo's study file after %q: update this test", intro)
	}
	shown := readme[i+len(intro):]
	shown = shown[:strings.Index(shown, "```")]
	b, err := os.ReadFile(filepath.Join(walkthroughDemo(t).dir, "inputs", "study.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if string(b) != shown {
		t.Errorf("README shows the demo's study file as\n%s\nthe demo writes\n%s", shown, b)
	}
}

var (
	makeTarget = regexp.MustCompile(`(?m)^([a-z][a-z0-9_-]*):`)
	scriptPath = regexp.MustCompile(`(^|[^A-Za-z0-9_./-])(scripts/[A-Za-z0-9_.-]+)`)
	goPackage  = regexp.MustCompile(`(^|\s)\./([A-Za-z0-9_/]+?)(/\.\.\.)?(\s|$)`)
)

// checkDocsCommands returns what the commands of docs (by file name)
// name that does not exist in the repository at root: a `make TARGET`
// the Makefile lacks, a scripts/NAME that is no executable file, and a
// Go package (./path or ./path/...) of a `go ...` command that is no
// folder.
func checkDocsCommands(docs map[string]string, root string) []string {
	var problems []string
	mk, err := os.ReadFile(filepath.Join(root, "Makefile"))
	if err != nil {
		return []string{err.Error()}
	}
	targets := map[string]bool{}
	for _, m := range makeTarget.FindAllStringSubmatch(string(mk), -1) {
		targets[m[1]] = true
	}
	var names []string
	for name := range docs {
		names = append(names, name)
	}
	sort.Strings(names)
	for _, name := range names {
		for _, m := range codeSpan.FindAllStringSubmatch(docs[name], -1) {
			span := m[1]
			if f := strings.Fields(span); len(f) > 1 && f[0] == "make" && !targets[f[1]] && !strings.Contains(f[1], "=") {
				problems = append(problems, fmt.Sprintf("%s: %q: the Makefile has no target %s", name, span, f[1]))
			}
			for _, s := range scriptPath.FindAllStringSubmatch(span, -1) {
				if st, err := os.Stat(filepath.Join(root, s[2])); err != nil || st.Mode()&0o111 == 0 {
					problems = append(problems, fmt.Sprintf("%s: %q: %s is no executable script", name, span, s[2]))
				}
			}
			if !strings.HasPrefix(span, "go ") {
				continue
			}
			for _, p := range goPackage.FindAllStringSubmatch(span, -1) {
				if st, err := os.Stat(filepath.Join(root, p[2])); err != nil || !st.IsDir() {
					problems = append(problems, fmt.Sprintf("%s: %q: no package folder %s", name, span, p[2]))
				}
			}
		}
	}
	return problems
}

// TestDocsCommands checks that the make targets, scripts and Go packages
// the commands of README.md and DEVELOPERS.md name exist.
func TestDocsCommands(t *testing.T) {
	for _, p := range checkDocsCommands(readDocs(t), filepath.Join("..", "..")) {
		t.Error(p)
	}
}

// TestDocsCommandsCheckFails checks that the command check catches a make
// target, a script and a package that do not exist.
func TestDocsCommandsCheckFails(t *testing.T) {
	docs := readDocs(t)
	for _, c := range []struct{ old, new, want string }{
		{"| `make demo` |", "| `make demos` |", "the Makefile has no target demos"},
		{"`scripts/slurm-local.sh start", "`scripts/slurm.sh start", "scripts/slurm.sh is no executable script"},
		{"`go test -run '^$' -bench . -benchmem ./cmd/internal/scenario/`", "`go test -run '^$' -bench . -benchmem ./cmd/internal/scenarios/`", "no package folder cmd/internal/scenarios"},
	} {
		if !strings.Contains(docs["DEVELOPERS.md"], c.old) {
			t.Fatalf("DEVELOPERS.md no longer holds %q: update this test", c.old)
		}
		bad := map[string]string{"DEVELOPERS.md": strings.Replace(docs["DEVELOPERS.md"], c.old, c.new, 1)}
		if got := strings.Join(checkDocsCommands(bad, filepath.Join("..", "..")), "\n"); !strings.Contains(got, c.want) {
			t.Errorf("DEVELOPERS.md with %q: the check reported %q, not %q", c.new, got, c.want)
		}
	}
}
