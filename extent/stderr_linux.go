package extent

import (
	"os"
	"syscall"
)

// withoutStderr runs fn with file descriptor 2 pointed at /dev/null, then
// restores it. Nothing may write to standard error meanwhile: what does
// is lost.
func withoutStderr(fn func()) {
	null, err := os.OpenFile(os.DevNull, os.O_WRONLY, 0)
	if err != nil {
		fn()
		return
	}
	defer null.Close()
	saved, err := syscall.Dup(2)
	if err != nil {
		fn()
		return
	}
	defer syscall.Close(saved)
	if err := syscall.Dup3(int(null.Fd()), 2, 0); err != nil {
		fn()
		return
	}
	defer syscall.Dup3(saved, 2, 0)
	fn()
}
