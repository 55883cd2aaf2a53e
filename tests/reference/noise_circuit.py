#!/usr/bin/env python3
"""Oracle for the noise of any circuit (src/noise/circuit/).

Builds the modified nodal system of each circuit from its JSON document with
its own stamps (node voltages, then one branch current per voltage source and
per gain block; an amplifier as a voltage-controlled source whose gain A(jf) is
evaluated directly as the product A0/(1 + jf/fp) * prod 1/(1 + jf/fk),
fp = GBW/A0, behind its Ro through an internal node, with Rd, Cd between its
inputs and Rcm, Ccm from each input to ground), and finds each noise source's
transfer to the output by superposition: one numpy.linalg.solve per source
per frequency, the right-hand side holding only that source.

Sources: 4kT/R current in parallel with every resistor (k from
scipy.constants.k), the amplifier's voltage noise e*sqrt(1 + fc/f) in series
with the + input of its gain block, its current noise i*sqrt(1 + fc/f) from
each input to ground, and a current source's shot noise 2*q*|I| (q from
scipy.constants.e) or given density. Band integrals by scipy.integrate.quad
in ln f on decade pieces (epsrel 1e-12), and from 0 Hz a first piece in f.

Writes tests/reference/data/noise_circuit_<name>.json; `--check` recomputes
and compares (rel. tol. 1e-9); `--table` prints the transimpedance stage's
densities and contributions.
"""
import json
import math
import pathlib
import sys

import numpy as np
from scipy import constants
from scipy.integrate import quad

DATA = pathlib.Path(__file__).parent / "data"
REL_TOL = 1e-9
QUAD_REL = 1e-12
K_B = constants.k
Q_E = constants.e
FREQS = [float(f) for f in np.logspace(0, 7, 29)]


def amp(a0=1e6, gbw=10e6, en=None, inn=None, **extra):
    m = {"a0": a0, "gbwHz": gbw}
    if en:
        m["voltageNoise"] = {"density": en[0], "cornerHz": en[1]}
    if inn:
        m["currentNoise"] = {"density": inn[0], "cornerHz": inn[1]}
    m.update(extra)
    return m


def el(name, kind, a, b, value=None, **extra):
    e = {"name": name, "kind": kind, "nodes": [a, b]}
    if value is not None:
        e["value"] = value
    e.update(extra)
    return e


def u(name, out, plus, minus, model):
    return {"name": name, "kind": "amplifier", "nodes": [out, "0"], "control": [plus, minus], "model": model}


def doc(elements):
    return {"format": "loopwright-circuit", "version": 2, "elements": elements}


# Scenarios of our own. Each: circuit, output, options, band.
CASES = [
    {
        "name": "non_inverting",
        "circuit": doc([
            el("Vs", "voltage-source", "src", "0", 0),
            el("Rs", "resistor", "src", "in", 200.0),
            u("U1", "out", "in", "fb", amp(en=(4e-9, 0), inn=(0.5e-12, 0))),
            el("Rf", "resistor", "out", "fb", 9e3),
            el("Rg", "resistor", "fb", "0", 1e3),
            el("Rl", "resistor", "out", "0", 2e3),
        ]),
        "output": {"node": "out"}, "inputSource": "Vs", "temperatureK": 300.0, "bandHz": [10.0, 1e6],
    },
    {
        "name": "inverting",
        "circuit": doc([
            el("Vs", "voltage-source", "src", "0", 0),
            el("Rin", "resistor", "src", "fb", 1e3),
            el("Rf", "resistor", "out", "fb", 10e3),
            el("Rp", "resistor", "p", "0", 909.0),
            u("U1", "out", "p", "fb", amp(gbw=5e6, en=(7e-9, 0), inn=(1e-12, 0), ro=50.0)),
        ]),
        "output": {"node": "out"}, "inputSource": "Vs", "temperatureK": 310.0, "bandHz": [1.0, 1e6],
    },
    {
        "name": "feedback_capacitor",
        "circuit": doc([
            el("Vs", "voltage-source", "src", "0", 0),
            el("Rin", "resistor", "src", "fb", 10e3),
            el("Rf", "resistor", "out", "fb", 100e3),
            el("Cf", "capacitor", "out", "fb", 1e-9),
            u("U1", "out", "0", "fb", amp(en=(10e-9, 0), inn=(2e-12, 0))),
        ]),
        "output": {"node": "out"}, "inputSource": "Vs", "temperatureK": 300.0, "bandHz": [0.0, 1e5],
    },
    {
        "name": "transimpedance",
        "circuit": doc([
            el("Ipd", "current-source", "0", "inv", 100e-9),
            el("Cs", "capacitor", "inv", "0", 100e-12),
            el("Rsh", "resistor", "inv", "0", 1e9),
            el("Rf", "resistor", "out", "inv", 1e6),
            el("Cf", "capacitor", "out", "inv", 2e-12),
            u("U1", "out", "0", "inv", amp(gbw=20e6, en=(5e-9, 100.0), inn=(1e-15, 0))),
        ]),
        "output": {"node": "out"}, "inputSource": "Ipd", "temperatureK": 300.0, "bandHz": [1.0, 1e6],
        "currentNoise": [{"element": "Ipd", "shot": True}],
    },
    {
        "name": "rc_input_filter",
        "circuit": doc([
            el("Vs", "voltage-source", "src", "0", 0),
            el("Rflt", "resistor", "src", "in", 1e3),
            el("Cflt", "capacitor", "in", "0", 10e-9),
            u("U1", "out", "in", "fb", amp(en=(6e-9, 0), inn=(0.8e-12, 0), rd=1e6, cd=5e-12)),
            el("Rf", "resistor", "out", "fb", 10e3),
            el("Rg", "resistor", "fb", "0", 10e3),
        ]),
        "output": {"node": "out"}, "inputSource": "Vs", "temperatureK": 300.0, "bandHz": [0.0, 1e6],
    },
    {
        "name": "flicker_corners",
        "circuit": doc([
            el("Vs", "voltage-source", "src", "0", 0),
            el("Rs", "resistor", "src", "in", 10e3),
            u("U1", "out", "in", "fb", amp(gbw=50e6, en=(3e-9, 50.0), inn=(2e-12, 500.0))),
            el("Rf", "resistor", "out", "fb", 10e3),
            el("Rg", "resistor", "fb", "0", 100.0),
        ]),
        "output": {"node": "out"}, "inputSource": "Vs", "temperatureK": 300.0, "bandHz": [0.1, 20e3],
    },
    {
        "name": "current_output",
        "circuit": doc([
            el("Vs", "voltage-source", "src", "0", 0),
            el("Rin", "resistor", "src", "fb", 10e3),
            el("Rload", "resistor", "out", "fb", 1e3),
            u("U1", "out", "0", "fb", amp(en=(8e-9, 20.0), inn=(0.2e-12, 0), ro=25.0)),
        ]),
        "output": {"element": "Rload"}, "inputSource": "Vs", "temperatureK": 300.0, "bandHz": [10.0, 1e5],
    },
    {
        "name": "two_amplifiers",
        "circuit": doc([
            el("Vs", "voltage-source", "src", "0", 0),
            el("Rs", "resistor", "src", "in", 50.0),
            u("U1", "m", "in", "fb1", amp(gbw=100e6, en=(1e-9, 10.0), inn=(2e-12, 100.0))),
            el("Rf1", "resistor", "m", "fb1", 990.0),
            el("Rg1", "resistor", "fb1", "0", 10.0),
            el("Rc", "resistor", "m", "in2", 1e3),
            el("Cc", "capacitor", "in2", "0", 1e-9),
            u("U2", "out", "in2", "fb2", amp(gbw=10e6, en=(10e-9, 0), inn=(0.1e-12, 0), ro=40.0, polesHz=[30e6])),
            el("Rf2", "resistor", "out", "fb2", 9e3),
            el("Rg2", "resistor", "fb2", "0", 1e3),
        ]),
        "output": {"node": "out"}, "inputSource": "Vs", "temperatureK": 300.0, "bandHz": [20.0, 20e3],
    },
    {
        "name": "difference_stage",
        "circuit": doc([
            el("Vd", "voltage-source", "sp", "sn", 0),
            el("Rref", "resistor", "sn", "0", 1.0),
            el("R1", "resistor", "sn", "fb", 1e3),
            el("R2", "resistor", "out", "fb", 10e3),
            el("R3", "resistor", "sp", "p", 1e3),
            el("R4", "resistor", "p", "0", 10e3),
            u("U1", "out", "p", "fb", amp(en=(5e-9, 0), inn=(1e-12, 0), rcm=1e9, ccm=3e-12)),
        ]),
        "output": {"node": "out"}, "inputSource": "Vd", "temperatureK": 300.0, "bandHz": [10.0, 1e6],
    },
]


class Mna:
    """The nodal system of one circuit, stamped from its JSON."""

    def __init__(self, circuit):
        self.elements = circuit["elements"]
        self.nodes = {}
        for e in self.elements:
            for n in e["nodes"] + e.get("control", []):
                self.node(n)
        self.branches = {}
        for e in self.elements:
            if e["kind"] in ("voltage-source", "amplifier"):
                self.branches[e["name"]] = len(self.nodes) + len(self.branches)
                if e["kind"] == "amplifier" and e["model"].get("ro", 0.0) > 0:
                    self.node(e["name"] + "#y")
        # Internal nodes may have been added after the branches were numbered.
        nn = len(self.nodes)
        self.branches = {k: nn + i for i, k in enumerate(self.branches)}
        self.size = nn + len(self.branches)

    def node(self, name):
        if name in ("0", "gnd"):
            return None
        if name not in self.nodes:
            self.nodes[name] = len(self.nodes)
        return self.nodes[name]

    def matrix(self, f):
        n = self.size
        m = np.zeros((n, n), dtype=complex)
        s = 2j * math.pi * f

        def add(r, c, v):
            if r is not None and c is not None:
                m[r, c] += v

        def admit(a, b, y):
            add(a, a, y)
            add(b, b, y)
            add(a, b, -y)
            add(b, a, -y)

        for e in self.elements:
            a, b = (self.node(x) for x in e["nodes"])
            k = e["kind"]
            if k == "resistor":
                admit(a, b, 1 / e["value"])
            elif k == "capacitor":
                admit(a, b, s * e["value"])
            elif k == "voltage-source":
                br = self.branches[e["name"]]
                add(a, br, 1)
                add(b, br, -1)
                add(br, a, 1)
                add(br, b, -1)
            elif k == "amplifier":
                md = e["model"]
                p, q = (self.node(x) for x in e["control"])
                yd = s * md.get("cd", 0.0) + (1 / md["rd"] if "rd" in md else 0.0)
                admit(p, q, yd)
                ycm = s * md.get("ccm", 0.0) + (1 / md["rcm"] if "rcm" in md else 0.0)
                admit(p, None, ycm)
                admit(q, None, ycm)
                ro = md.get("ro", 0.0)
                y = self.node(e["name"] + "#y") if ro > 0 else a
                if ro > 0:
                    admit(y, a, 1 / ro)
                br = self.branches[e["name"]]
                gain = open_loop(md, f)
                add(y, br, 1)
                add(b, br, -1)
                add(br, y, 1)
                add(br, b, -1)
                add(br, p, -gain)
                add(br, q, gain)
        return m

    def output_row(self, output, f):
        c = np.zeros(self.size, dtype=complex)
        if "node" in output:
            c[self.node(output["node"])] = 1
            return c
        e = next(x for x in self.elements if x["name"] == output["element"])
        assert e["kind"] == "resistor"
        a, b = (self.node(x) for x in e["nodes"])
        for idx, sign in ((a, 1), (b, -1)):
            if idx is not None:
                c[idx] += sign / e["value"]
        return c

    def sources(self, case, temperature):
        """(name, psd(f), rhs(f)) for each noise source."""
        out = []
        four_kt = 4 * K_B * temperature

        def current_rhs(a, b):
            def rhs(f):
                v = np.zeros(self.size, dtype=complex)
                if a is not None:
                    v[a] -= 1
                if b is not None:
                    v[b] += 1
                return v
            return rhs

        for e in self.elements:
            a, b = (self.node(x) for x in e["nodes"])
            if e["kind"] == "resistor":
                out.append((e["name"], (lambda g: lambda f: four_kt * g)(1 / e["value"]), current_rhs(a, b)))
            if e["kind"] == "amplifier":
                md = e["model"]
                br = self.branches[e["name"]]
                if "voltageNoise" in md:
                    d, fc = md["voltageNoise"]["density"], md["voltageNoise"]["cornerHz"]

                    def rhs(f, md=md, br=br):
                        v = np.zeros(self.size, dtype=complex)
                        v[br] = open_loop(md, f)
                        return v
                    out.append((e["name"] + ".en", flicker(d, fc), rhs))
                if "currentNoise" in md:
                    d, fc = md["currentNoise"]["density"], md["currentNoise"]["cornerHz"]
                    for pin, suffix in zip(e["control"], (".in+", ".in-")):
                        out.append((e["name"] + suffix, flicker(d, fc), current_rhs(None, self.node(pin))))
        for x in case.get("currentNoise", []):
            e = next(y for y in self.elements if y["name"] == x["element"])
            a, b = (self.node(n) for n in e["nodes"])
            psd = (lambda i: lambda f: 2 * Q_E * i)(abs(e["value"])) if x.get("shot") else flicker(x["density"], x.get("cornerHz", 0.0))
            out.append((e["name"], psd, current_rhs(a, b)))
        return out

    def signal_rhs(self, name):
        e = next(y for y in self.elements if y["name"] == name)
        v = np.zeros(self.size, dtype=complex)
        if e["kind"] == "voltage-source":
            v[self.branches[name]] = 1
        else:
            a, b = (self.node(n) for n in e["nodes"])
            if a is not None:
                v[a] -= 1
            if b is not None:
                v[b] += 1
        return v

    def amplifier_rhs(self, f):
        e = next(y for y in self.elements if y["kind"] == "amplifier")
        v = np.zeros(self.size, dtype=complex)
        v[self.branches[e["name"]]] = open_loop(e["model"], f)
        return v


def open_loop(md, f):
    fp = md["gbwHz"] / md["a0"]
    g = md["a0"] / (1 + 1j * f / fp)
    for fk in md.get("polesHz", []):
        g /= 1 + 1j * f / fk
    return g


def flicker(d, fc):
    return lambda f: d * d * (1 + fc / f if fc else 1.0)


def transfer(mna, case, f, rhs):
    m = mna.matrix(f)
    x = np.linalg.solve(m, rhs)
    return complex(mna.output_row(case["output"], f) @ x)


def analyse(case):
    mna = Mna(case["circuit"])
    sources = mna.sources(case, case["temperatureK"])

    def psd(f, which):
        name, p, rhs = sources[which]
        return abs(transfer(mna, case, f, rhs(f))) ** 2 * p(f)

    def total(f):
        return sum(psd(f, k) for k in range(len(sources)))

    def gain(f):
        return abs(transfer(mna, case, f, mna.signal_rhs(case["inputSource"])))

    dens = {s[0]: [math.sqrt(psd(f, k)) for f in FREQS] for k, s in enumerate(sources)}
    tot = [math.sqrt(sum(dens[s][i] ** 2 for s in dens)) for i in range(len(FREQS))]
    g = [gain(f) for f in FREQS]
    ng = [abs(transfer(mna, case, f, mna.amplifier_rhs(f))) for f in FREQS]
    lo, hi = case["bandHz"]
    band = {s[0]: integrate(lambda f, k=k: psd(f, k), lo, hi) for k, s in enumerate(sources)}
    total_band = sum(band.values())
    inref = integrate(lambda f: total(f) / gain(f) ** 2, lo, hi)
    return {
        "name": case["name"],
        "circuit": case["circuit"],
        "output": case["output"],
        "inputSource": case["inputSource"],
        "temperatureK": case["temperatureK"],
        "currentNoise": case.get("currentNoise", []),
        "frequenciesHz": FREQS,
        "total": tot,
        "sources": dens,
        "signalGain": g,
        "inputReferred": [t / x for t, x in zip(tot, g)],
        "noiseGain": ng,
        "bandHz": [lo, hi],
        "bandTotalRms": math.sqrt(total_band),
        "bandSourceRms": {k: math.sqrt(v) for k, v in band.items()},
        "bandInputReferredRms": math.sqrt(inref),
    }


def integrate(fn, lo, hi):
    """Integral of fn over [lo, hi]: a linear piece from 0 Hz, then decades in ln f."""
    total = 0.0
    start = lo
    if lo == 0.0:
        start = hi * 1e-9
        total += quad(fn, 0.0, start, epsrel=QUAD_REL, limit=200)[0]
    edges = np.geomspace(start, hi, max(2, math.ceil(math.log10(hi / start)) + 1))
    for a, b in zip(edges[:-1], edges[1:]):
        v = quad(lambda t: fn(math.exp(t)) * math.exp(t), math.log(a), math.log(b), epsrel=QUAD_REL, limit=200)[0]
        total += v
    return total


def compare(a, b, path, bad, floor=None):
    """`floor(i)`: the absolute tolerance of item i of a list (or of a number, i = None)."""
    if isinstance(a, dict):
        for k in a:
            compare(a[k], b.get(k) if isinstance(b, dict) else None, f"{path}.{k}", bad, floor)
    elif isinstance(a, list):
        if not isinstance(b, list) or len(a) != len(b):
            bad.append(path)
            return
        for i, (x, y) in enumerate(zip(a, b)):
            compare(x, y, f"{path}[{i}]", bad, (lambda _, i=i: floor(i)) if floor else None)
    elif isinstance(a, float) and isinstance(b, (int, float)):
        if not math.isclose(a, b, rel_tol=REL_TOL, abs_tol=floor(None) if floor else 1e-300):
            bad.append(path)
    elif a != b:
        bad.append(path)


def compare_result(r, old, bad):
    """One circuit's result against its committed data. A source that cancels or
    cannot reach the output (a load across an ideal output, the reference resistor of
    a balanced difference stage) is rounding noise some 1e-17 below the total, and
    moves between numpy releases: each source's density is compared to REL_TOL of the
    total density at its frequency, each source's band rms to REL_TOL of the band
    total, as tests/noise_circuit_reference.rs does."""
    for k in r:
        b = old.get(k)
        if k == "sources":
            compare(r[k], b, f"{r['name']}.{k}", bad, lambda i: REL_TOL * r["total"][i])
        elif k == "bandSourceRms":
            compare(r[k], b, f"{r['name']}.{k}", bad, lambda _: REL_TOL * r["bandTotalRms"])
        else:
            compare(r[k], b, f"{r['name']}.{k}", bad)


def table(r):
    """The transimpedance stage's densities and band contributions."""
    print(f"{r['name']}: output {r['output']}, {r['temperatureK']} K")
    names = list(r["sources"])
    print("f (Hz)        total (V/rtHz)  " + "  ".join(f"{n:>10}" for n in names) + "   |NG|")
    for i, f in enumerate(r["frequenciesHz"]):
        if i % 4 == 0:
            row = "  ".join(f"{r['sources'][n][i]:10.3e}" for n in names)
            print(f"{f:10.3e}    {r['total'][i]:10.4e}      {row}   {r['noiseGain'][i]:.3f}")
    lo, hi = r["bandHz"]
    print(f"band {lo:g}..{hi:g} Hz: total {r['bandTotalRms']:.5e} V rms, input-referred {r['bandInputReferredRms']:.5e} A rms")
    for n in names:
        v = r["bandSourceRms"][n]
        print(f"  {n:8} {v:.5e} V rms  share {100 * v * v / r['bandTotalRms'] ** 2:6.2f} %")


def main():
    results = [analyse(c) for c in CASES]
    if "--table" in sys.argv:
        for r in results:
            if r["name"] == "transimpedance":
                table(r)
        return
    if "--check" in sys.argv:
        bad = []
        for r in results:
            old = json.loads((DATA / f"noise_circuit_{r['name']}.json").read_text())
            compare_result(r, old, bad)
        for b in bad:
            print(f"differs: {b}")
        if bad:
            sys.exit(1)
        print(f"ok: {len(results)} circuits match")
        return
    for r in results:
        path = DATA / f"noise_circuit_{r['name']}.json"
        path.write_text(json.dumps(r, indent=1) + "\n")
        print(f"wrote {path}")


if __name__ == "__main__":
    main()
