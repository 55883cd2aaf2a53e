#!/usr/bin/env python3
"""Python peers for `make bench`: the same work as the loopwright cases, done the way
a user of numpy/scipy/python-control would do it. Prints {case_key: median_ns} as JSON.

Cases are added beside the matching entries of bench/cases.mjs (same keys)."""
import json
import math
import statistics
import sys
import time

QUICK = "--quick" in sys.argv


def median_ns(fn, repeat=None):
    repeat = repeat or (3 if QUICK else 11)
    fn()  # warm-up
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter_ns()
        fn()
        times.append(time.perf_counter_ns() - t0)
    return statistics.median(times)


def monte_carlo_1e6(n=1_000_000, seed=42):
    """numpy doing the Monte Carlo of the monte_carlo_1e6 case, vectorised: inverting
    stage, 10 k / 47 k at 1 % uniform, A uniform 50 k ... 200 k, mean, sd, the seven
    percentiles, yield and a 50-bin histogram."""
    import numpy as np

    rng = np.random.default_rng(seed)
    r1 = 10e3 * (1 + 0.01 * rng.uniform(-1, 1, n))
    r2 = 47e3 * (1 + 0.01 * rng.uniform(-1, 1, n))
    a = rng.uniform(5e4, 2e5, n)
    af = -a * r2 / (r1 + r2 + a * r1)
    af.mean(), af.std(ddof=1)
    np.percentile(af, [0.1, 1, 5, 50, 95, 99, 99.9])
    np.mean((af >= -4.72) & (af <= -4.68))
    np.histogram(af, bins=50)


TAU = 2 * math.pi


def freq_loop():
    """The loop of the freq cases: A0 = 1e5, poles 10 Hz, 100 kHz, 1, 3, 10, 30 MHz,
    zeros 2 and 50 MHz, beta = 0.1, built as a python-control user would."""
    import control

    s = control.tf("s")
    a = control.tf([1e5], [1])
    for f in [10.0, 1e5, 1e6, 3e6, 1e7, 3e7]:
        a = a / (1 + s / (TAU * f))
    for f in [2e6, 5e7]:
        a = a * (1 + s / (TAU * f))
    return a, 0.1


def freq_cases():
    import control
    import numpy as np

    a, beta = freq_loop()
    loop = a * beta
    w = TAU * np.logspace(0, 9, 10_000)

    def sweep():
        r = control.frequency_response(loop, w)
        20 * np.log10(r.magnitude), np.unwrap(r.phase) * 180 / math.pi

    def margins_and_poles():
        control.stability_margins(loop)
        control.feedback(a, beta).poles()

    return {"freq_sweep_10k": sweep, "freq_margins_poles": margins_and_poles}


def circuit_sweep_1000():
    """numpy doing the circuit_sweep_1000 case the way a numpy user would: the
    modified nodal matrices G and C of the same 11-node ladder stamped once, then
    M(w) = G + jw·C for the 1 000 frequencies stacked and solved in one batched
    np.linalg.solve (LAPACK zgesv per system), V(n7) taken from each solution."""
    import numpy as np

    nodes = ["s", "in", "fb", "a"] + [f"n{k}" for k in range(1, 8)]
    idx = {name: i for i, name in enumerate(nodes)}
    n = len(nodes) + 2  # + the branch currents of Vs and the VCVS
    g = np.zeros((n, n))
    c = np.zeros((n, n))

    def two_terminal(m, a, b, y):
        for p, q, sign in ((a, a, 1), (b, b, 1), (a, b, -1), (b, a, -1)):
            if p != "0" and q != "0":
                m[idx[p], idx[q]] += sign * y

    two_terminal(g, "s", "in", 1 / 1e3)
    two_terminal(g, "in", "fb", 1 / 1e6)
    two_terminal(g, "a", "n1", 1 / 75)
    for k in range(1, 7):
        two_terminal(g, f"n{k}", f"n{k + 1}", 1 / 1e3)
        two_terminal(c, f"n{k + 1}", "0", 1e-9)
    two_terminal(g, "n7", "fb", 1 / 9e3)
    two_terminal(g, "fb", "0", 1 / 1e3)
    vs, ea = len(nodes), len(nodes) + 1
    g[idx["s"], vs] = g[vs, idx["s"]] = 1  # Vs: V(s) = 1
    g[idx["a"], ea] = g[ea, idx["a"]] = 1  # VCVS: V(a) − 1e5·(V(in) − V(fb)) = 0
    g[ea, idx["in"]] -= 1e5
    g[ea, idx["fb"]] += 1e5
    b = np.zeros(n, dtype=complex)
    b[vs] = 1
    w = TAU * np.logspace(1, 7, 1000)

    def sweep():
        m = g[None, :, :] + 1j * w[:, None, None] * c[None, :, :]
        x = np.linalg.solve(m, np.broadcast_to(b, (len(w), n))[..., None])
        x[:, idx["n7"], 0].copy()

    return sweep


def noise_circuit_1000():
    """numpy doing the noise_circuit_1000 case the usual way: the nodal system of
    bench/noise_circuit_11.json stamped by tests/reference/noise_circuit.py, and each
    of the 13 sources' transfer by its own solve at each of 1 000 frequencies."""
    import pathlib

    import numpy as np

    here = pathlib.Path(__file__).resolve().parent
    sys.path.insert(0, str(here.parent / "tests" / "reference"))
    import noise_circuit as ref

    circuit = json.loads((here / "noise_circuit_11.json").read_text())
    mna = ref.Mna(circuit)
    case = {"output": {"node": "x"}}
    sources = mna.sources(case, 300.0)
    c = mna.output_row(case["output"], 1.0)
    freqs = np.logspace(1, 7, 1000)

    def run():
        total = np.empty(len(freqs))
        for i, f in enumerate(freqs):
            m = mna.matrix(f)
            total[i] = math.sqrt(
                sum(abs(c @ np.linalg.solve(m, rhs(f))) ** 2 * psd(f) for _, psd, rhs in sources)
            )
        return total

    return run



def split_lognormal(rng, n, lo, typ, hi, k=3.0):
    """The split log-normal of src/network/montecarlo.rs: median typ, min and max at k sigma."""
    import numpy as np

    l, m, h = math.log(lo), math.log(typ), math.log(hi)
    z = rng.standard_normal(n)
    bad = np.abs(z) > k
    while bad.any():
        z[bad] = rng.standard_normal(bad.sum())
        bad = np.abs(z) > k
    return np.exp(m + np.where(z < 0, (m - l) / k, (h - m) / k) * z)


def tolerance_gain_1e5(n=100_000, seed=1):
    """numpy doing the tolerance_gain_1e5 case: Rf, Rg uniform 1 %, A0 split
    log-normal, |A/(1 + A beta)| in dB at 1 kHz (single pole, GBW 10 MHz), mean, sd,
    the seven percentiles, yield and a 20-bin histogram."""
    import numpy as np

    def run():
        rng = np.random.default_rng(seed)
        rf = 47e3 * (1 + 0.01 * rng.uniform(-1, 1, n))
        rg = 1e3 * (1 + 0.01 * rng.uniform(-1, 1, n))
        a0 = split_lognormal(rng, n, 5e4, 2e5, 1e6)
        a = a0 / (1 + 1j * 1e3 * a0 / 1e7)
        db = 20 * np.log10(np.abs(a / (1 + a * rg / (rf + rg))))
        db.mean(), db.std(ddof=1)
        np.percentile(db, [0.1, 1, 5, 50, 95, 99, 99.9])
        np.mean((db >= 33.58) & (db <= 33.67))
        np.histogram(db, bins=20)

    return run


def tolerance_pm_1e4(n=10_000, seed=1):
    """numpy + scipy doing the tolerance_pm_1e4 case: per trial, the crossover of
    T = A0 beta/((1 + j f A0/GBW)(1 + j f/8 MHz)) by brentq on log f, PM = 180 + angle T."""
    import numpy as np
    from scipy.optimize import brentq

    def run():
        rng = np.random.default_rng(seed)
        rf = 1e3 * (1 + 0.01 * rng.uniform(-1, 1, n))
        rg = 1e3 * (1 + 0.01 * rng.uniform(-1, 1, n))
        a0 = split_lognormal(rng, n, 5e4, 2e5, 1e6)
        gbw = split_lognormal(rng, n, 7e6, 1e7, 1.3e7)
        pm = np.empty(n)
        for i in range(n):
            beta = rg[i] / (rf[i] + rg[i])

            def t(f, i=i, beta=beta):
                return a0[i] * beta / ((1 + 1j * f * a0[i] / gbw[i]) * (1 + 1j * f / 8e6))

            x = brentq(lambda lf: abs(t(10 ** lf)) - 1, 0, 10, xtol=1e-12)
            pm[i] = 180 + math.degrees(np.angle(t(10 ** x)))
        pm.mean(), pm.std(ddof=1), np.mean(pm >= 61)

    return run



def tolerance_pm_11node_1e4(n=10_000, seed=1):
    """numpy doing the tolerance_pm_11node_1e4 case: the 11-node circuit of
    bench/tolerance_circuit_11.json with every part drawn (uniform +-1 %; A0 and GBW
    split log-normal), its loop opened at U1 (a 1 V test source behind Ro, Vs at
    zero), the nodal system of all trials solved as one batch at each frequency of a
    12-per-decade grid from 1 Hz to 10 GHz, each unity-gain crossing bracketed there
    and refined by 60 vectorised bisections on log f, PM = 180 - |angle T|."""
    import pathlib

    import numpy as np

    here = pathlib.Path(__file__).resolve().parent
    circuit = json.loads((here / "tolerance_circuit_11.json").read_text())
    els = circuit["elements"]
    amp = next(e for e in els if e["kind"] == "amplifier")
    passive = [e for e in els if e["kind"] in ("resistor", "capacitor")]
    # Vs at zero shorts node s to ground.
    nodes = sorted({x for e in passive for x in e["nodes"]} - {"0", "s"})
    idx = {x: i for i, x in enumerate(nodes)}
    m = amp["model"]
    ro, pole2 = m["ro"], m["polesHz"][0]

    def run():
        rng = np.random.default_rng(seed)
        vals = [e["value"] * (1 + 0.01 * rng.uniform(-1, 1, n)) for e in passive]
        a0 = split_lognormal(rng, n, 5e4, 2e5, 1e6)
        gbw = split_lognormal(rng, n, 7e6, 1e7, 1.3e7)
        out, plus, minus = idx[amp["nodes"][0]], idx[amp["control"][0]], idx[amp["control"][1]]
        k = len(nodes)

        def t_of(f):
            f = np.broadcast_to(f, (n,))
            w = 2j * np.pi * f
            y = np.zeros((n, k, k), complex)
            for e, v in zip(passive, vals):
                g = 1 / v if e["kind"] == "resistor" else w * v
                a, b = (idx.get(x) for x in e["nodes"])
                for p, q, sgn in ((a, a, 1), (b, b, 1), (a, b, -1), (b, a, -1)):
                    if p is not None and q is not None:
                        y[:, p, q] += sgn * g
            y[:, out, out] += 1 / ro
            rhs = np.zeros((n, k), complex)
            rhs[:, out] = 1 / ro
            v = np.linalg.solve(y, rhs[..., None])[..., 0]
            a = a0 / (1 + w * a0 / (2 * np.pi * gbw)) / (1 + f / pole2 * 1j)
            return -a * (v[:, plus] - v[:, minus])

        grid = np.logspace(0, 10, 121)
        ln = np.array([np.log(np.abs(t_of(f))) for f in grid])
        # The first unity-gain crossing of each trial (every trial has one here).
        j = np.argmax((ln[:-1] > 0) & (ln[1:] <= 0), axis=0)
        lo, hi = np.log(grid[j]), np.log(grid[j + 1])
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            above = np.log(np.abs(t_of(np.exp(mid)))) > 0
            lo, hi = np.where(above, mid, lo), np.where(above, hi, mid)
        pm = 180 - np.abs(np.degrees(np.angle(t_of(np.exp(0.5 * (lo + hi))))))
        return pm.mean(), pm.std(ddof=1), np.mean(pm >= 65.5)

    return run


CASES = {
    "monte_carlo_1e6": monte_carlo_1e6,
    **freq_cases(),
    "circuit_sweep_1000": circuit_sweep_1000(),
    "noise_circuit_1000": noise_circuit_1000(),
    "tolerance_gain_1e5": tolerance_gain_1e5(),
    "tolerance_pm_1e4": tolerance_pm_1e4(),
    "tolerance_pm_11node_1e4": tolerance_pm_11node_1e4(),
}


def main():
    # About a second or more per run: three runs.
    slow = {"noise_circuit_1000": 3, "tolerance_pm_1e4": 3, "tolerance_pm_11node_1e4": 3}
    print(json.dumps({key: median_ns(fn, slow.get(key)) for key, fn in CASES.items()}))


if __name__ == "__main__":
    main()
