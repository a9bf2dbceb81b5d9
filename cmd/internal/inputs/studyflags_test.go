package inputs

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestStudyFlagOnlyKeys: a study file key that is a command-line flag
// only (README: --study, --force, --quiet, --workers and --shard cannot
// be set in the study file) is refused naming the line and saying so; it
// was refused as an unknown key with the list of allowed keys only, which
// left the user to guess why force: true is not allowed.
func TestStudyFlagOnlyKeys(t *testing.T) {
	for _, key := range []string{"study", "force", "quiet", "workers", "shard"} {
		_, err := ParseStudy(strings.NewReader("seed: 3\n"+key+": 1\n"), "s.yaml", "")
		if !errors.Is(err, ErrUnknownKey) {
			t.Fatalf("%s: got %v, want an unknown key", key, err)
		}
		msg := err.Error()
		for _, want := range []string{"s.yaml line 2", `key "` + key + `"`, "--" + key + " is given on the command line only", "add --" + key + " to the command"} {
			if !strings.Contains(msg, want) {
				t.Errorf("%s: lacks %q: %s", key, want, msg)
			}
		}
	}
}

// TestStudyBinaryFile: a raster or a GeoPackage given as --study is
// named as a binary file; the message said its first odd byte was "likely
// Latin-1 or Windows-1252, e.g. an accented letter". The bytes are a
// little-endian TIFF header and SQLite's ("SQLite format 3\0").
func TestStudyBinaryFile(t *testing.T) {
	dir := t.TempDir()
	for name, body := range map[string]string{"model.tif": "II*\x00\x08\x00\x00\x00\x10\x00\xf0", "region.gpkg": "SQLite format 3\x00\x10\x00"} {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		_, err := LoadStudy(p)
		if err == nil || !strings.Contains(err.Error(), p+" line 1") || !strings.Contains(err.Error(), "it holds NUL bytes, so it is not text") || strings.Contains(err.Error(), "Latin-1") {
			t.Errorf("%s: %v", name, err)
		}
	}
}

// TestStudyLongValueCut: a study file value of 100,000 characters is
// quoted by its first 60 and its length, as a table cell is; the message
// repeated it in full (100 to 200 kB).
func TestStudyLongValueCut(t *testing.T) {
	long := strings.Repeat("9", 100000)
	for _, body := range []string{
		"iterations: " + long + "\n",
		"seed: " + long + "\n",
		"fraction: x" + long + "\n",
		"no-thin: " + long + "\n",
		"model: " + long + "x=m.tif\n",
		"region-buffers: \"1," + long + "x\"\n",
	} {
		_, err := ParseStudy(strings.NewReader(body), "s.yaml", "")
		if err == nil || len(err.Error()) > 600 || !strings.Contains(err.Error(), "... (1000") {
			t.Errorf("%.20s: %d bytes: %.300v", body, len(errString(err)), err)
		}
	}
}

func errString(err error) string {
	if err == nil {
		return ""
	}
	return err.Error()
}

// TestStudyDirectory: a folder given as --study (or as a study table)
// is named with what to give instead; the message stopped at "is a
// directory, not a file".
func TestStudyDirectory(t *testing.T) {
	dir := t.TempDir()
	_, err := LoadStudy(dir)
	if err == nil || !strings.Contains(err.Error(), "study file "+dir+" is a directory, not a file; give the path of the file itself") {
		t.Errorf("LoadStudy(folder): %v", err)
	}
	_, err = LoadBatch(dir)
	if err == nil || !strings.Contains(err.Error(), "study table "+dir+" is a directory, not a file; give the path of the file itself") {
		t.Errorf("LoadBatch(folder): %v", err)
	}
}
