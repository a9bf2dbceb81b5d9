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

// TestBlockCacheBytes: the block cache the memory estimate counts is the
// one GDAL_CACHEMAX asks for, read as GDAL reads it (GDAL's configuration
// options page, recalled from memory: below 100,000 MB, else bytes, "N%"
// of the physical memory); unset, the BlockCacheMB that Configure sets.
// The estimate used to count 64 MB whatever the setting.
func TestBlockCacheBytes(t *testing.T) {
	for _, tc := range []struct {
		env      string
		physical int64
		want     int64
	}{
		{"", 1 << 30, BlockCacheMB << 20},
		{"64", 1 << 30, 64 << 20},
		{"99999", 1 << 30, 99999 << 20},
		{"100000", 1 << 30, 100000},
		{"268435456", 1 << 30, 268435456},
		{"5%", 1 << 30, (1 << 30) / 20},
		{"5%", 0, BlockCacheMB << 20},
		{"lots", 1 << 30, BlockCacheMB << 20},
		{"-3", 1 << 30, BlockCacheMB << 20},
	} {
		t.Setenv("GDAL_CACHEMAX", tc.env)
		if got := BlockCacheBytes(tc.physical); got != tc.want {
			t.Errorf("GDAL_CACHEMAX=%q, physical %d: %d bytes, want %d", tc.env, tc.physical, got, tc.want)
		}
	}
}

// TestCacheMaxNegative: the GDAL_CACHEMAX values Configure replaces are
// those GDAL refuses ("Invalid value for GDAL_CACHEMAX", an error raised
// at the first block read, which failed the run). Expected values measured
// with GDAL 3.6.2's Python binding (gdal.GetCacheMax() under each value):
// refused ones fall back to 5% of the memory; "-0", "--3", "-" and "- 5"
// read as 0, and "-5%" takes the percent path, which does not refuse.
func TestCacheMaxNegative(t *testing.T) {
	for _, tc := range []struct {
		v    string
		want bool
	}{
		{"-5", true},
		{"-5MB", true},
		{" -3", true},
		{"-0", false},
		{"--3", false},
		{"-", false},
		{"- 5", false},
		{"-5%", false},
		{"64", false},
		{"abc", false},
	} {
		if got := cacheMaxNegative(tc.v); got != tc.want {
			t.Errorf("cacheMaxNegative(%q) = %v, want %v", tc.v, got, tc.want)
		}
	}
	t.Setenv("GDAL_CACHEMAX", "-5")
	Configure()
	if got := os.Getenv("GDAL_CACHEMAX"); got != "16" {
		t.Errorf("GDAL_CACHEMAX = %q after Configure with -5, want 16", got)
	}
}
