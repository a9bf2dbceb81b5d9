package inputs

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"areasweep/extent/vocab"
)

// All expected values in this file are by construction: each input table is
// written in the test and the expected records are read off it by hand.

const bom = "\uFEFF"

type okCase struct {
	name       string
	in         string
	geographic bool
	want       []Record
}

// twoRecs is the expected result of a table whose records are (1.5, 2.5,
// train) on line 2 and (-3, 4, test) on line 3 (by construction).
var twoRecs = []Record{{Line: 2, X: 1.5, Y: 2.5, Role: vocab.RoleTrain}, {Line: 3, X: -3, Y: 4, Role: vocab.RoleTest}}

func okCases() []okCase {
	var cs []okCase
	// Every accepted longitude spelling, paired with "lat", and every
	// latitude spelling, paired with "lon".
	for _, lon := range lonNames {
		cs = append(cs, okCase{name: "lon spelling " + lon, in: lon + ",lat,role\n1.5,2.5,train\n-3,4,test\n", geographic: true, want: twoRecs})
	}
	for _, lat := range latNames {
		cs = append(cs, okCase{name: "lat spelling " + lat, in: "lon," + lat + ",role\n1.5,2.5,train\n-3,4,test\n", geographic: true, want: twoRecs})
	}
	cs = append(cs, []okCase{
		{name: "mixed case and spaces in header", in: " decimalLongitude , DecimalLatitude ,  ROLE \n1.5,2.5,train\n-3,4,test\n", geographic: true, want: twoRecs},
		{name: "upper case X Y", in: "X,Y,Role\n1.5,2.5,train\n-3,4,test\n", geographic: true, want: twoRecs},
		{name: "semicolon", in: "lon;lat;role\n1.5;2.5;train\n-3;4;test\n", geographic: true, want: twoRecs},
		{name: "semicolon decimal comma", in: "lon;lat;role\n1,5;2,5;train\n-3;4;test\n", geographic: true, want: twoRecs},
		{name: "tab", in: "lon\tlat\trole\n1.5\t2.5\ttrain\n-3\t4\ttest\n", geographic: true, want: twoRecs},
		{name: "tab decimal comma", in: "lon\tlat\trole\n1,5\t2,5\ttrain\n-3\t4\ttest\n", geographic: true, want: twoRecs},
		{name: "tab with empty extra cells", in: "id\tnote\tlon\tlat\trole\n7\t\t1.5\t2.5\ttrain\n\t\t-3\t4\ttest\n", geographic: true, want: twoRecs},
		{name: "tab with spaces around cells", in: "lon\tlat\trole\n 1.5 \t 2.5\ttrain \n-3\t4\t test\n", geographic: true, want: twoRecs},
		{name: "more tabs than semicolons", in: "lon\tlat\trole\tnote;x\n1.5\t2.5\ttrain\ta;b\n-3\t4\ttest\tc\n", geographic: true, want: twoRecs},
		{name: "utf8 bom", in: bom + "lon,lat,role\n1.5,2.5,train\n-3,4,test\n", geographic: true, want: twoRecs},
		{name: "bom semicolon", in: bom + "lat;lon;role\n2,5;1,5;train\n4;-3;test\n", geographic: true, want: twoRecs},
		{name: "crlf line ends", in: "lon,lat,role\r\n1.5,2.5,train\r\n-3,4,test\r\n", geographic: true, want: twoRecs},
		{name: "carriage returns alone (CSV Macintosh)", in: "lon,lat,role\r1.5,2.5,train\r-3,4,test\r", geographic: true, want: twoRecs},
		{name: "carriage returns alone, quoted cell and a blank line", in: "lon;lat;role;note\r1,5;2,5;train;\"a;b\"\r\r-3;4;test;c", geographic: true,
			want: []Record{{Line: 2, X: 1.5, Y: 2.5, Role: vocab.RoleTrain}, {Line: 4, X: -3, Y: 4, Role: vocab.RoleTest}}},
		{name: "no final newline", in: "lon,lat,role\n1.5,2.5,train\n-3,4,test", geographic: true, want: twoRecs},
		{name: "spaces after commas", in: "lon, lat, role\n1.5, 2.5, train\n-3, 4, test\n", geographic: true, want: twoRecs},
		{name: "occurrence status present, or empty", in: "lon,lat,role,occurrenceStatus\n1.5,2.5,train,PRESENT\n-3,4,test,\n", geographic: true, want: twoRecs},
		// A line longer than the header is still read when the role comes
		// after both coordinates (a shift before the role makes it
		// unreadable), or when its extra cells are blank.
		{name: "unquoted comma in a note after the role", in: "lon,lat,role,note\n1.5,2.5,train,near a river, north bank\n-3,4,test,x\n", geographic: true, want: twoRecs},
		{name: "role first, blank extra cells", in: "role,lon,lat\ntrain,1.5,2.5,,\ntest,-3,4\n", geographic: true, want: twoRecs},
		// A header delimited by semicolons or tabs with a comma in a
		// column's name (Excel quotes only cells holding the delimiter)
		// was read at its commas and refused for lacking coordinates.
		{name: "semicolon header with a comma in a name", in: "lon;lat;role;site, notes\n1,5;2,5;train;a, b\n-3;4;test;c\n", geographic: true, want: twoRecs},
		{name: "quoted semicolon header with a comma in a name", in: "\"lon\";\"lat\";\"role\";\"site, notes\"\n1,5;2,5;train;\"a, b\"\n-3;4;test;c\n", geographic: true, want: twoRecs},
		{name: "tab header with a comma in a name", in: "lon\tlat\trole\tsite, notes\n1.5\t2.5\ttrain\ta, b\n-3\t4\ttest\tc\n", geographic: true, want: twoRecs},
		{name: "extra columns and other order", in: "role,species,lat,id,lon\ntrain,Puma concolor,2.5,1,1.5\ntest,Puma concolor,4,2,-3\n", geographic: true,
			want: []Record{{Line: 2, X: 1.5, Y: 2.5, Role: vocab.RoleTrain, Taxon: "Puma concolor"}, {Line: 3, X: -3, Y: 4, Role: vocab.RoleTest, Taxon: "Puma concolor"}}},
		// The species column: "species" before "scientificName", as a
		// portal's export has both.
		{name: "species column of an export", in: "scientificName\tspecies\tdecimalLongitude\tdecimalLatitude\trole\nPuma concolor (Linnaeus, 1771)\tPuma concolor\t1.5\t2.5\ttrain\nPuma concolor couguar\t Puma concolor \t-3\t4\ttest\n", geographic: true,
			want: []Record{{Line: 2, X: 1.5, Y: 2.5, Role: vocab.RoleTrain, Taxon: "Puma concolor"}, {Line: 3, X: -3, Y: 4, Role: vocab.RoleTest, Taxon: "Puma concolor"}}},
		{name: "quoted cells", in: "\"lon\",\"lat\",\"role\"\n\"1.5\",\"2.5\",\"train\"\n\"-3\",\"4\",\"test\"\n", geographic: true, want: twoRecs},
		{name: "comma delimiter quoted cell with comma", in: "lon,lat,role,note\n1.5,2.5,train,\"a, b\"\n-3,4,test,c\n", geographic: true, want: twoRecs},
		{name: "role spellings", in: "lon,lat,role\n1,1,Train\n2,2,TRAINING\n3,3,test\n4,4,Testing\n5,5, training \n", geographic: true,
			want: []Record{{2, 1, 1, vocab.RoleTrain, ""}, {3, 2, 2, vocab.RoleTrain, ""}, {4, 3, 3, vocab.RoleTest, ""}, {5, 4, 4, vocab.RoleTest, ""}, {6, 5, 5, vocab.RoleTrain, ""}}},
		{name: "blank lines keep physical line numbers", in: "\n\nlon,lat,role\n\n1.5,2.5,train\n   \n,,\n-3,4,test\n\n", geographic: true,
			want: []Record{{Line: 5, X: 1.5, Y: 2.5, Role: vocab.RoleTrain}, {Line: 8, X: -3, Y: 4, Role: vocab.RoleTest}}},
		{name: "semicolon rows of empty cells skipped", in: "lon;lat;role\n1,5;2,5;train\n;;\n-3;4;test\n;;\n", geographic: true,
			want: []Record{{Line: 2, X: 1.5, Y: 2.5, Role: vocab.RoleTrain}, {Line: 4, X: -3, Y: 4, Role: vocab.RoleTest}}},
		{name: "multi-line quoted cell", in: "lon,lat,role,note\n1.5,2.5,train,\"two\nlines\"\n-3,4,test,x\n", geographic: true,
			want: []Record{{Line: 2, X: 1.5, Y: 2.5, Role: vocab.RoleTrain}, {Line: 4, X: -3, Y: 4, Role: vocab.RoleTest}}},
		{name: "minus sign U+2212", in: "lon;lat;role\n1,5;2,5;train\n\u22123;4;test\n", geographic: true, want: twoRecs},
		{name: "number forms", in: "lon,lat,role\n+1.5,.25e1,train\n-3.,4E0,test\n", geographic: true, want: twoRecs},
		{name: "longitude 0..360 and range edges", in: "lon,lat,role\n360,90,train\n-180,-90,test\n", geographic: true,
			want: []Record{{2, 360, 90, vocab.RoleTrain, ""}, {3, -180, -90, vocab.RoleTest, ""}}},
		{name: "projected values not range checked", in: "x,y,role\n500000,4649776.22,train\n-20000,9999999,test\n", geographic: false,
			want: []Record{{2, 500000, 4649776.22, vocab.RoleTrain, ""}, {3, -20000, 9999999, vocab.RoleTest, ""}}},
		{name: "projected large latitude-like values not swapped", in: "lon,lat,role\n10,120,train\n20,-300,test\n", geographic: false,
			want: []Record{{2, 10, 120, vocab.RoleTrain, ""}, {3, 20, -300, vocab.RoleTest, ""}}},
		{name: "row longer than header", in: "lon,lat,role\n1.5,2.5,train,extra,cells\n-3,4,test\n", geographic: true, want: twoRecs},
		// A GBIF download is tab-separated and quotes nothing: quotes in a
		// locality are ordinary characters, even at the start of a cell.
		{name: "tab GBIF bare quotes", in: "gbifID\tlocality\tdecimalLatitude\tdecimalLongitude\trole\n1\t5 km N of \"Big Rock\", 12\" stone\t2.5\t1.5\ttrain\n2\t\"Holotype\" site\t4\t-3\ttest\n", geographic: true, want: twoRecs},
		{name: "tab GBIF cell opening a quote", in: "locality\tlat\tlon\trole\n\"Holotype site\t2.5\t1.5\ttrain\nx\t4\t-3\ttest\n", geographic: true, want: twoRecs},
		{name: "tab R write.table escapes", in: "\"lon\"\t\"lat\"\t\"role\"\t\"note\"\n1.5\t2.5\t\"train\"\t\"a \\\"q\\\" b\"\n-3\t4\t\"test\"\tc\n", geographic: true, want: twoRecs},
		{name: "tab CSV quoting with a tab in a cell", in: "lon\tlat\trole\tnote\n1.5\t2.5\ttrain\t\"a\tb \"\"c\"\"\"\n-3\t4\ttest\tc\n", geographic: true, want: twoRecs},
		{name: "tab GBIF bare quotes CRLF", in: "lon\tlat\trole\tnote\r\n1.5\t2.5\ttrain\t12\"\r\n\r\n-3\t4\ttest\tc\r\n", geographic: true,
			want: []Record{{Line: 2, X: 1.5, Y: 2.5, Role: vocab.RoleTrain}, {Line: 4, X: -3, Y: 4, Role: vocab.RoleTest}}},
	}...)
	return cs
}

func TestParseOccurrences(t *testing.T) {
	for _, tc := range okCases() {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ParseOccurrences(strings.NewReader(tc.in), "occ.csv", tc.geographic)
			if err != nil {
				t.Fatalf("unexpected error: %v", err)
			}
			if !reflect.DeepEqual(got, tc.want) {
				t.Fatalf("records\n got %+v\nwant %+v", got, tc.want)
			}
		})
	}
}

type errCase struct {
	name       string
	in         string
	geographic bool
	is         error
	line       int    // 0: whole file
	field      string // "" : no column
	contains   []string
}

func errCases() []errCase {
	return []errCase{
		{name: "no coordinate columns", in: "id,species,role\n1,a,train\n", is: ErrNoCoordinates, line: 1,
			contains: []string{"neither a longitude nor a latitude", `"species"`, "lon, long, lng, longitude, x, decimallongitude, decimal_longitude", "lat, latitude, y, decimallatitude, decimal_latitude"}},
		// A comment line above the header is read as the header: the
		// message says so.
		{name: "comment above the header", in: "# exported 2026-01-02\nlon,lat,role\n1,2,train\n", is: ErrNoCoordinates, line: 1, contains: []string{`"# exported 2026-01-02"`, "starts with '#'", "delete the lines above the header"}},
		// A study table given as the occurrence table: named as one, not
		// told to delete its shared settings.
		{name: "study table", in: "# iterations: 20\nid,model,occurrences,region\noak,m=a.tif,p.csv,r.gpkg\n", is: ErrNoCoordinates, line: 1, contains: []string{"a study table's shared setting (# iterations: ...)", "areasweep batch TABLE --out DIR"}},
		// The header written with ';' above lines with ',': each line is
		// one cell (it was refused as a longitude that "looks like
		// degrees, minutes and seconds").
		{name: "header and lines with other delimiters", in: "lon;lat;role\n1.5,2.5,train\n", is: ErrMalformed, line: 2,
			contains: []string{"the line is one cell, its parts separated by commas (,), while the header's 3 columns are separated by semicolons (;)"}},
		{name: "tab header, comma lines", in: "lon\tlat\trole\n1.5,2.5,train\n", is: ErrMalformed, line: 2, contains: []string{"separated by commas (,), while the header's 3 columns are separated by tabs"}},
		{name: "no latitude column", in: "lon,latt,role\n1,2,train\n", is: ErrNoCoordinates, line: 1, contains: []string{"no latitude column", `"latt"`}},
		{name: "no longitude column", in: "lat,role\n1,train\n", is: ErrNoCoordinates, line: 1, contains: []string{"no longitude column"}},
		{name: "unknown delimiter", in: "lon|lat|role\n1|2|train\n", is: ErrNoCoordinates, line: 1, contains: []string{"1 comma-separated fields", `"lon|lat|role"`, "semicolon or a tab"}},
		{name: "header after blank lines", in: "\n\nid;name\n1;a\n", is: ErrNoCoordinates, line: 3, contains: []string{"semicolon-separated"}},
		{name: "no role column in a wide header", in: "a1\ta2\ta3\ta4\ta5\ta6\ta7\ta8\ta9\ta10\ta11\ta12\ta13\tdecimalLatitude\tdecimalLongitude\n1\t2\t3\t4\t5\t6\t7\t8\t9\t10\t11\t12\t13\t1\t2\n", is: ErrNoRole, line: 1,
			contains: []string{`15 tab-separated fields ["a1" "a2"`, `"a12" and 3 more]`, "add a column named role"}},
		{name: "no role column", in: "lon,lat,set\n1,2,train\n", is: ErrNoRole, line: 1, contains: []string{`"set"`, "add a column named role", "train, training, test and testing", "kept in two files go into one table"}},
		{name: "two longitude columns", in: "x,lon,lat,role\n1,1,2,train\n", is: ErrAmbiguousColumn, line: 1, contains: []string{`"x" and "lon"`, "longitude", "rename or delete one"}},
		{name: "two role columns", in: "lon,lat,role,ROLE\n1,2,train,test\n", is: ErrAmbiguousColumn, line: 1, contains: []string{`"role" and "ROLE"`}},
		// A portal's export: records without coordinates are named all
		// at once (count and first ten lines), in comma- and
		// tab-separated tables; a later record with a bad number is
		// left to the next run.
		{name: "empty coordinates on many lines", in: "decimalLatitude\tdecimalLongitude\trole\n1\t2\ttrain\n\t\ttest\n3\t4\ttest\n\t\ttrain\n5\t\ttrain\n" + strings.Repeat("\t\ttest\n", 10) + "x\t1\ttest\n", is: ErrBadNumber, line: 3, field: "decimalLongitude",
			contains: []string{"cell is empty", "13 lines have an empty (or NA) longitude or latitude (lines 3, 5, 6, 7, 8, 9, 10, 11, 12, 13 and 3 more)", "delete those lines"}},
		{name: "empty coordinates on two lines", in: "lon,lat,role\n1,2,train\n,,test\n3,4,test\n5,,train\n", is: ErrBadNumber, line: 3, field: "lon",
			contains: []string{"2 lines have an empty (or NA) longitude or latitude (lines 3, 5)"}},
		// R's write.csv writes a missing coordinate as NA.
		{name: "NA coordinates on three lines", in: "lon,lat,role\n1,2,train\nNA,NA,test\n3,4,test\nNA,-42,train\n5,nan,test\n", is: ErrBadNumber, line: 3, field: "lon",
			contains: []string{`found "NA"`, "3 lines have an empty (or NA) longitude or latitude (lines 3, 5, 6)"}},
		{name: "non-numeric latitude", in: "lon,lat,role\n1,2,train\n3,abc,test\n", is: ErrBadNumber, line: 3, field: "lat", contains: []string{`"abc"`, "decimal number", "delete the line"}},
		{name: "empty longitude", in: "lon,lat,role\n1,2,train\n,4,test\n", is: ErrBadNumber, line: 3, field: "lon", contains: []string{"cell is empty", "longitude"}},
		{name: "NaN", in: "Longitude,Latitude,role\nNaN,2,train\n", is: ErrBadNumber, line: 2, field: "Longitude", contains: []string{`"NaN"`}},
		{name: "Inf", in: "lon,lat,role\n1,-Inf,train\n", is: ErrBadNumber, line: 2, field: "lat", contains: []string{`"-Inf"`}},
		{name: "overflow", in: "lon,lat,role\n1e999,1,train\n", is: ErrBadNumber, line: 2, field: "lon", contains: []string{"out of range"}},
		{name: "degrees minutes seconds", in: "lon,lat,role\n1,12°30'S,train\n", is: ErrBadNumber, line: 2, field: "lat", contains: []string{"degrees, minutes and seconds", "-12.5"}},
		{name: "hemisphere letter", in: "lon;lat;role\n8.25 W;1;train\n", is: ErrBadNumber, line: 2, field: "lon", contains: []string{"hemisphere letter"}},
		{name: "hex", in: "lon,lat,role\n0x10,1,train\n", is: ErrBadNumber, line: 2, field: "lon", contains: []string{`"0x10"`}},
		{name: "two dots", in: "lon,lat,role\n12.5.3,1,train\n", is: ErrBadNumber, line: 2, field: "lon"},
		{name: "decimal comma with comma delimiter", in: "lon,lat,role\n\"1,5\",1,train\n", is: ErrBadNumber, line: 2, field: "lon", contains: []string{`"1,5"`, "dot as decimal separator"}},
		{name: "thousands and decimal separators", in: "lon;lat;role\n1.234,5;1;train\n", is: ErrBadNumber, line: 2, field: "lon"},
		{name: "bad role", in: "lon,lat,role\n1,2,train\n3,4,validation\n", is: ErrBadRole, line: 3, field: "role", contains: []string{`"validation"`, "train, training, test and testing"}},
		{name: "empty role", in: "lon,lat,Role\n1,2,\n", is: ErrBadRole, line: 2, field: "Role", contains: []string{`found ""`}},
		// With the role column first, a decimal comma in a comma-separated
		// table shifted the coordinates and the role still read: "train,
		// 12,5,45,3" under role,lon,lat was longitude 12, latitude 5.
		{name: "decimal comma shifts coordinates after the role", in: "role,lon,lat\ntrain,12.5,45.3\ntest,12,5,45,3\n", is: ErrMalformed, line: 3,
			contains: []string{"5 cells but the header only 3", `role column ("role") comes before the coordinates`, "decimal comma", "double quotes"}},
		{name: "semicolon in a text before the coordinates", in: "role;site;lat;lon\ntrain;Big Rock; north;45,3;12,5\n", is: ErrMalformed, line: 2,
			contains: []string{"a semicolon inside a cell"}},
		{name: "short row", in: "lon,lat,role\n1,2,train\n3,4\n", is: ErrMalformed, line: 3, field: "role", contains: []string{"2 cells", "cell 3 of the header", "missing delimiter"}},
		{name: "bare quote", in: "lon,lat,role\n1,2\"x,train\n", is: ErrMalformed, line: 2, contains: []string{"double quotes"}},
		{name: "unterminated quote", in: "lon,lat,role\n1,2,train\n3,4,\"test\n", is: ErrMalformed, line: 3},
		// A quote never closed takes in every later line: the reader fails
		// at the last line (5), the quote to fix is on line 3.
		{name: "quote open to the end", in: "lon,lat,role,site\n1,2,train,a\n3,4,test,\"b\n5,6,train,c\n7,8,test,d\n", is: ErrMalformed, line: 3,
			contains: []string{"starts with a double quote", "up to line 5"}},
		// Closed on a later line with text after the quote.
		{name: "quote closed lines later", in: "lon,lat,role,site\n1,2,train,a\n3,4,test,\"b\n5,6,train,\"c\"x\n7,8,test,d\n", is: ErrMalformed, line: 3,
			contains: []string{"starts with a double quote", "up to line 4"}},
		{name: "tab bare quote and a quoted tab", in: "note\tlon\tlat\trole\na\"b\t1\t2\ttrain\n\"x\ty\"\t3\t4\ttest\n", is: ErrMalformed, line: 3,
			contains: []string{"5 tab-separated cells but the header 4", "line 2 is not valid CSV quoting"}},
		{name: "tab bare quote then a bad number", in: "lon\tlat\trole\tnote\n1\t2\ttrain\ta\"b\n3\tabc\ttest\tc\n", is: ErrBadNumber, line: 3, field: "lat",
			contains: []string{`"abc"`, "quotes as ordinary characters", "line 2 is not valid CSV quoting"}},
		{name: "utf16 le", in: "\xFF\xFEl\x00o\x00n\x00", is: ErrEncoding, line: 1, contains: []string{"UTF-16", "CSV UTF-8"}},
		{name: "utf16 be", in: "\xFE\xFF\x00l\x00o", is: ErrEncoding, line: 1},
		// Without a byte-order mark (R's write.csv with fileEncoding
		// "UTF-16LE" writes none) UTF-16 was named "a binary file", and a
		// UTF-32 mark (FF FE 00 00) "a UTF-16 byte-order mark".
		{name: "utf16 le without bom", in: "l\x00o\x00n\x00,\x00l\x00a\x00t\x00,\x00r\x00o\x00l\x00e\x00\n\x00", is: ErrEncoding, contains: []string{"UTF-16 text (little-endian) without a byte-order mark", "CSV UTF-8"}},
		{name: "utf16 be without bom", in: "\x00l\x00o\x00n\x00,\x00l\x00a\x00t\x00,\x00r\x00o\x00l\x00e\x00\n", is: ErrEncoding, contains: []string{"UTF-16 text (big-endian) without a byte-order mark"}},
		{name: "utf32 le", in: "\xFF\xFE\x00\x00l\x00\x00\x00", is: ErrEncoding, line: 1, contains: []string{"UTF-32 byte-order mark"}},
		{name: "utf32 be", in: "\x00\x00\xFE\xFF\x00\x00\x00l", is: ErrEncoding, line: 1, contains: []string{"UTF-32 byte-order mark"}},
		{name: "GeoTIFF", in: "II*\x00\b\x00\x00\x00\x14\x00\x00\x01\x03\x00,x", is: ErrEncoding, contains: []string{"binary file", "GeoTIFF", "CSV"}},
		{name: "Excel workbook", in: "PK\x03\x04\x14\x00\x06\x00lon,lat,role", is: ErrEncoding, contains: []string{"Excel .xlsx", "CSV UTF-8"}},
		{name: "shapefile", in: "\x00\x00\x27\x0a\x00\x00", is: ErrEncoding, contains: []string{"shapefile", "ogr2ogr -f CSV"}},
		{name: "GeoJSON", in: "\n{\"type\": \"FeatureCollection\",\n\"features\": []}\n", is: ErrNoCoordinates, contains: []string{"JSON (GeoJSON?)", "GEOMETRY=AS_XY"}},
		{name: "GeoPackage", in: "SQLite format 3\x00\x10\x00", is: ErrEncoding, contains: []string{"GeoPackage"}},
		{name: "NUL bytes after a text header", in: "lon,lat,role\n1,2,train\x00\x00\n", is: ErrEncoding, contains: []string{"binary file, not a text table"}},
		{name: "empty file", in: "", is: ErrNoRecords, contains: []string{"file is empty", "header line"}},
		{name: "blank file", in: "\n  \n\r\n", is: ErrNoRecords, contains: []string{"file is empty"}},
		{name: "bom only", in: bom, is: ErrNoRecords},
		{name: "header only", in: "lon,lat,role\n\n", is: ErrNoRecords, contains: []string{"only a header", "one line per occurrence"}},
		{name: "no test records", in: "lon,lat,role\n1,2,train\n3,4,training\n", is: ErrNoTest, field: "role", contains: []string{"both records are train", "role test"}},
		{name: "no train records", in: "lon,lat,role\n1,2,test\n", is: ErrNoTrain, field: "role", contains: []string{"the only record is test", "role train"}},
		{name: "latitude out of range", in: "lon,lat,role\n100,5,train\n10,95,test\n", geographic: true, is: ErrOutOfRange, line: 3, field: "lat", contains: []string{"95", "[-90, 90]", "occurrences-crs"}},
		{name: "longitude out of range", in: "lon,lat,role\n10,5,train\n400,5,test\n", geographic: true, is: ErrOutOfRange, line: 3, field: "lon", contains: []string{"400", "[-180, 360]"}},
		{name: "longitude below range", in: "lon,lat,role\n-180.5,5,train\n1,5,test\n", geographic: true, is: ErrOutOfRange, line: 2, field: "lon"},
		// Projected coordinates beyond any place on the Earth: PROJ took
		// more than 10 minutes to transform an easting of 1e20 metres from
		// EPSG:3857 (the run seemed to hang); 4e7, the Earth's
		// circumference in metres, is read.
		{name: "easting beyond the Earth", in: "x,y,role\n40000000,-4000000,train\n1e20,5e6,test\n", is: ErrFarCoordinate, line: 3, field: "x", contains: []string{"easting 1e+20", "correct or delete the line"}},
		{name: "northing beyond the Earth", in: "x,y,role\n4e5,-1.5e12,train\n1,5,test\n", is: ErrFarCoordinate, line: 2, field: "y", contains: []string{"northing -1500000000000"}},
		{name: "projected data read as degrees", in: "x,y,role\n500000,4649776,train\n510000,4650000,test\n", geographic: true, is: ErrOutOfRange, line: 2, field: "y", contains: []string{"4649776 is outside"}},
		{name: "swapped columns", in: "lon,lat,role\n45.2,-120.5,train\n40,10,train\n-33.9,151.2,test\n", geographic: true, is: ErrSwapped, line: 2, field: "lat",
			contains: []string{"-120.5", `"lon" and "lat"`, "rename the two header fields"}},
		{name: "swapped GBIF names", in: "decimalLongitude\tdecimalLatitude\trole\n-12\t-77\ttrain\n-13\t-76,5\ttest\n-10\t-150\ttest\n", geographic: true, is: ErrSwapped, line: 4, field: "decimalLatitude",
			contains: []string{`"decimalLongitude" and "decimalLatitude"`}},
		{name: "number error before range error", in: "lon,lat,role\n1,95,train\n1,x,test\n", geographic: true, is: ErrBadNumber, line: 3, field: "lat"},
		// A GBIF download's occurrenceStatus ABSENT records were scored
		// as presences where the species was not found.
		{name: "records of absences", in: "decimalLongitude\tdecimalLatitude\toccurrenceStatus\trole\n1.5\t2.5\tPRESENT\ttrain\n-3\t4\tABSENT\ttest\n-3\t4\tabsent\ttrain\n2\t4\tPRESENT\ttest\n", geographic: true, is: ErrAbsence, field: "occurrenceStatus",
			contains: []string{"2 record(s) say ABSENT in column occurrenceStatus (lines 3, 4)", "delete those lines"}},
		{name: "one record of an absence", in: "lon,lat,role,occurrence_status\n1.5,2.5,train,present\n-3,4,test, Absent \n2,4,test,\n", geographic: true, is: ErrAbsence, field: "occurrence_status",
			contains: []string{"1 record(s) say ABSENT in column occurrence_status (line 3)"}},
		{name: "eleven records of absences", in: "lon,lat,role,occurrenceStatus\n1.5,2.5,train,PRESENT\n" + strings.Repeat("-3,4,test,ABSENT\n", 11), geographic: true, is: ErrAbsence, field: "occurrenceStatus",
			contains: []string{"11 record(s) say ABSENT in column occurrenceStatus (lines 3, 4, 5, 6, 7, 8, 9, 10, 11, 12 and 1 more)"}},
	}
}

// checkParseError checks that err is a *ParseError wrapping want, naming
// file, line and field, and containing every fragment.
func checkParseError(t *testing.T, err error, want error, file string, line int, field string, fragments []string) {
	t.Helper()
	if err == nil {
		t.Fatalf("no error, want %v", want)
	}
	if !errors.Is(err, want) {
		t.Fatalf("error %q does not wrap %q", err, want)
	}
	var pe *ParseError
	if !errors.As(err, &pe) {
		t.Fatalf("error %q is not a *ParseError", err)
	}
	if pe.File != file || pe.Line != line || pe.Field != field {
		t.Fatalf("ParseError{File:%q Line:%d Field:%q}, want {%q %d %q}; message %q", pe.File, pe.Line, pe.Field, file, line, field, err)
	}
	msg := err.Error()
	if !strings.HasPrefix(msg, "inputs: "+file) {
		t.Errorf("message %q does not start with the package prefix and file", msg)
	}
	if strings.Count(msg, "inputs:") != 1 {
		t.Errorf("message %q repeats the package prefix", msg)
	}
	if line > 0 && !strings.Contains(msg, fmt.Sprintf(" line %d", line)) {
		t.Errorf("message %q does not name line %d", msg, line)
	}
	if field != "" && !strings.Contains(msg, fmt.Sprintf("column %q", field)) {
		t.Errorf("message %q does not name column %q", msg, field)
	}
	for _, f := range fragments {
		if !strings.Contains(msg, f) {
			t.Errorf("message %q lacks %q", msg, f)
		}
	}
}

func TestParseOccurrencesErrors(t *testing.T) {
	for _, tc := range errCases() {
		t.Run(tc.name, func(t *testing.T) {
			recs, err := ParseOccurrences(strings.NewReader(tc.in), "occ.csv", tc.geographic)
			if recs != nil {
				t.Errorf("records returned with an error: %v", recs)
			}
			checkParseError(t, err, tc.is, "occ.csv", tc.line, tc.field, tc.contains)
		})
	}
}

func TestSwapNeedsGeographic(t *testing.T) {
	// The "swapped columns" table read as projected is accepted (by construction).
	in := "lon,lat,role\n45.2,-120.5,train\n-33.9,151.2,test\n"
	got, err := ParseOccurrences(strings.NewReader(in), "occ.csv", false)
	if err != nil {
		t.Fatal(err)
	}
	want := []Record{{2, 45.2, -120.5, vocab.RoleTrain, ""}, {3, -33.9, 151.2, vocab.RoleTest, ""}}
	if !reflect.DeepEqual(got, want) {
		t.Fatalf("got %+v want %+v", got, want)
	}
}

func TestReadOccurrencesFile(t *testing.T) {
	dir := t.TempDir()
	good := filepath.Join(dir, "good.csv")
	bad := filepath.Join(dir, "bad.csv")
	if err := os.WriteFile(good, []byte(bom+"lon;lat;role\r\n1,5;2,5;train\r\n-3;4;test\r\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(bad, []byte("lon,lat,role\n1,2,train\n1,2,tset\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	t.Run("good", func(t *testing.T) {
		got, err := ReadOccurrences(good, true)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, twoRecs) {
			t.Fatalf("got %+v want %+v", got, twoRecs)
		}
	})
	t.Run("GBIF download with bare quotes", func(t *testing.T) {
		gbif := filepath.Join(dir, "occurrence.txt")
		if err := os.WriteFile(gbif, []byte("gbifID\tlocality\tdecimalLatitude\tdecimalLongitude\trole\n1\t\"Big Rock\" 5 km N\t2.5\t1.5\ttrain\n2\t12\" stone\t4\t-3\ttest\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		got, err := ReadOccurrences(gbif, true)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, twoRecs) {
			t.Fatalf("got %+v want %+v", got, twoRecs)
		}
	})
	t.Run("bad names path", func(t *testing.T) {
		_, err := ReadOccurrences(bad, true)
		checkParseError(t, err, ErrBadRole, bad, 3, "role", []string{`"tset"`})
	})
	t.Run("missing file", func(t *testing.T) {
		_, err := ReadOccurrences(filepath.Join(dir, "none.csv"), true)
		if !errors.Is(err, os.ErrNotExist) || !strings.HasPrefix(err.Error(), "inputs: ") || !strings.Contains(err.Error(), "none.csv") {
			t.Fatalf("got %v", err)
		}
	})
}

func TestParseErrorFormat(t *testing.T) {
	cases := []struct {
		name string
		e    ParseError
		want string
	}{
		{"full", ParseError{"a.csv", 3, "lat", errors.New("inputs: bad")}, `inputs: a.csv line 3, column "lat": bad`},
		{"no field", ParseError{"a.csv", 1, "", errors.New("bad")}, `inputs: a.csv line 1: bad`},
		{"whole file", ParseError{"a.csv", 0, "role", errors.New("bad")}, `inputs: a.csv, column "role": bad`},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.e.Error(); got != tc.want {
				t.Fatalf("got %q want %q", got, tc.want)
			}
			if tc.e.Unwrap() != tc.e.Err {
				t.Fatal("Unwrap does not return Err")
			}
		})
	}
}

func TestHeaderListsAreCopies(t *testing.T) {
	l := LongitudeHeaders()
	l[0] = "changed"
	if lonNames[0] != "lon" || LatitudeHeaders()[0] != "lat" {
		t.Fatal("header lists share storage with the package")
	}
}

func FuzzParseOccurrences(f *testing.F) {
	for _, tc := range okCases() {
		f.Add(tc.in, tc.geographic)
	}
	for _, tc := range errCases() {
		f.Add(tc.in, tc.geographic)
	}
	f.Fuzz(func(t *testing.T, in string, geographic bool) {
		recs, err := ParseOccurrences(strings.NewReader(in), "fuzz.csv", geographic)
		if err != nil {
			if recs != nil {
				t.Fatalf("records with error")
			}
			if !strings.HasPrefix(err.Error(), "inputs: ") {
				t.Fatalf("error without package prefix: %q", err)
			}
			return
		}
		var train, test bool
		last := 0
		for _, r := range recs {
			if r.Line <= last {
				t.Fatalf("line numbers not increasing: %+v", recs)
			}
			last = r.Line
			if math.IsNaN(r.X) || math.IsNaN(r.Y) || math.IsInf(r.X, 0) || math.IsInf(r.Y, 0) {
				t.Fatalf("non-finite record %+v", r)
			}
			if geographic && (r.Y < -90 || r.Y > 90 || r.X < -180 || r.X > 360) {
				t.Fatalf("out-of-range record accepted %+v", r)
			}
			switch r.Role {
			case vocab.RoleTrain:
				train = true
			case vocab.RoleTest:
				test = true
			default:
				t.Fatalf("bad role %q", r.Role)
			}
		}
		if !train || !test {
			t.Fatalf("accepted without both roles: %+v", recs)
		}
	})
}

func BenchmarkParseOccurrences(b *testing.B) {
	for _, n := range []int{1_000, 10_000, 100_000} {
		var sb strings.Builder
		sb.WriteString("id,species,decimalLongitude,decimalLatitude,role\n")
		for i := 0; i < n; i++ {
			role := "train"
			if i%4 == 0 {
				role = "test"
			}
			fmt.Fprintf(&sb, "%d,Puma concolor,%.5f,%.5f,%s\n", i, -70+float64(i%1000)*0.01, -30+float64(i%777)*0.02, role)
		}
		data := sb.String()
		b.Run(fmt.Sprintf("rows=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(int64(len(data)))
			for b.Loop() {
				if _, err := ParseOccurrences(strings.NewReader(data), "bench.csv", true); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// TestCarriageReturnsOnlyLargeTable: a table over MaxLineBytes whose lines
// end in carriage returns alone reads line by line (no "line longer than"
// refusal), with physical line numbers.
func TestCarriageReturnsOnlyLargeTable(t *testing.T) {
	var b strings.Builder
	b.WriteString("lon,lat,role\r")
	n := 0
	for b.Len() <= MaxLineBytes+1000 {
		role := "train"
		if n%2 == 1 {
			role = "test"
		}
		fmt.Fprintf(&b, "%d.25,%d.5,%s\r", n%170, n%80, role)
		n++
	}
	recs, err := ParseOccurrences(strings.NewReader(b.String()), "mac.csv", true)
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != n || recs[n-1].Line != n+1 || recs[n-1].X != float64((n-1)%170)+0.25 {
		t.Fatalf("%d records, last %+v; want %d, the last on line %d", len(recs), recs[len(recs)-1], n, n+1)
	}
}
