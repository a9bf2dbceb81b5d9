// Package scenario writes the invented demo study of areasweep: a made-up
// species on a made-up, procedurally generated continent, as ordinary input
// files, so that the tool can be tried (and its effect seen) without any real
// data.
//
// Nothing in a scenario is real. The species (see Species), the continent,
// the field station, the ecoregion unit names and every record are invented;
// the grid is placed in open South Pacific ocean (longitude -150 to -120,
// latitude -52 to -28, EPSG:4326) precisely so that the land overlaps no real
// place.
//
// # What Write produces
//
//   - model_good.tif, model_coarse.tif: one-band Float32 GeoTIFFs, 300 x 240
//     cells of 0.1 degree, north-up, EPSG:4326, tiled 64 x 64, deflate, nodata
//     -9999 on sea. Cell areas shrink with latitude (by about cos(latitude)).
//   - occurrences.csv: longitude,latitude,role with role train or test.
//   - region.gpkg: layer "region", one polygon, the base study region.
//   - ecoregions.gpkg: layer "ecoregions", 40 polygons with unit_id and unit_name.
//   - study.yaml: the study file naming all of the above, keys as the flags.
//
// # How the world is made
//
// Every step draws from its own PCG stream of math/rand/v2 (same seed, fixed
// stream constant per step), so equal seeds give equal worlds.
//
//  1. Land: value-noise fBm plus an elliptical falloff and rare island peaks;
//     the highest 48% of cells are land (one irregular continent, a few islets).
//  2. Elevation: a low dome plus mountain ridges along the zero lines of another
//     noise field. Distance to the coast by a chamfer distance transform.
//  3. Climate: temperature falls towards the pole and with height (6 C/km);
//     precipitation falls from west to east, rises near coasts, plus noise.
//  4. Truth: a Gaussian niche in (temperature, precipitation) centred on the
//     climate of an inland core cell and scaled so that 20% of the land has
//     suitability >= 0.5.
//  5. Presences: 300 distinct cells drawn with probability proportional to
//     suitability x survey effort x cell area, effort being a Gaussian kernel
//     (250 km) around an invented field station near the core, plus a small
//     floor; a 70/30 train/test split; then 4 extra records in the cells of 4
//     existing records, same role, so that per-cell thinning has work to do.
//  6. Base region: the convex hull of the presences grown by about 150 km,
//     clipped to the grid box.
//  7. Ecoregions: planar Voronoi cells, in degrees, of 40 well-spread seeds,
//     clipped to the grid box and numbered north to south.
//  8. Models: "good" is the niche slightly off centre and mis-scaled with a
//     little smooth noise; "coarse" is a far broader, noisier response whose
//     lowest 45% of land is cut to a floor of 0.25 and whose values take 10
//     levels only.
//
// Because the base region is small and the continent holds much unsuitable
// land far from it, the full AUC of a model rises as the evaluation extent
// grows, although nothing about the model changes: the effect areasweep
// exists to expose.
package scenario
