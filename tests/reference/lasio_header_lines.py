#!/usr/bin/env python3
"""lasio's split of single LAS header lines, for the header-line test in
src/formats/las/header.rs.

  python lasio_header_lines.py --write-golden OUT.json
      generates 2500 random header-like lines (seeded, fixed alphabet of LAS
      pieces: dots, colons, spaces, tabs, digits, times, brackets), splits each
      with lasio.reader.read_header_line for the sections Well (any), Curves and
      Parameter, and writes {"lines": [...], "results": {...}}.
  python lasio_header_lines.py < lines.json
      reads a JSON list of lines on stdin and prints the results (live mode).

A result is [name, unit, value, descr], or null where lasio raises an error.
"""

import json
import random
import sys

from lasio.reader import read_header_line

SECTIONS = {"Other": None, "Curves": "Curves", "Parameter": "Parameter"}

PIECES = [
    "DEPT", "GR", "a", "Z9", ".", ".", ".", "..", ":", ":", " ", " ", "  ", "\t",
    "M", "FT", "1000", "25", "-999.25", "12:30", "23:59", " 14", "hh", "mm", "HH",
    ":00", "[M]", "(FT)", "1000 LBF", "x y", "-", "_", "05", "3",
]


def split(line, section):
    try:
        d = read_header_line(line, section_name=section)
    except Exception:
        return None
    return [d["name"], d["unit"], d["value"], d["descr"]]


def results(lines):
    return {k: [split(l, sec) for l in lines] for k, sec in SECTIONS.items()}


def make_lines(n):
    rng = random.Random(20240611)
    out = []
    while len(out) < n:
        k = rng.randint(1, 10)
        line = "".join(rng.choice(PIECES) for _ in range(k)).strip()
        if not line or line[0] in "#~":
            continue
        out.append(line)
    return out


def main(argv):
    if len(argv) == 2 and argv[0] == "--write-golden":
        lines = make_lines(2500)
        with open(argv[1], "w") as fh:
            json.dump({"lines": lines, "results": results(lines)}, fh, indent=0)
            fh.write("\n")
        return 0
    lines = json.load(sys.stdin)
    json.dump(results(lines), sys.stdout)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
