#!/usr/bin/env python3
"""Reference step responses of stage circuits (src/stage/step.rs), computed
independently of loopwright:

- H(s) = V(out)/(source): sympy solves the nodal equations of stage_sympy.py
  (the circuit table of docs/stage.md) with exact rational values and s
  symbolic, the amplifier as N(s)/D(s); H is written as polynomials in
  p = s/WS (WS = 2 pi 1 MHz);
- the step: scipy.signal.step of that transfer function on 400 001 points
  over a span that shows the settling, time scaled back by WS;
- metrics: final value H(0); rise time 10 % -> 90 % of it (first crossings),
  settling time (last exit from a 2 % band), overshoot (largest sample over
  the final value), each crossing located by linear interpolation between
  the dense samples (their spacing is 2.5e-6 of the span).

Writes tests/reference/data/stage_step.json, read by tests/stage_step.rs.
With --check, recompute and compare with the committed file (relative 1e-9).

    ~/.cache/loopwright/venv/bin/python tests/reference/stage_step.py [--check]
"""
import json
import math
import sys
from pathlib import Path

import numpy as np
import scipy.signal as sig
import sympy as sp

sys.path.insert(0, str(Path(__file__).parent))
import stage_sympy as ss  # noqa: E402

OUT = Path(__file__).parent / "data" / "stage_step.json"
WS = 2 * math.pi * 1e6
BAND = 0.02
POINTS = 400_001
CASES = [
    "feedback capacitor",
    "capacitive load without isolation",
    "capacitive load with isolation",
    "transimpedance with photodiode",
    "three-pole amplifier",
    "complex-pole amplifier",
]


def transfer(doc, point):
    els, an = ss.netlist(doc)
    nd = ss.open_loop(doc["amplifier"], point)
    m, b, idx, _ = ss.system(doc, els, an, "gain", num_den=nd)
    x = sp.Matrix(m).LUsolve(sp.Matrix(b))
    h = sp.cancel(sp.together(x[idx["out"]]))
    num, den = sp.fraction(h)
    p = sp.symbols("p")
    num = sp.Poly(sp.expand(num.subs(ss.s, WS * p)), p)
    den = sp.Poly(sp.expand(den.subs(ss.s, WS * p)), p)
    lead = den.all_coeffs()[0]
    return ([float(sp.N(c / lead, 30)) for c in num.all_coeffs()],
            [float(sp.N(c / lead, 30)) for c in den.all_coeffs()])


def first_crossing(t, y, level):
    k = int(np.argmax(y >= level))
    return t[k - 1] + (level - y[k - 1]) * (t[k] - t[k - 1]) / (y[k] - y[k - 1])


def metrics(num, den):
    poles = np.roots(den)
    sigma = min(-poles.real)
    span = (math.log(1 / BAND) + 8) * 1.2 / sigma * 2
    t = np.linspace(0, span, POINTS)
    _, y = sig.step((num, den), T=t)
    yf = num[-1] / den[-1]
    yn = y / yf
    rise = first_crossing(t, yn, 0.9) - first_crossing(t, yn, 0.1)
    out = np.nonzero(np.abs(yn - 1) > BAND)[0]
    k = out[-1]
    e0, e1 = abs(yn[k] - 1) - BAND, abs(yn[k + 1] - 1) - BAND
    settle = t[k] + e0 * (t[k + 1] - t[k]) / (e0 - e1)
    if t[k] > 0.9 * span:
        raise SystemExit("stage_step: the span is too short")
    overshoot = max(0.0, (yn.max() - 1) * 100)
    return {"final_value": yf, "rise_time_s": rise / WS, "settling_time_s": settle / WS,
            "overshoot_percent": overshoot}


def evaluate():
    out = []
    for prefix in CASES:
        label, body = next((lab, b) for lab, b in ss.CASES if lab.startswith(prefix))
        doc = ss.stage_doc(body)
        num, den = transfer(doc, doc.get("spreadPoint", "typ"))
        m = metrics(num, den)
        m.update(label=label, stage=doc)
        out.append(m)
    return {"settle_band": BAND, "cases": out}


def main():
    result = evaluate()
    if "--check" in sys.argv:
        committed = json.loads(OUT.read_text())
        bad = 0
        for new, old in zip(result["cases"], committed["cases"], strict=True):
            for key in ("final_value", "rise_time_s", "settling_time_s", "overshoot_percent"):
                a, b = new[key], old[key]
                if abs(a - b) > 1e-9 * max(abs(a), abs(b), 1e-300):
                    print(f"stage_step {new['label']} {key}: {a} != committed {b}")
                    bad += 1
        if bad:
            sys.exit(1)
        print(f"stage_step: {len(result['cases'])} steps match")
        return
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(result, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
