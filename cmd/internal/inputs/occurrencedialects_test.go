package inputs

import (
	"reflect"
	"strings"
	"testing"

	"areasweep/extent/vocab"
)

// TestRepeatedHeader: two tables joined into one (cat a.csv b.csv)
// repeat the header as a record; it is named as such, not as a longitude
// that is not a number. Tables by construction.
func TestRepeatedHeader(t *testing.T) {
	for _, tc := range []struct{ name, in string }{
		{"same spelling", "lon,lat,role\n1,2,train\n3,4,test\nlon,lat,role\n5,6,test\n"},
		{"other case and spaces, semicolons", "Lon;Lat;Role\n1;2;train\n3;4;test\n LON ; lat ; ROLE \n5;6;test\n"},
		// Two files saved as UTF-8 with a byte-order mark: the second's
		// starts its header (it was named a longitude "\ufefflon" that
		// is not a number).
		{"second table's byte-order mark", "\ufefflon,lat,role\n1,2,train\n3,4,test\n\ufefflon,lat,role\n5,6,test\n"},
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

// TestListExample: a bad item in --e or --thresholds is answered with
// an example that flag accepts (E lies in (0,1)), not with distances.
func TestListExample(t *testing.T) {
	for flag, want := range map[string]string{"e": "--e=0.05,0.1", "thresholds": "--thresholds=0.25,0.5", "point-buffers": "--point-buffers=10,25,50"} {
		for _, in := range []string{"0.05,x", "0.05,,0.1"} {
			_, err := ParseFloatList(flag, in)
			if err == nil || !strings.Contains(err.Error(), "for example "+want) {
				t.Errorf("ParseFloatList(%q, %q): %v, want an example %q", flag, in, err, want)
			}
		}
	}
}

// TestExcelSepLine: Excel's "sep=;" first line names the delimiter and
// is no header; line numbers stay physical (the header is line 2). Tables
// by construction.
func TestExcelSepLine(t *testing.T) {
	want := []Record{{Line: 3, X: 1.5, Y: 2.5, Role: vocab.RoleTrain}, {Line: 4, X: -3, Y: 4, Role: vocab.RoleTest}}
	for name, in := range map[string]string{
		"semicolon, CRLF, BOM": bom + "sep=;\r\nlon;lat;role\r\n1,5;2,5;train\r\n-3;4;test\r\n",
		"comma":                "sep=,\nlon,lat,role,note\n1.5,2.5,train,a;b;c\n-3,4,test,x\n",
		"tab":                  "sep=\t\nlon\tlat\trole\n1.5\t2.5\ttrain\n-3\t4\ttest\n",
	} {
		t.Run(name, func(t *testing.T) {
			got, err := ParseOccurrences(strings.NewReader(in), "occ.csv", true)
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(got, want) {
				t.Errorf("records\n got %+v\nwant %+v", got, want)
			}
		})
	}
	// The line is only a hint before the header: later, it is a record.
	_, err := ParseOccurrences(strings.NewReader("lon;lat;role\nsep=;\n1;2;train\n"), "occ.csv", true)
	checkParseError(t, err, ErrBadNumber, "occ.csv", 2, "lon", nil)
}
