"""numpy doing the Monte Carlo of bench/network.mjs, vectorised, for comparison.

Same stage (inverting, 10 k / 47 k at 1 % uniform, A uniform 50 k ... 200 k), same
statistics (mean, sd, the seven percentiles, yield, 50-bin histogram); numpy's own
generator, so the figures agree statistically, not bit for bit.
"""
import time

import numpy as np


def run(n, seed=42):
    rng = np.random.default_rng(seed)
    r1 = 10e3 * (1 + 0.01 * rng.uniform(-1, 1, n))
    r2 = 47e3 * (1 + 0.01 * rng.uniform(-1, 1, n))
    a = rng.uniform(5e4, 2e5, n)
    af = -a * r2 / (r1 + r2 + a * r1)
    mean, sd = af.mean(), af.std(ddof=1)
    pct = np.percentile(af, [0.1, 1, 5, 50, 95, 99, 99.9])
    yld = np.mean((af >= -4.72) & (af <= -4.68))
    hist = np.histogram(af, bins=50)
    return mean, sd, pct, yld, hist


run(1000)
times = []
for _ in range(7):
    t0 = time.perf_counter()
    mean, sd, pct, yld, _ = run(1_000_000)
    times.append((time.perf_counter() - t0) * 1e3)
print(f"numpy Monte Carlo 1e6 trials: {sorted(times)[3]:.1f} ms  (mean {mean:.6f}, sd {sd:.4e}, yield {yld:.4f})")
