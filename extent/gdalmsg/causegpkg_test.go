package gdalmsg

import "testing"

// TestCauseGeoPackageExtension: GDAL's refusal of a GeoPackage whose
// name does not end in .gpkg (copied from GDAL 3.6's output on a region
// GeoPackage copied to a file named 123) is said in our words; it reached
// the user as it was.
func TestCauseGeoPackageExtension(t *testing.T) {
	in := "File ../sub/123 has GPKG application_id, but non conformant file extension"
	want := "it is a GeoPackage whose name does not end in .gpkg, which GDAL does not open: rename it to end in .gpkg"
	if got := Cause(in); got != want {
		t.Errorf("Cause(%q) = %q, want %q", in, got, want)
	}
}
