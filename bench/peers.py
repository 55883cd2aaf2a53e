#!/usr/bin/env python3
"""Python peers for `make bench`: the same work as the loopwright cases, done the way
a user of numpy/scipy/python-control would do it. Prints {case_key: median_ns} as JSON.

Cases are added beside the matching entries of bench/cases.mjs (same keys)."""
import json
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


CASES = {"monte_carlo_1e6": monte_carlo_1e6}


def main():
    print(json.dumps({key: median_ns(fn) for key, fn in CASES.items()}))


if __name__ == "__main__":
    main()
