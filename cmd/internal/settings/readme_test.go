package settings

import (
	"fmt"
	"os"
	"reflect"
	"strconv"
	"strings"
	"testing"
)

// readmeDefault is how README.md shows the default of setting s.
func readmeDefault(s Setting) string {
	v := Defaults()
	p := reflect.ValueOf(s.Field(&v)).Elem()
	if p.IsZero() {
		switch {
		case s.Unset != "":
			return s.Unset
		case s.Kind == Bool:
			return "off"
		}
		return "—"
	}
	f := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	switch x := p.Interface().(type) {
	case []float64:
		parts := make([]string, len(x))
		for i, n := range x {
			parts[i] = f(n)
		}
		return "`" + strings.Join(parts, ",") + "`"
	case float64:
		return "`" + f(x) + "`"
	}
	return fmt.Sprintf("`%v`", p.Interface())
}

// TestREADMEListsTheTable checks README.md's settings against the table:
// the flag table of "areasweep run" has one row per setting (after
// --study) with its placeholder and default, the study-file key list is
// StudyKeys in order, the paths bullet names every path key, and the
// settings a study file may not give are listed as such.
func TestREADMEListsTheTable(t *testing.T) {
	b, err := os.ReadFile("../../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	readme := string(b)
	fix := " (README.md must list settings.Table: update the README)"

	// The flag table.
	got := map[string][2]string{}
	var order []string
	for _, line := range strings.Split(readme[strings.Index(readme, "### `areasweep run`"):], "\n") {
		if strings.HasPrefix(line, "### ") && !strings.Contains(line, "`areasweep run`") {
			break
		}
		if !strings.HasPrefix(line, "| `--") {
			continue
		}
		cells := strings.Split(line, "|")
		flag := strings.Trim(strings.TrimSpace(cells[1]), "`")
		name, arg, _ := strings.Cut(strings.TrimPrefix(flag, "--"), " ")
		got[name] = [2]string{arg, strings.TrimSpace(cells[2])}
		order = append(order, name)
	}
	if len(order) == 0 || order[0] != "study" {
		t.Fatalf("the run flag table does not start with --study: %v%s", order, fix)
	}
	// --study names where settings come from and --shard what part of
	// the run to do: flags of the run command, not settings of a study.
	modeFlags := []string{"study", "shard"}
	for _, m := range modeFlags {
		if _, ok := got[m]; !ok {
			t.Errorf("--%s is missing from the run flag table%s", m, fix)
		}
	}
	if len(got) != len(Table)+len(modeFlags) {
		t.Errorf("the run flag table has %d rows, the table %d settings plus %v%s", len(got), len(Table), modeFlags, fix)
	}
	for _, s := range Table {
		row, ok := got[s.Name]
		if !ok {
			t.Errorf("--%s is missing from the run flag table%s", s.Name, fix)
			continue
		}
		if row[0] != s.Arg {
			t.Errorf("--%s: README shows the value as %q, the table as %q%s", s.Name, row[0], s.Arg, fix)
		}
		if want := readmeDefault(s); row[1] != want {
			t.Errorf("--%s: README default %s, the table's %s%s", s.Name, row[1], want, fix)
		}
	}

	// The study-file keys.
	const intro = "A YAML mapping whose keys are the long flag names of `run`:\n\n"
	i := strings.Index(readme, intro)
	if i < 0 {
		t.Fatalf("README lost the study-file key list%s", fix)
	}
	para := readme[i+len(intro):]
	para = para[:strings.Index(para, "\n\n")]
	var keys []string
	for _, k := range strings.Split(strings.TrimSuffix(strings.ReplaceAll(para, "\n", " "), "."), ",") {
		keys = append(keys, strings.Trim(strings.TrimSpace(k), "`"))
	}
	if want := StudyKeys(); !reflect.DeepEqual(keys, want) {
		t.Errorf("README study keys\n %v\nthe table's\n %v%s", keys, want, fix)
	}

	// Paths resolved against the study file, and settings it cannot give.
	paths := readme[strings.Index(readme, "- **Paths:**"):]
	paths = paths[:strings.Index(paths, "\n- ")]
	notInStudy := "`--study`"
	var outside []string
	for _, s := range Table {
		if (s.Kind == Path || s.Kind == NamedPaths) && s.Study && !strings.Contains(paths, "`"+s.Name+"`") {
			t.Errorf("the Paths bullet does not name %s%s", s.Name, fix)
		}
		if !s.Study {
			outside = append(outside, "`--"+s.Name+"`")
		}
	}
	notInStudy += ", " + strings.Join(outside[:len(outside)-1], ", ") + " and " + outside[len(outside)-1]
	if !strings.Contains(strings.ReplaceAll(readme, "\n", " "), notInStudy+" cannot be set in the study file") {
		t.Errorf("README does not say that %s cannot be set in the study file%s", notInStudy, fix)
	}
}
