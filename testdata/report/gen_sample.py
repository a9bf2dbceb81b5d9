#!/usr/bin/python3
"""Build testdata/report/sample_results.json: a small but realistic run.

The file is *input* for the tests of package report: it stands in for what
the run command hands to report.Analyze and report.Write. Every number in it
is computed here from synthetic raw cells with numpy/scipy (not by areasweep),
so the ring mix identity, the ROC curves, the bootstrap SDs and the threshold
tests are mutually consistent the way a real run's are:

  * a 120 x 90 geographic grid (0.05 degree cells, 5-11 E, 43.5-48 N),
    cell areas on the sphere R = 6371.0088 km (IUGG mean radius):
        area = R^2 * dlon * (sin(lat_top) - sin(lat_bottom))
  * three models: "good" (close to the truth), "truncated" (floored at 0 over
    a large share of the raster and no data in the far east) and "broad"
    (a weak, smooth model);
  * 72 occurrence records drawn from the truth, split at random 70/30 into
    train/test (so many test points sit next to a training point), plus
    records outside the raster, on no data and thinned;
  * eight usable extents (a study region with three buffers forming the
    chain "region", two point buffers forming the chain "points", the convex
    hull of the training points, the whole raster), one empty and one
    duplicate member;
  * area-weighted AUC (ties count one half) with each test point's placement
    and the placement SE (presence component of DeLong et al. 1988), DeLong's
    full variance of the unweighted AUC, partial ROC ratios (undefined when
    the 1-E crossing falls among tied test points) with the published
    half-size bootstrap of the test points, threshold omission with the one-sided
    binomial test, a continuous Boyce index (Spearman rho of the P/E curve),
    ROC curves on the area axis, rings of the nested chains and a coarse
    preview with extent masks;
  * paired differences: every extent minus the base extent per model, and
    every pair of models per extent, on the common test points: AUCs from
    the placements (Student t 95% interval), the other scores from one set of
    full-size resamples of all test points shared by every comparison
    (2.5-97.5 percentiles).

Deterministic: numpy.random.default_rng(20240611). Run through regen.sh.
"""
import base64
import hashlib
import json
import math
import os
import sys

import numpy as np
from scipy import stats
from scipy.spatial import Delaunay, cKDTree

HERE = os.path.dirname(os.path.abspath(__file__))
sys.dont_write_bytecode = True  # no __pycache__ in testdata/
sys.path.insert(0, os.path.dirname(HERE))  # testdata/, for tquantile
from tquantile import student_t975  # noqa: E402
R_EARTH = 6371.0088  # km, IUGG mean Earth radius
rng = np.random.default_rng(20240611)

# ---------------------------------------------------------------- grid
W, H = 120, 90
WEST, NORTH, D = 5.0, 48.0, 0.05
GT = [WEST, D, 0.0, NORTH, 0.0, -D]
cols = np.arange(W)
rows = np.arange(H)
lon_c = WEST + (cols + 0.5) * D
lat_c = NORTH - (rows + 0.5) * D
LON, LAT = np.meshgrid(lon_c, lat_c)
lat_top = np.radians(NORTH - rows * D)
lat_bot = np.radians(NORTH - (rows + 1) * D)
row_area = R_EARTH ** 2 * math.radians(D) * (np.sin(lat_top) - np.sin(lat_bot))
AREA = np.repeat(row_area[:, None], W, axis=1)

# equirectangular km coordinates for buffers (approximation fine for test data)
KX = LON * 111.32 * math.cos(math.radians(45.75))
KY = LAT * 110.57

# ---------------------------------------------------------------- truth, models
truth = np.exp(-(((LON - 8.0) / 1.1) ** 2 + ((LAT - 46.0) / 0.8) ** 2)) \
    + 0.55 * np.exp(-(((LON - 6.3) / 0.5) ** 2 + ((LAT - 44.6) / 0.45) ** 2))
truth = truth / truth.max()

noise = rng.normal(0, 1, size=(H, W))
# smooth the noise a little (3x3 mean) so models look like models
pad = np.pad(noise, 1, mode="edge")
smooth = sum(pad[i:i + H, j:j + W] for i in range(3) for j in range(3)) / 9.0

good = truth + 0.06 * smooth
good = (good - good.min()) / (good.max() - good.min())
trunc = np.clip((truth + 0.08 * smooth - 0.30) / 0.70, 0, 1)
broad = np.clip(0.35 + 0.45 * np.exp(-((LAT - 45.9) / 1.6) ** 2)
                + 0.25 * np.exp(-((LON - 8.2) / 2.5) ** 2) + 0.08 * smooth, 0, 1)
# a lake: no data in every model
lake = ((LON - 9.6) ** 2 / 0.09 + (LAT - 47.3) ** 2 / 0.04) <= 1.0
good[lake] = np.nan
trunc[lake] = np.nan
broad[lake] = np.nan
# the truncated model was made on a raster clipped in the east
trunc[:, 113:] = np.nan
MODELS = [("good", good), ("truncated", trunc), ("broad", broad)]

# ---------------------------------------------------------------- points
p = np.where(np.isnan(good), 0, truth ** 3).ravel()
p = p / p.sum()
cells = rng.choice(H * W, size=72, replace=False, p=p)
pts = []
for k, c in enumerate(cells):
    r, cc = divmod(int(c), W)
    lon = WEST + (cc + rng.uniform(0.1, 0.9)) * D
    lat = NORTH - (r + rng.uniform(0.1, 0.9)) * D
    pts.append({"lon": round(lon, 5), "lat": round(lat, 5), "row": r, "col": cc})
roles = np.array(["train"] * 50 + ["test"] * 22)
rng.shuffle(roles)
points = []
line = 1
for k, q in enumerate(pts):
    points.append({"id": line, "role": str(roles[k]), "lon": q["lon"], "lat": q["lat"],
                   "row": q["row"], "col": q["col"], "status": "scored", "nearest_train_km": 0.0})
    line += 1
# records that are not scored: outside the raster, on no data, thinned
points.append({"id": line, "role": "train", "lon": 11.7, "lat": 46.2, "row": -1, "col": -1,
               "status": "outside_raster", "nearest_train_km": 0.0})
line += 1
lr, lc = np.argwhere(lake)[0]
points.append({"id": line, "role": "test", "lon": round(float(LON[lr, lc]), 5),
               "lat": round(float(LAT[lr, lc]), 5), "row": int(lr), "col": int(lc),
               "status": "nodata", "nearest_train_km": 0.0})
line += 1
for src in (0, 5):
    q = points[src]
    points.append({"id": line, "role": q["role"], "lon": round(q["lon"] + 0.004, 5),
                   "lat": q["lat"], "row": q["row"], "col": q["col"], "status": "thinned",
                   "nearest_train_km": 0.0})
    line += 1
scored = [q for q in points if q["status"] == "scored"]
train = [q for q in scored if q["role"] == "train"]
test = [q for q in scored if q["role"] == "test"]


def haversine(lon1, lat1, lon2, lat2):
    l1, p1, l2, p2 = map(np.radians, (lon1, lat1, lon2, lat2))
    a = np.sin((p2 - p1) / 2) ** 2 + np.cos(p1) * np.cos(p2) * np.sin((l2 - l1) / 2) ** 2
    return 2 * R_EARTH * np.arcsin(np.sqrt(a))


tlon = np.array([q["lon"] for q in train])
tlat = np.array([q["lat"] for q in train])
for q in scored:
    d = haversine(q["lon"], q["lat"], tlon, tlat)
    if q["role"] == "train":
        d = d[d > 0]
    q["nearest_train_km"] = round(float(d.min()), 6)

# ---------------------------------------------------------------- extents
valid_any = ~np.isnan(good)
region = ((LON - 8.0) / 1.5) ** 2 + ((LAT - 46.0) / 1.0) ** 2 <= 1.0
tree_region = cKDTree(np.column_stack([KX[region], KY[region]]))
dist_region = tree_region.query(np.column_stack([KX.ravel(), KY.ravel()]))[0].reshape(H, W)
tkx = tlon * 111.32 * math.cos(math.radians(45.75))
tky = tlat * 110.57
dist_train = cKDTree(np.column_stack([tkx, tky])).query(
    np.column_stack([KX.ravel(), KY.ravel()]))[0].reshape(H, W)
hull = Delaunay(np.column_stack([tlon, tlat])).find_simplex(
    np.column_stack([LON.ravel(), LAT.ravel()])).reshape(H, W) >= 0

ext_defs = [
    ("base", "base", "study region polygon", region, "region"),
    ("region_b50", "region_buffer", "study region + 50 km", dist_region <= 50, "region"),
    ("region_b100", "region_buffer", "study region + 100 km", dist_region <= 100, "region"),
    ("region_b200", "region_buffer", "study region + 200 km", dist_region <= 200, "region"),
    ("points_b25", "point_buffer", "25 km around training points", dist_train <= 25, "points"),
    ("points_b100", "point_buffer", "100 km around training points", dist_train <= 100, "points"),
    ("hull", "hull", "convex hull of training points, buffer 0 km", hull, ""),
    ("ecoregions_min5", "ecoregions", "ecoregions with >= 5 points (field ECO_NAME)",
     np.zeros((H, W), bool), ""),
    ("whole", "whole_raster", "whole raster", np.ones((H, W), bool), ""),
    ("points_b400", "point_buffer", "400 km around training points", dist_train <= 400, ""),
]
n_valid = int(valid_any.sum())
extents = []
masks = {}
seen = {}
for eid, kind, params, m, chain in ext_defs:
    m = m & valid_any
    key = m.tobytes()
    status, dup = "ok", ""
    if m.sum() == 0:
        status = "empty"
    elif key in seen:
        status, dup = "duplicate", seen[key]
    else:
        seen[key] = eid
    masks[eid] = m
    inside = lambda q: m[q["row"], q["col"]]
    extents.append({
        "id": eid, "kind": kind, "params": params, "cells": int(m.sum()),
        "area_km2": round(float(AREA[m].sum()), 6),
        "train_points": sum(1 for q in train if inside(q)),
        "test_points": sum(1 for q in test if inside(q)),
        "share_of_raster": round(float(m.sum()) / n_valid, 6),
        "status": status, **({"duplicate_of": dup} if dup else {}),
        **({"chain": chain} if chain and status == "ok" else {}),
    })

# ---------------------------------------------------------------- metrics
E_LIST = [0.05, 0.1]
ITER = 200
FRAC = 0.5
FIXED = [0.5]
BOYCE_WINDOW = 0.1
BOYCE_STEPS = 20


def auc_pf(pv, bv, bw):
    """Per-presence credit F(p) = (W(bg < p) + W(bg == p)/2) / W(bg)."""
    order = np.argsort(bv, kind="mergesort")
    v = bv[order]
    cw = np.concatenate([[0.0], np.cumsum(bw[order])])
    lo = np.searchsorted(v, pv, side="left")
    hi = np.searchsorted(v, pv, side="right")
    return (cw[lo] + 0.5 * (cw[hi] - cw[lo])) / cw[-1]


def curve(pv, bv, bw):
    """ROC vertices on the area axis at every distinct presence value."""
    ts = np.unique(pv)[::-1]
    tot = bw.sum()
    xs = [0.0] + [float(bw[bv >= t].sum() / tot) for t in ts] + [1.0]
    ys = [0.0] + [float((pv >= t).mean()) for t in ts] + [1.0]
    return np.array(xs), np.array(ys)


def proc_full(pv, bv, bw, e, orig=None):
    """Partial ROC ratio with the tie rule: (ratio or None, x_E, tied, reason).

    The exact curve on the area axis has, for each distinct presence value u
    (descending), the vertices A = (x(>u), y(>u)) and B = (x(>=u), y(>=u)).
    The crossing of y = 1-E is interpolated along the A->B segment that
    reaches it; when two or more distinct original presences share u and
    the crossing is strictly inside that segment, the ratio is undefined.
    """
    orig = pv if orig is None else orig
    n = len(pv)
    tot = bw.sum()
    tau = (1 - e) * n
    if abs(tau - round(tau)) <= 1e-9 * max(1, tau):
        tau = round(tau)
    verts = []
    ya = 0
    cross = None
    for t in np.unique(pv)[::-1]:
        c = int((pv == t).sum())
        yb = ya + c
        xa = float(bw[bv > t].sum() / tot)
        xb = float(bw[bv >= t].sum() / tot)
        if cross is None and yb >= tau:
            s_ = (tau - ya) / c
            xe = xb if s_ >= 1 else xa + s_ * (xb - xa)
            tied = int((orig == t).sum())
            cross = (xe, s_, tied)
            verts = [(xe, tau / n), (xb, yb / n)]
        elif cross is not None:
            verts += [(xa, ya / n), (xb, yb / n)]
        ya = yb
    xe, s_, tied = cross
    if xe >= 1.0:
        return None, xe, 0, "null"
    if 0 < s_ < 1 and tied >= 2:
        return None, xe, tied, "tie"
    verts.append((1.0, 1.0))
    pauc = sum((verts[i + 1][0] - verts[i][0]) * (verts[i + 1][1] + verts[i][1]) / 2 for i in range(len(verts) - 1))
    return pauc / ((1 - xe ** 2) / 2), xe, 0, ""


def proc_ratio(pv, bv, bw, e, orig=None):
    r, _, _, _ = proc_full(pv, bv, bw, e, orig)
    return r


def full_curve(pv, bv, bw):
    """ROC vertices on the area axis at every distinct cell value (drawing)."""
    ts = np.unique(np.concatenate([bv, pv]))[::-1]
    order = np.argsort(-bv, kind="mergesort")
    v, cw = bv[order], np.cumsum(bw[order]) / bw.sum()
    k = np.searchsorted(-v, -ts, side="right")  # cells with value >= t
    xs = np.where(k > 0, cw[np.maximum(k - 1, 0)], 0.0)
    ys = np.array([(pv >= t).mean() for t in ts])
    return np.concatenate([[0.0], xs, [1.0]]), np.concatenate([[0.0], ys, [1.0]])


def thin(x, y, n=300):
    """Keep at most n vertices, evenly by index, always the first and last."""
    if len(x) <= n:
        return x, y
    idx = np.unique(np.linspace(0, len(x) - 1, n).round().astype(int))
    return x[idx], y[idx]


def boyce(pv, bv, bw):
    lo, hi = float(bv.min()), float(bv.max())
    w = BOYCE_WINDOW * (hi - lo)
    mids = np.linspace(lo + w / 2, hi - w / 2, BOYCE_STEPS)
    mid_used, ratio = [], []
    for c in mids:
        inw = (bv >= c - w / 2) & (bv <= c + w / 2)
        ex = bw[inw].sum() / bw.sum()
        if ex <= 0:
            continue
        pr = np.mean((pv >= c - w / 2) & (pv <= c + w / 2))
        mid_used.append(float(c))
        ratio.append(float(pr / ex))
    if len(ratio) < 3:
        return None
    rho = stats.spearmanr(mid_used, ratio)[0]
    if not np.isfinite(rho):
        return None
    return {"index": round(float(rho), 12), "windows": BOYCE_STEPS, "windows_used": len(ratio),
            "window_mid": [round(v, 9) for v in mid_used], "pe_ratio": [round(v, 9) for v in ratio]}


def MKEY(name):
    return "omission_" + name + ("_%g" % FIXED[0] if name == "fixed" else "")


def r12(v):
    return round(float(v), 12)


PAIRED_B = 100
TOL = {"auc": 0.02, "partial_roc": 0.05, "omission": 0.05, "boyce": 0.1}
# One set of full-size resamples of all test points, shared by every
# comparison: counts[b, g] = times test point g is drawn in resample b.
prng = np.random.default_rng(777)
COUNTS = np.array([np.bincount(prng.integers(0, len(test), size=len(test)), minlength=len(test))
                   for _ in range(PAIRED_B)])
EV = {}


def delong_var(Fu, pv, bv):
    """DeLong et al. (1988) variance of the unweighted AUC, cells a sample."""
    m, N = len(pv), len(bv)
    theta = Fu.mean()
    v01 = np.array([((pv > y).sum() + 0.5 * (pv == y).sum()) / m for y in bv])
    return float(((Fu - theta) ** 2).sum() / (m - 1) / m + ((v01 - theta) ** 2).sum() / (N - 1) / N)


def discrete(pv, bv, bw, e):
    """Reading at thresholds only for a tie crossing: x_E at the tied value."""
    n = len(pv)
    tau = (1 - e) * n
    for t in np.unique(pv)[::-1]:
        if (pv >= t).sum() >= tau:
            xe = float(bw[bv >= t].sum() / bw.sum())
            if xe >= 1:
                return False, xe, 0.0
            x, y = full_curve(pv, bv, bw)
            keep = x >= xe
            xs, ys = x[keep], y[keep]
            pauc = float(np.sum((xs[1:] - xs[:-1]) * (ys[1:] + ys[:-1]) / 2))
            return True, xe, pauc / ((1 - xe ** 2) / 2)
    return False, 1.0, 0.0


scores, curves, omissions = [], [], []
model_info = []
for name, M in MODELS:
    valid = ~np.isnan(M)
    vmin, vmax = float(np.nanmin(M)), float(np.nanmax(M))
    floor = float(AREA[valid & (M == vmin)].sum() / AREA[valid].sum())
    model_info.append({"name": name, "path": f"models/{name}.tif", "role": "model", "value_min": r12(vmin),
                       "value_max": r12(vmax), "floor_share": r12(floor)})
    trv = np.array([M[q["row"], q["col"]] for q in train])
    tev = np.array([M[q["row"], q["col"]] for q in test])
    mtp = float(np.min(trv))
    p10 = float(np.sort(trv)[int(math.floor(0.1 * len(trv)))])
    thr_list = [("minimum_training_presence", mtp), ("p10_training_presence", p10)] + \
        [("fixed", f) for f in FIXED]
    for tname, tv in thr_list:
        omissions.append({"model": name, "threshold": tname, "value": r12(tv),
                          "omitted_point_ids": [q["id"] for q, v in zip(test, tev) if v < tv]})
    for ext in extents:
        eid = ext["id"]
        base = {"model": name, "extent": eid}
        if ext["status"] != "ok":
            reason = "empty extent" if ext["status"] == "empty" else \
                f"duplicate of {ext['duplicate_of']}"
            scores.append({**base, "scored": False, "not_scored": reason, "cells": ext["cells"],
                           "area_km2": ext["area_km2"], "test_points": 0, "train_points": 0,
                           "auc": 0, "auc_unweighted": 0, "auc_train": 0, "auc_boot_sd": 0,
                           "partial_roc": None, "thresholds": None, "boyce": None})
            continue
        m = masks[eid]
        nod = float((m & ~valid).sum()) / float(m.sum())
        if nod > 0.05:
            scores.append({**base, "scored": False,
                           "not_scored": f"model has no data on {100 * nod:.1f}% of the extent's cells (at most 5% allowed)",
                           "cells": ext["cells"], "area_km2": ext["area_km2"], "test_points": 0,
                           "train_points": 0, "auc": 0, "auc_unweighted": 0, "auc_train": 0,
                           "auc_boot_sd": 0, "partial_roc": None, "thresholds": None, "boyce": None})
            continue
        mm = m & valid
        bv, bw = M[mm], AREA[mm]
        ins_te = np.array([m[q["row"], q["col"]] for q in test])
        ins_tr = np.array([m[q["row"], q["col"]] for q in train])
        pv, ptr = tev[ins_te], trv[ins_tr]
        gi = np.where(ins_te)[0]
        F = auc_pf(pv, bv, bw)
        Fu = auc_pf(pv, bv, np.ones_like(bw))
        auc = float(F.mean())
        auc_unw = float(Fu.mean())
        auc_se = float(np.sqrt(((F - auc) ** 2).sum() / (len(F) * (len(F) - 1))))
        own = COUNTS[:, gi]
        used = own.sum(axis=1) > 0
        paired_auc = (own[used] * F).sum(axis=1) / own[used].sum(axis=1)
        auc_tr = float(auc_pf(ptr, bv, bw).mean())
        # each resample's size, as metrics.ResampleSize: max(1, round(f n)),
        # halves rounded away from zero
        nres = max(1, int(math.floor(FRAC * len(pv) + 0.5)))
        draws = [rng.integers(0, len(pv), size=nres) for _ in range(ITER)]
        prs = []
        for e in E_LIST:
            full, xe, tied, why = proc_full(pv, bv, bw, e)
            rs = [proc_ratio(pv[d], bv, bw, e, orig=pv) for d in draws]
            ok = np.array([r for r in rs if r is not None])
            rec = {"e": e, "defined": full is not None, "x_e": r12(xe), "tied_at_crossing": tied,
                   "discrete_defined": False, "discrete_x_e": 0, "discrete_ratio": 0,
                   "ratio": r12(full if full is not None else 0),
                   "ratio_mean": 0, "ratio_sd": 0, "ci_low": 0, "ci_high": 0, "p_value": 0,
                   "iterations": ITER, "iterations_not_formed": ITER - len(ok), "resample_size": nres}
            if why:
                rec["undefined_reason"] = {"tie": "the 1 - E crossing falls among test points tied at one value",
                                           "null": "the curve reaches 1 - E only at x = 1"}[why]
            if why == "tie":
                d_ok, d_xe, d_r = discrete(pv, bv, bw, e)
                rec.update(discrete_defined=d_ok, discrete_x_e=r12(d_xe), discrete_ratio=r12(d_r))
            if len(ok):
                rec.update(ratio_mean=r12(ok.mean()), ratio_sd=r12(ok.std(ddof=1)) if len(ok) > 1 else 0,
                           ci_low=r12(np.percentile(ok, 2.5)), ci_high=r12(np.percentile(ok, 97.5)),
                           p_value=r12(np.mean(ok <= 1.0)))
            prs.append(rec)
        ths = []
        for tname, tv in thr_list:
            af = float(bw[bv >= tv].sum() / bw.sum())
            succ = int((pv >= tv).sum())
            ths.append({"name": tname, "value": r12(tv), "omission": r12(1 - succ / len(pv)),
                        "area_fraction": r12(af), "successes": succ, "n": int(len(pv)),
                        "p_binomial": r12(stats.binom.sf(succ - 1, len(pv), af))})
        scores.append({**base, "scored": True, "cells": ext["cells"], "area_km2": ext["area_km2"],
                       "test_points": int(len(pv)), "train_points": int(len(ptr)),
                       "test_points_outside": 0, "train_points_outside": 0,
                       "auc": r12(auc), "auc_unweighted": r12(auc_unw), "auc_train": r12(auc_tr),
                       "auc_se": r12(auc_se), "auc_unweighted_se_delong": r12(math.sqrt(delong_var(Fu, pv, bv))),
                       "auc_boot_sd": r12(paired_auc.std(ddof=1)),
                       "test_point_ids": [test[g]["id"] for g in gi],
                       "placements": [r12(v) for v in F], "placements_unweighted": [r12(v) for v in Fu],
                       "partial_roc": prs, "thresholds": ths, "boyce": boyce(pv, bv, bw)})
        EV[(name, eid)] = {"pv": pv, "bv": bv, "bw": bw, "gi": list(gi), "F": F, "Fu": Fu,
                           "thr": [(MKEY(t), tv) for t, tv in thr_list]}
        cx, cy = thin(*full_curve(pv, bv, bw))
        curves.append({"model": name, "extent": eid, "x": [round(v, 9) for v in cx],
                       "y": [round(v, 9) for v in cy]})

# ---------------------------------------------------------------- rings
# AUCInner and AUCRing use the test points of the OUTER member, so that
#     AUCOuter = (A_in * AUCInner + A_ring * AUCRing) / (A_in + A_ring)
# holds exactly; AUCOuter is computed directly from the outer cells.
rings = []
for chain in ("region", "points"):
    members = [e["id"] for e in extents if e.get("chain") == chain]
    for name, M in MODELS:
        valid = ~np.isnan(M)
        tev = np.array([M[q["row"], q["col"]] for q in test])
        chain_rings = []
        scored_here = {sc["extent"] for sc in scores if sc["model"] == name and sc["scored"]}
        members_m = [e for e in members if e in scored_here]
        for a, b in zip(members_m, members_m[1:]):
            mi, mo = masks[a] & valid, masks[b] & valid
            mr = mo & ~mi
            pres = tev[np.array([masks[b][q["row"], q["col"]] for q in test])]
            ai, ar = float(AREA[mi].sum()), float(AREA[mr].sum())
            chain_rings.append({
                "chain": chain, "model": name, "inner": a, "outer": b,
                "inner_area_km2": ai, "ring_area_km2": ar, "ring_cells": int(mr.sum()),
                "auc_inner": float(auc_pf(pres, M[mi], AREA[mi]).mean()),
                "auc_ring": float(auc_pf(pres, M[mr], AREA[mr]).mean()),
                "auc_outer": float(auc_pf(pres, M[mo], AREA[mo]).mean()),
            })
        tot = chain_rings[-1]["auc_outer"] - chain_rings[0]["auc_inner"]
        for rg in chain_rings:
            rg["share_of_change"] = (rg["auc_outer"] - rg["auc_inner"]) / tot
        rings.extend(chain_rings)

# ---------------------------------------------------------------- paired
def evaluate(ev, cnt):
    """Scores of the multiset with cnt[k] copies of own test point k."""
    r = int(cnt.sum())
    if r == 0:
        return None
    mult = np.repeat(ev["pv"], cnt)
    out = {}
    for e in E_LIST:
        out["partial_roc_e%g" % e] = proc_ratio(mult, ev["bv"], ev["bw"], e, orig=ev["pv"])
    for key, tv in ev["thr"]:
        out[key] = float((cnt * (ev["pv"] < tv)).sum() / r)
    b = boyce(mult, ev["bv"], ev["bw"])
    out["boyce"] = b["index"] if b is not None else None
    return out


def compare(kind, ma, ea, mb, eb):
    A, B = EV[(ma, ea)], EV[(mb, eb)]
    common = sorted(set(A["gi"]) & set(B["gi"]))
    pa = [A["gi"].index(g) for g in common]
    pb = [B["gi"].index(g) for g in common]
    head = {"kind": kind, "model": ma, "extent": ea, "other_model": mb, "other_extent": eb,
            "common_points": len(common)}
    recs = []
    for key, fa, fb in (("auc", A["F"], B["F"]), ("auc_unweighted", A["Fu"], B["Fu"])):
        d = fa[pa] - fb[pb]
        n = len(d)
        # se, ci_low and ci_high only where defined (schema version 6).
        rec = {"metric": key, **head, "method": "placements", "defined": n >= 2, "a": 0, "b": 0,
               "diff": 0, "resamples": 0, "resamples_not_formed": 0, "test_set_shift": 0}
        if n >= 2:
            m = float(d.mean())
            se = float(np.sqrt(((d - m) ** 2).sum() / (n * (n - 1))))
            rec.update(a=r12(fa[pa].mean()), b=r12(fb[pb].mean()), diff=r12(m), se=r12(se),
                       ci_low=r12(m - student_t975(n - 1) * se), ci_high=r12(m + student_t975(n - 1) * se),
                       test_set_shift=r12((fa.mean() - fb.mean()) - m))
        recs.append(rec)
    ca, cb = np.zeros(len(A["gi"]), int), np.zeros(len(B["gi"]), int)
    ca[pa], cb[pb] = 1, 1
    va, vb = evaluate(A, ca), evaluate(B, cb)
    oa, ob = evaluate(A, np.ones(len(A["gi"]), int)), evaluate(B, np.ones(len(B["gi"]), int))
    diffs = {k: [] for k in va}
    for b in range(PAIRED_B):
        cnt = COUNTS[b, common]
        ca[pa], cb[pb] = cnt, cnt
        ra, rb = evaluate(A, ca), evaluate(B, cb)
        if ra is None:
            continue
        for k in diffs:
            if ra[k] is not None and rb[k] is not None:
                diffs[k].append(ra[k] - rb[k])
    for k in va:
        ds = np.array(diffs[k])
        if k == "boyce" or (kind == "extent" and k.startswith("partial_roc_e")):
            # Described, not judged: the two scores on the common points
            # and their difference, no interval (method point_difference).
            ok = va[k] is not None and vb[k] is not None
            rec = {"metric": k, **head, "method": "point_difference", "defined": ok, "a": 0, "b": 0,
                   "diff": 0, "resamples": 0, "resamples_not_formed": 0, "test_set_shift": 0}
            if ok:
                diff = va[k] - vb[k]
                rec.update(a=r12(va[k]), b=r12(vb[k]), diff=r12(diff))
                if oa[k] is not None and ob[k] is not None:
                    rec["test_set_shift"] = r12((oa[k] - ob[k]) - diff)
            recs.append(rec)
            continue
        ok = va[k] is not None and vb[k] is not None and len(ds) >= 2
        rec = {"metric": k, **head, "method": "paired_resamples", "defined": ok, "a": 0, "b": 0,
               "diff": 0, "resamples": PAIRED_B,
               "resamples_not_formed": PAIRED_B - len(ds), "test_set_shift": 0}
        if ok:
            diff = va[k] - vb[k]
            rec.update(a=r12(va[k]), b=r12(vb[k]), diff=r12(diff), se=r12(ds.std(ddof=1)),
                       ci_low=r12(np.percentile(ds, 2.5)), ci_high=r12(np.percentile(ds, 97.5)))
            if oa[k] is not None and ob[k] is not None:
                rec["test_set_shift"] = r12((oa[k] - ob[k]) - diff)
        recs.append(rec)
    return recs


paired = []
ok_ids = [e["id"] for e in extents if e["status"] == "ok" and any((n, e["id"]) in EV for n, _ in MODELS)]
BASE = "base" if "base" in ok_ids else ok_ids[0]
for name, _ in MODELS:
    if (name, BASE) not in EV:
        continue
    for eid in ok_ids:
        if eid != BASE and (name, eid) in EV:
            paired += compare("extent", name, eid, name, BASE)
for eid in ok_ids:
    for i, (ma, _) in enumerate(MODELS):
        for mb, _ in MODELS[i + 1:]:
            if (ma, eid) in EV and (mb, eid) in EV:
                paired += compare("model", ma, eid, mb, eid)

# ---------------------------------------------------------------- preview
PW, PH = W // 2, H // 2
g = good[0::2, 0::2]
pmin, pmax = float(np.nanmin(g)), float(np.nanmax(g))
vals = np.where(np.isnan(g), 255, np.round((g - pmin) / (pmax - pmin) * 254)).astype(np.uint8)
pmasks = []
for ext in extents:
    bits = masks[ext["id"]][0::2, 0::2].ravel().astype(np.uint8)
    pmasks.append(base64.b64encode(np.packbits(bits, bitorder="little").tobytes()).decode())
preview = {"width": PW, "height": PH, "bounds": [WEST, NORTH - H * D, WEST + W * D, NORTH],
           "value_min": r12(pmin), "value_max": r12(pmax),
           "values": base64.b64encode(vals.tobytes()).decode(), "masks": pmasks}


def sha(s):
    return hashlib.sha256(s.encode()).hexdigest()


counts = {"train": len(train), "test": len(test),
          "thinned": sum(q["status"] == "thinned" for q in points),
          "outside_raster": sum(q["status"] == "outside_raster" for q in points),
          "nodata": sum(q["status"] == "nodata" for q in points)}

results = {
    "schema_version": 6,
    "software": {"name": "areasweep", "version": "0.1.0-test"},
    "seed": 20240611,
    "settings": {"region_buffers_km": [50, 100, 200], "point_buffers_km": [25, 100, 400],
                 "point_buffers_all_points": False, "hull_buffers_km": [0],
                 "ecoregion_min_points": 5, "ecoregion_field": "ECO_NAME", "ecoregion_clip": False,
                 "occurrences_crs": "", "extra_extents": None, "e": E_LIST,
                 "iterations": ITER, "resample_fraction": FRAC, "fixed_thresholds": FIXED,
                 "thin_per_cell": True, "boyce_window": BOYCE_WINDOW, "boyce_steps": BOYCE_STEPS,
                 "distance_null": False, "paired_resamples": PAIRED_B, "tolerance_auc": TOL["auc"],
                 "tolerance_partial_roc": TOL["partial_roc"], "tolerance_omission": TOL["omission"],
                 "tolerance_boyce": TOL["boyce"]},
    "inputs": [{"role": f"model:{n}", "path": f"models/{n}.tif", "sha256": sha(n)} for n, _ in MODELS]
    + [{"role": "occurrences", "path": "occurrences.csv", "sha256": sha("occurrences")},
       {"role": "region", "path": "region.gpkg", "sha256": sha("region")},
       {"role": "ecoregions", "path": "ecoregions.gpkg", "sha256": sha("ecoregions")}],
    "grid": {"width": W, "height": H, "geotransform": GT, "crs": "EPSG:4326", "geographic": True,
             "cell_area_method": "spherical cell area, R = 6371.0088 km"},
    "models": model_info,
    "points": points,
    "point_counts": counts,
    "extents": extents,
    "scores": scores,
    "rings": rings,
    "omissions": omissions,
    "curves": curves,
    "paired": paired,
    "preview": preview,
    "warnings": ["2 occurrence records share a model cell with an earlier record and were thinned",
                 "1 occurrence record lies outside the model raster",
                 "1 occurrence record lies on no data in a model"],
}

out = os.path.join(HERE, "sample_results.json")
with open(out, "w") as f:
    json.dump(results, f, indent=2, allow_nan=False)
    f.write("\n")
print(f"wrote {out}", file=sys.stderr)
