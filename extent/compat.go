package extent

import "areasweep/extent/vocab"

// Names kept so that cmd compiles unchanged while it moves; new code uses
// the vocab package. Remove them once cmd refers to vocab.
type (
	// MemberStatus is vocab.Status.
	MemberStatus = vocab.Status
)

// The statuses under their former names.
const (
	StatusOK        = vocab.StatusOK
	StatusEmpty     = vocab.StatusEmpty
	StatusDuplicate = vocab.StatusDuplicate
)
