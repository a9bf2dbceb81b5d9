package report

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

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
	methods := methodsOf(r)
	methodsErr := make(chan error, 1)
	go func() {
		methodsErr <- recovered("methods.md", func() error { return writeAtomic(filepath.Join(dir, "methods.md"), []byte(methods.markdown())) })
	}()
	figs := figures(r)
	err := writeFigures(filepath.Join(dir, "figures"), figs, func(rendered []renderedFigure) error {
		page, err := htmlPage(r, rendered, methods)
		if err != nil {
			return err
		}
		return writeAtomic(filepath.Join(dir, "report.html"), page)
	})
	if err == nil {
		err = removeStalePages(filepath.Join(dir, "figures"), figs)
	}
	if merr := <-methodsErr; err == nil {
		err = merr
	}
	return err
}

// removeStalePages removes the further pages of ring_steps
// (ring_steps_N.svg, .pdf, .png) that figs does not hold: left from an
// earlier report of the same results folder with more pages, they would
// show steps that are no longer there.
func removeStalePages(figDir string, figs []figure) error {
	keep := map[string]bool{}
	for _, f := range figs {
		keep[f.Name] = true
	}
	for _, format := range figureFormats {
		paths, err := filepath.Glob(filepath.Join(figDir, ringFigureName+"_*."+format))
		if err != nil {
			return fmt.Errorf("report: %w", err)
		}
		for _, p := range paths {
			name := strings.TrimSuffix(filepath.Base(p), "."+format)
			if _, ours := ringPageNumber(name); !ours || keep[name] {
				continue // not one of our pages, or a page of this report
			}
			if err := os.Remove(p); err != nil && !os.IsNotExist(err) {
				return fmt.Errorf("report: remove stale figure page: %w", err)
			}
		}
	}
	return nil
}

// writeAtomic writes data to path whole or not at all (package outfile),
// with the package prefix on its error.
func writeAtomic(path string, data []byte) error {
	if err := outfile.Write(path, data, 0o666); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	return nil
}
