#!/usr/bin/env python3
"""Reference figures for the stage area (src/stage/): loop gain, closed-loop gain,
impedances and closed-loop poles of op-amp stages with reactive parts, each
computed here independently of loopwright.

Each case is a stage document (docs/stage.md); this script builds its circuit
from the document's own table (written here from the documentation, not from
the Rust code) and computes:

- loop gain T(s): sympy solves the nodal equations with exact rational values
  and s symbolic, with the amplifier's output source replaced by a 1 V test
  source and the signal source at zero; T(s) = -A(s) * (V(+) - V(-)) is an
  exact rational function of s, evaluated at the case's frequencies with
  mpmath at 30 digits;
- closed-loop gain V(out) per unit of the source: the same nodal equations
  solved numerically with mpmath at 30 digits (mp.lu_solve);
- output impedance at `out` (sources at zero) and input impedance at the
  stage's input (source, and the series source resistance, removed):
  numpy.linalg.solve in complex128;
- closed-loop poles: the roots (sympy nroots, 30 digits) of the characteristic
  polynomial det(Y(s)), with the amplifier's rows multiplied by the
  denominator of A(s) so that every entry is a polynomial; cross-checked in
  this script against scipy.linalg.eig(G, -C), the generalized eigenvalues of
  a descriptor form built here (amplifier sections as states), within 1e-6.

The amplifier: A(s) = A0/(1 + s/wp) * prod 1/(1 + s/wk) * prod (1 + s/wz)
* prod (1 - s/wr) * prod 1/(1 + s/(Q w0) + s^2/w0^2) * prod (1 + s/(Q w0) + s^2/w0^2),
wp = 2 pi GBW / A0(point) (the gain-bandwidth product is held, docs/stage.md),
Rd and Cd between the inputs, Rcm and Ccm from each input to ground, Ro in
series with the output.

Writes tests/reference/data/stage_sympy.json, read by tests/stage_reference.rs.
With --check, recompute and compare with the committed file (relative 1e-9).

    ~/.cache/loopwright/venv/bin/python tests/reference/stage_sympy.py [--check]
"""
import json
import math
import sys
from pathlib import Path

import mpmath
import numpy as np
import scipy.linalg
import sympy as sp

mpmath.mp.dps = 30
OUT = Path(__file__).parent / "data" / "stage_sympy.json"
s = sp.symbols("s")
FREQS = [1.0, 10.0, 1e2, 1e3, 1e4, 1e5, 3e5, 1e6, 2e6, 5e6, 1e7, 2e7, 5e7, 1e8, 3e8, 1e9]

SI = {"f": 1e-15, "p": 1e-12, "n": 1e-9, "u": 1e-6, "m": 1e-3, "k": 1e3, "M": 1e6, "G": 1e9}


def value(v):
    """A number, or a value text such as 4k7, 2p2 or 10M (the cases use only these)."""
    if isinstance(v, (int, float)):
        return float(v)
    for letter, mult in SI.items():
        if letter in v:
            head, tail = v.split(letter)
            return float(f"{head}.{tail}" if tail else head) * mult
    return float(v)


def exact(x):
    """The decimal text of a float as an exact rational."""
    return sp.Rational(repr(float(x)))


def amp_case(a0, gbw, **more):
    d = {"a0": a0, "gbwHz": gbw}
    d.update(more)
    return d


# Nine stages of our own, each chosen for one effect named in its label.
CASES = [
    ("input-capacitance pole: inverting, Rf = Rg = 100k, Cd + Ccm = 12 pF",
     {"kind": "inverting", "amplifier": amp_case(1e6, 1e7, cd="8p", ccm="4p"),
      "parts": {"rf": "100k", "rg": "100k"}}),
    ("feedback capacitor: non-inverting gain 11 with Cf across Rf",
     {"kind": "non-inverting", "amplifier": amp_case(2e5, 1e7, polesHz=["30M"], cd="3p", ro=50),
      "parts": {"rf": "10k", "rg": "1k", "cf": "4p7", "rs": "50", "rl": "2k"}}),
    ("capacitive load without isolation: gain 2, Ro = 50, Cl = 10 nF",
     {"kind": "non-inverting", "amplifier": amp_case(1e5, 5e6, ro=50),
      "parts": {"rf": "1k", "rg": "1k", "rl": "10k", "cl": "10n"}}),
    ("capacitive load with isolation: gain 2, Ro = 50, Riso = 20, Cl = 10 nF",
     {"kind": "non-inverting", "amplifier": amp_case(1e5, 5e6, ro=50),
      "parts": {"rf": "1k", "rg": "1k", "rl": "10k", "cl": "10n", "riso": "20"}}),
    ("transimpedance with photodiode capacitance: Rf = 100k, Cf = 1p5, Cs = 20 pF",
     {"kind": "transimpedance", "amplifier": amp_case(1e6, 2e7, cd="4p", ccm="3p", ro=40),
      "parts": {"rf": "100k", "cf": "1p5", "cs": "20p", "rs": "1G"}}),
    ("three-pole amplifier: non-inverting gain 2, poles at GBW/A0, 8 MHz, 40 MHz",
     {"kind": "non-inverting", "amplifier": amp_case(3e5, 1e7, polesHz=["8M", "40M"], rd="1M", ro=30),
      "parts": {"rf": "2k", "rg": "2k"}}),
    ("complex-pole amplifier: inverting gain 5, pair at 30 MHz, Q = 2",
     {"kind": "inverting", "amplifier": amp_case(1e5, 1e7, complexPoles=[{"freqHz": "30M", "q": 2}],
                                                  rd="10M", cd="2p", ro=20),
      "parts": {"rf": "5k", "rg": "1k", "rs": "50", "cs": "10p"}}),
    ("zeros and the low end of the spread: follower, LHP zero, RHP zero, complex zero pair",
     {"kind": "non-inverting", "spreadPoint": "min",
      "amplifier": {"a0": {"min": 2e4, "typ": 1e5, "max": 4e5}, "gbwHz": "5M",
                    "polesHz": ["20M", "60M"], "zerosHz": ["90M"], "rhpZerosHz": ["400M"],
                    "complexPoles": [{"freqHz": "150M", "q": 0.8}],
                    "complexZeros": [{"freqHz": "250M", "q": 3}],
                    "rd": "2M", "rcm": "1G", "ccm": "2p", "ro": 10},
      "parts": {"rs": "1k", "cs": "5p", "rl": "1k", "cl": "100p"}}),
    ("transimpedance without Cf: Cs = 100 pF, the lightly damped case",
     {"kind": "transimpedance", "amplifier": amp_case(1e6, 1e7, ro=20),
      "parts": {"rf": "1M", "cs": "100p"}}),
]


def stage_doc(body):
    doc = {"format": "loopwright-stage", "version": 1, "spreadPoint": "typ"}
    doc.update(body)
    return doc


def amp_a0(amp, point):
    a0 = amp["a0"]
    if isinstance(a0, dict):
        typ = value(a0["typ"])
        return value(a0.get(point, typ)) if point != "typ" else typ
    return value(a0)


def open_loop(amp, point):
    """A(s) = N(s)/D(s) as exact sympy polynomials in s."""
    a0 = exact(amp_a0(amp, point))
    wp = 2 * sp.pi * exact(value(amp["gbwHz"])) / a0
    num, den = a0, (1 + s / wp)
    for f in amp.get("polesHz", []):
        den *= 1 + s / (2 * sp.pi * exact(value(f)))
    for f in amp.get("zerosHz", []):
        num *= 1 + s / (2 * sp.pi * exact(value(f)))
    for f in amp.get("rhpZerosHz", []):
        num *= 1 - s / (2 * sp.pi * exact(value(f)))
    for p in amp.get("complexPoles", []):
        w0, q = 2 * sp.pi * exact(value(p["freqHz"])), exact(value(p["q"]))
        den *= 1 + s / (q * w0) + s**2 / w0**2
    for p in amp.get("complexZeros", []):
        w0, q = 2 * sp.pi * exact(value(p["freqHz"])), exact(value(p["q"]))
        num *= 1 + s / (q * w0) + s**2 / w0**2
    return sp.expand(num), sp.expand(den)


def netlist(doc, with_source=True, keep_series_source=True):
    """Elements per docs/stage.md: (kind, a, b, value) and the amplifier."""
    kind, p = doc["kind"], {k: value(v) for k, v in doc.get("parts", {}).items()}
    pin = "amp" if "riso" in p else "out"
    els = []
    if kind == "transimpedance":
        if with_source:
            els.append(("I", "0", "fb", 1.0))
        if "cs" in p:
            els.append(("C", "fb", "0", p["cs"]))
        if "rs" in p:
            els.append(("R", "fb", "0", p["rs"]))
    else:
        if "rs" in p:
            if with_source:
                els.append(("V", "src", "0", 1.0))
            if keep_series_source:
                els.append(("R", "src", "in", p["rs"]))
        elif with_source:
            els.append(("V", "in", "0", 1.0))
        if "cs" in p:
            els.append(("C", "in", "0", p["cs"]))
        if kind == "inverting":
            els.append(("R", "in", "fb", p["rg"]))
    if kind == "non-inverting":
        plus, minus = ("in", "fb") if "rf" in p else ("in", pin)
    else:
        plus, minus = "0", "fb"
    if "rf" in p:
        els.append(("R", pin, "fb", p["rf"]))
    if "cf" in p:
        els.append(("C", pin, "fb", p["cf"]))
    if kind == "non-inverting" and "rg" in p:
        els.append(("R", "fb", "0", p["rg"]))
    if "riso" in p:
        els.append(("R", "amp", "out", p["riso"]))
    if "rl" in p:
        els.append(("R", "out", "0", p["rl"]))
    if "cl" in p:
        els.append(("C", "out", "0", p["cl"]))
    return els, (pin, plus, minus)


def system(doc, els, amp_nodes, mode, sv=s, num_den=None, test=None):
    """Nodal equations M x = b with entries in sv (a symbol or a number).

    mode 'gain': the amplifier's gain N/D; 'test': its output source replaced by
    `test` volts. Returns (M, b, index of nodes, the amplifier's output row).
    """
    amp = doc["amplifier"]
    pin, plus, minus = amp_nodes
    names = []
    for e in els:
        for nd in e[1:3]:
            if nd != "0" and nd not in names:
                names.append(nd)
    for nd in (pin, plus, minus):
        if nd != "0" and nd not in names:
            names.append(nd)
    idx = {nd: i for i, nd in enumerate(names)}
    vs = [e for e in els if e[0] == "V"]
    ro = value(amp.get("ro", 0))
    size = len(names) + len(vs) + (1 if ro == 0 else 0)
    M = [[0] * size for _ in range(size)]
    b = [0] * size
    node = lambda nd: None if nd == "0" else idx[nd]

    def put(r, c, v):
        if r is not None and c is not None:
            M[r][c] += v

    def adm(a, c_, y):
        put(a, a, y), put(c_, c_, y), put(a, c_, -y), put(c_, a, -y)

    conv = exact if not isinstance(sv, (complex, mpmath.mpc)) else (lambda x: x)
    for e in els:
        a, c_ = node(e[1]), node(e[2])
        if e[0] == "R":
            adm(a, c_, 1 / conv(e[3]))
        elif e[0] == "C":
            adm(a, c_, sv * conv(e[3]))
        elif e[0] == "I":
            if a is not None:
                b[a] -= conv(e[3])
            if c_ is not None:
                b[c_] += conv(e[3])
    for k, e in enumerate(vs):
        r = len(names) + k
        a, c_ = node(e[1]), node(e[2])
        put(a, r, 1), put(c_, r, -1), put(r, a, 1), put(r, c_, -1)
        b[r] += conv(e[3])
    # Amplifier input parts.
    p_, n_ = node(plus), node(minus)
    yd = sv * conv(value(amp.get("cd", 0)))
    if "rd" in amp:
        yd += 1 / conv(value(amp["rd"]))
    adm(p_, n_, yd)
    ycm = sv * conv(value(amp.get("ccm", 0)))
    if "rcm" in amp:
        ycm += 1 / conv(value(amp["rcm"]))
    adm(p_, None, ycm)
    adm(n_, None, ycm)
    # Output: Norton (Ro > 0) or a branch (Ro = 0); gain N/D or the test source.
    o = node(pin)
    num, den = num_den if num_den is not None else (None, None)
    if ro > 0:
        g = 1 / conv(ro)
        put(o, o, g)
        if mode == "test":
            b[o] += g * test
        else:
            k = g * num / den
            put(o, p_, -k)
            put(o, n_, k)
        amp_row = o
    else:
        amp_row = size - 1
        put(o, amp_row, 1)
        put(amp_row, o, 1)
        if mode == "test":
            b[amp_row] += test
        else:
            k = num / den
            put(amp_row, p_, -k)
            put(amp_row, n_, k)
    return M, b, idx, amp_row


def vd_of(x, idx, amp_nodes):
    _, plus, minus = amp_nodes
    v = lambda nd: 0 if nd == "0" else x[idx[nd]]
    return v(plus) - v(minus)


def loop_gain(doc, point):
    """T(s) exact: sources zero, output source = 1 V, T = -A(s) * vd."""
    els, an = netlist(doc)
    quiet = [(k, a, b, 0.0 if k in ("V", "I") else v) for (k, a, b, v) in els]
    M, b, idx, _ = system(doc, quiet, an, "test", test=1)
    x = sp.Matrix(M).LUsolve(sp.Matrix(b))
    num, den = open_loop(doc["amplifier"], point)
    return sp.cancel(-num / den * vd_of(list(x), idx, an))


def char_poly(doc, point):
    els, an = netlist(doc)
    nd = open_loop(doc["amplifier"], point)
    M, _, _, row = system(doc, els, an, "gain", num_den=nd)
    # Only the amplifier's row holds N/D: times D, every entry is a polynomial
    # and det(M) is the characteristic polynomial D·det(Y).
    M[row] = [sp.cancel(v * nd[1]) for v in M[row]]
    return sp.Poly(sp.expand(sp.Matrix(M).det(method="berkowitz")), s)


def mp_solve(M, b):
    x = mpmath.lu_solve(mpmath.matrix(M), mpmath.matrix(b))
    return [x[i] for i in range(len(b))]


def closed_loop(doc, point, f):
    els, an = netlist(doc)
    sv = mpmath.mpc(0, 2 * mpmath.pi * mpmath.mpf(f))
    num, den = open_loop(doc["amplifier"], point)
    nv = complex(0) + sp.lambdify(s, num, "mpmath")(sv)
    dv = sp.lambdify(s, den, "mpmath")(sv)
    M, b, idx, _ = system(doc, els, an, "gain", sv=sv, num_den=(nv, dv))
    x = mp_solve([[mpmath.mpc(v) for v in row] for row in M], [mpmath.mpc(v) for v in b])
    return complex(x[idx["out"]])


def impedance(doc, point, f, port):
    """numpy: 1 A into `port`, sources at zero (input: source and Rs removed)."""
    if port == "out":
        els, an = netlist(doc)
        els = [(k, a, b, 0.0 if k in ("V", "I") else v) for (k, a, b, v) in els]
    else:
        els, an = netlist(doc, with_source=False, keep_series_source=False)
    sv = 2j * math.pi * f
    num, den = open_loop(doc["amplifier"], point)
    nv = complex(sp.N(num.subs(s, sv), 20))
    dv = complex(sp.N(den.subs(s, sv), 20))
    M, b, idx, _ = system(doc, els, an, "gain", sv=sv, num_den=(nv, dv))
    A = np.array([[complex(v) for v in row] for row in M], dtype=complex)
    rhs = np.zeros(len(b), dtype=complex)
    rhs[idx[port]] = 1.0
    try:
        x = np.linalg.solve(A, rhs)
    except np.linalg.LinAlgError:
        return None  # the port floats: no impedance (loopwright names the node)
    return complex(x[idx[port]])


def descriptor_poles(doc, point):
    """scipy.linalg.eig on G x = -s C x: the amplifier as first/second-order state sections."""
    els, an = netlist(doc)
    amp = doc["amplifier"]
    # The network at s = 0 and s = 1 with the amplifier output as a free unknown y.
    # Unknowns: network (from `system` in test mode with test = 0), then states, then y.
    quiet = [(k, a, b, 0.0 if k in ("V", "I") else v) for (k, a, b, v) in els]
    M0, _, idx, _ = system(doc, quiet, an, "test", sv=0j, test=0)
    M1, _, _, _ = system(doc, quiet, an, "test", sv=1j, test=0)
    G0 = np.array(M0, dtype=complex).real
    C0 = (np.array(M1, dtype=complex) - np.array(M0, dtype=complex)).imag
    n = G0.shape[0]
    a0 = amp_a0(amp, point)
    secs = [("p", 2 * math.pi * value(amp["gbwHz"]) / a0, None)]
    secs += [("p", 2 * math.pi * value(f), None) for f in amp.get("polesHz", [])]
    secs += [("pp", 2 * math.pi * value(p["freqHz"]), value(p["q"])) for p in amp.get("complexPoles", [])]
    secs += [("z", 2 * math.pi * value(f), None) for f in amp.get("zerosHz", [])]
    secs += [("z", -2 * math.pi * value(f), None) for f in amp.get("rhpZerosHz", [])]
    secs += [("zz", 2 * math.pi * value(p["freqHz"]), value(p["q"])) for p in amp.get("complexZeros", [])]
    k = n + sum(2 if t in ("pp", "zz") else 1 for t, _, _ in secs)
    G = np.zeros((k, k))
    C = np.zeros((k, k))
    G[:n, :n], C[:n, :n] = G0, C0
    pin, plus, minus = an
    src = {}
    if plus != "0":
        src[idx[plus]] = a0
    if minus != "0":
        src[idx[minus]] = src.get(idx[minus], 0) - a0
    col = n
    for t, w, q in secs:
        if t == "p":  # (1 + s/w) x = u
            G[col, col] += 1
            C[col, col] += 1 / w
            for c_, v in src.items():
                G[col, c_] -= v
            src, col = {col: 1.0}, col + 1
        elif t == "pp":  # q' - (s/w) p = 0 ; p + s p/(Q w) + s q'/w = u
            qq, pp = col, col + 1
            G[qq, qq] += 1
            C[qq, pp] -= 1 / w
            G[pp, pp] += 1
            C[pp, pp] += 1 / (q * w)
            C[pp, qq] += 1 / w
            for c_, v in src.items():
                G[pp, c_] -= v
            src, col = {pp: 1.0}, col + 2
        elif t == "z":  # z = u + s u / w
            G[col, col] += 1
            for c_, v in src.items():
                G[col, c_] -= v
                C[col, c_] -= v / w
            src, col = {col: 1.0}, col + 1
        else:  # w' = s u / w ; z = u + s u/(Q w) + s w'/w
            ww, zz = col, col + 1
            G[ww, ww] += 1
            G[zz, zz] += 1
            C[zz, ww] -= 1 / w
            for c_, v in src.items():
                C[ww, c_] -= v / w
                G[zz, c_] -= v
                C[zz, c_] -= v / (q * w)
            src, col = {zz: 1.0}, col + 2
    # The test-mode network put g*0 on the rhs; add the output coupling -g*y (Ro > 0)
    # or -y on the branch row (Ro = 0).
    ro = value(amp.get("ro", 0))
    o = idx[pin]
    row = o if ro > 0 else n - 1
    g = 1 / ro if ro > 0 else 1.0
    for c_, v in src.items():
        G[row, c_] -= g * v
    ev = scipy.linalg.eig(G, -C, right=False)
    return sorted([complex(e) for e in ev if np.isfinite(e)], key=pole_order)


def pole_order(z):
    """By magnitude (to 10 digits, so a conjugate pair ties), then imaginary part."""
    return (float(f"{abs(z):.10e}"), z.imag)


def evaluate():
    cases = []
    for label, body in CASES:
        doc = stage_doc(body)
        point = doc.get("spreadPoint", "typ")
        t = loop_gain(doc, point)
        tf = sp.lambdify(s, t, "mpmath")
        lg = [complex(tf(mpmath.mpc(0, 2 * mpmath.pi * mpmath.mpf(f)))) for f in FREQS]
        cl = [closed_loop(doc, point, f) for f in FREQS]
        zout = [impedance(doc, point, f, "out") for f in FREQS]
        zin = [impedance(doc, point, f, "fb" if doc["kind"] == "transimpedance" else "in") for f in FREQS]
        zin = None if any(z is None for z in zin) else zin
        cp = char_poly(doc, point)
        roots = sorted([complex(r) for r in cp.nroots(n=30, maxsteps=200)], key=pole_order)
        eig = descriptor_poles(doc, point)
        if len(eig) != len(roots) or any(abs(a - b) > 1e-6 * abs(b) for a, b in zip(eig, roots)):
            raise SystemExit(f"stage_sympy {label}: scipy eig {eig} disagrees with sympy roots {roots}")
        pair = lambda zs: None if zs is None else [[z.real, z.imag] for z in zs]
        cases.append({
            "label": label,
            "stage": doc,
            "freqs": FREQS,
            "loop_gain": pair(lg),
            "closed_loop": pair(cl),
            "zout": pair(zout),
            "zin": pair(zin),
            "poles": pair(roots),
            "stable": all(z.real < 0 for z in roots),
        })
    return {"cases": cases}


def close(a, b, rel=1e-9):
    return abs(a - b) <= rel * max(abs(a), abs(b), 1e-300)


def main():
    result = evaluate()
    if "--check" in sys.argv:
        committed = json.loads(OUT.read_text())
        bad = 0
        if len(committed["cases"]) != len(result["cases"]):
            print("stage_sympy: case count differs")
            sys.exit(1)
        for new, old in zip(result["cases"], committed["cases"]):
            for key in ("loop_gain", "closed_loop", "zout", "zin", "poles"):
                if new[key] is None or old[key] is None:
                    if new[key] is not old[key]:
                        print(f"stage_sympy {new['label']} {key}: defined in one run only")
                        bad += 1
                    continue
                if len(new[key]) != len(old[key]):
                    print(f"stage_sympy {new['label']} {key}: length differs")
                    bad += 1
                    continue
                # An absolute floor at 1e-12 of the series' largest value: numpy's
                # LAPACK rounding differs between builds (an ideal output's
                # impedance is 0 or 1e-20 depending on it). An impedance that is
                # zero everywhere is rounding in every entry (0 or 1e-12 ohm between
                # numpy 2.x builds), so impedances also get 1e-9 ohm, far below the
                # 1e-3 ohm floor tests/stage_reference.rs compares them with.
                floor = 1e-12 * max(abs(complex(*v)) for v in old[key])
                if key in ("zout", "zin"):
                    floor = max(floor, 1e-9)
                for x, y in zip(new[key], old[key]):
                    if abs(complex(*x) - complex(*y)) > floor and not close(complex(*x), complex(*y)):
                        print(f"stage_sympy {new['label']} {key}: {x} != committed {y}")
                        bad += 1
        if bad:
            sys.exit(1)
        print(f"stage_sympy: {len(result['cases'])} stages match")
        return
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(result, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
