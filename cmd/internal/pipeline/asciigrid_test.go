package pipeline

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"areasweep/cmd/internal/fault"
)

// TestASCIIGridCells: an ESRI ASCII grid whose cells are not ncols ×
// nrows numbers is refused, naming the line and the word, or the count;
// GDAL 3.6 read such a grid without a word (a word "abc" inserted in a
// row of a 300 × 240 grid changed 2682 cells, compared with numpy's
// reading of the intact file: the values after it shifted by one).
// Grids GDAL reads as written are accepted: any case in the header,
// Windows line ends, nan (signed too), exponents, values wrapped over
// other lines than the rows. An infinity, which GDAL reads as ±3.4e38, a
// value like any other, is refused too. Expected counts worked by hand
// from the texts.
func TestASCIIGridCells(t *testing.T) {
	head := "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize 1\nNODATA_value -9999\n"
	cases := []struct {
		name, text, want string // want "" when accepted
	}{
		{"plain", head + "1 2 3\n4 5 6\n", ""},
		{"header in capitals, centre, no nodata", "NCOLS 3\nNROWS 2\nXLLCENTER 0.5\nYLLCENTER 0.5\nCELLSIZE 1\n1 2 3\n4 5 6", ""},
		{"windows line ends", strings.ReplaceAll(head+"1 2 3\n4 5 6\n", "\n", "\r\n"), ""},
		{"nan, exponents, signs", head + "nan -1.5e-3 +2\n-9999 .5 6.\n", ""},
		{"a signed nan (GDAL: NaN, no data)", head + "-nan 2 3\nNaN 5 6\n", ""},
		// GDAL reads inf as the largest float32, 3.4e38, a value scored
		// as data (helper probe of 2026-12-05: value_max 3.4e38).
		{"inf", head + "1 2 3\n4 inf 6\n", `line 8 holds "inf", which GDAL reads as the largest (or lowest) 32-bit float, ±3.4e38, not as infinity`},
		{"-Infinity", head + "1 -Infinity 3\n4 5 6\n", `line 7 holds "-Infinity", which GDAL reads as the largest (or lowest) 32-bit float`},
		{"beyond the range", head + "1 2 3\n4 1e999 6\n", `line 8 holds "1e999", which is no number`},
		{"values wrapped", head + "1 2\n3 4\n5 6\n", ""},
		{"a word", head + "1 abc 2 3\n4 5 6\n", `line 7 holds "abc", which is no number`},
		{"decimal comma", head + "1 2 3\n4 0,5 6\n", `line 8 holds "0,5", which is no number`},
		{"a Windows NaN", head + "1 2 3\n4 1.#QNAN 6\n", `line 8 holds "1.#QNAN"`},
		{"hexadecimal", head + "1 2 3\n4 0x1p-2 6\n", `line 8 holds "0x1p-2"`},
		{"two dots", head + "1 2 3\n4 1.2.3 6\n", `line 8 holds "1.2.3"`},
		{"negative cell size", "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ncellsize -1\n1 2 3\n4 5 6\n", "has a header whose cellsize is -1 (line 5); a cell size must be positive"},
		{"zero dy", "ncols 3\nnrows 2\nxllcorner 0\nyllcorner 0\ndx 1\ndy 0\n1 2 3\n4 5 6\n", "has a header whose dy is 0 (line 6)"},
		{"a value too many", head + "1 2 3 9\n4 5 6\n", "holds 7 values where its header's ncols 3 × nrows 2 make 6 (line 7 holds 4): a row with a value too many"},
		{"cut short", head + "1 2 3\n4 -", "holds 5 values where its header's ncols 3 × nrows 2 make 6 (line 8 holds 2): the file was cut short"},
		{"no grid: text", "lon,lat,role\n1,2,train\n", ""},
		{"no grid: header without ncols", "nrows 2\ncellsize 1\n1 2 3\n", ""},
		{"no grid: binary without line feeds", "II*\x00" + strings.Repeat("\x00", 1<<21), ""},
	}
	dir := t.TempDir()
	for i, c := range cases {
		p := filepath.Join(dir, strings.Repeat("g", i+1)+".asc")
		if err := os.WriteFile(p, []byte(c.text), 0o644); err != nil {
			t.Fatal(err)
		}
		err := checkASCIIGrid("model m", p)
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%s: %v", c.name, err)
		case c.want != "" && (err == nil || !fault.IsBadInput(err) || !strings.Contains(err.Error(), "model m: "+p+" "+c.want) || !strings.Contains(err.Error(), "export the grid again")):
			t.Errorf("%s: %v, want %q", c.name, err, c.want)
		}
	}
}
