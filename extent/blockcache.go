package extent

/*
#cgo pkg-config: gdal
#include <gdal.h>
*/
import "C"

import "sync"

// blockCache holds the raises of GDAL's block cache: base is its size
// before the first raise still held, held the bytes the holds add.
var blockCache struct {
	mu         sync.Mutex
	base, held int64
}

// HoldBlockCache raises the size of GDAL's block cache by n bytes (n > 0)
// until release is called, for a read that needs a block held while it
// takes windows of it: GDAL keeps a block in its cache, decoded, between
// reads of windows inside it only while the cache has room for it, and
// decodes it whole again for every window once another block pushes it
// out. Holds add up; when the last is released the cache returns to the
// size it had before the first, and GDAL drops the blocks beyond it (their
// memory goes back at once). release may be called more than once.
func HoldBlockCache(n int64) (release func()) {
	if n <= 0 {
		return func() {}
	}
	blockCache.mu.Lock()
	if blockCache.held == 0 {
		blockCache.base = int64(C.GDALGetCacheMax64())
	}
	blockCache.held += n
	C.GDALSetCacheMax64(C.GIntBig(blockCache.base + blockCache.held))
	blockCache.mu.Unlock()
	var once sync.Once
	return func() {
		once.Do(func() {
			blockCache.mu.Lock()
			defer blockCache.mu.Unlock()
			blockCache.held -= n
			C.GDALSetCacheMax64(C.GIntBig(blockCache.base + blockCache.held))
		})
	}
}

// BlockCacheSize returns the size of GDAL's block cache now, in bytes.
func BlockCacheSize() int64 { return int64(C.GDALGetCacheMax64()) }

// BlockCacheUsed returns the bytes GDAL's block cache holds now.
func BlockCacheUsed() int64 { return int64(C.GDALGetCacheUsed64()) }
