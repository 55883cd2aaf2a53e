#!/usr/bin/env python3
"""Random small-signal circuits in the loopwright circuit JSON format (version 1),
solved independently by modified nodal analysis written here with numpy and
numpy.linalg.solve.

Each circuit has 3 to 10 nodes joined by a resistor tree (so nothing floats), extra
R, C and L elements, one voltage source, one current source and the four controlled
sources (VCVS, VCCS, CCVS, CCCS), at a frequency between 10 Hz and 1 MHz. Some
values are written as texts with SI prefixes (4.7k) or IEC 60062 codes (4k7), which
this script reads with its own small parser. Circuits whose matrix is badly
conditioned (cond > 1e8) are drawn again, so the comparison tests the solver and not
rounding luck.

Sign conventions (docs/circuit.md): an element's current flows from its
first node through it to its second; V(a) - V(b) = value for voltage sources; a
current source's value flows from a through the source to b; controlled sources as
documented there.

Writes tests/reference/data/circuit_numpy.json (node voltages and every element's
current per case), which tests/circuit_reference.rs compares with loopwright at a
stated tolerance. With --check, recompute and compare with the committed file
(relative tolerance 1e-9, prints the differing case, exit 1 on a mismatch).

    ~/.cache/loopwright/venv/bin/python tests/reference/circuit_numpy.py [--check]
"""
import json
import math
import sys
from pathlib import Path

import numpy as np

OUT = Path(__file__).parent / "data" / "circuit_numpy.json"
SEED = 60062
N_CASES = 36
PREFIX = {"f": -15, "p": -12, "n": -9, "u": -6, "m": -3, "k": 3, "M": 6, "G": 9}


def scale(m, e):
    return m * 10.0 ** e if e >= 0 else m / 10.0 ** (-e)


def parse_value(v):
    """Numbers as they are; texts: SI form (4.7k) or RKM code (4k7, 2R2, R47)."""
    if not isinstance(v, str):
        return float(v)
    for i, ch in enumerate(v):
        if ch.isalpha():
            head, letter, tail = v[:i], ch, v[i + 1 :]
            e = 0 if letter == "R" else PREFIX[letter]
            if tail:  # RKM: the letter is the decimal point
                return scale(float(head + "." + tail), e)
            return scale(float(head), e)
    return float(v)


def value_text(rng, x):
    """Write x either as a number, an SI text or an RKM code (rounded to 2 digits)."""
    style = rng.integers(0, 3)
    if style == 0:
        return x
    exp3 = int(math.floor(math.log10(x) / 3)) * 3
    exp3 = max(-12, min(6, exp3))
    mant = x / 10.0 ** exp3
    letters = {-12: "p", -9: "n", -6: "u", -3: "m", 0: "R", 3: "k", 6: "M"}
    if style == 1 and exp3 != 0:
        return ("%.2f" % mant).rstrip("0").rstrip(".") + letters[exp3]
    # RKM needs a digit after the letter: two significant digits, e.g. 4k7, 47R...
    m2 = float(f"{mant:.2g}")
    ip = int(m2)
    frac = round((m2 - ip) * 10)
    if frac == 0:
        frac = 1
    return f"{ip}{letters[exp3]}{frac}" if ip > 0 else f"{letters[exp3]}{frac}"


def log_uniform(rng, lo, hi):
    return math.exp(rng.uniform(math.log(lo), math.log(hi)))


def random_circuit(rng):
    n = int(rng.integers(3, 11))
    nodes = [f"n{i}" for i in range(1, n + 1)]
    pool = ["0"] + nodes
    els = []

    def add(name, kind, a, b, value, **extra):
        e = {"name": name, "kind": kind, "nodes": [a, b], "value": value}
        e.update(extra)
        els.append(e)

    for i, node in enumerate(nodes):
        other = pool[int(rng.integers(0, i + 1))]
        add(f"R{i + 1}", "resistor", node, other, value_text(rng, log_uniform(rng, 10, 1e6)))
    pairs = lambda: rng.choice(len(pool), size=2, replace=False)
    for j in range(int(rng.integers(1, n + 1))):
        a, b = pairs()
        kind = ["resistor", "capacitor", "inductor"][int(rng.integers(0, 3))]
        lo, hi = {"resistor": (10, 1e6), "capacitor": (1e-12, 1e-6), "inductor": (1e-6, 1e-1)}[kind]
        add(f"X{j + 1}", kind, pool[a], pool[b], value_text(rng, log_uniform(rng, lo, hi)))
    # Sources: V1 and the voltage-output controlled sources each drive a different
    # node against ground, so no loop of voltage sources can form.
    drive = [nodes[k] for k in rng.choice(n, size=min(3, n), replace=False)]
    add("V1", "voltage-source", drive[0], "0", float(rng.uniform(-2, 2)))
    a, b = pairs()
    add("I1", "current-source", pool[a], pool[b], float(rng.uniform(-1e-3, 1e-3)))
    cp, cn = pairs()
    if len(drive) > 1:
        add("E1", "vcvs", drive[1], "0", float(rng.uniform(-5, 5)), control=[pool[cp], pool[cn]])
    cp, cn = pairs()
    a, b = pairs()
    add("G1", "vccs", pool[a], pool[b], float(rng.uniform(-1e-3, 1e-3)), control=[pool[cp], pool[cn]])
    if len(drive) > 2:
        add("H1", "ccvs", drive[2], "0", float(rng.uniform(-1e3, 1e3)), controlElement="V1")
    a, b = pairs()
    ctrl = "E1" if len(drive) > 1 else "V1"
    add("F1", "cccs", pool[a], pool[b], float(rng.uniform(-3, 3)), controlElement=ctrl)
    return {"format": "loopwright-circuit", "version": 1, "elements": els}


def solve(doc, f):
    """Independent MNA: node voltages and element currents (dicts of complex)."""
    els = doc["elements"]
    names = []
    for e in els:
        for nd in e["nodes"] + e.get("control", []):
            if nd != "0" and nd not in names:
                names.append(nd)
    idx = {nd: i for i, nd in enumerate(names)}
    branch_kinds = {"voltage-source", "inductor", "vcvs", "ccvs"}
    br = {}
    for e in els:
        if e["kind"] in branch_kinds:
            br[e["name"]] = len(names) + len(br)
    size = len(names) + len(br)
    M = np.zeros((size, size), dtype=complex)
    z = np.zeros(size, dtype=complex)
    s = 2j * math.pi * f

    def node(nd):
        return None if nd == "0" else idx[nd]

    def put(r, c, v):
        if r is not None and c is not None:
            M[r, c] += v

    for e in els:
        a, b = node(e["nodes"][0]), node(e["nodes"][1])
        k = parse_value(e["value"])
        kind = e["kind"]
        if kind in ("resistor", "capacitor"):
            y = 1 / k if kind == "resistor" else s * k
            put(a, a, y), put(b, b, y), put(a, b, -y), put(b, a, -y)
        elif kind == "current-source":
            if a is not None:
                z[a] -= k
            if b is not None:
                z[b] += k
        elif kind in ("vccs", "cccs"):
            if kind == "vccs":
                cols = [(node(e["control"][0]), k), (node(e["control"][1]), -k)]
            else:
                cols = [(br[e["controlElement"]], k)]
            for c, g in cols:
                put(a, c, g)
                put(b, c, -g)
        else:
            j = br[e["name"]]
            put(a, j, 1), put(b, j, -1), put(j, a, 1), put(j, b, -1)
            if kind == "voltage-source":
                z[j] += k
            elif kind == "inductor":
                put(j, j, -s * k)
            elif kind == "vcvs":
                put(j, node(e["control"][0]), -k)
                put(j, node(e["control"][1]), k)
            else:
                put(j, br[e["controlElement"]], -k)
    x = np.linalg.solve(M, z)
    cond = np.linalg.cond(M)

    def v(nd):
        return 0 if nd == "0" else x[idx[nd]]

    volts = {nd: x[idx[nd]] for nd in names}
    amps = {}
    for e in els:
        k = parse_value(e["value"])
        vab = v(e["nodes"][0]) - v(e["nodes"][1])
        kind = e["kind"]
        if kind == "resistor":
            amps[e["name"]] = vab / k
        elif kind == "capacitor":
            amps[e["name"]] = vab * s * k
        elif kind == "current-source":
            amps[e["name"]] = k
        elif kind == "vccs":
            amps[e["name"]] = k * (v(e["control"][0]) - v(e["control"][1]))
        elif kind == "cccs":
            amps[e["name"]] = k * x[br[e["controlElement"]]]
        else:
            amps[e["name"]] = x[br[e["name"]]]
    return volts, amps, cond


def evaluate():
    rng = np.random.default_rng(SEED)
    out = {"tolerance": 1e-9, "seed": SEED, "cases": []}
    while len(out["cases"]) < N_CASES:
        doc = random_circuit(rng)
        f = log_uniform(rng, 10, 1e6)
        try:
            volts, amps, cond = solve(doc, f)
        except np.linalg.LinAlgError:
            continue
        if not cond < 1e8:
            continue
        out["cases"].append(
            {
                "circuit": doc,
                "frequency_hz": f,
                "condition": float(cond),
                "voltages": {k: [c.real, c.imag] for k, c in volts.items()},
                "currents": {k: [complex(c).real, complex(c).imag] for k, c in amps.items()},
            }
        )
    return out


def main():
    result = evaluate()
    if "--check" in sys.argv:
        committed = json.loads(OUT.read_text())
        bad = 0
        if len(committed["cases"]) != len(result["cases"]):
            print("circuit_numpy: case count differs")
            bad += 1
        for i, (new, old) in enumerate(zip(result["cases"], committed["cases"])):
            if new["circuit"] != old["circuit"]:
                print(f"circuit_numpy case {i}: circuit differs")
                bad += 1
                continue
            for group in ("voltages", "currents"):
                scale_ = max(math.hypot(*v) for v in new[group].values()) or 1.0
                for k, (re, im) in new[group].items():
                    ore, oim = old[group][k]
                    # Relative 1e-9, with an absolute floor at 1e-12 of the case's largest
                    # value: below that a figure is LAPACK rounding noise, which moves
                    # between numpy builds (7.6e-18 A beside 1e-3 A currents seen).
                    if math.hypot(re - ore, im - oim) > 1e-9 * math.hypot(re, im) + 1e-12 * scale_:
                        print(f"circuit_numpy case {i} {group} {k}: {re}+{im}j != committed {ore}+{oim}j")
                        bad += 1
        if bad:
            sys.exit(1)
        print(f"circuit_numpy: {len(result['cases'])} circuits match")
        return
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(result, indent=1) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
