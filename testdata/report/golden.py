#!/usr/bin/python3
"""Golden values for package report's sensitivity analysis.

Reads sample_results.json and recomputes, independently of the Go code and
with numpy/scipy only, every number report.Analyze derives:

  * per metric and model: n, min, max, range, mean, sample SD (numpy ddof=1),
    median within-extent bootstrap SD (numpy.median), range / median SD;
  * the slope against log2(area) with scipy.stats.linregress, its 95% CI as
    slope -+ scipy.stats.t.ppf(0.975, n-2) * stderr, r^2 = rvalue^2;
  * the two-way sum-of-squares split of each metric over the models x
    extents table (numpy), the model ranks per extent with
    scipy.stats.rankdata (method "average", rank 1 = best) and Kendall's W
    with the tie correction, written out explicitly in kendall_w_ties()
    (Legendre 2005, J. Agric. Biol. Environ. Stat. 10:226, eq. 2), its
    chi-square p-value from scipy.stats.chi2.sf;
  * the chain steps and shares along each nested chain and the mix residual;
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
        return s["auc"], (s["auc_boot_sd"] if ITER >= 2 else None)
    if kind == "auc_unweighted":
        return s["auc_unweighted"], None
    if kind == "partial_roc":
        for p in s["partial_roc"]:
            if abs(p["e"] - arg) <= 1e-12:
                if p["iterations"] > 0 and p["iterations_not_formed"] >= p["iterations"]:
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
       "spreads": [], "decompositions": [], "chains": [], "truncation": [], "omitted": []}

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
        med = float(np.median(boots)) if boots else 0.0
        rec["boot_sd_defined"] = bool(boots) and med > 0
        rec["boot_sd_median"] = med if rec["boot_sd_defined"] else 0.0
        rec["range_over_boot_sd"] = rec["range"] / med if rec["boot_sd_defined"] else 0.0
        x = np.log2(np.array(areas))
        if len(v) >= 3:
            lr = stats.linregress(x, v)
            tq = float(stats.t.ppf(0.975, len(v) - 2))
            rec["slope"] = {"per_doubling": float(lr.slope), "intercept": float(lr.intercept),
                            "std_err": float(lr.stderr), "t_quantile": tq,
                            "ci_low": float(lr.slope - tq * lr.stderr),
                            "ci_high": float(lr.slope + tq * lr.stderr),
                            "r2": float(lr.rvalue ** 2)}
        limit = 2 * med if rec["boot_sd_defined"] else 0.05
        rec["verdict"] = "undetermined" if len(v) < 2 else (
            "robust" if rec["range"] <= limit else "extent-sensitive")
        out["spreads"].append(rec)


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
    W = 12 * S / (m ** 2 * (n ** 3 - n) - m * T)
    chi2 = m * (n - 1) * W
    return W, chi2, n - 1, float(stats.chi2.sf(chi2, n - 1))


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
    W, chi2, df, p = kendall_w_ties(ranks)
    out["decompositions"].append({
        "metric": key, "extents": ids, "grand_mean": float(gm), "ss_total": sst, "ss_extent": sse,
        "ss_model": ssm, "ss_residual": ssr, "share_extent": sse / sst, "share_model": ssm / sst,
        "share_residual": ssr / sst, "ranks": [[float(v) for v in r] for r in ranks],
        "base_extent": ids[base], "differs_from_base": differs,
        "kendall_w": W, "chi_square": chi2, "df": df, "p_value": p})

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
    out["chains"].append({"chain": k[0], "model": k[1],
                          "members": [rings[0]["inner"]] + [g["outer"] for g in rings],
                          "start_auc": start, "end_auc": prev, "change": total, "steps": steps})

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
        if jump > 0.2:
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
