#!/usr/bin/python3
"""Golden values for package areasweep/cmd/internal/scenario, from outside tools.

- weighted AUC: sklearn.metrics.roc_auc_score with sample_weight
- convex hull: scipy.spatial.ConvexHull (Qhull)
- Voronoi cells clipped to a box: scipy.spatial.Voronoi on the seeds plus their
  mirror images across the four box edges, whose Voronoi cells for the
  original seeds are exactly the box-clipped cells
- great-circle distance on a sphere of radius 6371008.8 m: proj-bin `geod -I`

Deterministic: fixed numpy seed. Writes golden.json beside this file.
"""
import json
import os
import subprocess

import numpy as np
from scipy.spatial import ConvexHull, Voronoi
from sklearn.metrics import roc_auc_score

rng = np.random.RandomState(20261201)
here = os.path.dirname(os.path.abspath(__file__))


def auc_cases():
    out = []
    # Ties on purpose: scores rounded to one decimal.
    for name, npos, nneg, pos_weighted in [
        ("ties_unit_presence_weights", 25, 60, False),
        ("ties_weighted_both", 30, 45, True),
        ("few_points", 3, 5, False),
    ]:
        pos = np.round(rng.uniform(0.2, 1.0, npos), 1)
        neg = np.round(rng.uniform(0.0, 0.8, nneg), 1)
        pw = np.round(rng.uniform(0.5, 2.0, npos), 3) if pos_weighted else np.ones(npos)
        nw = np.round(rng.uniform(0.3, 1.0, nneg), 3)
        y = np.r_[np.ones(npos), np.zeros(nneg)]
        s = np.r_[pos, neg]
        w = np.r_[pw, nw]
        out.append({
            "name": name,
            "pos": pos.tolist(), "pos_w": pw.tolist(),
            "neg": neg.tolist(), "neg_w": nw.tolist(),
            "auc": float(roc_auc_score(y, s, sample_weight=w)),
        })
    return out


def hull_cases():
    out = []
    for name, n in [("uniform_40", 40), ("uniform_200", 200)]:
        p = np.round(rng.uniform(-10, 10, (n, 2)), 4)
        h = ConvexHull(p)
        out.append({
            "name": name,
            "points": p.tolist(),
            "hull": p[h.vertices].tolist(),  # counter-clockwise for 2-D input
            "area": float(h.volume),
        })
    return out


def voronoi_cases():
    out = []
    x0, y0, x1, y1 = -150.0, -52.0, -120.0, -28.0
    for name, n in [("seeds_12", 12), ("seeds_40", 40)]:
        s = np.c_[rng.uniform(x0, x1, n), rng.uniform(y0, y1, n)]
        mirrors = [s,
                   np.c_[2 * x0 - s[:, 0], s[:, 1]], np.c_[2 * x1 - s[:, 0], s[:, 1]],
                   np.c_[s[:, 0], 2 * y0 - s[:, 1]], np.c_[s[:, 0], 2 * y1 - s[:, 1]]]
        v = Voronoi(np.vstack(mirrors))
        areas = []
        for i in range(n):
            reg = v.regions[v.point_region[i]]
            assert -1 not in reg and len(reg) >= 3
            areas.append(float(ConvexHull(v.vertices[reg]).volume))
        out.append({"name": name, "box": [x0, y0, x1, y1], "seeds": s.tolist(), "areas": areas})
    return out


def geod_cases():
    pairs = [
        ("short_east", -130.0, -40.0, -129.5, -40.0),
        ("diagonal_700km", -130.0, -40.0, -125.0, -35.0),
        ("across_grid", -150.0, -28.0, -120.0, -52.0),
        ("meridian", -135.0, -30.0, -135.0, -50.0),
    ]
    out = []
    for name, lon1, lat1, lon2, lat2 in pairs:
        res = subprocess.run(
            ["geod", "+a=6371008.8", "+es=0", "-I", "-f", "%.9f"],
            input=f"{lat1} {lon1} {lat2} {lon2}\n",
            capture_output=True, text=True, check=True)
        dist_m = float(res.stdout.split()[2])
        out.append({"name": name, "lon1": lon1, "lat1": lat1, "lon2": lon2, "lat2": lat2,
                    "km": dist_m / 1000})
    return out


golden = {
    "source": "testdata/golden.py: sklearn roc_auc_score, scipy ConvexHull/Voronoi, proj geod",
    "auc": auc_cases(),
    "hull": hull_cases(),
    "voronoi": voronoi_cases(),
    "geod": geod_cases(),
}
with open(os.path.join(here, "golden.json"), "w") as f:
    json.dump(golden, f, indent=1, sort_keys=True)
    f.write("\n")
