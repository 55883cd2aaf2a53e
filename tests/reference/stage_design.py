#!/usr/bin/env python3
"""Reference answers for the design helpers on a stage (src/stage/design.rs):
the feedback capacitor, the isolation resistor, the largest load capacitance,
the dominant pole and the largest beta for a target phase margin, computed here
independently of loopwright by a scan and scipy's brentq.

- The stage's circuit is built from its document by stage_sympy.py's own table
  (docs/stage.md), with the part under design set to the trial value.
- Loop gain T(j w): the nodal matrices G and C of the circuit with the
  amplifier's output source replaced by a 1 V test source (stage_sympy.system
  in test mode at s = 0 and s = j) solved with numpy.linalg.solve, times A(j w)
  of the amplifier model; T = -A * (V(+) - V(-)).
- Phase margin: every sign change of ln|T| on a 40-per-decade grid from 1 mHz
  to 1 THz refined with brentq, read as 180 - |angle T| (docs/freq.md), the
  smallest taken (180 when there is none), negative when scipy's generalized
  eigenvalues of the descriptor form (stage_sympy.descriptor_poles) put a pole
  in the right half plane.
- Design: the margin at 10 values per decade over the helper's documented
  range (a different grid from loopwright's 4 per decade), every change between
  meeting and missing the target refined with brentq on margin - target in
  ln(value), and the helper's rule applied to the feasible intervals: the
  smallest feasible Cf and Riso, the upper end of the interval starting at the
  lowest Cl, the highest feasible dominant pole and Rg (beta = Rg/(Rf + Rg)).

Writes tests/reference/data/stage_design.json, read by tests/stage_design.rs.
With --check, recompute and compare with the committed file (relative 1e-9).

    ~/.cache/loopwright/venv/bin/python tests/reference/stage_design.py [--check]
"""
import copy
import json
import math
import sys
from pathlib import Path

import numpy as np
import scipy.optimize as opt
import sympy as sp

sys.path.insert(0, str(Path(__file__).parent))
import stage_sympy as ss  # noqa: E402  (the stage documents and the circuit table)

OUT = Path(__file__).parent / "data" / "stage_design.json"
TAU = 2 * math.pi
GRID = np.logspace(-3, 12, 15 * 40 + 1)
SCAN_PER_DECADE = 10
# The ranges documented in src/stage/design.rs (range_of).
RANGES = {
    "cf": lambda doc: (1e-18, 1e-7),
    "riso": lambda doc: (1e-3, 1e5),
    "cl": lambda doc: (1e-15, 1e-2),
    "dominantPoleHz": lambda doc: (1e-3, 1e9),
    "rg": lambda doc: (ss.value(doc["parts"]["rf"]) * 1e-6, ss.value(doc["parts"]["rf"]) * 1e6),
}
RULE = {"cf": "smallest", "riso": "smallest", "cl": "from-below", "dominantPoleHz": "largest", "rg": "largest"}


def case(label):
    for lab, body in ss.CASES:
        if lab.startswith(label):
            return lab, ss.stage_doc(body)
    raise SystemExit(f"stage_design: no case {label}")


def with_value(doc, part, x):
    d = copy.deepcopy(doc)
    if part == "dominantPoleHz":
        amp = d["amplifier"]
        amp["gbwHz"] = ss.amp_a0(amp, d.get("spreadPoint", "typ")) * x
    else:
        d.setdefault("parts", {})[part] = x
    return d


def loop_of(doc):
    """f -> T(j 2 pi f) for arrays of f."""
    point = doc.get("spreadPoint", "typ")
    els, an = ss.netlist(doc)
    quiet = [(k, a, b, 0.0 if k in ("V", "I") else v) for (k, a, b, v) in els]
    m0, b0, idx, _ = ss.system(doc, quiet, an, "test", sv=0j, test=1.0)
    m1, _, _, _ = ss.system(doc, quiet, an, "test", sv=1j, test=1.0)
    g = np.array(m0, dtype=complex)
    c = (np.array(m1, dtype=complex) - g).imag
    rhs = np.array([complex(v) for v in b0])
    num, den = ss.open_loop(doc["amplifier"], point)
    pn = [float(sp.N(v, 30)) for v in sp.Poly(num, ss.s).all_coeffs()]
    pd = [float(sp.N(v, 30)) for v in sp.Poly(den, ss.s).all_coeffs()]
    _, plus, minus = an

    def t(f):
        f = np.atleast_1d(np.asarray(f, dtype=float))
        w = TAU * f
        mats = g[None, :, :] + 1j * w[:, None, None] * c[None, :, :]
        x = np.linalg.solve(mats, np.broadcast_to(rhs, (len(f), len(rhs)))[..., None])[..., 0]
        v = lambda nd: 0 if nd == "0" else x[:, idx[nd]]
        a = np.polyval(pn, 1j * w) / np.polyval(pd, 1j * w)
        return -a * (v(plus) - v(minus))

    return t


def phase_margin(doc):
    t = loop_of(doc)
    ln = np.log(np.abs(t(GRID)))
    g = lambda x: float(np.log(np.abs(t(math.exp(x))[0])))
    best = (180.0, None)
    for i in np.nonzero(np.sign(ln[1:]) != np.sign(ln[:-1]))[0]:
        x = opt.brentq(g, math.log(GRID[i]), math.log(GRID[i + 1]), xtol=1e-14, rtol=1e-15)
        f = math.exp(x)
        pm = 180 - abs(math.degrees(np.angle(t(f)[0])))
        if pm < best[0]:
            best = (pm, f)
    stable = all(z.real < 0 for z in ss.descriptor_poles(doc, doc.get("spreadPoint", "typ")))
    return (best[0] if stable else -best[0]), best[1]


def design(doc, part, target):
    lo, hi = RANGES[part](doc)
    n = int(round(math.log10(hi / lo) * SCAN_PER_DECADE))
    xs = np.linspace(math.log(lo), math.log(hi), n + 1)
    gap = lambda x: phase_margin(with_value(doc, part, math.exp(x)))[0] - target
    gs = [gap(x) for x in xs]
    ivs, start = [], (xs[0] if gs[0] >= 0 else None)
    for i in range(1, len(xs)):
        if (gs[i] >= 0) != (gs[i - 1] >= 0):
            edge = opt.brentq(gap, xs[i - 1], xs[i], xtol=1e-13, rtol=1e-15)
            if gs[i] >= 0:
                start = edge
            else:
                ivs.append((start, edge))
                start = None
    if start is not None:
        ivs.append((start, xs[-1]))
    rule = RULE[part]
    if rule == "smallest":
        ln = ivs[0][0]
    elif rule == "largest":
        ln = ivs[-1][1]
    else:
        assert ivs and ivs[0][0] == xs[0], "target missed at the smallest load"
        ln = ivs[0][1]
    value = math.exp(ln)
    pm, fc = phase_margin(with_value(doc, part, value))
    return {"value": value, "phase_margin_deg": pm, "crossover_hz": fc,
            "feasible": [[math.exp(a), math.exp(b)] for a, b in ivs]}


# (case label prefix, part, target degrees, load capacitance for riso)
QUESTIONS = [
    ("transimpedance with photodiode", "cf", 45.0, None),
    ("transimpedance with photodiode", "cf", 60.0, None),
    ("capacitive load without isolation", "riso", 45.0, 10e-9),
    ("capacitive load without isolation", "riso", 60.0, 10e-9),
    ("capacitive load without isolation", "cl", 45.0, None),
    ("three-pole amplifier", "dominantPoleHz", 60.0, None),
    ("three-pole amplifier", "rg", 60.0, None),
]


def evaluate():
    out = []
    for prefix, part, target, cl in QUESTIONS:
        label, doc = case(prefix)
        if cl is not None:
            doc = copy.deepcopy(doc)
            doc["parts"]["cl"] = cl
        if part == "cl":
            doc = copy.deepcopy(doc)
            doc["parts"].pop("cl", None)
        ans = design(doc, part, target)
        ans.update(label=label, stage=doc, part=part, target_pm_deg=target)
        out.append(ans)
    return {"questions": out}


def numbers(x):
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
        for new, old in zip(result["questions"], committed["questions"], strict=True):
            a, b = numbers(new), numbers(old)
            if len(a) != len(b) or any(abs(x - y) > 1e-9 * max(abs(x), abs(y), 1e-300) for x, y in zip(a, b)):
                print(f"stage_design {new['label']} {new['part']}: differs from the committed file")
                bad += 1
        if bad:
            sys.exit(1)
        print(f"stage_design: {len(result['questions'])} answers match")
        return
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(result, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
