package scenario

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"

	"areasweep/extent"
	"areasweep/extent/vocab"

	"github.com/airbusgeo/godal"
)

// File names inside a scenario directory.
const (
	fileGood        = "model_good.tif"
	fileCoarse      = "model_coarse.tif"
	fileOccurrences = "occurrences.csv"
	fileRegion      = "region.gpkg"
	fileEcoregions  = "ecoregions.gpkg"
	fileStudy       = "study.yaml"
	// ecoregionField is the integer attribute that identifies an ecoregion unit.
	ecoregionField = "unit_id"
)

// FileNames are the names of the files Write creates in its folder.
func FileNames() []string {
	return []string{fileGood, fileCoarse, fileOccurrences, fileRegion, fileEcoregions, fileStudy}
}

// studyMark is how the demo's study file begins (studyYAML).
const studyMark = "# Invented demo (scenario seed "

// IsDemoInputs reports whether the folder dir holds a demo's inputs: its
// study file is there and begins as the demo writes it. A folder of the
// user's that happens to hold files of the same names (an
// occurrences.csv, a study.yaml) is not one.
func IsDemoInputs(dir string) bool {
	f, err := os.Open(filepath.Join(dir, fileStudy))
	if err != nil {
		return false
	}
	defer f.Close()
	b := make([]byte, len(studyMark))
	_, err = io.ReadFull(f, b)
	return err == nil && string(b) == studyMark
}

// Files lists what Write produced (absolute paths).
type Files struct {
	// Dir is the scenario directory.
	Dir string
	// Models are the suitability rasters, in order: the good model first.
	Models []Model
	// Occurrences is the presence CSV (longitude,latitude,role).
	Occurrences string
	// Region is the GeoPackage with the base study region (layer "region").
	Region string
	// Ecoregions is the GeoPackage with the ecoregion units (layer "ecoregions").
	Ecoregions string
	// EcoregionField is the attribute that identifies a unit: "unit_id".
	EcoregionField string
	// Study is the study.yaml that ties the files together.
	Study string
}

// Model is one suitability raster of the scenario.
type Model struct {
	// Name is the short label of the model ("good" or "coarse").
	Name string
	// Path is the absolute path of its GeoTIFF.
	Path string
}

// Write creates dir (its parent must exist; dir must not exist or be empty) and writes the scenario. Same seed -> byte-identical
// CSV/YAML and identical raster values.
//
// Identity holds on one platform and Go toolchain; the Go specification lets
// some architectures fuse multiply-adds, which can move the last bits of a
// float and so, rarely, a sampled cell.
func Write(dir string, seed uint64) (Files, error) {
	abs, err := filepath.Abs(dir)
	if err != nil {
		return Files{}, fmt.Errorf("scenario: directory %q: %w", dir, err)
	}
	switch entries, err := os.ReadDir(abs); {
	case err == nil && len(entries) > 0:
		return Files{}, fmt.Errorf("scenario: directory %s is not empty", abs)
	case err != nil && !errors.Is(err, fs.ErrNotExist):
		return Files{}, fmt.Errorf("scenario: directory %s: %w", abs, err)
	}
	// Mkdir, not MkdirAll: the parent must exist. The demo writes into
	// its run's staging folder, which a signal removes while this runs;
	// MkdirAll would make that folder again and leave it behind.
	if err := os.Mkdir(abs, 0o755); err != nil && !errors.Is(err, fs.ErrExist) {
		return Files{}, fmt.Errorf("scenario: create directory: %w", err)
	}
	// GDAL is configured by the program (extent.Configure: its fixed
	// GeoPackage timestamp makes the GeoPackages byte-identical for the
	// same seed); the drivers are registered here in case it was not.
	extent.Register()

	sc := newScene(seed)
	f := Files{
		Dir: abs,
		Models: []Model{
			{Name: "good", Path: filepath.Join(abs, fileGood)},
			{Name: "coarse", Path: filepath.Join(abs, fileCoarse)},
		},
		Occurrences:    filepath.Join(abs, fileOccurrences),
		Region:         filepath.Join(abs, fileRegion),
		Ecoregions:     filepath.Join(abs, fileEcoregions),
		EcoregionField: ecoregionField,
		Study:          filepath.Join(abs, fileStudy),
	}
	if err := writeRaster(f.Models[0].Path, sc.good, "suitability, good model"); err != nil {
		return Files{}, err
	}
	if err := writeRaster(f.Models[1].Path, sc.coarse, "suitability, coarse model"); err != nil {
		return Files{}, err
	}
	// 0666 less the umask, as every file areasweep writes.
	if err := os.WriteFile(f.Occurrences, occurrencesCSV(sc.records), 0o666); err != nil {
		return Files{}, fmt.Errorf("scenario: write occurrences: %w", err)
	}
	region := []polyFeature{{ring: sc.region, values: []fieldValue{{"name", "core range of " + Species}}}}
	if err := writePolygons(f.Region, "region", []fieldDef{{"name", godal.FTString}}, region); err != nil {
		return Files{}, err
	}
	units := make([]polyFeature, len(sc.units))
	for i, u := range sc.units {
		units[i] = polyFeature{ring: u.ring, values: []fieldValue{{ecoregionField, u.id}, {"unit_name", u.name}}}
	}
	defs := []fieldDef{{ecoregionField, godal.FTInt}, {"unit_name", godal.FTString}}
	if err := writePolygons(f.Ecoregions, "ecoregions", defs, units); err != nil {
		return Files{}, err
	}
	if err := os.WriteFile(f.Study, studyYAML(seed), 0o666); err != nil {
		return Files{}, fmt.Errorf("scenario: write study file: %w", err)
	}
	return f, nil
}

// occurrencesCSV renders the records as longitude,latitude,role with 6
// decimals and LF line ends.
func occurrencesCSV(recs []record) []byte {
	var b bytes.Buffer
	b.WriteString("longitude,latitude,role\n")
	for _, r := range recs {
		role := vocab.RoleTest
		if r.train {
			role = vocab.RoleTrain
		}
		b.WriteString(strconv.FormatFloat(r.lon, 'f', 6, 64))
		b.WriteByte(',')
		b.WriteString(strconv.FormatFloat(r.lat, 'f', 6, 64))
		b.WriteByte(',')
		b.WriteString(string(role))
		b.WriteByte('\n')
	}
	return b.Bytes()
}

// studyYAML is the study file; its keys mirror the command-line flags and its
// paths are relative to the file.
func studyYAML(seed uint64) []byte {
	return []byte(studyMark + strconv.FormatUint(seed, 10) + `): ` + Species + `, its landscape and records are made up.
model:
  - good=` + fileGood + `
  - coarse=` + fileCoarse + `
occurrences: ` + fileOccurrences + `
region: ` + fileRegion + `
ecoregions: ` + fileEcoregions + `
ecoregion-field: ` + ecoregionField + `
region-buffers: [-50, 100, 250, 500]
point-buffers: [50, 100, 200]
hull-buffers: [0, 100]
ecoregion-min-points: 1
e: [0.05, 0.10]
iterations: 500
fraction: 0.5
seed: 20261201
`)
}
