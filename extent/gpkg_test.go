package extent

import (
	"encoding/binary"
	"os"
	"path/filepath"
	"testing"

	"github.com/airbusgeo/godal"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/encoding/wkb"

	"areasweep/report/outfile"
)

// TestWriteLayerOneTransaction: WriteLayer writes all its features in one
// transaction. SQLite counts the transactions that change a database in
// the file change counter of its header (bytes 24-27, big-endian; "The
// SQLite database file format", the header's field at offset 24, recalled
// from memory and seen here: 2,014 after 2,000 features committed one by
// one, 10 in one transaction): 2,000 features must leave it
// far below 2,000 (before, every feature was its own transaction and the
// counter ended above the number of features), and every feature with its
// field is in the file.
func TestWriteLayerOneTransaction(t *testing.T) {
	const n = 2000
	Register()
	srs := wgs84SR(t)
	feats := make([]Feature, n)
	for i := range feats {
		b, err := wkb.Marshal(orb.Point{float64(i%90) - 45, float64(i/90) - 20})
		if err != nil {
			t.Fatal(err)
		}
		feats[i] = Feature{WKB: b, Values: []any{i + 1}}
	}
	path := filepath.Join(t.TempDir(), "points.gpkg")
	if err := WriteLayer(path, "points", srs, godal.GTPoint, []LayerField{{Name: "line", Type: godal.FTInt}}, feats); err != nil {
		t.Fatal(err)
	}
	head := make([]byte, 28)
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := f.ReadAt(head, 0); err != nil {
		t.Fatal(err)
	}
	f.Close()
	if c := binary.BigEndian.Uint32(head[24:28]); c >= 100 {
		t.Errorf("file change counter %d after %d features: not one transaction", c, n)
	}
	ds, err := godal.Open(path, godal.VectorOnly())
	if err != nil {
		t.Fatal(err)
	}
	defer ds.Close()
	layers := ds.Layers()
	if len(layers) != 1 {
		t.Fatalf("%d layers", len(layers))
	}
	count, err := layers[0].FeatureCount()
	if err != nil || count != n {
		t.Fatalf("%d features (%v), want %d", count, err, n)
	}
	sum := 0
	for {
		ft := layers[0].NextFeature()
		if ft == nil {
			break
		}
		sum += int(ft.Fields()["line"].Int())
		ft.Close()
	}
	if sum != n*(n+1)/2 {
		t.Errorf("field values sum to %d, want %d", sum, n*(n+1)/2)
	}
}

// TestWriteLayerMode: a GeoPackage is created 0666 less the umask, as
// every other file areasweep writes (README, "Files in --out"). SQLite
// creates its files 0644 less the umask, so under umask 002 extents.gpkg
// and omitted_points.gpkg were 0644 beside results.json's 0664, and under
// umask 000 0644 beside 0666 (seen with stat after runs under each umask).
func TestWriteLayerMode(t *testing.T) {
	Register()
	srs := wgs84SR(t)
	b, err := wkb.Marshal(orb.Point{10, 20})
	if err != nil {
		t.Fatal(err)
	}
	saved := outfile.Umask
	defer func() { outfile.Umask = saved }()
	// The process's umask stays 022 (SQLite's 0644 is then 0644): the
	// mode must follow the umask areasweep read at start.
	for _, umask := range []os.FileMode{0o002, 0o022, 0o077} {
		outfile.Umask = umask
		path := filepath.Join(t.TempDir(), "points.gpkg")
		if err := WriteLayer(path, "points", srs, godal.GTPoint, []LayerField{{Name: "line", Type: godal.FTInt}}, []Feature{{WKB: b, Values: []any{1}}}); err != nil {
			t.Fatal(err)
		}
		st, err := os.Stat(path)
		if err != nil {
			t.Fatal(err)
		}
		if got, want := st.Mode().Perm(), 0o666&^umask; got != want {
			t.Errorf("umask %04o: mode %04o, want %04o", umask, got, want)
		}
	}
}
