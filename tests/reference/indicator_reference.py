#!/usr/bin/env python3
"""Reference simple indicator kriging from GSTools (PyPI) for tests/indicator_reference.rs.

Usage:  python tests/reference/indicator_reference.py [OUT.json]
Default OUT: tests/golden/indicator/reference.json (the committed golden file).
Pinned versions used for the committed file: gstools==1.7.0 (numpy 2.4.6, scipy 1.17.1).

Case: 40 random points in (x, y, s), three facies drawn from a thresholded smooth
field, hard indicators. Each indicator is kriged by simple kriging with its own
variogram model and the sample proportion as the known mean (GSTools
`krige.Simple(mean=p, exact=True, pseudo_inv=False)`: nugget as micro-structure,
exact at the data, true inverse), all 40 points in every system. The corrected
probabilities clip the three estimates to [0, 1] and divide them by their sum
(the order-relation correction of Deutsch and Journel 1998, GSLIB 2nd ed.,
sec. V.1.6, from memory), computed here with numpy.

Model mapping to GSTools (read from the GSTools sources, covmodel/models.py):
* our practical-range structures: spherical 1.5h - 0.5h^3 (h = r / a), exponential
  1 - exp(-3 r / a), Gaussian 1 - exp(-3 (r / a)^2);
* GSTools Spherical cor = 1 - 1.5 h + 0.5 h^3 with h = r / len_scale -> len_scale = a;
  Exponential (rescale 1) cor = exp(-r / len_scale) -> len_scale = a / 3;
  Gaussian cor = exp(-(pi / 4) (r / len_scale)^2) (rescale sqrt(pi) / 2)
  -> len_scale = a * sqrt(pi / 12);
* var = partial sill, nugget = nugget, anisotropy: len_scale of the major axis,
  anis = [minor / major, vertical / major]; our azimuth (clockwise from north = +y)
  is the GSTools angle (counter-clockwise from +x) 90 deg - azimuth.
The script checks this mapping against its own evaluation of our model formulas
(cov_spatial vs. the formulas) before writing.
"""
import json
import sys

import numpy as np
import gstools as gs


MODELS = [
    {"nugget": 0.02, "kind": "spherical", "sill": 0.20, "range_major": 650.0,
     "range_minor": 300.0, "azimuth": 30.0, "range_vertical": 18.0},
    {"nugget": 0.0, "kind": "exponential", "sill": 0.24, "range_major": 500.0,
     "range_minor": 500.0, "azimuth": 0.0, "range_vertical": 12.0},
    {"nugget": 0.015, "kind": "gaussian", "sill": 0.18, "range_major": 800.0,
     "range_minor": 400.0, "azimuth": 120.0, "range_vertical": 25.0},
]


def gs_model(m):
    a = m["range_major"]
    kind = m["kind"]
    if kind == "spherical":
        cls, ls = gs.Spherical, a
    elif kind == "exponential":
        cls, ls = gs.Exponential, a / 3.0
    else:
        cls, ls = gs.Gaussian, a * np.sqrt(np.pi / 12.0)
    return cls(dim=3, var=m["sill"], len_scale=ls, nugget=m["nugget"],
               anis=[m["range_minor"] / a, m["range_vertical"] / a],
               angles=[np.deg2rad(90.0 - m["azimuth"])])


def our_cov(m, d):
    """Covariance of our model (C(0) = nugget + sill) at lag rows d, from its formulas."""
    az = np.deg2rad(m["azimuth"])
    sa, ca = np.sin(az), np.cos(az)
    major = d[:, 0] * sa + d[:, 1] * ca
    minor = d[:, 0] * ca - d[:, 1] * sa
    h = np.sqrt((major / m["range_major"]) ** 2 + (minor / m["range_minor"]) ** 2
                + (d[:, 2] / m["range_vertical"]) ** 2)
    if m["kind"] == "spherical":
        g = np.where(h < 1.0, 1.5 * h - 0.5 * h ** 3, 1.0)
    elif m["kind"] == "exponential":
        g = 1.0 - np.exp(-3.0 * h)
    else:
        g = 1.0 - np.exp(-3.0 * h * h)
    c = m["sill"] * (1.0 - g)
    return np.where(h == 0.0, c + m["nugget"], c)


def check_mapping(rng):
    d = rng.uniform(-900.0, 900.0, size=(200, 3))
    d[:, 2] = rng.uniform(-30.0, 30.0, size=200)
    for m in MODELS:
        gm = gs_model(m)
        ours = our_cov(m, d)
        theirs = gm.cov_spatial(d.T)  # without nugget at lags != 0
        err = np.max(np.abs(ours - theirs))
        assert err < 1e-12, f"model mapping {m['kind']}: {err}"


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else "tests/golden/indicator/reference.json"
    rng = np.random.default_rng(20250117)
    check_mapping(rng)

    n, nt = 40, 30
    pts = np.c_[rng.uniform(0.0, 1500.0, size=(n, 2)), rng.uniform(0.0, 60.0, size=n)]
    field = (np.sin(pts[:, 0] / 260.0) + 0.7 * np.cos(pts[:, 1] / 310.0)
             + 0.5 * np.sin(pts[:, 2] / 9.0) + 0.6 * rng.standard_normal(n))
    t1, t2 = np.quantile(field, [0.35, 0.75])
    codes = [1, 2, 3]
    facies = np.where(field < t1, 1, np.where(field < t2, 2, 3))
    ind = np.stack([(facies == c).astype(float) for c in codes], axis=1)
    props = ind.mean(axis=0)

    tg = np.c_[rng.uniform(0.0, 1500.0, size=(nt, 2)), rng.uniform(0.0, 60.0, size=nt)]
    on = [0, 7, 23]  # targets exactly on data points (exactness)
    tg = np.r_[tg, pts[on]]

    raw, var = [], []
    for k, m in enumerate(MODELS):
        krig = gs.krige.Simple(gs_model(m), [pts[:, 0], pts[:, 1], pts[:, 2]], ind[:, k],
                               mean=float(props[k]), exact=True, pseudo_inv=False)
        e, v = krig([tg[:, 0], tg[:, 1], tg[:, 2]])
        raw.append(np.asarray(e))
        var.append(np.asarray(v))
    raw = np.stack(raw, axis=1)
    var = np.stack(var, axis=1)
    corr = np.clip(raw, 0.0, 1.0)
    corr = corr / corr.sum(axis=1, keepdims=True)
    # targets with an estimate clearly outside [0, 1] (not rounding at a datum)
    violated = int(np.sum(np.any((raw < -1e-9) | (raw > 1.0 + 1e-9), axis=1)))
    assert violated > 0, "the case should exercise the order-relation correction"
    # exactness at the data points
    assert np.max(np.abs(raw[nt:] - ind[on])) < 1e-9

    meta = {"script": "tests/reference/indicator_reference.py", "gstools": gs.__version__,
            "numpy": np.__version__}
    case = {"codes": codes, "proportions": props.tolist(), "models": MODELS,
            "points": pts.tolist(), "facies": facies.tolist(), "targets": tg.tolist(),
            "on_data": on, "raw": raw.tolist(), "variance": var.tolist(),
            "corrected": corr.tolist(), "violated_targets": violated}
    with open(out, "w") as fh:
        json.dump({"meta": meta, "case": case}, fh, indent=1)
        fh.write("\n")


if __name__ == "__main__":
    main()
