package batch

import (
	"bufio"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"areasweep/cmd/internal/slurm"
	"areasweep/report/outfile"
)

// Marker is the content of a completion marker: "key<TAB>value" lines.
// The keys the batch command writes are "study", "settings" (SettingsHash
// of the study's settings), "results" (the SHA-256 of its results.json)
// and "input.NNNN", one per input file read (SetInputs, Inputs).
// The SLURM array script writes "study", "shard", "finished" and "job".
type Marker map[string]string

// SettingsHash is the hex SHA-256 of a canonical encoding of a study's
// settings (the command chooses the encoding; it must not hold anything
// that does not change a number, such as the worker count).
func SettingsHash(canonical []byte) string {
	h := sha256.Sum256(canonical)
	return hex.EncodeToString(h[:])
}

// MarkerPath is the marker's path in a study's folder.
func MarkerPath(dir string) string { return filepath.Join(dir, slurm.MarkerName) }

// WriteMarker writes m into dir's marker, atomically: a temporary file in
// dir, synced, then renamed. Keys are written sorted.
func WriteMarker(dir string, m Marker) error {
	keys := make([]string, 0, len(m))
	for k := range m {
		if strings.ContainsAny(k, "\t\n\r") || strings.ContainsAny(m[k], "\n\r") {
			return fmt.Errorf("batch: marker field %q holds a tab or line break", k)
		}
		keys = append(keys, k)
	}
	slices.Sort(keys)
	var b strings.Builder
	for _, k := range keys {
		fmt.Fprintf(&b, "%s\t%s\n", k, m[k])
	}
	if err := outfile.Write(MarkerPath(dir), []byte(b.String()), 0o666); err != nil {
		return fmt.Errorf("batch: the completion marker in %s: %w", dir, err)
	}
	return nil
}

// ReadMarker reads dir's marker. It returns (nil, nil) when there is none.
func ReadMarker(dir string) (Marker, error) {
	f, err := os.Open(MarkerPath(dir))
	if errors.Is(err, os.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		if st, serr := os.Stat(dir); serr == nil && !st.IsDir() {
			return nil, fmt.Errorf("%s is a file, not a folder: the study's outputs go into a folder of that name; move or rename the file, then run again", dir)
		}
		return nil, fmt.Errorf("batch: reading the completion marker %s: %w", MarkerPath(dir), err)
	}
	defer f.Close()
	if st, err := f.Stat(); err == nil && st.IsDir() {
		return nil, fmt.Errorf("%s is a folder, where areasweep keeps the study's completion marker (a file): it was not made by areasweep; move or rename it, then run again", MarkerPath(dir))
	}
	m := Marker{}
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if k, v, ok := strings.Cut(sc.Text(), "\t"); ok {
			m[k] = v
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("batch: reading the completion marker %s: %w", MarkerPath(dir), err)
	}
	return m, nil
}

// FileSHA256 returns the hex SHA-256 of the file at path.
func FileSHA256(path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", fmt.Errorf("batch: %w", err)
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", fmt.Errorf("batch: reading %s: %w", path, err)
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}
