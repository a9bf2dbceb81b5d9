#!/bin/sh
# golden.sh - write golden WGS84 geodesic values for package areasweep/extent/geodesy
# using PROJ's `geod` (proj-bin; Karney 2013 algorithms).
#
# Outputs (in this directory):
#   geod_inverse.txt  lat1 lon1 lat2 lon2 | azi1 back_azi2 s12   (geod -I)
#   geod_direct.txt   lat1 lon1 azi1 s12  | lat2 lon2 back_azi2  (geod forward)
#   geod_line.txt     points of `geod +lat_1.. +lat_2.. +n_S=` (intermediate points)
#
# geod's inverse output is: forward azimuth at point 1, BACK azimuth at point 2
# (azimuth from point 2 towards point 1 = forward azimuth at point 2 +- 180), and
# distance. Forward mode prints lat2 lon2 and the back azimuth at point 2.
# Input is fixed (no randomness), so the output is deterministic.
set -eu
export LC_ALL=C
cd "$(dirname "$0")"
GEOD=${GEOD:-geod}
FMT="-f %.12f -F %.9f"
VERSION=$($GEOD 2>&1 | head -n 1 || true)

# Inverse problems: lat1 lon1 lat2 lon2 (degrees). Categories as commented.
cat > inverse_in.tmp <<'PAIRS'
0 0 0 0.00001
51.5 -0.12 51.50001 -0.12001
40.64 -73.78 40.6401 -73.7799
-33.86 151.21 -33.87 151.22
10 10 10.5 10.5
52.52 13.405 48.8566 2.3522
40.64 -73.78 1.36 103.99
-34.6 -58.4 -33.45 -70.67
35.68 139.69 -33.87 151.21
64.14 -21.94 -54.8 -68.3
0 0 45 90
-45 30 60 -120
30 -100 -30 80
0 0 0.5 179.5
0 0 0 179.5
0 0 0 179.9
1 0 -1 179.8
30 0 -29.9 179.9
-10 20 10.1 -160.05
0 0 -0.01 179.99
10 179.5 10 -179.5
-20 -179.9 -20.5 179.8
60 170 55 -170
0 180 0 -180
-65 -175 -70 178
89.9 0 89.9 180
89.99 45 89.99 -135
-89.5 10 -89.5 100
90 0 80 37
-90 0 -89 -45
89 10 -89 -170
90 0 -90 0
0 0 0 90
0 -10 30 -10
-45 100 45 100
0 0 0 1
45 45 45 46
12.345678 -98.765432 -23.456789 87.654321
70 -150 -70 30.5
5 5 -5 -175.3
PAIRS

# Direct problems: lat1 lon1 azi1 s12 (degrees, metres).
cat > direct_in.tmp <<'PAIRS'
0 0 90 1000
40.64 -73.78 45 10000000
-33.86 151.21 -120 500000
89.9 30 10 50000
-89 0 180 300000
10 179.9 90 100000
0 0 30 19990000
45 -100 -45 15000000
60 20 0 4000000
1 0 89 19960000
-20 -179.5 -90 200000
30 60 135 1
0 0 0 10001965.729
0 0 90 20037508.34
35 139 270 40000000
50 8 200 12345678.9
-60 -60 60 6000000
0 0 179.9 19000000
PAIRS

# Lines for densification: lat1 lon1 lat2 lon2 del_S (metres).
cat > line_in.tmp <<'PAIRS'
10 20 40 -100 3100000
-33.86 151.21 40.64 -73.78 2500000
60 170 55 -170 250000
89 0 -89 179 5000000
0 0 0.5 179.5 7000000
PAIRS

{
  echo "# geod -I +ellps=WGS84 +units=m $FMT ($VERSION)"
  echo "# lat1 lon1 lat2 lon2 azi1 back_azi2 s12"
  $GEOD +ellps=WGS84 +units=m -I $FMT inverse_in.tmp | paste -d ' ' inverse_in.tmp - | tr '\t' ' '
} > geod_inverse.txt

{
  echo "# geod +ellps=WGS84 +units=m $FMT ($VERSION)"
  echo "# lat1 lon1 azi1 s12 lat2 lon2 back_azi2"
  $GEOD +ellps=WGS84 +units=m $FMT direct_in.tmp | paste -d ' ' direct_in.tmp - | tr '\t' ' '
} > geod_direct.txt

# geod's own +del_S rounds s/del_S to the nearest integer, so its spacing can
# exceed del_S; Densify guarantees spacing <= maxStep with n = ceil(s/maxStep)
# pieces. So n is computed here (awk, from geod's distance) and passed as +n_S.
{
  echo "# geod +ellps=WGS84 +units=m +lat_1 +lon_1 +lat_2 +lon_2 +n_S -f %.12f ($VERSION)"
  echo "# L lat1 lon1 lat2 lon2 del_S n_S (n_S = ceil(s12/del_S)), then one P lat lon line per point"
  while read -r a b c d del; do
    s=$(echo "$a $b $c $d" | $GEOD +ellps=WGS84 +units=m -I $FMT | awk '{print $3}')
    n=$(awk -v s="$s" -v d="$del" 'BEGIN { n = int(s / d); if (n * d < s) n++; if (n < 1) n = 1; print n }')
    echo "L $a $b $c $d $del $n"
    $GEOD +ellps=WGS84 +units=m +lat_1="$a" +lon_1="$b" +lat_2="$c" +lon_2="$d" +n_S="$n" -f %.12f |
      tr '\t' ' ' | sed 's/^/P /'
  done < line_in.tmp
} > geod_line.txt

rm -f inverse_in.tmp direct_in.tmp line_in.tmp
