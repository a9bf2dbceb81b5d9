//go:build !unix

package pass

// blockSlab allocates size bytes for kept blocks on the Go heap.
func blockSlab(size int64) []byte { return make([]byte, size) }

// freeSlab leaves a slab from blockSlab to the garbage collector.
func freeSlab(b []byte) {}
