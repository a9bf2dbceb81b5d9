# Golden values for TestSphereEqualAreaHB (extent/grid_units_hB_test.go): true WGS84
# area (km2) of a cell of each grid, as pyproj.Geod(ellps='WGS84').polygon_area_perimeter
# of the cell outline densified 4096 points per side (argument: another number) after pyproj's inverse projection,
# and the planar area for comparison.
import numpy as np, pyproj
cases = [
 ('ESRI:54009', (1000000.0, 10000.0, 0, 6000000.0, 0, -10000.0), 3, 2),
 ('ESRI:54012', (1000000.0, 10000.0, 0, 6000000.0, 0, -10000.0), 3, 2),
 ('+proj=moll +R=6371007 +no_defs +type=crs', (1000000.0, 10000.0, 0, 6000000.0, 0, -10000.0), 3, 2),
 # a global Mollweide grid (corners outside the ellipse): a cell at the equator and one in the top row
 ('ESRI:54009', (-18100000.0, 100000.0, 0, 9100000.0, 0, -100000.0), 181, 91),
 ('ESRI:54009', (-18100000.0, 100000.0, 0, 9100000.0, 0, -100000.0), 181, 1),
 ('EPSG:3035', (4000000.0, 5000.0, 0, 3200000.0, 0, -5000.0), 3, 2),
 ('EPSG:8857', (1000000.0, 10000.0, 0, 6000000.0, 0, -10000.0), 3, 2),
 # MODIS's sinusoidal grid (on a sphere) and an ellipsoidal sinusoidal one
 ('+proj=sinu +lon_0=0 +x_0=0 +y_0=0 +R=6371007.181 +units=m +no_defs +type=crs', (1000000.0, 10000.0, 0, 6000000.0, 0, -10000.0), 3, 2),
 ('ESRI:54008', (1000000.0, 10000.0, 0, 6000000.0, 0, -10000.0), 3, 2),
 # Lambert azimuthal equal-area on a sphere
 ('+proj=laea +lat_0=45 +lon_0=10 +R=6371007 +units=m +no_defs +type=crs', (-250000.0, 5000.0, 0, 200000.0, 0, -5000.0), 3, 2),
]
G = pyproj.Geod(ellps='WGS84')
for crs, gt, c, r in cases:
    tr = pyproj.Transformer.from_crs(pyproj.CRS(crs), 'EPSG:4326', always_xy=True)
    k = int(__import__("sys").argv[1]) if len(__import__("sys").argv) > 1 else 4096
    x0, x1 = gt[0] + c * gt[1], gt[0] + (c + 1) * gt[1]
    y0, y1 = gt[3] + r * gt[5], gt[3] + (r + 1) * gt[5]
    t = np.arange(k) / k
    xs = np.concatenate([x0 + t * (x1 - x0), np.full(k, x1), x1 - t * (x1 - x0), np.full(k, x0)])
    ys = np.concatenate([np.full(k, y1), y1 + t * (y0 - y1), np.full(k, y0), y0 - t * (y0 - y1)])
    lon, lat = tr.transform(xs, ys)
    a, _ = G.polygon_area_perimeter(lon, lat)
    print('%s %r col %d row %d: %.12g (planar %.12g)' % (crs, gt, c, r, abs(a) / 1e6, abs(gt[1] * gt[5]) / 1e6))
