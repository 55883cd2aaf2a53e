#!/usr/bin/env python3
"""Oracle for the numeric closed-loop spectrum (src/distortion/newton.rs and harmonics.rs).

For seeded random amplifiers y = a1*u + a2*u**2 + a3*u**3 in a loop u = x - beta*y,
each sample of one period of x_k = X*cos(2*pi*k/N) is solved with
scipy.optimize.brentq on the branch through zero (bracketed by the roots of
g'(u) = 1 + beta*A'(u) nearest zero, found with numpy.roots), and the harmonics
come from numpy.fft.fft. Amplitudes are taken as fractions of the fold amplitude,
so the set covers both small signals and the strongly nonlinear region where the
power series no longer holds. Amplitudes past the fold are listed as cases that
must be refused.

Writes tests/reference/data/distortion_harmonics.json;
`--check` recomputes and compares (rel. tol. 1e-9).
"""
import json
import math
import pathlib
import random
import sys

import numpy as np
from scipy.optimize import brentq

OUT = pathlib.Path(__file__).parent / "data" / "distortion_harmonics.json"
SEED = 6060
N = 64
FRACTIONS = (0.01, 0.2, 0.6, 0.95)
REL_TOL = 1e-9


def branch(a1, a2, a3, beta):
    """Monotonic interval (u_lo, u_hi) of g around 0 and the fold inputs."""
    roots = np.roots([3 * beta * a3, 2 * beta * a2, 1 + a1 * beta]) if a3 != 0 else np.roots([2 * beta * a2, 1 + a1 * beta])
    real = [r.real for r in roots if abs(r.imag) < 1e-12 * max(1.0, abs(r.real))]
    u_lo = max([r for r in real if r < 0], default=-math.inf)
    u_hi = min([r for r in real if r > 0], default=math.inf)
    g = lambda u: u + beta * (a1 * u + a2 * u * u + a3 * u**3)
    x_lo = g(u_lo) if math.isfinite(u_lo) else -math.inf
    x_hi = g(u_hi) if math.isfinite(u_hi) else math.inf
    return u_lo, u_hi, min(-x_lo, x_hi)


def solve(a1, a2, a3, beta, x, u_lo, u_hi):
    if x == 0.0:
        return 0.0
    g = lambda u: u + beta * (a1 * u + a2 * u * u + a3 * u**3) - x
    if x > 0:
        lo, hi = 0.0, u_hi
    else:
        lo, hi = u_lo, 0.0
    if not math.isfinite(lo) or not math.isfinite(hi):
        step = abs(x) / (1 + a1 * beta)
        while True:
            end = step if x > 0 else -step
            if (x > 0 and g(end) > 0) or (x < 0 and g(end) < 0):
                break
            step *= 2
        lo, hi = (0.0, end) if x > 0 else (end, 0.0)
    u = brentq(g, lo, hi, xtol=1e-300, rtol=4 * np.finfo(float).eps, maxiter=500)
    return a1 * u + a2 * u * u + a3 * u**3


def make_cases():
    rng = random.Random(SEED)
    cases = []
    refused = []
    for i in range(6):
        a1 = 10 ** rng.uniform(1.5, 4)
        d = 10 ** rng.uniform(0.3, 2)
        beta = (d - 1) / a1
        a2 = a1 * 10 ** rng.uniform(-1, 0.5) * rng.choice((1, -1))
        a3 = -a1 * 10 ** rng.uniform(-0.5, 0.5)  # compressive: the curve folds
        u_lo, u_hi, fold = branch(a1, a2, a3, beta)
        for frac in FRACTIONS:
            amplitude = frac * fold
            xs = amplitude * np.cos(2 * np.pi * np.arange(N) / N)
            ys = np.array([solve(a1, a2, a3, beta, x, u_lo, u_hi) for x in xs])
            spec = np.fft.fft(ys)
            harmonics = [2 * abs(spec[h]) / N for h in range(1, 6)]
            cases.append({
                "name": f"amp{i}-at-{frac}",
                "a1": a1, "a2": a2, "a3": a3, "beta": beta,
                "amplitude": amplitude, "samples": N,
                "fold_amplitude": fold,
                "dc": float(spec[0].real / N),
                "harmonics": harmonics,
                "hd2": harmonics[1] / harmonics[0],
                "hd3": harmonics[2] / harmonics[0],
            })
        refused.append({"name": f"amp{i}-past-fold", "a1": a1, "a2": a2, "a3": a3, "beta": beta, "amplitude": 1.05 * fold})
    return {"source": "scipy.optimize.brentq + numpy.fft, tests/reference/distortion_harmonics.py", "seed": SEED, "cases": cases, "refused": refused}


def close(a, b):
    if isinstance(a, list):
        return len(a) == len(b) and all(close(x, y) for x, y in zip(a, b))
    if isinstance(a, str):
        return a == b
    return math.isclose(a, b, rel_tol=REL_TOL, abs_tol=1e-300)


def main():
    data = make_cases()
    if "--check" in sys.argv:
        old = json.loads(OUT.read_text())
        bad = 0
        for group in ("cases", "refused"):
            for new_case, old_case in zip(data[group], old[group]):
                for key, value in new_case.items():
                    # Harmonics far below the fundamental are at rounding level; compare
                    # them to the fundamental's scale.
                    if key == "harmonics":
                        scale = value[0]
                        ok = all(abs(x - y) <= REL_TOL * scale for x, y in zip(value, old_case[key]))
                    else:
                        ok = close(value, old_case.get(key))
                    if not ok:
                        print(f"{new_case['name']}: {key} differs")
                        bad += 1
            if len(data[group]) != len(old[group]):
                bad += 1
        if bad:
            sys.exit(1)
        print(f"ok: {len(data['cases'])} cases and {len(data['refused'])} refusals match")
        return
    OUT.write_text(json.dumps(data, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
