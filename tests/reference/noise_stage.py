#!/usr/bin/env python3
"""Oracle for the noise of op-amp stages (src/noise/).

For seeded random non-inverting and inverting stages and a few fixed scenarios:
- each source's output noise density (4kTR thermal noise of R_f, R_g, R_p with
  k = 1.380649e-23 J/K; op-amp e_n and i_n with 1/f corners) in the flat band;
- the closed-loop response H = T/(1+T), T(s) = 2*pi*GBW/NG / (s * prod(1 + s/(2*pi*f_p)))
  evaluated with numpy complex arithmetic;
- the rms output noise sqrt(integral of S0(f)*|H(f)|^2 df) over the band, by
  scipy.integrate.quad on decade pieces up to 10^22 Hz for an unbounded band;
- the noise bandwidth integral of |H|^2 from 0 to infinity;
- the -3 dB bandwidth (highest crossing of |H|^2 = 1/2, scipy.optimize.brentq);
- stability from numpy.roots of the characteristic polynomial (unstable cases
  are listed for the Rust side to refuse).

Writes tests/reference/data/noise_stage.json; `--check` recomputes and
compares (rel. tol. 1e-9).
"""
import json
import math
import pathlib
import random
import sys

import numpy as np
from scipy.integrate import quad
from scipy.optimize import brentq

OUT = pathlib.Path(__file__).parent / "data" / "noise_stage.json"
SEED = 4242
K_B = 1.380649e-23  # J/K, exact (SI 2019)
REL_TOL = 1e-9
QUAD_REL = 1e-12


def psd_terms(c, f):
    ng = 1 + c["r_feedback"] / c["r_gain"]
    four_kt = 4 * K_B * c["temperature_k"]
    en2 = c["voltage_density"] ** 2 * (1 + (c["voltage_corner_hz"] / f if c["voltage_corner_hz"] else 0.0))
    in2 = c["current_density"] ** 2 * (1 + (c["current_corner_hz"] / f if c["current_corner_hz"] else 0.0))
    return {
        "r_feedback": four_kt * c["r_feedback"],
        "r_gain": four_kt * c["r_gain"] * (c["r_feedback"] / c["r_gain"]) ** 2,
        "r_plus": four_kt * c["r_plus"] * ng**2,
        "amplifier_voltage": en2 * ng**2,
        "amplifier_current_plus": in2 * c["r_plus"] ** 2 * ng**2,
        "amplifier_current_minus": in2 * c["r_feedback"] ** 2,
    }


def h2(c, f):
    ng = 1 + c["r_feedback"] / c["r_gain"]
    s = 2j * np.pi * f
    t = 2 * np.pi * c["gbw_hz"] / ng / s
    for p in c["extra_poles_hz"]:
        t = t / (1 + s / (2 * np.pi * p))
    h = t / (1 + t)
    return float(abs(h) ** 2)


def stable(c):
    ng = 1 + c["r_feedback"] / c["r_gain"]
    wc = 2 * np.pi * c["gbw_hz"] / ng
    # s * prod(1 + s/wp) + wc = 0
    poly = np.poly1d([1.0, 0.0])
    for p in c["extra_poles_hz"]:
        poly = poly * np.poly1d([1 / (2 * np.pi * p), 1.0])
    poly = poly + np.poly1d([wc])
    return bool(all(r.real < 0 for r in np.roots(poly.coeffs)))


def integrate(g, f_low, f_high):
    """quad over decade pieces from f_low (or 0) up to f_high (or infinity)."""
    total = 0.0
    edges = []
    start = f_low
    if start == 0.0:
        edges.append(0.0)
        start = 1e-3
    k = math.floor(math.log10(start))
    edges.append(start)
    # For an unbounded band, stop at 10^22 Hz: |H|^2 falls at least as (f_c/f)^2, so
    # the rest is below f_c/10^22 < 1e-13 of the total for f_c < 1 GHz.
    # (quad's own infinite-range rule returned a wrong sign on this tail.)
    top = f_high if math.isfinite(f_high) else 1e22
    while 10.0 ** (k + 1) < top:
        k += 1
        if 10.0**k > start:
            edges.append(10.0**k)
    edges.append(top)
    for a, b in zip(edges[:-1], edges[1:]):
        v, _ = quad(g, a, b, epsabs=0.0, epsrel=QUAD_REL, limit=200)
        total += v
    return total


def bandwidth(c):
    ng = 1 + c["r_feedback"] / c["r_gain"]
    fc = c["gbw_hz"] / ng
    hi = max([fc] + list(c["extra_poles_hz"])) * 1e3
    grid = np.logspace(math.log10(fc * 1e-3), math.log10(hi), 4000)
    vals = np.array([h2(c, f) for f in grid]) - 0.5
    idx = np.nonzero(vals >= 0)[0][-1]
    return brentq(lambda f: h2(c, f) - 0.5, grid[idx], grid[idx + 1], xtol=1e-300, rtol=4 * np.finfo(float).eps)


def evaluate(c):
    out = dict(c)
    ng = 1 + c["r_feedback"] / c["r_gain"]
    gain = ng if c["kind"] == "non-inverting" else -c["r_feedback"] / c["r_gain"]
    out["noise_gain"] = ng
    out["signal_gain"] = gain
    if not stable(c):
        out["unstable"] = True
        return out
    out["unstable"] = False
    f_high = math.inf if c["f_high"] is None else c["f_high"]
    g = lambda f: sum(psd_terms(c, f).values()) * h2(c, f)
    out["output_rms"] = math.sqrt(integrate(g, c["f_low"], f_high))
    out["input_referred_rms"] = out["output_rms"] / abs(gain)
    out["noise_bandwidth_hz"] = integrate(lambda f: h2(c, f), 0.0, math.inf)
    out["bandwidth_hz"] = bandwidth(c)
    out["density_points"] = []
    for f in c["density_frequencies"]:
        terms = psd_terms(c, f)
        total = sum(terms.values())
        out["density_points"].append({
            "frequency_hz": f,
            "contributions": {k: math.sqrt(v) for k, v in terms.items()},
            "total": math.sqrt(total),
            "input_referred": math.sqrt(total) / abs(gain),
            "output_density": math.sqrt(total * h2(c, f)),
        })
    return out


def fixed_cases():
    base = {"r_plus": 0.0, "temperature_k": 300.0, "voltage_corner_hz": 0.0, "current_density": 0.0,
            "current_corner_hz": 0.0, "extra_poles_hz": [], "f_low": 0.0, "f_high": None,
            "density_frequencies": [1.0, 1e3, 1e6]}
    return [
        # White noise only, one pole: output rms = e*NG*sqrt(pi/2 * GBW/NG).
        dict(base, name="white-single-pole", kind="non-inverting", r_feedback=9e3, r_gain=1e3,
             voltage_density=10e-9, gbw_hz=1e6),
        # Audio band with 1/f corners, inverting.
        dict(base, name="audio-inverting", kind="inverting", r_feedback=47e3, r_gain=4.7e3, r_plus=4.3e3,
             voltage_density=7e-9, voltage_corner_hz=30.0, current_density=0.9e-12, current_corner_hz=300.0,
             gbw_hz=8e6, f_low=20.0, f_high=20e3, temperature_k=318.15),
        # One extra pole, peaking.
        dict(base, name="second-pole-peaking", kind="non-inverting", r_feedback=1e3, r_gain=1e3, r_plus=50.0,
             voltage_density=3e-9, current_density=2e-12, gbw_hz=100e6, extra_poles_hz=[30e6]),
        # Two extra poles, stable.
        dict(base, name="two-poles-stable", kind="non-inverting", r_feedback=0.0, r_gain=1e3, r_plus=600.0,
             voltage_density=5e-9, voltage_corner_hz=5.0, current_density=0.5e-12, gbw_hz=10e6,
             extra_poles_hz=[8e6, 20e6], f_low=0.1),
        # Two extra poles below the crossover: unstable, must be refused.
        dict(base, name="two-poles-unstable", kind="inverting", r_feedback=1e3, r_gain=1e3,
             voltage_density=5e-9, gbw_hz=20e6, extra_poles_hz=[3e6, 4e6]),
    ]


def random_cases(rng):
    cases = []
    for i in range(16):
        kind = rng.choice(("non-inverting", "inverting"))
        r_gain = 10 ** rng.uniform(1, 5)
        r_feedback = r_gain * 10 ** rng.uniform(-1, 3)
        gbw = 10 ** rng.uniform(5, 8.5)
        ng = 1 + r_feedback / r_gain
        fc = gbw / ng
        npoles = rng.choice((0, 1, 2))
        poles = [fc * 10 ** rng.uniform(-0.3, 2) for _ in range(npoles)]
        f_low = rng.choice((0.0, 10 ** rng.uniform(-2, 1)))
        fce = 0.0 if f_low == 0.0 else 10 ** rng.uniform(0, 3)
        fci = 0.0 if f_low == 0.0 else 10 ** rng.uniform(0, 3)
        f_high = rng.choice((None, fc * 10 ** rng.uniform(-2, 2)))
        cases.append({
            "name": f"random{i:02d}", "kind": kind, "r_feedback": r_feedback, "r_gain": r_gain,
            "r_plus": rng.choice((0.0, 10 ** rng.uniform(1, 5))), "temperature_k": rng.uniform(250, 400),
            "voltage_density": 10 ** rng.uniform(-9.3, -7), "voltage_corner_hz": fce,
            "current_density": 10 ** rng.uniform(-15, -11), "current_corner_hz": fci,
            "gbw_hz": gbw, "extra_poles_hz": poles, "f_low": f_low, "f_high": f_high,
            "density_frequencies": [max(f_low, 0.1), fc / 10, fc * 3],
        })
    return cases


def make():
    rng = random.Random(SEED)
    cases = [evaluate(c) for c in fixed_cases() + random_cases(rng)]
    return {"source": "scipy.integrate.quad, tests/reference/noise_stage.py", "seed": SEED, "cases": cases}


def compare(a, b, path, bad):
    if isinstance(a, dict):
        for k in a:
            compare(a[k], b.get(k) if isinstance(b, dict) else None, f"{path}.{k}", bad)
    elif isinstance(a, list):
        if not isinstance(b, list) or len(a) != len(b):
            bad.append(path)
            return
        for i, (x, y) in enumerate(zip(a, b)):
            compare(x, y, f"{path}[{i}]", bad)
    elif isinstance(a, float) and isinstance(b, (int, float)):
        if not math.isclose(a, b, rel_tol=REL_TOL, abs_tol=1e-300):
            bad.append(path)
    elif a != b:
        bad.append(path)


def main():
    data = make()
    if "--check" in sys.argv:
        old = json.loads(OUT.read_text())
        bad = []
        for new_case, old_case in zip(data["cases"], old["cases"]):
            compare(new_case, old_case, new_case["name"], bad)
        if len(data["cases"]) != len(old["cases"]):
            bad.append("number of cases")
        for b in bad:
            print(f"differs: {b}")
        if bad:
            sys.exit(1)
        print(f"ok: {len(data['cases'])} cases match")
        return
    OUT.write_text(json.dumps(data, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
