package report

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
)

// Write writes report.html, methods.md and figures/*.svg, *.pdf and *.png
// into dir (which exists). Each file is written atomically (temp file in the
// same dir, then rename). Uses r.Sensitivity (call Analyze first). The
// output depends only on r: no timestamps, maps iterated in sorted order.
func Write(dir string, r *Results) error {
	if r == nil {
		return errors.New("report: Write: nil results")
	}
	if r.Sensitivity == nil {
		return errors.New("report: Write: results have no sensitivity analysis (call Analyze first)")
	}
	if st, err := os.Stat(dir); err != nil {
		return fmt.Errorf("report: output folder: %w", err)
	} else if !st.IsDir() {
		return fmt.Errorf("report: output %s is not a folder", dir)
	}
	rendered, err := writeFigures(filepath.Join(dir, "figures"), r)
	if err != nil {
		return err
	}
	methods := methodsText(r)
	if err := writeAtomic(filepath.Join(dir, "methods.md"), []byte(methods)); err != nil {
		return err
	}
	page, err := htmlPage(r, rendered, methods)
	if err != nil {
		return err
	}
	return writeAtomic(filepath.Join(dir, "report.html"), page)
}

// writeAtomic writes data to path through a temporary file in the same
// folder, then renames it over path, so readers never see half a file.
func writeAtomic(path string, data []byte) error {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	tmp, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return fmt.Errorf("report: write %s: %w", path, err)
	}
	name := tmp.Name()
	fail := func(err error) error {
		tmp.Close()
		os.Remove(name)
		return fmt.Errorf("report: write %s: %w", path, err)
	}
	if _, err := tmp.Write(data); err != nil {
		return fail(err)
	}
	if err := tmp.Sync(); err != nil {
		return fail(err)
	}
	if err := tmp.Chmod(0o644); err != nil {
		return fail(err)
	}
	if err := tmp.Close(); err != nil {
		os.Remove(name)
		return fmt.Errorf("report: write %s: %w", path, err)
	}
	if err := os.Rename(name, path); err != nil {
		os.Remove(name)
		return fmt.Errorf("report: write %s: %w", path, err)
	}
	return nil
}
