# Golden values for TestProjectedCellAreas (extent/grid_area_test.go): the
# true WGS84 area (km2) of one cell of grids in projections that are not
# equal-area, as pyproj.Geod(ellps='WGS84').polygon_area_perimeter of the
# cell outline densified K points per side (default 4096) after pyproj's
# inverse projection. The error of that outline (its edges are geodesics
# between the points, not the grid CRS's straight lines) falls as 1/K^2:
# 3.5e-7 of a 40 km Web Mercator cell at K = 4, so about 3e-13 at 4096.
# Writes projected_cells.txt in the format of equal_area_cells.txt:
# name | CRS | geotransform | width height col row | true km2 | planar km2.
import sys
import cellarea

merc = (0.0, 40000.0, 0, 12000000.0, 0, -40000.0)
cases = [
 ('Web Mercator 40 km, 58 N', 'EPSG:3857', merc, 150, 150, 10, 75),
 ('Web Mercator 40 km, 72 N', 'EPSG:3857', merc, 150, 150, 10, 0),
 ('polar stereographic north, pole at a corner', 'EPSG:3413', (-3000000.0, 40000.0, 0, 3000000.0, 0, -40000.0), 150, 150, 74, 74),
 ('polar stereographic north, 2000 km from the pole', 'EPSG:3413', (-3000000.0, 40000.0, 0, 3000000.0, 0, -40000.0), 150, 150, 75, 125),
 ('polar stereographic south, pole inside', 'EPSG:3031', (-3020000.0, 40000.0, 0, 3020000.0, 0, -40000.0), 151, 151, 75, 75),
 ('UTM 33N 10 km', 'EPSG:32633', (400000.0, 10000.0, 0, 5200000.0, 0, -10000.0), 3, 3, 2, 1),
 ('UTM 33N 2 km', 'EPSG:32633', (300000.0, 2000.0, 0, 5300000.0, 0, -2000.0), 200, 150, 0, 0),
 ('US survey feet (EPSG:2227)', 'EPSG:2227', (5900000.0, 5000.0, 0, 2400000.0, 0, -5000.0), 120, 100, 60, 50),
]
k = int(sys.argv[1]) if len(sys.argv) > 1 else 4096
cellarea.write('projected_cells.txt', 'projected_cells.py', cases, k, 15)
