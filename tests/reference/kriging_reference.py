#!/usr/bin/env python3
"""Reference kriging results from PyKrige and GSTools (PyPI) for tests/kriging_reference.rs.

Usage:  python tests/reference/kriging_reference.py [OUT.json]
Default OUT: tests/golden/kriging/reference.json (the committed golden file).
Pinned versions used for the committed file: pykrige==1.7.3, gstools==1.7.0
(numpy 2.4.6, scipy 1.17.1):  pip install pykrige==1.7.3 gstools==1.7.0

Covariance conventions (read from the libraries' sources):
* PyKrige "exponential" variogram: gamma(h) = psill * (1 - exp(-h / (range / 3))) + nugget,
  so C(h) = c exp(-a h) maps to psill = c, range = 3 / a, nugget = 0.
* GSTools Exponential: C(h) = var * exp(-h / len_scale) (rescale = 1), so var = c,
  len_scale = 1 / a; with len_scale = [l1, l2, l3] and no rotation,
  C = var * exp(-sqrt((dx/l1)^2 + (dy/l2)^2 + (dz/l3)^2)).
* GSTools is run with pseudo_inv=False (true inverse), PyKrige with its default
  (scipy.linalg.inv); exact_values does not matter since no target is on a datum.

Every case uses all data points (identical neighbour sets on both sides).
Each case is computed by both libraries where both support it; the script
asserts that they agree to 1e-9 before writing.
"""
import json
import sys

import numpy as np
import gstools as gs
import pykrige
from pykrige.ok import OrdinaryKriging
from pykrige.ok3d import OrdinaryKriging3D
from pykrige.uk3d import UniversalKriging3D


def pyk_ok3d(c, a, pts, z, tg):
    ok = OrdinaryKriging3D(pts[:, 0], pts[:, 1], pts[:, 2], z, variogram_model="exponential",
                           variogram_parameters={"psill": c, "range": 3.0 / a, "nugget": 0.0})
    e, v = ok.execute("points", tg[:, 0], tg[:, 1], tg[:, 2], backend="vectorized")
    return np.asarray(e), np.asarray(v)


def pyk_ked3d(c, a, pts, z, f, tg, f0):
    uk = UniversalKriging3D(pts[:, 0], pts[:, 1], pts[:, 2], z, variogram_model="exponential",
                            variogram_parameters={"psill": c, "range": 3.0 / a, "nugget": 0.0},
                            drift_terms=["specified"], specified_drift=[f])
    e, v = uk.execute("points", tg[:, 0], tg[:, 1], tg[:, 2], backend="vectorized",
                      specified_drift_arrays=[f0])
    return np.asarray(e), np.asarray(v)


def gs_model(model, dim):
    if model["type"] == "iso_exp":
        return gs.Exponential(dim=dim, var=model["c"], len_scale=1.0 / model["a"], nugget=0.0)
    return gs.Exponential(dim=dim, var=model["c"], len_scale=list(model["lengths"]), nugget=0.0)


def gs_krige(kind, model, pts, z, tg, mean=None, f=None, f0=None):
    m = gs_model(model, pts.shape[1])
    cp = [pts[:, k] for k in range(pts.shape[1])]
    tp = [tg[:, k] for k in range(tg.shape[1])]
    if kind == "ordinary":
        k = gs.krige.Ordinary(m, cp, z, pseudo_inv=False)
        e, v = k(tp)
    elif kind == "simple":
        k = gs.krige.Simple(m, cp, z, mean=mean, pseudo_inv=False)
        e, v = k(tp)
    else:
        k = gs.krige.ExtDrift(m, cp, z, ext_drift=f, pseudo_inv=False)
        e, v = k(tp, ext_drift=f0)
    return np.asarray(e), np.asarray(v)


def agree(a, b, what):
    d = np.max(np.abs(np.asarray(a) - np.asarray(b)))
    assert d <= 1e-9, f"{what}: pykrige and gstools differ by {d}"


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else "tests/golden/kriging/reference.json"
    rng = np.random.default_rng(20240611)
    cases = []

    # Isaaks and Srivastava (1989) ch. 12 worked example (2-D, C(h) = 10 exp(-0.3 h)).
    pts = np.array([(61, 139), (63, 140), (64, 129), (68, 128), (71, 140), (73, 141), (75, 128)], float)
    z = np.array([477, 696, 227, 646, 606, 791, 783], float)
    tg = np.array([[65.0, 137.0]])
    ok = OrdinaryKriging(pts[:, 0], pts[:, 1], z, variogram_model="exponential",
                         variogram_parameters={"psill": 10.0, "range": 10.0, "nugget": 0.0})
    e, v = ok.execute("points", tg[:, 0], tg[:, 1])
    model = {"type": "iso_exp", "c": 10.0, "a": 0.3}
    ge, gv = gs_krige("ordinary", model, pts, z, tg)
    agree(e, ge, "I&S estimate")
    agree(v, gv, "I&S variance")
    # book values (from memory): estimate 592.73 (592.729), variance 8.9561
    assert abs(e[0] - 592.729) < 5e-4 and abs(v[0] - 8.9561) < 5e-5, (e, v)
    cases.append({"name": "isaaks_srivastava", "kind": "ordinary", "model": model,
                  "points": np.c_[pts, np.zeros(len(pts))].tolist(), "values": z.tolist(),
                  "targets": np.c_[tg, np.zeros(len(tg))].tolist(),
                  "reference": {"pykrige": {"estimate": list(map(float, e)), "variance": list(map(float, v))},
                                "gstools": {"estimate": ge.tolist(), "variance": gv.tolist()}}})

    # Random 3-D data, all 50 points used.
    n, nt = 50, 25
    pts = rng.uniform(0.0, 100.0, size=(n, 3))
    z = 3.0 + np.sin(pts[:, 0] / 17.0) + 0.5 * np.cos(pts[:, 1] / 11.0) + 0.2 * rng.standard_normal(n)
    f = 1.0 + 0.02 * pts[:, 2] + 0.01 * pts[:, 0] + 0.05 * rng.standard_normal(n)
    tg = rng.uniform(5.0, 95.0, size=(nt, 3))
    f0 = 1.0 + 0.02 * tg[:, 2] + 0.01 * tg[:, 0]
    c, a = 2.0, 1.0 / 25.0
    iso = {"type": "iso_exp", "c": c, "a": a}
    base = {"points": pts.tolist(), "values": z.tolist(), "targets": tg.tolist()}

    e1, v1 = pyk_ok3d(c, a, pts, z, tg)
    e2, v2 = gs_krige("ordinary", iso, pts, z, tg)
    agree(e1, e2, "OK estimate"); agree(v1, v2, "OK variance")
    cases.append(dict(base, name="random_3d_ordinary", kind="ordinary", model=iso,
                      reference={"pykrige": {"estimate": e1.tolist(), "variance": v1.tolist()},
                                 "gstools": {"estimate": e2.tolist(), "variance": v2.tolist()}}))

    mean = 3.2
    e2, v2 = gs_krige("simple", iso, pts, z, tg, mean=mean)
    cases.append(dict(base, name="random_3d_simple", kind="simple", model=iso, mean=mean,
                      reference={"gstools": {"estimate": e2.tolist(), "variance": v2.tolist()}}))

    e1, v1 = pyk_ked3d(c, a, pts, z, f, tg, f0)
    e2, v2 = gs_krige("external_drift", iso, pts, z, tg, f=f, f0=f0)
    agree(e1, e2, "KED estimate"); agree(v1, v2, "KED variance")
    cases.append(dict(base, name="random_3d_external_drift", kind="external_drift", model=iso,
                      drift=f.tolist(), target_drift=f0.tolist(),
                      reference={"pykrige": {"estimate": e1.tolist(), "variance": v1.tolist()},
                                 "gstools": {"estimate": e2.tolist(), "variance": v2.tolist()}}))

    # Axis-aligned geometric anisotropy (GSTools len_scale per axis).
    an = {"type": "aniso_exp", "c": 1.5, "lengths": [60.0, 30.0, 8.0]}
    for kind in ["ordinary", "simple", "external_drift"]:
        e2, v2 = gs_krige(kind, an, pts, z, tg, mean=mean, f=f, f0=f0)
        case = dict(base, name=f"random_3d_aniso_{kind}", kind=kind, model=an,
                    reference={"gstools": {"estimate": e2.tolist(), "variance": v2.tolist()}})
        if kind == "simple":
            case["mean"] = mean
        if kind == "external_drift":
            case["drift"] = f.tolist()
            case["target_drift"] = f0.tolist()
        cases.append(case)

    meta = {"script": "tests/reference/kriging_reference.py", "pykrige": pykrige.__version__,
            "gstools": gs.__version__, "numpy": np.__version__}
    with open(out, "w") as fh:
        json.dump({"meta": meta, "cases": cases}, fh, indent=1)
        fh.write("\n")


if __name__ == "__main__":
    main()
