package pass

import "syscall"

// madvHugepage is MADV_HUGEPAGE.
const madvHugepage = syscall.MADV_HUGEPAGE
