package report

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"html"
	"image/png"
	"io"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"areasweep/extent/vocab"
)

// needChromium returns the headless browser, skipping the test when
// there is none, and failing it under CI, which must install it.
func needChromium(t *testing.T) string {
	t.Helper()
	bin := findChromium()
	if bin == "" {
		if os.Getenv("CI") == "true" {
			t.Fatal("chromium not found: CI must install it (Debian package chromium)")
		}
		t.Skip("chromium not found: install Debian's chromium to run this test (a skip is not a pass)")
	}
	return bin
}

// findChromium returns the headless browser to use, or "".
func findChromium() string {
	for _, name := range []string{"/usr/bin/chromium", "chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	return ""
}

// chromiumArgs are the flags the brief prescribes, plus two that keep the
// browser's own background traffic on the machine: --no-proxy-server and a
// host resolver that resolves no name, so no request can leave even if
// Chromium starts one by itself (it does: update checks, account lookups).
func chromiumArgs(userDir string, extra ...string) []string {
	args := []string{
		"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--user-data-dir=" + userDir,
		"--no-proxy-server", "--host-resolver-rules=MAP * ~NOTFOUND",
		"--disable-features=NetworkTimeServiceQuerying,OptimizationHints,MediaRouter,Translate",
		"--disable-domain-reliability", "--no-pings", "--disable-extensions",
	}
	return append(args, extra...)
}

func runChromium(t *testing.T, bin string, args []string) (stdout, stderr []byte) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin, args...)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	cmd.Env = append(os.Environ(), "HOME="+t.TempDir())
	if err := cmd.Run(); err != nil {
		t.Fatalf("chromium %v: %v\n%s", args, err, tail(errb.String(), 2000))
	}
	return out.Bytes(), errb.Bytes()
}

func tail(s string, n int) string {
	if len(s) > n {
		return s[len(s)-n:]
	}
	return s
}

// attr returns the value of attribute name in the first start tag matching
// the tag regexp, HTML-unescaped, and whether it was found.
func attr(dom, tagRe, name string) (string, bool) {
	tag := regexp.MustCompile(tagRe).FindString(dom)
	if tag == "" {
		return "", false
	}
	m := regexp.MustCompile(`\s` + regexp.QuoteMeta(name) + `="([^"]*)"`).FindStringSubmatch(tag)
	if m == nil {
		return "", false
	}
	return html.UnescapeString(m[1]), true
}

// browserOwnHosts are the hosts Chromium contacts by itself on start (update
// checks, account lookup, time). With the resolver rule above none of these
// resolves; they are listed so that the log check can tell them from a
// fetch made by the page, which has no host of its own to reach.
var browserOwnHosts = []string{"update.googleapis.com", "accounts.google.com", "clients2.google.com",
	"clientservices.googleapis.com", "redirector.gvt1.com", "edgedl.me.gvt1.com", "optimizationguide-pa.googleapis.com"}

// layoutCheckJS is appended to a copy of report.html by the browser test.
// After the page's own script has run it measures the layout and writes a
// JSON summary into <html data-layout>:
//   - every <text> of every figure SVG, by getBBox mapped into the SVG's
//     view box (through getScreenCTM), must lie inside the view box;
//   - the page must not scroll sideways, every table wrapper and figure
//     must end inside the window, and a table wider than its wrapper must
//     sit in a wrapper that scrolls (overflow-x auto or scroll).
const layoutCheckJS = `
(function () {
  var out = { figures: 0, texts: 0, outside: [], overflow: [], tables: 0, scrolling: 0 };
  try {
    var cw = document.documentElement.clientWidth;
    Array.prototype.forEach.call(document.querySelectorAll("svg.figure"), function (svg) {
      out.figures++;
      var vb = svg.viewBox.baseVal;
      var inv = svg.getScreenCTM().inverse();
      Array.prototype.forEach.call(svg.querySelectorAll("text"), function (t) {
        out.texts++;
        var b = t.getBBox();
        var m = inv.multiply(t.getScreenCTM());
        var xs = [], ys = [];
        [[b.x, b.y], [b.x + b.width, b.y], [b.x, b.y + b.height], [b.x + b.width, b.y + b.height]].forEach(function (p) {
          var q = new DOMPoint(p[0], p[1]).matrixTransform(m);
          xs.push(q.x); ys.push(q.y);
        });
        var x0 = Math.min.apply(null, xs), x1 = Math.max.apply(null, xs), y0 = Math.min.apply(null, ys), y1 = Math.max.apply(null, ys);
        if (x0 < vb.x - 0.5 || y0 < vb.y - 0.5 || x1 > vb.x + vb.width + 0.5 || y1 > vb.y + vb.height + 0.5) {
          out.outside.push(svg.id + ": '" + t.textContent + "' spans x " + x0.toFixed(1) + ".." + x1.toFixed(1) + ", y " + y0.toFixed(1) + ".." + y1.toFixed(1) + " in a " + vb.width.toFixed(1) + " x " + vb.height.toFixed(1) + " view box");
        }
      });
      var r = svg.getBoundingClientRect();
      if (r.right > cw + 1) { out.overflow.push("figure " + svg.id + " ends at " + r.right + " px, window " + cw); }
    });
    if (document.documentElement.scrollWidth > cw + 1) {
      out.overflow.push("the page scrolls sideways: " + document.documentElement.scrollWidth + " > " + cw + " px");
    }
    Array.prototype.forEach.call(document.querySelectorAll(".tablewrap"), function (w) {
      out.tables++;
      var id = w.querySelector("table") ? w.querySelector("table").id : "?";
      var r = w.getBoundingClientRect();
      if (r.right > cw + 1) { out.overflow.push("table " + id + " ends at " + r.right + " px, window " + cw); }
      if (w.scrollWidth > w.clientWidth + 1) {
        out.scrolling++;
        var ox = getComputedStyle(w).overflowX;
        if (ox !== "auto" && ox !== "scroll") { out.overflow.push("table " + id + " is wider than its wrapper, which does not scroll (" + ox + ")"); }
      }
    });
  } catch (e) {
    out.overflow.push("layout check failed: " + e);
  }
  document.documentElement.setAttribute("data-layout", JSON.stringify(out));
})();
`

// layoutResult mirrors the JSON written by layoutCheckJS.
type layoutResult struct {
	Figures   int      `json:"figures"`
	Texts     int      `json:"texts"`
	Outside   []string `json:"outside"`
	Overflow  []string `json:"overflow"`
	Tables    int      `json:"tables"`
	Scrolling int      `json:"scrolling"`
}

// TestReportInChromium opens a copy of report.html from disk in headless
// Chromium at 1400 and 800 px wide. The copy only adds layoutCheckJS at the
// end of <body>. At each width it checks:
//   - no script error, console.error, unhandled rejection or policy
//     violation: the page's own capture script records them into
//     <html data-errors>, read back from --dump-dom; the Chromium log
//     (--enable-logging=stderr --v=1) must hold no CONSOLE message;
//   - no network: the page records performance.getEntriesByType("resource")
//     (every fetch of an image, script, style, font or XHR) into
//     data-resources, which must be 0; the Chromium log's
//     NotifyBeforeURLRequest lines may name only file:, data:, about: or
//     chrome: URLs and the browser's own background hosts (which the
//     resolver rule makes unreachable); TestHTMLSelfContained scans the
//     HTML for external src/href/url();
//   - the layout (layoutCheckJS): every SVG text inside its figure's view
//     box, no sideways page scroll, tables scroll inside their wrapper;
//   - every figure's <svg> is in the DOM by id, and the selector works: the
//     fragment #extent=<last usable extent>&model=<first model> makes the
//     script draw that curve and write the shown AUC into data-auc, which
//     must equal the score in the results;
//   - a screenshot of the window renders (copied to $AREASWEEP_ARTEFACTS as
//     report_<width>px.png when set).
//
// The figures are drawn with Liberation Sans metrics; the test needs that
// font installed (Debian fonts-liberation2, installed by setup.sh --test)
// so that the browser measures the same text widths.
func TestReportInChromium(t *testing.T) {
	bin := needChromium(t)
	if out, err := exec.Command("fc-match", "Liberation Sans").Output(); err != nil || !strings.Contains(string(out), "Liberation") {
		t.Fatalf("font Liberation Sans not installed (fc-match says %q, %v): install Debian's fonts-liberation2 (scripts/setup.sh --test)", out, err)
	}
	srcDir, r := writeSample(t)
	model := r.Models[0].Name
	var ext string
	var want float64
	for _, e := range r.Extents {
		if e.Status != vocab.StatusOK {
			continue
		}
		for _, s := range r.Scores {
			if s.Model == model && s.Extent == e.ID && s.Scored {
				ext, want = e.ID, s.AUC
			}
		}
	}
	if ext == "" {
		t.Fatal("sample has no scored extent")
	}
	html, err := os.ReadFile(filepath.Join(srcDir, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	end := bytes.LastIndex(html, []byte("</body>"))
	if end < 0 {
		t.Fatal("report.html has no </body>")
	}
	checked := append(append(append([]byte{}, html[:end]...), "<script>"+layoutCheckJS+"</script>\n"...), html[end:]...)
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "report.html"), checked, 0o644); err != nil {
		t.Fatal(err)
	}
	page := "file://" + filepath.Join(dir, "report.html") + "#extent=" + url.QueryEscape(ext) + "&model=" + url.QueryEscape(model)

	for _, width := range []int{1400, 800} {
		t.Run(strconv.Itoa(width)+"px", func(t *testing.T) {
			t.Parallel() // two browsers at once: each has its own profile folder
			shot := filepath.Join(t.TempDir(), "screenshot.png")
			dom, logs := runChromium(t, bin, chromiumArgs(t.TempDir(), "--enable-logging=stderr", "--v=1", "--hide-scrollbars",
				"--window-size="+strconv.Itoa(width)+",1600", "--virtual-time-budget=5000", "--screenshot="+shot, "--dump-dom", page))
			checkPage(t, string(dom), string(logs), ext, model, want)
			checkExplorerBands(t, string(dom), r, model, ext)
			data, err := os.ReadFile(shot)
			if err != nil {
				t.Fatalf("no screenshot: %v", err)
			}
			img, err := png.Decode(bytes.NewReader(data))
			if err != nil || img.Bounds().Dx() != width {
				t.Fatalf("screenshot unreadable or not %d px wide: %v", width, err)
			}
			if a := os.Getenv("AREASWEEP_ARTEFACTS"); a != "" {
				if err := os.MkdirAll(a, 0o755); err == nil {
					copyFile(t, shot, filepath.Join(a, "report_"+strconv.Itoa(width)+"px.png"))
				}
			}
		})
	}
}

// checkPage checks one DOM dump and Chromium log of the report.
func checkPage(t *testing.T, d, logs, ext, model string, want float64) {
	t.Helper()
	if v, ok := attr(d, `<html[^>]*>`, "data-ready"); !ok || v != "1" {
		t.Fatalf("script did not finish (data-ready=%q); DOM starts %q", v, tail(d[:min(len(d), 400)], 400))
	}
	if v, ok := attr(d, `<html[^>]*>`, "data-errors"); !ok || v != "" {
		t.Errorf("page recorded errors: %q", v)
	}
	if v, _ := attr(d, `<html[^>]*>`, "data-resources"); v != "0" {
		t.Errorf("page fetched %s resources, want 0", v)
	}
	var lay layoutResult
	if v, ok := attr(d, `<html[^>]*>`, "data-layout"); !ok {
		t.Error("layout check did not run")
	} else if err := json.Unmarshal([]byte(v), &lay); err != nil {
		t.Errorf("layout result %q: %v", v, err)
	}
	if lay.Figures != len(figureNames) || lay.Texts < 50 || lay.Tables == 0 {
		t.Errorf("layout check saw %d figures, %d texts, %d tables", lay.Figures, lay.Texts, lay.Tables)
	}
	for _, o := range lay.Outside {
		t.Errorf("text outside its figure: %s", o)
	}
	for _, o := range lay.Overflow {
		t.Errorf("overflow: %s", o)
	}
	for _, f := range append(append([]string{}, figureNames...), "teach") {
		if !strings.Contains(d, `<svg id="fig-`+f+`"`) {
			t.Errorf("DOM lacks figure svg#fig-%s", f)
		}
	}
	box := `<div id="teach-numbers"[^>]*>`
	if v, _ := attr(d, box, "data-extent"); v != ext {
		t.Errorf("selector shows extent %q, want %q from the fragment", v, ext)
	}
	if v, _ := attr(d, box, "data-model"); v != model {
		t.Errorf("selector shows model %q, want %q", v, model)
	}
	got, err := strconv.ParseFloat(mustAttr(t, d, box, "data-auc"), 64)
	if err != nil || got != want {
		t.Errorf("displayed AUC %v (%v), want %v from results", got, err, want)
	}
	teach := regexp.MustCompile(`(?s)<svg id="fig-teach"[^>]*>(.*?)</svg>`).FindStringSubmatch(d)
	if teach == nil || !strings.Contains(teach[1], "<polyline") || !strings.Contains(teach[1], "AUC "+f3(want)) {
		t.Error("teaching ROC curve not drawn")
	}
	if !strings.Contains(d, `class="current">`+ext+": "+f3(want)) {
		t.Error("extent steps do not mark the chosen extent")
	}

	// Chromium's own log.
	allowed := regexp.MustCompile(`^(file|data|about|chrome|chrome-untrusted|blob):`)
	req := regexp.MustCompile(`NotifyBeforeURLRequest: (\S+)`)
	for _, line := range strings.Split(logs, "\n") {
		if strings.Contains(line, ":CONSOLE") || strings.Contains(line, "CONSOLE(") {
			t.Errorf("console message: %s", line)
		}
		m := req.FindStringSubmatch(line)
		if m == nil || allowed.MatchString(m[1]) {
			continue
		}
		u, err := url.Parse(m[1])
		if err != nil || !hostIn(u.Hostname(), browserOwnHosts) {
			t.Errorf("network request not made by the browser itself: %s", m[1])
		}
	}
}

// checkExplorerBands checks that the explorer shades the partial ROC
// region of each E as the ROC figure does (one rect per band, in its
// grey) and lists the ratio at each of those E (it shaded and listed the
// first E only).
func checkExplorerBands(t *testing.T, d string, r *Results, model, ext string) {
	t.Helper()
	teach := regexp.MustCompile(`(?s)<svg id="fig-teach"[^>]*>(.*?)</svg>`).FindStringSubmatch(d)
	if teach == nil {
		t.Fatal("no explorer svg")
	}
	bands := rocBands(r.Settings.E)
	if len(bands) < 2 {
		t.Fatalf("the sample has %d bands; the check needs two E values or more", len(bands))
	}
	for _, b := range bands {
		fill := fmt.Sprintf(`fill="rgb(%d,%d,%d)"`, b.fill.Y, b.fill.Y, b.fill.Y)
		if strings.Count(teach[1], fill) != 1 {
			t.Errorf("explorer: band of E = %v (%s) drawn %d times, want once", b.e, fill, strings.Count(teach[1], fill))
		}
	}
	listed := 0
	for _, s := range r.Scores {
		if s.Model != model || s.Extent != ext {
			continue
		}
		for _, pr := range s.PartialROC {
			if !pr.Defined {
				continue
			}
			row := fmt.Sprintf("<td>partial ROC ratio, E = %s</td><td>%s", fmtG(pr.E), f3(pr.Ratio))
			if !strings.Contains(d, row) {
				t.Errorf("explorer lists no row %q", row)
			}
			listed++
		}
	}
	if listed < 2 {
		t.Errorf("the sample's %s on %s has %d defined partial ROC ratios; the check needs two", model, ext, listed)
	}
	if !strings.Contains(d, "shaded bands: the partial ROC region of each E (") {
		t.Errorf("explorer's sentence does not name the bands: %s", regexp.MustCompile(`<p id="teach-sentence">[^<]*`).FindString(d))
	}
}

func mustAttr(t *testing.T, dom, tagRe, name string) string {
	t.Helper()
	v, ok := attr(dom, tagRe, name)
	if !ok {
		t.Fatalf("attribute %s not found", name)
	}
	return v
}

func hostIn(h string, hosts []string) bool {
	for _, x := range hosts {
		if h == x {
			return true
		}
	}
	return false
}

func copyFile(t *testing.T, from, to string) {
	in, err := os.Open(from)
	if err != nil {
		t.Errorf("artefact: %v", err)
		return
	}
	defer in.Close()
	out, err := os.Create(to)
	if err != nil {
		t.Errorf("artefact: %v", err)
		return
	}
	defer out.Close()
	if _, err := io.Copy(out, in); err != nil {
		t.Errorf("artefact: %v", err)
	}
}

// TestExplorerRoundsAsTheTables: the extent explorer writes an AUC with
// the digits the tables and sentences give it (Go's rounding: a tie to
// the even digit). An AUC of exactly 0.8125, which a small grid of equal
// cells gives readily, read 0.813 in the explorer and 0.812 in the
// tables.
func TestExplorerRoundsAsTheTables(t *testing.T) {
	bin := needChromium(t)
	r := loadSample(t)
	model, ext := r.Models[0].Name, "base"
	for i := range r.Scores {
		if r.Scores[i].Model == model && r.Scores[i].Extent == ext {
			r.Scores[i].AUC = 0.8125 // exactly halfway between 0.812 and 0.813
		}
	}
	if err := Analyze(r); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	if err := Write(dir, r); err != nil {
		t.Fatal(err)
	}
	want := f3(0.8125)
	if want != "0.812" {
		t.Fatalf("f3(0.8125) = %s", want)
	}
	page := "file://" + filepath.Join(dir, "report.html") + "#extent=" + url.QueryEscape(ext) + "&model=" + url.QueryEscape(model)
	dom, _ := runChromium(t, bin, chromiumArgs(t.TempDir(), "--virtual-time-budget=5000", "--dump-dom", page))
	d := string(dom)
	teach := regexp.MustCompile(`(?s)<svg id="fig-teach"[^>]*>(.*?)</svg>`).FindStringSubmatch(d)
	if teach == nil || !strings.Contains(teach[1], "AUC "+want+"<") {
		t.Errorf("explorer's figure does not read AUC %s", want)
	}
	if !strings.Contains(d, `class="current">`+ext+": "+want+"<") {
		t.Errorf("explorer's steps do not read %s: %s", want, regexp.MustCompile(`class="current">[^<]*`).FindString(d))
	}
	if !strings.Contains(d, "has AUC "+want+" ") {
		t.Errorf("explorer's sentence does not read %s: %s", want, regexp.MustCompile(`<p id="teach-sentence">[^<]*`).FindString(d))
	}
}

// TestExplorerModelNamedLikeAProperty: model names may be any of letters,
// digits, '_', '-' and '.', so "__proto__" is one. The explorer kept the
// models' labels in a plain object, where labels["__proto__"] is the
// object's prototype: its menu listed that model as "[object Object]"
// and its sentence read "On base, ... [object Object] has AUC 0.815"
// (seen in a run with --model __proto__=...). The sample's model "good"
// renamed "__proto__" must read as itself in the menu and the sentence.
func TestExplorerModelNamedLikeAProperty(t *testing.T) {
	bin := needChromium(t)
	raw, err := os.ReadFile(filepath.Join(sampleDir, "sample_results.json"))
	if err != nil {
		t.Fatal(err)
	}
	const model = "__proto__"
	renamed := bytes.ReplaceAll(raw, []byte(`"good"`), []byte(`"`+model+`"`))
	r := analyzedJSON(t, renamed)
	dir := t.TempDir()
	if err := Write(dir, r); err != nil {
		t.Fatal(err)
	}
	page := "file://" + filepath.Join(dir, "report.html") + "#extent=base&model=" + url.QueryEscape(model)
	dom, _ := runChromium(t, bin, chromiumArgs(t.TempDir(), "--virtual-time-budget=5000", "--dump-dom", page))
	d := string(dom)
	if v, ok := attr(d, `<html[^>]*>`, "data-errors"); !ok || v != "" {
		t.Errorf("script errors: %q", v)
	}
	if !strings.Contains(d, `<option value="`+model+`">`+model+`</option>`) {
		t.Errorf("model menu: %s", regexp.MustCompile(`<select id="sel-model">.*?</select>`).FindString(d))
	}
	sentence := regexp.MustCompile(`<p id="teach-sentence">[^<]*`).FindString(d)
	if !strings.Contains(sentence, "model "+model+" has AUC") {
		t.Errorf("explorer's sentence does not name model %s: %s", model, sentence)
	}
	if strings.Contains(d, "[object Object]") {
		t.Error(`the page shows "[object Object]"`, regexp.MustCompile(`(?s).{300}\[object Object\].{100}`).FindString(d))
	}
}
