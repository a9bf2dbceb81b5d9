# Golden values for TestEqualAreaUnitsHB (extent/grid_units_hB_test.go): true WGS84 area (km2) of cell
# (col 3, row 2) of each grid, as pyproj.Geod(ellps='WGS84').polygon_area_perimeter
# of the cell outline densified 64 points per side after pyproj's inverse projection.
import numpy as np, pyproj
cases = [
 ('+proj=laea +lat_0=52 +lon_0=10 +x_0=4321000 +y_0=3210000 +ellps=GRS80 +units=m +no_defs +type=crs', (4000000.0, 5000.0, 0, 3200000.0, 0, -5000.0)),
 ('+proj=laea +lat_0=52 +lon_0=10 +x_0=4321000 +y_0=3210000 +ellps=GRS80 +units=km +no_defs +type=crs', (4000.0, 5.0, 0, 3200.0, 0, -5.0)),
 ('+proj=aea +lat_0=23 +lon_0=-96 +lat_1=29.5 +lat_2=45.5 +x_0=0 +y_0=0 +datum=NAD83 +units=us-ft +no_defs +type=crs', (-500000.0, 10000.0, 0, 1500000.0, 0, -10000.0)),
]
G = pyproj.Geod(ellps='WGS84')
for crs, gt in cases:
    tr = pyproj.Transformer.from_crs(pyproj.CRS(crs), 'EPSG:4326', always_xy=True)
    c, r, k = 3, 2, 64
    x0, x1 = gt[0] + c * gt[1], gt[0] + (c + 1) * gt[1]
    y0, y1 = gt[3] + r * gt[5], gt[3] + (r + 1) * gt[5]
    t = np.arange(k) / k
    xs = np.concatenate([x0 + t * (x1 - x0), np.full(k, x1), x1 - t * (x1 - x0), np.full(k, x0)])
    ys = np.concatenate([np.full(k, y1), y1 + t * (y0 - y1), np.full(k, y0), y0 - t * (y0 - y1)])
    lon, lat = tr.transform(xs, ys)
    a, _ = G.polygon_area_perimeter(lon, lat)
    print('%r: %.12g' % (crs.split('+units=')[1].split()[0], abs(a) / 1e6))
