package pipeline

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"

	"areasweep/cmd/internal/fault"
)

// asciiHeaderKeys are the keys of an ESRI ASCII grid's header, as GDAL's
// reader takes them (any case).
var asciiHeaderKeys = map[string]bool{
	"ncols": true, "nrows": true, "xllcorner": true, "yllcorner": true, "xllcenter": true, "yllcenter": true,
	"cellsize": true, "dx": true, "dy": true, "nodata_value": true,
}

// checkASCIIGrid refuses a model or null that is an ESRI ASCII grid whose
// cells are not ncols × nrows numbers. GDAL's reader takes the values one
// after another whatever the lines, reads a word that is no number (a
// decimal comma's "0,5", a "1.#QNAN") as the number at its start or 0,
// and ignores what follows the last cell: a value too many in one row,
// or one such word, shifted or changed cells without a word (2682 cells
// of a 300 × 240 grid with one word "abc" inserted). A file that cannot
// be read is left to GDAL, which says why.
func checkASCIIGrid(what, path string) error {
	msg, err := asciiGridProblem(path)
	if err != nil || msg == "" {
		return nil
	}
	return fault.BadInput(fmt.Errorf("%s: %s %s; correct the file, or export the grid again", what, path, msg))
}

// asciiGridProblem says what is wrong with the cells of the ESRI ASCII
// grid at path ("" when nothing is, or when the file is no such grid).
func asciiGridProblem(path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	br := bufio.NewReaderSize(f, 1<<20)
	// Only a file that starts as a grid's header is read by lines: a
	// GeoTIFF of zeros may hold no line feed in gigabytes.
	head, _ := br.Peek(64)
	if w := strings.Fields(strings.ToLower(string(head))); len(w) == 0 || !asciiHeaderKeys[w[0]] {
		return "", nil
	}
	var ncols, nrows int64
	line := 0
	var first []string // the first line of values, read with the header
	for {
		text, err := br.ReadString('\n')
		if err != nil && err != io.EOF {
			return "", err
		}
		line++
		fields := strings.Fields(text)
		switch {
		case len(fields) == 0 && err == io.EOF:
			return "", nil // a header alone: GDAL says what lacks
		case len(fields) == 0:
			continue
		}
		key := strings.ToLower(fields[0])
		if !asciiHeaderKeys[key] {
			if line == 1 || ncols <= 0 || nrows <= 0 {
				return "", nil // no ASCII grid, or a header GDAL refuses
			}
			first = fields
			break
		}
		if len(fields) >= 2 && (key == "cellsize" || key == "dx" || key == "dy") {
			// GDAL takes a cell size of no more than 0 as given: a
			// negative one reads as a grid running south to north (and
			// east to west), refused as south-up, which says nothing of
			// the header's mistake.
			if v, perr := strconv.ParseFloat(fields[1], 64); perr == nil && !(v > 0) {
				return fmt.Sprintf("has a header whose %s is %s (line %d); a cell size must be positive: write the cells' width (and height) as positive numbers", fields[0], fields[1], line), nil
			}
		}
		if len(fields) >= 2 && (key == "ncols" || key == "nrows") {
			n, perr := strconv.ParseInt(fields[1], 10, 64)
			if perr != nil || n <= 0 {
				return "", nil
			}
			if key == "ncols" {
				ncols = n
			} else {
				nrows = n
			}
		}
		if err == io.EOF {
			return "", nil
		}
	}
	return gridValues(br, first, line, ncols, nrows)
}

// gridValues counts and checks the values of an ASCII grid of ncols ×
// nrows cells: first holds the words of line number line, the first line
// of values, and br the rest of the file. Too few values are a file cut
// short (which GDAL refuses only where it reads that far), whatever its
// last word; then a word that is no number; then a value too many.
func gridValues(br *bufio.Reader, first []string, line int, ncols, nrows int64) (string, error) {
	var n int64
	offLine, offCount := 0, 0 // the first line of values that is not ncols long
	badLine, bad := 0, ""     // the first word that is no number
	for ws := first; ; {
		if len(ws) > 0 {
			for _, w := range ws {
				if bad == "" && (!isNumber(w) || isInfinity(w)) {
					badLine, bad = line, w
				}
			}
			n += int64(len(ws))
			if offLine == 0 && int64(len(ws)) != ncols {
				offLine, offCount = line, len(ws)
			}
		}
		text, err := br.ReadString('\n')
		if text == "" && err == io.EOF {
			break
		}
		if err != nil && err != io.EOF {
			return "", err
		}
		line++
		ws = strings.Fields(text)
	}
	at := ""
	if offLine > 0 {
		at = fmt.Sprintf(" (line %d holds %d)", offLine, offCount)
	}
	want := ncols * nrows
	switch {
	case n < want:
		return fmt.Sprintf("holds %d values where its header's ncols %d × nrows %d make %d%s: the file was cut short, or a row lacks values", n, ncols, nrows, want, at), nil
	case bad != "" && isInfinity(bad):
		return fmt.Sprintf("line %d holds %s, which GDAL reads as the largest (or lowest) 32-bit float, ±3.4e38, not as infinity, and scores as data without a word; write the grid's NODATA_value in that cell for a cell without data, or the number you mean", badLine, strconv.Quote(bad)), nil
	case bad != "":
		return fmt.Sprintf("line %d holds %s, which is no number (a plain decimal, with a sign, a dot and an exponent as needed): GDAL reads such a word without a word of its own, and may read it as another value (0,5 as 0, 1e999 as the largest 32-bit float)", badLine, strconv.Quote(bad)), nil
	case n > want:
		return fmt.Sprintf("holds %d values where its header's ncols %d × nrows %d make %d%s: a row with a value too many shifts every cell after it, and GDAL ignores the values past the last cell without a word", n, ncols, nrows, want, at), nil
	}
	return "", nil
}

// isInfinity reports whether w is an infinity as strconv reads one ("inf",
// "-Infinity"): GDAL's ASCII grid reader reads it as ±3.4e38.
func isInfinity(w string) bool {
	switch strings.ToLower(strings.TrimLeft(w, "+-")) {
	case "inf", "infinity":
		return true
	}
	return false
}

// isNumber reports whether w is a number as strconv reads one (digits
// with a dot, an exponent, a sign; nan, with or without a sign as GDAL
// reads it, and inf too), first by its characters alone, since most are
// plain decimals.
func isNumber(w string) bool {
	if strings.EqualFold(strings.TrimLeft(w, "+-"), "nan") && len(w) <= 4 {
		return true
	}
	digits := false
	for i := 0; i < len(w); i++ {
		c := w[i]
		switch {
		case c >= '0' && c <= '9':
			digits = true
		case c == '.' || ((c == '-' || c == '+') && i == 0):
		default:
			// strconv also reads hexadecimal and digits with '_', which
			// GDAL does not.
			_, err := strconv.ParseFloat(w, 64)
			return err == nil && !strings.ContainsAny(w, "xX_")
		}
	}
	return digits && strings.Count(w, ".") <= 1
}
