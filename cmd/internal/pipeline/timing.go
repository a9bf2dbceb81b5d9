package pipeline

import "time"

// timed runs fn and writes how long it took to the run log, so that every
// phase of a run (hashing and writing included) shows in run.log.
func (s *Study) timed(phase string, fn func() error) error {
	t0 := time.Now()
	err := fn()
	s.logf("%s in %.2f s", phase, time.Since(t0).Seconds())
	return err
}
