package settings

import (
	"reflect"
	"strings"
	"testing"
)

// TestTable checks each row against its field: names are unique, the
// Kind matches the Go type of the field, Field points into the value it is
// given, a placeholder is given exactly when the flag takes a value and
// the help marks it, and every study setting's field differs (two rows
// cannot write one field).
func TestTable(t *testing.T) {
	goType := map[Kind]reflect.Type{
		Text: reflect.TypeOf(""), Path: reflect.TypeOf(""), CRS: reflect.TypeOf(""), NamedPaths: reflect.TypeOf([]string(nil)),
		Bool: reflect.TypeOf(false), Int: reflect.TypeOf(0), Uint: reflect.TypeOf(uint64(0)),
		Float: reflect.TypeOf(0.0), FloatList: reflect.TypeOf([]float64(nil)),
	}
	var v Values
	seen := map[string]bool{}
	fields := map[any]string{}
	for _, s := range Table {
		if seen[s.Name] {
			t.Errorf("setting %s listed twice", s.Name)
		}
		seen[s.Name] = true
		p := s.Field(&v)
		if got := reflect.TypeOf(p).Elem(); got != goType[s.Kind] {
			t.Errorf("setting %s: kind %d wants %v, field is %v", s.Name, s.Kind, goType[s.Kind], got)
		}
		if other, dup := fields[p]; dup {
			t.Errorf("settings %s and %s share one field", s.Name, other)
		}
		fields[p] = s.Name
		switch {
		case s.Kind == Bool && s.Arg != "":
			t.Errorf("setting %s: a switch has no placeholder, got %q", s.Name, s.Arg)
		case s.Kind != Bool && s.Arg == "":
			t.Errorf("setting %s: no placeholder", s.Name)
		case s.Kind == FloatList && s.Arg != "LIST":
			t.Errorf("setting %s: a list shows LIST, got %q", s.Name, s.Arg)
		case s.Kind != Bool && s.Kind != FloatList && !strings.Contains(s.Usage, "`"+s.Arg+"`"):
			t.Errorf("setting %s: help %q does not mark `%s`", s.Name, s.Usage, s.Arg)
		}
	}
	if n := reflect.TypeOf(v).NumField(); n != len(fields) {
		t.Errorf("Values has %d fields, the table sets %d", n, len(fields))
	}
}

// TestLookupAndStudyKeys: Lookup finds every row and nothing else; the
// study keys are the rows marked Study, in table order.
func TestLookupAndStudyKeys(t *testing.T) {
	for _, s := range Table {
		if got, ok := Lookup(s.Name); !ok || got.Name != s.Name {
			t.Errorf("Lookup(%q) = %q, %v", s.Name, got.Name, ok)
		}
	}
	if _, ok := Lookup("study"); ok {
		t.Error("Lookup found study, which is not a setting of the table")
	}
	keys := StudyKeys()
	if keys[0] != "model" || len(keys) != 27 {
		t.Errorf("study keys %v: want 27 starting with model (counted in the table by hand)", keys)
	}
	for _, k := range keys {
		if s, _ := Lookup(k); !s.Study {
			t.Errorf("study key %s is not marked Study", k)
		}
	}
}
