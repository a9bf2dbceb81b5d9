package report

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"

	"areasweep/report/outfile"
)

// Write writes report.html, methods.md and figures/*.svg, *.pdf and *.png
// into dir (which exists). Each file is written atomically (temp file in the
// same dir, then rename). Uses r.Sensitivity (call Analyze first), which it
// only reads. The output depends only on r: no timestamps, maps iterated
// in sorted order. The files are drawn and written in parallel
// (writeFigures); on an error, the files that were done are in place and
// the first error in a fixed order is returned.
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
	methods := methodsText(r)
	methodsErr := make(chan error, 1)
	go func() {
		methodsErr <- recovered("methods.md", func() error { return writeAtomic(filepath.Join(dir, "methods.md"), []byte(methods)) })
	}()
	err := writeFigures(filepath.Join(dir, "figures"), figures(r), func(rendered []renderedFigure) error {
		page, err := htmlPage(r, rendered, methods)
		if err != nil {
			return err
		}
		return writeAtomic(filepath.Join(dir, "report.html"), page)
	})
	if merr := <-methodsErr; err == nil {
		err = merr
	}
	return err
}

// writeAtomic writes data to path whole or not at all (package outfile),
// with the package prefix on its error.
func writeAtomic(path string, data []byte) error {
	if err := outfile.Write(path, data, 0o666); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	return nil
}
