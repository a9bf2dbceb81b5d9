package main

import (
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

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
	dir := t.TempDir()
	cmd := exec.Command(areasweepBin, "demo", "--out", "demo", "--quiet")
	cmd.Dir = dir
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("demo: %v\n%s", err, out)
	}
	var res struct {
		Sensitivity struct {
			Headline string `json:"headline"`
		} `json:"sensitivity"`
	}
	b, err := os.ReadFile(filepath.Join(dir, "demo", "results.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &res); err != nil {
		t.Fatal(err)
	}
	methods, err := os.ReadFile(filepath.Join(dir, "demo", "methods.md"))
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
