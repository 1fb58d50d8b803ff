#!/usr/bin/env python3
"""Reference experimental variograms for tests/variogram_reference.rs, from GSTools.

Reference library: GSTools (Mueller et al. 2022, Geosci. Model Dev. 15, 3161-3182),
`gstools.vario_estimate` (unstructured, Matheron estimator, bins lower <= d < upper)
and `gstools.vario_estimate_axis` (structured / masked grids). Pinned for the
committed golden file: gstools 1.7.0 (gstools-cython 1.2.0), numpy 2.4.6.

The script draws its own random data with numpy's PCG64 generator (fixed seeds),
so the Rust test reads the inputs from the same JSON. Missing values are written
as null. Mean lags and pair counts that gstools does not return are computed
here by brute force with numpy.

Usage:  python variogram_gstools.py OUT.json
Regenerate the golden file:
    /work/venv/bin/python tests/reference/variogram_gstools.py tests/golden/variogram/gstools.json
"""

import json
import sys

import numpy as np

try:
    import gstools as gs
except ImportError as exc:  # the Rust test turns this into a failure under STRATIPRIOR_REQUIRE_PYTHON=1
    sys.stderr.write(f"gstools is not installed: {exc}\n")
    sys.exit(3)


def nullable(a):
    return [None if np.isnan(v) else float(v) for v in np.asarray(a, dtype=float)]


def floats(a):
    return [float(v) for v in np.asarray(a, dtype=float)]


def mean_lags_1d(pos, val, edges):
    """Mean |d| per bin over unordered pairs (numpy brute force)."""
    ok = ~np.isnan(val)
    p = pos[ok]
    d = np.abs(p[:, None] - p[None, :])[np.triu_indices(len(p), 1)]
    return d


def binned_mean(d, edges):
    out = []
    for k in range(len(edges) - 1):
        m = (d >= edges[k]) & (d < edges[k + 1])
        out.append(float(d[m].mean()) if m.any() else None)
    return out


def case_vertical():
    """Four wells, irregular s with a gap in sampling and missing values."""
    rng = np.random.default_rng(20240611)
    wells = []
    edges = np.arange(0.0, 12.01, 1.5)  # 8 bins of 1.5 m
    offset = 0.0
    all_pos, all_val, all_d = [], [], []
    for w in range(4):
        n = 60 + 15 * w
        s = np.sort(rng.uniform(0.0, 40.0 + 5 * w, n))
        s = s[(s < 15.0) | (s > 19.0 + w)]  # a gap in the log
        v = 2600.0 + 40.0 * np.cumsum(rng.normal(size=s.size)) / np.sqrt(s.size)
        v += rng.normal(scale=15.0, size=s.size)
        miss = rng.random(s.size) < 0.08
        v[miss] = np.nan
        wells.append({"well": f"Kestrel-{w + 1}", "s": floats(s), "values": nullable(v)})
        ok = ~np.isnan(v)
        # Wells are placed far apart on one line so that gstools pairs only
        # samples of the same well.
        all_pos.append(s[ok] + offset)
        all_val.append(v[ok])
        all_d.append(mean_lags_1d(s, v, edges))
        offset += 1.0e6
    pos = np.concatenate(all_pos)
    val = np.concatenate(all_val)
    _, gamma, counts = gs.vario_estimate((pos,), val, edges, return_counts=True)
    return {
        "wells": wells,
        "edges": floats(edges),
        "gamma": floats(gamma),
        "pairs": [int(c) for c in counts],
        "h_mean": binned_mean(np.concatenate(all_d), edges),
    }


def case_horizontal_layers():
    """Vertical wells sampled at three stratigraphic levels; pairs within 1 m in s."""
    rng = np.random.default_rng(77)
    nw = 35
    wx = rng.uniform(0.0, 4000.0, nw)
    wy = rng.uniform(0.0, 3000.0, nw)
    levels = [0.0, 10.0, 20.0]
    tol = 1.0
    edges = np.array([0.0, 250.0, 500.0, 800.0, 1200.0, 1700.0, 2300.0, 3000.0])
    samples = []
    per_level = []
    for lev in levels:
        s = lev + rng.uniform(-0.3, 0.3, nw)
        v = 0.12 + 0.02 * np.sin(wx / 900.0) + 0.01 * rng.normal(size=nw)
        v[rng.random(nw) < 0.1] = np.nan
        for w in range(nw):
            samples.append({"x": float(wx[w]), "y": float(wy[w]), "s": float(s[w]),
                            "value": None if np.isnan(v[w]) else float(v[w]), "well": w})
        ok = ~np.isnan(v)
        _, g, c = gs.vario_estimate((wx[ok], wy[ok]), v[ok], edges, return_counts=True)
        per_level.append((g, c))
    n = sum(c for _, c in per_level)
    gamma = sum(g * c for g, c in per_level) / np.maximum(n, 1)
    return {
        "samples": samples,
        "edges": floats(edges),
        "vertical_tolerance": tol,
        "gamma": floats(gamma),
        "pairs": [int(c) for c in n],
    }


def case_horizontal_directional():
    """One level, directional: azimuth 30 deg +/- 22.5 deg, bandwidth 400 m."""
    rng = np.random.default_rng(4242)
    nw = 70
    x = rng.uniform(0.0, 5000.0, nw)
    y = rng.uniform(0.0, 5000.0, nw)
    v = 0.05 + 0.03 * np.cos((x + y) / 1500.0) + 0.01 * rng.normal(size=nw)
    edges = np.linspace(0.0, 3000.0, 9)
    azimuth, tol, bw = 30.0, 22.5, 400.0
    # gstools measures 2-D angles counter-clockwise from +x; a bearing (clockwise
    # from north = +y) of a corresponds to 90 - a.
    _, g, c = gs.vario_estimate((x, y), v, edges, angles=[np.deg2rad(90.0 - azimuth)],
                                angles_tol=np.deg2rad(tol), bandwidth=bw, return_counts=True)
    _, go, co = gs.vario_estimate((x, y), v, edges, return_counts=True)
    samples = [{"x": float(x[i]), "y": float(y[i]), "s": 0.0, "value": float(v[i]), "well": i}
               for i in range(nw)]
    return {
        "samples": samples,
        "edges": floats(edges),
        "azimuth": azimuth,
        "tolerance": tol,
        "bandwidth": bw,
        "gamma": floats(np.atleast_2d(g)[0]),
        "pairs": [int(k) for k in np.atleast_2d(c)[0]],
        "omni_gamma": floats(go),
        "omni_pairs": [int(k) for k in co],
    }


def axis_counts(ok, axis, lag):
    a = np.moveaxis(ok, axis, 0)
    return int(np.sum(a[lag:] & a[:-lag]))


def case_grid(shape, seed):
    rng = np.random.default_rng(seed)
    f = rng.normal(size=shape)
    for ax in range(len(shape)):
        f = np.cumsum(f, axis=ax) / np.sqrt(shape[ax])
    f = 3000.0 + 100.0 * f
    inactive = rng.random(shape) < 0.15
    f_nan = f.copy()
    nan_at = tuple(int(rng.integers(0, n)) for n in shape)
    f_nan[nan_at] = np.nan
    ma = np.ma.array(f_nan, mask=inactive | np.isnan(f_nan))
    ok = ~np.ma.getmaskarray(ma)
    out = {"shape": list(shape) + [1] * (3 - len(shape)),
           "values": nullable(f_nan.ravel()), "active": [bool(b) for b in (~inactive).ravel()],
           "axes": {}}
    for ax in range(len(shape)):
        g = gs.vario_estimate_axis(ma, direction=ax)
        nl = shape[ax] - 1
        out["axes"][str(ax)] = {
            "gamma": floats(g[1:nl + 1]),
            "pairs": [axis_counts(ok, ax, l) for l in range(1, nl + 1)],
        }
    return out


def main():
    if len(sys.argv) != 2:
        sys.stderr.write("usage: variogram_gstools.py OUT.json\n")
        sys.exit(2)
    doc = {
        "generator": "tests/reference/variogram_gstools.py",
        "gstools": gs.__version__,
        "numpy": np.__version__,
        "vertical": case_vertical(),
        "horizontal_layers": case_horizontal_layers(),
        "horizontal_directional": case_horizontal_directional(),
        "grid_2d": case_grid((23, 17), 5),
        "grid_3d": case_grid((7, 6, 5), 6),
    }
    with open(sys.argv[1], "w") as fh:
        json.dump(doc, fh, indent=1)
        fh.write("\n")


if __name__ == "__main__":
    main()
