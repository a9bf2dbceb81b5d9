package extent

import (
	"os"
	"testing"
)

// TestConfigureCache checks the block cache Configure gives GDAL: 16 MB
// when the user set none (see Configure for why it is small), and the
// user's own value otherwise. The other settings are checked where they
// show: the demo's GeoPackages' bytes (TestDemoOutputsUnchanged) and no
// .aux.xml beside the inputs (the command's tests).
func TestConfigureCache(t *testing.T) {
	for _, tc := range []struct {
		name, set, want string
	}{
		{"unset", "", "16"},
		{"user's value", "300", "300"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Setenv("GDAL_CACHEMAX", tc.set) // restored after the test
			if tc.set == "" {
				os.Unsetenv("GDAL_CACHEMAX")
			}
			Configure()
			if got := os.Getenv("GDAL_CACHEMAX"); got != tc.want {
				t.Errorf("GDAL_CACHEMAX = %q after Configure, want %q", got, tc.want)
			}
		})
	}
}
