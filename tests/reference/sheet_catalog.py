#!/usr/bin/env python3
"""The worked examples of the worksheet function catalog, recomputed independently
with mpmath at 40 significant digits (and Python's decimal module for ROUND), from
the textbook formulas alone: Af = A/(1 + A*beta), T = A*beta, D = 1 + A*beta,
impedances scaled by D per topology, dB = 20*log10|ratio| or 10*log10(ratio).

Writes tests/reference/data/sheet_catalog.json, which tests/sheet_catalog.rs
compares with the values the catalog states and with what the engine evaluates.
Run again with --check to recompute and compare with the committed file (exit 1 on
a mismatch).

    ~/.cache/loopwright/venv/bin/python tests/reference/sheet_catalog.py [--check]
"""
import json
import sys
from decimal import ROUND_HALF_UP, Decimal
from pathlib import Path

import mpmath as mp

mp.mp.dps = 40
OUT = Path(__file__).parent / "data" / "sheet_catalog.json"
M = mp.mpf


def gain(a, b):
    return a / (1 + a * b)


def spread(b, a_min, a_typ, a_max):
    lo, ty, hi = gain(a_min, b), gain(a_typ, b), gain(a_max, b)
    scale = 100 / abs(ty)
    spread_pct = (hi - lo) * scale
    positive = any(abs(1 + a * b) < 1 for a in (a_min, a_max))
    return [lo, ty, hi, (lo - ty) * scale, (hi - ty) * scale, spread_pct, spread_pct * 10**4, ty / a_typ, 1 if positive else 0]


def phasor(a, b):
    t = a * b
    d = 1 + t
    af = a / d
    return [abs(af), mp.degrees(mp.arg(af)), abs(t), mp.degrees(mp.arg(t)), 20 * mp.log10(abs(d))]


def summary(a, b):
    t = a * b
    d = 1 + t
    af = a / d
    return [af, t, d, 20 * mp.log10(abs(d)), af / a, 1 / b, af * b - 1]


def impedances_series_series(zi, zo, a, b):
    # Series mixing multiplies Zi by D; current (series) sampling multiplies Zo by D.
    d = 1 + a * b
    zin, zout = zi * d, zo * d
    return [zin.real, zin.imag, zout.real, zout.imag]


def round_half_up(text, digits):
    return Decimal(text).quantize(Decimal(1).scaleb(-digits), rounding=ROUND_HALF_UP)


CASES = {
    "=SUM(1; 2.5; 4k7)": [M(1) + M("2.5") + M(4700)],
    "=MIN(3; -2; 7)": [M(-2)],
    "=MAX(3; -2; 7)": [M(7)],
    "=AVERAGE(1; 2; 6)": [M(9) / 3],
    "=ABS(-2.5)": [M("2.5")],
    "=SQRT(2)": [mp.sqrt(2)],
    "=EXP(1)": [mp.e],
    "=LN(10)": [mp.log(10)],
    "=LOG10(1k)": [mp.log10(1000)],
    "=PI()": [mp.pi],
    "=ROUND(2.675; 2)": [M(str(round_half_up("2.675", 2)))],
    "=IF(2 > 1; 10; 1/0)": [M(10)],
    "=DB.VOLTAGE(10)": [20 * mp.log10(10)],
    "=DB.POWER(100)": [10 * mp.log10(100)],
    "=DB.VOLTAGERATIO(40dB)": [mp.power(10, M(40) / 20)],
    "=DB.POWERRATIO(30 dB)": [mp.power(10, M(30) / 10)],
    "=FB.GAIN(100k; 0.01)": [gain(M(10**5), M("0.01"))],
    "=FB.LOOPGAIN(100k; 0.01)": [M(10**5) * M("0.01")],
    "=FB.AMOUNT(100k; 0.01)": [1 + M(10**5) * M("0.01")],
    "=FB.AMOUNTDB(100k; 0.01)": [20 * mp.log10(1 + M(10**5) * M("0.01"))],
    "=FB.SENSITIVITY(100k; 0.01)": [1 / (1 + M(10**5) * M("0.01"))],
    "=FB.BETA(100k; 100)": [1 / M(100) - 1 / M(10**5)],
    "=FB.MINGAIN(0.01; 0.1%)": [(1 - M("0.001")) / (M("0.001") * M("0.01"))],
    "=FB.CEILING(100k; 100)": [M(10**5) / 100, (M(100) - 1) / M(10**5)],
    "=FB.SPREAD(0.01; 50k; 100k; 200k)": spread(M("0.01"), M(5 * 10**4), M(10**5), M(2 * 10**5)),
    "=FB.ZIN(\"series-shunt\"; 1MΩ; 100k; 0.01)": [M(10**6) * (1 + M(10**5) * M("0.01"))],
    "=FB.ZOUT(\"voltage-series\"; 75 ohm; 100k; 0.01)": [M(75) / (1 + M(10**5) * M("0.01"))],
    "=FB.IMPEDANCES(\"series-series\"; 1k; -1k; 10; 0; 0; 10; 0.1; 0)": impedances_series_series(
        mp.mpc(1000, -1000), mp.mpc(10, 0), mp.mpc(0, 10), mp.mpc("0.1", 0)
    ),
    "=FB.PHASOR(0; 100; 0.01; 0)": phasor(mp.mpc(0, 100), mp.mpc("0.01", 0)),
    "=FB.SUMMARY(\"series-shunt\"; 100k; 0.01)": summary(M(10**5), M("0.01")),
}


def evaluate():
    return {"cases": [{"formula": f, "expected": [float(x) for x in xs]} for f, xs in CASES.items()]}


def main():
    result = evaluate()
    if "--check" in sys.argv:
        committed = json.loads(OUT.read_text())
        bad = 0
        old = {c["formula"]: c["expected"] for c in committed["cases"]}
        for case in result["cases"]:
            prev = old.get(case["formula"])
            if prev is None or len(prev) != len(case["expected"]):
                print(f"sheet_catalog {case['formula']}: missing or of another length in the committed file")
                bad += 1
                continue
            scale = max([abs(v) for v in case["expected"]] + [1e-300])
            for i, (v, w) in enumerate(zip(case["expected"], prev)):
                if abs(v - w) > 1e-9 * max(abs(v), abs(w), 1e-300 if v != 0 else scale):
                    print(f"sheet_catalog {case['formula']} item {i}: {v} != committed {w}")
                    bad += 1
        if len(result["cases"]) != len(committed["cases"]):
            print("sheet_catalog: case count differs")
            bad += 1
        sys.exit(1 if bad else 0)
    OUT.write_text(json.dumps(result, indent=1, ensure_ascii=False) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
