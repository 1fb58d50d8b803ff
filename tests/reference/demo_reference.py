"""Reference summary of a stratiprior demo folder, read with the PyPI libraries
lasio (LAS), segyio (SEG-Y) and numpy (.npy).

    python demo_reference.py DEMO_DIR            # print the summary as JSON
    python demo_reference.py DEMO_DIR --golden   # also write the golden files
                                                 # next to this script

Rerun with --golden on the repository top whenever the committed demo changes.
The golden files let `cargo test` check the committed demo on machines
without these libraries: demo_reference.json (the summary of the committed
demo, without demo_truth/) and npy_arange_2x3x4.npy (numpy.save of
arange(24, dtype='<f4').reshape(2, 3, 4)).
"""
import glob
import json
import os
import sys

import lasio
import numpy as np
import segyio


def las_summary(path):
    # the "normal" engine reads wrapped and unwrapped files alike
    las = lasio.read(path, engine="normal")
    curves = []
    for c in las.curves[1:]:
        d = np.asarray(c.data, dtype=float)
        ok = ~np.isnan(d)
        curves.append({
            "mnemonic": c.mnemonic,
            "unit": c.unit,
            "nulls": int((~ok).sum()),
            "mean": float(d[ok].mean()) if ok.any() else None,
        })
    idx = np.asarray(las.index, dtype=float)
    return {
        "version": str(las.version["VERS"].value),
        "wrap": str(las.version["WRAP"].value).upper(),
        "index_unit": las.curves[0].unit,
        "rows": int(len(idx)),
        "first": float(idx[0]),
        "last": float(idx[-1]),
        "well": str(las.well["WELL"].value),
        "curves": curves,
    }


def segy_summary(path):
    with segyio.open(path, iline=189, xline=193) as f:
        cube = segyio.tools.cube(f).astype(np.float64)
        out = {
            "inlines": [int(f.ilines[0]), int(len(f.ilines))],
            "xlines": [int(f.xlines[0]), int(len(f.xlines))],
            "samples": [float(f.samples[0]), float(f.samples[-1]), int(len(f.samples))],
            "mean": float(cube.mean()),
            "min": float(cube.min()),
            "max": float(cube.max()),
        }
    return out


def npy_summary(path):
    a = np.load(path)
    return {"shape": list(a.shape), "dtype": str(a.dtype), "mean": float(a.astype(np.float64).mean())}


def main():
    root = sys.argv[1]
    golden = "--golden" in sys.argv[2:]
    out = {"las": {}, "segy": {}, "npy": {}}
    for p in sorted(glob.glob(os.path.join(root, "demo_wells", "*.las"))):
        out["las"][os.path.basename(p)] = las_summary(p)
    for p in sorted(glob.glob(os.path.join(root, "demo_volumes", "*.sgy"))):
        out["segy"][os.path.basename(p)] = segy_summary(p)
    if not golden:
        for p in sorted(glob.glob(os.path.join(root, "demo_truth", "*.npy"))):
            out["npy"][os.path.basename(p)] = npy_summary(p)
    text = json.dumps(out, indent=1, sort_keys=True)
    if golden:
        here = os.path.dirname(os.path.abspath(__file__))
        with open(os.path.join(here, "demo_reference.json"), "w") as f:
            f.write(text + "\n")
        np.save(os.path.join(here, "npy_arange_2x3x4.npy"),
                np.arange(24, dtype="<f4").reshape(2, 3, 4))
    print(text)


if __name__ == "__main__":
    main()
