// Package gdalmsg keeps GDAL's messages (and those of the libraries GDAL
// calls: GEOS, PROJ, SQLite, libtiff) off the terminal.
//
// GDAL prints every message it raises outside a call that has its own
// error handler (godal installs one per call) to standard error, in its own
// words ("ERROR 1: ...", "Warning 1: ..."). Install replaces that default
// with a handler that records the messages in memory, so that a program
// decides what to show: Drain hands them over (areasweep writes them into
// run.log), and Cause turns a library message into one plain line without
// library function names, for an error that also names the file and the
// feature or block.
package gdalmsg
