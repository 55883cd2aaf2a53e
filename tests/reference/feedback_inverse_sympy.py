#!/usr/bin/env python3
"""Closed forms of the feedback relations and the inverse-design functions, derived
by sympy from Af = A/(1 + A*beta) alone, evaluated on fixed cases.

Writes tests/reference/data/feedback_inverse.json, which tests/feedback_reference.rs
compares with loopwright. Run again with --check to recompute and compare with the
committed file (exit 1 on a mismatch).

    ~/.cache/loopwright/venv/bin/python tests/reference/feedback_inverse_sympy.py [--check]
"""
import json
import sys
from pathlib import Path

import sympy as sp

OUT = Path(__file__).parent / "data" / "feedback_inverse.json"

A, beta, Af, eps, D = sp.symbols("A beta A_f epsilon D", real=True, nonzero=True)
closed = A / (1 + A * beta)

# beta for a target closed-loop gain: solve Af = A/(1 + A beta) for beta.
(beta_sol,) = sp.solve(sp.Eq(Af, closed), beta)
# Ideal beta for a target gain: the same beta as the open-loop gain grows without bound.
ideal_beta_sol = sp.limit(beta_sol, A, sp.oo)
# Least A for a gain error eps against 1/beta: eps = 1 - Af*beta, solve for A.
(a_min_sol,) = sp.solve(sp.Eq(eps, sp.simplify(1 - closed * beta)), A)
# Gain ceiling for a required D = 1 + A beta: beta from D, then Af.
(beta_from_d,) = sp.solve(sp.Eq(D, 1 + A * beta), beta)
af_max = sp.simplify(closed.subs(beta, beta_from_d))
# Sensitivity: (dAf/Af)/(dA/A).
sens = sp.simplify(sp.diff(closed, A) * A / closed)

forms = {
    "beta_for_gain": beta_sol,
    "ideal_beta": ideal_beta_sol,
    "min_open_loop_gain": a_min_sol,
    "max_closed_loop_gain": af_max,
    "beta_for_feedback_amount": beta_from_d,
    "sensitivity": sens,
}

CASES = [
    # (A, target Af, gain error, required D, beta): spread over signs and decades.
    (1e4, 10.0, 1e-3, 1000.0, 0.0999),
    (2e5, 100.0, 1e-4, 100.0, 0.01),
    (-5e4, -47.0, 0.01, 20.0, -0.02),
    (3.3e3, 3.3e3, 0.5, 1.0, 1e-6),
    (1e8, 1.0, 1e-7, 1e6, 1.0),
    (250.0, 2.0, 0.2, 10.0, 0.45),
    (-1e6, -1e3, 1e-5, 3.0, -1e-3),
    (7.5e4, 1.0e-3, 1e-2, 1e4, 1e3),
]


def evaluate():
    out = {"forms": {k: str(v) for k, v in forms.items()}, "cases": []}
    for a, target, e, d, b in CASES:
        sub = {A: a, Af: target, eps: e, D: d, beta: b}
        row = {"a": a, "target_gain": target, "gain_error": e, "feedback_amount": d, "beta": b}
        row["beta_for_gain"] = float(beta_sol.subs(sub))
        row["ideal_beta"] = float(ideal_beta_sol.subs(sub))
        row["min_open_loop_gain"] = float(a_min_sol.subs(sub))
        row["max_closed_loop_gain"] = float(af_max.subs(sub))
        row["beta_for_feedback_amount"] = float(beta_from_d.subs(sub))
        row["closed_loop_gain"] = float(closed.subs(sub))
        row["sensitivity"] = float(sens.subs(sub))
        out["cases"].append(row)
    return out


def main():
    result = evaluate()
    if "--check" in sys.argv:
        committed = json.loads(OUT.read_text())
        bad = 0
        for i, (new, old) in enumerate(zip(result["cases"], committed["cases"])):
            for k, v in new.items():
                if abs(v - old[k]) > 1e-9 * max(abs(v), abs(old[k]), 1e-300):
                    print(f"feedback_inverse case {i} {k}: {v} != committed {old[k]}")
                    bad += 1
        if len(result["cases"]) != len(committed["cases"]):
            print("feedback_inverse: case count differs")
            bad += 1
        print(f"feedback_inverse_sympy: {len(result['cases'])} cases, {bad} mismatches")
        sys.exit(1 if bad else 0)
    OUT.write_text(json.dumps(result, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
