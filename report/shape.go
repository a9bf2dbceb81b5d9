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
	w := &shapeWalker{dec: dec, data: data, fields: map[reflect.Type]*shapeFields{}}
	if _, err := w.walk(reflect.TypeOf(Results{}), 0); err != nil {
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

// shapeWalker is CheckShape's state: the decoder, the first missing
// field found (reported once the walk has found no other problem), the
// path of the value being read and the fields of each struct type met.
type shapeWalker struct {
	dec     *json.Decoder
	data    []byte // the file, for the line of a syntax error
	missing string
	// at is the path of the value being read, one step per member or
	// element; its text (path) is made only for a message, not for every
	// value of the file.
	at []shapeStep
	// fields holds each struct type's fields, found once per type rather
	// than once per object of the file.
	fields map[reflect.Type]*shapeFields
}

// shapeStep is a step of a path: a member's key, or a list element's
// index.
type shapeStep struct {
	key   string
	index int
	elem  bool
}

// path is the text of the path of the value being read, e.g.
// scores[4].auc ("" at the top level).
func (w *shapeWalker) path() string {
	var b strings.Builder
	for _, s := range w.at {
		switch {
		case s.elem:
			b.WriteByte('[')
			b.WriteString(strconv.Itoa(s.index))
			b.WriteByte(']')
		case b.Len() > 0:
			b.WriteByte('.')
			b.WriteString(s.key)
		default:
			b.WriteString(s.key)
		}
	}
	return b.String()
}

// shapeFields are the JSON fields of a struct type: for each name, its
// type and whether a run always writes it (the last field of that name,
// as encoding/json's tags would be read here), and the names in the
// order declared.
type shapeFields struct {
	byName map[string]shapeField
	order  []string
}

type shapeField struct {
	t        reflect.Type
	required bool
	slot     int // the field's place among the names, for the names seen
}

// fieldsOf returns t's fields (t a struct type), found once per type.
func (w *shapeWalker) fieldsOf(t reflect.Type) *shapeFields {
	if fs, ok := w.fields[t]; ok {
		return fs
	}
	fs := &shapeFields{byName: map[string]shapeField{}}
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
		slot := len(fs.byName)
		if old, ok := fs.byName[name]; ok {
			slot = old.slot
		}
		fs.byName[name] = shapeField{f.Type, !strings.Contains(","+opts+",", ",omitempty,"), slot}
		fs.order = append(fs.order, name)
	}
	w.fields[t] = fs
	return fs
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

// walk reads one value at the path w.at and checks it against t (nil:
// any). It returns the value when it is a plain one (a string, number,
// bool or null), nil for an object or a list.
func (w *shapeWalker) walk(t reflect.Type, depth int) (json.Token, error) {
	dec := w.dec
	if depth > maxShapeDepth {
		return nil, fmt.Errorf("%s: lists and objects nested more than %d deep; a run writes at most a few levels", shapePath(w.path()), maxShapeDepth)
	}
	tok, err := dec.Token()
	if err != nil {
		return nil, w.jsonBroken(err)
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
		return nil, fmt.Errorf("%s is null; a run writes a value there", shapePath(w.path()))
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
				return nil, fmt.Errorf("%s holds an object; a run writes %s there", shapePath(w.path()), want)
			}
			return nil, w.object(t, depth)
		}
		if want != "" && want != "a list" {
			return nil, fmt.Errorf("%s holds a list; a run writes %s there", shapePath(w.path()), want)
		}
		var elem reflect.Type
		if t != nil {
			elem = t.Elem()
		}
		n := 0
		for ; dec.More(); n++ {
			w.at = append(w.at, shapeStep{index: n, elem: true})
			if _, err := w.walk(elem, depth+1); err != nil {
				return nil, err
			}
			w.at = w.at[:len(w.at)-1]
		}
		if t != nil && t.Kind() == reflect.Array && n != t.Len() {
			// A fixed-size list (the geotransform, the preview's
			// bounds): decoding would fill the missing numbers with 0.
			return nil, fmt.Errorf("%s holds %d values; a run writes %d there", shapePath(w.path()), n, t.Len())
		}
		return nil, w.closeShape()
	case string:
		if want != "" && want != "a string" {
			return nil, fmt.Errorf("%s holds the string %q; a run writes %s there", shapePath(w.path()), cutShape(v), want)
		}
	case bool:
		if want != "" && want != "true or false" {
			return nil, fmt.Errorf("%s holds %v; a run writes %s there", shapePath(w.path()), v, want)
		}
	case json.Number:
		switch want {
		case "", "a number":
			if _, err := strconv.ParseFloat(string(v), 64); err != nil {
				return nil, fmt.Errorf("%s: %s is out of range", shapePath(w.path()), cutShape(string(v)))
			}
		case "a whole number":
			// The seed is a uint64: a run takes up to 2^64 - 1, beyond
			// an int64.
			parse := func(s string) error { _, err := strconv.ParseInt(s, 10, 64); return err }
			if k := t.Kind(); k >= reflect.Uint && k <= reflect.Uint64 {
				parse = func(s string) error { _, err := strconv.ParseUint(s, 10, 64); return err }
			}
			if err := parse(string(v)); err != nil {
				return nil, fmt.Errorf("%s holds %s; a run writes a whole number there", shapePath(w.path()), cutShape(string(v)))
			}
		default:
			return nil, fmt.Errorf("%s holds the number %s; a run writes %s there", shapePath(w.path()), cutShape(string(v)), want)
		}
	}
	return tok, nil
}

// object reads the members of an object after its '{' and, once it is
// closed, notes the first required field it lacks (see CheckShape).
func (w *shapeWalker) object(t reflect.Type, depth int) error {
	var fs *shapeFields
	var seen []bool // by the slot of a field of t
	if t != nil {
		fs = w.fieldsOf(t)
		seen = make([]bool, len(fs.byName))
	}
	var seenOther map[string]bool        // keys that are no field of t
	var model, extent, scored json.Token // a score's, for its message
	for w.dec.More() {
		tok, err := w.dec.Token()
		if err != nil {
			return w.jsonBroken(err)
		}
		key := tok.(string)
		w.at = append(w.at, shapeStep{key: key})
		var f shapeField
		known := false
		if fs != nil {
			f, known = fs.byName[key]
		}
		twice := false
		if known {
			twice, seen[f.slot] = seen[f.slot], true
		} else {
			if seenOther == nil {
				seenOther = map[string]bool{}
			}
			twice, seenOther[key] = seenOther[key], true
		}
		if twice {
			return fmt.Errorf("%s is given twice; keep one", cutShape(w.path()))
		}
		v, err := w.walk(f.t, depth+1)
		if err != nil {
			return err
		}
		w.at = w.at[:len(w.at)-1]
		switch key {
		case "model":
			model = v
		case "extent":
			extent = v
		case "scored":
			scored = v
		}
	}
	if err := w.closeShape(); err != nil {
		return err
	}
	if w.missing != "" || t == nil {
		return nil
	}
	isScore := t == reflect.TypeOf(Score{})
	unscored := isScore && scored != true
	for _, name := range fs.order {
		f := fs.byName[name]
		if !f.required || seen[f.slot] || (unscored && !unscoredRead[name]) {
			continue
		}
		path := w.path()
		if path == recomputedField || strings.HasPrefix(path, recomputedField+".") {
			return nil
		}
		at := name
		if path != "" {
			at = path + "." + name
		}
		w.missing = fmt.Sprintf("%s is missing", cutShape(at))
		if isScore && model != nil && extent != nil {
			w.missing += fmt.Sprintf(" (model %s, extent %s)", cutShape(fmt.Sprint(model)), cutShape(fmt.Sprint(extent)))
		}
		w.missing += "; a run always writes it"
		return nil
	}
	return nil
}

// maxShapeDepth bounds the nesting of a results file (a run writes 4
// levels at most; our bound).
const maxShapeDepth = 32

// closeShape reads the ']' or '}' that ends the list or object at w.at.
func (w *shapeWalker) closeShape() error {
	if _, err := w.dec.Token(); err != nil {
		return w.jsonBroken(err)
	}
	return nil
}

// jsonBroken says where the JSON of a results file stops being JSON (at
// w.at). encoding/json's wording is put in ours (jsonSyntaxWords).
func (w *shapeWalker) jsonBroken(err error) error {
	if err == io.EOF || errors.Is(err, io.ErrUnexpectedEOF) {
		return fmt.Errorf("%s: the file is cut short there", shapePath(w.path()))
	}
	return fmt.Errorf("%s: not valid JSON there (%s)", shapePath(w.path()), jsonSyntaxWords(w.data, w.dec.InputOffset(), err))
}

// cutShape shortens a quoted value to 60 characters.
func cutShape(s string) string {
	if len(s) > 60 {
		return s[:60] + "..."
	}
	return s
}
