package extent

import (
	"archive/zip"
	"bufio"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"golang.org/x/text/encoding/htmlindex"
)

// kmlProblem is a Placemark of a KML file whose coordinates text cannot
// be read (see brokenKML).
type kmlProblem struct {
	placemark int    // 1 for the file's first Placemark
	name      string // its <name>, "" for none
	line      int    // the line of the <coordinates> element
	text      string // the text, white space collapsed
	why       string // what is wrong with it
}

// brokenKML reads the KML file at path (or the KML inside a KMZ
// archive) itself and returns the first Placemark holding a
// <coordinates> element whose text is present but is not coordinates,
// or nil. GDAL says nothing of one: LIBKML reads such a text up to the
// first word that is not a number and drops the rest (a truncated list
// or "1,2 garbage" left a ring cut short, or none, and a polygon whose
// coordinates were all garbage was skipped as one without geometry),
// reads a stray word within it as 0, and KML, its other driver, reads
// it differently again. A CSV's broken WKT is refused for the same
// reason. A Placemark without a geometry element, or with an empty
// <coordinates/> (an empty geometry, as GeoJSON's "coordinates": []), is
// not a problem: it is skipped with the warning for a feature without
// geometry.
//
// Every Placemark of the file counts, read or not (a folder of pins
// beside the area read): a file with broken coordinates is damaged
// whichever folder holds them. The file is read as a stream, one token at
// a time; a file this reading cannot follow (XML that GDAL's parser takes
// and Go's does not, an encoding Go does not know) gives nil, GDAL's
// reading standing as it is.
func brokenKML(path string) *kmlProblem {
	r, closeFile, err := kmlReader(path)
	if err != nil {
		return nil
	}
	defer closeFile()
	dec := xml.NewDecoder(r)
	dec.Strict = false
	dec.Entity = xml.HTMLEntity
	dec.CharsetReader = func(label string, in io.Reader) (io.Reader, error) {
		enc, err := htmlindex.Get(label)
		if err != nil {
			return nil, err
		}
		return enc.NewDecoder().Reader(in), nil
	}
	var (
		n           int  // Placemarks seen
		depth       int  // element depth
		inPlacemark int  // depth of the open Placemark, 0 for none
		inName      bool // in the Placemark's own <name>
		inCoords    bool
		text, name  strings.Builder
		bad         *kmlProblem // of the open Placemark
		coordsLine  int
	)
	for {
		t, err := dec.RawToken()
		if err != nil {
			return nil // io.EOF, or XML this reading cannot follow
		}
		switch t := t.(type) {
		case xml.StartElement:
			depth++
			switch {
			case t.Name.Local == "Placemark" && inPlacemark == 0:
				n++
				inPlacemark, bad = depth, nil
				name.Reset()
			case inPlacemark > 0 && depth == inPlacemark+1 && t.Name.Local == "name":
				inName = true
			case inPlacemark > 0 && t.Name.Local == "coordinates":
				inCoords = true
				text.Reset()
				coordsLine, _ = dec.InputPos()
			}
		case xml.CharData:
			if inCoords {
				text.Write(t)
			} else if inName {
				name.Write(t)
			}
		case xml.EndElement:
			switch {
			case inCoords && t.Name.Local == "coordinates":
				inCoords = false
				if why := kmlCoordinatesProblem(text.String()); why != "" && bad == nil {
					bad = &kmlProblem{placemark: n, line: coordsLine, text: strings.Join(strings.Fields(text.String()), " "), why: why}
				}
			case inName && t.Name.Local == "name":
				inName = false
			case depth == inPlacemark:
				inPlacemark = 0
				if bad != nil {
					bad.name = strings.TrimSpace(name.String())
					return bad
				}
			}
			depth--
		}
	}
}

// kmlReader opens the KML file at path for reading, or for a KMZ
// archive (a zip file) the first .kml file in it, as LIBKML reads it.
func kmlReader(path string) (io.Reader, func(), error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, err
	}
	br := bufio.NewReaderSize(f, 1<<20)
	if head, _ := br.Peek(4); string(head) != "PK\x03\x04" {
		return br, func() { f.Close() }, nil
	}
	f.Close()
	z, err := zip.OpenReader(path)
	if err != nil {
		return nil, nil, err
	}
	for _, e := range z.File {
		if strings.HasSuffix(strings.ToLower(e.Name), ".kml") {
			rc, err := e.Open()
			if err != nil {
				break
			}
			return bufio.NewReaderSize(rc, 1<<20), func() { rc.Close(); z.Close() }, nil
		}
	}
	z.Close()
	return nil, nil, fmt.Errorf("no KML file in %s", path)
}

// kmlCoordinatesProblem says what makes text, the content of a KML
// <coordinates> element, not coordinates, or "": KML's points are
// longitude,latitude or longitude,latitude,altitude, finite decimal
// numbers separated by commas (with white space around a comma or not,
// "1, 2" as LIBKML reads it), the points separated by white space. An
// empty text is an empty geometry, not a problem. The text is scanned
// once, without copies: a polygon's may be megabytes long.
func kmlCoordinatesProblem(text string) string {
	n := len(text)
	var vals []string    // the values of the point being read
	point, start := 0, 0 // its number (1 for the first) and where it begins
	shown := func(end int) string { return cutText(strings.Join(strings.Fields(text[start:end]), " ")) }
	missing := func(end int) string {
		return fmt.Sprintf("point %d, %q, has a value missing (two commas together, or one at its end: the list may be cut short)", point, shown(end))
	}
	for i := 0; ; {
		// The separator after the last value read (or before the first).
		j, commas := i, 0
		for j < n && (kmlSpace(text[j]) || text[j] == ',') {
			if text[j] == ',' {
				commas++
			}
			j++
		}
		switch {
		case len(vals) == 0 && commas > 0:
			point, start = point+1, j
			return missing(j)
		case len(vals) > 0 && (commas > 1 || commas == 1 && j == n):
			return missing(j)
		case len(vals) > 0 && commas == 0:
			if why := kmlPointProblem(point, shown(i), vals); why != "" {
				return why
			}
			vals = vals[:0]
		}
		if j == n {
			return ""
		}
		k := j
		for k < n && !kmlSpace(text[k]) && text[k] != ',' {
			k++
		}
		if len(vals) == 0 {
			point, start = point+1, j
		}
		vals = append(vals, text[j:k])
		i = k
	}
}

// kmlSpace is white space as LIBKML takes it (C's isspace).
func kmlSpace(c byte) bool {
	return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\v' || c == '\f'
}

// kmlPointProblem says what makes the point numbered point, shown as p,
// of the values vals not a KML point, or "".
func kmlPointProblem(point int, p string, vals []string) string {
	switch {
	case len(vals) == 1:
		if _, err := strconv.ParseFloat(vals[0], 64); err == nil {
			return fmt.Sprintf("point %d, %q, is a single number where a point is longitude,latitude (the list is cut short, or a comma is missing)", point, p)
		}
		return fmt.Sprintf("point %d, %q, is not longitude,latitude numbers", point, p)
	case len(vals) > 3:
		return fmt.Sprintf("point %d, %q, holds %d values where a point is longitude,latitude and at most an altitude (a space between points is missing)", point, p, len(vals))
	}
	for _, v := range vals {
		x, err := strconv.ParseFloat(v, 64)
		switch {
		case err != nil:
			return fmt.Sprintf("point %d, %q, has %q, which is not a number", point, p, cutText(v))
		case math.IsNaN(x) || math.IsInf(x, 0):
			return fmt.Sprintf("point %d, %q, has %q, which is not a finite number", point, p, cutText(v))
		}
	}
	return ""
}

// kmlCoordinatesError is the refusal of the Placemark p of the KML file
// at path.
func kmlCoordinatesError(path string, p *kmlProblem) error {
	which := fmt.Sprintf("Placemark %d", p.placemark)
	if p.name != "" {
		which += fmt.Sprintf(" (%q)", cutText(p.name))
	}
	return fmt.Errorf("extent: %s %s: the <coordinates> text at line %d cannot be read as coordinates: %s (the text: %q); correct it (each point longitude,latitude or longitude,latitude,altitude in decimal degrees, points separated by spaces, a ring ending at its first point), or delete the Placemark, or its geometry to have it skipped",
		path, which, p.line, p.why, cutText(p.text))
}
