"""Reference moving-window Backus averages from bruges (PyPI), for
tests/rockphysics_bruges.rs.

Usage: python tests/reference/bruges_backus.py OUT.json

Writes a seeded random well log (blocky Vp/Vs/density with a few nulls, regular
sampling) and what bruges.rockphysics.anisotropy computes on it:
backus_parameters (Liner's A, C, F, L, M = C11, C33, C13, C44, C66),
thomsen_parameters (delta, epsilon, gamma) and backus (Vp0, Vs0, rho).

bruges windows with bruges.util.moving_average: the log is edge-padded by
int(N/2) samples and convolved with a boxcar of int(N) samples, N = lb/dz, so
every sample has the same thickness and a window of N samples centred on it.
That is exactly the definition only for an odd integer N, so we use one and
check it. NaN (null) inputs make NaN outputs in every window that holds them.

Generated golden: tests/golden/rockphysics/bruges_backus.json
(regenerate with /work/venv/bin/python tests/reference/bruges_backus.py
tests/golden/rockphysics/bruges_backus.json). Tested with bruges 0.5.4,
numpy 2.4.6, scipy 1.17.1, matplotlib 3.10.9 (bruges imports matplotlib).
"""
import json
import sys

import numpy as np

try:
    import bruges
    from bruges.rockphysics.anisotropy import (backus, backus_parameters,
                                                thomsen_parameters)
except ImportError as exc:  # reported to the Rust test, which decides
    sys.stderr.write(f"bruges is not importable: {exc}\n")
    sys.exit(3)


def blocky_log(rng, n):
    """Blocky layers of 1-12 samples with Vp 2200-4800 m/s, Vp/Vs 1.6-2.3,
    Gardner-like density, plus 1% noise per sample."""
    vp = np.empty(n)
    vs = np.empty(n)
    rho = np.empty(n)
    k = 0
    while k < n:
        t = int(rng.integers(1, 13))
        v = rng.uniform(2200.0, 4800.0)
        r = rng.uniform(1.6, 2.3)
        d = 310.0 * v ** 0.25 * rng.uniform(0.95, 1.05)
        vp[k:k + t] = v
        vs[k:k + t] = v / r
        rho[k:k + t] = d
        k += t
    vp *= 1.0 + 0.01 * rng.standard_normal(n)
    vs *= 1.0 + 0.01 * rng.standard_normal(n)
    rho *= 1.0 + 0.01 * rng.standard_normal(n)
    return vp, vs, rho


def nan_to_none(a):
    return [None if not np.isfinite(x) else float(x) for x in a]


def main():
    out = sys.argv[1]
    rng = np.random.default_rng(20261202)
    n = 400
    dz = 0.1524  # half a foot, a usual log sampling
    depth = 1850.0 + dz * np.arange(n)
    vp, vs, rho = blocky_log(rng, n)
    # Nulls: a gap in Vs, one in density, a single missing Vp.
    vs[120:126] = np.nan
    rho[300:303] = np.nan
    vp[211] = np.nan
    n_win = 21  # odd integer window in samples
    lb = n_win * dz
    assert lb / dz == n_win and int(lb / dz) == n_win, "window must be an odd integer"

    A, C, F, L, M = backus_parameters(vp, vs, rho, lb, dz)
    delta, epsilon, gamma = thomsen_parameters(vp, vs, rho, lb, dz)
    vp0, vs0, rho_avg = backus(vp, vs, rho, lb, dz)

    doc = {
        "source": "bruges.rockphysics.anisotropy.backus_parameters / thomsen_parameters "
                  "/ backus, window lb = N*dz with N odd",
        "bruges_version": bruges.__version__,
        "numpy_version": np.__version__,
        "window_samples": n_win,
        "dz": dz,
        "depth": depth.tolist(),
        "vp": nan_to_none(vp),
        "vs": nan_to_none(vs),
        "rho": nan_to_none(rho),
        "c11": nan_to_none(A),
        "c33": nan_to_none(C),
        "c13": nan_to_none(F),
        "c44": nan_to_none(L),
        "c66": nan_to_none(M),
        "epsilon": nan_to_none(epsilon),
        "delta": nan_to_none(delta),
        "gamma": nan_to_none(gamma),
        "vp0": nan_to_none(vp0),
        "vs0": nan_to_none(vs0),
        "rho_avg": nan_to_none(rho_avg),
    }
    with open(out, "w") as f:
        json.dump(doc, f, indent=0)
        f.write("\n")


if __name__ == "__main__":
    main()
