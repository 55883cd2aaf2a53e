#!/usr/bin/env python3
"""Oracle for the open-loop gain distributions of the Monte Carlo (src/network/montecarlo.rs).

The stage of issue 15, item 6: a non-inverting gain of 100 (beta = 1/100) with the
open-loop gain A spread between a_min = 1e4, a_typ = 2e4 and a_max = 1e6, resistors
exact. For each distribution of A the closed-loop gain Af = A/(1 + A*beta) has:
- its mean and standard deviation, by scipy.integrate.quad of Af (and (Af - mean)^2)
  against the density of x = ln A, split at ln a_typ;
- its 5 %, 50 % and 95 % quantiles, exact: Af is increasing in A, so the
  p-quantile of Af is Af(A_p), with A_p = exp(ppf(p)) of the distribution of ln A.

Distributions of x = ln A (l = ln a_min, m = ln a_typ, h = ln a_max), with
scipy.stats:
- log-triangular: triang(c = (m - l)/(h - l), loc = l, scale = h - l);
- log-uniform: uniform(loc = l, scale = h - l);
- log-normal: a split normal, half its mass on each side of m: below,
  truncnorm(-k, 0, loc = m, scale = (m - l)/k); above, truncnorm(0, k, loc = m,
  scale = (h - m)/k); k = 3;
- uniform (A itself uniform on [a_min, a_max], the 0.1 behaviour): quad over A.

Writes tests/reference/data/network_montecarlo_gain.json; `--check` recomputes and
compares (rel. tol. 1e-12).
"""
import math
import pathlib

from scipy import stats
from scipy.integrate import quad
from refdata import write_or_check

OUT = pathlib.Path(__file__).parent / "data" / "network_montecarlo_gain.json"
REL_TOL = 1e-12
A_MIN, A_TYP, A_MAX = 1e4, 2e4, 1e6
BETA = 1e3 / (1e3 + 99e3)
K = 3.0


def af(a):
    return a / (1 + a * BETA)


class SplitNormal:
    """Half the mass on each side of m, each half a normal truncated at k sigma."""

    def __init__(self, lo, m, hi):
        self.m = m
        self.below = stats.truncnorm(-K, 0, loc=m, scale=(m - lo) / K)
        self.above = stats.truncnorm(0, K, loc=m, scale=(hi - m) / K)

    def pdf(self, x):
        return 0.5 * (self.below.pdf(x) if x < self.m else self.above.pdf(x))

    def ppf(self, p):
        return self.below.ppf(2 * p) if p < 0.5 else self.above.ppf(2 * p - 1)


def log_distributions():
    lo, m, hi = math.log(A_MIN), math.log(A_TYP), math.log(A_MAX)
    return {
        "log-normal": SplitNormal(lo, m, hi),
        "log-triangular": stats.triang((m - lo) / (hi - lo), loc=lo, scale=hi - lo),
        "log-uniform": stats.uniform(loc=lo, scale=hi - lo),
    }, (lo, m, hi)


def moments_on_log(dist, pieces):
    def integral(g):
        return sum(quad(lambda x: g(x) * dist.pdf(x), a, b, epsabs=0, epsrel=1e-13, limit=200)[0]
                   for a, b in pieces)
    mean = integral(lambda x: af(math.exp(x)))
    var = integral(lambda x: (af(math.exp(x)) - mean) ** 2)
    return mean, math.sqrt(var)


def make():
    out = {"a_min": A_MIN, "a_typ": A_TYP, "a_max": A_MAX, "beta": BETA, "k": K,
           "nominal": af(A_TYP), "cases": []}
    dists, (lo, m, hi) = log_distributions()
    for name, dist in dists.items():
        mean, sd = moments_on_log(dist, [(lo, m), (m, hi)])
        out["cases"].append({
            "distribution": name, "mean": mean, "sd": sd,
            "quantiles": [[p, af(math.exp(float(dist.ppf(p))))] for p in (0.05, 0.5, 0.95)],
        })
    # A uniform on [a_min, a_max].
    width = A_MAX - A_MIN
    mean = quad(lambda a: af(a) / width, A_MIN, A_MAX, epsabs=0, epsrel=1e-13, limit=200)[0]
    var = quad(lambda a: (af(a) - mean) ** 2 / width, A_MIN, A_MAX, epsabs=0, epsrel=1e-13, limit=200)[0]
    out["cases"].append({
        "distribution": "uniform", "mean": mean, "sd": math.sqrt(var),
        "quantiles": [[p, af(A_MIN + p * width)] for p in (0.05, 0.5, 0.95)],
    })
    return out


def main():
    data = make()
    write_or_check(data, OUT, REL_TOL, summary=f"{len(data['cases'])} distributions match")


if __name__ == "__main__":
    main()
