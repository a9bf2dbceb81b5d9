#!/usr/bin/python3
"""Golden cell memberships of polygon layers (extent: ReadShape, ReadUnits, Fill, Contains).

Writes golden.json beside this script: cases of a raster grid (CRS, geotransform, size) and one
polygon layer (CRS, features as WKT with an id), and, computed independently of areasweep with
GDAL's Python bindings (osgeo.ogr: OGR's coordinate transformation and GEOS predicates):

  units      per unit (the features sharing an id, or the whole layer for a region), the cell
             centres strictly inside it, as runs [row, col0, col1) (GEOS Contains of the centre
             more than 1e-9 cell from every edge), and the centres on or within 1e-9 cell of its
             boundary (either side is right: README, a centre on an edge goes to one side only);
  tiled      the boundary centres strictly inside the union of all units (GEOS), which must go
             to exactly one unit (README: adjacent units never share a cell);
  occupied   for the training points given (none on a boundary), the units holding at least one.

A layer in the raster's CRS is used as it is, on a latitude-longitude raster each polygon moved by
whole turns to where it meets the raster's longitude range (a copy per turn it meets). A layer in
another CRS keeps its edges straight in its own CRS (README): each cell centre is transformed to the
layer's CRS (osr) and tested there (GEOS Contains, the layer's own polygons, no vertex of them
transformed), and a centre within BAND cells of the true boundary may go either way (areasweep
follows that boundary to within 0.01 cell); the distance is measured in the raster's CRS to the
boundary cut in the layer's CRS every 1/2000 of its envelope's side, transformed, and sampled every
BAND/4 cell between those points (a superset of the centres within BAND: distances to the samples
are within BAND/8 of those to the line through them). Invalid
features are repaired as README says: the area inside any outer ring and outside every hole
(the union of the parts' shells less the union of their holes, GEOS).

Cases: a region with a hole and an island running off a latitude-longitude raster; a Delaunay
tiling (scipy) with its vertices on cell centres of a 0.05 degree grid, some ids shared by two
triangles; a region in WGS84 and rotated-square units in ETRS89-LAEA on a UTM raster; units
across the antimeridian (split at 180, one id) and a polar cap on global grids starting at -180,
0 and -170.5; a cap and a split sector on a polar stereographic raster; a rectangle of four
corners in ETRS89-LAEA with edges of 2000 to 3000 km on a 0.25 degree latitude-longitude raster
(its edges are curves there, some 100 km from the chords between its corners); invalid polygons
(overlapping parts, a hole running out of its shell, a bow-tie). Inputs are fixed (numpy seeds),
so the output is deterministic.
"""
import json
import os

import numpy as np
from scipy.spatial import cKDTree
from osgeo import ogr, osr
from scipy.spatial import Delaunay

ogr.UseExceptions()
from osgeo import gdal
gdal.PushErrorHandler("CPLQuietErrorHandler")  # GEOS notices of the invalid cases
TOL = 1e-9  # of a cell side: a centre this near an edge is on it
BAND = 0.02  # of a cell side: in another CRS, a centre this near the true edge may go either way


def srs(code):
    r = osr.SpatialReference()
    r.SetFromUserInput(code)
    r.SetAxisMappingStrategy(osr.OAMS_TRADITIONAL_GIS_ORDER)
    return r


def parts(g):
    if g.GetGeometryType() in (ogr.wkbMultiPolygon, ogr.wkbGeometryCollection):
        return [g.GetGeometryRef(i).Clone() for i in range(g.GetGeometryCount())]
    return [g.Clone()]


def structure(g):
    """The area inside any outer ring and outside every hole."""
    shells, holes = None, None
    for p in parts(g):
        s = ogr.Geometry(ogr.wkbPolygon)
        s.AddGeometry(p.GetGeometryRef(0).Clone())
        s = s.Buffer(0) if not s.IsValid() else s
        shells = s if shells is None else shells.Union(s)
        for i in range(1, p.GetGeometryCount()):
            h = ogr.Geometry(ogr.wkbPolygon)
            h.AddGeometry(p.GetGeometryRef(i).Clone())
            holes = h if holes is None else holes.Union(h)
    return shells if holes is None else shells.Difference(holes)


def bowtie_fix(g):
    """A single self-crossing ring: GEOS's own repair of it (both lobes, as README's bow-tie)."""
    return g.MakeValid()


def whole_turns(g):
    """Each ring's edges from -180 to 180 (either way) drawn as the parallel, in 0.1 degree steps."""
    out = ogr.Geometry(ogr.wkbMultiPolygon)
    for p in parts(g):
        q = ogr.Geometry(ogr.wkbPolygon)
        for i in range(p.GetGeometryCount()):
            r = p.GetGeometryRef(i)
            pts = [(r.GetX(k), r.GetY(k)) for k in range(r.GetPointCount())]
            nr = ogr.Geometry(ogr.wkbLinearRing)
            for k, (x, y) in enumerate(pts):
                if k > 0 and abs(x - pts[k - 1][0]) == 360 and abs(x) == 180 and y == pts[k - 1][1]:
                    x0 = pts[k - 1][0]
                    for j in range(1, 3600):
                        nr.AddPoint_2D(x0 + (x - x0) * j / 3600, y)
                nr.AddPoint_2D(x, y)
            q.AddGeometry(nr)
        out.AddGeometry(q)
    return out


def on_raster(g, layer_crs, case):
    """g (layer CRS) in the raster's CRS, placed by whole turns on a latitude-longitude raster."""
    g = g.Clone()
    rs = srs(case['crs'])
    if srs(layer_crs).IsGeographic() and not rs.IsGeographic():
        g = whole_turns(g)
    if not srs(layer_crs).IsSame(rs):
        g.Transform(osr.CoordinateTransformation(srs(layer_crs), rs))
    if not rs.IsGeographic():
        return g
    gt, w = case['gt'], case['width']
    west, east = gt[0], gt[0] + w * gt[1]
    out = ogr.Geometry(ogr.wkbMultiPolygon)
    for p in parts(g):
        lo, hi = p.GetGeometryRef(0).GetEnvelope()[:2]
        k, placed = np.floor((west - hi) / 360), False
        while lo + 360 * k < east:
            if hi + 360 * k > west:
                q = p.Clone()
                for i in range(q.GetGeometryCount()):
                    r = q.GetGeometryRef(i)
                    for j in range(r.GetPointCount()):
                        r.SetPoint_2D(j, r.GetX(j) + 360 * k, r.GetY(j))
                out.AddGeometry(q)
                placed = True
            k += 1
        if not placed:
            out.AddGeometry(p)
    return out.UnionCascaded()


def centres(case):
    gt, w, h = case['gt'], case['width'], case['height']
    cols, rows = np.meshgrid(np.arange(w) + 0.5, np.arange(h) + 0.5)
    return gt[0] + cols * gt[1], gt[3] + rows * gt[5]


def membership(g, case):
    """(inside, boundary): centres strictly inside g, and those on its boundary."""
    x, y = centres(case)
    h, w = x.shape
    inside = np.zeros((h, w), bool)
    onb = np.zeros((h, w), bool)
    env = g.GetEnvelope()
    bnd = g.GetBoundary()
    tol = TOL * abs(case['gt'][1])
    pt = ogr.Geometry(ogr.wkbPoint)
    for r, c in np.argwhere((x >= env[0] - tol) & (x <= env[1] + tol) & (y >= env[2] - tol) & (y <= env[3] + tol)):
        pt.SetPoint_2D(0, float(x[r, c]), float(y[r, c]))
        if bnd.Distance(pt) <= tol:
            onb[r, c] = True
        elif g.Contains(pt):
            inside[r, c] = True
    return inside, onb


def membership_own_crs(g, layer_crs, case):
    """(inside, boundary) for g in layer_crs, another CRS than the raster's: centres transformed to
    layer_crs and tested there (inside), and those within BAND cells of g's boundary (in the raster's
    CRS, to the boundary cut finely in layer_crs and transformed)."""
    x, y = centres(case)
    h, w = x.shape
    to_layer = osr.CoordinateTransformation(srs(case['crs']), srs(layer_crs))
    lx = np.array(to_layer.TransformPoints(np.stack([x.ravel(), y.ravel()], 1).tolist()))
    inside = np.zeros(h * w, bool)
    pt = ogr.Geometry(ogr.wkbPoint)
    for i, (a, b) in enumerate(lx[:, :2]):
        if np.isfinite(a) and np.isfinite(b):
            pt.SetPoint_2D(0, float(a), float(b))
            inside[i] = g.Contains(pt)
    gt = case['gt']
    env = g.GetEnvelope()
    bnd = g.GetBoundary()
    bnd.Segmentize(max(env[1] - env[0], env[3] - env[2]) / 2000)
    to_raster = osr.CoordinateTransformation(srs(layer_crs), srs(case['crs']))
    samples = []
    lines = [bnd.GetGeometryRef(i) for i in range(bnd.GetGeometryCount())] if bnd.GetGeometryCount() else [bnd]
    for line in lines:
        pts = line.GetPoints()
        q = np.array(to_raster.TransformPoints([p[:2] for p in pts]))[:, :2]
        c = np.stack([(q[:, 0] - gt[0]) / gt[1], (q[:, 1] - gt[3]) / gt[5]], 1)  # in cells
        for p0, p1 in zip(c[:-1], c[1:]):
            if not (np.isfinite(p0).all() and np.isfinite(p1).all()):
                continue
            n = max(1, int(np.ceil(np.hypot(*(p1 - p0)) / (BAND / 4))))
            f = np.arange(n)[:, None] / n
            samples.append(p0 + f * (p1 - p0))
        samples.append(c[-1:][np.isfinite(c[-1:]).all(1)])
    tree = cKDTree(np.concatenate(samples))
    cells = np.stack([(x.ravel() - gt[0]) / gt[1], (y.ravel() - gt[3]) / gt[5]], 1)
    dist, _ = tree.query(cells)
    onb = dist <= BAND + BAND / 8
    return (inside & ~onb).reshape(h, w), onb.reshape(h, w)


def runs(mask):
    out = []
    for r in range(mask.shape[0]):
        row = np.concatenate([[False], mask[r], [False]]).astype(np.int8)
        d = np.diff(row)
        for c0, c1 in zip(np.where(d == 1)[0], np.where(d == -1)[0]):
            out.append([int(r), int(c0), int(c1)])
    return out


def solve(case):
    lcrs = case['layer_crs']
    groups = {}
    for f in case['features']:
        g = ogr.CreateGeometryFromWkt(f['wkt'])
        if not g.IsValid():
            g = bowtie_fix(g) if f.get('repair') == 'lobes' else structure(g)
        groups.setdefault(f['id'], []).append(g)
    units, union = [], None
    for uid, gs in groups.items():
        u = gs[0]
        for g in gs[1:]:
            u = u.Union(g)
        if srs(lcrs).IsSame(srs(case['crs'])):
            u = on_raster(u, lcrs, case)
            ins, onb = membership(u, case)
        else:
            ins, onb = membership_own_crs(u, lcrs, case)
        units.append({'id': uid, 'inside': runs(ins), 'boundary': [[int(r), int(c)] for r, c in np.argwhere(onb)]})
        union = u if union is None else union.Union(u)
        groups[uid] = u
    out = {k: v for k, v in case.items() if k != 'features'}
    out['features'] = case['features']
    out['units'] = units
    if case.get('tiling'):
        ins, _ = membership(union, case) if srs(lcrs).IsSame(srs(case['crs'])) else membership_own_crs(union, lcrs, case)
        allb = np.zeros_like(ins)
        for u in units:
            for r, c in u['boundary']:
                allb[r, c] = True
        out['tiled'] = [[int(r), int(c)] for r, c in np.argwhere(allb & ins)]
    if case.get('train'):
        # A layer in another CRS than the raster's is tested in its own CRS (its units in groups
        # are there), where TOL is taken of the side of its envelope.
        own = not srs(lcrs).IsSame(srs(case['crs']))
        rs = srs(lcrs) if own else srs(case['crs'])
        ct = osr.CoordinateTransformation(srs('EPSG:4326'), rs)
        occ = set()
        for lon, lat in case['train']:
            x, y = (lon, lat) if rs.IsGeographic() else ct.TransformPoint(lon, lat)[:2]
            pt = ogr.Geometry(ogr.wkbPoint)
            for turn in ([0, -360, 360] if rs.IsGeographic() and not own else [0]):
                pt.SetPoint_2D(0, x + turn, y)
                for uid, u in groups.items():
                    env = u.GetEnvelope()
                    if u.GetBoundary().Distance(pt) <= TOL * (max(env[1] - env[0], env[3] - env[2]) if own else abs(case['gt'][1])):
                        raise SystemExit(f'{case["name"]}: training point {lon} {lat} on the boundary of {uid}')
                    if u.Contains(pt):
                        occ.add(uid)
        out['occupied'] = sorted(occ)
    return out


def sq(x0, y0, x1, y1):
    return f'POLYGON(({x0} {y0},{x1} {y0},{x1} {y1},{x0} {y1},{x0} {y0}))'


def wkt_ring(pts):
    return '(' + ','.join(f'{a!r} {b!r}' for a, b in list(pts) + [pts[0]]) + ')'


cases = []
# 1. A region with a hole and an island, running off the raster's west edge; vertices on centres.
cases.append({'name': 'region with hole and island off the west edge', 'crs': 'EPSG:4326',
              'gt': [10.0, 0.1, 0, 50.0, 0, -0.1], 'width': 120, 'height': 100, 'layer_crs': 'EPSG:4326',
              'features': [{'id': '', 'wkt': 'MULTIPOLYGON(((8 41,16.05 41,16.05 48.05,8 48.05,8 41),(11.05 43.05,13.05 43.05,13.05 45.05,11.05 45.05,11.05 43.05)),((17.3 42.3,19.37 42.71,18.9 44.13,17.3 42.3)))'}]})

# 2. A Delaunay tiling, vertices on cell centres; every 7th triangle shares the id of the one before.
gt = [-5.0, 0.05, 0, 45.0, 0, -0.05]
W, H = 160, 120
rng = np.random.default_rng(5)
rc = np.stack([rng.integers(0, H, 300), rng.integers(0, W, 300)], 1)
rc = np.unique(np.concatenate([rc, [[0, 0], [0, W - 1], [H - 1, 0], [H - 1, W - 1]]]), axis=0)
tri = Delaunay(rc.astype(float))
feats = []
for n, s in enumerate(tri.simplices):
    pts = [(round(gt[0] + (rc[i][1] + 0.5) * gt[1], 10), round(gt[3] + (rc[i][0] + 0.5) * gt[5], 10)) for i in s]
    if ogr.CreateGeometryFromWkt('POLYGON(' + wkt_ring(pts) + ')').Area() == 0:
        continue
    feats.append({'id': f'T{(n - 1 if n % 7 == 6 else n):03d}', 'wkt': 'POLYGON(' + wkt_ring(pts) + ')'})
train = [(round(float(a), 6), round(float(b), 6)) for a, b in zip(rng.uniform(-4.9, -1.1, 12), rng.uniform(42.1, 44.9, 12))]
cases.append({'name': 'Delaunay tiling with vertices on cell centres', 'crs': 'EPSG:4326', 'gt': gt, 'width': W,
              'height': H, 'layer_crs': 'EPSG:4326', 'features': feats, 'tiling': True, 'train': train})

# 3. UTM raster; units of rotated squares in ETRS89-LAEA (another CRS), ids shared by distant units.
gt = [430000.0, 1000.0, 0, 5450000.0, 0, -1000.0]
to3035 = osr.CoordinateTransformation(srs('EPSG:32633'), srs('EPSG:3035'))
o = np.array(to3035.TransformPoint(440000.0, 5410000.0)[:2]).round(1)
a, b = np.array([2300.0, 700.0]), np.array([-700.0, 2300.0])
feats = []
n = 0
for i in range(9):
    for j in range(9):
        p0 = o + i * a + j * b
        n += 1
        feats.append({'id': f'eco {n if n % 10 else n - 5:03d}', 'wkt': 'POLYGON(' + wkt_ring([tuple(p0), tuple(p0 + a), tuple(p0 + a + b), tuple(p0 + b)]) + ')'})
toll = osr.CoordinateTransformation(srs('EPSG:32633'), srs('EPSG:4326'))
train = [tuple(round(v, 7) for v in toll.TransformPoint(x, y)[:2]) for x, y in [(450300.0, 5420700.0), (455100.0, 5431300.0), (462700.0, 5424100.0)]]
cases.append({'name': 'LAEA units on a UTM raster', 'crs': 'EPSG:32633', 'gt': gt, 'width': 50, 'height': 50,
              'layer_crs': 'EPSG:3035', 'features': feats, 'tiling': True, 'train': train})
reg = [(400000.0, 5400500.0), (470500.0, 5405500.0), (475500.0, 5440500.0), (420500.0, 5445500.0)]
hole = [(440500.0, 5415500.0), (455500.0, 5415500.0), (455500.0, 5430500.0), (440500.0, 5430500.0)]
ll = lambda pts: [tuple(toll.TransformPoint(x, y)[:2]) for x, y in pts]
cases.append({'name': 'WGS84 region with a hole on a UTM raster', 'crs': 'EPSG:32633', 'gt': gt, 'width': 50,
              'height': 50, 'layer_crs': 'EPSG:4326',
              'features': [{'id': '', 'wkt': 'POLYGON(' + wkt_ring(ll(reg)) + ',' + wkt_ring(ll(hole)) + ')'}]})

# 4. Global grids: a unit split at 180 (one id, with a hole), the unit in its hole, units meeting it,
# a polar cap written -180..180.
feats = [
    {'id': '1', 'wkt': 'POLYGON((170.3 -10.2,180 -10.2,180 10.7,170.3 10.7,170.3 -10.2),(172.1 -2.2,176.6 -2.2,176.6 3.3,172.1 3.3,172.1 -2.2))'},
    {'id': '1', 'wkt': sq(-180, -10.2, -165.4, 10.7)},
    {'id': '2', 'wkt': sq(172.1, -2.2, 176.6, 3.3)},
    {'id': '3', 'wkt': sq(-175.5, 10.7, -160.2, 20.1)},
    {'id': '5.5', 'wkt': sq(-180, 60.3, 180, 90)},
    {'id': '7', 'wkt': sq(-180, 30.2, -175.3, 35.6)},
    {'id': '8', 'wkt': sq(175.3, 30.2, 180, 35.6)},
]
for west in (-180.0, 0.0, -170.5):
    cases.append({'name': f'global grid from {west:g}', 'crs': 'EPSG:4326', 'gt': [west, 1.0, 0, 90.0, 0, -1.0],
                  'width': 360, 'height': 180, 'layer_crs': 'EPSG:4326', 'features': feats,
                  'train': [(177.7, 33.3), (174.3, 0.4), (-170.5, 0.5), (10.0, 75.5)]})

# 5. Polar stereographic raster: a cap north of 80 written in one piece, a sector split at 180.
cases.append({'name': 'polar stereographic', 'crs': 'EPSG:3413', 'gt': [-2500000.0, 50000.0, 0, 2500000.0, 0, -50000.0],
              'width': 100, 'height': 100, 'layer_crs': 'EPSG:4326',
              'features': [{'id': 'cap', 'wkt': sq(-180, 80, 180, 90)}, {'id': 'sector', 'wkt': sq(165.3, 66.2, 180, 79.1)},
                           {'id': 'sector', 'wkt': sq(-180, 66.2, -171.7, 79.1)}, {'id': 'quad', 'wkt': sq(20.5, 70.5, 40.5, 78.5)}],
              'train': [(10.0, 85.0), (-175.0, 75.0)]})

# 6. A rectangle of four corners in ETRS89-LAEA, edges of 2000 to 3000 km, on a 0.25 degree
# latitude-longitude raster: its edges are curves there.
cases.append({'name': 'long-edged LAEA rectangle on a latitude-longitude raster', 'crs': 'EPSG:4326',
              'gt': [-20.0, 0.25, 0, 72.0, 0, -0.25], 'width': 240, 'height': 152, 'layer_crs': 'EPSG:3035',
              'features': [{'id': '', 'wkt': sq(2600000.5, 1500000.5, 5600000.5, 4000000.5)}]})

# 7. Invalid polygons, repaired.
cases.append({'name': 'invalid polygons', 'crs': 'EPSG:4326', 'gt': [0.0, 0.1, 0, 10.0, 0, -0.1], 'width': 100, 'height': 100,
              'layer_crs': 'EPSG:4326',
              'features': [{'id': 'overlap', 'wkt': 'MULTIPOLYGON(((1.02 1.02,5.02 1.02,5.02 5.02,1.02 5.02,1.02 1.02)),((3.02 3.02,7.02 3.02,7.02 7.02,3.02 7.02,3.02 3.02)))'},
                           {'id': 'hole out', 'wkt': 'POLYGON((1.02 6.02,5.02 6.02,5.02 9.02,1.02 9.02,1.02 6.02),(4.02 7.02,6.02 7.02,6.02 8.02,4.02 8.02,4.02 7.02))'},
                           {'id': 'bow-tie', 'wkt': 'POLYGON((6.02 0.52,9.02 3.52,9.02 0.52,6.02 3.52,6.02 0.52))', 'repair': 'lobes'}]})

out = {'generator': 'testdata/polygons/golden.py (GDAL %s, GEOS %d.%d, scipy Delaunay)' % (
    __import__('osgeo.gdal').gdal.__version__, ogr.GetGEOSVersionMajor(), ogr.GetGEOSVersionMinor()),
    'tolerance_cells': TOL, 'cases': [solve(c) for c in cases]}
with open(os.path.join(os.path.dirname(os.path.abspath(__file__)), 'golden.json'), 'w') as f:
    json.dump(out, f, separators=(',', ':'))
    f.write('\n')
