#!/usr/bin/env python3
"""Reference figures for choosing parts against a spec (src/network/choose.rs).

Three independent oracles, written to tests/reference/data/network_choose.json and
compared by tests/network_choose.rs:

1. Feasibility, by brute force over the IEC 60063 tables of the PyPI `eseries`
   package: every pair of table values (R1 in one decade, R2 over four decades,
   which covers every ratio 0.1 ... 1000) for a non-inverting gain of 48; the least
   |error| of 1 + R2/R1 against 48 and how many pairs land within +-0.5 %.

2. Yield of two independent resistors uniform on nominal*(1 +- p), exactly: the
   probability P(q_lo <= R2/R1 <= q_hi) as the double integral of the joint density
   (1/(2p))^2 over the region, integrated with mpmath.quad at 30 digits: the inner
   integral over v is the length of an interval (a closed form), the outer one over
   u is integrated numerically with the interval's corners as break points. The
   window on q comes from the closed-loop gain G = (1 + q)A/(A + 1 + q) (ideal:
   G = 1 + q), inverting |G| = qA/(A + 1 + q), divider k = 1/(1 + q), solved for q
   by sympy.

3. Yield with a two-part R2 leg (series or parallel), by numpy Monte Carlo with
   N = 2 000 000 draws per case (seeded), with its binomial standard error
   sqrt(y(1 - y)/N).

    ~/.cache/loopwright/venv/bin/python tests/reference/network_choose.py          # write
    ~/.cache/loopwright/venv/bin/python tests/reference/network_choose.py --check  # compare
"""
import math
import pathlib

import eseries
import mpmath
import numpy as np
import sympy as sp
from refdata import write_or_check

OUT = pathlib.Path(__file__).resolve().parent / "data" / "network_choose.json"
SEED = 20261203
TRIALS = 2_000_000
REL_TOL = 1e-9
DPS = 30

SERIES = ["E6", "E12", "E24", "E48", "E96", "E192"]


def table(name):
    return [float(x) for x in eseries.series(getattr(eseries.ESeries, name))]


def feasibility(target=48.0, tol=0.005):
    out = {}
    for name in SERIES:
        m = np.array(table(name))
        r1 = m[:, None]
        r2 = np.concatenate([m * 10.0**k for k in range(-1, 3)])[None, :]
        err = (1.0 + r2 / r1) / target - 1.0
        i = np.unravel_index(np.argmin(np.abs(err)), err.shape)
        out[name] = {
            "best_abs_error": float(abs(err[i])),
            "pairs_within": int(np.count_nonzero(np.abs(err) <= tol)),
        }
    return out


def q_window(network, target, tol, a):
    """q = R2/R1 at the window's ends and at the target, solved with sympy."""
    q, g = sp.symbols("q g", positive=True)
    A = sp.Integer(0) if a is None else sp.nsimplify(a)
    if network == "non-inverting":
        expr = (1 + q) if a is None else (1 + q) * A / (A + 1 + q)
    elif network == "inverting":
        expr = q if a is None else q * A / (A + 1 + q)
    else:
        expr = 1 / (1 + q)
    sol = sp.solve(sp.Eq(expr, g), q)
    assert len(sol) == 1, sol
    mag = abs(sp.nsimplify(target))
    tol = sp.nsimplify(tol)
    ends = [sp.N(sol[0].subs(g, mag * (1 + s * tol)), 30) for s in (-1, 1)]
    return min(ends), max(ends), sp.N(sol[0].subs(g, mag), 30)


def exact_yield(q_lo, q_hi, n1, n2, p):
    """P(q_lo <= n2(1+v)/(n1(1+u)) <= q_hi), u, v uniform on [-p, p], independent."""
    with mpmath.workdps(DPS):
        return _exact_yield(q_lo, q_hi, n1, n2, p)


def _exact_yield(q_lo, q_hi, n1, n2, p):
    p = mpmath.mpf(p)
    n1, n2 = mpmath.mpf(n1), mpmath.mpf(n2)
    q_lo, q_hi = mpmath.mpf(q_lo), mpmath.mpf(q_hi)

    def v_end(c, u):  # v such that n2(1+v) = c*n1*(1+u)
        return c * n1 * (1 + u) / n2 - 1

    def inner(u):  # length of {v in [-p, p]: v_end(q_lo) <= v <= v_end(q_hi)}
        a = max(-p, v_end(q_lo, u))
        b = min(p, v_end(q_hi, u))
        return max(mpmath.mpf(0), b - a)

    points = [-p, p]
    for c in (q_lo, q_hi):
        for edge in (-p, p):  # u where v_end(c, u) = edge
            u = (1 + edge) * n2 / (c * n1) - 1
            if -p < u < p:
                points.append(u)
    points = sorted(points)
    total = mpmath.quad(inner, points)
    return float(total / (2 * p) ** 2)


SINGLE_CASES = [
    # network, target, tol, A, r1, r2, grade
    ("non-inverting", 48.0, 0.005, None, 10e3, 470e3, 0.01),
    ("non-inverting", 48.0, 0.005, None, 10e3, 470e3, 0.005),
    ("non-inverting", 48.0, 0.005, None, 1e3, 47e3, 0.0025),
    ("non-inverting", 48.0, 0.005, None, 243.0, 11.5e3, 0.01),
    ("non-inverting", 48.0, 0.005, None, 243.0, 11.5e3, 0.005),
    ("non-inverting", 48.0, 0.005, None, 243.0, 11.5e3, 0.0025),
    ("non-inverting", 48.0, 0.005, None, 243.0, 11.5e3, 0.001),
    ("non-inverting", 48.0, 0.005, None, 11.5e3, 536e3, 0.01),
    ("non-inverting", 48.0, 0.005, 1e4, 10e3, 470e3, 0.01),
    ("non-inverting", 48.0, 0.005, 1e4, 10e3, 475e3, 0.005),
    ("non-inverting", 2.0, 0.01, None, 10e3, 10e3, 0.01),
    ("inverting", -10.0, 0.01, None, 10e3, 100e3, 0.01),
    ("inverting", -10.0, 0.01, 2e3, 10e3, 102e3, 0.005),
    ("divider", 0.25, 0.01, None, 10e3, 30e3, 0.01),
    ("divider", 0.25, 0.002, None, 10e3, 30.1e3, 0.002),
]

TWO_PART_CASES = [
    # network, target, tol, A, r1, first, second, joint, grade
    ("non-inverting", 48.0, 0.005, None, 210.0, 5230.0, 4640.0, "series", 0.01),
    ("non-inverting", 48.0, 0.005, None, 432.0, 21500.0, 365000.0, "parallel", 0.01),
    ("non-inverting", 48.0, 0.005, None, 210.0, 5170.0, 4700.0, "series", 0.005),
    ("non-inverting", 48.0, 0.005, None, 530.0, 47000.0, 53000.0, "parallel", 0.005),
    ("non-inverting", 48.0, 0.005, None, 470.0, 22000.0, 100.0, "series", 0.0025),
    ("non-inverting", 48.0, 0.005, 1e4, 210.0, 5230.0, 4750.0, "series", 0.005),
]


def monte_carlo(rng, q_lo, q_hi, r1, first, second, joint, p):
    a = r1 * (1 + rng.uniform(-p, p, TRIALS))
    f = first * (1 + rng.uniform(-p, p, TRIALS))
    s = second * (1 + rng.uniform(-p, p, TRIALS))
    r2 = f + s if joint == "series" else f * s / (f + s)
    q = r2 / a
    y = float(np.mean((q >= q_lo) & (q <= q_hi)))
    return y, math.sqrt(y * (1 - y) / TRIALS)


def build():
    data = {
        "source": "eseries (IEC 60063 tables) brute force; mpmath.quad of the joint "
        "uniform density; numpy Monte Carlo",
        "seed": SEED,
        "trials": TRIALS,
        "feasibility_gain48": feasibility(),
        "single": [],
        "two_part": [],
    }
    for network, target, tol, a, r1, r2, p in SINGLE_CASES:
        q_lo, q_hi, _ = q_window(network, target, tol, a)
        data["single"].append({
            "network": network, "target": target, "tolerance": tol, "open_loop_gain": a,
            "r1": r1, "r2": r2, "grade": p,
            "yield": exact_yield(q_lo, q_hi, r1, r2, p),
        })
    rng = np.random.default_rng(SEED)
    for network, target, tol, a, r1, first, second, joint, p in TWO_PART_CASES:
        q_lo, q_hi, _ = q_window(network, target, tol, a)
        y, se = monte_carlo(rng, float(q_lo), float(q_hi), r1, first, second, joint, p)
        data["two_part"].append({
            "network": network, "target": target, "tolerance": tol, "open_loop_gain": a,
            "r1": r1, "first": first, "second": second, "joint": joint, "grade": p,
            "yield": y, "std_error": se,
        })
    return data


def main():
    data = build()
    write_or_check(data, OUT, REL_TOL, abs_tol=1e-15, summary=f"network_choose: {len(data['single'])} exact yields, {len(data['two_part'])} Monte Carlo yields, {len(data['feasibility_gain48'])} series match")


if __name__ == "__main__":
    main()
