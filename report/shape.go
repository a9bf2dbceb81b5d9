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
// field's path, e.g. scores[4].auc. Absent fields and unknown keys are
// let through (see walkObject), except the scores every build writes for
// a scored model and extent (scoredFields).
func CheckShape(data []byte) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	if err := walkShape(dec, "", reflect.TypeOf(Results{}), 0); err != nil {
		return err
	}
	if _, err := dec.Token(); err != io.EOF {
		return errors.New("more JSON follows the results object")
	}
	return checkScoredFields(data)
}

// scoredFields are the fields every build of this schema writes for a
// scored model and extent: one missing was removed by hand, and decoding
// would read its number as 0.
var scoredFields = []string{"auc", "auc_unweighted", "auc_se", "cells", "area_km2", "test_points", "train_points"}

// checkScoredFields refuses a scored entry of scores that lacks one of
// scoredFields, naming its path, model and extent.
func checkScoredFields(data []byte) error {
	var doc struct {
		Scores []map[string]json.RawMessage `json:"scores"`
	}
	if err := json.Unmarshal(data, &doc); err != nil {
		return nil // the walk has read it: nothing more to say here
	}
	for i, sc := range doc.Scores {
		if string(sc["scored"]) != "true" {
			continue
		}
		for _, k := range scoredFields {
			if _, ok := sc[k]; !ok {
				var model, extent string
				json.Unmarshal(sc["model"], &model)
				json.Unmarshal(sc["extent"], &extent)
				return fmt.Errorf("scores[%d].%s is missing for model %s on extent %s; a run writes it for every scored model and extent", i, k, cutShape(model), cutShape(extent))
			}
		}
	}
	return nil
}

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

// walkShape reads one value at path and checks it against t (nil: any).
func walkShape(dec *json.Decoder, path string, t reflect.Type, depth int) error {
	if depth > maxShapeDepth {
		return fmt.Errorf("%s: lists and objects nested more than %d deep; a run writes at most a few levels", shapePath(path), maxShapeDepth)
	}
	tok, err := dec.Token()
	if err != nil {
		return jsonBroken(dec, path, err)
	}
	for t != nil && t.Kind() == reflect.Pointer {
		if tok == nil {
			return nil
		}
		t = t.Elem()
	}
	want := ""
	switch {
	case t == nil:
	case tok == nil:
		if t.Kind() == reflect.Slice {
			return nil // a nil list, as a run may write it
		}
		return fmt.Errorf("%s is null; a run writes a value there", shapePath(path))
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
				return fmt.Errorf("%s holds an object; a run writes %s there", shapePath(path), want)
			}
			_, err := walkObject(dec, path, t, depth)
			return err
		}
		if want != "" && want != "a list" {
			return fmt.Errorf("%s holds a list; a run writes %s there", shapePath(path), want)
		}
		var elem reflect.Type
		if t != nil {
			elem = t.Elem()
		}
		for i := 0; dec.More(); i++ {
			at := fmt.Sprintf("%s[%d]", path, i)
			if err := walkShape(dec, at, elem, depth+1); err != nil {
				return err
			}
		}
		return closeShape(dec, path)
	case string:
		if want != "" && want != "a string" {
			return fmt.Errorf("%s holds the string %q; a run writes %s there", shapePath(path), cutShape(v), want)
		}
	case bool:
		if want != "" && want != "true or false" {
			return fmt.Errorf("%s holds %v; a run writes %s there", shapePath(path), v, want)
		}
	case json.Number:
		switch want {
		case "", "a number":
			if _, err := strconv.ParseFloat(string(v), 64); err != nil {
				return fmt.Errorf("%s: %s is out of range", shapePath(path), cutShape(string(v)))
			}
		case "a whole number":
			if _, err := strconv.ParseInt(string(v), 10, 64); err != nil {
				return fmt.Errorf("%s holds %s; a run writes a whole number there", shapePath(path), cutShape(string(v)))
			}
		default:
			return fmt.Errorf("%s holds the number %s; a run writes %s there", shapePath(path), cutShape(string(v)), want)
		}
	}
	return nil
}

// walkObject reads the members of an object after its '{' and returns
// its keys. A field left out is not refused: files of earlier builds of
// the same schema lack fields later ones write, and an unscored score
// may lack its placements.
func walkObject(dec *json.Decoder, path string, t reflect.Type, depth int) (map[string]bool, error) {
	fields := map[string]reflect.Type{}
	if t != nil {
		for i := 0; i < t.NumField(); i++ {
			f := t.Field(i)
			tag := f.Tag.Get("json")
			name, _, _ := strings.Cut(tag, ",")
			if !f.IsExported() || name == "-" {
				continue
			}
			if name == "" {
				name = f.Name
			}
			fields[name] = f.Type
		}
	}
	seen := map[string]bool{}
	for dec.More() {
		tok, err := dec.Token()
		if err != nil {
			return nil, jsonBroken(dec, path, err)
		}
		key := tok.(string)
		at := key
		if path != "" {
			at = path + "." + key
		}
		if seen[key] {
			return nil, fmt.Errorf("%s is given twice; keep one", at)
		}
		seen[key] = true
		var ft reflect.Type
		if f, ok := fields[key]; ok {
			ft = f
		}
		if err := walkShape(dec, at, ft, depth+1); err != nil {
			return nil, err
		}
	}
	if err := closeShape(dec, path); err != nil {
		return nil, err
	}
	return seen, nil
}

// maxShapeDepth bounds the nesting of a results file (a run writes 4
// levels at most; our bound).
const maxShapeDepth = 32

// closeShape reads the ']' or '}' that ends the list or object at path.
func closeShape(dec *json.Decoder, path string) error {
	if _, err := dec.Token(); err != nil {
		return jsonBroken(dec, path, err)
	}
	return nil
}

// jsonBroken says where the JSON of a results file stops being JSON.
func jsonBroken(dec *json.Decoder, path string, err error) error {
	if err == io.EOF || errors.Is(err, io.ErrUnexpectedEOF) {
		return fmt.Errorf("%s: the file is cut short there", shapePath(path))
	}
	return fmt.Errorf("%s: not valid JSON there (at byte %d: %v; JSON has no NaN or Infinity)", shapePath(path), dec.InputOffset(), err)
}

// cutShape shortens a quoted value to 60 characters.
func cutShape(s string) string {
	if len(s) > 60 {
		return s[:60] + "..."
	}
	return s
}
