#!/usr/bin/env python3
"""Reference distribution of the partial ROC ratio of test points drawn at
random over an extent of continuous values (the null of metrics'
area-random test, PartialROC.PRandom), computed independently with numpy.

Each draw places n points at x uniform on (0, 1) (x = the share of the
extent's area at or above the point's value), builds the step ROC curve
on the area axis (vertical steps at each point's x, taken in ascending x),
finds x_E where it first reaches 1 - E (the ceil((1-E)n)-th point; (1-E)n
within 1e-9 of an integer counts as that integer) and takes the ratio of
the area under the curve from x_E to 1 to (1 - x_E^2)/2 (Peterson et al.
2008). Writes random_null_golden.csv: n, E, and the ratio's 5th to 95th
percentiles in steps of 5 from 100,000 draws (numpy PCG64, seed 20261205;
numpy's percentile, linear interpolation). metrics' TestAreaRandomNullNumpy
holds areasweep's draws to these within a tolerance stated there.
"""
import math
import numpy as np

rng = np.random.default_rng(20261205)
DRAWS = 100_000
probs = [p / 100 for p in range(5, 100, 5)]
rows = []
for n in (20, 50, 200):
    for e in (0.05, 0.1):
        tau = (1 - e) * n
        if abs(tau - round(tau)) < 1e-9:
            tau = round(tau)
        j = math.ceil(tau)  # 1-based crossing point
        x = np.sort(rng.random((DRAWS, n)), axis=1)
        xe = x[:, j - 1]
        nxt = np.concatenate([x[:, j:], np.ones((DRAWS, 1))], axis=1)
        heights = np.arange(j, n + 1) / n
        model = ((nxt - x[:, j - 1:]) * heights).sum(axis=1)
        ratio = model / ((1 - xe * xe) / 2)
        q = np.percentile(ratio, [100 * p for p in probs])
        rows.append((n, e, q))
with open("random_null_golden.csv", "w") as f:
    f.write("n,e," + ",".join("p%02d" % round(100 * p) for p in probs) + "\n")
    for n, e, q in rows:
        f.write("%d,%g," % (n, e) + ",".join("%.6f" % v for v in q) + "\n")
