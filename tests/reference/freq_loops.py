#!/usr/bin/env python3
"""Reference values for the frequency-response and stability engine (src/freq),
computed with python-control and scipy on fixed loops.

For each case: phase and gain margin with their frequencies, closed-loop poles,
closed-loop -3 dB bandwidth (high, and low with a low cut), peaking, and the step
response's overshoot, 10-90 % rise and 2 % settling time.

The models are built independently from the factor forms written in
src/freq/model.rs (real pole 1/(1+s/wp), RHP zero (1-s/wz), complex pair
1/(1+s/(Q w0)+s^2/w0^2), integrator (2 pi 1 Hz)/s, low cut s/(s+wL), delay
exp(-s tau)) as python-control transfer functions in the time-scaled variable
s' = s/ws (ws the geometric mean of the corners), so that the polynomials stay
well-conditioned for numpy; frequencies and times are scaled back afterwards.

- margins: every unity-gain and -180 degree crossing from
  control.stability_margins(returnall=True) on the loop gain; for a delay, which
  a transfer function cannot hold exactly, the exact response exp(-jw tau)·L(jw)
  is bracketed on a dense grid and refined with scipy.optimize.brentq. At each
  crossing the loop is evaluated afresh (numpy) and read by the definition in
  docs/freq.md: the phase margin is the smallest phase change, lag or lead, that
  puts L on -1, 180 - |angle L| with numpy.angle in (-180, 180]; the gain margin
  is the smallest gain change, up or down, |20 log10 |L||. The worst (smallest)
  of each is reported, negative when the closed loop is unstable by its poles
  (numpy.roots below), never by a margin alone.
- poles: numpy.roots of den_A·den_b + num_A·num_b, the polynomials of the
  python-control transfer functions; a delay through control.pade of the same
  order (6).
- bandwidth: |Af| on the exact response (delay exact), brentq on the -3 dB level
  relative to the DC (or midband) closed-loop gain; peaking by a dense grid and
  scipy.optimize.minimize_scalar.
- step: control.forced_response of the closed loop on 100 001 samples brackets
  each event; the exact output y(t) from the state space of control.ss and
  scipy.linalg.expm then refines the crossings (brentq) and the peak
  (minimize_scalar).

Three searches beside the cases:
- max_beta and dominant_pole: a brute-force scan of the phase margin above
  (python-control crossings) over beta, or over an added dominant pole, at 100
  points per decade; brentq on margin - target refines the ends of the interval
  that holds the largest value meeting the target.
- settling: the exact step response of three equal poles just below the critical
  loop gain of 8, as a sum of residues (partial fractions) in mpmath at 30
  digits: its extrema by findroot on y'(t), and the last exit from the band.

Writes tests/reference/data/freq_loops.json, read by tests/freq_reference.rs.
Run with --check to recompute and compare with the committed file (exit 1 on a
mismatch).

    ~/.cache/loopwright/venv/bin/python tests/reference/freq_loops.py [--check]
"""
import json
import math
import sys
from pathlib import Path

import control
import mpmath as mp
import numpy as np
from scipy import linalg, optimize

OUT = Path(__file__).parent / "data" / "freq_loops.json"
TAU = 2 * math.pi
PADE_ORDER = 6
SETTLE_BAND = 0.02


def model(gain, poles=(), zeros=(), rhp_zeros=(), rhp_poles=(), complex_poles=(), complex_zeros=(),
          origin_poles=0, low_cuts=(), delay=0.0):
    return {
        "gain": gain, "polesHz": list(poles), "zerosHz": list(zeros), "rhpZerosHz": list(rhp_zeros),
        "rhpPolesHz": list(rhp_poles),
        "complexPoles": [{"freqHz": f, "q": q} for f, q in complex_poles],
        "complexZeros": [{"freqHz": f, "q": q} for f, q in complex_zeros],
        "originPoles": origin_poles, "lowCutsHz": list(low_cuts), "delayS": delay,
    }


def const(b):
    return model(b)


# (name, A, beta). Loops of 1 to 6 poles, LHP and RHP zeros, complex pairs, an
# integrator, a delay, a low cut, a frequency-dependent beta, stable and unstable.
CASES = [
    ("one pole", model(1e5, poles=[10.0]), const(0.01)),
    ("two poles, unity-gain buffer", model(1e5, poles=[10.0, 1e6]), const(1.0)),
    ("two poles, gain 10", model(1e5, poles=[10.0, 1e6]), const(0.1)),
    ("two poles, Q about 1", model(999.0, poles=[1e3, 1e6]), const(1.0)),
    ("three poles, stable", model(1e4, poles=[1e3, 1e5, 1e6]), const(0.01)),
    ("three equal poles, loop gain 4", model(4.0, poles=[1e3, 1e3, 1e3]), const(1.0)),
    ("three equal poles, loop gain 12", model(12.0, poles=[1e3, 1e3, 1e3]), const(1.0)),
    ("four poles", model(2e5, poles=[5.0, 2e5, 3e6, 2e7]), const(0.05)),
    ("five poles, lightly damped", model(1e5, poles=[3.0, 1e5, 5e5, 2e6, 1e7]), const(1.0)),
    ("six poles over eight decades", model(1e6, poles=[1.0, 1e4, 1e6, 3e6, 1e7, 1e8]), const(1e-4)),
    ("LHP zero", model(1e5, poles=[10.0, 1e5, 1e6], zeros=[3e5]), const(0.1)),
    ("RHP zero", model(1e4, poles=[100.0, 1e6], rhp_zeros=[5e6]), const(0.1)),
    ("complex pole pair", model(1e4, poles=[100.0], complex_poles=[(1e6, 2.0)]), const(0.05)),
    ("complex pole and zero pairs", model(3e3, poles=[50.0], complex_poles=[(2e5, 5.0), (3e6, 0.6)],
                                          complex_zeros=[(4e5, 3.0)]), const(0.2)),
    ("integrator and one pole", model(1e6, origin_poles=1, poles=[3e6]), const(1.0)),
    ("integrator, zero and two poles", model(1e3, origin_poles=1, zeros=[100.0], poles=[2e4, 5e5]), const(0.5)),
    ("delay, stable", model(1e3, poles=[1e3], delay=1e-6), const(0.1)),
    ("delay, unstable", model(1e3, poles=[1e3], delay=2e-5), const(0.1)),
    ("feedback capacitor zero and pole in beta", model(1e5, poles=[10.0, 1e6, 1e7]),
     model(0.1, zeros=[2e5], poles=[2e6])),
    ("low cut and two poles", model(1e3, low_cuts=[100.0], poles=[1e4, 1e6]), const(0.05)),
    ("RHP pole stabilised by the loop", model(-10.0, rhp_poles=[1e3], poles=[1e5]), const(1.0)),
    ("two poles, wide spread", model(1e7, poles=[0.1, 1e7]), const(1e-3)),
    ("three poles, 45 degrees", model(2e4, poles=[100.0, 2e5, 2e7]), const(0.02)),
    ("four poles with an LHP zero pair", model(5e4, poles=[20.0, 5e5, 5e6], complex_poles=[(5e7, 0.8)],
                                               complex_zeros=[(1e8, 1.0)]), const(0.1)),
    # |L| rises through 1 at -28.5 degrees and falls through it at -148.6 degrees.
    ("resonance crossing unity twice, Q 20", model(0.1, complex_poles=[(1e6, 20.0)]), const(1.0)),
    ("resonance crossing unity twice, Q 200", model(0.1, complex_poles=[(1e6, 200.0)]), const(1.0)),
    # An AC-coupled stage: phase lead at the low crossing, lag at the high one.
    ("AC-coupled, two poles", model(100.0, low_cuts=[10.0], poles=[1e5, 1e5]), const(1.0)),
    # |L| peaks 0.017 dB above 1 within a few hundred Hz of 1 MHz.
    ("narrow resonance just above unity", model(0.00501, complex_poles=[(1e6, 200.0)], poles=[3.7], zeros=[3.7]),
     const(1.0)),
]


def corners(m):
    c = list(m["polesHz"]) + list(m["zerosHz"]) + list(m["rhpZerosHz"]) + list(m["rhpPolesHz"])
    c += [p["freqHz"] for p in m["complexPoles"]] + [p["freqHz"] for p in m["complexZeros"]]
    c += list(m["lowCutsHz"])
    if m["delayS"] > 0:
        c.append(1 / (TAU * m["delayS"]))
    return c


def scaled_tf(m, ws, with_pade):
    """The model as a control.TransferFunction in s' = s/ws (rad/s over ws)."""
    s = control.tf("s")
    h = control.tf([m["gain"]], [1])
    for f in m["polesHz"]:
        h = h / (1 + s * ws / (TAU * f))
    for f in m["zerosHz"]:
        h = h * (1 + s * ws / (TAU * f))
    for f in m["rhpZerosHz"]:
        h = h * (1 - s * ws / (TAU * f))
    for f in m["rhpPolesHz"]:
        h = h / (1 - s * ws / (TAU * f))
    for p in m["complexPoles"]:
        w = TAU * p["freqHz"] / ws
        h = h / (1 + s / (p["q"] * w) + s * s / (w * w))
    for p in m["complexZeros"]:
        w = TAU * p["freqHz"] / ws
        h = h * (1 + s / (p["q"] * w) + s * s / (w * w))
    for _ in range(m["originPoles"]):
        h = h * (TAU / ws) / s
    for f in m["lowCutsHz"]:
        w = TAU * f / ws
        h = h * s / (s + w)
    if with_pade and m["delayS"] > 0:
        num, den = control.pade(m["delayS"] * ws, PADE_ORDER)
        h = h * control.tf(num, den)
    return h


def exact(m, f):
    """Exact complex response at f Hz (numpy array), the delay included."""
    s = 1j * TAU * np.asarray(f, dtype=float)
    h = m["gain"] * np.ones_like(s)
    for p in m["polesHz"]:
        h = h / (1 + s / (TAU * p))
    for z in m["zerosHz"]:
        h = h * (1 + s / (TAU * z))
    for z in m["rhpZerosHz"]:
        h = h * (1 - s / (TAU * z))
    for p in m["rhpPolesHz"]:
        h = h / (1 - s / (TAU * p))
    for p in m["complexPoles"]:
        w = TAU * p["freqHz"]
        h = h / (1 + s / (p["q"] * w) + s * s / (w * w))
    for p in m["complexZeros"]:
        w = TAU * p["freqHz"]
        h = h * (1 + s / (p["q"] * w) + s * s / (w * w))
    for _ in range(m["originPoles"]):
        h = h * TAU / s
    for f in m["lowCutsHz"]:
        h = h * s / (s + TAU * f)
    return h * np.exp(-s * m["delayS"])


def grid_for(a, b):
    c = corners(a) + corners(b) or [1.0]
    lo, hi = min(c) / 1e4, max(c) * 1e4
    if a["originPoles"]:
        hi = max(hi, abs(a["gain"] * b["gain"]) * 1e3)
    return np.logspace(math.log10(lo), math.log10(hi), 40001)


def margins_exact(a, b):
    """Margins from the exact loop response, for loops with a delay."""
    f = grid_for(a, b)
    loop = lambda x: exact(a, x) * exact(b, x)
    mag = np.log(np.abs(loop(f)))
    # Continuous phase: numpy unwrap on the dense grid is safe here.
    ph = np.unwrap(np.angle(loop(f)))
    pms, gms = [], []
    for i in range(len(f) - 1):
        if mag[i] == 0 or (mag[i] > 0) != (mag[i + 1] > 0):
            x = optimize.brentq(lambda lx: math.log(abs(loop(math.exp(lx)))), math.log(f[i]), math.log(f[i + 1]),
                                xtol=1e-15, rtol=1e-15)
            pms.append(math.exp(x))
        for k in range(math.floor((min(ph[i], ph[i + 1]) + math.pi) / TAU) + 1,
                       math.floor((max(ph[i], ph[i + 1]) + math.pi) / TAU) + 1):
            level = -math.pi + TAU * k
            # Local continuous phase around the bracket.
            base = ph[i]

            def g(lx):
                p = np.angle(loop(math.exp(lx)) / loop(f[i])) + base
                return p - level

            x = optimize.brentq(g, math.log(f[i]), math.log(f[i + 1]), xtol=1e-15, rtol=1e-15)
            gms.append(math.exp(x))
    return pms, gms


def crossing_frequencies(a, b, ws):
    """Unity-gain and -180 degree crossing frequencies (Hz), ascending."""
    if a["delayS"] > 0 or b["delayS"] > 0:
        pms, gms = margins_exact(a, b)
    else:
        loop = scaled_tf(a, ws, False) * scaled_tf(b, ws, False)
        gm, _pm, _sm, wpc, wgc, _ws = control.stability_margins(loop, returnall=True)
        pms = [float(w) * ws / TAU for w in wgc if w > 0]
        gms = [float(w) * ws / TAU for g, w in zip(gm, wpc) if g > 0 and w > 0]
    return sorted(pms), sorted(gms)


def margins(a, b, ws, stable):
    """The margins by the definition in docs/freq.md, from the loop evaluated at
    each crossing; the worst signed by the closed-loop poles."""
    fcs, fps = crossing_frequencies(a, b, ws)
    loop = lambda f: complex(exact(a, f) * exact(b, f))
    pms = [(180 - abs(math.degrees(np.angle(loop(f)))), f) for f in fcs]
    gms = [(abs(20 * math.log10(abs(loop(f)))), f) for f in fps]
    sign = 1 if stable else -1
    out = {}
    if a["delayS"] == 0 and b["delayS"] == 0:
        # Every crossing with its margin (a delay's phase crossings go on for ever).
        out.update(gain_crossings=[[f, m] for m, f in pms], phase_crossings=[[f, m] for m, f in gms])
    if pms:
        pm, fc = min(pms)
        out.update(phase_margin_deg=sign * pm, crossover_hz=fc)
    else:
        out.update(phase_margin_deg=None, crossover_hz=None)
    if gms:
        gmv, fp = min(gms)
        out.update(gain_margin_db=sign * gmv, phase_crossover_hz=fp)
    else:
        out.update(gain_margin_db=None, phase_crossover_hz=None)
    return out


def closed_loop(a, b, ws):
    ta = scaled_tf(a, ws, True)
    tb = scaled_tf(b, ws, True)
    return control.feedback(ta, tb)


def poles(a, b, ws):
    ta = scaled_tf(a, ws, True)
    tb = scaled_tf(b, ws, True)
    na, da = ta.num[0][0], ta.den[0][0]
    nb, db = tb.num[0][0], tb.den[0][0]
    char = np.polyadd(np.polymul(da, db), np.polymul(na, nb))
    r = np.roots(char) * ws
    r = sorted(r, key=lambda z: (abs(z), z.imag))
    return [[float(z.real), float(z.imag)] for z in r]


def midband(a, b):
    if a["originPoles"]:
        return 1 / abs(b["gain"])
    return abs(a["gain"] / (1 + a["gain"] * b["gain"]))


def bandwidth(a, b):
    ref = midband(a, b)
    af = lambda f: exact(a, f) / (1 + exact(a, f) * exact(b, f))
    g = lambda lx: math.log(abs(af(math.exp(lx))) / ref) + 0.5 * math.log(2)
    f = grid_for(a, b)
    vals = np.log(np.abs(af(f)) / ref) + 0.5 * math.log(2)
    cuts = a["lowCutsHz"] + b["lowCutsHz"]
    if cuts:
        others = [c for c in corners(a) + corners(b) if c > max(cuts)]
        fm = math.sqrt(max(cuts) * (min(others) if others else max(cuts) * 1e6))
    else:
        fm = f[0]
    high = low = None
    up = [i for i in range(len(f)) if f[i] > fm]
    prev = (math.log(fm), g(math.log(fm)))
    for i in up:
        if prev[1] >= 0 and vals[i] < 0:
            high = math.exp(optimize.brentq(g, prev[0], math.log(f[i]), xtol=1e-15, rtol=1e-15))
            break
        prev = (math.log(f[i]), vals[i])
    if cuts:
        prev = (math.log(fm), g(math.log(fm)))
        for i in reversed([i for i in range(len(f)) if f[i] < fm]):
            if prev[1] >= 0 and vals[i] < 0:
                low = math.exp(optimize.brentq(g, math.log(f[i]), prev[0], xtol=1e-15, rtol=1e-15))
                break
            prev = (math.log(f[i]), vals[i])
    # Peaking.
    h = np.log(np.abs(af(f)) / ref)
    k = int(np.argmax(h))
    if h[k] > 1e-12:
        lo, hi = math.log(f[max(k - 1, 0)]), math.log(f[min(k + 1, len(f) - 1)])
        # In u = ln f - centre, so the method's relative stop (sqrt(eps)·|u|) does
        # not limit a sharp peak (Q = 200) to about 2e-7 in ln f.
        centre = math.log(f[k])
        res = optimize.minimize_scalar(lambda u: -math.log(abs(af(math.exp(centre + u))) / ref),
                                       bounds=(lo - centre, hi - centre), method="bounded",
                                       options={"xatol": 1e-13})
        peak_db, peak_hz = -res.fun * 20 / math.log(10), math.exp(centre + res.x)
    else:
        peak_db, peak_hz = 0.0, None
    return {"midband_gain": ref, "high_hz": high, "low_hz": low, "peaking_db": peak_db, "peak_hz": peak_hz}


def step(a, b, ws, pole_list):
    if a["lowCutsHz"] or b["lowCutsHz"]:
        return None
    if any(p[0] >= -1e-9 * math.hypot(*p) for p in pole_list):
        return None
    sigma = min(-p[0] for p in pole_list) / ws
    sys_cl = closed_loop(a, b, ws)
    yf = float(control.dcgain(sys_cl))
    t_end = 30.0 / sigma
    # A fast, lightly damped mode (a narrow resonance) rings for many periods
    # while it lives: sample it at 50 points per period until exp(-40) of its
    # start, then go on at 100 001 samples to t_end, from the state reached.
    ringing = [(-p[0] / ws, abs(p[1]) / ws) for p in pole_list if abs(p[1]) > 0]
    sys_ss = control.ss(sys_cl)
    t1 = min([t_end] + [40.0 / s_ for s_, _ in ringing])
    n1 = max([100001] + [int(t1 * w / TAU * 50) + 1 for _, w in ringing])
    t = np.linspace(0.0, t1, n1)
    resp = control.forced_response(sys_ss, T=t, U=np.ones_like(t), return_x=True)
    y = np.asarray(resp.outputs, dtype=float).ravel()
    if t1 < t_end:
        t2 = np.linspace(t1, t_end, 100001)
        rest = control.forced_response(sys_ss, T=t2 - t1, U=np.ones_like(t2), X0=resp.states[:, -1])
        t = np.concatenate([t, t2[1:]])
        y = np.concatenate([y, np.asarray(rest.outputs, dtype=float).ravel()[1:]])
    y = y / yf

    # Exact output at any time from the state space: z' = M z with the step input
    # as a constant state, y = C x + D (scipy.linalg.expm).
    ss = control.ss(sys_cl)
    n = ss.A.shape[0]
    m = np.zeros((n + 1, n + 1))
    m[:n, :n] = ss.A
    m[:n, n] = np.asarray(ss.B).ravel()
    c_row = np.asarray(ss.C).ravel()
    d = float(np.asarray(ss.D).ravel()[0])

    def y_at(tt):
        return (float(c_row @ linalg.expm(m * tt)[:n, n]) + d) / yf

    def first(level):
        idx = np.nonzero(y >= level)[0]
        i = int(idx[0])
        if i == 0:
            return 0.0
        return optimize.brentq(lambda tt: y_at(tt) - level, t[i - 1], t[i], xtol=1e-15 * t_end, rtol=1e-15)

    rise = first(0.9) - first(0.1)
    k = int(np.argmax(y))
    if y[k] > 1 and 0 < k < len(y) - 1:
        res = optimize.minimize_scalar(lambda tt: -y_at(tt), bounds=(t[k - 1], t[k + 1]), method="bounded",
                                       options={"xatol": 1e-13 * t_end})
        overshoot = (max(-res.fun, y[k]) - 1) * 100
        peak_t = res.x / ws
    else:
        overshoot, peak_t = 0.0, None
    out = np.nonzero(np.abs(y - 1) > SETTLE_BAND)[0]
    if len(out):
        i = int(out[-1])
        settle = optimize.brentq(lambda tt: abs(y_at(tt) - 1) - SETTLE_BAND, t[i], t[i + 1], xtol=1e-15 * t_end,
                                 rtol=1e-15)
    else:
        settle = 0.0
    return {"final_value": yf, "overshoot_percent": overshoot, "peak_time_s": peak_t, "rise_time_s": rise / ws,
            "settling_time_s": settle / ws, "settle_band": SETTLE_BAND}


def signed_pm(a, b):
    """Worst phase margin by the definition above; +inf without a crossing."""
    c = corners(a) + corners(b)
    ws = math.exp(sum(math.log(TAU * x) for x in c) / len(c)) if c else TAU
    stable = all(p[0] < -1e-9 * math.hypot(*p) for p in poles(a, b, ws))
    pm = margins(a, b, ws, stable)["phase_margin_deg"]
    return math.inf if pm is None else pm


def interval_search(pm_of, lo, hi, target):
    """Brute force: the margin on a 100-per-decade grid of x in [lo, hi]; the
    largest x meeting the target and the lower end of its interval, each refined
    by brentq on margin - target."""
    xs = np.logspace(math.log10(lo), math.log10(hi), int(round(100 * math.log10(hi / lo))) + 1)
    ok = [pm_of(x) >= target for x in xs]
    top = max(i for i, v in enumerate(ok) if v)
    g = lambda lx: pm_of(math.exp(lx)) - target
    rtol = 1e-13
    value = xs[top] if top == len(xs) - 1 else math.exp(
        optimize.brentq(g, math.log(xs[top]), math.log(xs[top + 1]), xtol=1e-14, rtol=rtol))
    below = [i for i in range(top) if not ok[i]]
    start = xs[0] if not below else math.exp(
        optimize.brentq(g, math.log(xs[below[-1]]), math.log(xs[below[-1] + 1]), xtol=1e-14, rtol=rtol))
    return {"value": value, "holds_from": start}


# The margin dips and recovers with beta: a zero between the poles. The margin
# is >= 60 degrees for small beta, misses it around 0.01, and meets it again in
# [0.2063, 0.5577].
MAX_BETA_AMP = model(1e5, poles=[10.0, 1e3, 3e5, 3e5], zeros=[1e4])
# The same amplifier without its 10 Hz pole, beta = 0.4: the margin against the
# dominant pole added is high far down, dips near 0.1 Hz and meets 60 degrees
# again between about 5 and 14 Hz.
DOMINANT_AMP = model(1e5, poles=[1e3, 3e5, 3e5], zeros=[1e4])
DOMINANT_BETA = 0.4
TARGET_PM = 60.0


def max_beta():
    r = interval_search(lambda beta: signed_pm(MAX_BETA_AMP, const(beta)), 1e-4, 1.0, TARGET_PM)
    return {"a": MAX_BETA_AMP, "target_pm_deg": TARGET_PM, "beta_limit": 1.0, **r}


def dominant_pole():
    def pm_of(fd):
        a = dict(DOMINANT_AMP, polesHz=[fd] + DOMINANT_AMP["polesHz"])
        return signed_pm(a, const(DOMINANT_BETA))

    r = interval_search(pm_of, 1e-3, 1e3, TARGET_PM)
    return {"a": DOMINANT_AMP, "beta": DOMINANT_BETA, "target_pm_deg": TARGET_PM, **r}


# Three equal poles at 1 kHz; the loop oscillates at a DC loop gain of 8 (common
# practice, no source), so 7.9 rings for hundreds of periods.
SETTLE_T0 = 7.9
SETTLE_POLE_HZ = 1e3


def settling():
    """Exact step response of T0/((1 + s/w)^3 + T0) by residues at 30 digits."""
    mp.mp.dps = 30
    t0, w = mp.mpf(SETTLE_T0), 2 * mp.pi * SETTLE_POLE_HZ
    band = mp.mpf(SETTLE_BAND)
    # Characteristic polynomial in x = s/w: (1 + x)^3 + T0.
    roots = mp.polyroots([1, 3, 3, 1 + t0], maxsteps=200, extraprec=60)
    yf = t0 / (1 + t0)
    # y(t)/yf - 1 = sum over the roots of c_k exp(r_k w t), c_k = T0/(yf r_k D'(r_k)).
    c = [t0 / (yf * r * 3 * (1 + r) ** 2) for r in roots]
    dev = lambda t: mp.re(sum(ck * mp.exp(r * w * t) for ck, r in zip(c, roots)))
    slope = lambda t: mp.re(sum(ck * r * w * mp.exp(r * w * t) for ck, r in zip(c, roots)))
    # Past t_end the envelope sum |c_k| exp(Re r_k w t) is below band/2.
    t_end = max(mp.log(2 * len(c) * abs(ck) / band) / (-mp.re(r) * w) for ck, r in zip(c, roots))
    period = 2 * mp.pi / (max(abs(mp.im(r)) for r in roots) * w)
    n = int(mp.ceil(t_end / period * 200))
    ts = [t_end * i / n for i in range(n + 1)]
    ds = [slope(t) for t in ts]
    extrema = []
    for i in range(1, n + 1):
        if (ds[i - 1] > 0) != (ds[i] > 0):
            tp = mp.findroot(slope, (ts[i - 1], ts[i]), solver="anderson")
            extrema.append((tp, dev(tp)))
    overshoot = max(d for _, d in extrema) * 100
    k = max(i for i, (_, d) in enumerate(extrema) if abs(d) > band)
    tp = extrema[k][0]
    # |dev| falls from above the band to 0 between this extremum and the next
    # zero of dev; the exit is the root of |dev| - band there.
    t_zero = mp.findroot(dev, (tp, extrema[k + 1][0]), solver="anderson")
    exit_t = mp.findroot(lambda t: abs(dev(t)) - band, (tp, t_zero), solver="anderson")
    return {"a": model(SETTLE_T0, poles=[SETTLE_POLE_HZ] * 3), "beta": const(1.0), "settle_band": SETTLE_BAND,
            "settling_time_s": float(exit_t), "overshoot_percent": float(overshoot),
            "final_value": float(yf)}


def evaluate():
    out = {"pade_order": PADE_ORDER, "cases": []}
    for name, a, b in CASES:
        c = corners(a) + corners(b)
        ws = math.exp(sum(math.log(TAU * x) for x in c) / len(c)) if c else TAU
        pl = poles(a, b, ws)
        row = {"name": name, "a": a, "beta": b}
        row["stable"] = all(p[0] < -1e-9 * math.hypot(*p) for p in pl)
        row["margins"] = margins(a, b, ws, row["stable"])
        row["poles"] = pl
        row["bandwidth"] = bandwidth(a, b)
        row["step"] = step(a, b, ws, pl)
        out["cases"].append(row)
    out["max_beta"] = max_beta()
    out["dominant_pole"] = dominant_pole()
    out["settling"] = settling()
    return out


# How closely a re-run must reproduce the committed step figures. Both are read off
# a sampled response refined on the exact one, and both are ill-conditioned near no
# overshoot: the peak of a flat maximum is placed only to about the square root of
# the response's rounding, and an overshoot of 1e-10 % is rounding itself. Re-runs
# under other numpy/scipy/python-control releases moved peak times by up to 1.1e-5
# relative and overshoots by up to 2e-8 percentage points (the Padé delay case).
# tests/freq_reference.rs checks overshoot to 1e-6 points and does not use the peak
# time, so these bounds keep the data ten times tighter than what it is used for.
OVERSHOOT_ABS = 1e-7
PEAK_TIME_REL = 1e-4
# Below this overshoot (percentage points) there is no peak to place: a peak time
# given on one side and none on the other is the same answer.
NO_PEAK_BELOW = 1e-7


def compare_step(new, old, path, bad):
    for k in new:
        a, b = new[k], old.get(k) if isinstance(old, dict) else None
        if k == "overshoot_percent":
            if not isinstance(b, (int, float)) or abs(a - b) > OVERSHOOT_ABS:
                bad.append(f"{path}.{k}: {a} != committed {b}")
        elif k == "peak_time_s":
            if a is None or b is None:
                if max(new["overshoot_percent"], old.get("overshoot_percent") or 0.0) > NO_PEAK_BELOW \
                        and a != b:
                    bad.append(f"{path}.{k}: {a} != committed {b}")
            elif abs(a - b) > PEAK_TIME_REL * max(abs(a), abs(b)):
                bad.append(f"{path}.{k}: {a} != committed {b}")
        else:
            compare(a, b, f"{path}.{k}", bad)


def compare(new, old, path, bad):
    if isinstance(new, dict):
        for k in new:
            if k == "step" and isinstance(new[k], dict) and isinstance(old, dict) and isinstance(old.get(k), dict):
                compare_step(new[k], old[k], f"{path}.{k}", bad)
                continue
            compare(new[k], old.get(k) if isinstance(old, dict) else None, f"{path}.{k}", bad)
    elif isinstance(new, list):
        if not isinstance(old, list) or len(new) != len(old):
            bad.append(f"{path}: length differs")
            return
        for i, (x, y) in enumerate(zip(new, old)):
            compare(x, y, f"{path}[{i}]", bad)
    elif isinstance(new, float):
        if not isinstance(old, (int, float)) or abs(new - old) > 1e-9 * max(abs(new), abs(old), 1e-300):
            bad.append(f"{path}: {new} != committed {old}")
    elif new != old:
        bad.append(f"{path}: {new} != committed {old}")


def main():
    result = evaluate()
    if "--check" in sys.argv:
        committed = json.loads(OUT.read_text())
        bad = []
        if len(result["cases"]) != len(committed["cases"]):
            bad.append("case count differs")
        for new, old in zip(result["cases"], committed["cases"]):
            compare(new, old, new["name"], bad)
        for key in ("max_beta", "dominant_pole", "settling"):
            compare(result[key], committed.get(key), key, bad)
        for line in bad:
            print("freq_loops:", line)
        print(f"freq_loops: {len(result['cases'])} cases, {len(bad)} mismatches")
        sys.exit(1 if bad else 0)
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps(result, indent=1) + "\n")
    print(f"wrote {OUT} ({len(result['cases'])} cases)")


if __name__ == "__main__":
    main()
