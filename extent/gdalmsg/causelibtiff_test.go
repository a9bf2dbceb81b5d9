package gdalmsg

import "testing"

// TestCauseLibtiffBlocks: libtiff's messages for a block cut short or
// damaged, as GDAL 3.6 reports them (copied from its output on a GeoTIFF
// cut short and on tiles overwritten with other bytes), become plain words
// without the library's counters or codec names.
func TestCauseLibtiffBlocks(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"TIFFFillTile:Read error at row 4294967295, col 4294967295; got 0 bytes, expected 1024", "only 0 of the 1024 bytes of the block are in the file"},
		{"TIFFFillStrip:Read error at scanline 4294967295; got 129 bytes, expected 322", "only 129 of the 322 bytes of the block are in the file"},
		{"ZIPDecode:Decoding error at scanline 16", "its compressed data cannot be decoded"},
		{"corrupt_lzw.tif:Using code not yet in table", "its compressed data cannot be decoded"},
		{"Error in ZSTD_decompressStream(): Unknown frame descriptor", "its compressed data cannot be decoded"},
		{"lerc_getBlobInfo() failed", "its compressed data cannot be decoded"},
		{"PackBitsDecode:Discarding 52 bytes to avoid buffer overrun", "its compressed data cannot be decoded"},
		{`cut.tif: TIFFReadDirectory:Bogus "StripByteCounts" field, ignoring and calculating from imagelength`, "cut.tif: its strip sizes do not fit the image, as in a file cut short"},
		{"PROJ: Source and target ellipsoid do not belong to the same celestial body", "Source and target ellipsoid do not belong to the same celestial body"},
	} {
		if got := Cause(c.in); got != c.want {
			t.Errorf("Cause(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}
