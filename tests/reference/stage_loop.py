#!/usr/bin/env python3
"""Reference figures for the loop of a stage's circuit (src/stage/margins.rs,
src/stage/nyquist.rs): margins at every crossing, least distance from -1,
encirclements of -1 and closed-loop poles, computed here independently of
loopwright for the nine stages of stage_sympy.py and two unstable ones (input-capacitance pole,
feedback capacitor, capacitive load with and without an isolation resistor,
transimpedance with photodiode capacitance, three-pole and complex-pole
amplifiers, zeros, transimpedance without Cf).

- T(s): the exact rational loop gain of stage_sympy.py (sympy, the nodal
  equations with the amplifier's output source replaced by a 1 V test source),
  written as a ratio of polynomials in p = s/ws, ws = 2 pi 1 MHz, with float
  coefficients (sympy at 30 digits);
- crossings: control.stability_margins(returnall=True) on that transfer
  function gives every unity-gain and -180 degree crossing; each is polished by
  scipy.optimize.brentq on the exact T (mpmath, 30 digits) within 0.1 % of
  python-control's frequency, and read by the convention of docs/freq.md
  (phase margin 180 - |angle T| with the angle in (-180, 180], gain margin
  |20 log10 |T||), the worst of each kind signed by the closed-loop poles;
- closed-loop poles: scipy.linalg.eig of the descriptor form of stage_sympy.py
  (its descriptor_poles);
- encirclements: a brute force, the sum of the angle increments of 1 + T on a
  dense log grid (400 000 points from 1e-4 Hz to 1e13 Hz, each increment
  checked below 0.5 rad), doubled for the mirror image, closed at both ends
  (T is real at 0 and at infinity); N = -turns, P = right-half-plane roots of
  T's denominator (numpy.roots), Z = N + P;
- least distance min |1 + T|: the dense grid's minimum, refined with
  scipy.optimize.minimize_scalar (bounded) between its neighbours.

Writes tests/reference/data/stage_loop.json, read by tests/stage_loop_reference.rs.
With --check, recompute and compare with the committed file (relative 1e-9).

    ~/.cache/loopwright/venv/bin/python tests/reference/stage_loop.py [--check]
"""
import json
import math
import sys
from pathlib import Path

import control
import mpmath
import numpy as np
import scipy.optimize as opt
import sympy as sp

sys.path.insert(0, str(Path(__file__).parent))
import stage_sympy as ss  # noqa: E402  (the stage documents and the exact loop gain)

OUT = Path(__file__).parent / "data" / "stage_loop.json"
# Beyond stage_sympy.py's nine (all stable): two of our own that are not.
EXTRA_CASES = [
    ("unstable follower: three poles at 10 MHz GBW, 2 MHz and 4 MHz",
     {"kind": "non-inverting", "amplifier": ss.amp_case(3e5, 1e7, polesHz=["2M", "4M"], ro=30),
      "parts": {}}),
    ("unstable capacitive load: gain 2, Ro = 200, Cl = 1 uF, second pole at 500 kHz",
     {"kind": "non-inverting", "amplifier": ss.amp_case(1e5, 1e7, polesHz=["500k"], ro=200),
      "parts": {"rf": "1k", "rg": "1k", "cl": "1u"}}),
]
TAU = 2 * math.pi
WS = TAU * 1e6
DENSE = 400_000
DENSE_SPAN_HZ = (1e-4, 1e13)


def scaled_polys(t):
    """T(s) = N(s)/D(s) as float coefficient lists in p = s/WS (highest first),
    D monic."""
    num, den = sp.fraction(sp.cancel(sp.together(t)))
    p = sp.symbols("p")
    num = sp.Poly(sp.expand(num.subs(ss.s, WS * p)), p)
    den = sp.Poly(sp.expand(den.subs(ss.s, WS * p)), p)
    lead = den.all_coeffs()[0]
    n = [float(sp.N(c / lead, 30)) for c in num.all_coeffs()]
    d = [float(sp.N(c / lead, 30)) for c in den.all_coeffs()]
    return n, d


def refine(g, f0):
    """brentq on g(ln f) within 0.1 % of f0 (widened if no sign change)."""
    for span in (1e-3, 1e-2, 1e-1):
        a, b = math.log(f0 * (1 - span)), math.log(f0 * (1 + span))
        if g(a) * g(b) <= 0:
            return math.exp(opt.brentq(g, a, b, xtol=1e-15, rtol=1e-15))
    raise SystemExit(f"stage_loop: no sign change near {f0} Hz")


def crossings(n, d, exact_t):
    loop = control.tf(n, d)
    gm, _pm, _sm, wpc, wgc, _w = control.stability_margins(loop, returnall=True)
    lnmag = lambda x: float(mpmath.log(abs(exact_t(math.exp(x)))))

    def phase_gap(x):
        # angle of -T: zero where T is on the negative real axis.
        return float(mpmath.arg(-exact_t(math.exp(x))))

    fcs = sorted(refine(lnmag, float(w) * WS / TAU) for w in wgc if w > 0)
    fps = sorted(refine(phase_gap, float(w) * WS / TAU) for g, w in zip(gm, wpc) if g > 0 and w > 0)
    gains = []
    for f in fcs:
        t = complex(exact_t(f))
        up = abs(complex(exact_t(f * (1 + 1e-6)))) > abs(complex(exact_t(f * (1 - 1e-6))))
        gains.append([f, 180 - abs(math.degrees(np.angle(t))), up])
    phases = []
    for f in fps:
        db = 20 * math.log10(abs(complex(exact_t(f))))
        phases.append([f, abs(db), db > 0])
    return gains, phases


def brute_force_nyquist(n, d):
    f = np.logspace(math.log10(DENSE_SPAN_HZ[0]), math.log10(DENSE_SPAN_HZ[1]), DENSE)
    pj = 1j * TAU * f / WS
    t = np.polyval(n, pj) / np.polyval(d, pj)
    w = 1 + t
    inc = np.angle(w[1:] / w[:-1])
    if np.max(np.abs(inc)) > 0.5:
        raise SystemExit("stage_loop: the dense grid is too coarse for the curve")
    total = 2 * inc.sum()
    # Closing at 0 (from conj w[0] to w[0]) and at infinity (w[-1] to conj w[-1]).
    total += np.angle(w[0] / np.conj(w[0])) + np.angle(np.conj(w[-1]) / w[-1])
    turns = total / TAU
    if abs(turns - round(turns)) > 1e-3:
        raise SystemExit(f"stage_loop: winding {turns} is not whole")
    p_rhp = int(sum(1 for r in np.roots(d) if r.real > 0))
    clockwise = -int(round(turns))
    dist = np.abs(w)
    i = int(np.argmin(dist))
    lo, hi = math.log(f[max(i - 1, 0)]), math.log(f[min(i + 1, DENSE - 1)])
    h = lambda x: abs(1 + np.polyval(n, 1j * math.exp(x) * TAU / WS) / np.polyval(d, 1j * math.exp(x) * TAU / WS))
    r = opt.minimize_scalar(h, bounds=(lo, hi), method="bounded", options={"xatol": 1e-12})
    least = [float(r.fun), math.exp(r.x)] if r.fun < dist[i] else [float(dist[i]), float(f[i])]
    return clockwise, p_rhp, least


def evaluate():
    cases = []
    for label, body in ss.CASES + EXTRA_CASES:
        doc = ss.stage_doc(body)
        point = doc.get("spreadPoint", "typ")
        t = ss.loop_gain(doc, point)
        tl = sp.lambdify(ss.s, t, "mpmath")
        exact_t = lambda f, tl=tl: tl(mpmath.mpc(0, 2 * mpmath.pi * mpmath.mpf(f)))
        n, d = scaled_polys(t)
        gains, phases = crossings(n, d, exact_t)
        poles = ss.descriptor_poles(doc, point)
        stable = all(z.real < 0 for z in poles)
        clockwise, p_rhp, least = brute_force_nyquist(n, d)
        z = clockwise + p_rhp
        if (z == 0) != stable:
            raise SystemExit(f"stage_loop {label}: Z = {z} but the poles say stable = {stable}")
        sign = 1 if stable else -1
        worst = lambda xs: min(xs, key=lambda c: c[1]) if xs else None
        pm, gm = worst(gains), worst(phases)
        cases.append({
            "label": label,
            "stage": doc,
            "gain_crossings": gains,
            "phase_crossings": phases,
            "phase_margin_deg": None if pm is None else sign * pm[1],
            "crossover_hz": None if pm is None else pm[0],
            "gain_margin_db": None if gm is None else sign * gm[1],
            "phase_crossover_hz": None if gm is None else gm[0],
            "least_distance": least,
            "clockwise": clockwise,
            "open_loop_rhp_poles": p_rhp,
            "closed_loop_rhp_poles": z,
            "stable": stable,
            "poles": [[p.real, p.imag] for p in poles],
        })
    return {"cases": cases}


def numbers(x):
    """Every number in a nested structure, in order (booleans as 0/1)."""
    if isinstance(x, bool):
        return [float(x)]
    if isinstance(x, (int, float)):
        return [float(x)]
    if isinstance(x, list):
        return [v for e in x for v in numbers(e)]
    if isinstance(x, dict):
        return [v for k in sorted(x) for v in numbers(x[k])]
    return []


def main():
    result = evaluate()
    if "--check" in sys.argv:
        committed = json.loads(OUT.read_text())
        bad = 0
        for new, old in zip(result["cases"], committed["cases"], strict=True):
            a, b = numbers(new), numbers(old)
            if len(a) != len(b) or any(abs(x - y) > 1e-9 * max(abs(x), abs(y), 1e-300) for x, y in zip(a, b)):
                print(f"stage_loop {new['label']}: differs from the committed file")
                bad += 1
        if bad:
            sys.exit(1)
        print(f"stage_loop: {len(result['cases'])} stages match")
        return
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(result, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
