//go:build unix && !linux

package pass

// madvHugepage is a no-op advice (MADV_NORMAL) where the system has no
// MADV_HUGEPAGE.
const madvHugepage = 0
