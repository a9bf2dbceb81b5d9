#!/bin/sh
# regen.sh - regenerate the golden files of testdata/geodesy in place:
# PROJ's geod (golden.sh) and the true areas of equal-area grid cells
# (equal_area_cells.py), of cells of other projected grids
# (projected_cells.py) and of the parts on the map of cells a world map's
# outline cuts (map_edge_cells.py); the three need Debian's python3-pyproj and
# python3-numpy via /usr/bin/python3. CI runs this and checks `git diff --exit-code`.
set -eu
cd "$(dirname "$0")"
/usr/bin/python3 equal_area_cells.py
/usr/bin/python3 projected_cells.py
/usr/bin/python3 map_edge_cells.py
exec sh ./golden.sh
