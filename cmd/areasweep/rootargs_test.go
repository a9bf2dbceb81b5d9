package main

import (
	"strings"
	"testing"
)

// TestStrayArgument: a word given to a command that takes none (most
// often a value whose flag was left out) is named as such, with the
// command's help, instead of cobra's "unknown command" for a command that
// has no sub-commands; completion's shells included.
func TestStrayArgument(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"extents", "foo"}, `'areasweep extents' takes no arguments, got "foo": give each value after its flag, e.g. --out DIR (see 'areasweep extents --help')`},
		{[]string{"demo", "/tmp/x"}, `'areasweep demo' takes no arguments, got "/tmp/x": give each value after its flag`},
		// A study file without --study (as batch takes its table).
		{[]string{"run", "study.yaml"}, `'areasweep run' takes no arguments, got "study.yaml": a study file is given with --study (areasweep run --study study.yaml)`},
		{[]string{"extents", "s/Study.YML"}, `a study file is given with --study (areasweep extents --study s/Study.YML)`},
		{[]string{"demo", "study.yaml"}, `'areasweep demo' takes no arguments, got "study.yaml": give each value after its flag`},
		{[]string{"version", "x"}, `'areasweep version' takes no arguments, got "x" (see 'areasweep version --help')`},
		{[]string{"completion", "bash", "zsh"}, `'areasweep completion bash' takes no arguments, got "zsh" (see 'areasweep completion bash --help')`},
		// Commands with sub-commands keep cobra's wording.
		{[]string{"completion", "tcsh"}, `unknown command "tcsh" for "areasweep completion" (see 'areasweep completion --help')`},
	} {
		var out, errOut strings.Builder
		code := Main(c.args, nil, &out, &errOut)
		if code != exitBadInput || !strings.Contains(errOut.String(), c.want) {
			t.Errorf("%v: exit %d, stderr %q; want 2 and %q", c.args, code, errOut.String(), c.want)
		}
	}
}

// TestUnknownFlagSuggestion: a mistyped flag is refused (exit 2) with the
// command's flag it most likely meant (inputs.Closest), and without a
// guess when none is close; the flag's name, not a guess, for a name the
// command does not know at all.
func TestUnknownFlagSuggestion(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"run", "--modle", "a=b.tif"}, "unknown flag: --modle; did you mean --model? (see 'areasweep run --help')"},
		{[]string{"run", "--iter", "10"}, "unknown flag: --iter; did you mean --iterations? (see 'areasweep run --help')"},
		{[]string{"run", "--region_buffers=100"}, "unknown flag: --region_buffers; did you mean --region-buffers?"},
		{[]string{"extents", "--Out", "x"}, "unknown flag: --Out; did you mean --out? (see 'areasweep extents --help')"},
		{[]string{"run", "--xyzzy"}, "unknown flag: --xyzzy (see 'areasweep run --help')"},
	} {
		var out, errOut strings.Builder
		code := Main(c.args, nil, &out, &errOut)
		if code != exitBadInput || !strings.Contains(errOut.String(), c.want) {
			t.Errorf("%v: exit %d, stderr %q; want 2 and %q", c.args, code, errOut.String(), c.want)
		}
		if strings.Contains(c.want, "xyzzy") && strings.Contains(errOut.String(), "did you mean") {
			t.Errorf("%v: a guess where no flag is close: %q", c.args, errOut.String())
		}
	}
}
