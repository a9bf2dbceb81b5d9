#!/usr/bin/python3
"""Golden values for an end-to-end check of `areasweep run` on unusual grids.

Writes golden.json beside this script. It holds, for each study, the inputs
in a form the Go test (cmd/areasweep/golden_e2e_test.go) turns into files
(grid, integer formulas for the model rasters, occurrence records, region
polygons, settings), and the values areasweep must report, computed here
from the documented rules WITHOUT areasweep:

  studies   utm      EPSG:32633 (UTM 33N, not equal-area), Int16 model with
                     scale and offset and a nodata value, plus a Float32 model;
                     region given in longitude/latitude (CRS84), grown 15 km,
                     the training points' hull grown 10 km;
            laea     EPSG:3035 (equal-area), Float32 model with NaN as no data,
                     region with a hole given in EPSG:3035, one grown and one
                     shrunk region buffer;
            dateline latitude-longitude grid running 170..190 degrees east,
                     region as two polygons split at 180, grown 25 km and
                     shrunk 40 km (the cut at 180 is no boundary), points
                     written on both sides of the antimeridian (-180..180),
                     100 and 200 km discs around the training points, their hull
                     (across 180) grown 50 km; ecoregion units in -180..180, one
                     of them split at 180, one touching a selected unit only
                     across 180;
            polar    latitude-longitude grid 75..90 N up to the pole, the
                     region a polar cap written as the box -180..180,
                     84.013..90, grown 40 km and shrunk 35 km, disc and
                     hull buffers;
            arctic   latitude-longitude grid 60..80 N (cell areas vary by row),
                     Float32 model and a Byte model with heavy ties (floor 0,
                     nodata 255), region with a hole grown 30 km, 60 and 150 km
                     discs around the training points, their hull grown 40 km.

  membership  cell centres rasterized with GDAL (gdal.RasterizeLayer, whose
              default burns the cells whose centre is inside: the documented
              cell-centre rule), polygons in another CRS than the grid's
              cut every 0.0005 degrees in their own CRS (OGR Segmentize: their
              edges are straight there) and reprojected vertex by vertex
              with OGR; the hull by pyproj's gnomonic projection on
              the unit sphere about the training points' mean direction
              (great circles become straight lines) and a point-in-polygon
              test; region buffers from pyproj Geod(ellps="WGS84").inv
              (Karney 2013) from each cell centre to the boundary (edges
              straight in the grid CRS, densified every 50 m or 0.0005
              degrees, edges along the antimeridian left out as cuts);
              point buffers from Geod.inv from each cell centre to every
              scored training point; hull buffers from Geod.inv to the
              hull's edges taken as ellipsoidal geodesics between its
              vertices (Geod.npts every 100 m); ecoregion units held (OGR
              Contains of the training points) and touching (OGR
              Intersects), placed where they meet the grid. areasweep
              cuts a region's and the hull's boundary so that a distance
              at a buffer's d is over by at most 1 m (README), and this
              script's own sampling (56 m on a region's boundary, 100 m on
              the hull's) overestimates by up to step^2 / (8 d): cells
              whose distance here lies within the sum of the two of d are
              "ambiguous", listed and not asserted; so are, for a region in another CRS
              than the grid's, the centres within 0.01 cell of its true
              edge and the cells whose distance to it is within 0.01 cell
              side of a buffer's (README: areasweep follows such edges to
              within 0.01 cell).
  cell areas  latitude-longitude cells: the exact WGS84 area of the
              quadrangle (authalic latitude, Snyder 1987 USGS PP 1395
              eqs. 3-11 to 3-13), cross-checked here against pyproj
              Geod.polygon_area_perimeter of the cell outline densified
              along its parallels (the script stops if they differ by more
              than 1e-8 relative); projected cells: Geod.polygon_area_perimeter
              of the cell outline densified 16 points per side and
              transformed to WGS84 with pyproj.
  points      cell of each record (floor of the pixel coordinates, those
              within 1e-9 of a whole number taken as on that edge; projected
              grids: pyproj transform), status (outside, nodata, thinned:
              first record per cell and role kept).
  scores      area-weighted AUC, unweighted AUC and training AUC from
              sklearn.metrics.roc_auc_score (sample_weight: cells by area,
              presences by 1); auc_se from the placements (numpy);
              thresholds (minimum and 10th-percentile training presence,
              fixed) with scipy.stats.binomtest(k, n, p,
              alternative="greater"); the full-sample partial ROC ratio
              (Peterson, Papes & Soberon 2008) from the curve on the area
              axis written out in numpy (see partial_roc); the placements
              per test point (weighted and unweighted) and DeLong's
              variance of the unweighted AUC (see delong_se); the continuous
              Boyce index (Hirzel et al. 2006) with exact window areas from
              the cells and scipy.stats.spearmanr, and for each of the 100
              windows the bounds that areasweep's histogram reading of the
              window's area must respect (see boyce); the same scores,
              Boyce aside, for the distance-only null (minus the pyproj
              Geod.inv distance in metres from each cell centre to the
              nearest scored training point) and the sorting-bias means
              (Hijmans 2012) per extent; the rings of the nested chains
              (AUC against the inner, ring and outer cells, sklearn).
  paired      results.json paired[] records of method "placements" (AUC
              and unweighted AUC): each scored extent minus base per model
              and null, each pair of models per extent, each model minus
              the distance-only null per extent, from the placements above
              on the common test points (numpy; the t interval's quantile
              from scipy.special.betaincinv, student_t975);
              the AUC verdicts per model (README's robust /
              extent-sensitive / undetermined rule against the study's
              tolerance, 10 common test points at least) and the readings
              against the null (see paired_analysis). The records from
              paired resamples (partial ROC, omission, Boyce) depend on
              areasweep's own random draws and are not recomputed here.

Deterministic: fixed seeds, no clock, sorted keys. Run with /usr/bin/python3
(Debian's python3-gdal, python3-numpy, python3-sklearn, python3-scipy,
python3-pyproj).
"""
import json
import math
import os
import re
import sys

import numpy as np
from osgeo import gdal, ogr, osr
from pyproj import Geod, Transformer
from scipy.spatial import cKDTree
from scipy.stats import binomtest, spearmanr
from sklearn.metrics import roc_auc_score

gdal.UseExceptions()
HERE = os.path.dirname(os.path.abspath(__file__))
sys.dont_write_bytecode = True  # no __pycache__ in testdata/
sys.path.insert(0, os.path.dirname(HERE))  # testdata/, for tquantile
from tquantile import student_t975  # noqa: E402
GEOD = Geod(ellps="WGS84")

# ---------------------------------------------------------------- the studies


def bump(name, typ, r0, c0, a, b, k, amp, floor, noise, **kw):
    """A model raster given by integer arithmetic that Go repeats exactly:

        d = a (r - r0)^2 + b (c - c0)^2
        v = max(amp - d // k, floor) + ((131 r + 71 c + (r c mod 97)) mod noise)

    stored as v (integer types) or v / div (Float32, div a power of two);
    the value is stored * scale + offset when scale is given. Cells in
    nodata_box [r0, r1) x [c0, c1) are stored as nodata (NaN for Float32
    without a nodata value)."""
    m = dict(name=name, type=typ, r0=r0, c0=c0, a=a, b=b, k=k, amp=amp, floor=floor, noise=noise)
    m.update(kw)
    return m


STUDIES = [
    dict(
        name="utm", crs="EPSG:32633", width=160, height=120,
        gt=[500000.0, 1000.0, 0.0, 5400000.0, 0.0, -1000.0],
        models=[
            bump("int16", "Int16", 60, 80, 3, 2, 1, 900, 50, 40, scale=0.001, offset=0.25, nodata=-32768,
                 nodata_box=[0, 14, 140, 160]),
            bump("f32", "Float32", 50, 95, 1, 1, 4, 2600, 0, 200, div=4096, nodata=-9999.0,
                 nodata_box=[100, 120, 0, 10]),
        ],
        region=dict(crs="CRS84", features=[[[[14.5531, 48.0517], [16.5523, 48.1019], [16.7041, 48.9032], [15.6113, 48.5487],
                                              [14.6027, 48.8521], [14.5531, 48.0517]]]]),
        region_buffers=[15], point_buffers=[], hull_buffers=[10], e=[0.05, 0.1], thresholds=[0.5, 0.75], train=18, test=30,
        # AUC tolerance between the int16 model's largest difference from
        # base (interval 0.030..0.046: overlapping) and f32's (0.055..0.122:
        # outside), so that the two models get different verdicts.
        tolerance_auc=0.045,
    ),
    dict(
        name="laea", crs="EPSG:3035", width=150, height=110,
        gt=[4300000.0, 2000.0, 0.0, 3000000.0, 0.0, -2000.0],
        models=[
            bump("f32", "Float32", 55, 70, 2, 1, 3, 3000, 100, 300, div=1024, nodata_box=[0, 12, 0, 16]),
        ],
        region=dict(crs="EPSG:3035", features=[[
            [[4340317, 2820211], [4540129, 2810433], [4560271, 2960187], [4420383, 2990119], [4330241, 2930367],
             [4340317, 2820211]],
            [[4420173, 2870329], [4470231, 2880117], [4450387, 2920263], [4420173, 2870329]],
        ]]),
        region_buffers=[-6, 10], point_buffers=[], hull_buffers=[], e=[0.05, 0.2], thresholds=[1.5], train=20, test=35,
    ),
    dict(
        name="dateline", crs="EPSG:4326", width=200, height=100,
        gt=[170.0, 0.1, 0.0, -10.0, 0.0, -0.1],
        models=[
            bump("f32", "Float32", 50, 100, 1, 1, 2, 5000, 0, 100, div=8192, nodata=-1.0,
                 nodata_box=[90, 100, 190, 200]),
        ],
        region=dict(crs="CRS84", features=[
            [[[174.513, -12.017], [180.0, -12.017], [180.0, -17.523], [175.031, -18.029], [174.513, -12.017]]],
            [[[-180.0, -12.017], [-175.523, -12.531], [-176.037, -17.011], [-180.0, -17.523], [-180.0, -12.017]]],
        ]),
        region_buffers=[-40, 25], point_buffers=[100, 200], hull_buffers=[50], e=[0.05, 0.1], thresholds=[0.3], train=20, test=40,
        # Units in two rows of six columns, written in -180..180; c3r1
        # and c4r1 form one unit split at 180 ("split"); a gap separates
        # columns 4 and 5, so c4r2 meets a selected unit (c3r2) only
        # across 180.
        ecoregions=dict(crs="CRS84", min_points=3, clip=True, features=[
            dict(id=f"c{c}r{r}" if r == 2 or c not in (3, 4) else "split", polygon=[[
                [x0, y0], [x1, y0], [x1, y1], [x0, y1], [x0, y0]]])
            for c, (x0, x1) in enumerate([(171.013, 175.513), (175.513, 178.017), (178.017, 180.0),
                                          (-180.0, -178.023), (-177.5, -174.531), (-174.531, -171.017)], 1)
            for r, (y0, y1) in enumerate([(-10.517, -14.513), (-14.513, -19.487)], 1)]),
    ),
    dict(
        name="arctic", crs="EPSG:4326", width=300, height=200,
        gt=[0.0, 0.1, 0.0, 80.0, 0.0, -0.1],
        models=[
            bump("f32", "Float32", 110, 140, 1, 1, 6, 4000, 0, 150, div=2048, nodata=-9999.0,
                 nodata_box=[0, 20, 0, 30]),
            bump("byte", "Byte", 110, 140, 1, 1, 1500, 6, 0, 1, nodata=255, nodata_box=[190, 200, 290, 300]),
        ],
        region=dict(crs="CRS84", features=[[
            [[5.013, 62.017], [26.021, 61.513], [27.029, 74.011], [15.037, 78.023], [4.019, 73.031], [5.013, 62.017]],
            [[12.011, 67.013], [18.027, 67.013], [18.027, 70.519], [12.011, 70.519], [12.011, 67.013]],
        ]]),
        region_buffers=[30], point_buffers=[60, 150], hull_buffers=[40], e=[0.05, 0.1, 0.3], thresholds=[1.0, 2.0, 3.0], train=24, test=40,
    ),
]
STUDIES.append(dict(
    # A grid reaching the North Pole; the region is the cap north of
    # 84.013 degrees written as the box -180..180 (README: a whole-turn
    # edge runs along the parallel; the pole line is a cut).
    name="polar", crs="EPSG:4326", width=400, height=150,
    gt=[0.0, 0.1, 0.0, 90.0, 0.0, -0.1],
    models=[bump("f32", "Float32", 60, 200, 4, 1, 8, 3000, 0, 120, div=1024, nodata=-9999.0,
                 nodata_box=[140, 150, 0, 20])],
    region=dict(crs="CRS84", features=[[[[-180.0, 84.013], [180.0, 84.013], [180.0, 90.0], [-180.0, 90.0],
                                         [-180.0, 84.013]]]]),
    region_buffers=[-35, 40], point_buffers=[80], hull_buffers=[25], e=[0.05, 0.1], thresholds=[1.0],
    train=20, test=30,
    # Every judged difference from base within +-0.25, the others on too
    # few test points: AUC undetermined.
    tolerance_auc=0.25,
))
ITERATIONS, SEED = 10, 11
# README: a region in another CRS than the grid's follows its true edges to
# within this share of a cell.
DENSIFY_CELLS = 0.01

# ---------------------------------------------------------------- inputs


def model_values(spec, m):
    """Float64 values of model m (NaN = no data), row-major, as areasweep
    reads them (stored * scale + offset)."""
    h, w = spec["height"], spec["width"]
    r, c = np.mgrid[0:h, 0:w].astype(np.int64)
    d = m["a"] * (r - m["r0"]) ** 2 + m["b"] * (c - m["c0"]) ** 2
    v = np.maximum(m["amp"] - d // m["k"], m["floor"]) + (131 * r + 71 * c + (r * c) % 97) % m["noise"]
    if m["type"] == "Float32":
        val = (v.astype(np.float64) / m["div"]).astype(np.float32).astype(np.float64)
    else:
        val = v.astype(np.float64)
        if "scale" in m:
            val = val * m["scale"] + m["offset"]
    b = m["nodata_box"]
    val[b[0]:b[1], b[2]:b[3]] = np.nan
    if m["type"] != "Float32":
        assert v.max() < (255 if m["type"] == "Byte" else 32767) and v.min() >= 0
    return val.ravel()


def gen_points(spec, first_valid):
    """Records in cell coordinates turned to WGS84 longitude/latitude
    (rounded to 6 decimals), written in -180..180: training points near the
    first model's peak, test points half near it, half anywhere; then a
    repeated training and test record (thinned), one test point on the
    first model's no-data box and one outside the raster."""
    rng = np.random.default_rng(sum(map(ord, spec["name"])) * 7919)
    m = spec["models"][0]
    recs = []
    for i in range(spec["train"]):
        recs.append(("train", m["c0"] + 0.5 + rng.normal(0, spec["width"] / 8), m["r0"] + 0.5 + rng.normal(0, spec["height"] / 8)))
    for i in range(spec["test"]):
        if i % 2 == 0:
            recs.append(("test", m["c0"] + 0.5 + rng.normal(0, spec["width"] / 6), m["r0"] + 0.5 + rng.normal(0, spec["height"] / 6)))
        else:
            recs.append(("test", rng.uniform(0.5, spec["width"] - 0.5), rng.uniform(0.5, spec["height"] - 0.5)))
    recs = [(role, min(max(c, 0.3), spec["width"] - 0.3), min(max(r, 0.3), spec["height"] - 0.3)) for role, c, r in recs]
    recs.append(recs[0])
    recs.append(recs[spec["train"] + 1])
    b = m["nodata_box"]
    recs.append(("test", (b[2] + b[3]) / 2 + 0.1, (b[0] + b[1]) / 2 + 0.1))
    recs.append(("test", -3.5, spec["height"] / 2))
    gt = spec["gt"]
    xs = np.array([gt[0] + c * gt[1] for _, c, _ in recs])
    ys = np.array([gt[3] + r * gt[5] for _, _, r in recs])
    lon, lat = to_lonlat(spec, xs, ys)
    out = []
    for (role, _, _), lo, la in zip(recs, lon, lat):
        lo = (lo + 180) % 360 - 180
        out.append({"role": role, "lon": round(float(lo), 6), "lat": round(float(la), 6)})
    return out


def to_lonlat(spec, xs, ys):
    if spec["crs"] == "EPSG:4326":
        return np.asarray(xs, float), np.asarray(ys, float)
    t = Transformer.from_crs(spec["crs"], "EPSG:4326", always_xy=True)
    return t.transform(xs, ys)


def from_lonlat(spec, lon, lat):
    if spec["crs"] == "EPSG:4326":
        west = spec["gt"][0]
        lon = np.asarray(lon, float)
        return west + np.mod(lon - west, 360.0), np.asarray(lat, float)
    t = Transformer.from_crs("EPSG:4326", spec["crs"], always_xy=True)
    return t.transform(lon, lat)


# ---------------------------------------------------------------- geometry


def authalic_area_m2(lat1, lat2, dlon_deg):
    a, f = 6378137.0, 1 / 298.257223563
    e2 = f * (2 - f)
    e = math.sqrt(e2)

    def q(phi):
        s = math.sin(phi)
        return (1 - e2) * (s / (1 - e2 * s * s) - 1 / (2 * e) * math.log((1 - e * s) / (1 + e * s)))

    return a * a / 2 * math.radians(dlon_deg) * (q(math.radians(lat2)) - q(math.radians(lat1)))


def cell_areas_km2(spec):
    h, w, gt = spec["height"], spec["width"], spec["gt"]
    out = np.zeros((h, w))
    if spec["crs"] == "EPSG:4326":
        for r in range(h):
            top = gt[3] + r * gt[5]
            a = authalic_area_m2(top + gt[5], top, gt[1])
            # Cross-check: the outline with its parallels densified.
            n = 256
            lons = np.r_[np.linspace(0, gt[1], n), np.linspace(gt[1], 0, n)]
            lats = np.r_[np.full(n, top + gt[5]), np.full(n, top)]
            g, _ = GEOD.polygon_area_perimeter(lons, lats)
            if abs(abs(g) - a) > 1e-8 * a:
                sys.exit(f"{spec['name']}: row {r}: authalic area {a} vs Geod {abs(g)}")
            out[r, :] = a / 1e6
        return out
    t = Transformer.from_crs(spec["crs"], "EPSG:4326", always_xy=True)
    k = 16
    f = np.arange(k) / k
    for r in range(h):
        y0, y1 = gt[3] + r * gt[5], gt[3] + (r + 1) * gt[5]
        for c in range(w):
            x0, x1 = gt[0] + c * gt[1], gt[0] + (c + 1) * gt[1]
            xs = np.r_[x0 + f * (x1 - x0), np.full(k, x1), x1 - f * (x1 - x0), np.full(k, x0)]
            ys = np.r_[np.full(k, y1), y1 + f * (y0 - y1), np.full(k, y0), y0 - f * (y0 - y1)]
            lon, lat = t.transform(xs, ys)
            a, _ = GEOD.polygon_area_perimeter(lon, lat)
            out[r, c] = abs(a) / 1e6
    return out


def region_geoms(spec, layer=None):
    """The polygons of layer (default: the region) as OGR geometries in
    the grid CRS; on latitude-longitude grids each polygon moved by whole
    turns into the grid's longitude range (README: Antimeridian)."""
    layer = layer or spec["region"]
    src = osr.SpatialReference()
    if layer["crs"] == "CRS84":
        src.ImportFromEPSG(4326)
    else:
        src.ImportFromEPSG(int(layer["crs"].split(":")[1]))
    src.SetAxisMappingStrategy(osr.OAMS_TRADITIONAL_GIS_ORDER)
    dst = osr.SpatialReference()
    dst.ImportFromEPSG(int(spec["crs"].split(":")[1]))
    dst.SetAxisMappingStrategy(osr.OAMS_TRADITIONAL_GIS_ORDER)
    ct = osr.CoordinateTransformation(src, dst)
    west = spec["gt"][0]
    east = west + spec["width"] * spec["gt"][1]
    geoms = []
    for poly in layer["features"]:
        rings = [np.array(r, float) for r in poly]
        if spec["crs"] == "EPSG:4326":
            lo, hi = rings[0][:, 0].min(), rings[0][:, 0].max()
            k = math.floor((west - hi) / 360)
            while not (hi + 360 * k > west and lo + 360 * k < east):
                k += 1
            rings = [r + [360 * k, 0] for r in rings]
        g = ogr.Geometry(ogr.wkbPolygon)
        for r in rings:
            ring = ogr.Geometry(ogr.wkbLinearRing)
            for x, y in r:
                ring.AddPoint_2D(float(x), float(y))
            g.AddGeometry(ring)
        if spec["crs"] != "EPSG:4326" and layer["crs"] != spec["crs"]:
            # An edge is straight in the layer's own CRS (README): cut
            # every 0.0005 degrees (about 50 m, 0.05 of a 1 km cell; such a
            # piece of a parallel at 48 N strays some 1e-4 m from its
            # chord in UTM) before the vertices are transformed.
            g.Segmentize(0.0005 if src.IsGeographic() else 50.0)
            g.Transform(ct)
        geoms.append(g)
    return geoms


def rasterize(spec, geoms):
    h, w = spec["height"], spec["width"]
    ds = gdal.GetDriverByName("MEM").Create("", w, h, 1, gdal.GDT_Byte)
    ds.SetGeoTransform(spec["gt"])
    drv = ogr.GetDriverByName("Memory")
    vds = drv.CreateDataSource("m")
    srs = osr.SpatialReference()
    srs.ImportFromEPSG(int(spec["crs"].split(":")[1]))
    ds.SetProjection(srs.ExportToWkt())
    lyr = vds.CreateLayer("r", srs=srs, geom_type=ogr.wkbPolygon)
    for g in geoms:
        f = ogr.Feature(lyr.GetLayerDefn())
        f.SetGeometry(g)
        lyr.CreateFeature(f)
    gdal.RasterizeLayer(ds, [1], lyr, burn_values=[1])
    return ds.GetRasterBand(1).ReadAsArray().astype(bool).ravel()


def centres(spec):
    h, w, gt = spec["height"], spec["width"], spec["gt"]
    r, c = np.mgrid[0:h, 0:w]
    xs = gt[0] + (c.ravel() + 0.5) * gt[1]
    ys = gt[3] + (r.ravel() + 0.5) * gt[5]
    return xs, ys


def plane(spec):
    """A planar metric CRS for picking cells near a buffer's edge: the
    grid CRS itself when projected, else an azimuthal equidistant
    projection about the grid's centre."""
    if spec["crs"] != "EPSG:4326":
        return lambda x, y: (np.asarray(x, float), np.asarray(y, float))
    gt = spec["gt"]
    lon0 = gt[0] + spec["width"] * gt[1] / 2
    lat0 = gt[3] + spec["height"] * gt[5] / 2
    t = Transformer.from_crs("EPSG:4326", f"+proj=aeqd +lat_0={lat0!r} +lon_0={lon0!r} +datum=WGS84", always_xy=True)
    return lambda x, y: t.transform(x, y)


def boundary_points(spec, geoms):
    """The region's boundary in the grid CRS, its edges straight there and
    densified every 50 m (0.0005 degrees on latitude-longitude grids).
    Edges along the antimeridian or a pole line are cuts, not boundary
    (README: a region stored as two polygons split at 180 degrees, or a
    polar cap, is buffered as the one region it is)."""
    geographic = spec["crs"] == "EPSG:4326"
    step = 0.0005 if geographic else 50.0
    pts = []
    for g in geoms:
        for i in range(g.GetGeometryCount()):
            ring = np.array(g.GetGeometryRef(i).GetPoints())[:, :2]
            for a, b in zip(ring[:-1], ring[1:]):
                if geographic and a[0] == b[0] and (a[0] - 180) % 360 == 0:
                    continue
                if geographic and a[1] == b[1] and abs(a[1]) == 90:
                    continue  # the pole line of a polar cap
                # About 50 m apart: on latitude-longitude grids a degree of
                # longitude shrinks with the cosine of the latitude.
                shrink = math.cos(math.radians(max(abs(a[1]), abs(b[1])))) if geographic else 1.0
                n = max(1, int(math.ceil(math.hypot((b[0] - a[0]) * shrink, b[1] - a[1]) / step)))
                f = np.arange(n)[:, None] / n
                pts.append(a + f * (b - a))
    return np.vstack(pts)


def boundary_distances(spec, blon, blat, bxy=None):
    """For every cell centre: the planar distance (see plane) to the
    boundary points blon, blat (WGS84; bxy, their grid-CRS coordinates, on
    projected grids), and a function giving the geodesic distance (m,
    pyproj Geod.inv, WGS84) from the centres of cells cand to them."""
    to_plane = plane(spec)
    if spec["crs"] == "EPSG:4326":
        bx, by = to_plane(blon, blat)
    else:
        bx, by = bxy if bxy is not None else from_lonlat(spec, blon, blat)
    xs, ys = centres(spec)
    clon, clat = to_lonlat(spec, xs, ys)
    cx, cy = to_plane(clon, clat) if spec["crs"] == "EPSG:4326" else to_plane(xs, ys)
    tree = cKDTree(np.c_[bx, by])
    pd, _ = tree.query(np.c_[cx, cy])

    def geodesic(cand):
        out = np.empty(len(cand))
        for i, k in enumerate(cand):
            # Only the boundary points whose planar distance is within 10%
            # (plus 2 km) of the nearest one's can be the geodesically
            # nearest.
            sel = tree.query_ball_point([cx[k], cy[k]], pd[k] * 1.1 + 2000.0)
            _, _, d = GEOD.inv(np.full(len(sel), clon[k]), np.full(len(sel), clat[k]), blon[sel], blat[sel])
            out[i] = d.min()
        return out

    return pd, geodesic


def planar_boundary_distance(geoms, xs, ys):
    """Planar distance (grid CRS units) from each point to the polygons'
    edges, to make sure no cell centre lies on one."""
    best = np.full(len(xs), np.inf)
    for g in geoms:
        for i in range(g.GetGeometryCount()):
            ring = np.array(g.GetGeometryRef(i).GetPoints())[:, :2]
            for a, b in zip(ring[:-1], ring[1:]):
                ab = b - a
                t = np.clip(((xs - a[0]) * ab[0] + (ys - a[1]) * ab[1]) / (ab @ ab), 0, 1)
                best = np.minimum(best, np.hypot(xs - a[0] - t * ab[0], ys - a[1] - t * ab[1]))
    return best


def side_m(spec):
    """The longest cell side in metres (latitude-longitude grids: the
    north-south side or the east-west side at the equatorward edge)."""
    gt = spec["gt"]
    if spec["crs"] != "EPSG:4326":
        return max(abs(gt[1]), abs(gt[5]))
    top, bot = gt[3], gt[3] + spec["height"] * gt[5]
    lat = min(abs(top), abs(bot)) if top * bot > 0 else 0.0
    _, _, ew = GEOD.inv(0, lat, gt[1], lat)
    _, _, ns = GEOD.inv(0, lat, 0, lat + abs(gt[5]) * (1 if lat >= 0 else -1))
    return max(ew, ns)


def hull_mask(spec, train_lon, train_lat):
    """Cells whose centre is inside the training points' convex hull on the
    unit sphere (latitude taken as spherical latitude): pyproj's gnomonic
    projection about the points' mean direction, planar hull (monotone
    chain), point-in-polygon."""
    lo, la = np.radians(train_lon), np.radians(train_lat)
    v = np.c_[np.cos(la) * np.cos(lo), np.cos(la) * np.sin(lo), np.sin(la)].sum(axis=0)
    clat = math.degrees(math.atan2(v[2], math.hypot(v[0], v[1])))
    clon = math.degrees(math.atan2(v[1], v[0]))
    t = Transformer.from_crs("+proj=longlat +R=1 +no_defs", f"+proj=gnom +lat_0={clat!r} +lon_0={clon!r} +R=1 +no_defs", always_xy=True)
    px, py = t.transform(train_lon, train_lat)
    P = sorted(set(zip(px, py)))

    def cr(o, a, b):
        return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0])

    lower, upper = [], []
    for p in P:
        while len(lower) >= 2 and cr(lower[-2], lower[-1], p) <= 0:
            lower.pop()
        lower.append(p)
    for p in reversed(P):
        while len(upper) >= 2 and cr(upper[-2], upper[-1], p) <= 0:
            upper.pop()
        upper.append(p)
    hull = np.array(lower[:-1] + upper[:-1])
    xs, ys = centres(spec)
    clon_, clat_ = to_lonlat(spec, xs, ys)
    qx, qy = t.transform(clon_, clat_)
    # Angular distance from the centre: the far hemisphere is outside.
    inside = np.ones(len(xs), bool)
    for a, b in zip(hull, np.roll(hull, -1, axis=0)):
        inside &= (b[0] - a[0]) * (qy - a[1]) - (b[1] - a[1]) * (qx - a[0]) >= 0
    hlon, hlat = t.transform(hull[:, 0], hull[:, 1], direction="INVERSE")
    return inside, np.asarray(hlon), np.asarray(hlat)


# ---------------------------------------------------------------- metrics


def placements(bg, w, pres):
    tot = w.sum()
    order = np.argsort(bg, kind="stable")
    sv, cw = bg[order], np.r_[0, np.cumsum(w[order])]
    lo = np.searchsorted(sv, pres, "left")
    hi = np.searchsorted(sv, pres, "right")
    return (cw[lo] + (cw[hi] - cw[lo]) / 2) / tot


def auc(bg, w, pres):
    y = np.r_[np.zeros(len(bg)), np.ones(len(pres))]
    return float(roc_auc_score(y, np.r_[bg, pres], sample_weight=np.r_[w, np.ones(len(pres))]))


def partial_roc(bg, w, pres, e):
    """Full-sample partial ROC ratio (Peterson, Papes & Soberon 2008) on the
    area axis: x(t) = share of area with value >= t, y(t) = share of test
    presences with value >= t. Vertices at each distinct test value u,
    descending: (x(>u), y(>u)) then (x(>=u), y(>=u)); the curve starts at
    (0,0) and ends at (1,1). x_E is where y first reaches 1-E (linear along
    the crossing segment); ratio = integral_{x_E}^1 y dx / ((1 - x_E^2)/2).
    Undefined when x_E = 1, or when the crossing lies strictly inside the
    segment of a value held by 2 or more test presences (then the discrete
    reading x_E = x(>= u) is given)."""
    n = len(pres)
    tot = w.sum()
    us, cnt = np.unique(pres, return_counts=True)
    us, cnt = us[::-1], cnt[::-1]
    tau = (1 - e) * n
    if abs(tau - round(tau)) <= 1e-9 * max(1, tau):
        tau = float(round(tau))
    xs, ys = [0.0], [0.0]
    ya = 0
    cross = None
    for u, c in zip(us, cnt):
        xa, xb = w[bg > u].sum() / tot, w[bg >= u].sum() / tot
        xs += [xa, xb]
        ys += [ya, ya + c]
        if cross is None and ya + c >= tau:
            s = (tau - ya) / c
            xe = xb if s >= 1 else xa + s * (xb - xa)
            cross = dict(xe=xe, tie=bool(c >= 2 and 0 < s < 1), xb=xb)
        ya += c
    xs.append(1.0)
    ys.append(float(n))
    xs, ys = np.array(xs), np.array(ys) / n

    out = {"e": e, "x_e": cross["xe"], "tie": cross["tie"]}
    if cross["xe"] >= 1 or cross["tie"]:
        out["defined"] = False
        if cross["tie"] and cross["xb"] < 1:
            out["discrete_x_e"] = cross["xb"]
            out["discrete_ratio"] = ratio_polyline(xs, ys, cross["xb"])
    else:
        out["defined"] = True
        out["ratio"] = ratio_polyline(xs, ys, cross["xe"])
    return out


def ratio_polyline(xs, ys, xe):
    """integral_{xe}^1 y dx over the polyline, over (1 - xe^2)/2. The
    polyline is monotone in x; where several vertices share x = xe (a
    vertical step), the integral starts after the last of them."""
    total = 0.0
    for x0, y0, x1, y1 in zip(xs[:-1], ys[:-1], xs[1:], ys[1:]):
        if x1 <= xe or x1 == x0:
            continue
        a0 = max(x0, xe)
        ya0 = y0 + (y1 - y0) * (a0 - x0) / (x1 - x0)
        total += (x1 - a0) * (ya0 + y1) / 2
    return total / ((1 - xe * xe) / 2)


def thresholds(bg, w, test, train_all, fixed):
    out = []
    tot = w.sum()
    n = len(test)

    def add(name, t):
        succ = int(np.sum(test >= t))
        p = float(w[bg >= t].sum() / tot)
        pb = float(binomtest(succ, n, p, alternative="greater").pvalue) if succ > 0 else 1.0
        out.append({"name": name, "value": float(t), "successes": succ, "n": n, "omission": (n - succ) / n,
                    "area_fraction": p, "p_binomial": pb})

    tr = np.sort(train_all)
    add("minimum_training_presence", tr[0])
    add("p10_training_presence", tr[len(tr) // 10])
    for t in fixed:
        add("fixed", t)
    return out


def boyce(bg, w, test, layout, distinct=None, ncells=0, width=0.1, steps=100):
    """Continuous Boyce index (Hirzel et al. 2006) with exact window areas:
    windows of width 0.1 (max - min) in 100 equal steps, both ends
    inclusive, the last one ending at max; P = share of test presences and
    E = share of area in the window; F = P/E over the windows with area;
    the index is the Spearman correlation (average ranks, scipy) of F with
    the window midpoints.

    areasweep reads E from a histogram of bins of width delta <= (max -
    min)/2047 (README: at least 2,048 bins across the range), each bin's
    area spread over the bin. Whatever the bins' positions, that E lies
    between the exact area of [lo + delta, hi - delta] (every bin holding
    such a value lies wholly inside the window) and that of [lo - delta,
    hi + delta] (no bin reaching into the window holds a value farther
    out): e_lo and e_hi below, with delta = (max - min)/2047. The area at
    each layout value (the model's values at every scored presence, and the
    fixed thresholds) is exact (README), so when every value of the cells
    is a layout value ("exact") E and the index are exact too; so they are
    for a model of at most 4096 values whose gaps all exceed delta (no bin
    holds two: areasweep places each bin's area at the one value it
    holds)."""
    mn, mx = bg.min(), bg.max()
    span = mx - mn
    wd = width * span
    step = (span - wd) / (steps - 1)
    delta = span / 2047
    # Correctly rounded sums (math.fsum): E does not depend on the order
    # numpy adds the cells' areas in.
    tot = math.fsum(w)

    def share(lo, hi):
        return float(math.fsum(w[(bg >= lo) & (bg <= hi)]) / tot)

    windows, mids, fs = [], [], []
    for i in range(steps):
        lo = mn + i * step
        hi = mx if i == steps - 1 else lo + wd
        e = share(lo, hi)
        p = float(np.sum((test >= lo) & (test <= hi)) / len(test))
        windows.append((lo + wd / 2, p, share(lo + delta, hi - delta), share(lo - delta, hi + delta), lo, hi))
        if e > 1e-12:
            mids.append(lo + wd / 2)
            fs.append(p / e)
    # One list per quantity, in window order: the test presences in the
    # window, and the bounds on its share of area to 12 significant digits
    # (the check allows 1e-9); the midpoints follow from min and max.
    out = {"min": float(mn), "max": float(mx), "n": len(test),
           "p_count": [int(round(x[1] * len(test))) for x in windows],
           "e_lo": [float(f"{x[2]:.12g}") for x in windows], "e_hi": [float(f"{x[3]:.12g}") for x in windows]}
    out["defined"] = len(fs) >= 3 and len(set(fs)) >= 2
    # Exact also for a model of few values (at most 4096 distinct values
    # on the ncells cells of all extents, at least two cells per value on
    # average: areasweep's value set) no two of which
    # can share a bin of this extent's histogram: their gaps near the
    # extent's range exceed the widest bin, delta (README: each bin
    # holding one value besides the layout's has its area at that value).
    u = np.unique(bg)
    few = False
    if distinct is not None and len(distinct) <= 4096 and 2 * len(distinct) <= ncells:
        near = distinct[(distinct >= mn - delta) & (distinct <= mx + delta)]
        few = bool(len(near) < 2 or float(np.diff(near).min()) > delta)
    out["exact"] = bool(np.isin(u, layout).all()) or few
    out["e"] = [float(f"{share(x[4], x[5]):.12g}") for x in windows]
    if out["defined"]:
        out["index"] = float(spearmanr(tied(fs), mids).statistic)
    return out


def tied(fs, rel=1e-10):
    """fs with values within rel (relative, our choice) of the one before
    them in ascending order set to it: ratios equal in exact arithmetic (on
    an equal-area grid, windows of as many cells with presences in
    proportion) rank as the tie they are, as areasweep ranks them (it holds
    areas in whole units), where pyproj's per-cell areas leave them apart
    by about 1e-12."""
    out = list(fs)
    order = sorted(range(len(fs)), key=lambda i: fs[i])
    for a, b in zip(order, order[1:]):
        if out[b] - out[a] <= rel * abs(out[b]):
            out[b] = out[a]
    return out


# ---------------------------------------------------------------- one study


def study(spec):
    h, w = spec["height"], spec["width"]
    gt = spec["gt"]
    vals = [model_values(spec, m) for m in spec["models"]]
    valid = ~np.isnan(vals[0])
    area = cell_areas_km2(spec).ravel()
    spec["points"] = gen_points(spec, valid)

    # Points: cell, status, thinning.
    lon = np.array([p["lon"] for p in spec["points"]])
    lat = np.array([p["lat"] for p in spec["points"]])
    px, py = from_lonlat(spec, lon, lat)
    points = []
    seen = {}
    for i, (p, x, y) in enumerate(zip(spec["points"], px, py)):
        # README: a position within a billionth of a cell of an edge is on
        # that edge (a decimal coordinate on an edge is not one in binary).
        fc, fr = [round(f) if abs(f - round(f)) < 1e-9 else f
                  for f in ((x - gt[0]) / gt[1], (y - gt[3]) / gt[5])]
        rec = {"id": i + 2, "role": p["role"]}
        if not (0 <= fc < w and 0 <= fr < h):
            rec.update(status="outside_raster", row=-1, col=-1)
        else:
            c, r = int(fc), int(fr)
            rec.update(row=r, col=c)
            cell = r * w + c
            if not valid[cell]:
                rec["status"] = "nodata"
            elif (cell, p["role"]) in seen:
                rec["status"] = "thinned"
            else:
                seen[(cell, p["role"])] = i
                rec["status"] = "scored"
                rec["cell"] = cell
        points.append(rec)
    scored = [p for p in points if p["status"] == "scored"]
    train_cells = [p["cell"] for p in scored if p["role"] == "train"]
    test_cells = [p["cell"] for p in scored if p["role"] == "test"]

    # Extents.
    xs, ys = centres(spec)
    geoms = region_geoms(spec)
    # No cell centre may lie on a region edge (where GDAL's rasterizer and
    # the documented half-open rule may legitimately differ).
    if planar_boundary_distance(geoms, xs, ys).min() < 1e-6 * gt[1]:
        sys.exit(f"{spec['name']}: a cell centre lies on a region edge; move the vertices")
    base = rasterize(spec, geoms) & valid
    # A region in another CRS than the grid's: areasweep follows its edges
    # (straight in that CRS) to within DENSIFY_CELLS of a cell (README), so
    # a centre that near the true edge may fall on either side of it, and a
    # distance to the boundary may be off by as much.
    cross = spec["crs"] != "EPSG:4326" and spec["region"]["crs"] != spec["crs"]
    tol_cells = DENSIFY_CELLS if cross else 0.0
    base_amb = np.nonzero(planar_boundary_distance(geoms, xs, ys) < tol_cells * abs(gt[1]))[0] if cross else []
    extents = [("base", base, sorted(int(a) for a in base_amb))]
    if spec["region_buffers"]:
        inside = rasterize(spec, geoms)
        pts = boundary_points(spec, geoms)
        pd, geodesic = boundary_distances(spec, *to_lonlat(spec, pts[:, 0], pts[:, 1]), bxy=(pts[:, 0], pts[:, 1]))
        side = side_m(spec)
        for d in sorted(spec["region_buffers"]):
            dm = abs(d) * 1000.0
            near = np.nonzero((pd > dm * 0.9 - 2 * side) & (pd < dm * 1.1 + 2 * side))[0]
            within = pd <= dm  # far from the edge, planar and geodesic agree on the side
            gd = geodesic(near)
            within[near] = gd <= dm
            # README: the boundary is cut so that a distance at a buffer's
            # d is over by at most 1 m; this script's own points, at most
            # 56 m apart (0.0005 degrees of latitude), overestimate by up
            # to 56^2 / (8 d): cells whose distance here lies within the
            # sum of the two of d are ambiguous.
            slack = 1.0 + 56.0 ** 2 / (8 * dm) + 1e-3
            amb = near[(np.abs(gd - dm) < slack) | (np.abs(gd - dm) <= tol_cells * side + 1e-3)]
            if d > 0:
                mask = (inside | within) & valid
                eid = f"region_{d:g}km"
            else:
                mask = inside & ~within & valid
                eid = f"region_minus{-d:g}km"
            extents.append((eid, mask, sorted(int(a) for a in amb)))
    tlon = lon[[p["id"] - 2 for p in scored if p["role"] == "train"]]
    tlat = lat[[p["id"] - 2 for p in scored if p["role"] == "train"]]
    if spec["point_buffers"]:
        clon, clat = to_lonlat(spec, xs, ys)
        near = np.full(len(xs), np.inf)
        for a, b in zip(tlon, tlat):
            _, _, d = GEOD.inv(clon, clat, np.full(len(xs), a), np.full(len(xs), b))
            near = np.minimum(near, d)
        for d in sorted(spec["point_buffers"]):
            dm = d * 1000.0
            # Centres within a millimetre of the disc's edge are left to
            # rounding.
            amb = np.nonzero(np.abs(near - dm) < 1e-3)[0]
            extents.append((f"points_{d:g}km", (near <= dm) & valid, sorted(int(a) for a in amb)))
    tlon = lon[[p["id"] - 2 for p in scored if p["role"] == "train"]]
    tlat = lat[[p["id"] - 2 for p in scored if p["role"] == "train"]]
    hm, hlon, hlat = hull_mask(spec, tlon, tlat)
    extents.append(("hull", hm & valid, []))
    if spec["hull_buffers"]:
        # README: the hull grown by d is the hull and the cells within d of
        # its boundary, measured on WGS84 to its edges taken as ellipsoidal
        # geodesics between the vertices (pyproj Geod.npts every 100 m).
        blon, blat = [], []
        for i in range(len(hlon)):
            a, b = (hlon[i], hlat[i]), (hlon[(i + 1) % len(hlon)], hlat[(i + 1) % len(hlon)])
            _, _, dd = GEOD.inv(a[0], a[1], b[0], b[1])
            mid = GEOD.npts(a[0], a[1], b[0], b[1], int(dd // 100))
            blon += [a[0]] + [q[0] for q in mid]
            blat += [a[1]] + [q[1] for q in mid]
        blon, blat = np.array(blon), np.array(blat)
        pd, geodesic = boundary_distances(spec, blon, blat)
        side = side_m(spec)
        for d in sorted(spec["hull_buffers"]):
            dm = d * 1000.0
            near = np.nonzero((pd > dm * 0.9 - 2 * side) & (pd < dm * 1.1 + 2 * side))[0]
            within = pd <= dm
            gd = geodesic(near)
            within[near] = gd <= dm
            # areasweep's 1 m (README) and this sampling's own error at d.
            slack = 1.0 + 100.0 ** 2 / (8 * dm) + 1e-3
            amb = near[(np.abs(gd - dm) < slack) & ~hm[near]]
            extents.append((f"hull_{d:g}km", (hm | within) & valid, sorted(int(a) for a in amb)))
    params = {}
    if spec.get("ecoregions"):
        # README: units grouped by id; those holding at least k training
        # points (OGR Contains of the points, grid CRS), then every other
        # unit that touches or overlaps them (OGR Intersects), the units
        # placed where they meet the grid as every polygon is; both
        # clipped to the base with --ecoregion-clip.
        eco, k = spec["ecoregions"], spec["ecoregions"]["min_points"]
        order, parts = [], {}
        for f in eco["features"]:
            if f["id"] not in parts:
                order.append(f["id"])
            parts.setdefault(f["id"], []).extend(region_geoms(spec, {"crs": eco["crs"], "features": [f["polygon"]]}))
        tx, ty = from_lonlat(spec, tlon, tlat)
        pts = []
        for x, y in zip(tx, ty):
            pt = ogr.Geometry(ogr.wkbPoint)
            pt.AddPoint_2D(float(x), float(y))
            pts.append(pt)
        sel = [u for u in order if sum(any(g.Contains(pt) for g in parts[u]) for pt in pts) >= k]
        union = ogr.Geometry(ogr.wkbMultiPolygon)
        for u in sel:
            for g in parts[u]:
                union = union.Union(g)
        touch = [u for u in order if u not in sel and any(g.Intersects(union) for g in parts[u])]
        ms = rasterize(spec, [g for u in sel for g in parts[u]]) & valid
        mt = rasterize(spec, [g for u in sel + touch for g in parts[u]]) & valid
        name = f"ecoregions_k{k}"
        params[name] = f"min_points={k}; units={','.join(sel)}"
        params[name + "_touching"] = f"min_points={k}; plus touching units={','.join(touch)}"
        extents += [(name, ms, []), (name + "_touching", mt, [])]
        if eco.get("clip"):
            params[name + "_clipped"] = params[name] + "; clipped to base"
            params[name + "_touching_clipped"] = params[name + "_touching"] + "; clipped to base"
            extents += [(name + "_clipped", ms & base, []), (name + "_touching_clipped", mt & base, [])]
    extents.append(("whole_raster", valid.copy(), []))
    ext_out = []
    status = {}
    for i, (eid, mask, amb) in enumerate(extents):
        st = "empty" if not mask.any() else "ok"
        for e2, m2, _ in extents[:i]:
            if st == "ok" and status[e2] == "ok" and np.array_equal(mask, m2):
                st = "duplicate"
        status[eid] = st
        ext_out.append({
            "id": eid, "status": st, "params": params.get(eid, ""), "cells": int(mask.sum()), "area_km2": float(area[mask].sum()),
            "train_points": int(sum(mask[c] for c in train_cells)),
            "test_points": int(sum(mask[c] for c in test_cells)),
            "ambiguous_cells": amb,
            "rows": runs(mask.reshape(h, w)),
        })

    # The distance-only null (README): minus the geodesic distance from
    # each cell's centre to the nearest scored training point, on the cells
    # with data in the first model; scored like a model, Boyce aside (its
    # histogram has a floor of its own).
    clon, clat = to_lonlat(spec, xs, ys)
    near = np.full(len(xs), np.inf)
    for a, b in zip(tlon, tlat):
        _, _, d = GEOD.inv(clon, clat, np.full(len(xs), a), np.full(len(xs), b))
        near = np.minimum(near, d)
    null = np.where(valid, -near, np.nan)  # metres
    # Sorting bias (Hijmans 2012): test points' own coordinates to the
    # nearest training point, against the area-weighted mean over the
    # extent's cells.
    tdist = {}
    for p in scored:
        if p["role"] == "test":
            i = p["id"] - 2
            _, _, d = GEOD.inv(np.full(len(tlon), lon[i]), np.full(len(tlon), lat[i]), tlon, tlat)
            tdist[p["cell"]] = float(d.min()) / 1000.0
    for e, (eid, mask, amb) in zip(ext_out, extents):
        td = [tdist[c] for c in test_cells if mask[c]]
        if td and mask.any():
            bgm = float(np.sum(area[mask] * near[mask]) / np.sum(area[mask]) / 1000.0)
            e["sorting_bias"] = {"test_mean_km": float(np.mean(td)), "background_mean_km": bgm,
                                 "ratio_mean": float(np.mean(td)) / bgm}

    scores = []
    models = [(m["name"], v) for m, v in zip(spec["models"], vals)] + [("distance_null", null)]
    in_any = np.zeros(len(area), dtype=bool)
    for _, mask, _ in extents:
        in_any |= mask
    for name, v in models:
        # The distinct values on the cells of all extents (areasweep's
        # value set of the model).
        distinct = np.unique(v[in_any & ~np.isnan(v)] + 0.0)
        ncells = int(np.sum(in_any & ~np.isnan(v)))
        train_all = np.array([v[c] for c in train_cells if not np.isnan(v[c])])
        layout = np.r_[train_all, [v[c] for c in test_cells if not np.isnan(v[c])], spec["thresholds"]]
        for eid, mask, amb in extents:
            cells = mask & ~np.isnan(v)
            bg, wt = v[cells], area[cells]
            te = np.array([v[c] for c in test_cells if cells[c]])
            tr = np.array([v[c] for c in train_cells if cells[c]])
            s = {"model": name, "extent": eid, "cells": int(cells.sum()), "area_km2": float(wt.sum()),
                 "test_points": len(te), "train_points": len(tr)}
            if status[eid] != "ok" or len(te) == 0 or bg.min() == bg.max():
                s["scored"] = False
                scores.append(s)
                continue
            s["scored"] = True
            s["auc"] = auc(bg, wt, te)
            s["auc_unweighted"] = auc(bg, np.ones(len(bg)), te)
            s["auc_train"] = auc(bg, wt, tr) if len(tr) else 0.0
            pl = placements(bg, wt, te)
            n = len(pl)
            s["auc_se"] = float(math.sqrt(np.sum((pl - pl.mean()) ** 2) / (n * (n - 1)))) if n >= 2 else 0.0
            ids = [p["id"] for p in scored if p["role"] == "test" and cells[p["cell"]]]
            s["placements"] = [[i, float(x)] for i, x in zip(ids, pl)]
            s["placements_unweighted"] = [[i, float(x)] for i, x in zip(ids, placements(bg, np.ones(len(bg)), te))]
            s["auc_unweighted_se_delong"] = delong_se(bg, te)
            s["partial_roc"] = [partial_roc(bg, wt, te, e) for e in spec["e"]]
            s["thresholds"] = thresholds(bg, wt, te, train_all, spec["thresholds"])
            if name != "distance_null":
                s["boyce"] = boyce(bg, wt, te, layout, distinct, ncells)
            scores.append(s)

    # Rings of the nested chains (README "rings[]"): consecutive ok members
    # of each chain, cut at the first one not inside the next; for each
    # model, the outer member's test presences scored against the inner
    # background, the ring (outer minus inner) and the outer background.
    masks = {eid: mask for eid, mask, _ in extents}
    ids = [eid for eid, _, _ in extents]
    chains = {
        "region": sorted([i for i in ids if i.startswith("region_minus")], key=lambda i: -float(i[12:-2]))
        + ["base"] + sorted([i for i in ids if i.startswith("region_") and not i.startswith("region_minus")],
                            key=lambda i: float(i[7:-2])) + ["whole_raster"],
        "points": sorted([i for i in ids if i.startswith("points_")], key=lambda i: float(i[7:-2])),
        "hull": ["hull"] + sorted([i for i in ids if i.startswith("hull_")], key=lambda i: float(i[5:-2])),
        "ecoregions": [i for i in ids if i.startswith("ecoregions_") and not i.endswith("_clipped")],
        "ecoregions_clipped": [i for i in ids if i.startswith("ecoregions_") and i.endswith("_clipped")],
    }
    rings = []
    for chain, members in chains.items():
        members = [m for m in members if status[m] == "ok"]
        for k in range(1, len(members)):
            if (masks[members[k - 1]] & ~masks[members[k]]).any():
                members = members[:k]
                break
        if len(members) < 2:
            continue
        for name, v in models:
            for inner, outer in zip(members[:-1], members[1:]):
                have = ~np.isnan(v)
                mi, mo = masks[inner] & have, masks[outer] & have
                mr = mo & ~mi
                te = np.array([v[c] for c in test_cells if mo[c]])
                if len(te) == 0 or not mi.any() or not mr.any():
                    continue
                rings.append({"chain": chain, "model": name, "inner": inner, "outer": outer,
                              "inner_area_km2": float(area[mi].sum()), "ring_area_km2": float(area[mr].sum()),
                              "ring_cells": int(mr.sum()), "auc_inner": auc(v[mi], area[mi], te),
                              "auc_ring": auc(v[mr], area[mr], te), "auc_outer": auc(v[mo], area[mo], te)})
    paired, verdicts, above_null = paired_analysis(spec, extents, status, scores)
    return {"points": points, "extents": ext_out, "scores": scores, "rings": rings,
            "paired": paired, "verdicts": verdicts, "above_null": above_null}


# README "Verdicts are equivalence judgements": the default AUC tolerance T
# (our own choice; a study may set its own, --tolerance-auc) and the
# cut-off below which a paired difference is reported but not judged
# (report/sensitivity.go MinPairedPoints).
TOLERANCE_AUC, MIN_PAIRED_POINTS = 0.02, 10


def paired_difference(sa, sb, key):
    """README "Paired differences" and results.json paired[] (method
    "placements"): the placements of the test points both sides hold (by
    point id), D_i = a_i - b_i, diff = mean D, se = sqrt(sum (D_i - diff)^2
    / (n (n - 1))), the Student t 95% interval diff -+ t se with t the
    0.975 quantile of t with n - 1 degrees of freedom (student_t975); a and b the means of each side's
    placements on those points; test_set_shift = (each side's own AUC from
    sklearn, difference) - diff, 0 when both hold the same points; not
    defined on fewer than two common points."""
    pa, pb = dict(map(tuple, sa[key])), dict(map(tuple, sb[key]))
    common = sorted(set(pa) & set(pb))
    n = len(common)
    rec = {"common_points": n, "defined": n >= 2}
    if n < 2:
        return rec
    a = np.array([pa[i] for i in common])
    b = np.array([pb[i] for i in common])
    d = a - b
    diff = float(d.mean())
    se = float(math.sqrt(np.sum((d - diff) ** 2) / (n * (n - 1))))
    z = student_t975(n - 1)
    own = "auc" if key == "placements" else "auc_unweighted"
    same = n == len(pa) and n == len(pb)
    rec.update(a=float(a.mean()), b=float(b.mean()), diff=diff, se=se, ci_low=diff - z * se, ci_high=diff + z * se,
               test_set_shift=0.0 if same else (sa[own] - sb[own]) - diff)
    return rec


def position(rec, tol):
    """README: the 95% interval against -T..+T: "inside" (lo >= -T and
    hi <= T), "outside" (lo > T or hi < -T), "overlapping" otherwise;
    "too_few" on fewer than 10 common test points; None when undefined.
    The script stops when an end lies within 1e-6 of +-T, where rounding
    could flip the position."""
    if not rec["defined"]:
        return None
    if rec["common_points"] < MIN_PAIRED_POINTS:
        return "too_few"
    lo, hi = rec["ci_low"], rec["ci_high"]
    if min(abs(lo - tol), abs(lo + tol), abs(hi - tol), abs(hi + tol)) < 1e-6:
        sys.exit(f"an interval end lies within 1e-6 of the tolerance {tol}: {rec}; choose another tolerance")
    if lo >= -tol and hi <= tol:
        return "inside"
    if lo > tol or hi < -tol:
        return "outside"
    return "overlapping"


def paired_analysis(spec, extents, status, scores):
    """results.json paired[] of method "placements" (metrics auc and
    auc_unweighted) and the readings built on them: every scored extent
    minus the base extent per model and null (kind "extent"), each pair of
    models in model order per extent ("model"), each model minus the
    distance-only null per extent ("null"); the AUC verdicts per model and
    metric (README: robust when every difference from the base has its
    interval inside -T..+T, extent-sensitive when one lies wholly outside,
    undetermined otherwise) and the readings against the null (above when
    the interval is wholly above 0, below when wholly below, not_above
    otherwise, too_few under 10 common points), read the same way for two
    models on one extent (the model rankings: better, worse, within
    noise)."""
    sc = {(s["model"], s["extent"]): s for s in scores if s["scored"]}
    models = [m["name"] for m in spec["models"]]
    tol = spec.get("tolerance_auc", TOLERANCE_AUC)
    ok = [eid for eid, _, _ in extents if status[eid] == "ok" and any((m, eid) in sc for m in models + ["distance_null"])]
    base = "base"
    if base not in ok:
        sys.exit(f"{spec['name']}: the base extent is not scored; the golden values assume it is")
    jobs = []
    for m in models + ["distance_null"]:
        if (m, base) in sc:
            jobs += [("extent", m, e, m, base) for e in ok if e != base and (m, e) in sc]
    for e in ok:
        for i, a in enumerate(models):
            jobs += [("model", a, e, b, e) for b in models[i + 1:] if (a, e) in sc and (b, e) in sc]
    for e in ok:
        jobs += [("null", a, e, "distance_null", e) for a in models if (a, e) in sc and ("distance_null", e) in sc]
    paired = []
    for kind, ma, ea, mb, eb in jobs:
        for metric, key in (("auc", "placements"), ("auc_unweighted", "placements_unweighted")):
            rec = {"metric": metric, "kind": kind, "model": ma, "extent": ea, "other_model": mb, "other_extent": eb}
            rec.update(paired_difference(sc[(ma, ea)], sc[(mb, eb)], key))
            if kind != "model":
                rec["position"] = position(rec, tol)
            if kind != "extent" and rec["defined"]:
                rec["reading"] = "too_few" if rec["common_points"] < MIN_PAIRED_POINTS else (
                    "above" if rec["ci_low"] > 0 else "below" if rec["ci_high"] < 0 else "not_above")
            paired.append(rec)
    verdicts = []
    for metric in ("auc", "auc_unweighted"):
        for m in models:
            ds = [p for p in paired if p["metric"] == metric and p["kind"] == "extent" and p["model"] == m]
            pos = [p["position"] for p in ds]
            if "outside" in pos:
                v = "extent-sensitive"
            elif ds and all(q == "inside" for q in pos):
                v = "robust"
            else:
                v = "undetermined"
            verdicts.append({"metric": metric, "model": m, "tolerance": tol, "base_extent": base, "verdict": v})
    above = [{"metric": p["metric"], "model": p["model"], "extent": p["extent"], "reading": p.get("reading", "undefined")}
             for p in paired if p["kind"] == "null" and p["metric"] == "auc"]
    return paired, verdicts, above


def delong_se(bg, pres):
    """Square root of DeLong, DeLong & Clarke-Pearson's (1988) variance of
    the unweighted AUC, cells and presences as samples:
    S10/m + S01/n, with V10 each presence's share of cells below it (ties
    half), V01 each cell's share of presences above it (ties half), and
    S the sample variances (denominators m-1 and n-1)."""
    m, n = len(pres), len(bg)
    if m < 2 or n < 2:
        return 0.0
    sb, sp = np.sort(bg), np.sort(pres)
    v10 = (np.searchsorted(sb, pres, "left") + np.searchsorted(sb, pres, "right")) / (2 * n)
    v01 = ((m - np.searchsorted(sp, bg, "right")) + (m - np.searchsorted(sp, bg, "left"))) / (2 * m)
    return float(math.sqrt(np.var(v10, ddof=1) / m + np.var(v01, ddof=1) / n))


def runs(mask2d):
    """Per row, the membership as half-open column runs [c0, c1)."""
    out = []
    for row in mask2d:
        d = np.diff(np.r_[0, row.astype(np.int8), 0])
        st, en = np.nonzero(d == 1)[0], np.nonzero(d == -1)[0]
        out.append([int(x) for pair in zip(st, en) for x in pair])
    return out


def main():
    out = {"source": "GDAL RasterizeLayer (cell centres); pyproj Geod(ellps='WGS84') inv and polygon_area_perimeter, "
                     "Transformer, gnomonic projection; sklearn.metrics.roc_auc_score(sample_weight); "
                     "scipy.stats.binomtest, spearmanr; numpy",
           "iterations": ITERATIONS, "seed": SEED, "studies": []}
    for spec in STUDIES:
        exp = study(spec)
        out["studies"].append({"spec": spec, "expected": exp})
    path = sys.argv[1] if len(sys.argv) > 1 else os.path.join(HERE, "golden.json")
    text = json.dumps(out, indent=1, sort_keys=True)
    # Lists of numbers on one line each (the membership runs, the Boyce
    # windows), so that the file stays small and a diff still points at
    # the value that moved.
    text = re.sub(r"\[\s+([-0-9.eE+,\s]+?)\s+\]", lambda m: "[" + ", ".join(m.group(1).split(",")).replace("  ", "").replace("\n", "").replace(" ,", ",") + "]", text)
    with open(path, "w") as f:
        f.write(text + "\n")


if __name__ == "__main__":
    main()
