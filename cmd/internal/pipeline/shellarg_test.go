package pipeline

import "testing"

// TestShellArg: the paths put into the commands that messages suggest
// are one shell argument each (checked by hand with sh -c 'printf "%s|"').
func TestShellArg(t *testing.T) {
	for _, tc := range []struct{ name, path, want string }{
		{"plain relative", "models/gbm_v2.tif", "models/gbm_v2.tif"},
		{"absolute with dots and signs", "/data/a-b+c,d@e%f=g:h.tif", "/data/a-b+c,d@e%f=g:h.tif"},
		{"space", "my models/gbm.tif", "'my models/gbm.tif'"},
		{"tab", "a\tb.tif", "'a\tb.tif'"},
		{"single quote", "Pete's/m.tif", `'Pete'\''s/m.tif'`},
		{"dollar and star", "m$1*.tif", "'m$1*.tif'"},
		{"unicode", "möd.tif", "'möd.tif'"},
		{"empty", "", "''"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if got := shellArg(tc.path); got != tc.want {
				t.Errorf("shellArg(%q) = %s, want %s", tc.path, got, tc.want)
			}
		})
	}
}
