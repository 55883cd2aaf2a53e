#!/usr/bin/env python3
"""python-control peers for the frequency-response benchmark (bench/freq.mjs): the
same loop (A0 = 1e5, poles 10 Hz, 100 kHz, 1, 3, 10, 30 MHz, zeros 2 and 50 MHz,
beta = 0.1) and the same work, done as a python-control user would do it.
Prints {case_key: median_ns} as JSON. Figures only; nothing asserts a time."""
import json
import math
import statistics
import sys
import time

import control
import numpy as np

QUICK = "--quick" in sys.argv
TAU = 2 * math.pi


def median_ns(fn, repeat=None):
    repeat = repeat or (3 if QUICK else 15)
    fn()
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter_ns()
        fn()
        times.append(time.perf_counter_ns() - t0)
    return statistics.median(times)


def loop():
    s = control.tf("s")
    a = control.tf([1e5], [1])
    for f in [10.0, 1e5, 1e6, 3e6, 1e7, 3e7]:
        a = a / (1 + s / (TAU * f))
    for f in [2e6, 5e7]:
        a = a * (1 + s / (TAU * f))
    return a, 0.1


A, BETA = loop()
L = A * BETA
W = TAU * np.logspace(0, 9, 10_000)


def sweep():
    r = control.frequency_response(L, W)
    20 * np.log10(r.magnitude), np.unwrap(r.phase) * 180 / math.pi


def margins_and_poles():
    control.stability_margins(L)
    control.feedback(A, BETA).poles()


CASES = {"freq_sweep_10k": sweep, "freq_margins_poles": margins_and_poles}

if __name__ == "__main__":
    print(json.dumps({key: median_ns(fn) for key, fn in CASES.items()}))
