#!/usr/bin/env python3
"""Oracle for whole-stage tolerance (src/tolerance, docs/tolerance.md).

Stages (all non-inverting, the amplifier a single- or two-pole model with ideal
input and output, so the closed-loop gain is G = A/(1 + A*beta), beta = Rg/(Rf + Rg),
A(s) = A0/((1 + s/wp)(1 + s/w2)), wp = 2*pi*GBW/A0, the gain-bandwidth product held
across the A0 spread):

1. "ideal48": Rf = 47k, Rg = 1k, each uniform +-1 %, an ideal amplifier; spec: the
   gain within 48 +- 0.5 %. Yield in closed form: with u, v uniform on [-t, t],
   the share of the square where c1 <= (1 + u)/(1 + v) <= c2; for each v the
   admitted u is an interval whose clipped length is piecewise linear in v, so
   the trapezoid rule between its breakpoints is exact, done in exact rational
   arithmetic (fractions.Fraction).
2. "gain48": Rf = 47k uniform +-1 %, Rg = 1k normal +-1 % at 3 sigma (truncated
   there), A0 min/typ/max 5e4/2e5/1e6 (split log-normal, 3 sigma, as
   src/network/montecarlo.rs), GBW 10 MHz; figures: |G| in dB at 20 kHz and the
   gain error against 48 at 20 kHz in % (limits -1 .. 0). numpy Monte Carlo of
   400 000 trials (numpy.random.default_rng(18)): mean, sd, yield. Brute-force
   corner enumeration (itertools.product over the 2^3 extremes) of both figures:
   min, max and the part values giving them. sympy derivatives x*dF/dx of the
   gain in dB with respect to Rf, Rg, A0 and GBW at nominal.
3. "margin2": Rf = Rg = 1k uniform +-1 %, A0 as above, GBW min/typ/max
   7/10/13 MHz (split log-normal), a second pole at 8 MHz; figure: the phase
   margin, 180 + angle T at |T| = 1 (T = A*beta, crossover by scipy brentq on
   log f). numpy Monte Carlo of 20 000 trials: mean, sd, yield of PM >= 61 deg.

4. "rcloop": a circuit document no stage document describes: a non-inverting
   amplifier whose feedback is taken after an RC low-pass inside the loop
   (out -R3- x -C3- ground, x -Rf- fb -Rg- ground, the source at the
   non-inverting input), the amplifier ideal apart from A(s) (ro = 0, no
   input parts). The loop gain T = A*beta(s) with
   beta(s) = Zx/(R3 + Zx) * Rg/(Rf + Rg), Zx = 1/(s*C3 + 1/(Rf + Rg)), and the
   gain H = A/(1 + T) at node out. R3 uniform +-5 %, C3 normal +-10 % at
   3 sigma, Rf and Rg uniform +-1 %, A0 min/typ/max 5e4/2e5/1e6 and GBW
   7/10/13 MHz (split log-normal). Figures: |H| in dB at 10 kHz and the phase
   margin (crossover by brentq on log f). numpy Monte Carlo of 20 000 trials
   (default_rng(1819)): mean, sd, yield of PM >= 65 deg; brute-force corners
   (itertools.product over the 2^6 extremes) of both figures: min, max and
   the values giving them, in the circuit's draw order (R3, C3, Rf, Rg,
   U1.a0, U1.gbwHz).

5. "twoamp": two cascaded non-inverting stages, two amplifier elements with
   spreads on both (a circuit document, per-amplifier spreads): the source at
   U1's non-inverting input, U1 with Rf1 = 9k, Rg1 = 1k (gain 10) driving U2's
   non-inverting input, U2 with Rf2 = 4k, Rg2 = 1k (gain 5); each amplifier
   ideal apart from its single-pole A(s), so each stage's gain is
   G_i = 1/(beta_i + 1/A_i(s)) with 1/A_i = 1/A0_i + s/(2*pi*GBW_i) and
   H = G1*G2 (Franco, Design with Operational Amplifiers and Analog Integrated
   Circuits, 4th ed., section 6.1, from memory). Resistors uniform +-1 %, U1's
   A0 5e4/2e5/1e6 and GBW 7/10/13 MHz, U2's A0 1e5 exact and GBW 3.5/5/6.5 MHz
   (split log-normal). Figures: |H| in dB at 200 kHz and the -3 dB bandwidth,
   from |H|^-2 = prod(b_i^2 + (f/GBW_i)^2), b_i = beta_i + 1/A0_i: the
   quadratic x^2/(g1 g2)^2 + x (b1^2/g2^2 + b2^2/g1^2) - b1^2 b2^2 = 0 in
   x = f^2 (its positive root). numpy Monte Carlo of 20 000 trials
   (default_rng(1820)): mean, sd, yield of the bandwidth >= 600 kHz and of
   the gain >= 33.55 dB (the batch tool's gain limit);
   brute-force corners (the 2^7 extremes, draw order Rf1, Rg1, Rf2, Rg2,
   U1.a0, U1.gbwHz, U2.gbwHz).
6. "transcond": a current output (outputElement): the voltage-to-current
   stage with its load in the feedback path, U1's output -RL- fb -Rs- ground,
   the source at the non-inverting input, fb at the inverting one; the output
   is the current in RL, I/Vs = A/(RL + Rs + A*Rs) (A/V; ideally 1/Rs; Franco,
   4th ed., section 2.6, from memory). Rs = 1k uniform +-0.1 %, RL = 2k uniform
   +-5 %, A0 5e4/2e5/1e6, GBW 7/10/13 MHz. Figures: |I/Vs| in dB (re 1 A/V) at
   100 kHz and the gain error against 1 mA/V at 20 kHz (limits -0.5 .. 0 %).
   numpy Monte Carlo of 100 000 trials (default_rng(1821)): means, sds, the
   yield; brute-force corners (2^4, draw order RL, Rs, U1.a0, U1.gbwHz).

The Rust tests (tests/tolerance_stage.rs, tests/tolerance_circuit.rs) run its own seeded Monte Carlo and
compares mean and yield within 4 standard errors of the difference of two
independent estimates: for a mean sqrt(sd^2/N_rust + sd^2/N_numpy), for a
yield sqrt(p(1 - p)(1/N_rust + 1/N_numpy)); the closed-form yield within 4
sqrt(p(1 - p)/N_rust); the corners and sympy derivatives within the
tolerances stated there.

Writes tests/reference/data/tolerance_stage.json; `--check` recomputes and
compares (rel. tol. 1e-12; the Monte Carlo parts are seeded, so identical).
"""
import itertools
import math
import pathlib
from fractions import Fraction

import numpy as np
import sympy as sp
from scipy.optimize import brentq
from refdata import write_or_check

OUT = pathlib.Path(__file__).parent / "data" / "tolerance_stage.json"
REL_TOL = 1e-12
K = 3.0


def closed_form_yield(rf, rg, tol, target, spec_rel):
    """Share of (u, v) in [-t, t]^2 with G = 1 + rf(1+u)/(rg(1+v)) within target(1 +- spec)."""
    t = Fraction(tol)
    r = Fraction(rf) / Fraction(rg)
    lo = (Fraction(target) * (1 - Fraction(spec_rel)) - 1) / r
    hi = (Fraction(target) * (1 + Fraction(spec_rel)) - 1) / r

    def length(v):
        a = max(lo * (1 + v) - 1, -t)
        b = min(hi * (1 + v) - 1, t)
        return max(b - a, Fraction(0))

    points = {-t, t}
    for c in (lo, hi):
        for edge in (-t, t):
            v = (1 + edge) / c - 1
            if -t < v < t:
                points.add(v)
    pts = sorted(points)
    area = sum((b - a) * (length(a) + length(b)) / 2 for a, b in zip(pts, pts[1:]))
    return float(area / (2 * t) ** 2)


def split_lognormal(rng, n, lo, typ, hi):
    l, m, h = math.log(lo), math.log(typ), math.log(hi)
    z = rng.standard_normal(n)
    bad = np.abs(z) > K
    while bad.any():
        z[bad] = rng.standard_normal(bad.sum())
        bad = np.abs(z) > K
    sigma = np.where(z < 0, (m - l) / K, (h - m) / K)
    return np.clip(np.exp(m + sigma * z), lo, hi)


def truncated_normal(rng, n, nominal, percent):
    sigma = nominal * percent / 100 / K
    z = rng.standard_normal(n)
    bad = np.abs(z) > K
    while bad.any():
        z[bad] = rng.standard_normal(bad.sum())
        bad = np.abs(z) > K
    return nominal + sigma * z


def gain(rf, rg, a0, gbw, f, f2=None):
    s = 2j * np.pi * f
    a = a0 / (1 + s * a0 / (2 * np.pi * gbw))
    if f2 is not None:
        a = a / (1 + s / (2 * np.pi * f2))
    beta = rg / (rf + rg)
    return a / (1 + a * beta)


def phase_margin(rf, rg, a0, gbw, f2):
    beta = rg / (rf + rg)

    def t(f):
        s = 2j * math.pi * f
        return a0 / ((1 + s * a0 / (2 * math.pi * gbw)) * (1 + s / (2 * math.pi * f2))) * beta

    x = brentq(lambda lf: abs(t(10 ** lf)) - 1, 0, 10, xtol=1e-14, rtol=1e-15)
    return 180 + math.degrees(np.angle(t(10 ** x)))


def gain48():
    rf, rg, a0, gbw, f = 47e3, 1e3, (5e4, 2e5, 1e6), 1e7, 2e4
    n = 400_000
    rng = np.random.default_rng(18)
    rfs = rf * (1 + 0.01 * (2 * rng.random(n) - 1))
    rgs = truncated_normal(rng, n, rg, 1.0)
    a0s = split_lognormal(rng, n, *a0)
    g = np.abs(gain(rfs, rgs, a0s, gbw, f))
    db = 20 * np.log10(g)
    err = (g - 48) / 48 * 100
    ok = (err >= -1.0) & (err <= 0.0)
    corners = []
    for x in itertools.product((rf * 0.99, rf * 1.01), (rg * 0.99, rg * 1.01), (a0[0], a0[2])):
        gg = abs(complex(gain(*x, gbw, f)))
        corners.append((list(x), 20 * math.log10(gg), (gg - 48) / 48 * 100))
    ext = {}
    for k, name in ((1, "gainDb"), (2, "gainErrorPercent")):
        lo = min(corners, key=lambda c: c[k])
        hi = max(corners, key=lambda c: c[k])
        ext[name] = {"min": lo[k], "minValues": lo[0], "max": hi[k], "maxValues": hi[0]}
    # sympy: x * d(20 log10 |G|)/dx at nominal.
    # G = A/(1 + A*beta) = 1/(beta + 1/A0 + j f/GBW) for the single-pole A, so
    # |G|^2 = 1/((beta + 1/A0)^2 + (f/GBW)^2), a real expression to differentiate.
    Rf, Rg, A0, GBW = sp.symbols("Rf Rg A0 GBW", positive=True)
    beta = Rg / (Rf + Rg)
    mag2 = 1 / ((beta + 1 / A0) ** 2 + (sp.Integer(int(f)) / GBW) ** 2)
    db_sym = 10 * sp.log(mag2) / sp.log(10)
    at = {Rf: sp.Integer(int(rf)), Rg: sp.Integer(int(rg)), A0: sp.Integer(int(a0[1])),
          GBW: sp.Integer(int(gbw))}
    sens = {name: float((x * sp.diff(db_sym, x)).subs(at).evalf(30))
            for name, x in (("Rf", Rf), ("Rg", Rg), ("U1.a0", A0))}
    nominal = abs(complex(gain(rf, rg, a0[1], gbw, f)))
    return {
        "trials": n,
        "nominalGainDb": 20 * math.log10(nominal),
        "gainDb": {"mean": float(db.mean()), "sd": float(db.std(ddof=1))},
        "gainErrorPercent": {"mean": float(err.mean()), "sd": float(err.std(ddof=1)),
                             "yield": float(ok.mean())},
        "corners": ext,
        "sensitivityGainDb": sens,
    }


def margin2():
    rf, rg, a0, gbw, f2 = 1e3, 1e3, (5e4, 2e5, 1e6), (7e6, 1e7, 1.3e7), 8e6
    n = 20_000
    rng = np.random.default_rng(1818)
    rfs = rf * (1 + 0.01 * (2 * rng.random(n) - 1))
    rgs = rg * (1 + 0.01 * (2 * rng.random(n) - 1))
    a0s = split_lognormal(rng, n, *a0)
    gbws = split_lognormal(rng, n, *gbw)
    pm = np.array([phase_margin(*x, f2) for x in zip(rfs, rgs, a0s, gbws)])
    return {
        "trials": n,
        "nominal": phase_margin(rf, rg, a0[1], gbw[1], f2),
        "mean": float(pm.mean()),
        "sd": float(pm.std(ddof=1)),
        "yield": float((pm >= 61.0).mean()),
    }


def rcloop_t(r3, c3, rf, rg, a0, gbw, f):
    s = 2j * np.pi * f
    a = a0 / (1 + s * a0 / (2 * np.pi * gbw))
    zx = 1 / (s * c3 + 1 / (rf + rg))
    return a, a * zx / (r3 + zx) * rg / (rf + rg)


def rcloop_gain_db(*x, f=1e4):
    a, t = rcloop_t(*x, f)
    return 20 * np.log10(np.abs(a / (1 + t)))


def rcloop_pm(*x):
    def mag(lf):
        return abs(complex(rcloop_t(*x, 10 ** lf)[1])) - 1

    lf = brentq(mag, 0, 10, xtol=1e-14, rtol=1e-15)
    return 180 + math.degrees(np.angle(complex(rcloop_t(*x, 10 ** lf)[1])))


def rcloop():
    nominal = (1e3, 100e-12, 9e3, 1e3, 2e5, 1e7)
    lows = (950.0, 90e-12, 8910.0, 990.0, 5e4, 7e6)
    highs = (1050.0, 110e-12, 9090.0, 1010.0, 1e6, 1.3e7)
    n = 20_000
    rng = np.random.default_rng(1819)
    r3s = 1e3 * (1 + 0.05 * (2 * rng.random(n) - 1))
    c3s = truncated_normal(rng, n, 100e-12, 10.0)
    rfs = 9e3 * (1 + 0.01 * (2 * rng.random(n) - 1))
    rgs = 1e3 * (1 + 0.01 * (2 * rng.random(n) - 1))
    a0s = split_lognormal(rng, n, 5e4, 2e5, 1e6)
    gbws = split_lognormal(rng, n, 7e6, 1e7, 1.3e7)
    db = rcloop_gain_db(r3s, c3s, rfs, rgs, a0s, gbws)
    pm = np.array([rcloop_pm(*x) for x in zip(r3s, c3s, rfs, rgs, a0s, gbws)])
    corners = []
    for x in itertools.product(*zip(lows, highs)):
        corners.append((list(x), float(rcloop_gain_db(*x)), rcloop_pm(*x)))
    ext = {}
    for k, name in ((1, "gainDb"), (2, "phaseMarginDeg")):
        lo = min(corners, key=lambda c: c[k])
        hi = max(corners, key=lambda c: c[k])
        ext[name] = {"min": lo[k], "minValues": lo[0], "max": hi[k], "maxValues": hi[0]}
    return {
        "trials": n,
        "nominalGainDb": float(rcloop_gain_db(*nominal)),
        "nominalPhaseMarginDeg": rcloop_pm(*nominal),
        "gainDb": {"mean": float(db.mean()), "sd": float(db.std(ddof=1))},
        "phaseMarginDeg": {"mean": float(pm.mean()), "sd": float(pm.std(ddof=1)),
                           "yield": float((pm >= 65.0).mean())},
        "corners": ext,
    }


def twoamp_gain(rf1, rg1, rf2, rg2, a01, gbw1, gbw2, f=2e5, a02=1e5):
    s = 2j * np.pi * f
    g1 = 1 / (rg1 / (rf1 + rg1) + 1 / a01 + s / (2 * np.pi * gbw1))
    g2 = 1 / (rg2 / (rf2 + rg2) + 1 / a02 + s / (2 * np.pi * gbw2))
    return g1 * g2


def twoamp_bandwidth(rf1, rg1, rf2, rg2, a01, gbw1, gbw2, a02=1e5):
    b1 = rg1 / (rf1 + rg1) + 1 / a01
    b2 = rg2 / (rf2 + rg2) + 1 / a02
    qa = 1 / (gbw1 * gbw2) ** 2
    qb = b1**2 / gbw2**2 + b2**2 / gbw1**2
    qc = -(b1**2) * b2**2
    x = (-qb + np.sqrt(qb * qb - 4 * qa * qc)) / (2 * qa)
    return np.sqrt(x)


def twoamp():
    nominal = (9e3, 1e3, 4e3, 1e3, 2e5, 1e7, 5e6)
    lows = (8910.0, 990.0, 3960.0, 990.0, 5e4, 7e6, 3.5e6)
    highs = (9090.0, 1010.0, 4040.0, 1010.0, 1e6, 1.3e7, 6.5e6)
    n = 20_000
    rng = np.random.default_rng(1820)
    rs = [v * (1 + 0.01 * (2 * rng.random(n) - 1)) for v in nominal[:4]]
    a01 = split_lognormal(rng, n, 5e4, 2e5, 1e6)
    gbw1 = split_lognormal(rng, n, 7e6, 1e7, 1.3e7)
    gbw2 = split_lognormal(rng, n, 3.5e6, 5e6, 6.5e6)
    x = (*rs, a01, gbw1, gbw2)
    db = 20 * np.log10(np.abs(twoamp_gain(*x)))
    bw = twoamp_bandwidth(*x)
    corners = []
    for c in itertools.product(*zip(lows, highs)):
        corners.append((list(c), float(20 * np.log10(abs(twoamp_gain(*c)))),
                        float(twoamp_bandwidth(*c))))
    ext = {}
    for k, name in ((1, "gainDb"), (2, "bandwidthHz")):
        lo = min(corners, key=lambda c: c[k])
        hi = max(corners, key=lambda c: c[k])
        ext[name] = {"min": lo[k], "minValues": lo[0], "max": hi[k], "maxValues": hi[0]}
    return {
        "trials": n,
        "nominalGainDb": float(20 * np.log10(abs(twoamp_gain(*nominal)))),
        "nominalBandwidthHz": float(twoamp_bandwidth(*nominal)),
        "gainDb": {"mean": float(db.mean()), "sd": float(db.std(ddof=1)),
                   "yield": float((db >= 33.55).mean())},
        "bandwidthHz": {"mean": float(bw.mean()), "sd": float(bw.std(ddof=1)),
                        "yield": float((bw >= 6e5).mean())},
        "corners": ext,
    }


def transcond_gain(rl, rs, a0, gbw, f):
    s = 2j * np.pi * f
    a = a0 / (1 + s * a0 / (2 * np.pi * gbw))
    return a / (rl + rs + a * rs)


def transcond():
    nominal = (2e3, 1e3, 2e5, 1e7)
    lows = (1900.0, 999.0, 5e4, 7e6)
    highs = (2100.0, 1001.0, 1e6, 1.3e7)
    n = 100_000
    rng = np.random.default_rng(1821)
    rl = 2e3 * (1 + 0.05 * (2 * rng.random(n) - 1))
    rs = 1e3 * (1 + 0.001 * (2 * rng.random(n) - 1))
    a0 = split_lognormal(rng, n, 5e4, 2e5, 1e6)
    gbw = split_lognormal(rng, n, 7e6, 1e7, 1.3e7)

    def figures(*x):
        db = 20 * np.log10(np.abs(transcond_gain(*x, 1e5)))
        err = (np.abs(transcond_gain(*x, 2e4)) - 1e-3) / 1e-3 * 100
        return db, err

    db, err = figures(rl, rs, a0, gbw)
    ok = (err >= -0.5) & (err <= 0.0)
    corners = []
    for c in itertools.product(*zip(lows, highs)):
        d, e = figures(*c)
        corners.append((list(c), float(d), float(e)))
    ext = {}
    for k, name in ((1, "gainDb"), (2, "gainErrorPercent")):
        lo = min(corners, key=lambda c: c[k])
        hi = max(corners, key=lambda c: c[k])
        ext[name] = {"min": lo[k], "minValues": lo[0], "max": hi[k], "maxValues": hi[0]}
    nd, ne = figures(*nominal)
    return {
        "trials": n,
        "nominalGainDb": float(nd),
        "nominalGainErrorPercent": float(ne),
        "gainDb": {"mean": float(db.mean()), "sd": float(db.std(ddof=1))},
        "gainErrorPercent": {"mean": float(err.mean()), "sd": float(err.std(ddof=1)),
                             "yield": float(ok.mean())},
        "corners": ext,
    }


def make():
    return {
        "ideal48": {"yield": closed_form_yield(47e3, 1e3, 0.01, 48, 0.005)},
        "gain48": gain48(),
        "margin2": margin2(),
        "rcloop": rcloop(),
        "twoamp": twoamp(),
        "transcond": transcond(),
    }


def main():
    data = make()
    write_or_check(data, OUT, REL_TOL, abs_tol=1e-300, summary="tolerance stages match")


if __name__ == "__main__":
    main()
