//go:build race

package nullmodel

// raceEnabled tells a test that the race detector is on: it drops items
// put in a sync.Pool at random, so a call allocates what the pool would
// have handed back, and allocation counts grow with the number of calls.
const raceEnabled = true
