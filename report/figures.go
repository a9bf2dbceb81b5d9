package report

import (
	"bytes"
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"sync"
	"syscall"
	"time"

	"codeberg.org/go-pdf/fpdf"
	"git.sr.ht/~sbinet/gg"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"
)

// figure is one figure of the report, drawn at its print size.
type figure struct {
	Name    string // file base name; the inline SVG gets id "fig-" + Name
	Title   string
	Caption string
	// Dear marks a figure whose renderings cost several times the
	// others': they start first (renderTasks).
	Dear bool
	W, H vg.Length
	draw func(c draw.Canvas) error
}

// figureFormats are the files written per figure.
var figureFormats = []string{"svg", "pdf", "png"}

// Base names of the report's figures: figures/NAME.FORMAT for each of
// figureFormats. The ring_steps figure's further pages are ring_steps_N
// (ringPageName).
const (
	metricsFigureName = "metrics_vs_area"
	rocFigureName     = "roc_curves"
	mapFigureName     = "extent_maps"
	nullFigureName    = "model_minus_null"
	ringFigureName    = "ring_steps"
)

// IsFigureFile tells whether name, a file name in a report's figures/
// folder, is one the report writes there: a figure, or a further page of
// ring_steps, in one of the figure formats.
func IsFigureFile(name string) bool {
	dot := strings.LastIndexByte(name, '.')
	if dot < 0 || !slices.Contains(figureFormats, name[dot+1:]) {
		return false
	}
	switch base := name[:dot]; base {
	case metricsFigureName, rocFigureName, mapFigureName, nullFigureName, ringFigureName:
		return true
	default:
		_, ok := ringPageNumber(base)
		return ok
	}
}

// pngDPI is the resolution of the PNG files (common practice for print).
const pngDPI = 300

// figures returns the report's figures in order.
func figures(r *Results) []figure {
	fs := []figure{metricsFigure(r), rocFigure(r)}
	if f, ok := mapFigure(r); ok {
		fs = append(fs, f)
	}
	fs = append(fs, ringsFigures(r)...)
	fs = append(fs, nullGapFigures(r)...)
	return fs
}

// renderedFigure is a figure with its SVG bytes.
type renderedFigure struct {
	fig figure
	svg []byte
}

// recovered returns fn's error, or an error naming what for a panic in fn
// (a bug, in our code or a library's): run on a goroutine of its own, a
// panic would end the program past the command's recovery.
func recovered(what string, fn func() error) (err error) {
	defer func() {
		if v := recover(); v != nil {
			err = fmt.Errorf("report: %s: internal error: %v", what, v)
		}
	}()
	return fn()
}

// renderOrder is the order the renderings of a figure's formats start
// in: the SVGs first, since the page inlines them all (it is built while
// the other formats are drawn), then the PNGs, the dearest, then the PDFs.
var renderOrder = []string{"svg", "png", "pdf"}

// renderTask is one rendering: figure fs[fig] in format.
type renderTask struct {
	fig    int
	format string
}

// renderTasks returns the renderings of fs in the order they start: every
// format of the dear figures first (Figure.Dear; the maps, whose PNG and
// PDF each cost about a quarter of the report's drawing at 60 extents),
// then the others' SVGs, PNGs and PDFs (renderOrder). Started last, a
// dear rendering would keep one core busy after the other ran out of
// work; started first, the rest fills the other core meanwhile. The order
// changes when a file is ready, never its bytes.
func renderTasks(fs []figure) []renderTask {
	var ts []renderTask
	for _, dear := range []bool{true, false} {
		for _, format := range renderOrder {
			for k, f := range fs {
				if f.Dear == dear {
					ts = append(ts, renderTask{k, format})
				}
			}
		}
	}
	return ts
}

// writeFigures renders every figure of fs as SVG, PDF and PNG into figDir
// and, once every SVG is drawn, calls withSVGs with them beside the other
// renderings (not when one failed). The renderings run in parallel, at most GOMAXPROCS at once,
// each on its own canvas, and each file is written (synced, renamed) as
// soon as it is drawn, outside that limit, so that waiting on the disk
// overlaps the drawing. No file depends on the schedule. It returns the
// first error in a fixed order: the figures in order, each in
// figureFormats order, then withSVGs's; files drawn without error are
// written even when another fails.
func writeFigures(figDir string, fs []figure, withSVGs func([]renderedFigure) error) error {
	if err := os.MkdirAll(figDir, 0o777); err != nil {
		return fmt.Errorf("report: create %s: %w", figDir, err)
	}
	errs := make([][]error, len(fs))
	for k := range errs {
		errs[k] = make([]error, len(figureFormats))
	}
	svgs := make([]renderedFigure, len(fs))
	var svgsLeft, all sync.WaitGroup
	svgsLeft.Add(len(fs))
	sem := make(chan struct{}, max(1, runtime.GOMAXPROCS(0)))
	for _, t := range renderTasks(fs) {
		k, f, format := t.fig, fs[t.fig], t.format
		j := slices.Index(figureFormats, format)
		all.Add(1)
		sem <- struct{}{}
		go func() {
			defer all.Done()
			var data []byte
			err := recovered("figure "+f.Name+" ("+format+")", func() (err error) {
				data, err = render(f, format)
				return err
			})
			<-sem
			if err == nil {
				err = writeAtomic(filepath.Join(figDir, f.Name+"."+format), data)
			}
			if format != "svg" { // the page inlines the SVGs
				outBuffers.put(data)
			}
			errs[k][j] = err
			if format == "svg" {
				svgs[k] = renderedFigure{fig: f, svg: data}
				svgsLeft.Done()
			}
		}()
	}
	var pageErr error
	all.Add(1)
	go func() {
		defer all.Done()
		svgsLeft.Wait()
		for _, fe := range errs {
			if fe[slices.Index(figureFormats, "svg")] != nil {
				return // no page without every figure
			}
		}
		pageErr = recovered("report.html", func() error { return withSVGs(svgs) })
	}()
	all.Wait()
	for _, fe := range errs {
		for _, err := range fe {
			if err != nil {
				return err
			}
		}
	}
	return pageErr
}

// pdfOnce fixes the PDF writer's dates and resource order, so that the
// same results give the same bytes (the library stamps the clock time and
// walks maps otherwise).
var pdfOnce sync.Once

// pdfFontFailed is the start of the PDF writer's panic when it cannot
// prepare the embedded font: it does so once per process, in a folder it
// makes under the temporary directory.
const pdfFontFailed = "vgpdf: could not generate font data for PDF: "

// fontTempDirError words that panic: an outside failure (a TMPDIR that is
// read-only, full or missing) rather than a bug.
func fontTempDirError(msg string) error {
	cause := strings.TrimPrefix(msg, pdfFontFailed)
	if i := strings.LastIndex(cause, ": "); i >= 0 {
		cause = cause[i+2:] // the system's reason, without the library's temporary path
	}
	if cause == syscall.EFBIG.Error() {
		// The process's limit of file size (ulimit -f), not the folder:
		// wrapped so that the caller's words name the limit
		// (outdir.FileSizeAdvice).
		return fmt.Errorf("the PDF figures' font data could not be written in the temporary folder %s: %w", os.TempDir(), syscall.EFBIG)
	}
	return fmt.Errorf("the PDF figures need the temporary folder %s (TMPDIR), which cannot be used: %s; set TMPDIR to a folder you can write to, with free space", os.TempDir(), cause)
}

// CheckTempDir reports, in fontTempDirError's words, a temporary folder
// the PDF figures could not use (TMPDIR missing, read-only or full): a
// run checks it before its work, which it otherwise lost at the end,
// when the first PDF was drawn.
func CheckTempDir() error {
	tempWork.RLock()
	defer tempWork.RUnlock()
	d, err := os.MkdirTemp("", "areasweep-tmpcheck-")
	if err != nil {
		cause := err
		var pe *os.PathError
		if errors.As(err, &pe) {
			cause = pe.Err
		}
		return fontTempDirError(pdfFontFailed + cause.Error())
	}
	return os.Remove(d)
}

// render draws f in one format: "svg", "pdf" or "png" (at pngDPI on white).
func render(f figure, format string) (data []byte, err error) {
	if format == "pdf" {
		defer func() {
			if v := recover(); v != nil {
				if msg := fmt.Sprint(v); strings.HasPrefix(msg, pdfFontFailed) {
					data, err = nil, fontTempDirError(msg)
					return
				}
				panic(v)
			}
		}()
	}
	if format == "png" {
		c := newPNGCanvas(f.W, f.H)
		defer pixBuffers.put(c.img.Pix)
		if err := f.draw(draw.New(c)); err != nil {
			return nil, err
		}
		data, err := encodePNG(c.img, pngDPI)
		if err != nil {
			return nil, fmt.Errorf("report: figure %s: write PNG: %w", f.Name, err)
		}
		return data, nil
	}
	var c vg.CanvasWriterTo
	switch format {
	case "svg":
		c = vgsvg.New(f.W, f.H)
	case "pdf":
		pdfOnce.Do(func() {
			fixed := time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)
			fpdf.SetDefaultCreationDate(fixed)
			fpdf.SetDefaultModificationDate(fixed)
			fpdf.SetDefaultCatalogSort(true)
		})
		c = pdfCanvas{vgpdf.New(f.W, f.H)}
	default:
		return nil, fmt.Errorf("report: figure %s: unknown format %q", f.Name, format)
	}
	// A white page under the drawing: the files paste onto any background.
	dc := draw.New(c)
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())
	if err := f.draw(dc); err != nil {
		return nil, err
	}
	buf := bytes.NewBuffer(outBuffers.get(format))
	if _, err := c.WriteTo(buf); err != nil {
		return nil, fmt.Errorf("report: figure %s: write %s: %w", f.Name, strings.ToUpper(format), err)
	}
	outBuffers.sized(format, buf.Len())
	if format == "svg" {
		svg := fixSVG(buf.Bytes())
		outBuffers.put(buf.Bytes())
		return svg, nil
	}
	return buf.Bytes(), nil
}

// outBuffers keeps the buffers of figure files already written for the
// next ones: a file is written into a buffer as large as the largest of
// its format so far, a used one when one is free, rather than into a
// bytes.Buffer grown by doubling from nothing, each growth fresh memory
// (page faults) and a copy. Which buffer a file is written into does not
// change its bytes.
var outBuffers = outPool{largest: map[string]int{}}

// maxOutFree is the most buffers outBuffers keeps.
const maxOutFree = 6

type outPool struct {
	mu      sync.Mutex
	free    [][]byte
	largest map[string]int // the largest file of each format so far
}

// get returns an empty buffer for a file of format: a free one with room
// for the largest file of that format so far, or a new one with that room
// and an eighth more.
func (p *outPool) get(format string) []byte {
	p.mu.Lock()
	defer p.mu.Unlock()
	n := p.largest[format]
	for i, b := range p.free {
		if cap(b) >= n {
			p.free = append(p.free[:i], p.free[i+1:]...)
			return b[:0]
		}
	}
	if n == 0 {
		return nil
	}
	return make([]byte, 0, n+n/8)
}

// sized records a file of n bytes of format.
func (p *outPool) sized(format string, n int) {
	p.mu.Lock()
	defer p.mu.Unlock()
	p.largest[format] = max(p.largest[format], n)
}

// put keeps b for a later get (the smallest buffer goes when more than
// maxOutFree are kept); b must no longer be used.
func (p *outPool) put(b []byte) {
	if cap(b) == 0 {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.free = append(p.free, b)
	if len(p.free) > maxOutFree {
		k := 0
		for i, f := range p.free {
			if cap(f) < cap(p.free[k]) {
				k = i
			}
		}
		p.free = append(p.free[:k], p.free[k+1:]...)
	}
}

// newPNGCanvas returns a white raster canvas of w x h at pngDPI. It is
// vgimg.NewWith(UseWH, UseDPI, UseBackgroundColor(white)) without that
// function's copy of the whole image into a second one (gg's
// NewContextForImage copies; NewContextForRGBA draws on the image given):
// at 300 dpi a two-column figure is 2067 x 2717 pixels, 22 MB, and the
// copy took a quarter of writing the report. The canvas size is the
// image's, rounded to whole pixels as NewWith rounds it.
func newPNGCanvas(w, h vg.Length) *pngCanvas {
	px := func(l vg.Length) int { return int(l/vg.Inch*vg.Length(pngDPI) + 0.5) }
	pw, ph := px(w), px(h)
	// The pixels are a used buffer when one is free (NewWith paints
	// every pixel).
	// A new buffer has room for the largest figure (two columns by the
	// page height), so that any later canvas can take it over.
	img := &image.RGBA{Pix: pixBuffers.get(4*pw*ph, 4*px(twoColumns)*px(maxHeight)), Stride: 4 * pw, Rect: image.Rect(0, 0, pw, ph)}
	ctx := gg.NewContextForRGBA(img)
	ctx.SetLineCapButt()
	ctx.SetInterpolator(gridBiLinear{})
	ctx.InvertY()
	// NewWith paints the image with its background colour, white by
	// default (an image option excludes UseBackgroundColor).
	return newFastTextCanvas(vgimg.NewWith(vgimg.UseImageWithContext(img, ctx), vgimg.UseDPI(pngDPI)), img)
}

// pageFigurePx is the widest a figure is shown on the page, in CSS
// pixels: svg.figure's max-width in page/report.css, which a
// two-column figure fills.
const pageFigurePx = 1000

// appendInlineSVG appends to dst an SVG document prepared for inlining in
// HTML: without the XML prolog and comment, the root element given an id,
// a role and a label. A figure narrower than two columns (print width w)
// is given a max-width in proportion, pageFigurePx × w / twoColumns, so
// that its text is shown at the size of the other figures' text: filling
// the page's width, a one-column figure (the ROC curves of one model, the
// map of one panel) showed its 8 pt labels about twice as large.
func appendInlineSVG(dst, svg []byte, id, label string, w vg.Length) []byte {
	i := bytes.Index(svg, []byte("<svg"))
	if i < 0 {
		return append(dst, svg...)
	}
	dst = fmt.Appendf(dst, `<svg id="%s" class="figure" role="img" aria-label="%s"`, id, htmlEscape(label))
	if w > 0 && w < twoColumns {
		dst = fmt.Appendf(dst, ` style="max-width:%dpx"`, int(math.Round(pageFigurePx*float64(w/twoColumns))))
	}
	return append(dst, svg[i+len("<svg"):]...)
}

// svgFixes are fixSVG's replacements; no two can overlap.
var svgFixes = [][2][]byte{
	{[]byte("<image "), []byte(`<image preserveAspectRatio="none" style="image-rendering:pixelated" `)},
	{[]byte("font-family:Liberation Sans;"), []byte("font-family:'Liberation Sans',Arial,Helvetica,sans-serif;")},
}

// fixSVG makes embedded raster images fill their rectangle (the map
// preview is stretched to the data extent, not letterboxed) and keeps their
// cells sharp, and names fonts with the same widths as Liberation Sans
// (Arial, Helvetica) for viewers that lack it. It is bytes.ReplaceAll of
// each of svgFixes in turn, in one pass into one buffer of the final
// size.
func fixSVG(svg []byte) []byte {
	n := len(svg)
	next := make([]int, len(svgFixes)) // the next match of each, or -1
	for k, f := range svgFixes {
		n += bytes.Count(svg, f[0]) * (len(f[1]) - len(f[0]))
		next[k] = bytes.Index(svg, f[0])
	}
	out := make([]byte, 0, n)
	for r := 0; ; {
		k := -1 // the fix that matches first
		for q, at := range next {
			if at >= 0 && (k < 0 || at < next[k]) {
				k = q
			}
		}
		if k < 0 {
			return append(out, svg[r:]...)
		}
		out = append(append(out, svg[r:next[k]]...), svgFixes[k][1]...)
		r = next[k] + len(svgFixes[k][0])
		if i := bytes.Index(svg[r:], svgFixes[k][0]); i >= 0 {
			next[k] = r + i
		} else {
			next[k] = -1
		}
	}
}
