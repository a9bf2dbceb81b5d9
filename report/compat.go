package report

import "areasweep/extent/vocab"

// Names kept so that cmd compiles unchanged while it moves; new code uses
// the vocab package. Remove them once cmd refers to vocab.
type (
	// ExtentStatus is vocab.Status, the status extent.Member has too.
	ExtentStatus = vocab.Status
	// PointStatus is vocab.PointStatus.
	PointStatus = vocab.PointStatus
)

// The statuses under their former names.
const (
	ExtentOK           = vocab.StatusOK
	ExtentEmpty        = vocab.StatusEmpty
	ExtentDuplicate    = vocab.StatusDuplicate
	PointScored        = vocab.PointScored
	PointOutsideRaster = vocab.PointOutsideRaster
	PointNoData        = vocab.PointNoData
	PointThinned       = vocab.PointThinned
)
