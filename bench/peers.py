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


CASES = {}


def main():
    print(json.dumps({key: median_ns(fn) for key, fn in CASES.items()}))


if __name__ == "__main__":
    main()
