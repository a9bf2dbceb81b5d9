package gdalmsg

/*
#cgo pkg-config: gdal
void gdalmsgInstall(void);
int gdalmsgRedirectStderr(int fd);
*/
import "C"

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"regexp"
	"strings"
	"sync"
	"syscall"
)

// Level is GDAL's message category (CPLErr).
type Level int

// GDAL's message categories.
const (
	Debug   Level = 1
	Warning Level = 2
	Failure Level = 3
	Fatal   Level = 4
)

// Message is one message GDAL raised outside a godal call.
type Message struct {
	Level Level
	Code  int
	Text  string
	seq   uint64 // its place among all messages recorded (Mark)
}

// String renders the message as one line for a log.
func (m Message) String() string {
	kind := "warning"
	if m.Level >= Failure {
		kind = "error"
	}
	return "library " + kind + ": " + Cause(m.Text)
}

// OffDomain is Cause's wording of PROJ's message for a point off the map
// of its CRS.
const OffDomain = "PROJ could not transform a point lying off the map of its CRS (as the cells at the corners of a world map lie off the Earth); such a point has no longitude and latitude"

// Lines returns the run log's lines for msgs: one per distinct line, in
// the order each first came, with how many times it came when more than
// once (PROJ raises one message per point it cannot transform).
func Lines(msgs []Message) []string {
	var order []string
	count := map[string]int{}
	for _, m := range msgs {
		l := m.String()
		if count[l] == 0 {
			order = append(order, l)
		}
		count[l]++
	}
	for i, l := range order {
		if n := count[l]; n > 1 {
			order[i] = fmt.Sprintf("%s (%d times)", l, n)
		}
	}
	return order
}

// maxKept bounds the messages held between two Drain calls; later ones
// are counted only.
const maxKept = 200

var (
	mu      sync.Mutex
	kept    []Message
	dropped int
	next    uint64 // the seq of the next message recorded
	once    sync.Once
)

// Install replaces GDAL's default message printer with the recorder, and
// sends what C libraries print on C's standard error stream themselves to
// it too (redirectCStderr). It is safe to call many times; only the first
// call acts.
func Install() {
	once.Do(func() {
		C.gdalmsgInstall()
		redirectCStderr()
	})
}

// redirectCStderr points C's stderr stream at a pipe whose lines are
// recorded (recordCLines). The HDF5 library under GDAL's netCDF and HDF5
// drivers prints its error stack there ("HDF5-DIAG: Error detected in
// HDF5 ..."), even for a valid netCDF-4 file whose optional attributes
// the driver looks for: the netCDF library turns that printing off only
// in the thread that opened it, and a Go program calls C from many
// threads. When the pipe cannot be made the stream stays as it was.
func redirectCStderr() {
	r, w, err := os.Pipe()
	if err != nil {
		return
	}
	fd, err := syscall.Dup(int(w.Fd()))
	w.Close()
	if err != nil {
		r.Close()
		return
	}
	syscall.CloseOnExec(fd)
	if C.gdalmsgRedirectStderr(C.int(fd)) != 0 {
		syscall.Close(fd)
		r.Close()
		return
	}
	go recordCLines(r)
}

// hdf5Frame is a frame line of an HDF5 error stack: "  #000: H5A.c line
// 528 in H5Aopen_by_name(): can't open attribute".
var hdf5Frame = regexp.MustCompile(`^\s*#\d+: .* in ([A-Za-z0-9_]+)\(\)(?:: (.*))?$`)

// recordCLines records each line printed on C's stderr stream as a
// library warning: of an HDF5 error stack only its first frame (the call
// that failed and why, "HDF5: H5Aopen_by_name(): can't open attribute"),
// and nothing of its header or of the frames' major and minor lines.
func recordCLines(r io.Reader) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 4096), 1<<20)
	inStack := false
	for sc.Scan() {
		line := strings.TrimRight(sc.Text(), "\r")
		switch t := strings.TrimSpace(line); {
		case t == "":
		case strings.HasPrefix(t, "HDF5-DIAG:"):
			inStack = true
		case inStack && (strings.HasPrefix(t, "major:") || strings.HasPrefix(t, "minor:")):
		case inStack && hdf5Frame.MatchString(t):
			if m := hdf5Frame.FindStringSubmatch(t); strings.HasPrefix(t, "#000:") {
				text := "HDF5: " + m[1] + "()"
				if m[2] != "" {
					text += ": " + m[2]
				}
				Record(Warning, 0, text)
			}
		default:
			inStack = false
			Record(Warning, 0, t)
		}
	}
}

//export gdalmsgRecord
func gdalmsgRecord(level, code C.int, msg *C.char) {
	Record(Level(level), int(code), C.GoString(msg))
}

// Record keeps a message for the run log as the recorder does: one that
// GDAL raised inside a godal call whose handler let it pass because the
// call succeeded all the same.
func Record(level Level, code int, text string) {
	m := Message{Level: level, Code: code, Text: text}
	if m.Level < Warning {
		return
	}
	mu.Lock()
	defer mu.Unlock()
	m.seq = next
	next++
	if len(kept) >= maxKept {
		dropped++
		return
	}
	kept = append(kept, m)
}

// Mark returns the place of the next message to be recorded, for Forget.
func Mark() uint64 {
	mu.Lock()
	defer mu.Unlock()
	return next
}

// Forget drops the messages recorded since mark (Mark) that are of the
// cause given (Cause of their text): those a call raised whose failure
// the caller expected and handled, such as PROJ's OffDomain for a probe
// that traces a CRS's map outline through points off the map. Messages
// of other causes, and any recorded before mark, are kept.
func Forget(mark uint64, cause string) {
	mu.Lock()
	defer mu.Unlock()
	out := kept[:0]
	for _, m := range kept {
		if m.seq < mark || !strings.HasPrefix(Cause(m.Text), cause) {
			out = append(out, m)
		}
	}
	clear(kept[len(out):])
	kept = out
}

// GoLog is the writer for Go's standard logger: a library written in Go
// logs there (the PDF writer, before a panic the caller words), and its
// lines would reach the terminal raw with a timestamp. Each line is
// recorded as a library error, for the run log.
var GoLog io.Writer = goLog{}

type goLog struct{}

func (goLog) Write(p []byte) (int, error) {
	for _, l := range strings.Split(strings.TrimSpace(string(p)), "\n") {
		Record(Failure, 0, l)
	}
	return len(p), nil
}

// Drain returns the recorded messages and forgets them, with the number
// of messages beyond the bound that were dropped.
func Drain() ([]Message, int) {
	mu.Lock()
	defer mu.Unlock()
	out, n := kept, dropped
	kept, dropped = nil, 0
	return out, n
}

// libraryWords are the library function names and prefixes removed from a
// message: they mean nothing to a user.
var libraryWords = regexp.MustCompile(`(?i)\b(ERROR|Warning) \d+:\s*|\bTIFF[A-Za-z0-9_]*(\(\))?:?\s*|\bsqlite3?_[A-Za-z0-9_]*(\([^)]*\))?:?\s*|\bsqlite\b:?\s*|\bGEOS[A-Za-z0-9_]*(\(\))?:?\s*|\bOGR_[A-Za-z0-9_]*:?\s*|\bGDAL[A-Za-z0-9_]*\(\):?\s*|\bproj_[A-Za-z0-9_]*:?\s*|\bPROJ:\s*|\b[A-Z][A-Za-z0-9]*Decode:\s*|\bPointer '[A-Za-z]+' is NULL in '[A-Za-z_]+'\.?\s*`)

// shortRead is libtiff's message for a tile or strip whose bytes end
// early: its row and column are the library's internal counters (often
// 4294967295, an unsigned -1), so Cause keeps only the byte counts.
// The tile or strip number is given by some versions only (GDAL 3.6's
// libtiff says "at scanline N" for a strip, and "at row N, col N" alone
// for a tile).
var shortRead = regexp.MustCompile(`Read error at (?:row \d+, col \d+|scanline \d+)(?:, (tile|strip) (\d+))?; got (\d+) bytes, expected (\d+)`)

// libtiffWords are libtiff's words for a damaged block or directory, put
// in a user's words: a compressed block that does not decode (the
// codec's name, e.g. "ZIPDecode:", is removed with the library words),
// and a strip directory that does not fit the image, which GDAL reports
// when it opens a striped TIFF cut short.
var libtiffWords = strings.NewReplacer(
	`Bogus "StripByteCounts" field, ignoring and calculating from imagelength`, "its strip sizes do not fit the image, as in a file cut short",
)

// decodeError matches the messages of libtiff's codecs for a compressed
// block that does not decode (deflate, LZW, PackBits, LZMA, ZSTD, LERC,
// JPEG): their words and counters are the codec's own, so the whole line
// is replaced.
var decodeError = regexp.MustCompile(`(?i)^.*(Decoding error at scanline|Corrupted \w+ table at scanline|Not enough data at scanline|Using code not yet in table|Discarding \d+ bytes to avoid buffer overrun|decompress\w*\(\)|\blerc_\w+\(\)|JPEGLib|premature end of (JPEG )?data).*$`)

// unknownFormat matches GDAL's message for a file no driver opens
// ("`PATH' not recognized as a supported file format", "... as being in a
// supported file format" in later versions), quotes and path its own.
var unknownFormat = regexp.MustCompile(`^.*not recognized as (being in )?a supported file format.*$`)

// UnknownFormat is Cause's wording of that message.
const UnknownFormat = "no format GDAL knows matches its content"

// notGeoPackage matches GDAL's message for an SQLite file that is not a
// GeoPackage; badJSON the JSON parser's for a GeoJSON file that is not
// valid JSON.
var (
	notGeoPackage = regexp.MustCompile(`^.*GPKG: bad application_id=(0x[0-9a-fA-F]+) on .*$`)
	badJSON       = regexp.MustCompile(`^At line (\d+), character (\d+): (.*)$`)
	gpkgExtension = regexp.MustCompile(`^File .* has GPKG application_id, but non conformant file extension$`)
)

// More library wordings put in a user's words (each copied from GDAL
// 3.6.2's output on the file kind named): libtiff's for a header field
// past the end of a TIFF cut short; the XML parsers' for a KML, GML or
// VRT file that is not valid XML (Expat's "no element found" is its
// word for a file that ends inside an element); PROJ's error number and
// its phrase for two CRSs with no transformation between them (with the
// CRSs' WKT in backquotes); GDAL's for a GeoPackage of a later version.
var (
	tiffTagIO   = regexp.MustCompile(`^(?:(\S.*?): )?IO error during reading of "([^"]+)"; tag ignored.*$`)
	kmlXML      = regexp.MustCompile(`^ERROR parsing kml .* :\s*(.*?) on line (\d+) at offset \d+$`)
	gmlXML      = regexp.MustCompile(`^XML parsing of GML file failed : (.*?) at line (\d+), column (\d+)$`)
	cplXML      = regexp.MustCompile(`^(?:Parse error on line (\d+), |Line (\d+): )((?:reached EOF|Didn't find|Found invalid|Unexpected|Missing).*)$`)
	projCode    = regexp.MustCompile(`\bError \d+ \([^)]*\):\s*`)
	noOperation = regexp.MustCompile(`^Cannot find coordinate operations from .*$`)
	// offDomain is PROJ's message for a point it cannot transform
	// because it lies off the map of its CRS (a world map's corners lie
	// off the Earth): one per point, each logged.
	offDomain = regexp.MustCompile(`(?i)^.*point outside of projection domain.*$`)
	// offDomainStop is GDAL's line when it stops reporting PROJ's error
	// 2050 (PROJ_ERR_COORD_TRANSFM_OUTSIDE_PROJECTION_DOMAIN) for one
	// transformation.
	offDomainStop = regexp.MustCompile(`(?i)^.*Reprojection failed, err = 2050, further errors will be suppressed.*$`)
	gpkgVersion   = regexp.MustCompile(`^This version of GeoPackage (?:user_version|application_id)=\S+ \((\d+), (v[0-9.]+)\) on .* may only be partially supported$`)
)

// libtiff's and GDAL's words for a TIFF whose header is damaged (each
// copied from GDAL 3.6.2's output on a GeoTIFF cut at bytes 4 to 200, one
// with the BigTIFF magic number, one with a tile's offset or size past the
// file's end, one with SamplesPerPixel set to 0, one with zero width and
// one with an unknown compression code); the function names of libtiff
// (_TIFF..., _tiff..., PredictorSetup) and GDAL's C++ methods
// (Class::Method) that come before them; and the words of GDAL's and
// GEOS's for a ring that does not close (a KML and a GML file with a
// broken coordinate).
var (
	libraryFuncs  = regexp.MustCompile(`\b_?(?:_TIFF|_tiff)[A-Za-z0-9_]*:\s*|\bPredictorSetup:\s*|\b[A-Z][A-Za-z0-9]*::[A-Za-z0-9_]+:\s*|\b[A-Za-z]+Exception:\s*`)
	tiffHeader    = regexp.MustCompile(`^.*\b(?:Cannot read header|Can not read directory(?: count)?|_tiffSeekProc:\s*Invalid argument)\.?$`)
	tiffStrile    = regexp.MustCompile(`^.*Cannot read offset/size for strile around ~(\d+).*$`)
	tiffBadValue  = regexp.MustCompile(`^(?:.*: )?Bad value (\S+) for "([A-Za-z]+)" tag.*$`)
	tiffZeroTiles = regexp.MustCompile(`^.*Cannot handle zero number of (?:tiles|strips).*$`)
	missingCodec  = regexp.MustCompile(`^.*missing codec of code (\d+).*$`)
	openRing      = regexp.MustCompile(`^.*(?:Non closed ring detected|Points of LinearRing do not form a closed linestring).*$`)
	onePoint      = regexp.MustCompile(`^.*point array must contain 0 or >1 elements.*$`)
)

// GeoPackage and SQLite words for a damaged file (each copied from GDAL
// 3.6.2's output on a GeoPackage cut to a third, and on one whose layer
// table was dropped, one whose declared geometry type was made POINT
// for a layer of polygons, and one with a geometry blob of garbage
// bytes), and libcurl's for a host it cannot find (a GeoJSON
// "crs" member whose link GDAL tried to fetch).
var (
	sqliteMalformed = regexp.MustCompile(`^.*database disk image is malformed.*$`)
	gpkgNoTable     = regexp.MustCompile(`^Table/view (.*) is referenced in gpkg_contents, but does not exist$`)
	noHost          = regexp.MustCompile(`^Could not resolve host: (.*)$`)
	gpkgGeomType    = regexp.MustCompile(`^geometry column type in '([^']*)\.[^.']*' is not consistent with type in gpkg_geometry_columns$`)
	gpkgBadBlob     = regexp.MustCompile(`^Unable to read geometry$`)
)

// GDAL's words for a read past the end of a file, with the address of
// its buffer in hex (copied from GDAL 3.6.2's output on an ERDAS .img
// file cut in half), and for a band a VRT takes from a source that lacks
// it (on a VRT whose SourceBand was set to 9 on a one-band source).
var (
	vsiReadFailed = regexp.MustCompile(`^.*VSIF\w+\(0x[0-9a-fA-F]+,[^)]*\) @ (\d+) failed.*$`)
	illegalBand   = regexp.MustCompile(`^(?:(.*): )?GDALDataset::GetRasterBand\((\d+)\) - Illegal band #$`)
)

// OutOfMemory begins Cause's wording of a library's failure to allocate
// memory: "the library ran out of memory (it could not allocate N
// bytes)". GDAL's words (the first copied from GDAL 3.6.2's output when a
// block read met a limit of address space, ulimit -v; the others are its
// CPLMalloc's and the general phrase, recalled from memory) name a source
// file and line of GDAL's, which a user cannot act on; libtiff's ("No
// space for data buffer at scanline 4294967295", copied from GDAL 3.6.2's
// output when the read of a 400 MB strip met ulimit -v 2200000) name a
// buffer, not a disk ("No space left on device" is a full disk).
const OutOfMemory = "the library ran out of memory"

var (
	allocBytes  = regexp.MustCompile(`(?i)^.*?\b(?:cannot|can't|could not|unable to|failed to) allocate (\d+) bytes.*$|^.*?\bout of memory allocating (\d+) bytes.*$`)
	outOfMemory = regexp.MustCompile(`(?i)\bout of memory\b|\bNo space for (?:\w+ )*buffer\b`)
)

// IsOutOfMemory tells whether text (an error's, possibly holding Cause's
// words) reports a library's failure to allocate memory.
func IsOutOfMemory(text string) bool {
	return strings.Contains(text, OutOfMemory) || allocBytes.MatchString(text) || outOfMemory.MatchString(text)
}

// OpenRing is Cause's wording of GDAL's and GEOS's messages for a ring
// that does not end at its first point.
const OpenRing = "a polygon's ring does not end at its first point"

// xmlCause words an XML parser's message at line n.
func xmlCause(n, msg string) string {
	msg = strings.TrimSuffix(strings.TrimSpace(msg), ".")
	msg = strings.Replace(msg, "reached EOF", "reached the end of the file", 1)
	if msg == "no element found" {
		msg = "the file ends before its elements are closed, as a file cut short does"
	}
	return "its XML is not valid at line " + n + ": " + msg
}

// rewording replaces every match of re by with (regexp.ReplaceAllString:
// $1 is the first group).
type rewording struct {
	re   *regexp.Regexp
	with string
}

// reword applies rules to line in order.
func reword(line string, rules []rewording) string {
	for _, r := range rules {
		line = r.re.ReplaceAllString(line, r.with)
	}
	return line
}

// The rewordings of Cause, in the order they apply: library and function
// names first, then each message in our words (before the short reads),
// the codecs' and formats' (after them), and PROJ's and GeoPackage
// versions' last (after the XML parsers').
var (
	firstRewordings = []rewording{
		{libraryWords, ""},
		{tiffHeader, "its TIFF header cannot be read: the file is cut short, or is no TIFF"},
		{libraryFuncs, ""},
		{tiffStrile, "the place or size of block $1 cannot be read, as in a file cut short"},
		{tiffBadValue, "its header field $2 has the invalid value $1"},
		{tiffZeroTiles, "its header gives a width, height or block size of 0"},
		{missingCodec, "its compression (code $1) is not one GDAL reads"},
		{openRing, OpenRing},
		{onePoint, "a ring or line of it has a single point"},
		{sqliteMalformed, "the database inside it is damaged, as in a file cut short or copied while it was being written"},
		{gpkgNoTable, "it lists a layer $1 whose table is not in the file"},
		{gpkgGeomType, "the geometries of layer $1 are not of the type its GeoPackage declares for them"},
		{gpkgBadBlob, "a feature's geometry cannot be read: its bytes are damaged"},
		{noHost, "it names a web address on the host $1, which cannot be reached: areasweep reads local files only"},
	}
	formatRewordings = []rewording{
		{decodeError, "its compressed data cannot be decoded"},
		{unknownFormat, UnknownFormat},
		{notGeoPackage, "an SQLite database but not a GeoPackage: its application id is $1, a GeoPackage's is 0x47504B47"},
		{badJSON, "its JSON is not valid at line $1, character $2: $3"},
		{gpkgExtension, "it is a GeoPackage whose name does not end in .gpkg, which GDAL does not open: rename it to end in .gpkg"},
	}
	lastRewordings = []rewording{
		{projCode, ""},
		{noOperation, "PROJ knows no transformation between the two CRSs"},
		{offDomain, OffDomain},
		{offDomainStop, OffDomain + "; no more of them are reported for this transformation"},
		{gpkgVersion, "its GeoPackage version $2 ($1) is later than the ones GDAL reads in full"},
	}
)

// maxCause bounds the length of a cause line.
const maxCause = 240

// Cause turns a library message (possibly several lines) into one line:
// the first non-empty line with library function names removed, spaces
// collapsed and the length bounded. Messages that only named a function
// become "the library reported an error".
func Cause(text string) string {
	for _, l := range strings.Split(text, "\n") { // on any line: it is the cause
		if m := allocBytes.FindStringSubmatch(l); m != nil {
			return fmt.Sprintf("%s (it could not allocate %s bytes)", OutOfMemory, m[1]+m[2])
		}
		if outOfMemory.MatchString(l) {
			return OutOfMemory
		}
	}
	line := ""
	for _, l := range strings.Split(text, "\n") {
		if l = strings.TrimSpace(l); l != "" {
			line = l
			break
		}
	}
	line = vsiReadFailed.ReplaceAllString(line, "its bytes end before byte $1 that its header points to, as in a file cut short")
	if m := illegalBand.FindStringSubmatch(line); m != nil {
		line = "it has no band " + m[2]
		if m[1] != "" {
			line = m[1] + ": " + line
		}
	}
	line = reword(line, firstRewordings)
	line = shortRead.ReplaceAllStringFunc(line, func(m string) string {
		sub := shortRead.FindStringSubmatch(m)
		block := "the block"
		if sub[1] != "" {
			block = sub[1] + " " + sub[2]
		}
		return fmt.Sprintf("only %s of the %s bytes of %s are in the file", sub[3], sub[4], block)
	})
	line = reword(line, formatRewordings)
	line = libtiffWords.Replace(line)
	if m := tiffTagIO.FindStringSubmatch(line); m != nil {
		// The file is named: a VRT's source is another file.
		line = "its header field " + m[2] + " lies past the end of the file, as in a file cut short"
		if m[1] != "" {
			line = m[1] + ": " + line
		}
	}
	if m := kmlXML.FindStringSubmatch(line); m != nil {
		line = xmlCause(m[2], m[1])
	} else if m := gmlXML.FindStringSubmatch(line); m != nil {
		line = xmlCause(m[2]+", column "+m[3], m[1])
	} else if m := cplXML.FindStringSubmatch(line); m != nil {
		line = xmlCause(m[1]+m[2], m[3])
	}
	line = reword(line, lastRewordings)
	// Any quotes the library puts around a name of its own are GDAL's
	// `...' kind; ours are plain.
	line = strings.ReplaceAll(line, "`", "'")
	line = strings.Join(strings.Fields(line), " ")
	line = strings.Trim(line, " :;,.")
	if line == "" {
		return "the library reported an error"
	}
	if r := []rune(line); len(r) > maxCause {
		line = string(r[:maxCause]) + "..."
	}
	return line
}

// Err returns err with its text made into one plain line by Cause, or nil.
func Err(err error) error {
	if err == nil {
		return nil
	}
	return errors.New(Cause(err.Error()))
}
