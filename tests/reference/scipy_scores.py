#!/usr/bin/env python3
"""Reference values from scipy and numpy (PyPI) for tests/stats_scores.rs.

Usage:  python tests/reference/scipy_scores.py [OUT.json]
Default OUT: tests/golden/stats/scipy_scores.json (the committed golden file).
Pinned versions used for the committed file: scipy==1.17.1, numpy==2.4.6
(tests/reference/requirements.txt).

What is computed, and by which library:
* wasserstein: scipy.stats.wasserstein_distance(u, v, u_weights, v_weights).
* crps: the energy form of the ensemble CRPS computed directly with numpy,
  O(m^2) over all member pairs (Gneiting and Raftery 2007, JASA 102(477),
  eq. 21):  crps = sum_i a_i |x_i - y| - 0.5 sum_ij a_i a_j |x_i - x_j|,
  a = w / sum(w); and the fair version (Ferro 2014) with the pair sum over
  i != j divided by (sum w)^2 - sum w^2 (= m (m - 1) for equal weights).
* crps_normal: the closed form of Gneiting et al. (2005) evaluated with
  scipy.stats.norm.cdf / norm.pdf, and the integral definition
  int (Phi((t - mu) / s) - 1{t >= y})^2 dt by scipy.integrate.quad.
* stats: numpy.average (weighted mean, population variance), numpy.cov with
  aweights and ddof=1 (unbiased variance with reliability weights),
  numpy.quantile method="linear" (unweighted) and method="inverted_cdf" with
  weights.
* coverage: central intervals by numpy.quantile as above, counts of
  observations inside (bounds included) and mean interval widths.

Inputs are drawn from numpy's PCG64 generator with a fixed seed, so the output
is the same on every run.
"""
import json
import sys
from pathlib import Path

import numpy as np
import scipy
from scipy import integrate, stats

rng = np.random.default_rng(20240611)


def fl(a):
    return [float(v) for v in np.asarray(a, dtype=float).ravel()]


def sample(n, kind):
    if kind == "normal":
        return rng.normal(0.0, 1.0, n)
    if kind == "vp0":  # m/s, a clustered bimodal bank
        k = rng.random(n) < 0.3
        return np.where(k, rng.normal(3400.0, 60.0, n), rng.normal(3000.0, 120.0, n))
    if kind == "epsilon":
        return rng.normal(0.12, 0.03, n)
    if kind == "ties":  # many repeated values
        return np.round(rng.normal(0.0, 2.0, n), 0)
    raise ValueError(kind)


def weights(n, kind):
    if kind is None:
        return None
    if kind == "random":
        return rng.random(n) * 3.0
    if kind == "zeros":  # some exact zeros
        w = rng.random(n)
        w[rng.random(n) < 0.3] = 0.0
        if w.sum() == 0.0:
            w[0] = 1.0
        return w
    if kind == "integer":
        return rng.integers(1, 5, n).astype(float)
    raise ValueError(kind)


def wasserstein_cases():
    cases = []
    docs = [  # the examples of scipy.stats.wasserstein_distance's docstring
        ([0, 1, 3], [5, 6, 8], None, None),
        ([0, 1], [0, 1], [3, 1], [2, 2]),
        ([3.4, 3.9, 7.5, 7.8], [4.5, 1.4], [1.4, 0.9, 3.1, 7.2], [3.2, 3.5]),
    ]
    for u, v, uw, vw in docs:
        cases.append({"name": "scipy docstring", "u": fl(u), "v": fl(v),
                      "u_w": None if uw is None else fl(uw),
                      "v_w": None if vw is None else fl(vw),
                      "w1": float(stats.wasserstein_distance(u, v, uw, vw))})
    sizes = [(1, 1), (1, 7), (3, 4), (10, 10), (25, 60), (200, 150)]
    kinds = ["normal", "vp0", "epsilon", "ties"]
    wkinds = [None, "random", "zeros", "integer"]
    k = 0
    for n, m in sizes:
        for kind in kinds:
            uwk = wkinds[k % 4]
            vwk = wkinds[(k // 2) % 4]
            k += 1
            u = sample(n, kind)
            v = sample(m, kind) + (0.5 * np.std(u) if n > 1 else 0.3)
            uw = weights(n, uwk)
            vw = weights(m, vwk)
            cases.append({"name": f"random {kind} n={n} m={m} weights={uwk},{vwk}",
                          "u": fl(u), "v": fl(v),
                          "u_w": None if uw is None else fl(uw),
                          "v_w": None if vw is None else fl(vw),
                          "w1": float(stats.wasserstein_distance(u, v, uw, vw))})
    return cases


def crps_direct(x, w, y):
    x = np.asarray(x, float)
    w = np.ones_like(x) if w is None else np.asarray(w, float)
    tot = w.sum()
    abs_err = np.sum(w * np.abs(x - y)) / tot
    pair = np.sum(np.outer(w, w) * np.abs(x[:, None] - x[None, :]))
    crps = abs_err - 0.5 * pair / tot**2
    denom = tot**2 - np.sum(w * w)
    fair = None
    if np.count_nonzero(w > 0) >= 2 and denom > 0:
        fair = float(abs_err - 0.5 * pair / denom)
    return float(crps), fair


def crps_cases():
    cases = []
    ms = [1, 2, 3, 5, 17, 64, 250]
    kinds = ["normal", "vp0", "epsilon", "ties"]
    wkinds = [None, "random", "zeros", "integer"]
    k = 0
    for m in ms:
        for kind in kinds:
            wk = wkinds[k % 4]
            k += 1
            x = sample(m, kind)
            w = weights(m, wk)
            # observations inside, at and outside the ensemble
            for y in [float(np.median(x)) + 0.1 * float(np.std(x) + 1e-3),
                      float(x[0]), float(np.max(x)) + 2.0 * float(np.std(x) + 1.0)]:
                c, f = crps_direct(x, w, y)
                cases.append({"name": f"{kind} m={m} weights={wk}", "x": fl(x),
                              "w": None if w is None else fl(w), "y": y,
                              "crps": c, "fair": f})
    return cases


def crps_normal_cases():
    cases = []
    specs = [(0.0, 1.0, 0.0), (0.0, 1.0, 1.0), (0.0, 1.0, -3.0), (0.0, 1.0, 8.0),
             (3000.0, 150.0, 3120.0), (0.1, 0.02, 0.05), (-2.0, 0.5, -2.2)]
    for _ in range(12):
        specs.append((float(rng.normal(0, 10)), float(rng.uniform(0.1, 5)),
                      float(rng.normal(0, 12))))
    for mu, s, y in specs:
        z = (y - mu) / s
        closed = s * (z * (2 * stats.norm.cdf(z) - 1) + 2 * stats.norm.pdf(z) - 1 / np.sqrt(np.pi))
        # integral definition, split at the observation; tails by survival functions
        lo, _ = integrate.quad(lambda t: stats.norm.cdf((t - mu) / s) ** 2, -np.inf, y,
                               epsabs=1e-13, epsrel=1e-12, limit=200)
        hi, _ = integrate.quad(lambda t: stats.norm.sf((t - mu) / s) ** 2, y, np.inf,
                               epsabs=1e-13, epsrel=1e-12, limit=200)
        cases.append({"mean": mu, "std": s, "y": y, "closed": float(closed),
                      "quad": float(lo + hi)})
    return cases


PS = [0.0, 0.01, 0.05, 0.1, 0.25, 0.3, 0.5, 0.7, 0.75, 0.9, 0.95, 0.99, 1.0]


def stats_cases():
    cases = []
    specs = [(1, "normal", None), (2, "normal", "random"), (5, "ties", None),
             (10, "vp0", "random"), (10, "normal", "zeros"), (33, "epsilon", "integer"),
             (100, "vp0", None), (100, "ties", "random"), (257, "normal", "zeros"),
             (40, "vp0", "equal")]
    for n, kind, wk in specs:
        x = sample(n, kind)
        if wk == "equal":
            w = np.full(n, 2.5)
        else:
            w = weights(n, wk)
        ww = np.ones(n) if w is None else w
        mean = np.average(x, weights=ww)
        var_pop = np.average((x - mean) ** 2, weights=ww)
        var_unb = None
        if np.count_nonzero(ww > 0) >= 2:
            var_unb = float(np.cov(x, aweights=ww, ddof=1))
        q_lin = None
        if w is None or wk == "equal":  # numpy's linear method has no weights
            q_lin = fl(np.quantile(x, PS, method="linear"))
        q_inv = fl(np.quantile(x, PS, weights=ww, method="inverted_cdf"))
        cases.append({"name": f"{kind} n={n} weights={wk}", "x": fl(x),
                      "w": None if w is None else fl(w), "mean": float(mean),
                      "var_population": float(var_pop), "var_unbiased": var_unb,
                      "ps": PS, "q_linear": q_lin, "q_inverted_cdf": q_inv})
    return cases


def coverage_cases():
    cases = []
    levels = [0.5, 0.8, 0.9]
    for method, weighted in [("linear", False), ("inverted_cdf", True), ("inverted_cdf", False)]:
        ens, ws, obs = [], [], []
        for j in range(40):
            m = int(rng.integers(5, 60))
            mu, s = float(rng.normal(3000, 100)), float(rng.uniform(50, 150))
            x = rng.normal(mu, s, m)
            w = rng.random(m) if weighted else None
            ens.append(x)
            ws.append(w)
            obs.append(float(rng.normal(mu, s * 1.3)))
        rows = []
        for lev in levels:
            inside, width = 0, 0.0
            for x, w, y in zip(ens, ws, obs):
                ps = [0.5 * (1 - lev), 0.5 * (1 + lev)]
                if method == "linear":
                    lo, hi = np.quantile(x, ps, method="linear")
                else:
                    lo, hi = np.quantile(x, ps, weights=np.ones(len(x)) if w is None else w,
                                         method="inverted_cdf")
                inside += int(lo <= y <= hi)
                width += hi - lo
            rows.append({"level": lev, "inside": inside, "mean_width": float(width / len(obs))})
        cases.append({"method": method, "ensembles": [fl(x) for x in ens],
                      "weights": [fl(w) for w in ws] if weighted else None,
                      "observations": obs, "levels": levels, "rows": rows})
    return cases


def main():
    out = Path(sys.argv[1]) if len(sys.argv) > 1 else \
        Path(__file__).resolve().parent.parent / "golden" / "stats" / "scipy_scores.json"
    doc = {"meta": {"scipy": scipy.__version__, "numpy": np.__version__,
                    "script": "tests/reference/scipy_scores.py"},
           "wasserstein": wasserstein_cases(),
           "crps": crps_cases(),
           "crps_normal": crps_normal_cases(),
           "stats": stats_cases(),
           "coverage": coverage_cases()}
    out.parent.mkdir(parents=True, exist_ok=True)
    out.write_text(json.dumps(doc, indent=1) + "\n")


if __name__ == "__main__":
    main()
