#!/usr/bin/env python3
"""Oracle for the worked gain-48 case in worksheet cells (docs/tolerance.md,
"The worked case in cells"; tests/tolerance_sheet.rs).

The stage: non-inverting, G = A/(1 + A*beta), beta = Rg/(Rf + Rg), the
amplifier single-pole with the gain-bandwidth product held across the A0
spread, A(f) = A0/(1 + j f A0/GBW), A0 min/typ/max 5e4/2e5/1e6 (split
log-normal with min and max at 3 sigma, as src/network/montecarlo.rs),
GBW = 10 MHz; Rf drifts +25 ppm/K and Rg -25 ppm/K from 25 degC (the linear
coefficient of IEC 60115-1, from memory), both uniform within their grade.
Spec: |G(1 kHz)| within 48 +- 0.5 % at both 0 and 70 degC.

For each pair and grade: numpy Monte Carlo of 400 000 trials
(numpy.random.default_rng(4848)), the share meeting the spec at both
temperatures; and the brute-force worst case of 20 log10 |G(1 kHz)| over the
2^3 corners (Rf, Rg at +-grade, A0 at min and max) at both temperatures, with
the nominal at 0 degC.

tests/tolerance_sheet.rs runs the same cells with its own seeded Monte Carlo
and compares the yields within 4 standard errors of the difference,
sqrt(p(1 - p)(1/N_rust + 1/N_numpy)) (0 and 1 exactly when every corner is
inside or outside the spec), and the worst case within 1e-9 dB.

"spec" (below, spec_case): the same stage against a spec of two limits in
cells, judged together (TOLERANCE.SPECYIELD).

Writes tests/reference/data/tolerance_sheet.json; `--check` recomputes and
compares (rel. tol. 1e-12; the Monte Carlo is seeded, so identical).
"""
import itertools
import math
import pathlib

import numpy as np
from refdata import write_or_check

OUT = pathlib.Path(__file__).parent / "data" / "tolerance_sheet.json"
REL_TOL = 1e-12
K = 3.0
A0 = (5e4, 2e5, 1e6)
GBW = 1e7
F = 1e3
TEMPS = (0.0, 70.0)
PAIRS = [("E96 11.5k/243", 11.5e3, 243.0), ("E192 47.5k/1.01k", 47.5e3, 1.01e3),
         ("47k/1k", 47e3, 1e3)]
GRADES = (0.01, 0.001)
N = 400_000


def split_lognormal(rng, n, lo, typ, hi):
    l, m, h = math.log(lo), math.log(typ), math.log(hi)
    z = rng.standard_normal(n)
    bad = np.abs(z) > K
    while bad.any():
        z[bad] = rng.standard_normal(bad.sum())
        bad = np.abs(z) > K
    sigma = np.where(z < 0, (m - l) / K, (h - m) / K)
    return np.clip(np.exp(m + sigma * z), lo, hi)


def gain(rf, rg, a0, t):
    rf = rf * (1 + 25e-6 * (t - 25))
    rg = rg * (1 - 25e-6 * (t - 25))
    a = a0 / (1 + 1j * F * a0 / GBW)
    return np.abs(a / (1 + a * rg / (rf + rg)))


def case(rf, rg, grade, rng):
    rfs = rf * (1 + grade * (2 * rng.random(N) - 1))
    rgs = rg * (1 + grade * (2 * rng.random(N) - 1))
    a0s = split_lognormal(rng, N, *A0)
    ok = np.ones(N, dtype=bool)
    for t in TEMPS:
        g = gain(rfs, rgs, a0s, t)
        ok &= (g >= 48 * 0.995) & (g <= 48 * 1.005)
    corners = [20 * math.log10(float(gain(x, y, a, t)))
               for x, y, a in itertools.product((rf * (1 - grade), rf * (1 + grade)),
                                                (rg * (1 - grade), rg * (1 + grade)),
                                                (A0[0], A0[2]))
               for t in TEMPS]
    return {
        "trials": N,
        "yield": float(ok.mean()),
        "worstDb": [min(corners), 20 * math.log10(float(gain(rf, rg, A0[1], TEMPS[0]))), max(corners)],
        "specDb": [20 * math.log10(48 * 0.995), 20 * math.log10(48 * 1.005)],
    }


# The spec in cells (TOLERANCE.SPECYIELD): the 47k/1k pair at 1 %, the same
# tempcos and A0 spread, the GBW spread 8/10/12 MHz (split log-normal, min and
# max at 3 sigma, as A0), and a spec of two limits judged together at 0 and
# 70 degC: |G(1 kHz)| within 48 +- 0.5 % and the -3 dB bandwidth at least
# 200 kHz. With one pole the closed loop has one pole, so the bandwidth is
# exactly GBW (beta + 1/A0). numpy Monte Carlo (default_rng(4849)): the share
# meeting both limits at both temperatures, each limit's share, and the
# bandwidth's mean over trials and temperatures; the nominal figures at 0 degC
# and the bandwidth's corners (2^4: Rf, Rg, A0, GBW at their extremes).
SPEC_GBW = (8e6, 1e7, 1.2e7)
SPEC_BW_MIN = 2e5


def drifted(rf, rg, t):
    return rf * (1 + 25e-6 * (t - 25)), rg * (1 - 25e-6 * (t - 25))


def gain_at(rf, rg, a0, gbw, t):
    rf, rg = drifted(rf, rg, t)
    a = a0 / (1 + 1j * F * a0 / gbw)
    return np.abs(a / (1 + a * rg / (rf + rg)))


def bandwidth(rf, rg, a0, gbw, t):
    rf, rg = drifted(rf, rg, t)
    return gbw * (rg / (rf + rg) + 1 / a0)


def spec_case(rng):
    rf, rg, grade = 47e3, 1e3, 0.01
    rfs = rf * (1 + grade * (2 * rng.random(N) - 1))
    rgs = rg * (1 + grade * (2 * rng.random(N) - 1))
    a0s = split_lognormal(rng, N, *A0)
    gbws = split_lognormal(rng, N, *SPEC_GBW)
    gain_ok = np.ones(N, dtype=bool)
    bw_ok = np.ones(N, dtype=bool)
    bws = []
    for t in TEMPS:
        g = gain_at(rfs, rgs, a0s, gbws, t)
        gain_ok &= (g >= 48 * 0.995) & (g <= 48 * 1.005)
        b = bandwidth(rfs, rgs, a0s, gbws, t)
        bw_ok &= b >= SPEC_BW_MIN
        bws.append(b)
    bws = np.concatenate(bws)
    corners = [float(bandwidth(x, y, a, g, t))
               for x, y, a, g in itertools.product((rf * (1 - grade), rf * (1 + grade)),
                                                   (rg * (1 - grade), rg * (1 + grade)),
                                                   (A0[0], A0[2]), (SPEC_GBW[0], SPEC_GBW[2]))
               for t in TEMPS]
    return {
        "trials": N,
        "yieldAll": float((gain_ok & bw_ok).mean()),
        "yieldGain": float(gain_ok.mean()),
        "yieldBandwidth": float(bw_ok.mean()),
        "gainNominalDb": 20 * math.log10(float(gain_at(rf, rg, A0[1], SPEC_GBW[1], TEMPS[0]))),
        "bandwidthNominalHz": float(bandwidth(rf, rg, A0[1], SPEC_GBW[1], TEMPS[0])),
        "bandwidthMeanHz": float(bws.mean()),
        "bandwidthSdHz": float(bws.std(ddof=1)),
        "bandwidthCornersHz": [min(corners), max(corners)],
        "specDb": [20 * math.log10(48 * 0.995), 20 * math.log10(48 * 1.005)],
    }


def make():
    rng = np.random.default_rng(4848)
    data = {f"{name} {grade * 100:g}%": case(rf, rg, grade, rng)
            for name, rf, rg in PAIRS for grade in GRADES}
    data["spec"] = spec_case(np.random.default_rng(4849))
    return data


def main():
    data = make()
    write_or_check(data, OUT, REL_TOL, abs_tol=1e-300, summary="the worked gain-48 case in cells matches")


if __name__ == "__main__":
    main()
