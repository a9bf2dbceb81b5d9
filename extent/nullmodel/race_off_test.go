//go:build !race

package nullmodel

// raceEnabled: see race_on_test.go.
const raceEnabled = false
