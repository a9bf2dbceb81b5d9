package pipeline

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestEcoregionFieldMissing: --ecoregions without --ecoregion-field names
// the layer's fields to choose from; before, the message was only
// "--ecoregions needs --ecoregion-field NAME". A file that cannot be read
// gets the message without them (it is refused for itself later).
func TestEcoregionFieldMissing(t *testing.T) {
	dir := t.TempDir()
	eco := filepath.Join(dir, "units.geojson")
	units := `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"unit_id":3,"name":"a"},` +
		`"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1],[0,0]]]}}]}`
	if err := os.WriteFile(eco, []byte(units), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct{ path, want, not string }{
		{eco, "--ecoregions " + eco + " needs --ecoregion-field NAME, the field holding each unit's id; its fields are: name, unit_id", ""},
		{filepath.Join(dir, "missing.gpkg"), "needs --ecoregion-field NAME, the field holding each unit's id", "fields are"},
	} {
		o := &Options{}
		o.Occurrences, o.Region, o.Ecoregions = "occ.csv", "region.gpkg", tc.path
		err := o.validateInputs()
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: validateInputs = %v, want %q", tc.path, err, tc.want)
			continue
		}
		if tc.not != "" && strings.Contains(err.Error(), tc.not) {
			t.Errorf("%s: %q holds %q", tc.path, err, tc.not)
		}
	}
}
