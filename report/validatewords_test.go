package report

import (
	"strings"
	"testing"

	"areasweep/extent/vocab"
)

// TestValidateCutsLongNames: a name, id or text of 100,000 characters
// in a hand-edited results.json is shown by its first 60 characters and
// its length; the message repeated it in full (100 kB on the terminal).
// A key of that length given twice likewise.
func TestValidateCutsLongNames(t *testing.T) {
	long := strings.Repeat("g", 100000)
	for name, edit := range map[string]func(r *Results){
		"model name": func(r *Results) {
			old := r.Models[0].Name
			r.Models[0].Name = long
			for i := range r.Scores {
				if r.Scores[i].Model == old {
					r.Scores[i].Model = long
				}
			}
			r.Scores[0].AUC = 5
		},
		"extent status": func(r *Results) { r.Extents[0].Status = vocab.Status(long) },
	} {
		r := loadSample(t)
		edit(r)
		err := Validate(r)
		if err == nil || len(err.Error()) > 400 || !strings.Contains(err.Error(), strings.Repeat("g", 50)) || !strings.Contains(err.Error(), "... (1000") {
			t.Errorf("%s: %d bytes: %.300v", name, len(errText(err)), err)
		}
	}
	_, err := Decode("results.json", []byte(`{"schema_version": 6, "`+long+`": 1, "`+long+`": 2}`))
	if err == nil || len(err.Error()) > 400 || !strings.Contains(err.Error(), "is given twice") {
		t.Errorf("a long key twice: %d bytes: %.300v", len(errText(err)), err)
	}
}

func errText(err error) string {
	if err == nil {
		return ""
	}
	return err.Error()
}
