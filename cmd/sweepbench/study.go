package main

import (
	"bufio"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"sync"

	"areasweep/extent/benchfamily"
	"areasweep/extent/vocab"

	"github.com/airbusgeo/godal"
)

// synthetic describes one generated study: a geographic grid of about
// cells cells over a fixed window, two smooth suitability surfaces and
// presence records drawn from the first.
type synthetic struct {
	dir           string
	width, height int
	west, north   float64
	step          float64 // degrees per cell
	models        []string
	occurrences   string
	region        string
}

// Window of the synthetic grid (degrees): 60 wide, 40 high.
const (
	winWest, winEast   = -20.0, 40.0
	winSouth, winNorth = 30.0, 70.0
	tileSide           = 256
	noData             = -9999
)

// suitability of model k at (lon, lat): a smooth bump centred in the window
// (model 1 a little off centre) plus a deterministic ripple, so that values
// are nearly all distinct. A disc in the south-west corner is no data.
func suitability(k int, lon, lat float64) float32 {
	if math.Hypot(lon-(winWest+4), lat-(winSouth+4)) < 3 {
		return noData
	}
	cx, cy := 10.0+2*float64(k), 50.0-1.5*float64(k)
	d2 := ((lon-cx)*(lon-cx) + (lat-cy)*(lat-cy)) / (2 * 8 * 8)
	ripple := 0.02 * math.Sin(lon*3.1+float64(k)) * math.Cos(lat*2.7)
	return float32(math.Exp(-d2) + ripple)
}

// generate writes the study for about cells cells into dir (reused when
// already there with the same size). With global the grid covers the
// whole world (cells 2:1, about 30 arc-seconds at 933 million cells), the
// surfaces going on beyond the window (valid everywhere but the no-data
// disc); the records and the region stay in the window.
func generate(dir string, cells float64, models int, seed uint64, global bool) (*synthetic, error) {
	west, east, south, north := winWest, winEast, winSouth, winNorth
	if global {
		west, east, south, north = -180, 180, -90, 90
	}
	aspect := (east - west) / (north - south)
	h := int(math.Round(math.Sqrt(cells / aspect)))
	w := int(math.Round(float64(h) * aspect))
	s := &synthetic{dir: dir, width: w, height: h, west: west, north: north, step: (east - west) / float64(w)}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	for k := 0; k < models; k++ {
		p := filepath.Join(dir, fmt.Sprintf("model%d.tif", k+1))
		s.models = append(s.models, p)
		if st, err := os.Stat(p); err == nil && st.Size() > 0 && sizeMatches(p, w, h) {
			continue
		}
		if err := s.writeModel(p, k); err != nil {
			return nil, err
		}
	}
	s.occurrences = filepath.Join(dir, "occurrences.csv")
	if err := s.writePoints(s.occurrences, 500, 500, seed); err != nil {
		return nil, err
	}
	s.region = filepath.Join(dir, "region.geojson")
	if err := writeRegion(s.region); err != nil {
		return nil, err
	}
	return s, nil
}

func sizeMatches(path string, w, h int) bool {
	ds, err := godal.Open(path, godal.RasterOnly())
	if err != nil {
		return false
	}
	defer ds.Close()
	st := ds.Structure()
	return st.SizeX == w && st.SizeY == h
}

// writeModel writes model k as a Float32 deflate GeoTIFF with 256 x 256
// tiles, one strip of tiles at a time (memory stays at one tile row).
func (s *synthetic) writeModel(path string, k int) error {
	tmp := path + ".partial"
	ds, err := godal.Create(godal.GTiff, tmp, 1, godal.Float32, s.width, s.height,
		godal.CreationOption("TILED=YES", "BLOCKXSIZE=256", "BLOCKYSIZE=256", "COMPRESS=DEFLATE", "BIGTIFF=IF_SAFER"))
	if err != nil {
		return fmt.Errorf("create %s: %w", path, err)
	}
	sr, err := godal.NewSpatialRefFromEPSG(4326)
	if err != nil {
		ds.Close()
		return err
	}
	defer sr.Close()
	if err := ds.SetSpatialRef(sr); err != nil {
		ds.Close()
		return err
	}
	if err := ds.SetGeoTransform([6]float64{s.west, s.step, 0, s.north, 0, -s.step}); err != nil {
		ds.Close()
		return err
	}
	band := ds.Bands()[0]
	if err := band.SetNoData(noData); err != nil {
		ds.Close()
		return err
	}
	buf := make([]float32, s.width*tileSide)
	for y0 := 0; y0 < s.height; y0 += tileSide {
		rows := min(tileSide, s.height-y0)
		var wg sync.WaitGroup
		n := runtime.GOMAXPROCS(0)
		for t := 0; t < n; t++ {
			wg.Add(1)
			go func(t int) {
				defer wg.Done()
				for r := t; r < rows; r += n {
					lat := s.north - (float64(y0+r)+0.5)*s.step
					for c := 0; c < s.width; c++ {
						buf[r*s.width+c] = suitability(k, s.west+(float64(c)+0.5)*s.step, lat)
					}
				}
			}(t)
		}
		wg.Wait()
		if err := band.Write(0, y0, buf[:rows*s.width], s.width, rows); err != nil {
			ds.Close()
			return fmt.Errorf("write %s: %w", path, err)
		}
	}
	if err := ds.Close(); err != nil {
		return fmt.Errorf("close %s: %w", path, err)
	}
	return os.Rename(tmp, path)
}

// writePoints draws nTrain training and nTest test records from model 1's
// surface by rejection sampling (fixed seed).
func (s *synthetic) writePoints(path string, nTrain, nTest int, seed uint64) error {
	rng := rand.New(rand.NewPCG(seed, seed^0x5bd1e995))
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := bufio.NewWriter(f)
	fmt.Fprintln(w, "longitude,latitude,role")
	for n := 0; n < nTrain+nTest; {
		lon := winWest + rng.Float64()*(winEast-winWest)
		lat := winSouth + rng.Float64()*(winNorth-winSouth)
		v := suitability(0, lon, lat)
		if v == noData || rng.Float64() > float64(v)*float64(v) {
			continue
		}
		role := vocab.RoleTrain
		if n >= nTrain {
			role = vocab.RoleTest
		}
		fmt.Fprintf(w, "%.6f,%.6f,%s\n", lon, lat, role)
		n++
	}
	if err := w.Flush(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// writeRegion writes the base region: an ellipse of 64 vertices around the
// species' centre, as GeoJSON (WGS84 by definition).
func writeRegion(path string) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := bufio.NewWriter(f)
	fmt.Fprint(w, `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{},"geometry":{"type":"Polygon","coordinates":[[`)
	for i := 0; i <= 64; i++ {
		a := 2 * math.Pi * float64(i%64) / 64
		if i > 0 {
			fmt.Fprint(w, ",")
		}
		fmt.Fprintf(w, "[%.6f,%.6f]", 10+14*math.Cos(a), 50+9*math.Sin(a))
	}
	fmt.Fprint(w, "]]}}]}\n")
	if err := w.Flush(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// familyFlags returns run flags that give a family of about n extents:
// base, whole_raster and hull always, then alternating region buffers and
// point buffers.
func familyFlags(n int) []string {
	region, points := benchfamily.Buffers(n)
	flags := []string{"--hull-buffers", "0"}
	if len(region) > 0 {
		flags = append(flags, "--region-buffers="+joinFloats(region))
	} else {
		flags = append(flags, "--region-buffers", "100")
	}
	if len(points) > 0 {
		flags = append(flags, "--point-buffers", joinFloats(points))
	} else {
		flags = append(flags, "--point-buffers", "50")
	}
	return flags
}

func joinFloats(v []float64) string {
	s := ""
	for i, x := range v {
		if i > 0 {
			s += ","
		}
		s += fmt.Sprintf("%g", x)
	}
	return s
}
