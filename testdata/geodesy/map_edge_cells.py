# Golden values for TestMapEdgeCells (extent/mapedge_test.go): the true
# WGS84 area (km2) of the part on the map of cells that the outline of a
# world map cuts (Mollweide ESRI:54009, Equal Earth EPSG:8857), computed
# without the outline polygon areasweep builds: these projections map each
# parallel to a straight row (y) and longitude linearly along it, so the
# map's east edge at height y is x * 180 / lon(x, y) for any x on the map
# (pyproj's inverse) and its west edge the mirror image, and the map's top
# and bottom are the poles' rows (pyproj's forward). A cell's part on the
# map is then the integral over its height of its width between those
# edges, times the ratio of true to planar area at that height: 1 on Equal
# Earth (equal-area on the WGS84 ellipsoid), M N / a^2 on Mollweide (PROJ
# computes it on the sphere of WGS84's semi-major axis a, with the latitude
# from pyproj's inverse; M, N from pyproj.Geod(ellps='WGS84')'s a and f).
# Gauss-Legendre, 20 nodes on each of 64 pieces between the heights where
# an edge crosses the cell's sides (found by bisection): converged to
# about 1e-12 of a cell. The last line is the whole map: the WGS84
# ellipsoid's area, 8 times pyproj.Geod's area of the octant (0,0), (90,0),
# (0,90). Writes map_edge_cells.txt in the format of equal_area_cells.txt:
# name | CRS | geotransform | width height col row | true km2 | planar km2.
import numpy as np, pyproj

G = pyproj.Geod(ellps='WGS84')
e2 = G.f * (2 - G.f)
moll = (-18100000.0, 100000.0, 0, 9100000.0, 0, -100000.0)
ee = (-17300000.0, 100000.0, 0, 8400000.0, 0, -100000.0)
# (name, CRS, geotransform, width, height, row, 'east'/'west'/column)
cases = [
 ('Mollweide, equator, east edge', 'ESRI:54009', moll, 362, 182, 91, 'east'),
 ('Mollweide, 50 N, west edge', 'ESRI:54009', moll, 362, 182, 30, 'west'),
 ('Mollweide, near the North Pole', 'ESRI:54009', moll, 362, 182, 0, 185),
 ('Mollweide, 75 S, east edge', 'ESRI:54009', moll, 362, 182, 170, 'east'),
 ('Equal Earth, 20 N, east edge', 'EPSG:8857', ee, 346, 168, 60, 'east'),
 ('Equal Earth, pole line', 'EPSG:8857', ee, 346, 168, 0, 173),
 ('Equal Earth, corner of the pole line', 'EPSG:8857', ee, 346, 168, 0, 'east'),
 ('Equal Earth, 60 S, west edge', 'EPSG:8857', ee, 346, 168, 150, 'west'),
]


def quad(f, a, b):
    x, w = np.polynomial.legendre.leggauss(20)
    edges = np.linspace(a, b, 65)
    s = 0.0
    for lo, hi in zip(edges[:-1], edges[1:]):
        s += np.sum(w * f((hi - lo) / 2 * x + (hi + lo) / 2)) * (hi - lo) / 2
    return s


def bisect(f, a, b):
    fa = f(a)
    for _ in range(200):
        m = (a + b) / 2
        if (f(m) > 0) == (fa > 0):
            a, fa = m, f(m)
        else:
            b = m
    return (a + b) / 2


def on_map(crs, gt, c, r):
    inv = pyproj.Transformer.from_crs(crs, 'EPSG:4326', always_xy=True)
    fwd = pyproj.Transformer.from_crs('EPSG:4326', crs, always_xy=True)
    ytop = fwd.transform(0.0, 90.0)[1]
    xa, xb = gt[0] + c * gt[1], gt[0] + (c + 1) * gt[1]
    y1, y0 = gt[3] + r * gt[5], gt[3] + (r + 1) * gt[5]
    lo, hi = max(y0, -ytop), min(y1, ytop)

    def east(y):
        lon, _ = inv.transform(np.full(np.shape(y), 1000.0), y)
        return 1000.0 * 180 / np.asarray(lon)

    def ratio(y):
        if crs != 'ESRI:54009':
            return np.ones(np.shape(y))
        _, lat = inv.transform(np.zeros(np.shape(y)), y)
        s = np.sin(np.radians(np.asarray(lat)))
        return (1 - e2) / (1 - e2 * s * s) ** 2

    def width(y):
        e = east(y)
        return np.maximum(0, np.minimum(xb, e) - np.maximum(xa, -e))

    cuts = [lo, hi]
    for x in (xa, xb, -xa, -xb):
        f = lambda y: float(east(np.array([y]))[0]) - abs(x)
        if f(lo) * f(hi) < 0:
            cuts.append(bisect(f, lo, hi))
    cuts.sort()
    area = sum(quad(lambda y: width(y) * ratio(y), a, b) for a, b in zip(cuts[:-1], cuts[1:]) if b > a)
    return area / 1e6


def column(crs, gt, r, side):
    if not isinstance(side, str):
        return side
    inv = pyproj.Transformer.from_crs(crs, 'EPSG:4326', always_xy=True)
    fwd = pyproj.Transformer.from_crs('EPSG:4326', crs, always_xy=True)
    y = min(gt[3] + (r + 0.5) * gt[5], fwd.transform(0.0, 90.0)[1] - 1)
    lon, _ = inv.transform(1000.0, y)
    x = 1000.0 * 180 / lon
    return int((x - gt[0]) // gt[1]) if side == 'east' else int((-x - gt[0]) // gt[1])


with open('map_edge_cells.txt', 'w') as out:
    out.write('# written by map_edge_cells.py (pyproj %s, PROJ %s): name | CRS | geotransform | width height col row | true km2 | planar km2\n'
              % (pyproj.__version__, pyproj.proj_version_str))
    for name, crs, gt, w, h, r, side in cases:
        c = column(crs, gt, r, side)
        out.write('%s | %s | %s | %d %d %d %d | %.12g | %.12g\n' % (
            name, crs, ' '.join(repr(v) for v in gt), w, h, c, r, on_map(crs, gt, c, r), abs(gt[1] * gt[5]) / 1e6))
    octant, _ = G.polygon_area_perimeter([0, 90, 0], [0, 0, 90])
    out.write('whole WGS84 ellipsoid | EPSG:4326 | 0 0 0 0 0 0 | 0 0 0 0 | %.12g | 0\n' % (8 * abs(octant) / 1e6))
