package pipeline

import (
	"errors"
	"strings"
	"testing"
)

// TestTimedOnlyWhenDone checks that timed writes a phase's line to the run
// log when the phase succeeds and none when it fails: the line says the
// work is done ("occurrences read, placed and sampled in 0.00 s" was
// logged before the refusal of a bad occurrence table).
func TestTimedOnlyWhenDone(t *testing.T) {
	s := &Study{o: &Options{}, log: &Log{}} // no ErrOut: the run log alone
	if err := s.timed("phase one done", func() error { return nil }); err != nil {
		t.Fatal(err)
	}
	bad := errors.New("bad input")
	if err := s.timed("phase two done", func() error { return bad }); err != bad {
		t.Fatalf("error %v, want the phase's own", err)
	}
	log := s.log.String()
	if !strings.Contains(log, "phase one done in ") || strings.Contains(log, "phase two done") {
		t.Fatalf("run log %q: want the first phase's line only", log)
	}
}
