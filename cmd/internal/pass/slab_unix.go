//go:build unix

package pass

import "syscall"

// blockSlab maps size bytes of anonymous memory for kept blocks and asks
// for transparent huge pages (where the kernel offers them on request);
// nil when the memory cannot be mapped.
func blockSlab(size int64) []byte {
	b, err := syscall.Mmap(-1, 0, int(size), syscall.PROT_READ|syscall.PROT_WRITE, syscall.MAP_ANON|syscall.MAP_PRIVATE)
	if err != nil {
		return nil
	}
	_ = syscall.Madvise(b, madvHugepage) // a hint: small pages work too
	return b
}

// freeSlab unmaps a slab from blockSlab.
func freeSlab(b []byte) { _ = syscall.Munmap(b) }
