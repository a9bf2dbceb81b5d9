#!/usr/bin/python3
"""Golden values for package areasweep/metrics.

Writes, beside this script:
  cases.csv           background cells and presences of the test cases
                      (case,role,value,weight; role bg/test/train; integer
                      values so every reader parses them exactly)
  paired_golden.json  placements, their standard errors and paired
                      differences (between two extents of one model and
                      between two models on one extent) on area-weighted
                      cases, written out with numpy independently of the Go
                      code (DeLong, DeLong & Clarke-Pearson 1988 presence
                      component; background as the complete population),
                      with the 95% interval diff -+ t se, t the 0.975
                      quantile of Student's t with n - 1 degrees of freedom
                      (student_t975)
  sklearn_golden.json AUCs from sklearn.metrics.roc_auc_score, binomial tails
                      from scipy.stats.binom.sf, Spearman correlations from
                      scipy.stats.spearmanr, percentiles from numpy.percentile
                      and threshold statistics from a numpy/scipy rendering of
                      Anderson, Lew & Peterson (2003).

Deterministic: fixed seeds, no clock, sorted keys. Run with /usr/bin/python3
(Debian's python3-sklearn, python3-scipy, python3-numpy).
"""
import json
import os
import sys

import numpy as np
import scipy
import sklearn
from scipy.stats import binom, spearmanr
from sklearn.metrics import roc_auc_score

HERE = os.path.dirname(os.path.abspath(__file__))
sys.dont_write_bytecode = True  # no __pycache__ in testdata/
sys.path.insert(0, os.path.dirname(HERE))  # testdata/, for tquantile
from tquantile import student_t975  # noqa: E402


def hanley_mcneil():
    # Hanley & McNeil (1982) Radiology 143:29-36, five-category rating
    # example (from memory): normal 33/6/6/11/2, abnormal 3/2/2/11/33 over
    # ratings 1..5. Normals are the background (weight = count, one cell per
    # rating), abnormals the test presences (one presence each).
    normal = [33, 6, 6, 11, 2]
    abnormal = [3, 2, 2, 11, 33]
    bg_v = [1, 2, 3, 4, 5]
    bg_w = normal
    test = [r for r, c in zip(range(1, 6), abnormal) for _ in range(c)]
    train = test[::2]
    return bg_v, bg_w, test, train


def generated(seed, ncells, ntest, ntrain, vmax, wmax, shift):
    rng = np.random.default_rng(seed)
    bg_v = rng.integers(0, vmax + 1, size=ncells)
    bg_w = rng.integers(1, wmax + 1, size=ncells)
    # presences: higher values on average; half copy a background value
    # exactly (ties), half are drawn fresh.
    test = np.clip(rng.integers(0, vmax + 1, size=ntest) + shift, 0, vmax)
    tie = rng.random(ntest) < 0.5
    test[tie] = np.sort(bg_v)[np.clip(rng.integers(ncells // 3, ncells, size=tie.sum()), 0, ncells - 1)]
    train = np.clip(rng.integers(0, vmax + 1, size=ntrain) + shift, 0, vmax)
    return bg_v.tolist(), bg_w.tolist(), test.tolist(), train.tolist()


def continuous(seed, ncells, ntest, ntrain, vmax, wmax, shift):
    """Like generated, but presences are drawn fresh (ties are rare)."""
    rng = np.random.default_rng(seed)
    bg_v = rng.integers(0, vmax + 1, size=ncells)
    bg_w = rng.integers(1, wmax + 1, size=ncells)
    test = np.clip(rng.integers(0, vmax + 1, size=ntest) + shift, 0, vmax)
    train = np.clip(rng.integers(0, vmax + 1, size=ntrain) + shift, 0, vmax)
    return bg_v.tolist(), bg_w.tolist(), test.tolist(), train.tolist()


CASES = {
    "hanley_mcneil_1982": hanley_mcneil(),
    "tiny": ([0, 1, 2], [1, 2, 3], [1, 2], [2]),
    "ties_small": generated(11, 40, 12, 15, 8, 5, 2),
    "ties_medium": generated(12, 300, 60, 45, 20, 9, 5),
    "weights_one": generated(13, 500, 80, 60, 50, 1, 10),
    "below_extent": ([10, 11, 12, 13], [1, 1, 1, 1], [2, 3, 12, 13, 13], [12]),
    "large": generated(14, 5000, 200, 300, 1_000_000, 20, 150_000),
    "continuous_a": continuous(15, 300, 40, 20, 1_000_000, 9, 200_000),
    "continuous_b": continuous(16, 800, 25, 20, 1_000_000, 30, 50_000),
    "continuous_c": continuous(17, 150, 90, 20, 1_000_000, 5, 300_000),
}


def placements(vals, w, pres):
    """V_i = (W(< v_i) + W(= v_i)/2) / W, written out per presence."""
    vals = np.asarray(vals, float)
    w = np.asarray(w, float)
    tot = w.sum()
    return np.array([(w[vals < p].sum() + w[vals == p].sum() / 2) / tot for p in pres])


def paired(d):
    """Mean, SE = sqrt(sum (d - mean)^2 / (n (n - 1))) of paired differences
    and the 95% interval mean -+ t_{0.975, n-1} SE."""
    d = np.asarray(d, float)
    n = len(d)
    m = d.mean()
    se = np.sqrt(((d - m) ** 2).sum() / (n * (n - 1)))
    q = student_t975(n - 1)
    return float(m), float(se), float(m - q * se), float(m + q * se)


def paired_cases():
    """Two models on a shared background with area weights, an outer extent
    (every cell) and an inner extent (a random half), and test points on
    cells (a presence's own cell is part of the background)."""
    rng = np.random.default_rng(31)
    out = []
    for name, k, n, vmax in [("small", 60, 12, 20), ("medium", 400, 50, 1000), ("ties", 300, 40, 8),
                             ("large_weights", 500, 80, 100000)]:
        w = rng.integers(1, 50, size=k)
        if name == "large_weights":
            w = rng.integers(1, 2**40, size=k)
        a = rng.integers(0, vmax + 1, size=k)
        b = np.clip(a + rng.integers(-(vmax // 4) - 1, vmax // 4 + 2, size=k), 0, vmax)
        inner = rng.random(k) < 0.5
        pts = rng.choice(k, size=n, replace=False)
        case = {"name": name, "weights": w.tolist(), "a": a.tolist(), "b": b.tolist(),
                "inner": [int(x) for x in inner], "points": pts.tolist()}
        res = {}
        for model, vals in (("a", a), ("b", b)):
            for ext, mask in (("outer", np.ones(k, bool)), ("inner", inner)):
                ins = [i for i in range(n) if mask[pts[i]]]
                v = placements(vals[mask], w[mask], vals[pts[ins]])
                m = float(v.mean())
                res[model + "/" + ext] = {"points": ins, "placements": v.tolist(), "auc": m,
                                          "se": float(np.sqrt(((v - m) ** 2).sum() / (len(v) * (len(v) - 1))))}
        # inner minus outer for model a, on the points inside inner
        ins = res["a/inner"]["points"]
        outer_v = dict(zip(res["a/outer"]["points"], res["a/outer"]["placements"]))
        d = [vi - outer_v[i] for i, vi in zip(ins, res["a/inner"]["placements"])]
        case["extent_diff"] = dict(zip(("diff", "se", "low", "high"), paired(d)))
        for ext in ("outer", "inner"):
            d = np.array(res["a/" + ext]["placements"]) - np.array(res["b/" + ext]["placements"])
            case["model_diff_" + ext] = dict(zip(("diff", "se", "low", "high"), paired(d)))
        case["scores"] = res
        out.append(case)
    return out


def our_auc(bg_v, bg_w, pres):
    """Our definition, directly: sum_p [W(<v_p) + W(=v_p)/2] / (n W)."""
    bg_v = np.asarray(bg_v, dtype=float)
    bg_w = np.asarray(bg_w, dtype=float)
    tot = 0.0
    for v in pres:
        tot += bg_w[bg_v < v].sum() + bg_w[bg_v == v].sum() / 2
    return tot / (len(pres) * bg_w.sum())


def sk_auc(bg_v, bg_w, pres):
    # Positives (presences) weight 1, negatives (background cells) weight =
    # area: roc_auc_score then equals our area-weighted Mann-Whitney AUC.
    y = np.r_[np.zeros(len(bg_v)), np.ones(len(pres))]
    s = np.r_[np.asarray(bg_v, float), np.asarray(pres, float)]
    w = np.r_[np.asarray(bg_w, float), np.ones(len(pres))]
    return float(roc_auc_score(y, s, sample_weight=w))


def thresholds(bg_v, bg_w, test, train):
    bg_v = np.asarray(bg_v, float)
    bg_w = np.asarray(bg_w, float)
    test = np.asarray(test, float)
    out = []
    if len(train):
        tr = np.sort(np.asarray(train, float))
        ts = [("minimum_training_presence", tr[0]),
              ("p10_training_presence", tr[len(tr) // 10])]
    else:
        ts = []
    for name, t in ts:
        succ = int((test >= t).sum())
        af = float(bg_w[bg_v >= t].sum() / bg_w.sum())
        out.append({
            "name": name,
            "value": float(t),
            "omission": float((test < t).mean()),
            "area_fraction": af,
            "successes": succ,
            "n": int(len(test)),
            "p_binomial": float(binom.sf(succ - 1, len(test), af)),
        })
    return out


def main():
    rows = []
    auc = {}
    thr = {}
    for name, (bg_v, bg_w, test, train) in CASES.items():
        for v, w in zip(bg_v, bg_w):
            rows.append((name, "bg", int(v), int(w)))
        for v in test:
            rows.append((name, "test", int(v), 1))
        for v in train:
            rows.append((name, "train", int(v), 1))
        a = sk_auc(bg_v, bg_w, test)
        # Check that sklearn's weighted AUC is our definition.
        assert abs(a - our_auc(bg_v, bg_w, test)) < 1e-12, name
        auc[name] = {
            "auc": a,
            "auc_unweighted": sk_auc(bg_v, [1] * len(bg_v), test),
            "auc_train": sk_auc(bg_v, bg_w, train) if len(train) else 0.0,
        }
        thr[name] = thresholds(bg_v, bg_w, test, train)

    binoms = []
    for n, k, p in [(20, 15, 0.3), (100, 50, 0.2), (1000, 600, 0.3), (10, 10, 0.5),
                    (10, 1, 0.01), (50, 0, 0.3), (7, 3, 0.999), (200, 100, 0.5),
                    (5000, 2600, 0.5), (30, 29, 0.95), (12, 6, 1e-6), (400, 10, 0.01)]:
        binoms.append({"n": n, "k": k, "p": p, "tail": float(binom.sf(k - 1, n, p))})

    rng = np.random.default_rng(2024)
    spear = []
    for label, n, tie in [("ties10", 10, 3), ("ties57", 57, 8), ("cont100", 100, 0), ("anti20", 20, 0)]:
        x = rng.integers(0, tie, size=n).astype(float) if tie else rng.random(n)
        y = x * 0.5 + rng.random(n) if tie else rng.random(n) + x
        if label == "anti20":
            y = -x + 0.3 * rng.random(n)
        y = np.round(y, 1) if tie else y
        spear.append({"name": label, "x": x.tolist(), "y": y.tolist(),
                      "rho": float(spearmanr(x, y)[0])})

    quants = []
    for label, n in [("one", 1), ("two", 2), ("ten", 10), ("n999", 999)]:
        v = rng.normal(size=n)
        lo, hi = np.percentile(v, [2.5, 97.5])
        quants.append({"name": label, "v": v.tolist(), "p025": float(lo), "p975": float(hi)})

    with open(os.path.join(HERE, "cases.csv"), "w") as f:
        f.write("case,role,value,weight\n")
        for r in rows:
            f.write("%s,%s,%d,%d\n" % r)

    out = {
        "generator": "testdata/metrics/golden.py",
        "versions": {"sklearn": sklearn.__version__, "scipy": scipy.__version__, "numpy": np.__version__},
        "auc": auc,
        "thresholds": thr,
        "binomial": binoms,
        "spearman": spear,
        "quantile": quants,
    }
    with open(os.path.join(HERE, "paired_golden.json"), "w") as f:
        json.dump({"generator": "testdata/metrics/golden.py", "numpy": np.__version__,
                   "cases": paired_cases()}, f, indent=1, sort_keys=True)
        f.write("\n")
    with open(os.path.join(HERE, "sklearn_golden.json"), "w") as f:
        json.dump(out, f, indent=1, sort_keys=True)
        f.write("\n")


if __name__ == "__main__":
    main()
