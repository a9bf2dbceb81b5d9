# The computation behind equal_area_cells.py and projected_cells.py: the
# true WGS84 area (km2) of one cell of a grid, as
# pyproj.Geod(ellps='WGS84').polygon_area_perimeter of the cell outline
# densified k points per side after pyproj's inverse projection, and its
# planar area, one line per case:
# name | CRS | geotransform | width height col row | true km2 | planar km2.
import numpy as np, pyproj


def write(path, script, cases, k, digits):
    """Writes one line per case (name, crs, gt, w, h, c, r) into path,
    areas with the given number of significant digits."""
    G = pyproj.Geod(ellps='WGS84')
    f = '%%s | %%s | %%s | %%d %%d %%d %%d | %%.%dg | %%.%dg\n' % (digits, digits)
    with open(path, 'w') as out:
        out.write('# written by %s (pyproj %s, PROJ %s): name | CRS | geotransform | width height col row | true km2 | planar km2\n'
                  % (script, pyproj.__version__, pyproj.proj_version_str))
        for name, crs, gt, w, h, c, r in cases:
            tr = pyproj.Transformer.from_crs(pyproj.CRS(crs), 'EPSG:4326', always_xy=True)
            x0, x1 = gt[0] + c * gt[1], gt[0] + (c + 1) * gt[1]
            y0, y1 = gt[3] + r * gt[5], gt[3] + (r + 1) * gt[5]
            t = np.arange(k) / k
            xs = np.concatenate([x0 + t * (x1 - x0), np.full(k, x1), x1 - t * (x1 - x0), np.full(k, x0)])
            ys = np.concatenate([np.full(k, y1), y1 + t * (y0 - y1), np.full(k, y0), y0 - t * (y0 - y1)])
            lon, lat = tr.transform(xs, ys)
            a, _ = G.polygon_area_perimeter(lon, lat)
            unit = pyproj.CRS(crs).axis_info[0].unit_conversion_factor
            out.write(f % (name, crs, ' '.join(repr(v) for v in gt), w, h, c, r, abs(a) / 1e6, abs(gt[1] * gt[5]) * unit * unit / 1e6))
