package report

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"reflect"
	"strconv"
	"strings"
)

// CheckShape walks a results file's JSON against the type of
// Results before it is decoded, because decoding alone accepts what
// a hand edit can break silently: a key given twice (the last wins), a
// field left out or null (it reads as 0), a value of the wrong kind or
// not JSON (NaN) reported without its place. Each problem names the
// field's path, e.g. scores[4].auc.
//
// Which fields must be there (RequiredFieldsRule): every field that a run
// always writes, that is every field of Results and its parts declared
// without omitempty, in every object the report reads. Fields with
// omitempty are optional (a file without input sidecars, a preview or a
// sorting bias reads as before); an optional object that is there must
// hold its own required fields. Two parts are exempt: `sensitivity`,
// which `areasweep report` recomputes from the rest and never reads, and
// the scores of an entry of `scores` with "scored": false, which no
// figure or table reads (only model, extent, scored and area_km2 are
// required there: unscoredRead). Unknown keys are let through. Structural problems (a key twice,
// a wrong kind, broken JSON, trailing text) are reported before a missing
// field; among missing fields, the first in the file's order.
func CheckShape(data []byte) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	w := &shapeWalker{dec: dec, data: data}
	if _, err := w.walk("", reflect.TypeOf(Results{}), 0); err != nil {
		return err
	}
	if _, err := dec.Token(); err != io.EOF {
		return errors.New("more JSON follows the results object")
	}
	if w.missing != "" {
		return errors.New(w.missing)
	}
	return nil
}

// RequiredFieldsRule is CheckShape's rule in one sentence, for messages
// and the README.
const RequiredFieldsRule = "every field a run always writes must be there (fields it may leave out, such as an input's sidecars, the preview or an extent's sorting bias, are optional; the sensitivity analysis is recomputed, and an unscored entry of scores needs only model, extent, scored and area_km2)"

// shapeWalker is CheckShape's state: the decoder and the first missing
// field found (reported once the walk has found no other problem).
type shapeWalker struct {
	dec     *json.Decoder
	data    []byte // the file, for the line of a syntax error
	missing string
}

// unscoredRead are the fields of an unscored score that the report reads
// (its row in the scores table).
var unscoredRead = map[string]bool{"model": true, "extent": true, "scored": true, "area_km2": true}

// recomputedField is the top-level field the report recomputes rather
// than reads: no field inside it is required.
const recomputedField = "sensitivity"

// IsTopLevelShapeError reports whether err, from CheckShape, is about the
// file as a whole (not a JSON object at all) rather than one of its fields.
func IsTopLevelShapeError(err error) bool {
	return err != nil && strings.HasPrefix(err.Error(), shapePath(""))
}

// shapePath names a field's path in CheckShape's messages.
func shapePath(path string) string {
	if path == "" {
		return "the top level"
	}
	return cutShape(path)
}

// walk reads one value at path and checks it against t (nil: any). It
// returns the value when it is a plain one (a string, number, bool or
// null), nil for an object or a list.
func (w *shapeWalker) walk(path string, t reflect.Type, depth int) (json.Token, error) {
	dec := w.dec
	if depth > maxShapeDepth {
		return nil, fmt.Errorf("%s: lists and objects nested more than %d deep; a run writes at most a few levels", shapePath(path), maxShapeDepth)
	}
	tok, err := dec.Token()
	if err != nil {
		return nil, w.jsonBroken(path, err)
	}
	for t != nil && t.Kind() == reflect.Pointer {
		if tok == nil {
			return nil, nil
		}
		t = t.Elem()
	}
	want := ""
	switch {
	case t == nil:
	case tok == nil:
		if t.Kind() == reflect.Slice {
			return nil, nil // a nil list, as a run may write it
		}
		return nil, fmt.Errorf("%s is null; a run writes a value there", shapePath(path))
	case t.Kind() == reflect.Struct:
		want = "an object"
	case t.Kind() == reflect.Slice || t.Kind() == reflect.Array:
		want = "a list"
	case t.Kind() == reflect.String:
		want = "a string"
	case t.Kind() == reflect.Bool:
		want = "true or false"
	case t.Kind() >= reflect.Int && t.Kind() <= reflect.Uint64:
		want = "a whole number"
	case t.Kind() == reflect.Float32 || t.Kind() == reflect.Float64:
		want = "a number"
	}
	switch v := tok.(type) {
	case json.Delim:
		if v == '{' {
			if want != "" && want != "an object" {
				return nil, fmt.Errorf("%s holds an object; a run writes %s there", shapePath(path), want)
			}
			return nil, w.object(path, t, depth)
		}
		if want != "" && want != "a list" {
			return nil, fmt.Errorf("%s holds a list; a run writes %s there", shapePath(path), want)
		}
		var elem reflect.Type
		if t != nil {
			elem = t.Elem()
		}
		n := 0
		for ; dec.More(); n++ {
			at := fmt.Sprintf("%s[%d]", path, n)
			if _, err := w.walk(at, elem, depth+1); err != nil {
				return nil, err
			}
		}
		if t != nil && t.Kind() == reflect.Array && n != t.Len() {
			// A fixed-size list (the geotransform, the preview's
			// bounds): decoding would fill the missing numbers with 0.
			return nil, fmt.Errorf("%s holds %d values; a run writes %d there", shapePath(path), n, t.Len())
		}
		return nil, w.closeShape(path)
	case string:
		if want != "" && want != "a string" {
			return nil, fmt.Errorf("%s holds the string %q; a run writes %s there", shapePath(path), cutShape(v), want)
		}
	case bool:
		if want != "" && want != "true or false" {
			return nil, fmt.Errorf("%s holds %v; a run writes %s there", shapePath(path), v, want)
		}
	case json.Number:
		switch want {
		case "", "a number":
			if _, err := strconv.ParseFloat(string(v), 64); err != nil {
				return nil, fmt.Errorf("%s: %s is out of range", shapePath(path), cutShape(string(v)))
			}
		case "a whole number":
			if _, err := strconv.ParseInt(string(v), 10, 64); err != nil {
				return nil, fmt.Errorf("%s holds %s; a run writes a whole number there", shapePath(path), cutShape(string(v)))
			}
		default:
			return nil, fmt.Errorf("%s holds the number %s; a run writes %s there", shapePath(path), cutShape(string(v)), want)
		}
	}
	return tok, nil
}

// object reads the members of an object after its '{' and, once it is
// closed, notes the first required field it lacks (see CheckShape).
func (w *shapeWalker) object(path string, t reflect.Type, depth int) error {
	type field struct {
		t        reflect.Type
		required bool
	}
	fields := map[string]field{}
	var order []string
	if t != nil {
		for i := 0; i < t.NumField(); i++ {
			f := t.Field(i)
			tag := f.Tag.Get("json")
			name, opts, _ := strings.Cut(tag, ",")
			if !f.IsExported() || name == "-" {
				continue
			}
			if name == "" {
				name = f.Name
			}
			fields[name] = field{f.Type, !strings.Contains(","+opts+",", ",omitempty,")}
			order = append(order, name)
		}
	}
	seen := map[string]bool{}
	plain := map[string]json.Token{} // a score's model, extent and scored
	for w.dec.More() {
		tok, err := w.dec.Token()
		if err != nil {
			return w.jsonBroken(path, err)
		}
		key := tok.(string)
		at := key
		if path != "" {
			at = path + "." + key
		}
		if seen[key] {
			return fmt.Errorf("%s is given twice; keep one", cutShape(at))
		}
		seen[key] = true
		v, err := w.walk(at, fields[key].t, depth+1)
		if err != nil {
			return err
		}
		if key == "model" || key == "extent" || key == "scored" {
			plain[key] = v
		}
	}
	if err := w.closeShape(path); err != nil {
		return err
	}
	if w.missing != "" || t == nil || path == recomputedField || strings.HasPrefix(path, recomputedField+".") {
		return nil
	}
	isScore := t == reflect.TypeOf(Score{})
	unscored := isScore && plain["scored"] != true
	for _, name := range order {
		if !fields[name].required || seen[name] || (unscored && !unscoredRead[name]) {
			continue
		}
		at := name
		if path != "" {
			at = path + "." + name
		}
		w.missing = fmt.Sprintf("%s is missing", cutShape(at))
		if m, e := plain["model"], plain["extent"]; isScore && m != nil && e != nil {
			w.missing += fmt.Sprintf(" (model %s, extent %s)", cutShape(fmt.Sprint(m)), cutShape(fmt.Sprint(e)))
		}
		w.missing += "; a run always writes it"
		return nil
	}
	return nil
}

// maxShapeDepth bounds the nesting of a results file (a run writes 4
// levels at most; our bound).
const maxShapeDepth = 32

// closeShape reads the ']' or '}' that ends the list or object at path.
func (w *shapeWalker) closeShape(path string) error {
	if _, err := w.dec.Token(); err != nil {
		return w.jsonBroken(path, err)
	}
	return nil
}

// jsonBroken says where the JSON of a results file stops being JSON.
// encoding/json's wording is put in ours (jsonSyntaxWords).
func (w *shapeWalker) jsonBroken(path string, err error) error {
	if err == io.EOF || errors.Is(err, io.ErrUnexpectedEOF) {
		return fmt.Errorf("%s: the file is cut short there", shapePath(path))
	}
	return fmt.Errorf("%s: not valid JSON there (%s)", shapePath(path), jsonSyntaxWords(w.data, w.dec.InputOffset(), err))
}

// cutShape shortens a quoted value to 60 characters.
func cutShape(s string) string {
	if len(s) > 60 {
		return s[:60] + "..."
	}
	return s
}
