#!/usr/bin/env python3
"""Oracle for the closed-loop power series of a weakly nonlinear amplifier.

Symbolic part (sympy): puts y = b1*x + b2*x**2 + b3*x**3 into the loop equation
y = A(x - beta*y), A(u) = a1*u + a2*u**2 + a3*u**3, solves the coefficients of
x, x**2, x**3 order by order, and checks that they equal the closed forms used in
src/distortion/series.rs:
    b1 = a1/D, b2 = a2/D**3, b3 = (a3*D - 2*a2**2*beta)/D**5, D = 1 + a1*beta.
It also derives the distortion ratios at equal output amplitude.

Numeric part: seeded random amplifiers and loops, with b1..b3 and the ratios
evaluated from the *solved* sympy expressions (not from the closed forms), written
to tests/reference/data/distortion_series.json.

Usage: distortion_series_sympy.py          write the JSON
       distortion_series_sympy.py --check  recompute and compare (rel. tol. 1e-9)
"""
import json
import math
import pathlib
import random
import sys

import sympy as sp

OUT = pathlib.Path(__file__).parent / "data" / "distortion_series.json"
SEED = 20260602
CASES = 40
REL_TOL = 1e-9


def solve_series():
    a1, a2, a3, beta, x = sp.symbols("a1 a2 a3 beta x")
    b1, b2, b3 = sp.symbols("b1 b2 b3")
    y = b1 * x + b2 * x**2 + b3 * x**3
    u = x - beta * y
    residual = sp.expand(y - (a1 * u + a2 * u**2 + a3 * u**3))
    sol = {}
    for k, b in ((1, b1), (2, b2), (3, b3)):
        eq = residual.coeff(x, k).subs(sol)
        sol[b] = sp.simplify(sp.solve(eq, b)[0])
    d = 1 + a1 * beta
    closed = {b1: a1 / d, b2: a2 / d**3, b3: (a3 * d - 2 * a2**2 * beta) / d**5}
    for b in (b1, b2, b3):
        if sp.simplify(sol[b] - closed[b]) != 0:
            print(f"closed form for {b} differs from the solved series: {sol[b]}")
            sys.exit(1)
    # Leading-order HD at equal output amplitude Y: HD2 ∝ |c2|/c1², HD3 ∝ |c3|/|c1|³.
    hd2_ratio = sp.simplify((sol[b2] / sol[b1] ** 2) / (a2 / a1**2))
    hd3_ratio = sp.simplify((sol[b3] / sol[b1] ** 3) / (a3 / a1**3))
    syms = (a1, a2, a3, beta)
    return {
        "b1": sp.lambdify(syms, sol[b1], "mpmath"),
        "b2": sp.lambdify(syms, sol[b2], "mpmath"),
        "b3": sp.lambdify(syms, sol[b3], "mpmath"),
        "hd2_ratio_output": sp.lambdify(syms, hd2_ratio, "mpmath"),
        "hd3_ratio_output": sp.lambdify(syms, hd3_ratio, "mpmath"),
    }


def make_cases():
    import mpmath

    mpmath.mp.dps = 50
    f = solve_series()
    rng = random.Random(SEED)
    cases = []
    for i in range(CASES):
        a1 = 10 ** rng.uniform(1, 5) * rng.choice((1, -1))
        d = 10 ** rng.uniform(0, 3)  # amount of feedback 1 … 1000
        beta = (d - 1) / a1
        a2 = a1 * 10 ** rng.uniform(-2, 1) * rng.choice((1, -1))
        a3 = a1 * 10 ** rng.uniform(-2, 1) * rng.choice((1, -1))
        args = [mpmath.mpf(v) for v in (a1, a2, a3, beta)]
        case = {"name": f"case{i:02d}", "a1": a1, "a2": a2, "a3": a3, "beta": beta}
        for key, fn in f.items():
            case[key] = float(fn(*args))
        cases.append(case)
    return {"source": "sympy series reversion, tests/reference/distortion_series_sympy.py", "seed": SEED, "cases": cases}


def main():
    data = make_cases()
    if "--check" in sys.argv:
        old = json.loads(OUT.read_text())
        bad = 0
        for new_case, old_case in zip(data["cases"], old["cases"]):
            for key, value in new_case.items():
                ref = old_case.get(key)
                if isinstance(value, str):
                    continue
                if ref is None or not math.isclose(value, ref, rel_tol=REL_TOL, abs_tol=0.0):
                    print(f"{new_case['name']}: {key} differs: {value!r} vs committed {ref!r}")
                    bad += 1
        if bad or len(data["cases"]) != len(old["cases"]):
            sys.exit(1)
        print(f"ok: {len(data['cases'])} cases match")
        return
    OUT.write_text(json.dumps(data, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
