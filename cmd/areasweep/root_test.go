package main

import (
	"bytes"
	"strings"
	"testing"
)

// TestFlagErrorNamesCommandPath: a flag error points to the help of the
// command it came from, the root's included.
func TestFlagErrorNamesCommandPath(t *testing.T) {
	for args, want := range map[string]string{
		"--bogus":                 "(see 'areasweep --help')",
		"completion bash --bogus": "(see 'areasweep completion bash --help')",
		"run --workers x":         "(see 'areasweep run --help')",
	} {
		var out, errOut bytes.Buffer
		code := Main(strings.Fields(args), nil, &out, &errOut)
		if code != exitBadInput || !strings.Contains(errOut.String(), want) {
			t.Errorf("%s: exit %d, %q; want 2 and %q", args, code, errOut.String(), want)
		}
	}
}

// TestHelpUnknownTopic: help for a command areasweep does not have is bad
// input (exit 2, on standard error), not a usage text with exit 0.
func TestHelpUnknownTopic(t *testing.T) {
	var out, errOut bytes.Buffer
	if code := Main([]string{"help", "bogus"}, nil, &out, &errOut); code != exitBadInput || !strings.Contains(errOut.String(), `no help for "bogus"`) || out.Len() != 0 {
		t.Errorf("help bogus: exit %d, stdout %q, stderr %q; want 2, nothing, and the refusal", code, out.String(), errOut.String())
	}
	out.Reset()
	errOut.Reset()
	if code := Main([]string{"help", "report"}, nil, &out, &errOut); code != exitOK || !strings.Contains(out.String(), "areasweep report DIR") {
		t.Errorf("help report: exit %d, stdout %q, stderr %q", code, out.String(), errOut.String())
	}
}
