package report

import (
	"sync"
	"syscall"
	"unsafe"
)

// hugePage is the size of a transparent huge page on linux/amd64 and
// arm64.
const hugePage = 2 << 20

// mapped holds the start of every buffer newPixels mapped, so that
// freePixels unmaps those and no other memory.
var mapped struct {
	sync.Mutex
	at map[*byte]bool
}

// newPixels returns n bytes of zeroed memory for a canvas's pixels, mapped
// outside the Go heap and advised for transparent huge pages
// (madvise(MADV_HUGEPAGE)): a 300 dpi figure is up to 22 MB, and touching
// that much fresh memory a 4 KiB page at a time cost about 5,500 page
// faults per buffer (about 11 us each on a small VM); in 2 MiB pages it is
// a dozen. The mapping starts on a huge page, so that every whole 2 MiB of
// it can be one. When mapping fails the buffer comes from the Go heap. A
// mapped buffer is not garbage collected: give it back with freePixels.
func newPixels(n int) []byte {
	if n < hugePage {
		return make([]byte, n)
	}
	size := (n + hugePage - 1) &^ (hugePage - 1)
	m, err := syscall.Mmap(-1, 0, size+hugePage, syscall.PROT_READ|syscall.PROT_WRITE, syscall.MAP_PRIVATE|syscall.MAP_ANON)
	if err != nil {
		return make([]byte, n)
	}
	skip := 0 // to the first 2 MiB boundary
	if off := int(uintptr(unsafe.Pointer(&m[0])) & (hugePage - 1)); off != 0 {
		skip = hugePage - off
	}
	if skip > 0 {
		_ = syscall.Munmap(m[:skip])
	}
	if tail := m[skip+size:]; len(tail) > 0 {
		_ = syscall.Munmap(tail)
	}
	b := m[skip : skip+size : skip+size]
	_ = syscall.Madvise(b, syscall.MADV_HUGEPAGE) // advice only: without it the pages are small
	mapped.Lock()
	if mapped.at == nil {
		mapped.at = map[*byte]bool{}
	}
	mapped.at[&b[0]] = true
	mapped.Unlock()
	return b[:n]
}

// freePixels unmaps a buffer that newPixels mapped (b may be resliced from
// it, from its start); nothing may use b afterwards. Other buffers are
// left to the garbage collector.
func freePixels(b []byte) {
	b = b[:cap(b)]
	if len(b) == 0 {
		return
	}
	mapped.Lock()
	ok := mapped.at[&b[0]]
	delete(mapped.at, &b[0])
	mapped.Unlock()
	if ok {
		_ = syscall.Munmap(b)
	}
}
