package pass

import (
	"slices"
	"testing"
)

// TestSignatureCollision: two member sets with the same hash (forced
// here; memberHash makes it rare) get different signatures, each found
// again, in either order.
func TestSignatureCollision(t *testing.T) {
	bd := &band{sigHash: make(map[uint64]int32), sigIndex: make(map[string]int32), sigOff: []int32{0}}
	ws := &workerState{}
	sig := func(h uint64, members ...int32) int32 {
		ws.active, ws.hash = append(ws.active[:0], members...), h
		id := ws.signature(bd)
		if got := bd.members(id); !slices.Equal(got, members) {
			t.Fatalf("signature %d of %v has members %v", id, members, got)
		}
		return id
	}
	a := sig(7, 1, 2)
	b := sig(7, 3)
	c := sig(7, 300, 301, 302)
	d := sig(memberHash(4), 4)
	if a == b || b == c || a == c || d == a || d == b || d == c {
		t.Fatalf("colliding sets share a signature: %d %d %d %d", a, b, c, d)
	}
	for range 2 {
		if sig(7, 3) != b || sig(7, 1, 2) != a || sig(7, 300, 301, 302) != c || sig(memberHash(4), 4) != d {
			t.Fatal("a set found again under another signature")
		}
	}
	if n := len(bd.sigOff) - 1; n != 4 {
		t.Fatalf("%d signatures, want 4", n)
	}
}
