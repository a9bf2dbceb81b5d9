//go:build !linux

package report

// newPixels returns n bytes of zeroed memory for a canvas's pixels (see
// the linux version, which maps huge pages).
func newPixels(n int) []byte { return make([]byte, n) }

// freePixels leaves b to the garbage collector.
func freePixels(b []byte) {}
