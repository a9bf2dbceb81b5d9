package outdir

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestOpenRefusesUmaskWithoutOwnerBits: a umask that takes the owner's own
// permissions (277, 222, 777, 400) made the staging folder 0500 or less;
// as a user other than root the run then failed with "cannot write in
// PARENT (permission denied); choose a folder you can write to" about a
// folder it could write to (seen with umask 277 as nobody). Open now
// refuses such a umask, naming it, before it creates anything; the usual
// ones (022, 002, 077, 027, 000) open as before.
func TestOpenRefusesUmaskWithoutOwnerBits(t *testing.T) {
	saved := Umask
	defer func() { Umask = saved }()
	for _, tc := range []struct {
		umask  os.FileMode
		refuse bool
	}{
		{0o022, false}, {0o002, false}, {0o077, false}, {0o027, false}, {0o000, false},
		{0o277, true}, {0o222, true}, {0o777, true}, {0o400, true}, {0o100, true},
	} {
		Umask = tc.umask
		parent := t.TempDir()
		out := filepath.Join(parent, "out")
		d, err := Open(out, false, nil)
		if !tc.refuse {
			if err != nil {
				t.Errorf("umask %04o: %v", tc.umask, err)
				continue
			}
			d.Abort()
			continue
		}
		if err == nil {
			d.Abort()
			t.Errorf("umask %04o: opened, want a refusal", tc.umask)
			continue
		}
		if !fault.IsBadInput(err) || !strings.Contains(err.Error(), "umask") {
			t.Errorf("umask %04o: %v (bad input %v), want a bad-input refusal naming the umask", tc.umask, err, fault.IsBadInput(err))
		}
		if ents, _ := os.ReadDir(parent); len(ents) != 0 {
			t.Errorf("umask %04o: %d entries created beside --out", tc.umask, len(ents))
		}
	}
}
