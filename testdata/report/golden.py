#!/usr/bin/python3
"""Golden values for package report's sensitivity analysis.

Reads sample_results.json and recomputes, independently of the Go code and
with numpy/scipy only, every number report.Analyze derives:

  * per metric and model: n, min, max, range, mean, sample SD (numpy ddof=1);
  * per metric and model, the equivalence verdict from the paired
    differences from the base extent (results "paired"; exact differences
    for the predicted area) against the tolerances in the settings: every
    95% interval inside -T..+T -> robust, one wholly outside ->
    extent-sensitive, otherwise undetermined (a difference on fewer common
    test points than 10 from the placements or 30 from the paired
    resamples, 10 for an omission rate between extents, is "too_few", not
    judged); and per metric the summary;
  * per metric and pair of models, the extents where one is better beyond
    noise (95% interval excluding 0);
  * the two-way sum-of-squares split of each metric over the models x
    extents table (numpy), the model ranks per extent with
    scipy.stats.rankdata (method "average", rank 1 = best) and Kendall's W
    with the tie correction, written out explicitly in kendall_w_ties()
    (Legendre 2005, J. Agric. Biol. Environ. Stat. 10:226, eq. 2);
  * the chain steps and shares along each nested chain, the mix residual,
    and the slope of AUC against log2(area) along the chain
    (scipy.stats.linregress);
  * the truncation checks, the test-to-training distance quartiles
    (numpy.percentile, linear) and the share within 3 cell widths;
  * the omitted test points per model and threshold.

The selection rules (status "ok", scored, metric present) restate the
documented contract of report.Analyze. Writes golden.json beside this file.
"""
import json
import math
import os

import numpy as np
from scipy import stats

HERE = os.path.dirname(os.path.abspath(__file__))
R = json.load(open(os.path.join(HERE, "sample_results.json")))

ok_ext = [e for e in R["extents"] if e["status"] == "ok"]
models = [m["name"] for m in R["models"]]
score = {(s["model"], s["extent"]): s for s in R["scores"]}
ITER = R["settings"]["iterations"]


def usable(model, eid):
    s = score.get((model, eid))
    return s if s is not None and s["scored"] else None


# ------------------------------------------------------------ metric catalogue
metrics = [("auc", "auc", None), ("auc_unweighted", "auc_unweighted", None)]
for e in R["settings"]["e"]:
    metrics.append(("partial_roc_e%g" % e, "partial_roc", e))
seen = []
for s in R["scores"]:
    if not s["scored"]:
        continue
    for t in s["thresholds"]:
        key = "omission_" + t["name"] + ("_%g" % t["value"] if t["name"] == "fixed" else "")
        if key not in [k for k, _, _ in seen]:
            seen.append((key, "omission", (t["name"], t["value"])))
metrics += seen
metrics.append(("area_fraction_mtp", "area_fraction", ("minimum_training_presence", None)))
metrics.append(("boyce", "boyce", None))
HIGHER = {"auc": True, "auc_unweighted": True, "partial_roc": True, "omission": False,
          "area_fraction": False, "boyce": True}


def value(kind, arg, s):
    """(value, boot_sd or None) or None when the score lacks the metric."""
    if kind == "auc":
        return s["auc"], None
    if kind == "auc_unweighted":
        return s["auc_unweighted"], None
    if kind == "partial_roc":
        for p in s["partial_roc"]:
            if abs(p["e"] - arg) <= 1e-12:
                if not p["defined"]:
                    return None
                good = p["iterations"] - p["iterations_not_formed"] >= 2
                return p["ratio"], (p["ratio_sd"] if good else None)
        return None
    if kind in ("omission", "area_fraction"):
        name, v = arg
        for t in s["thresholds"]:
            if t["name"] != name or (name == "fixed" and abs(t["value"] - v) > 1e-12):
                continue
            if kind == "area_fraction":
                return t["area_fraction"], None
            if t["n"] <= 0:
                return None
            return t["omission"], None
        return None
    if kind == "boyce":
        return (s["boyce"]["index"], None) if s["boyce"] is not None else None


out = {"source": "testdata/report/golden.py (numpy + scipy, Debian python3-scipy)",
       "spreads": [], "model_verdicts": [], "verdicts": [], "rankings": [],
       "decompositions": [], "chains": [], "truncation": [], "omitted": []}
ST = R["settings"]
TOL = {"auc": ST["tolerance_auc"], "auc_unweighted": ST["tolerance_auc"],
       "partial_roc": ST["tolerance_partial_roc"], "omission": ST["tolerance_omission"],
       "area_fraction": ST["tolerance_omission"], "boyce": ST["tolerance_boyce"]}
ok_ids = [e["id"] for e in ok_ext if any(usable(m, e["id"]) for m in models)]
BASE = "base" if "base" in ok_ids else ok_ids[0]
out["base_extent"] = BASE
out["test_points"] = [next(e["test_points"] for e in ok_ext if e["id"] == i) for i in ok_ids]
PAIRED = {(p["metric"], p["kind"], p["model"], p["extent"], p["other_model"], p["other_extent"]): p
          for p in R["paired"]}


def position(lo, hi, tol):
    if lo >= -tol and hi <= tol:
        return "inside"
    if lo > tol or hi < -tol:
        return "outside"
    return "overlapping"


def difference(key, kind_metric, arg, kind, ma, ea, mb, eb):
    """(defined, diff, low, high, position) of one paired difference."""
    tol = TOL[kind_metric]
    if kind_metric == "area_fraction":
        a, b = usable(ma, ea), usable(mb, eb)
        va, vb = value(kind_metric, arg, a), value(kind_metric, arg, b)
        if va is None or vb is None:
            return None
        d = va[0] - vb[0]
        return d, d, d, position(d, d, tol)
    p = PAIRED.get((key, kind, ma, ea, mb, eb))
    if p is None or not p["defined"]:
        return None
    # Not judged on too few common test points (README, our cut-offs): 10
    # for a difference from the placements, 30 for one from the paired
    # resamples (partial ROC ratio, omission, Boyce index), except 10 for
    # an omission rate between two extents of one model (0 in every
    # resample: the model's thresholds do not depend on the extent).
    # A point_difference (the Boyce index's, the partial ROC ratio's
    # between extents) keeps the cut-off of the resamples it stands for.
    resampled = p["method"] in ("paired_resamples", "point_difference") and not (kind == "extent" and kind_metric == "omission")
    lo, hi = p.get("ci_low"), p.get("ci_high")
    if p["common_points"] < (30 if resampled else 10):
        return p["diff"], lo, hi, "too_few"
    if p["method"] == "point_difference":
        # Reported, never judged, and without an interval: the Boyce
        # index's paired percentile intervals, and the partial ROC
        # ratio's between extents, fall short of their coverage
        # (areasweep's own simulation check, metrics/coverage_test.go;
        # our rule).
        return p["diff"], lo, hi, "not_calibrated"
    return p["diff"], lo, hi, position(lo, hi, tol)

# ------------------------------------------------------------ spreads, slopes
for key, kind, arg in metrics:
    for m in models:
        ids, areas, vals, boots = [], [], [], []
        for e in ok_ext:
            s = usable(m, e["id"])
            if s is None:
                continue
            got = value(kind, arg, s)
            if got is None:
                continue
            ids.append(e["id"])
            areas.append(e["area_km2"])
            vals.append(got[0])
            if got[1] is not None:
                boots.append(got[1])
        v = np.array(vals)
        rec = {"metric": key, "model": m, "n": len(v), "extents": ids}
        if len(v):
            rec.update(min=float(v.min()), max=float(v.max()), range=float(v.max() - v.min()),
                       mean=float(v.mean()), min_extent=ids[int(np.argmin(v))],
                       max_extent=ids[int(np.argmax(v))])
        rec["sd_defined"] = len(v) >= 2
        rec["sd"] = float(np.std(v, ddof=1)) if len(v) >= 2 else 0.0
        out["spreads"].append(rec)

# ------------------------------------------------------------ verdicts
for key, kind, arg in metrics:
    summary = {"metric": key, "sensitive": [], "robust": [], "undetermined": []}
    for m in models:
        rec = {"metric": key, "model": m, "diffs": [], "verdict": "undetermined", "largest": -1}
        if usable(m, BASE) is not None:
            for e in ok_ext:
                if e["id"] == BASE or usable(m, e["id"]) is None:
                    continue
                d = difference(key, kind, arg, "extent", m, e["id"], m, BASE)
                rec["diffs"].append({"extent": e["id"], "defined": d is not None,
                                     **({"diff": d[0], "low": d[1], "high": d[2], "position": d[3]} if d else {})})
            defined = [x for x in rec["diffs"] if x["defined"]]
            if defined:
                big = max(range(len(rec["diffs"])), key=lambda i: abs(rec["diffs"][i]["diff"]) if rec["diffs"][i]["defined"] else -1)
                rec["largest"] = big
                if any(x["position"] == "outside" for x in defined):
                    rec["verdict"] = "extent-sensitive"
                    if rec["diffs"][big]["position"] == "too_few":
                        # The verdict names the largest judged difference.
                        rec["largest"] = max((i for i, x in enumerate(rec["diffs"]) if x["defined"] and x["position"] != "too_few"),
                                             key=lambda i: abs(rec["diffs"][i]["diff"]))
                elif len(defined) == len(rec["diffs"]) and all(x["position"] == "inside" for x in defined):
                    rec["verdict"] = "robust"
        out["model_verdicts"].append(rec)
        summary[{"extent-sensitive": "sensitive", "robust": "robust", "undetermined": "undetermined"}[rec["verdict"]]].append(m)
    summary["verdict"] = "extent-sensitive" if summary["sensitive"] else (
        "robust" if summary["robust"] and not summary["undetermined"] else "undetermined")
    out["verdicts"].append(summary)

# ------------------------------------------------------------ model rankings
for key, kind, arg in metrics:
    if kind in ("area_fraction", "boyce"):  # no sampling error / not judged
        continue
    for i, ma in enumerate(models):
        for mb in models[i + 1:]:
            rec = {"metric": key, "model": ma, "other": mb, "extents": 0, "better": 0, "worse": 0, "within_noise": 0}
            for e in ok_ext:
                if usable(ma, e["id"]) is None or usable(mb, e["id"]) is None:
                    continue
                d = difference(key, kind, arg, "model", ma, e["id"], mb, e["id"])
                if d is None or d[3] == "too_few":
                    continue
                rec["extents"] += 1
                up, down = d[1] > 0, d[2] < 0
                if not HIGHER[kind]:
                    up, down = down, up
                rec["better" if up else "worse" if down else "within_noise"] += 1
            out["rankings"].append(rec)


# ------------------------------------------------------------ decomposition
def kendall_w_ties(rank_rows):
    """Kendall's W with tie correction; rank_rows[j] = ranks by judge j.

    W = 12 S / (m^2 (n^3 - n) - m sum_j T_j), S = sum_i (R_i - mean R)^2,
    T_j = sum over tie groups of judge j of (t^3 - t).
    """
    rk = np.array(rank_rows, dtype=float)
    m, n = rk.shape
    Ri = rk.sum(axis=0)
    S = float(((Ri - Ri.mean()) ** 2).sum())
    T = 0.0
    for row in rk:
        _, counts = np.unique(row, return_counts=True)
        T += float((counts ** 3 - counts).sum())
    return 12 * S / (m ** 2 * (n ** 3 - n) - m * T)


for key, kind, arg in metrics:
    cols, ids = [], []
    for e in ok_ext:
        col = []
        for m in models:
            s = usable(m, e["id"])
            got = value(kind, arg, s) if s is not None else None
            if got is None:
                break
            col.append(got[0])
        if len(col) == len(models):
            cols.append(col)
            ids.append(e["id"])
    X = np.array(cols).T  # models x extents
    gm = X.mean()
    sst = float(((X - gm) ** 2).sum())
    sse = float(X.shape[0] * ((X.mean(axis=0) - gm) ** 2).sum())
    ssm = float(X.shape[1] * ((X.mean(axis=1) - gm) ** 2).sum())
    ssr = float(((X - X.mean(axis=1, keepdims=True) - X.mean(axis=0, keepdims=True) + gm) ** 2).sum())
    sign = -1.0 if HIGHER[kind] else 1.0
    ranks = [list(stats.rankdata(sign * np.array(c), method="average")) for c in cols]
    base = ids.index("base") if "base" in ids else 0
    differs = [ids[j] for j in range(len(ids)) if ranks[j] != ranks[base]]
    W = kendall_w_ties(ranks)
    out["decompositions"].append({
        "metric": key, "extents": ids, "grand_mean": float(gm), "ss_total": sst, "ss_extent": sse,
        "ss_model": ssm, "ss_residual": ssr, "share_extent": sse / sst, "share_model": ssm / sst,
        "share_residual": ssr / sst, "ranks": [[float(v) for v in r] for r in ranks],
        "base_extent": ids[base], "differs_from_base": differs,
        "kendall_w": W})

# ------------------------------------------------------------ chains
groups = {}
order = []
for g in R["rings"]:
    k = (g["chain"], g["model"])
    if k not in groups:
        groups[k] = []
        order.append(k)
    groups[k].append(g)
for k in order:
    rings = groups[k]  # the sample lists rings inner to outer already
    s0 = usable(k[1], rings[0]["inner"])
    prev = s0["auc"] if s0 is not None else rings[0]["auc_inner"]
    start = prev
    steps = []
    for g in rings:
        d = g["auc_inner"] - prev
        if abs(d) > 1e-9:
            steps.append({"kind": "test_points", "outer": g["outer"], "change": d})
        elif not steps:
            start = g["auc_inner"]  # same test points: rounding difference only
        mix = (g["inner_area_km2"] * g["auc_inner"] + g["ring_area_km2"] * g["auc_ring"]) / \
            (g["inner_area_km2"] + g["ring_area_km2"])
        steps.append({"kind": "ring", "outer": g["outer"], "change": g["auc_outer"] - g["auc_inner"],
                      "mix_residual": g["auc_outer"] - mix})
        prev = g["auc_outer"]
    total = prev - start
    for st in steps:
        st["share"] = st["change"] / total
    members = [rings[0]["inner"]] + [g["outer"] for g in rings]
    area = {e["id"]: e["area_km2"] for e in R["extents"]}
    aucs = []
    for i, mid in enumerate(members):
        sc_ = usable(k[1], mid)
        aucs.append(sc_["auc"] if sc_ is not None else (rings[0]["auc_inner"] if i == 0 else rings[i - 1]["auc_outer"]))
    lr = stats.linregress(np.log2([area[mid] for mid in members]), aucs)
    out["chains"].append({"chain": k[0], "model": k[1], "members": members,
                          "start_auc": start, "end_auc": prev, "change": total, "steps": steps,
                          "slope": {"per_doubling": float(lr.slope), "intercept": float(lr.intercept),
                                    "r2": float(lr.rvalue ** 2)}})

# ------------------------------------------------------------ truncation
for mi in R["models"]:
    m = mi["name"]
    tails = []
    for c in R["curves"]:
        if c["model"] != m or usable(m, c["extent"]) is None:
            continue
        x, y = np.array(c["x"]), np.array(c["y"])
        o = np.argsort(x, kind="stable")
        x, y = x[o], y[o]
        k = len(x) - 2
        while k >= 0 and x[k] == x[-1] and y[k] == y[-1]:
            k -= 1
        jump = float(x[-1] - x[k])
        if jump > 0.2 and y[k] < 1:
            tails.append({"extent": c["extent"], "jump": jump, "y_from": float(y[k])})
    out["truncation"].append({"model": m, "floor_flag": mi["floor_share"] >= 0.2, "tails": tails,
                              "flag": mi["floor_share"] >= 0.2 or bool(tails)})

# ------------------------------------------------------------ independence
sc = [p for p in R["points"] if p["status"] == "scored"]
d = np.array([p["nearest_train_km"] for p in sc if p["role"] == "test"])
mean_lat = np.mean([p["lat"] for p in sc])
w = abs(R["grid"]["geotransform"][1]) * 111.32 * math.cos(math.radians(mean_lat))
q = np.percentile(d, [0, 25, 50, 75, 100])
near = float(np.mean(d <= 3 * w))
out["independence"] = {"n": int(len(d)), "min_km": float(q[0]), "q1_km": float(q[1]),
                       "median_km": float(q[2]), "q3_km": float(q[3]), "max_km": float(q[4]),
                       "cell_width_km": w, "near_km": 3 * w, "near_share": near,
                       "warn": near > 0.25}

# ------------------------------------------------------------ omitted points
ntest = sum(1 for p in sc if p["role"] == "test")
for o in R["omissions"]:
    out["omitted"].append({"model": o["model"], "threshold": o["threshold"],
                           "count": len(o["omitted_point_ids"]),
                           "share": len(o["omitted_point_ids"]) / ntest,
                           "ids": sorted(o["omitted_point_ids"])})

with open(os.path.join(HERE, "golden.json"), "w") as f:
    json.dump(out, f, indent=1, sort_keys=True, allow_nan=False)
    f.write("\n")
