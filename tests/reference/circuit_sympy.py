#!/usr/bin/env python3
"""Exact closed forms of the non-inverting and inverting op-amp stages with finite
open-loop gain a, input resistance Ri, output resistance Ro, source resistance Rs
and load RL, derived by sympy from Kirchhoff's current law; and the closed forms of
the two-port method (h parameters for the non-inverting, y for the inverting stage)
derived the same way, for comparison with loopwright's numeric two-port analysis.
The same for the two current-output templates: series-series (transconductance,
z parameters) and shunt-series (current amplifier, g parameters); and the
non-inverting stage with a capacitor across R2 at random frequencies (complex).
The closed forms are evaluated with mpmath at 30 digits (sympy.lambdify).

Op-amp model: Ri between the + and - inputs, an ideal source a*(v+ - v-) behind Ro.
Non-inverting: vs -> Rs -> (+); (-) to ground through R1 and to the output through R2.
Inverting: (+) grounded; vs -> Rs -> R1 -> (-); R2 from the output to (-).
Rin is what vs sees after Rs; Rout is what RL sees (vs shorted, RL removed).

The last case of each stage is the worked example (WORKED below).

Writes tests/reference/data/circuit_sympy.json, which tests/circuit_reference.rs
compares with loopwright. With --check, recompute and compare with the committed
file (relative tolerance 1e-9; prints the differing case; exit 1 on a mismatch).

    ~/.cache/loopwright/venv/bin/python tests/reference/circuit_sympy.py [--check]
"""
import json
import random
import sys
from pathlib import Path

import mpmath
import sympy as sp

# Closed forms are evaluated with mpmath at 30 significant digits.
mpmath.mp.dps = 30
ARGS = None  # set below, after the symbols


def numeric(expr):
    """The closed form as a fast function of (a, Ri, Ro, Rs, RL, R1, R2) in mpmath."""
    return sp.lambdify(ARGS, expr, modules="mpmath")

OUT = Path(__file__).parent / "data" / "circuit_sympy.json"
SEED = 20260502
N_CASES = 40

a, Ri, Ro, Rs, RL, R1, R2, vs, it = sp.symbols("a R_i R_o R_s R_L R_1 R_2 v_s i_t", positive=True)
ARGS = (a, Ri, Ro, Rs, RL, R1, R2)


def values(c, r2=None):
    mp = mpmath.mpf
    return (mp(c["a"]), mp(c["ri"]), mp(c["ro"]), mp(c["rs"]), mp(c["rl"]), mp(c["r1"]), mp(c["r2"]) if r2 is None else r2)


def par(*rs):
    return 1 / sum(1 / r for r in rs)


def noninverting():
    vp, vn, vo = sp.symbols("v_p v_n v_o")
    # KCL, currents leaving each node.
    eqs = [
        sp.Eq((vp - vs) / Rs + (vp - vn) / Ri, 0),
        sp.Eq((vn - vp) / Ri + vn / R1 + (vn - vo) / R2, 0),
        sp.Eq((vo - a * (vp - vn)) / Ro + vo / RL + (vo - vn) / R2, 0),
    ]
    sol = sp.solve(eqs, [vp, vn, vo], dict=True)[0]
    af = sp.simplify(sol[vo] / vs)
    rin = sp.simplify(sol[vp] / ((vs - sol[vp]) / Rs))
    # Rout: vs = 0, RL removed, test current it into the output node.
    eqs_out = [
        sp.Eq(vp / Rs + (vp - vn) / Ri, 0),
        sp.Eq((vn - vp) / Ri + vn / R1 + (vn - vo) / R2, 0),
        sp.Eq((vo - a * (vp - vn)) / Ro + (vo - vn) / R2 - it, 0),
    ]
    so = sp.solve(eqs_out, [vp, vn, vo], dict=True)[0]
    rout = sp.simplify(so[vo] / it)
    # Two-port method (h parameters of the R1-R2 network).
    h11, h22, beta = par(R1, R2), 1 / (R1 + R2), R1 / (R1 + R2)
    rl_loaded = par(RL, R1 + R2)
    A = a * Ri / (Rs + Ri + h11) * rl_loaded / (Ro + rl_loaded)
    D = 1 + A * beta
    tp_af = A / D
    tp_rin = (Rs + Ri + h11) * D - Rs
    rof = par(Ro, RL, R1 + R2) / D
    tp_rout = 1 / (1 / rof - 1 / RL)
    return {"af": af, "rin": rin, "rout": rout, "tp_af": tp_af, "tp_rin": tp_rin, "tp_rout": tp_rout, "beta": beta, "tp_a": A}


def inverting():
    vm, vn, vo = sp.symbols("v_m v_n v_o")
    eqs = [
        sp.Eq((vm - vs) / Rs + (vm - vn) / R1, 0),
        sp.Eq((vn - vm) / R1 + vn / Ri + (vn - vo) / R2, 0),
        sp.Eq((vo - a * (0 - vn)) / Ro + vo / RL + (vo - vn) / R2, 0),
    ]
    sol = sp.solve(eqs, [vm, vn, vo], dict=True)[0]
    af = sp.simplify(sol[vo] / vs)
    rin = sp.simplify(sol[vm] / ((vs - sol[vm]) / Rs))
    eqs_out = [
        sp.Eq(vm / Rs + (vm - vn) / R1, 0),
        sp.Eq((vn - vm) / R1 + vn / Ri + (vn - vo) / R2, 0),
        sp.Eq((vo - a * (0 - vn)) / Ro + (vo - vn) / R2 - it, 0),
    ]
    so = sp.solve(eqs_out, [vm, vn, vo], dict=True)[0]
    rout = sp.simplify(so[vo] / it)
    # Two-port method on the Norton form: is = vs/(Rs + R1) with Rs + R1 across
    # the input; y parameters of R2: y11 = y22 = 1/R2, beta = y12 = -1/R2.
    rsum = Rs + R1
    beta = -1 / R2
    rl_loaded = par(RL, R2)
    zin = par(rsum, R2, Ri)
    A = -a * zin * rl_loaded / (Ro + rl_loaded)  # vo / is
    D = 1 + A * beta
    tp_af = A / D / rsum  # back to vo / vs
    rif = zin / D
    tp_rin = R1 + 1 / (1 / rif - 1 / rsum)  # vs sees R1 plus the (-) node
    rof = par(Ro, RL, R2) / D
    tp_rout = 1 / (1 / rof - 1 / RL)
    return {"af": af, "rin": rin, "rout": rout, "tp_af": tp_af, "tp_rin": tp_rin, "tp_rout": tp_rout, "beta": beta, "tp_a": A}


def series_series():
    """Transconductance stage (loopwright template, rf = 0): vs -> Rs -> in; Ri
    from in to fb; gm*(v_in - v_fb) into out; Ro from out to ground; RL from out
    to fb; the sense resistor RE (symbol R_1) from fb to ground. Output io = I(RL)."""
    vi, vf, vo = sp.symbols("v_i v_f v_o")
    RE = R1
    eqs = [
        sp.Eq((vi - vs) / Rs + (vi - vf) / Ri, 0),
        sp.Eq(-a * (vi - vf) + vo / Ro + (vo - vf) / RL, 0),
        sp.Eq((vf - vi) / Ri + (vf - vo) / RL + vf / RE, 0),
    ]
    sol = sp.solve(eqs, [vi, vf, vo], dict=True)[0]
    af = sp.simplify((sol[vo] - sol[vf]) / RL / vs)
    rin = sp.simplify(sol[vi] / ((vs - sol[vi]) / Rs))
    # Rout: vs = 0, RL removed, test current from fb into out.
    eqs_out = [
        sp.Eq(vi / Rs + (vi - vf) / Ri, 0),
        sp.Eq(-a * (vi - vf) + vo / Ro - it, 0),
        sp.Eq((vf - vi) / Ri + vf / RE + it, 0),
    ]
    so = sp.solve(eqs_out, [vi, vf, vo], dict=True)[0]
    rout = sp.simplify((so[vo] - so[vf]) / it)
    # Two-port method, z parameters of RE: z11 = z12 = z22 = RE.
    beta = RE
    A = a * Ri / (Rs + Ri + RE) * Ro / (Ro + RL + RE)
    D = 1 + A * beta
    return {
        "af": af, "rin": rin, "rout": rout, "tp_af": A / D, "tp_rin": (Rs + Ri + RE) * D - Rs,
        "tp_rout": (Ro + RL + RE) * D - RL, "beta": beta, "tp_a": A,
    }


def shunt_series():
    """Current amplifier (loopwright template): is into in, Rs across it; Ri from in
    to ground carries i_i; a*i_i (a < 0) into out; Ro from out to ground; RL from
    out to ld; Rg (symbol R_1) from ld to ground; Rf (symbol R_2) from ld to in.
    Output io = I(RL); Rin as seen by the Norton source (Rs excluded)."""
    vi, vl, vo, i_s = sp.symbols("v_i v_l v_o i_s")
    Rg, Rf = R1, R2
    eqs = [
        sp.Eq(-i_s + vi / Rs + vi / Ri + (vi - vl) / Rf, 0),
        sp.Eq(-a * vi / Ri + vo / Ro + (vo - vl) / RL, 0),
        sp.Eq((vl - vo) / RL + vl / Rg + (vl - vi) / Rf, 0),
    ]
    sol = sp.solve(eqs, [vi, vl, vo], dict=True)[0]
    af = sp.simplify((sol[vo] - sol[vl]) / RL / i_s)
    rin = sp.simplify(sol[vi] / (i_s - sol[vi] / Rs))
    eqs_out = [
        sp.Eq(vi / Rs + vi / Ri + (vi - vl) / Rf, 0),
        sp.Eq(-a * vi / Ri + vo / Ro - it, 0),
        sp.Eq(vl / Rg + (vl - vi) / Rf + it, 0),
    ]
    so = sp.solve(eqs_out, [vi, vl, vo], dict=True)[0]
    rout = sp.simplify((so[vo] - so[vl]) / it)
    # Two-port method, g parameters: g11 = 1/(Rf + Rg), g22 = Rf || Rg, g12 = -Rg/(Rf + Rg).
    beta = -Rg / (Rf + Rg)
    zin = par(Rs, Ri, Rf + Rg)
    A = a * zin / Ri * Ro / (Ro + RL + par(Rf, Rg))
    D = 1 + A * beta
    rif = zin / D
    return {
        "af": af, "rin": rin, "rout": rout, "tp_af": A / D, "tp_rin": 1 / (1 / rif - 1 / Rs),
        "tp_rout": (Ro + RL + par(Rf, Rg)) * D - RL, "beta": beta, "tp_a": A,
    }


def log_uniform(rng, lo, hi):
    import math

    return math.exp(rng.uniform(math.log(lo), math.log(hi)))


def cases(rng):
    out = []
    for _ in range(N_CASES):
        out.append(
            {
                "a": log_uniform(rng, 1e2, 1e6),
                "ri": log_uniform(rng, 1e3, 1e7),
                "ro": log_uniform(rng, 1.0, 1e3),
                "rs": log_uniform(rng, 10.0, 1e4),
                "rl": log_uniform(rng, 1e2, 1e5),
                "r1": log_uniform(rng, 1e2, 1e5),
                "r2": log_uniform(rng, 1e3, 1e6),
            }
        )
    return out


# Worked examples at fixed values. The op-amp (a = 1e4, Ri = 100k, Ro = 1k) and the
# non-inverting stage (R1 = 1k, R2 = 1M, RL = 2k, Rs = 10k) are those of the worked
# series-shunt example in Sedra & Smith, Microelectronic Circuits, 5th ed., ch. 8
# (from memory); the inverting stage with the same op-amp is a scenario of our own.
WORKED = {
    "noninverting": {"a": 1e4, "ri": 1e5, "ro": 1e3, "rs": 1e4, "rl": 2e3, "r1": 1e3, "r2": 1e6},
    "inverting": {"a": 1e4, "ri": 1e5, "ro": 1e3, "rs": 100.0, "rl": 2e3, "r1": 1e3, "r2": 1e5},
}


def current_output_cases(rng, kind):
    """Values for the current-output stages: a is gm (A/V) for series-series and the
    (negative) current gain for shunt-series; r1 is RE or Rg, r2 is Rf."""
    out = []
    for _ in range(N_CASES):
        if kind == "series_series":
            c = {"a": log_uniform(rng, 1e-3, 1.0), "ri": log_uniform(rng, 1e3, 1e7), "r1": log_uniform(rng, 10.0, 1e3), "r2": 0.0}
        else:
            c = {"a": -log_uniform(rng, 10.0, 1e4), "ri": log_uniform(rng, 10.0, 1e3), "r1": log_uniform(rng, 10.0, 1e3), "r2": log_uniform(rng, 1e3, 1e5)}
        c.update({"ro": log_uniform(rng, 1e3, 1e7), "rs": log_uniform(rng, 10.0, 1e4), "rl": log_uniform(rng, 1e2, 1e4)})
        out.append(c)
    return out


def evaluate():
    rng = random.Random(SEED)
    stages = {"noninverting": noninverting(), "inverting": inverting(), "series_series": series_series(), "shunt_series": shunt_series()}
    result = {"tolerance": 1e-9, "seed": SEED, "stages": {}}
    inputs = cases(rng)
    more = {k: current_output_cases(random.Random(SEED + i + 1), k) for i, k in enumerate(["series_series", "shunt_series"])}
    for name, forms in stages.items():
        fns = {k: numeric(v) for k, v in forms.items()}
        rows = []
        for c in more.get(name, inputs):
            row = dict(c)
            for k, fn in fns.items():
                row[k] = float(fn(*values(c)))
            rows.append(row)
        if name in WORKED:
            worked = dict(WORKED[name])
            for k, fn in fns.items():
                worked[k] = float(fn(*values(worked)))
            rows.append(worked)
        result["stages"][name] = {"forms": {k: str(v) for k, v in forms.items()}, "cases": rows}
    return result


def evaluate_ac(forms):
    """The non-inverting stage with Cf across R2 at a frequency: KCL is the same
    with R2 replaced by the impedance Z2 = R2 / (1 + j*2*pi*f*R2*Cf), so the exact
    and two-port forms above hold with that substitution. Complex results as [re, im]."""
    rng = random.Random(SEED + 7)
    fns = {k: numeric(v) for k, v in forms.items()}
    rows = []
    for c in cases(rng)[:20]:
        c = dict(c)
        c["cf"] = log_uniform(rng, 1e-12, 1e-9)
        c["f"] = log_uniform(rng, 1e2, 1e7)
        r2 = mpmath.mpf(c["r2"])
        z2 = r2 / (1 + 1j * 2 * mpmath.pi * mpmath.mpf(c["f"]) * r2 * mpmath.mpf(c["cf"]))
        for k, fn in fns.items():
            v = complex(fn(*values(c, z2)))
            c[k] = [v.real, v.imag]
        rows.append(c)
    return rows


def main():
    result = evaluate()
    result["noninverting_ac"] = evaluate_ac(noninverting())
    if "--check" in sys.argv:
        committed = json.loads(OUT.read_text())
        bad = 0
        for stage, body in result["stages"].items():
            old_rows = committed["stages"][stage]["cases"]
            if len(old_rows) != len(body["cases"]):
                print(f"circuit_sympy {stage}: case count differs")
                bad += 1
            for i, (new, old) in enumerate(zip(body["cases"], old_rows)):
                for k, v in new.items():
                    if abs(v - old[k]) > 1e-9 * max(abs(v), abs(old[k]), 1e-300):
                        print(f"circuit_sympy {stage} case {i} {k}: {v} != committed {old[k]}")
                        bad += 1
        for i, (new, old) in enumerate(zip(result["noninverting_ac"], committed["noninverting_ac"])):
            for k, v in new.items():
                pairs = zip(v, old[k]) if isinstance(v, list) else [(v, old[k])]
                for x, y in pairs:
                    if abs(x - y) > 1e-9 * max(abs(x), abs(y), 1e-300):
                        print(f"circuit_sympy noninverting_ac case {i} {k}: {v} != committed {old[k]}")
                        bad += 1
        if bad:
            sys.exit(1)
        n = sum(len(b["cases"]) for b in result["stages"].values()) + len(result["noninverting_ac"])
        print(f"circuit_sympy: {n} cases match")
        return
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(result, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
