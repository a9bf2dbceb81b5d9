package inputs

import (
	"errors"
	"strings"
	"testing"
)

// TestBatchYAMLIDTwice: a YAML row giving id twice is refused naming both
// lines (YAML would keep one silently; the row's other keys already were
// checked this way, id was not).
func TestBatchYAMLIDTwice(t *testing.T) {
	text := "studies:\n  - id: a\n    model: m=x\n    occurrences: p\n    region: r\n    id: b\n"
	_, err := ParseBatch([]byte(text), "t.yaml", "", true)
	if !errors.Is(err, ErrBatchColumn) || !strings.Contains(err.Error(), `t.yaml line 6, study "a", column "id"`) || !strings.Contains(err.Error(), `"id" already given at line 2`) {
		t.Fatalf("got %v; want the second id refused", err)
	}
}
