# Golden values for TestEqualAreaUnits and TestSphereEqualArea
# (extent/gridunits_test.go): the true WGS84 area (km2) of one cell of
# each grid, as pyproj.Geod(ellps='WGS84').polygon_area_perimeter of the
# cell outline densified K points per side (default 4096; converged to
# about 4e-8 between 1024 and 4096 on the global Mollweide grid's top-row
# cell, 1e-10 on the others) after pyproj's inverse projection, and the
# planar area for comparison. Writes equal_area_cells.txt, one line per
# case: name | CRS | geotransform | width height col row | true km2 | planar km2.
import sys
import cellarea

regional = (1000000.0, 10000.0, 0, 6000000.0, 0, -10000.0)
glob = (-18100000.0, 100000.0, 0, 9100000.0, 0, -100000.0)
laea52 = '+proj=laea +lat_0=52 +lon_0=10 +x_0=4321000 +y_0=3210000 +ellps=GRS80 +units=%s +no_defs +type=crs'
cases = [
 # equal-area grids whose CRS unit is not the metre
 ('metres', laea52 % 'm', (4000000.0, 5000.0, 0, 3200000.0, 0, -5000.0), 10, 10, 3, 2),
 ('kilometres', laea52 % 'km', (4000.0, 5.0, 0, 3200.0, 0, -5.0), 10, 10, 3, 2),
 ('US survey feet', '+proj=aea +lat_0=23 +lon_0=-96 +lat_1=29.5 +lat_2=45.5 +x_0=0 +y_0=0 +datum=NAD83 +units=us-ft +no_defs +type=crs',
  (-500000.0, 10000.0, 0, 1500000.0, 0, -10000.0), 10, 10, 3, 2),
 # projections PROJ computes on a sphere, and ellipsoidal ones that stay planar
 ('Mollweide WGS84', 'ESRI:54009', regional, 10, 10, 3, 2),
 ('Eckert IV WGS84', 'ESRI:54012', regional, 10, 10, 3, 2),
 ('Mollweide sphere', '+proj=moll +R=6371007 +no_defs +type=crs', regional, 10, 10, 3, 2),
 ('global Mollweide equator', 'ESRI:54009', glob, 362, 182, 181, 91),
 ('global Mollweide top row', 'ESRI:54009', glob, 362, 182, 181, 1),
 ('EPSG:3035 stays planar', 'EPSG:3035', (4000000.0, 5000.0, 0, 3200000.0, 0, -5000.0), 10, 10, 3, 2),
 ('Equal Earth planar', 'EPSG:8857', regional, 10, 10, 3, 2),
 ('sinusoidal on a sphere (MODIS)', '+proj=sinu +lon_0=0 +x_0=0 +y_0=0 +R=6371007.181 +units=m +no_defs +type=crs', regional, 10, 10, 3, 2),
 ('sinusoidal on WGS84 stays planar', 'ESRI:54008', regional, 10, 10, 3, 2),
 ('Lambert azimuthal on a sphere', '+proj=laea +lat_0=45 +lon_0=10 +R=6371007 +units=m +no_defs +type=crs',
  (-250000.0, 5000.0, 0, 200000.0, 0, -5000.0), 10, 10, 3, 2),
]
k = int(sys.argv[1]) if len(sys.argv) > 1 else 4096
cellarea.write('equal_area_cells.txt', 'equal_area_cells.py', cases, k, 12)
