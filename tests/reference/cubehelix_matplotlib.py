#!/usr/bin/env python3
"""Reference values of the cubehelix colour scheme (Green 2011) from matplotlib
(PyPI) for tests/report_colour.rs.

Usage:  python tests/reference/cubehelix_matplotlib.py [OUT.json]
Default OUT: tests/golden/report/cubehelix_matplotlib.json (the committed golden file).
Pinned version used for the committed file: matplotlib==3.10.9
(tests/reference/requirements.txt).

matplotlib implements Green's equation 2 in matplotlib._cm.cubehelix(gamma, s,
r, h), which returns the red, green and blue channel functions of the fraction
x in [0, 1] (a private helper, hence the pinned version; the public colormap
"cubehelix" is a 256-entry table of the same functions at the defaults).
Cases: the defaults (gamma 1, s 0.5, r -1.5, h 1) and the report's own scale
(s 2.4, r -0.9, h 1.15, gamma 1) evaluated at the lightness fractions
t = 0.12 + 0.82 f that stratiprior's REPORT_SCALE maps f onto.
"""
import json
import sys

import numpy as np
from matplotlib import _cm

out = sys.argv[1] if len(sys.argv) > 1 else "tests/golden/report/cubehelix_matplotlib.json"
f = np.linspace(0.0, 1.0, 41)
cases = []
for name, (gamma, s, r, h), lo, hi in [
    ("defaults", (1.0, 0.5, -1.5, 1.0), 0.0, 1.0),
    ("report", (1.0, 2.4, -0.9, 1.15), 0.12, 0.94),
]:
    d = _cm.cubehelix(gamma=gamma, s=s, r=r, h=h)
    t = lo + (hi - lo) * f
    rgb = np.stack([np.asarray(d[c](t), dtype=float) for c in ("red", "green", "blue")], axis=1)
    cases.append({
        "name": name, "gamma": gamma, "start": s, "rotations": r, "hue": h,
        "lightness_low": lo, "lightness_high": hi,
        "f": f.tolist(), "rgb": rgb.tolist(),
    })
with open(out, "w") as fh:
    json.dump({"cases": cases}, fh, indent=1)
