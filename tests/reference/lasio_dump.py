#!/usr/bin/env python3
"""Dump what the reference LAS reader lasio (PyPI) reads from LAS files, as JSON.

Used by tests/las_reference.rs:
  * live:   STRATIPRIOR_PYTHON=/path/to/python  cargo test --test las_reference
            (the test runs `python lasio_dump.py FILE...` and reads stdout)
  * golden: python tests/reference/lasio_dump.py --write-golden tests/golden/las FILE...
            writes one DIR/<file stem>.json per file, committed so that the test
            also runs where lasio is not installed.

lasio is called with its default settings (``lasio.read(path)``), except:
  * a file which is not valid UTF-8 is opened with ``encoding="latin-1"``: that
    is how stratiprior decodes such files, and without chardet lasio would guess
    from the first line only;
  * files listed in NORMAL_ENGINE are read with ``engine="normal"`` (lasio's
    pure-Python data reader) where its default numpy engine is known wrong.

Numbers are written as text (Python ``repr``, the shortest round-trip form) so
that the comparison in Rust is exact: JSON number parsing is not guaranteed to
be correctly rounded. Header values keep lasio's type: {"type": "int"|"float"|
"str", "text": ...}; missing samples (NaN) are null.
"""

import json
import math
import os
import sys

import lasio
import numpy as np


# lasio 0.31's numpy engine reads a one-column ~A section as a single row
# (np.genfromtxt returns a 1-D array, which lasio reshapes to one row of N
# columns, inventing curves UNKNOWN:1...); its normal engine reads it right.
NORMAL_ENGINE = {"single_curve_index_only.las"}


def typed(v):
    if isinstance(v, (bool, np.bool_)):
        return {"type": "str", "text": str(v)}
    if isinstance(v, (int, np.integer)):
        return {"type": "int", "text": str(int(v))}
    if isinstance(v, (float, np.floating)):
        f = float(v)
        if math.isnan(f):
            return {"type": "float", "text": None}
        return {"type": "float", "text": repr(f)}
    return {"type": "str", "text": str(v)}


def items(section):
    return [
        {
            "mnemonic": it.mnemonic,
            "original_mnemonic": it.original_mnemonic,
            "unit": it.unit,
            "value": typed(it.value),
            "descr": it.descr,
        }
        for it in section
    ]


def sample(v):
    f = float(v)
    return None if math.isnan(f) else repr(f)


def dump(path):
    with open(path, "rb") as fh:
        raw = fh.read()
    kwargs = {}
    try:
        raw.decode("utf-8")
    except UnicodeDecodeError:
        kwargs["encoding"] = "latin-1"
    if os.path.basename(path) in NORMAL_ENGINE:
        kwargs["engine"] = "normal"
    las = lasio.read(path, **kwargs)
    return {
        "file": os.path.basename(path),
        "lasio_version": lasio.__version__,
        "version": typed(las.version["VERS"].value),
        "wrap": typed(las.version["WRAP"].value),
        "null": typed(las.well["NULL"].value),
        "index_unit": las.index_unit,
        "sections": {
            "Version": items(las.version),
            "Well": items(las.well),
            "Curves": items(las.curves),
            "Parameter": items(las.params),
        },
        "other": las.other,
        "curves": [
            {
                "mnemonic": c.mnemonic,
                "unit": c.unit,
                "value": c.value,
                "descr": c.descr,
                "data": [sample(v) for v in np.asarray(c.data, dtype=float)],
            }
            for c in las.curves
        ],
    }


def main(argv):
    if len(argv) >= 2 and argv[0] == "--write-golden":
        out_dir = argv[1]
        os.makedirs(out_dir, exist_ok=True)
        for p in argv[2:]:
            stem = os.path.splitext(os.path.basename(p))[0]
            with open(os.path.join(out_dir, stem + ".json"), "w") as fh:
                json.dump(dump(p), fh, indent=1, ensure_ascii=True)
                fh.write("\n")
        return 0
    json.dump({os.path.basename(p): dump(p) for p in argv}, sys.stdout)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
