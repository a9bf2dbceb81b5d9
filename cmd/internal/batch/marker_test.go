package batch

import (
	"os"
	"strings"
	"testing"
)

// TestReadMarkerFolder: a folder where the completion marker goes (made by
// hand) is named as such, with what to do; it read "read ...: is a
// directory" before.
func TestReadMarkerFolder(t *testing.T) {
	dir := t.TempDir()
	if err := os.Mkdir(MarkerPath(dir), 0o755); err != nil {
		t.Fatal(err)
	}
	m, err := ReadMarker(dir)
	if m != nil || err == nil || !strings.Contains(err.Error(), MarkerPath(dir)+" is a folder") || !strings.Contains(err.Error(), "move or rename it") || strings.Contains(err.Error(), "is a directory") {
		t.Errorf("ReadMarker on a folder: %v, %v", m, err)
	}
	if _, err := os.Stat(MarkerPath(dir)); err != nil {
		t.Errorf("the folder was touched: %v", err)
	}
}
