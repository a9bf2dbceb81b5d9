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
  * area-weighted AUC (ties count one half), partial ROC ratios with a
    bootstrap of the test points, threshold omission with the one-sided
    binomial test, a continuous Boyce index (Spearman rho of the P/E curve),
    ROC curves on the area axis, rings of the nested chains and a coarse
    preview with extent masks.

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
    ("base", "region", "study region polygon", region, "region"),
    ("region_b50", "region_buffer", "study region + 50 km", dist_region <= 50, "region"),
    ("region_b100", "region_buffer", "study region + 100 km", dist_region <= 100, "region"),
    ("region_b200", "region_buffer", "study region + 200 km", dist_region <= 200, "region"),
    ("points_b25", "point_buffer", "25 km around training points", dist_train <= 25, "points"),
    ("points_b100", "point_buffer", "100 km around training points", dist_train <= 100, "points"),
    ("hull", "hull", "convex hull of training points, buffer 0 km", hull, ""),
    ("ecoregions_min5", "ecoregions", "ecoregions with >= 5 points (field ECO_NAME)",
     np.zeros((H, W), bool), ""),
    ("whole", "raster", "whole raster", np.ones((H, W), bool), ""),
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


def proc_ratio(pv, bv, bw, e):
    x, y = curve(pv, bv, bw)
    k = np.argmax(y >= 1 - e - 1e-12)
    xe = x[k]
    if xe >= 1.0:
        return None
    xs, ys = x[k:], y[k:]
    pauc = float(np.sum((xs[1:] - xs[:-1]) * (ys[1:] + ys[:-1]) / 2))
    null = (1 - xe ** 2) / 2
    return pauc / null


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


def r12(v):
    return round(float(v), 12)


scores, curves, omissions = [], [], []
model_info = []
for name, M in MODELS:
    valid = ~np.isnan(M)
    vmin, vmax = float(np.nanmin(M)), float(np.nanmax(M))
    floor = float(AREA[valid & (M == vmin)].sum() / AREA[valid].sum())
    model_info.append({"name": name, "path": f"models/{name}.tif", "value_min": r12(vmin),
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
        F = auc_pf(pv, bv, bw)
        auc = float(F.mean())
        auc_unw = float(auc_pf(pv, bv, np.ones_like(bw)).mean())
        auc_tr = float(auc_pf(ptr, bv, bw).mean())
        nres = int(math.ceil(FRAC * len(pv)))
        draws = [rng.integers(0, len(pv), size=nres) for _ in range(ITER)]
        boot_auc = np.array([F[d].mean() for d in draws])
        prs = []
        for e in E_LIST:
            full = proc_ratio(pv, bv, bw, e)
            rs = [proc_ratio(pv[d], bv, bw, e) for d in draws]
            ok = np.array([r for r in rs if r is not None])
            prs.append({"e": e, "ratio": r12(full if full is not None else 0),
                        "ratio_mean": r12(ok.mean()), "ratio_sd": r12(ok.std(ddof=1)),
                        "ci_low": r12(np.percentile(ok, 2.5)),
                        "ci_high": r12(np.percentile(ok, 97.5)),
                        "p_value": r12(np.mean(ok <= 1.0)), "iterations": ITER,
                        "iterations_not_formed": ITER - len(ok)})
        ths = []
        for tname, tv in thr_list:
            af = float(bw[bv >= tv].sum() / bw.sum())
            succ = int((pv >= tv).sum())
            ths.append({"name": tname, "value": r12(tv), "omission": r12(1 - succ / len(pv)),
                        "area_fraction": r12(af), "successes": succ, "n": int(len(pv)),
                        "p_binomial": r12(stats.binom.sf(succ - 1, len(pv), af))})
        scores.append({**base, "scored": True, "cells": ext["cells"], "area_km2": ext["area_km2"],
                       "test_points": int(len(pv)), "train_points": int(len(ptr)),
                       "auc": r12(auc), "auc_unweighted": r12(auc_unw), "auc_train": r12(auc_tr),
                       "auc_boot_sd": r12(boot_auc.std(ddof=1)), "partial_roc": prs,
                       "thresholds": ths, "boyce": boyce(pv, bv, bw)})
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
    "schema_version": 2,
    "software": {"name": "areasweep", "version": "0.1.0-test"},
    "seed": 20240611,
    "settings": {"region_buffers_km": [50, 100, 200], "point_buffers_km": [25, 100, 400],
                 "point_buffers_all_points": False, "hull_buffers_km": [0],
                 "ecoregion_min_points": 5, "ecoregion_field": "ECO_NAME", "e": E_LIST,
                 "iterations": ITER, "resample_fraction": FRAC, "fixed_thresholds": FIXED,
                 "thin_per_cell": True, "boyce_window": BOYCE_WINDOW, "boyce_steps": BOYCE_STEPS},
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
