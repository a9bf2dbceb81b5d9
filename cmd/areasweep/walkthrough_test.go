package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
)

// walkthroughRun is the one demo run the walkthrough tests share: its
// folder (under the test binary's temporary folder) and what it printed.
type walkthroughRun struct {
	once           sync.Once
	err            error
	dir            string
	stdout, stderr string
}

var walkthroughShared walkthroughRun

// walkthroughDemo runs `areasweep demo` once (not quiet, so that its
// printed lines can be held to the README's) and returns that run.
func walkthroughDemo(t *testing.T) *walkthroughRun {
	t.Helper()
	w := &walkthroughShared
	w.once.Do(func() {
		w.dir = filepath.Join(filepath.Dir(areasweepBin), "walkthrough-demo")
		cmd := exec.Command(areasweepBin, "demo", "--out", w.dir)
		var so, se bytes.Buffer
		cmd.Stdout, cmd.Stderr = &so, &se
		if err := cmd.Run(); err != nil {
			w.err = fmt.Errorf("demo: %v\n%s", err, se.String())
		}
		w.stdout, w.stderr = so.String(), se.String()
	})
	if w.err != nil {
		t.Fatal(w.err)
	}
	return w
}

// TestREADMEWalkthroughQuotes runs the demo and holds the README's
// walkthrough to it: the quoted headline is the demo's headline, and the
// sentences quoted from the report and from methods.md are in them, word
// for word (line breaks and spacing aside), so that a change of wording
// cannot leave the README quoting text the program no longer writes.
func TestREADMEWalkthroughQuotes(t *testing.T) {
	readme, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	text := string(readme)
	start, end := strings.Index(text, "## Walkthrough: the demo"), strings.Index(text, "## Inputs and formats")
	if start < 0 || end < start {
		t.Fatal("README has no walkthrough section")
	}
	walk := text[start:end]
	dir := walkthroughDemo(t).dir
	var res struct {
		Sensitivity struct {
			Headline string `json:"headline"`
		} `json:"sensitivity"`
	}
	b, err := os.ReadFile(filepath.Join(dir, "results.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &res); err != nil {
		t.Fatal(err)
	}
	methods, err := os.ReadFile(filepath.Join(dir, "methods.md"))
	if err != nil {
		t.Fatal(err)
	}
	flat := func(s string) string { return strings.Join(strings.Fields(s), " ") }
	headline := flat(res.Sensitivity.Headline)

	// The block quote after "The report's headline for this run:".
	var quote []string
	if i := strings.Index(walk, "The report's headline for this run:"); i >= 0 {
		for _, line := range strings.Split(walk[i:], "\n")[1:] {
			if line == "" && len(quote) > 0 {
				break
			}
			if l, ok := strings.CutPrefix(line, "> "); ok {
				quote = append(quote, l)
			}
		}
	}
	if got := flat(strings.Join(quote, " ")); got != headline {
		t.Errorf("README's headline:\n%s\nthe demo's:\n%s", got, headline)
	}
	// Sentences quoted inline: from the headline ("says it in one
	// sentence") and from methods.md ("puts it so").
	quoted := regexp.MustCompile(`(says it in one sentence|puts it so): "([^"]+)"`).FindAllStringSubmatch(walk, -1)
	if len(quoted) < 2 {
		t.Fatalf("README's walkthrough quotes %d sentences, want the headline's and methods.md's", len(quoted))
	}
	for _, q := range quoted {
		source, from := headline, "the headline"
		if q[1] == "puts it so" {
			source, from = flat(string(methods)), "methods.md"
		}
		if !strings.Contains(source, flat(q[2])) {
			t.Errorf("README quotes %q, which %s of the demo does not hold:\n%s", flat(q[2]), from, source)
		}
	}
}

// TestRunPrintsAnswer: a run's last line on standard error is its answer,
// results.json's headline after "answer: ", and standard output stays the
// report's path alone (scripts read it); --quiet drops the answer with the
// log lines (TestDemo runs the demo with --quiet).
func TestRunPrintsAnswer(t *testing.T) {
	w := walkthroughDemo(t)
	res := loadResults(t, w.dir)
	if res.Sensitivity == nil || res.Sensitivity.Headline == "" {
		t.Fatal("the demo's results.json has no headline")
	}
	lines := strings.Split(strings.TrimSuffix(w.stderr, "\n"), "\n")
	if last := lines[len(lines)-1]; last != "answer: "+res.Sensitivity.Headline {
		t.Errorf("the demo's last line on standard error is %q, want the headline after \"answer: \"", last)
	}
	if want := "report: " + filepath.Join(w.dir, "report.html") + "\n"; w.stdout != want {
		t.Errorf("standard output is %q, want %q", w.stdout, want)
	}
	out := filepath.Join(t.TempDir(), "quiet")
	if _, se, code := runBin(t, "demo", "--out", out, "--quiet"); code != 0 || strings.Contains(se, "answer:") {
		t.Errorf("demo --quiet: exit %d, standard error %q, want no answer line", code, se)
	}
}
