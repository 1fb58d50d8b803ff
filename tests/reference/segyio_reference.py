#!/usr/bin/env python3
"""Reference side of the SEG-Y tests: what segyio (PyPI, tested with 1.9.14)
reads from a file, and SEG-Y files written by segyio for our reader.

Used by tests/segy_segyio.rs, live when STRATIPRIOR_PYTHON points at an
interpreter with segyio and numpy, otherwise through the golden files in
tests/golden/segy/ that this script wrote.

Commands
  dump FILE.sgy OUT.json [big|little]
      segyio.open(FILE) with DEFAULT settings (iline=189, xline=193; endian as
      given, default big) and write what segyio reads as JSON: binary header
      fields, ilines/xlines/samples, per-trace header fields (raw integers,
      no scalar applied), sample values (float32 as uint32 bit patterns,
      float64 as uint64 bit patterns, integers as integers), the textual
      header as segyio decodes it (f.text[0], f.text[1:]).
  make OUTDIR
      write the segyio-created test files NAME.sgy into OUTDIR, each with its
      dump NAME.json.
  cp037 OUT.json
      the EBCDIC code page 037 table of Python's codec (byte -> code point).

Regenerating the golden files (after changing the writer or this script):
  STRATIPRIOR_PYTHON=/work/venv/bin/python STRATIPRIOR_REGEN_GOLDEN=1 \
      cargo test --test segy_segyio
"""

import json
import math
import sys
from importlib import metadata

import numpy as np
import segyio

BIN_FIELDS = [
    "JobID", "LineNumber", "ReelNumber", "Traces", "Interval", "IntervalOriginal",
    "Samples", "SamplesOriginal", "Format", "EnsembleFold", "SortingCode",
    "VerticalSum", "MeasurementSystem", "SEGYRevision", "SEGYRevisionMinor",
    "TraceFlag", "ExtendedHeaders",
]

TRACE_FIELDS = {
    "seq_line": segyio.TraceField.TRACE_SEQUENCE_LINE,
    "seq_file": segyio.TraceField.TRACE_SEQUENCE_FILE,
    "cdp": segyio.TraceField.CDP,
    "trace_in_ensemble": segyio.TraceField.CDP_TRACE,
    "trace_id": segyio.TraceField.TraceIdentificationCode,
    "scalar": segyio.TraceField.SourceGroupScalar,
    "source_x": segyio.TraceField.SourceX,
    "source_y": segyio.TraceField.SourceY,
    "group_x": segyio.TraceField.GroupX,
    "group_y": segyio.TraceField.GroupY,
    "coord_units": segyio.TraceField.CoordinateUnits,
    "delay": segyio.TraceField.DelayRecordingTime,
    "ns": segyio.TraceField.TRACE_SAMPLE_COUNT,
    "dt": segyio.TraceField.TRACE_SAMPLE_INTERVAL,
    "cdp_x": segyio.TraceField.CDP_X,
    "cdp_y": segyio.TraceField.CDP_Y,
    "iline": segyio.TraceField.INLINE_3D,
    "xline": segyio.TraceField.CROSSLINE_3D,
}


def text_lines(raw):
    s = bytes(raw).decode("latin-1")
    return [s[k:k + 80] for k in range(0, len(s), 80)]


def sample_payload(tr):
    if tr.dtype == np.float32:
        return tr.view(np.uint32).tolist()
    if tr.dtype == np.float64:
        return tr.view(np.uint64).tolist()
    return tr.tolist()


def dump(path, out, endian="big"):
    with segyio.open(path, endian=endian) as f:
        d = {
            "segyio_version": metadata.version("segyio"),
            "endian": endian,
            "text": text_lines(f.text[0]),
            "ext_text": [text_lines(f.text[k]) for k in range(1, 1 + f.ext_headers)],
            "bin": {k: int(f.bin[getattr(segyio.BinField, k)]) for k in BIN_FIELDS},
            "ilines": [int(v) for v in f.ilines],
            "xlines": [int(v) for v in f.xlines],
            "sorting": int(f.sorting),
            "samples": [float(v) for v in f.samples],
            "tracecount": int(f.tracecount),
            "dtype": str(f.dtype),
            "traces": [],
        }
        for i in range(f.tracecount):
            h = f.header[i]
            t = {k: int(h[v]) for k, v in TRACE_FIELDS.items()}
            t["data"] = sample_payload(np.asarray(f.trace[i]))
            d["traces"].append(t)
    with open(out, "w") as fh:
        json.dump(d, fh, indent=0)


def values(n, seed):
    """Deterministic test values with a wide range of magnitudes and signs."""
    rng = np.random.default_rng(seed)
    v = rng.normal(0.0, 1.0, n) * 10.0 ** rng.integers(-6, 7, n)
    return v.astype(np.float32)


def create(path, fmt, ilines, xlines, ns, dt_us, delrt, scalar, origin, step,
           az_deg, endian="big", sorting=segyio.TraceSortingFormat.INLINE_SORTING,
           ext_text=None, dtype=np.float32, seed=1):
    """A 3-D file with segyio's full-spec writer; traces carry coordinates on a
    rotated grid, stored as integers with the given scalar."""
    spec = segyio.spec()
    spec.ilines = ilines
    spec.xlines = xlines
    spec.samples = list(range(ns))
    spec.format = fmt
    spec.sorting = sorting
    spec.endian = endian
    spec.ext_headers = 0 if ext_text is None else 1
    az = math.radians(az_deg)
    factor = (1.0 / -scalar) if scalar < 0 else float(max(scalar, 1))
    if sorting == segyio.TraceSortingFormat.INLINE_SORTING:
        order = [(i, j) for i in range(len(ilines)) for j in range(len(xlines))]
    else:
        order = [(i, j) for j in range(len(xlines)) for i in range(len(ilines))]
    vals = values(len(order) * ns, seed)
    if np.issubdtype(dtype, np.integer):
        info = np.iinfo(dtype)
        vals = np.clip(np.round(vals), info.min, info.max)
    vals = vals.astype(dtype)
    with segyio.create(path, spec) as f:
        f.text[0] = segyio.tools.create_text_header(
            {1: "segyio-written test file for stratiprior", 2: "format %d %s" % (fmt, endian)})
        if ext_text is not None:
            f.text[1] = segyio.tools.create_text_header({1: ext_text})
        for tr, (i, j) in enumerate(order):
            x = origin[0] + j * step[1] * math.sin(az) + i * step[0] * math.cos(az)
            y = origin[1] + j * step[1] * math.cos(az) - i * step[0] * math.sin(az)
            f.header[tr] = {
                segyio.TraceField.INLINE_3D: ilines[i],
                segyio.TraceField.CROSSLINE_3D: xlines[j],
                segyio.TraceField.TRACE_SEQUENCE_FILE: tr + 1,
                segyio.TraceField.SourceGroupScalar: scalar,
                segyio.TraceField.CDP_X: int(round(x / factor)),
                segyio.TraceField.CDP_Y: int(round(y / factor)),
                segyio.TraceField.TRACE_SAMPLE_COUNT: ns,
                segyio.TraceField.TRACE_SAMPLE_INTERVAL: dt_us,
                segyio.TraceField.DelayRecordingTime: delrt,
            }
            f.trace[tr] = vals[tr * ns:(tr + 1) * ns]
        f.bin.update(hdt=dt_us, hns=ns, format=fmt, mfeet=1)


FILES = [
    # name, kwargs
    ("segyio_ibm", dict(fmt=1, ilines=[5, 6, 7], xlines=[20, 21, 22, 23], ns=6,
                        dt_us=2500, delrt=1200, scalar=-10, origin=(452000.3, 6702000.7),
                        step=(25.0, 12.5), az_deg=30.0, seed=11)),
    ("segyio_ieee_le_xl_sorted", dict(fmt=5, ilines=[1, 2, 3], xlines=[101, 102], ns=5,
                                      dt_us=4000, delrt=-40, scalar=10,
                                      origin=(300000.0, 5000000.0), step=(50.0, 30.0),
                                      az_deg=120.0, endian="little",
                                      sorting=segyio.TraceSortingFormat.CROSSLINE_SORTING,
                                      ext_text="extended textual header card", seed=12)),
    ("segyio_int32", dict(fmt=2, ilines=[1, 2], xlines=[1, 2], ns=4, dt_us=1000, delrt=0,
                          scalar=1, origin=(1000.0, 2000.0), step=(10.0, 10.0), az_deg=0.0,
                          dtype=np.int32, seed=13)),
    ("segyio_int16", dict(fmt=3, ilines=[1, 2], xlines=[1, 2], ns=4, dt_us=1000, delrt=0,
                          scalar=0, origin=(1000.0, 2000.0), step=(10.0, 10.0), az_deg=0.0,
                          dtype=np.int16, seed=14)),
    ("segyio_int8", dict(fmt=8, ilines=[1, 2], xlines=[1, 2], ns=4, dt_us=1000, delrt=0,
                         scalar=-1000, origin=(1000.0, 2000.0), step=(10.0, 10.0), az_deg=0.0,
                         dtype=np.int8, seed=15)),
    ("segyio_f64", dict(fmt=6, ilines=[1, 2], xlines=[1, 2], ns=4, dt_us=1000, delrt=0,
                        scalar=-100, origin=(1000.0, 2000.0), step=(10.0, 10.0), az_deg=0.0,
                        dtype=np.float64, seed=16)),
]


def make(outdir):
    import os
    os.makedirs(outdir, exist_ok=True)
    for name, kw in FILES:
        p = os.path.join(outdir, name + ".sgy")
        create(p, **kw)
        dump(p, os.path.join(outdir, name + ".json"), kw.get("endian", "big"))


def cp037(out):
    table = [ord(bytes([b]).decode("cp037")) for b in range(256)]
    with open(out, "w") as fh:
        json.dump({"source": "Python codecs cp037", "table": table}, fh)


if __name__ == "__main__":
    cmd = sys.argv[1]
    if cmd == "dump":
        dump(sys.argv[2], sys.argv[3], sys.argv[4] if len(sys.argv) > 4 else "big")
    elif cmd == "make":
        make(sys.argv[2])
    elif cmd == "cp037":
        cp037(sys.argv[2])
    else:
        sys.exit("unknown command " + cmd)
