package inputs

import (
	"errors"
	"strings"
	"testing"
)

// TestStudyFlagOnlyKeysHJ: a study file key that is a command-line flag
// only (README: --study, --force, --quiet, --workers and --shard cannot
// be set in the study file) is refused naming the line and saying so; it
// was refused as an unknown key with the list of allowed keys only, which
// left the user to guess why force: true is not allowed.
func TestStudyFlagOnlyKeysHJ(t *testing.T) {
	for _, key := range []string{"study", "force", "quiet", "workers", "shard"} {
		_, err := ParseStudy(strings.NewReader("seed: 3\n"+key+": 1\n"), "s.yaml", "")
		if !errors.Is(err, ErrUnknownKey) {
			t.Fatalf("%s: got %v, want an unknown key", key, err)
		}
		msg := err.Error()
		for _, want := range []string{"s.yaml line 2", `key "` + key + `"`, "--" + key + " is given on the command line only", "add --" + key + " to the command"} {
			if !strings.Contains(msg, want) {
				t.Errorf("%s: lacks %q: %s", key, want, msg)
			}
		}
	}
}
