package pipeline

import "time"

// timed runs fn and writes how long it took to the run log, so that every
// phase of a run (hashing and writing included) shows in run.log. The
// phase names say the work is done ("extents.gpkg written"), so a phase
// that fails writes no line: its error says what happened.
func (s *Study) timed(phase string, fn func() error) error {
	t0 := time.Now()
	err := fn()
	if err == nil {
		s.logf("%s in %.2f s", phase, time.Since(t0).Seconds())
	}
	return err
}
