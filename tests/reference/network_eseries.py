#!/usr/bin/env python3
"""Reference E-series tables and standard-value lookups from the PyPI `eseries` package.

Source of the tables: IEC 60063:2015, *Preferred number series for resistors and
capacitors*, as transcribed by the `eseries` package (its tables are the standard's,
including the E24-and-below values that differ from the rounded geometric ones).

Writes tests/reference/data/network_eseries.json with, per series, the decade table,
the customary tolerance and, for a fixed set of query values, the nearest value, the
smallest value >= x, the largest <= x, the smallest > x and the largest < x.
tests/network_eseries.rs compares loopwright with it.

    ~/.cache/loopwright/venv/bin/python tests/reference/network_eseries.py          # write
    ~/.cache/loopwright/venv/bin/python tests/reference/network_eseries.py --check  # compare
"""
import pathlib

import numpy as np
import eseries
from refdata import write_or_check

OUT = pathlib.Path(__file__).resolve().parent / "data" / "network_eseries.json"
SEED = 20261202
REL_TOL = 1e-9


def queries():
    rng = np.random.default_rng(SEED)
    # Log-uniform over 1 mΩ … 1 GΩ (and pF-range values), plus edges.
    xs = list(10.0 ** rng.uniform(-12.0, 9.0, 300))
    xs += [1.0, 10.0, 4700.0, 4.7, 0.47, 9.99, 10.01, 999.0, 1001.0, 1e-12, 3.3e-9, 920.0, 9.19, 12345.0]
    # Arithmetic midpoints between neighbours (ties for nearest: lower wins).
    xs += [(1.0 + 1.5) / 2, (4.7 + 5.1) / 2, (100.0 + 102.0) / 2]
    return [float(x) for x in xs]


def build():
    data = {"source": "PyPI eseries package (IEC 60063 tables)", "seed": SEED, "series": {}}
    xs = queries()
    for key in eseries.series_keys():
        cases = []
        for x in xs:
            cases.append({
                "x": x,
                "nearest": eseries.find_nearest(key, x),
                "up": eseries.find_greater_than_or_equal(key, x),
                "down": eseries.find_less_than_or_equal(key, x),
                "above": eseries.find_greater_than(key, x),
                "below": eseries.find_less_than(key, x),
            })
        data["series"][key.name] = {
            "table": list(eseries.series(key)),
            "tolerance": eseries.tolerance(key),
            "cases": cases,
        }
    return data


def main():
    data = build()
    write_or_check(data, OUT, REL_TOL, summary=f"network_eseries: {sum(len(s['cases']) for s in data['series'].values())} cases match")


if __name__ == "__main__":
    main()
