// Package inputs reads the user-supplied text inputs of areasweep: the
// occurrence table (CSV) and the study file (YAML).
//
// # Occurrence table
//
// ReadOccurrences and ParseOccurrences read a delimited text table with a
// header line. Three columns are used, found by name (case-insensitive,
// surrounding spaces ignored); all other columns are ignored:
//
//	longitude: lon, long, lng, longitude, x, decimallongitude, decimal_longitude
//	latitude:  lat, latitude, y, decimallatitude, decimal_latitude
//	role:      role   (values train, training, test, testing; any case)
//
// The delimiter is a comma, unless the header line contains no comma, in
// which case it is a semicolon or a tab (whichever the header line holds
// more of). When the delimiter is a semicolon or a tab, a number written
// with a single decimal comma and no dot (for example 12,5) is read as a
// decimal number (12.5), as spreadsheet programs in many locales write it.
// Cells follow CSV quoting; a tab-separated table that breaks it (a GBIF
// download quotes nothing, so quotes in its text are bare) is read again
// with quotes as ordinary characters, one record per physical line.
// A UTF-8 byte-order mark is ignored; a UTF-16 file is rejected with advice
// to save it as UTF-8. Blank lines, and lines whose cells are all empty,
// are skipped. Every record keeps its physical line number so that later
// messages can point back into the file.
//
// When the coordinates are geographic (WGS84 degrees), a latitude outside
// [-90, 90] or a longitude outside [-180, 360] is an error. If some latitude
// is outside [-90, 90] while every longitude lies within [-90, 90] (and every
// latitude within [-180, 360]), the two columns are reported as swapped.
//
// Every problem tied to a place in the file is a *ParseError naming the file,
// the line and the column, and saying what to do; errors.Is reaches the
// package sentinels (ErrBadNumber, ErrBadRole, ...) through it.
//
// # Study file
//
// A study file is a YAML mapping whose keys are exactly the long flag names
// of the areasweep command marked Study in settings.Table (see StudyKeys).
// LoadStudy reads it strictly: an unknown or repeated key and a value of the
// wrong type are errors (*StudyError) naming the file, the line and the key;
// each key is decoded by its setting's Kind. Relative paths (the Path and
// NamedPaths settings) are resolved against the directory holding the
// study file. A key given with no value (key: or key: ~) counts as absent.
// study.go decodes; suggest.go finds the key a typo meant.
//
// Study.Apply copies the settings into a settings.Values for every flag
// not given on the command line, so that command-line flags override the
// study file.
//
// # Study table
//
// LoadBatch and ParseBatch read the study table of a batch: one row per
// study (an id and any study-file key except out) and a shared settings
// block, as CSV ('#' lines at the top hold the shared block, NAME=PATH lists
// are separated by ';') or YAML (settings: and studies:). The values are
// decoded by the study-file decoders, rows are laid over the shared block,
// and every problem is collected (BatchErrors, each a *BatchError with file,
// line, column and study id) before anything runs. Ids must be unique
// (ignoring case) and safe as folder names. Lines may end in a carriage
// return alone, as in the occurrence table (both read through crLines).
//
// ParseNamedPath and ParseFloatList parse the NAME=PATH and a,b,c values
// used by both the flags and the study file.
package inputs
