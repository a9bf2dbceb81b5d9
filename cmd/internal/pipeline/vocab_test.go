package pipeline

import (
	"testing"

	"areasweep/extent"
	"areasweep/report"
)

// TestExtentStatusesAgree checks that extent's member statuses and the
// results schema's extent statuses spell the same values: extent needs GDAL
// and report must not, so each declares them, and sweep.go converts one to
// the other.
func TestExtentStatusesAgree(t *testing.T) {
	pairs := []struct {
		member extent.MemberStatus
		result report.ExtentStatus
	}{
		{extent.StatusOK, report.ExtentOK},
		{extent.StatusEmpty, report.ExtentEmpty},
		{extent.StatusDuplicate, report.ExtentDuplicate},
	}
	for _, p := range pairs {
		if string(p.member) != string(p.result) {
			t.Errorf("extent status %q is written as report status %q", p.member, p.result)
		}
	}
}
