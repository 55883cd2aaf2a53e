#!/usr/bin/env python3
"""The worked examples of the worksheet function catalog, recomputed independently
with mpmath at 40 significant digits (and Python's decimal module for ROUND, the
eseries package for the IEC 60063 tables), from the textbook formulas alone: Af = A/(1 + A*beta), T = A*beta, D = 1 + A*beta,
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

import eseries
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
    "=FEEDBACK.GAIN(100k; 0.01)": [gain(M(10**5), M("0.01"))],
    "=FEEDBACK.LOOPGAIN(100k; 0.01)": [M(10**5) * M("0.01")],
    "=FEEDBACK.AMOUNT(100k; 0.01)": [1 + M(10**5) * M("0.01")],
    "=FEEDBACK.AMOUNTDB(100k; 0.01)": [20 * mp.log10(1 + M(10**5) * M("0.01"))],
    "=FEEDBACK.SENSITIVITY(100k; 0.01)": [1 / (1 + M(10**5) * M("0.01"))],
    "=FEEDBACK.BETA(100k; 100)": [1 / M(100) - 1 / M(10**5)],
    "=FEEDBACK.MINGAIN(0.01; 0.1%)": [(1 - M("0.001")) / (M("0.001") * M("0.01"))],
    "=FEEDBACK.CEILING(100k; 100)": [M(10**5) / 100, (M(100) - 1) / M(10**5)],
    "=FEEDBACK.SPREAD(0.01; 50k; 100k; 200k)": spread(M("0.01"), M(5 * 10**4), M(10**5), M(2 * 10**5)),
    "=FEEDBACK.ZIN(\"series-shunt\"; 1MΩ; 100k; 0.01)": [M(10**6) * (1 + M(10**5) * M("0.01"))],
    "=FEEDBACK.ZOUT(\"voltage-series\"; 75 ohm; 100k; 0.01)": [M(75) / (1 + M(10**5) * M("0.01"))],
    "=FEEDBACK.IMPEDANCES(\"series-series\"; 1k; -1k; 10; 0; 0; 10; 0.1; 0)": impedances_series_series(
        mp.mpc(1000, -1000), mp.mpc(10, 0), mp.mpc(0, 10), mp.mpc("0.1", 0)
    ),
    "=FEEDBACK.PHASOR(0; 100; 0.01; 0)": phasor(mp.mpc(0, 100), mp.mpc("0.01", 0)),
    "=FEEDBACK.SUMMARY(\"series-shunt\"; 100k; 0.01)": summary(M(10**5), M("0.01")),
}


# --- frequency and stability (FREQ.), closed forms of one-, two- and three-pole loops


def two_pole_closed(f1, f2, t0):
    """f0, Q, zeta of the closed loop of T0/((1 + s/w1)(1 + s/w2)): the denominator
    (1 + s/w1)(1 + s/w2) + T0 = (1 + T0)(1 + s/(Q w0) + s^2/w0^2)."""
    f0 = mp.sqrt((1 + t0) * f1 * f2)
    q = f0 / (f1 + f2)
    return f0, q, 1 / (2 * q)


def peaking(q):
    """|H| of 1/(1 - u^2 + j u/Q) peaks at u = sqrt(1 - 1/(2Q^2)) with Q/sqrt(1 - 1/(4Q^2))."""
    return 20 * mp.log10(q / mp.sqrt(1 - 1 / (4 * q * q))), mp.sqrt(1 - 1 / (2 * q * q))


def f3db(q):
    """u^2 = a + sqrt(a^2 + 1), a = 1 - 1/(2Q^2), from (1 - u^2)^2 + u^2/Q^2 = 2."""
    a = 1 - 1 / (2 * q * q)
    return mp.sqrt(a + mp.sqrt(a * a + 1))


def overshoot_percent(zeta):
    return 100 * mp.exp(-mp.pi * zeta / mp.sqrt(1 - zeta * zeta))


def two_pole_pm(t0, f1, f2):
    """x = fc^2 solves x^2/(f1 f2)^2 + x (1/f1^2 + 1/f2^2) + 1 - T0^2 = 0."""
    a, b, c = 1 / (f1 * f2) ** 2, 1 / f1**2 + 1 / f2**2, 1 - t0 * t0
    x = (-b + mp.sqrt(b * b - 4 * a * c)) / (2 * a)
    fc = mp.sqrt(x)
    return [180 - mp.degrees(mp.atan(fc / f1) + mp.atan(fc / f2)), fc]


def three_equal_gm(t0, fp):
    """Three equal poles: -180 deg at f = sqrt(3) fp, where |T| = T0/8."""
    return [20 * mp.log10(8 / t0), mp.sqrt(3) * fp]


def loop_poles(t0, f1, f2):
    """Roots (in Hz) of s^2 + (f1 + f2) s + (1 + T0) f1 f2, conjugate pair below then above."""
    f0, q, zeta = two_pole_closed(t0=t0, f1=f1, f2=f2)
    re = -(f1 + f2) / 2
    im = mp.sqrt(f0 * f0 - re * re)
    return [re, -im, f0, zeta, re, im, f0, zeta]


def dominant_for_margin(a0, beta, pm, others):
    """Unknowns fd (added pole) and fc: |T(fc)| = 1 and the phase at fc = pm - 180 deg."""
    poles = lambda fd: [fd] + others

    def eqs(lfd, lfc):
        fd, fc = mp.exp(lfd), mp.exp(lfc)
        mag = a0 * beta / mp.sqrt(mp.fprod([1 + (fc / p) ** 2 for p in poles(fd)]))
        ph = mp.fsum([mp.atan(fc / p) for p in poles(fd)])
        return [mp.log(mag), ph - mp.radians(180 - pm)]

    lfd, lfc = mp.findroot(eqs, (mp.log(5), mp.log(5e5)))
    return [mp.exp(lfd), mp.exp(lfc)]


def max_beta_for_margin(a0, pm, f1, f2):
    """Two poles: the crossover where atan(fc/f1) + atan(fc/f2) = 180 - pm, then |T(fc)| = 1 gives beta."""
    fc = mp.findroot(lambda f: mp.atan(f / f1) + mp.atan(f / f2) - mp.radians(180 - pm), 5e4)
    beta = mp.sqrt((1 + (fc / f1) ** 2) * (1 + (fc / f2) ** 2)) / a0
    return [beta, a0 / (1 + a0 * beta), fc]


F0, Q2, Z2 = two_pole_closed(M(1000), M(10**5), M(100))
TAU_ONE = 1 / (2 * mp.pi * M(10) * (1 + M(10**5) * M("0.01")))

CASES.update({
    "=FREQ.PM(1000; 0.1; 1 kHz; 100 kHz)": two_pole_pm(M(100), M(1000), M(10**5)),
    "=FREQ.GM(4; 1; 1k; 1k; 1k)": three_equal_gm(M(4), M(1000)),
    "=FREQ.BANDWIDTH(1000; 0.1; 1k; 100k)": [F0 * f3db(Q2)],
    "=FREQ.PEAKING(1000; 0.1; 1k; 100k)": [peaking(Q2)[0], F0 * peaking(Q2)[1]],
    "=FREQ.STEP(100k; 0.01; 2%; 10 Hz)": [M(0), mp.log(9) * TAU_ONE, mp.log(50) * TAU_ONE],
    "=FREQ.POLES(1000; 0.1; 1k; 100k)": loop_poles(M(100), M(1000), M(10**5)),
    "=FREQ.EXTEND(10 Hz; 100k; 0.01)": [M(10) * (1 + M(10**5) * M("0.01"))],
    "=FREQ.LOWCUT(100 Hz; 1000; 0.099)": [M(100) / (1 + M(1000) * M("0.099"))],
    "=FREQ.GBW(100k; 10 Hz)": [M(10**5) * 10],
    "=FREQ.TWOPOLE(1k; 100k; 100)": [
        F0, Q2, Z2, peaking(Q2)[0], overshoot_percent(Z2), (M(1000) + M(10**5)) ** 2 / (2 * M(1000) * M(10**5)) - 1,
    ],
    "=FREQ.DOMINANT(100k; 1; 60; 1 MHz; 10 MHz)": dominant_for_margin(M(10**5), M(1), M(60), [M(10**6), M(10**7)]),
    "=FREQ.MAXBETA(1000; 60; 1; 1k; 100k)": max_beta_for_margin(M(1000), M(60), M(1000), M(10**5)),
})

# --- networks and tolerance (NETWORK.): the eseries package (IEC 60063 tables), a
# brute-force pair enumeration, corner evaluation and exact Monte Carlo moments


def e_values(key, lo, hi):
    """Every value of the series from lo to hi, from the eseries package."""
    return [float(v) for v in eseries.erange(key, lo, hi)]


def best_pairs_brute(target, key, total_min, total_max, count):
    """Non-inverting gain 1 + R2/R1: for every standard R1 the best standard R2 with
    R1 + R2 in range, ranked by |error|, then R1 + R2, then R1 (the ranking rule
    of src/network/pairs.rs). Errors in double precision, as the engine computes
    them, so ties rank identically."""
    values = e_values(key, 1e-3, total_max)
    rows = []
    for r1 in values:
        best = None
        for r2 in values:
            if not total_min <= r1 + r2 <= total_max:
                continue
            g = 1.0 + r2 / r1
            cand = (abs(g / target - 1.0), r1 + r2, r1, r2, g, g / target - 1.0)
            if best is None or cand[:3] < best[:3]:
                best = cand
        if best is not None:
            rows.append(best)
    rows.sort(key=lambda c: c[:3])
    out = []
    for _, _, r1, r2, g, err in rows[:count]:
        # Single R2: its first part is R2 itself, the second 0.
        out += [M(r1), M(r2), M(g), M(err), M(r2), M(0)]
    return out


def non_inverting_gain(a, r1, r2):
    return a / (1 + a * r1 / (r1 + r2))


def worst_case_gain(r1, r2, tol, a_min, a_typ, a_max):
    nominal = non_inverting_gain(a_typ, r1, r2)
    corners = [non_inverting_gain(a, r1 * (1 + s1 * tol), r2 * (1 + s2 * tol))
               for a in (a_min, a_max) for s1 in (-1, 1) for s2 in (-1, 1)]
    lo, hi = min(corners), max(corners)
    return [nominal, lo, hi, (lo - nominal) * 100 / nominal, (hi - nominal) * 100 / nominal]


class UniformGain:
    """Af = 1/(beta + 1/A), beta = R1/(R1 + R2), R1 = r1 (1 + t u1), R2 = r2 (1 + t u2),
    u1, u2 independent uniform on [-1, 1]: exact moments by 2-D quadrature and the
    exact CDF P(Af <= q) = 1/2 * integral over u1 of the share of u2 below the bound."""

    def __init__(self, r1, r2, tol, a):
        self.r1, self.r2, self.t, self.a = r1, r2, tol, a

    def g(self, u1, u2):
        R1, R2 = self.r1 * (1 + self.t * u1), self.r2 * (1 + self.t * u2)
        return 1 / (R1 / (R1 + R2) + 1 / self.a)

    def moment(self, f):
        return mp.quad(lambda u1, u2: f(self.g(u1, u2)) / 4, [-1, 1], [-1, 1])

    def cdf(self, q):
        c = 1 / q - 1 / self.a  # Af <= q  <=>  beta >= c  <=>  R2 <= R1 (1 - c)/c

        def share(u1):
            w = (self.r1 * (1 + self.t * u1) * (1 - c) / c / self.r2 - 1) / self.t
            return min(max((w + 1) / 2, M(0)), M(1))

        # w(u1) is linear: split at the kinks where it leaves [-1, 1].
        k = self.r1 * (1 - c) / c / self.r2
        kinks = sorted(u for u in (((v + 1) * 1 / k - 1) / self.t for v in (-1, 1)) if -1 < u < 1)
        return mp.quad(share, [-1] + kinks + [1]) / 2

    def quantile(self, p, lo, hi):
        return mp.findroot(lambda q: self.cdf(q) - p, (lo, hi), solver="anderson")


MC_TRIALS = 200000
MC = UniformGain(M(1000), M(9000), M("0.01"), M(10**5))
MC_MEAN = MC.moment(lambda x: x)
MC_SD = mp.sqrt(MC.moment(lambda x: (x - MC_MEAN) ** 2))
MC_M4 = MC.moment(lambda x: (x - MC_MEAN) ** 4)
MC_LO, MC_HI = MC.g(1, -1), MC.g(-1, 1)
MC_PCT = [MC.quantile(M(p) / 100, MC_LO + (MC_HI - MC_LO) * M("1e-6"), MC_HI - (MC_HI - MC_LO) * M("1e-6"))
          for p in ("0.1", "1", "5", "50", "95", "99", "99.9")]
MC_YIELD = MC.cdf(M("10.05")) - MC.cdf(M("9.9"))


def mc_tolerances():
    """5 standard errors of each statistic of MC_TRIALS draws, relative to its value:
    mean sd/sqrt(N); sd sqrt((m4 - sd^4)/(4 sd^2 N)); the p-quantile
    sqrt(p(1 - p)/N)/f(q) with f the exact density (asymptotic normality of
    sample quantiles)."""
    n = MC_TRIALS
    tols = [5 * MC_SD / mp.sqrt(n) / MC_MEAN, 5 * mp.sqrt((MC_M4 - MC_SD**4) / (4 * MC_SD**2 * n)) / MC_SD]
    for p, q in zip(("0.1", "1", "5", "50", "95", "99", "99.9"), MC_PCT):
        p = M(p) / 100
        density = mp.diff(MC.cdf, q)
        tols.append(5 * mp.sqrt(p * (1 - p) / n) / density / q)
    return [float(t) for t in tols]


def choose_rows(target, tol, keys, grade, total_min, total_max):
    """NETWORK.CHOOSE with one-resistor legs, non-inverting: per series the five
    pairs nearest the target (every pair of the series' values from 1 Ω to
    total_max enumerated, ranked as NETWORK.PAIR), the highest exact yield of
    two independent uniform ±grade parts (mpmath quadrature of the joint density,
    tests/reference/network_choose.py; the first on a tie), the worst case over
    the four tolerance corners; ranked: reaching 0.99 first in cost order (same
    grade and parts here: coarser series first), then by yield."""
    sys.path.insert(0, str(Path(__file__).parent))
    from network_choose import exact_yield
    lo_g, hi_g = target * (1 - tol), target * (1 + tol)
    rows = []
    for rank, key in enumerate(keys, start=1):
        values = e_values(key, 1.0, total_max)
        pairs = []
        for r1 in values:
            best = None
            for r2 in values:
                if not total_min <= r1 + r2 <= total_max:
                    continue
                g = 1.0 + r2 / r1
                cand = (abs(g / target - 1.0), r1 + r2, r1, r2)
                if best is None or cand < best:
                    best = cand
            if best is not None:
                pairs.append(best)
        pairs.sort()
        best = None
        for _, _, r1, r2 in pairs[:5]:
            y = exact_yield(lo_g - 1, hi_g - 1, r1, r2, grade)
            if best is None or y > best[0]:
                best = (y, r1, r2)
        y, r1, r2 = best
        corners = [1 + r2 * (1 + s2 * grade) / (r1 * (1 + s1 * grade)) for s1 in (-1, 1) for s2 in (-1, 1)]
        n = len(eseries.series(key))
        rows.append([n, grade, 2, r1, r2, 0, (1 + r2 / r1) / target - 1, y, 0, min(corners), max(corners), rank, int(y >= 0.99)])
    rows.sort(key=lambda r: (-r[12], r[11] if r[12] else -r[7]))
    return [M(x) for r in rows for x in r]


CASES.update({
    "=NETWORK.NEAREST(5k; \"E12\")": [M(eseries.find_nearest(eseries.E12, 5000.0))],
    "=NETWORK.UP(12345; \"E96\")": [M(eseries.find_greater_than_or_equal(eseries.E96, 12345.0))],
    "=NETWORK.DOWN(12345; \"E96\")": [M(eseries.find_less_than_or_equal(eseries.E96, 12345.0))],
    "=NETWORK.TOLERANCE(\"E96\")": [M(eseries.tolerance(eseries.E96))],
    "=NETWORK.PAIR(\"non-inverting\"; 7.5; \"E12\"; 10k; 100k; 3)": best_pairs_brute(7.5, eseries.E12, 1e4, 1e5, 3),
    "=NETWORK.WORSTCASE(\"non-inverting\"; \"gain\"; 1k; 9k; 1%; 50k; 100k; 200k; 1M; 50; 10 Hz)": worst_case_gain(
        M(1000), M(9000), M("0.01"), M(5 * 10**4), M(10**5), M(2 * 10**5)),
    "=NETWORK.MONTECARLO(\"non-inverting\"; \"gain\"; 1k; 9k; 1%; 100k; 100k; 100k; 1M; 50; 10 Hz; 200000; 1; \"uniform\")":
        [MC_MEAN, MC_SD] + MC_PCT,
    "=NETWORK.YIELD(\"non-inverting\"; \"gain\"; 1k; 9k; 1%; 100k; 100k; 100k; 1M; 50; 10 Hz; 200000; 1; \"uniform\"; 9.9; 10.05)":
        [MC_YIELD],
    "=NETWORK.CHOOSE(\"non-inverting\"; 48; 0.5%; \"E96, E192\"; 0.25%; \"none\"; 0.99; 10k; 1M)": choose_rows(
        48.0, 0.005, [eseries.E96, eseries.E192], 0.0025, 1e4, 1e6),
})

# --- the loaded circuit (CIRCUIT.): the worked non-inverting case of the sympy
# closed forms in tests/reference/data/circuit_sympy.json (tests/reference/circuit_sympy.py)

CIRCUIT = json.loads((Path(__file__).parent / "data" / "circuit_sympy.json").read_text())
NI = CIRCUIT["stages"]["noninverting"]["cases"][-1]
assert (NI["a"], NI["ri"], NI["ro"], NI["r2"], NI["r1"], NI["rs"], NI["rl"]) == (1e4, 1e5, 1e3, 1e6, 1e3, 1e4, 2e3)


def compared(exact, two_port):
    exact, two_port = M(exact), M(two_port)
    return [exact, two_port, abs(two_port - exact) / abs(exact)]


CKT_STAGE = "(\"series-shunt\"; 10k; 100k; 1k; 1M; 1k; 10k; 2k)"
IDEAL = 1 + M(10**6) / M(1000)
CASES.update({
    "=CIRCUIT.GAIN" + CKT_STAGE: compared(NI["af"], NI["tp_af"]),
    "=CIRCUIT.RIN" + CKT_STAGE: compared(NI["rin"], NI["tp_rin"]),
    "=CIRCUIT.ROUT" + CKT_STAGE: compared(NI["rout"], NI["tp_rout"]),
    "=CIRCUIT.IDEAL" + CKT_STAGE: [IDEAL, abs(IDEAL - M(NI["af"])) / M(NI["af"])],
})
# The relative error of the two-port method is a difference of two values that
# agree to 1e-10, each carried in the JSON to double precision: ~1e-6 relative.
CKT_TOL = ([1e-10, 1e-10, 1e-5], "nodal solve against the sympy closed forms (1e-10, as tests/circuit_reference.rs); "
           "the error item is a difference of two doubles that agree to 1e-10")

# --- the stage (STAGE.): two stages of tests/reference/data/stage_sympy.json
# (tests/reference/stage_sympy.py: sympy's exact loop gain, mpmath's closed-loop
# solve, numpy's impedances, sympy's roots of the characteristic polynomial)

STAGES = {c["label"]: c for c in json.loads((Path(__file__).parent / "data" / "stage_sympy.json").read_text())["cases"]}
LOAD = next(c for label, c in STAGES.items() if label.startswith("capacitive load with isolation"))
CFS = next(c for label, c in STAGES.items() if label.startswith("feedback capacitor"))
assert LOAD["stage"]["parts"] == {"rf": "1k", "rg": "1k", "rl": "10k", "cl": "10n", "riso": "20"}
assert CFS["stage"]["parts"]["cf"] == "4p7" and CFS["stage"]["amplifier"]["polesHz"] == ["30M"]
LOAD_TEXT = "\"kind=non-inverting, a0=1e5, gbwHz=5M, ro=50, rf=1k, rg=1k, rl=10k, cl=10n, riso=20\""
CF_TEXT = "\"kind=non-inverting, a0=200k, gbwHz=10M, polesHz=30M, cd=3p, ro=50, rf=10k, rg=1k, cf=4p7, rs=50, rl=2k\""


def at_1mhz(case, key):
    re, im = case[key][case["freqs"].index(1e6)]
    return mp.mpc(re, im)


def magnitude_phase(z):
    return [abs(z), mp.degrees(mp.arg(z))]


def stage_poles(case):
    """Rows of σ/2π, ω/2π, |s|/2π, ζ sorted by natural frequency, conjugates
    with the negative imaginary part first."""
    rows = []
    for re, im in sorted(case["poles"], key=lambda p: (abs(complex(*p)), p[1])):
        s = mp.mpc(re, im)
        rows += [M(re) / (2 * mp.pi), M(im) / (2 * mp.pi), abs(s) / (2 * mp.pi), -M(re) / abs(s)]
    return rows


CASES.update({
    "=STAGE.GAIN(" + LOAD_TEXT + "; 1 MHz)": magnitude_phase(at_1mhz(LOAD, "closed_loop")),
    "=STAGE.LOOPGAIN(" + LOAD_TEXT + "; 1 MHz)": [
        20 * mp.log10(abs(at_1mhz(LOAD, "loop_gain"))), mp.degrees(mp.arg(at_1mhz(LOAD, "loop_gain")))],
    "=STAGE.ZIN(" + CF_TEXT + "; 1 MHz)": magnitude_phase(at_1mhz(CFS, "zin")),
    "=STAGE.ZOUT(" + LOAD_TEXT + "; 1 MHz)": magnitude_phase(at_1mhz(LOAD, "zout")),
    "=STAGE.POLES(" + LOAD_TEXT + ")": stage_poles(LOAD),
})
LOOPS = json.loads((Path(__file__).parent / "data" / "stage_loop.json").read_text())["cases"]
LOAD_LOOP = next(c for c in LOOPS if c["label"].startswith("capacitive load with isolation"))
assert LOAD_LOOP["stage"] == LOAD["stage"]
CASES["=STAGE.MARGIN(" + LOAD_TEXT + ")"] = [LOAD_LOOP["phase_margin_deg"], LOAD_LOOP["crossover_hz"]]
STAGE_TOL = (1e-12, "loop and closed-loop gain against sympy/mpmath to 1e-12, as tests/stage_reference.rs")
NUMPY_TOL = (1e-9, "impedances against numpy's double-precision solve, as tests/stage_reference.rs")

# --- distortion and slew (DISTORTION.), noise (NOISE.): closed forms


def closed_series(a1, a2, a3, beta):
    """Series reversion of y = a1 u + a2 u^2 + a3 u^3 with u = x - beta y, D = 1 + a1 beta."""
    d = 1 + a1 * beta
    return [a1 / d, a2 / d**3, (a3 * d - 2 * a2 * a2 * beta) / d**5]


def hd(a1, a2, a3, y):
    """HD2 = |a2| X/(2|a1|), HD3 = |a3| X^2/(4|a1|) at the output amplitude y = |a1| X."""
    x = y / abs(a1)
    return [abs(a2) * x / (2 * abs(a1)), abs(a3) * x * x / (4 * abs(a1))]


K_B = M("1.380649e-23")  # Boltzmann constant, exact in the 2019 SI


def stage_noise(rf, rg, rp, en, fce, i_n, fci, t, f):
    """Output densities of a non-inverting stage at f, NG = 1 + Rf/Rg, 1/f corners e^2 (1 + fc/f)."""
    ng = 1 + rf / rg
    e2 = en * en * (1 + fce / f)
    i2 = i_n * i_n * (1 + fci / f)
    terms = [mp.sqrt(4 * K_B * t * rf), mp.sqrt(4 * K_B * t * rg) * rf / rg, mp.sqrt(4 * K_B * t * rp) * ng,
             mp.sqrt(e2) * ng, mp.sqrt(i2) * rp * ng, mp.sqrt(i2) * rf]
    total = mp.sqrt(mp.fsum(x * x for x in terms))
    return [total, total / ng] + terms


def white_total(rf, rg, en, t, gbw):
    """White noise through one closed-loop pole at fc = GBW/NG: noise bandwidth pi/2 fc."""
    ng = 1 + rf / rg
    e_out = mp.sqrt(4 * K_B * t * (rf + rg * (rf / rg) ** 2) + (en * ng) ** 2)
    nbw = mp.pi / 2 * gbw / ng
    return [e_out * mp.sqrt(nbw), e_out * mp.sqrt(nbw) / ng, nbw]


CASES.update({
    "=DISTORTION.SERIES(1000; 200; -50; 0.099)": closed_series(M(1000), M(200), M(-50), M("0.099")),
    "=DISTORTION.HD(1000; 200; -50; 0.099; 1 V; \"output\")": hd(M(1000), M(200), M(-50), M(1))
        + hd(*closed_series(M(1000), M(200), M(-50), M("0.099")), M(1))
        + [M(1000) * M("0.099"), M(0)],  # the DC loop gain used, and its phase
    "=DISTORTION.FPBW(0.5e6; 10 V)": [M("0.5e6") / (2 * mp.pi * 10)],
    "=DISTORTION.MAXAMP(13e6; 100 kHz)": [M("13e6") / (2 * mp.pi * M(10**5))],
    "=DISTORTION.SLEWRATE(10 V; 20 kHz)": [2 * mp.pi * M(20000) * 10],
    "=NOISE.THERMAL(1kΩ; 300)": [mp.sqrt(4 * K_B * 300 * 1000)],
    "=NOISE.STAGE(\"non-inverting\"; 9k; 1k; 50; 4n; 10; 0.5p; 200; 300; 1 kHz)": stage_noise(
        M(9000), M(1000), M(50), M("4e-9"), M(10), M("0.5e-12"), M(200), M(300), M(1000)),
    "=NOISE.TOTAL(\"non-inverting\"; 9k; 1k; 0; 10n; 0; 0; 0; 300; 1 MHz; 0)": white_total(
        M(9000), M(1000), M("10e-9"), M(300), M(10**6)),
})

# Cases whose engine value comes from a numeric search or integration, so agrees
# with the closed form only to the core's stated tolerance: (relative tolerance,
# why). Every other case is held to the test's default (a few ulps).
TOLERANCES = {
    "=FREQ.PM(1000; 0.1; 1 kHz; 100 kHz)": (1e-10, "crossover refined by the core to CROSSING_REL_TOL = 1e-12"),
    "=FREQ.GM(4; 1; 1k; 1k; 1k)": (1e-10, "phase crossing refined by the core to CROSSING_REL_TOL = 1e-12"),
    "=FREQ.BANDWIDTH(1000; 0.1; 1k; 100k)": (1e-10, "-3 dB point found by a bracketing search"),
    "=FREQ.PEAKING(1000; 0.1; 1k; 100k)": (1e-6, "peak located by a 1-D maximum search; the frequency is flat at the peak"),
    "=FREQ.STEP(100k; 0.01; 2%; 10 Hz)": (1e-9, "crossing times refined numerically on the exact step"),
    "=FREQ.POLES(1000; 0.1; 1k; 100k)": (1e-12, "polynomial roots by iteration"),
    "=FREQ.DOMINANT(100k; 1; 60; 1 MHz; 10 MHz)": (1e-8, "the core bisects the pole to SEARCH_REL_TOL = 1e-10"),
    "=FREQ.MAXBETA(1000; 60; 1; 1k; 100k)": (1e-8, "the core bisects beta to SEARCH_REL_TOL = 1e-10"),
    "=NETWORK.MONTECARLO(\"non-inverting\"; \"gain\"; 1k; 9k; 1%; 100k; 100k; 100k; 1M; 50; 10 Hz; 200000; 1; \"uniform\")": (
        mc_tolerances(), "statistical: 5 standard errors of each statistic of 200000 seeded draws"),
    "=NETWORK.YIELD(\"non-inverting\"; \"gain\"; 1k; 9k; 1%; 100k; 100k; 100k; 1M; 50; 10 Hz; 200000; 1; \"uniform\"; 9.9; 10.05)": (
        float(5 * mp.sqrt(MC_YIELD * (1 - MC_YIELD) / MC_TRIALS) / MC_YIELD),
        "statistical: 5 standard errors sqrt(y(1 - y)/N) of a share of 200000 seeded draws"),
    "=CIRCUIT.GAIN" + CKT_STAGE: CKT_TOL,
    "=CIRCUIT.RIN" + CKT_STAGE: CKT_TOL,
    "=CIRCUIT.ROUT" + CKT_STAGE: CKT_TOL,
    "=CIRCUIT.IDEAL" + CKT_STAGE: ([1e-12, 1e-10], "Af from the sympy closed form, to 1e-10 as tests/circuit_reference.rs"),
    "=STAGE.GAIN(" + LOAD_TEXT + "; 1 MHz)": STAGE_TOL,
    "=STAGE.LOOPGAIN(" + LOAD_TEXT + "; 1 MHz)": STAGE_TOL,
    "=STAGE.ZIN(" + CF_TEXT + "; 1 MHz)": NUMPY_TOL,
    "=STAGE.ZOUT(" + LOAD_TEXT + "; 1 MHz)": NUMPY_TOL,
    "=STAGE.MARGIN(" + LOAD_TEXT + ")": ([1e-8, 1e-9], "crossover refined to 1e-9 relative and the margin to 1e-6 degrees, as tests/stage_loop_reference.rs"),
    "=STAGE.POLES(" + LOAD_TEXT + ")": (1e-10, "poles against sympy's roots at 30 digits to 1e-10, as tests/stage_reference.rs"),
    "=NOISE.TOTAL(\"non-inverting\"; 9k; 1k; 0; 10n; 0; 0; 0; 300; 1 MHz; 0)": (
        [1e-9, 1e-9, 1e-12], "the core integrates the density numerically to REL_TOL = 1e-10"),
}


# NOISE.CIRCUIT.*: R = 1 kΩ in parallel with C = 1 µF from node a to ground at 300 K.
RC_DENSITY = '=NOISE.CIRCUIT.DENSITY("{""format"":""loopwright-circuit"",""version"":1,""elements"":[{""name"":""R1"",""kind"":""resistor"",""nodes"":[""a"",""0""],""value"":1000},{""name"":""C1"",""kind"":""capacitor"",""nodes"":[""a"",""0""],""value"":1e-6}]}"; "a"; 1 kHz)'
RC_TOTAL = '=NOISE.CIRCUIT.TOTAL("{""format"":""loopwright-circuit"",""version"":1,""elements"":[{""name"":""R1"",""kind"":""resistor"",""nodes"":[""a"",""0""],""value"":1000},{""name"":""C1"",""kind"":""capacitor"",""nodes"":[""a"",""0""],""value"":1e-6}]}"; "a"; 0; 1 MHz)'
RC_R, RC_C = M(1000), M("1e-6")
RC_FC = 1 / (2 * mp.pi * RC_R * RC_C)
CASES.update({
    # Johnson-Nyquist density through the RC's impedance |Z| = R/sqrt(1 + (f/fc)^2).
    RC_DENSITY: [mp.sqrt(4 * K_B * 300 * RC_R) / mp.sqrt(1 + (M(1000) / RC_FC) ** 2)],
    # Over 0..1 MHz: 4kTR * fc * atan(1 MHz / fc), the single pole's noise bandwidth.
    RC_TOTAL: [mp.sqrt(4 * K_B * 300 * RC_R * RC_FC * mp.atan(M(10**6) / RC_FC))],
})
TOLERANCES[RC_DENSITY] = ([1e-12], "one nodal solve of the RC")
TOLERANCES[RC_TOTAL] = ([1e-8], "the core integrates the density to REL_TOL = 1e-9 per piece")


# --- tolerance (TOLERANCE.): the gain-48 stage, Rf = 47k and Rg = 1k within ±1 %.
G48 = '"kind=non-inverting, a0=200k, a0Min=50k, a0Max=1M, gbwHz=10M, rf=47k, rg=1k"'
TOL_WC = ('=TOLERANCE.WORSTCASE(' + G48 + '; "rf=1% 25ppm/K, rg=1% normal 3σ -25ppm/K"; '
          '"gainDb"; 20 kHz; "0…70")')


def gain48_db(rf, rg, a0, f=M(20000), gbw=M(10**7)):
    """20 log10 |A/(1 + A beta)|, A = A0/(1 + j f A0/GBW), beta = Rg/(Rf + Rg)."""
    a = a0 / (1 + mp.mpc(0, 1) * f * a0 / gbw)
    return 20 * mp.log10(abs(a / (1 + a * rg / (rf + rg))))


def drift(value, ppm, t):
    """The linear temperature coefficient of IEC 60115-1 about 25 °C."""
    return value * (1 + M(ppm) * M("1e-6") * (M(t) - 25))


# Every corner of Rf, Rg (±1 %: a normal part sold as ±1 % is screened to it),
# A0 (min, max) at both ends of 0 … 70 °C; the nominal at the first temperature.
TOL_CORNERS = [gain48_db(drift(rf, 25, t), drift(rg, -25, t), a0)
               for rf in (M(46530), M(47470)) for rg in (M(990), M(1010))
               for a0 in (M(50000), M(10**6)) for t in (0, 70)]
CASES[TOL_WC] = [min(TOL_CORNERS), gain48_db(drift(M(47000), 25, 0), drift(M(1000), -25, 0), M(200000)),
                 max(TOL_CORNERS)]
TOLERANCES[TOL_WC] = ([1e-9, 1e-9, 1e-9], "the nodal solve against the closed form, as tests/tolerance_stage.rs")

# TOLERANCE.SENSITIVITY: the same stage without an A0 spread; Rf uniform ±1 %,
# Rg normal ±1 % at 3 sigma. x dF/dx by mpmath's numerical derivative of the
# closed form at 40 digits; each part's sd from its distribution: uniform
# (2 t x)/sqrt(12), the truncated normal's by quadrature of z^2 phi(z) over ±3;
# shares (dF/dx sd)^2 / sum (first-order propagation of variance, GUM JCGM
# 100:2008 §5.1.2, from memory).
TOL_SENS = ('=TOLERANCE.SENSITIVITY("kind=non-inverting, a0=200k, gbwHz=10M, rf=47k, rg=1k"; '
            '"rf=1%, rg=1% normal 3σ"; "gainDb"; 20 kHz)')


def sensitivity_rows():
    a0, rf, rg = M(200000), M(47000), M(1000)
    f0 = gain48_db(rf, rg, a0)
    d_rf = rf * mp.diff(lambda x: gain48_db(x, rg, a0), rf)
    d_rg = rg * mp.diff(lambda x: gain48_db(rf, x, a0), rg)
    phi = lambda z: mp.exp(-z * z / 2) / mp.sqrt(2 * mp.pi)
    trunc_var = mp.quad(lambda z: z * z * phi(z), [-3, 3]) / mp.quad(phi, [-3, 3])
    sd_rf = M("0.02") / mp.sqrt(12)                       # relative
    sd_rg = M("0.01") / 3 * mp.sqrt(trunc_var)            # relative
    terms = [(d_rf * sd_rf) ** 2, (d_rg * sd_rg) ** 2]
    total = sum(terms)
    shares = [t / total for t in terms]
    first = 0 if shares[0] > shares[1] else 1
    return [rf, d_rf, d_rf / f0, shares[0], M(first == 0),
            rg, d_rg, d_rg / f0, shares[1], M(first == 1)]


CASES[TOL_SENS] = sensitivity_rows()
TOLERANCES[TOL_SENS] = (
    [0, 1e-6, 1e-6, 1e-6, 0] * 2,
    "central differences with a step of 1e-4 of each part on the nodal solve (truncation ~1e-8, "
    "rounding of the solve ~1e-8 relative); the values and the flag exact")

TOL_YIELD_LIMITS = (M("33.5813"), M("33.6681"))
TOL_YIELD_TRIALS = 20000
TOL_YIELD = ('=TOLERANCE.YIELD("kind=non-inverting, a0=1e12, gbwHz=10M, rf=47k, rg=1k"; "rf=1%, rg=1%"; '
             '"gainDb"; 0; 33.5813; 33.6681; 20000; 1)')


def uniform_ratio_yield(r, lo_db, hi_db, t=M("0.01")):
    """P(lo <= 20 log10(1 + r (1+u)/(1+v)) <= hi), u, v uniform on [-t, t]: for each
    v the admitted u is an interval whose clipped length is piecewise linear in v,
    so the trapezoid rule between the breakpoints is exact."""
    c1 = (10 ** (lo_db / 20) - 1) / r
    c2 = (10 ** (hi_db / 20) - 1) / r

    def length(v):
        a = max(c1 * (1 + v) - 1, -t)
        b = min(c2 * (1 + v) - 1, t)
        return max(b - a, M(0))

    pts = {-t, t}
    for c in (c1, c2):
        for edge in (-t, t):
            v = (1 + edge) / c - 1
            if -t < v < t:
                pts.add(v)
    pts = sorted(pts)
    return sum((b - a) * (length(a) + length(b)) / 2 for a, b in zip(pts, pts[1:])) / (2 * t) ** 2


# A0 = 1e12 moves the gain by 48/1e12 relative: far below the limits' resolution.
TOL_YIELD_P = uniform_ratio_yield(M(47), *TOL_YIELD_LIMITS)
CASES[TOL_YIELD] = [TOL_YIELD_P]
TOLERANCES[TOL_YIELD] = (
    float(4 * mp.sqrt(TOL_YIELD_P * (1 - TOL_YIELD_P) / TOL_YIELD_TRIALS) / TOL_YIELD_P),
    "statistical: 4 standard errors sqrt(y(1 - y)/N) of a share of 20000 seeded draws")


# TOLERANCE.MONTECARLO: the same ideal-amplifier stage, Rf and Rg uniform over
# ±1 %; the exact distribution of F = 20 log10(1 + 47 (1 + u)/(1 + v)).
TOL_MC_TRIALS = 20000
TOL_MC = ('=TOLERANCE.MONTECARLO("kind=non-inverting, a0=1e12, gbwHz=10M, rf=47k, rg=1k"; "rf=1%, rg=1%"; '
          '"gainDb"; 0; 20000; 1)')


def tolerance_mc():
    t = M("0.01")
    f = lambda u, v: 20 * mp.log10(1 + 47 * (1 + u) / (1 + v))
    moment = lambda g: mp.quad(lambda u, v: g(f(u, v)), [-t, t], [-t, t]) / (2 * t) ** 2
    mean = moment(lambda x: x)
    var = moment(lambda x: (x - mean) ** 2)
    mu4 = moment(lambda x: (x - mean) ** 4)
    sd = mp.sqrt(var)
    lo, hi = f(-t, t), f(t, -t)
    cdf = lambda x: uniform_ratio_yield(M(47), lo - 1, x)
    values, tols = [mean, sd], [5 * sd / mp.sqrt(TOL_MC_TRIALS) / mean,
                                5 * mp.sqrt((mu4 - var ** 2) / (4 * var * TOL_MC_TRIALS)) / sd]
    for q in (M("0.001"), M("0.01"), M("0.05"), M("0.5"), M("0.95"), M("0.99"), M("0.999")):
        a, b = lo, hi
        for _ in range(80):
            m = (a + b) / 2
            a, b = (m, b) if cdf(m) < q else (a, m)
        x = (a + b) / 2
        pdf = mp.diff(cdf, x)
        values.append(x)
        tols.append(5 * mp.sqrt(q * (1 - q) / TOL_MC_TRIALS) / pdf / x)
    return values, [float(x) for x in tols]


CASES[TOL_MC], _tol_mc = tolerance_mc()
TOLERANCES[TOL_MC] = (
    _tol_mc,
    "statistical: 5 standard errors of each statistic of 20000 seeded draws (mean sd/sqrt(N); sd "
    "sqrt((mu4 - sd^4)/(4 sd^2 N)); a percentile sqrt(q(1 - q)/N)/pdf)")


# TOLERANCE.SPECYIELD: the same ideal-amplifier stage against a spec of two
# limits judged together: gainDb within 33.5813 … 33.6681 dB at 0 Hz and
# bandwidthHz at least 208 kHz. With A = A0 = 1e12 one pole, the closed loop has
# one pole at GBW·(β + 1/A0) and |G(0)| = 1/(β + 1/A0), so bandwidth ≥ 208 kHz is
# exactly |G(0)| ≤ 1/0.0208: both limits are limits on F = 20 log10(1 + Rf/Rg)
# (the 1/A0 term moves F by 48e-12 relative, far below the sampling tolerance),
# and every yield is the exact share of the (u, v) square (uniform_ratio_yield).
# First row every limit together (F within lo … min(hi, F_bw)); then one row per
# limit: yield, trials failing, nominal, mean, lowest and highest value seen.
# The overall row's figure columns hold #N/A (None here, NaN in the catalog).
TOL_SPEC_TRIALS = 20000
TOL_SPEC = ('=TOLERANCE.SPECYIELD("kind=non-inverting, a0=1e12, gbwHz=10M, rf=47k, rg=1k"; "rf=1%, rg=1%"; '
            '"gainDb | 0 | 33.5813 | 33.6681; bandwidthHz | | 208k"; 20000; 1)')


def tolerance_spec():
    t, n, gbw, a0 = M("0.01"), TOL_SPEC_TRIALS, M(10) ** 7, M(10) ** 12
    lo_db, hi_db = TOL_YIELD_LIMITS
    bw_db = 20 * mp.log10(1 / M("0.0208"))
    f = lambda u, v: 20 * mp.log10(1 + 47 * (1 + u) / (1 + v))
    bw = lambda u, v: gbw / (1 + 47 * (1 + u) / (1 + v))
    f_lo, f_hi = f(-t, t), f(t, -t)
    cdf = lambda x: uniform_ratio_yield(M(47), f_lo - 1, x)
    y_all = uniform_ratio_yield(M(47), lo_db, min(hi_db, bw_db))
    y_gain = uniform_ratio_yield(M(47), lo_db, hi_db)
    y_bw = uniform_ratio_yield(M(47), f_lo - 1, bw_db)

    def quantile(q):
        a, b = f_lo, f_hi
        for _ in range(80):
            m = (a + b) / 2
            a, b = (m, b) if cdf(m) < q else (a, m)
        return (a + b) / 2

    def moments(g):
        mean = mp.quad(lambda u, v: g(u, v), [-t, t], [-t, t]) / (2 * t) ** 2
        var = mp.quad(lambda u, v: (g(u, v) - mean) ** 2, [-t, t], [-t, t]) / (2 * t) ** 2
        return mean, mp.sqrt(var)

    # The sample extremes: the corners of the square, which n draws approach
    # within the gap to the q-quantile, q = ln(1e6)/n (P(gap larger) ≈ 1e-6).
    q = mp.log(10 ** 6) / n
    f_q_lo, f_q_hi = quantile(q), quantile(1 - q)
    to_bw = lambda x: gbw / 10 ** (x / 20)
    g_mean, g_sd = moments(f)
    b_mean, b_sd = moments(bw)
    count = lambda y: n * (1 - y)
    count_tol = lambda y: 4 * mp.sqrt(n * y * (1 - y)) / count(y)
    share_tol = lambda y: 4 * mp.sqrt(y * (1 - y) / n) / y
    values = [y_all, count(y_all), None, None, None, None,
              y_gain, count(y_gain), 20 * mp.log10(1 / (1 / M(48) + 1 / a0)), g_mean, f_lo, f_hi,
              y_bw, count(y_bw), gbw * (1 / M(48) + 1 / a0), b_mean, to_bw(f_hi), to_bw(f_lo)]
    tols = [share_tol(y_all), count_tol(y_all), 0, 0, 0, 0,
            share_tol(y_gain), count_tol(y_gain), M("1e-12"), 5 * g_sd / mp.sqrt(n) / g_mean,
            (f_q_lo - f_lo) / f_lo, (f_hi - f_q_hi) / f_hi,
            share_tol(y_bw), count_tol(y_bw), M("1e-9"), 5 * b_sd / mp.sqrt(n) / b_mean,
            (to_bw(f_q_hi) - to_bw(f_hi)) / to_bw(f_hi), (to_bw(f_lo) - to_bw(f_q_lo)) / to_bw(f_lo)]
    return values, [float(x) for x in tols]


CASES[TOL_SPEC], _tol_spec = tolerance_spec()
TOLERANCES[TOL_SPEC] = (
    _tol_spec,
    "statistical: yields 4 standard errors sqrt(y(1 - y)/N) of 20000 seeded draws, the failing "
    "counts 4 standard errors sqrt(N y(1 - y)); means 5 sd/sqrt(N); the lowest and highest value "
    "seen within the gap to the ln(1e6)/N quantile of the corner; the nominal gain exact (1e-12), "
    "the nominal bandwidth found by bisection (1e-9); 0 for the #N/A cells")

# TOLERANCE.SPECWORST: the same stage and spread against gainDb 33.4 … 33.8 dB
# and bandwidthHz ≥ 208 kHz. |G(0)| = 1/(β + 1/A0) and the bandwidth
# GBW·(β + 1/A0) are monotonic in β = Rg/(Rf + Rg), so their extremes are the
# square's corners (Rf high, Rg low and the reverse), by mpmath; meets is 1
# when both extremes are within the limit. First row: #N/A ×3, every limit.
TOL_SPEC_WORST = ('=TOLERANCE.SPECWORST("kind=non-inverting, a0=1e12, gbwHz=10M, rf=47k, rg=1k"; '
                  '"rf=1%, rg=1%"; "gainDb | 0 | 33.4 | 33.8; bandwidthHz | | 208k")')


def tolerance_spec_worst():
    t, gbw, a0 = M("0.01"), M(10) ** 7, M(10) ** 12
    beta = lambda rf, rg: rg / (rf + rg)
    b_lo, b_nom, b_hi = beta(47000 * (1 + t), 1000 * (1 - t)), beta(M(47000), M(1000)), beta(47000 * (1 - t), 1000 * (1 + t))
    gain = lambda b: 20 * mp.log10(1 / (b + 1 / a0))
    bw = lambda b: gbw * (b + 1 / a0)
    g = [gain(b_hi), gain(b_nom), gain(b_lo)]
    w = [bw(b_lo), bw(b_nom), bw(b_hi)]
    g_meets = 1 if M("33.4") <= g[0] and g[2] <= M("33.8") else 0
    w_meets = 1 if w[0] >= 208000 else 0
    return [None, None, None, g_meets * w_meets] + g + [g_meets] + w + [w_meets]


CASES[TOL_SPEC_WORST] = tolerance_spec_worst()
TOLERANCES[TOL_SPEC_WORST] = (
    [0, 0, 0, 0, 1e-12, 1e-12, 1e-12, 0, 1e-9, 1e-9, 1e-9, 0],
    "the gain from one nodal solve (1e-12); the bandwidth found by bisection of the −3 dB point (1e-9); "
    "the flags exact; 0 for the #N/A cells")

def evaluate():
    cases = []
    for f, xs in CASES.items():
        # None: a #N/A cell of the example's result (NaN in the catalog).
        case = {"formula": f, "expected": [None if x is None else float(x) for x in xs]}
        if f in TOLERANCES:
            case["rtol"], case["why"] = TOLERANCES[f]
        cases.append(case)
    return {"cases": cases}


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
            scale = max([abs(v) for v in case["expected"] if v is not None] + [1e-300])
            for i, (v, w) in enumerate(zip(case["expected"], prev)):
                if v is None or w is None:
                    if (v is None) != (w is None):
                        print(f"sheet_catalog {case['formula']} item {i}: {v} != committed {w}")
                        bad += 1
                    continue
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
