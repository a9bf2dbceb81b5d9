package inputs

import (
	"strings"
	"testing"
)

// TestRepeatedHeaderH26: two tables joined into one (cat a.csv b.csv)
// repeat the header as a record; it is named as such, not as a longitude
// that is not a number. Tables by construction.
func TestRepeatedHeaderH26(t *testing.T) {
	for _, tc := range []struct{ name, in string }{
		{"same spelling", "lon,lat,role\n1,2,train\n3,4,test\nlon,lat,role\n5,6,test\n"},
		{"other case and spaces, semicolons", "Lon;Lat;Role\n1;2;train\n3;4;test\n LON ; lat ; ROLE \n5;6;test\n"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ParseOccurrences(strings.NewReader(tc.in), "occ.csv", true)
			checkParseError(t, err, ErrMalformed, "occ.csv", 4, "", []string{"repeats the header (line 1)", "two tables are joined", "delete it"})
		})
	}
	// A record whose role cell alone reads "role" is a bad role, as before.
	_, err := ParseOccurrences(strings.NewReader("lon,lat,role\n1,2,train\n3,4,role\n"), "occ.csv", true)
	checkParseError(t, err, ErrBadRole, "occ.csv", 3, "role", nil)
}

// TestListExampleH26: a bad item in --e or --thresholds is answered with
// an example that flag accepts (E lies in (0,1)), not with distances.
func TestListExampleH26(t *testing.T) {
	for flag, want := range map[string]string{"e": "--e=0.05,0.1", "thresholds": "--thresholds=0.25,0.5", "point-buffers": "--point-buffers=10,25,50"} {
		for _, in := range []string{"0.05,x", "0.05,,0.1"} {
			_, err := ParseFloatList(flag, in)
			if err == nil || !strings.Contains(err.Error(), "for example "+want) {
				t.Errorf("ParseFloatList(%q, %q): %v, want an example %q", flag, in, err, want)
			}
		}
	}
}
