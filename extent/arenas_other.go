//go:build !linux

package extent

// MallocArenasUnderLimit is not used outside Linux (see arenas_linux.go).
const MallocArenasUnderLimit = 0

// AddressSpaceLimit returns 0 outside Linux: no limit is known.
func AddressSpaceLimit() int64 { return 0 }
