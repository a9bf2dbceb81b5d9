package pipeline

import (
	"bytes"
	"strings"
	"testing"

	"areasweep/report"
)

// TestWarnAddressSpace: a limit of address space below what the process
// reserves plus twice the estimate plus addressSlack is warned about with
// the figures and what to do, in run.log and on standard error even with
// --quiet, and not in results.json's warnings; no limit, or one above
// that, says nothing. The figures are the measured ones of the 27-million-
// cell benchmark run under ulimit -v (VmSize 1.61 GiB at the check, an
// estimate of 157 MiB).
func TestWarnAddressSpace(t *testing.T) {
	const used, est = 1730633728, 164989212
	advised := int64(used + 2*est + addressSlack)
	for _, tc := range []struct {
		name  string
		limit int64
		warn  bool
	}{
		{"no limit", 0, false},
		{"above", advised, false},
		{"below", advised - 1, true},
		{"ulimit -v 1900000", 1900000 * 1024, true},
	} {
		var errOut bytes.Buffer
		o := &Options{}
		o.Quiet = true
		s := &Study{o: o, log: &Log{}, res: &report.Results{}, io: IO{ErrOut: &errOut}}
		s.warnAddressSpace(est, tc.limit, used)
		got := errOut.String()
		if !tc.warn {
			if got != "" || s.log.String() != "" {
				t.Errorf("%s: warned: %q", tc.name, got)
			}
			continue
		}
		for _, want := range []string{
			"areasweep: warning: the process may reserve at most ",
			"of address space (its limit of virtual memory: ulimit -v, or a cluster job's such as h_vmem)",
			"reserve 1.6 GiB of it",
			"raise the limit to at least 2.4 GiB (ulimit -v 2536605) or remove it (ulimit -v unlimited)", // (used + 2 est + 512 MiB) / 1024, rounded up
		} {
			if !strings.Contains(got, want) {
				t.Errorf("%s: %q lacks %q", tc.name, got, want)
			}
		}
		if !strings.Contains(s.log.String(), strings.TrimPrefix(strings.TrimSpace(got), "areasweep: ")) {
			t.Errorf("%s: not in run.log: %q", tc.name, s.log.String())
		}
		if len(s.res.Warnings) != 0 {
			t.Errorf("%s: in results.json's warnings: %q", tc.name, s.res.Warnings)
		}
	}
}
