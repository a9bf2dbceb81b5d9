package extent

import (
	"io"
	"os"
	"path/filepath"
	"testing"

	"github.com/airbusgeo/godal"

	"areasweep/extent/vocab"
)

// TestMembershipTIFFDuplicateBand: a duplicate member's band in extents.tif
// holds the cells of the member it equals (README: one band per member, 1
// inside; a duplicate's cells are that member's), not an empty band, and
// an empty member's band is all 0. The region and the extra layer "same"
// are the square 1..3 degrees on a 0.1-degree grid: 20 x 20 = 400 cell
// centres inside, counted from the geometry.
func TestMembershipTIFFDuplicateBand(t *testing.T) {
	dir := t.TempDir()
	f := sameAndOffFamily(t, dir)
	g := f.Grid
	if m := f.Members[memberIdx(t, f, "user_same")]; m.Status != vocab.StatusDuplicate || m.DuplicateOf != "base" {
		t.Fatalf("user_same: status %s of %q, want a duplicate of base", m.Status, m.DuplicateOf)
	}
	path := filepath.Join(dir, "extents.tif")
	if err := f.WriteMembershipTIFF(path); err != nil {
		t.Fatal(err)
	}
	ds, err := godal.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer ds.Close()
	bands := map[string][]byte{}
	for _, b := range ds.Bands() {
		buf := make([]byte, g.Width*g.Height)
		if err := b.Read(0, 0, buf, g.Width, g.Height); err != nil {
			t.Fatal(err)
		}
		bands[b.Description()] = buf
	}
	count := func(id string) (n int) {
		for _, x := range bands[id] {
			n += int(x)
		}
		return n
	}
	for _, c := range []struct {
		id   string
		want int
	}{{"base", 400}, {"user_same", 400}, {"user_off", 0}} {
		if n := count(c.id); n != c.want {
			t.Errorf("band %s has %d cells set, want %d", c.id, n, c.want)
		}
	}
	for i := range bands["base"] {
		if bands["base"][i] != bands["user_same"][i] {
			t.Fatalf("band user_same differs from base at cell %d", i)
		}
	}
}

// TestMembershipTIFFBandInterleaved: extents.tif stores each band in its
// own tiles (INTERLEAVE=BAND). Written band by band into GDAL's default
// pixel-interleaved tiles, every band decompressed and recompressed the
// tiles of the bands before it: 'areasweep extents --membership-tif' with
// 11 members on a global 5 arc-minute grid took 10.3 s, on a 2.5
// arc-minute grid more than 15 minutes (killed); band-interleaved, 2.3 s
// and 5.7 s, the same bands.
func TestMembershipTIFFBandInterleaved(t *testing.T) {
	dir := t.TempDir()
	f := sameAndOffFamily(t, dir)
	path := filepath.Join(dir, "extents.tif")
	if err := f.WriteMembershipTIFF(path); err != nil {
		t.Fatal(err)
	}
	ds, err := godal.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer ds.Close()
	if got := ds.Metadata("INTERLEAVE", godal.Domain("IMAGE_STRUCTURE")); got != "BAND" {
		t.Errorf("extents.tif INTERLEAVE = %q, want BAND", got)
	}
}

// TestMembershipTIFFBigTIFF: extents.tif's creation options give a BigTIFF
// (header "II+", 64-bit offsets) for bands of more than 4 GiB
// uncompressed, where a classic TIFF's 32-bit offsets could overflow once
// written, and a classic TIFF ("II*") for a small one, as before. The
// headers are the TIFF 6.0 and BigTIFF magic numbers (from memory). The
// large file is created without writing a block (GDAL keeps it sparse).
func TestMembershipTIFFBigTIFF(t *testing.T) {
	Register()
	dir := t.TempDir()
	for _, c := range []struct {
		name         string
		bands, width int
		height       int
		want         string
	}{
		{"small.tif", 3, 100, 100, "II*\x00"},
		{"large.tif", 60, 40000, 2000, "II+\x00"}, // 4.8e9 bytes uncompressed
	} {
		path := filepath.Join(dir, c.name)
		ds, err := godal.Create(godal.GTiff, path, c.bands, godal.Byte, c.width, c.height,
			godal.CreationOption(append(membershipTIFFOptions, "SPARSE_OK=TRUE")...))
		if err != nil {
			t.Fatal(err)
		}
		if err := ds.Close(); err != nil {
			t.Fatal(err)
		}
		head := make([]byte, 4)
		f, err := os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		_, err = io.ReadFull(f, head)
		f.Close()
		if err != nil {
			t.Fatal(err)
		}
		if string(head) != c.want {
			t.Errorf("%s (%d bands of %d x %d): header %q, want %q", c.name, c.bands, c.width, c.height, head, c.want)
		}
	}
}
