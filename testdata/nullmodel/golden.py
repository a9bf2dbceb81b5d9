#!/usr/bin/python3
"""Golden values for the distance-only null model (extent/nullmodel, cmd/internal/pass).

Writes golden.json beside this script: a latitude-longitude grid of 0.5-degree
cells, random training and test points (numpy, fixed seed), three extents
given as cell masks, and, computed independently of areasweep:

  distance_m    per cell, the WGS84 geodesic distance from the cell centre to
                the nearest training point: the minimum of pyproj
                Geod(ellps="WGS84").inv over all training points (Karney 2013,
                through PROJ);
  auc           per extent, the area-weighted AUC of the null (minus that
                distance) for the test points inside the extent against the
                extent's cells, from sklearn.metrics.roc_auc_score with
                sample_weight (cells weighted by their exact ellipsoidal area,
                test points by 1; a test point takes its cell's value);
  sorting_bias  per extent, the spatial sorting bias of Hijmans (2012,
                Ecology 93:679-688) computed with numpy: mean (median) distance
                from the test points (their own coordinates) to the nearest
                training point over the area-weighted mean (weighted median) of
                the cells' distances;
  model_minus_null  per extent, the paired difference of AUC between a
                generated model (model_value per cell: a smooth bump rounded
                to 2 decimals, so that it has ties) and the null on the test
                points inside the extent, written out in numpy from the
                placements (DeLong, DeLong & Clarke-Pearson 1988, Biometrics
                44:837-845, presence component; cells as the complete
                population, weighted by area):
                    V_i  = (area below v_i + area at v_i / 2) / total area
                    D_i  = V_i(model) - V_i(null)
                    diff = mean D,  SE = sqrt(sum (D_i - diff)^2 / (n (n-1)))
                    95% interval diff -/+ t SE, t the 0.975 quantile of
                    Student's t with n - 1 degrees of freedom (student_t975)
                with the model's AUC from sklearn roc_auc_score as a check
                of the placements' mean.

Deterministic: fixed seed, no clock, sorted keys. Run with /usr/bin/python3
(Debian's python3-pyproj, python3-sklearn, python3-numpy).
"""
import json
import math
import os
import sys

import numpy as np
from pyproj import Geod
from sklearn.metrics import roc_auc_score

HERE = os.path.dirname(os.path.abspath(__file__))
sys.dont_write_bytecode = True  # no __pycache__ in testdata/
sys.path.insert(0, os.path.dirname(HERE))  # testdata/, for tquantile
from tquantile import student_t975  # noqa: E402
GEOD = Geod(ellps="WGS84")

WEST, NORTH, DEG, W, H = -10.0, 60.0, 0.5, 48, 36


def cell_area_m2(lat1, lat2, dlon_deg):
    """Exact area of a latitude-longitude quadrangle on WGS84 (authalic
    latitude; Snyder 1987, USGS PP 1395, eqs. 3-11 to 3-13)."""
    a = 6378137.0
    f = 1 / 298.257223563
    e2 = f * (2 - f)
    e = math.sqrt(e2)

    def q(phi):
        s = math.sin(phi)
        return (1 - e2) * (s / (1 - e2 * s * s) - 1 / (2 * e) * math.log((1 - e * s) / (1 + e * s)))

    return a * a / 2 * math.radians(dlon_deg) * (q(math.radians(lat2)) - q(math.radians(lat1)))


def nearest(lat, lon, tlat, tlon):
    _, _, d = GEOD.inv(np.full(len(tlat), lon), np.full(len(tlat), lat), tlon, tlat)
    return float(np.min(d))


def weighted_median(values, weights):
    order = np.argsort(values, kind="stable")
    v, w = np.asarray(values)[order], np.asarray(weights)[order]
    cum = np.cumsum(w)
    return float(v[np.searchsorted(cum, cum[-1] / 2)])


def main():
    rng = np.random.default_rng(20121)
    # Training points in three clusters; test points partly near them,
    # partly anywhere on the grid.
    centres = [(52.0, -2.0), (47.0, 8.0), (56.0, 10.0)]
    tlat, tlon = [], []
    for i in range(24):
        c = centres[i % 3]
        tlat.append(round(float(c[0] + 1.2 * rng.normal()), 6))
        tlon.append(round(float(c[1] + 1.8 * rng.normal()), 6))
    plat, plon = [], []
    for i in range(40):
        if i % 2 == 0:
            c = centres[i % 3]
            plat.append(round(float(c[0] + 2.0 * rng.normal()), 6))
            plon.append(round(float(c[1] + 3.0 * rng.normal()), 6))
        else:
            plat.append(round(float(NORTH - H * DEG * rng.uniform(0.02, 0.98)), 6))
            plon.append(round(float(WEST + W * DEG * rng.uniform(0.02, 0.98)), 6))
    tlat, tlon = np.array(tlat), np.array(tlon)
    inside = [(la, lo) for la, lo in zip(plat, plon) if NORTH - H * DEG < la < NORTH and WEST < lo < WEST + W * DEG]

    dist, area, mask = [], [], []
    for r in range(H):
        top = NORTH - r * DEG
        a = cell_area_m2(top - DEG, top, DEG)
        for c in range(W):
            lat, lon = top - DEG / 2, WEST + (c + 0.5) * DEG
            d = nearest(lat, lon, tlat, tlon)
            dist.append(d)
            area.append(a)
            m = 1  # "all"
            if 8 <= r < 28 and 10 <= c < 38:
                m |= 2  # "box"
            if d < 300e3:
                m |= 4  # "near300km"
            mask.append(m)
    dist, area, mask = np.array(dist), np.array(area), np.array(mask)
    # The generated model: a bump centred away from the training clusters'
    # centroid, rounded to 2 decimals (ties between cells and test points).
    model = []
    for r in range(H):
        for c in range(W):
            lat, lon = NORTH - r * DEG - DEG / 2, WEST + (c + 0.5) * DEG
            model.append(round(math.exp(-((lat - 50.0) / 6.0) ** 2 - ((lon - 4.0) / 9.0) ** 2), 2))
    model = np.array(model)

    points = []
    for la, lo in inside:
        r, c = int((NORTH - la) // DEG), int((lo - WEST) // DEG)
        points.append({"lat": la, "lon": lo, "cell": r * W + c, "nearest_train_m": nearest(la, lo, tlat, tlon)})

    extents = []
    for k, name in enumerate(["all", "box", "near300km"]):
        bit = 1 << k
        cells = np.nonzero(mask & bit)[0]
        test = [p for p in points if mask[p["cell"]] & bit]
        y = np.r_[np.zeros(len(cells)), np.ones(len(test))]
        s = np.r_[-dist[cells], [-dist[p["cell"]] for p in test]]
        w = np.r_[area[cells], np.ones(len(test))]
        auc = float(roc_auc_score(y, s, sample_weight=w))
        td = np.array([p["nearest_train_m"] for p in test])
        bg_mean = float(np.sum(area[cells] * dist[cells]) / np.sum(area[cells]))
        bg_median = weighted_median(dist[cells], area[cells])
        # Model minus null from the placements (numpy, written out here).
        def placements(values):
            bg, a = values[cells], area[cells]
            tot = np.sum(a)
            return np.array([(np.sum(a[bg < v]) + np.sum(a[bg == v]) / 2) / tot for v in
                             [values[p["cell"]] for p in test]])
        vm, vn = placements(model), placements(-dist)
        dd = vm - vn
        n = len(dd)
        diff = float(np.mean(dd))
        se = float(math.sqrt(np.sum((dd - diff) ** 2) / (n * (n - 1))))
        sm = np.r_[model[cells], [model[p["cell"]] for p in test]]
        model_auc = float(roc_auc_score(y, sm, sample_weight=w))
        extents.append({
            "model_auc": model_auc,
            "model_minus_null": {"diff": diff, "se": se, "low": diff - student_t975(n - 1) * se,
                                 "high": diff + student_t975(n - 1) * se, "model_auc": float(np.mean(vm)),
                                 "null_auc": float(np.mean(vn))},
            "name": name, "bit": bit, "cells": int(len(cells)), "test_points": len(test), "auc": auc,
            "test_mean_m": float(np.mean(td)), "test_median_m": float(np.median(td)),
            "background_mean_m": bg_mean, "background_median_m": bg_median,
            "ratio_mean": float(np.mean(td)) / bg_mean, "ratio_median": float(np.median(td)) / bg_median,
        })

    out = {
        "source": "pyproj Geod(ellps='WGS84').inv; sklearn.metrics.roc_auc_score(sample_weight); numpy",
        "grid": {"west": WEST, "north": NORTH, "deg": DEG, "width": W, "height": H},
        "train": [{"lat": float(a), "lon": float(b)} for a, b in zip(tlat, tlon)],
        "test": points,
        "distance_m": [float(d) for d in dist],
        "model_value": [float(v) for v in model],
        "mask": [int(m) for m in mask],
        "extents": extents,
    }
    with open(os.path.join(HERE, "golden.json"), "w") as f:
        json.dump(out, f, indent=1, sort_keys=True)
        f.write("\n")


if __name__ == "__main__":
    main()
