//! Standard-value resistors for a gain, a ratio or a single resistance.
//!
//! Every two-resistor network here is set by the ratio q = R2/R1:
//! - non-inverting gain G = 1 + R2/R1, so q = G − 1;
//! - inverting gain G = −R2/R1, so q = |G|;
//! - divider ratio k = R1/(R1 + R2) (output across R1), so q = (1 − k)/k.
//!
//! The error of a candidate is that of the network's own quantity,
//! achieved/target − 1 (for the non-inverting gain this is smaller than the ratio
//! error by q/(1 + q)).
//!
//! Search (sorted, not every combination): for each standard R1 below the total
//! maximum, the best R2 is one of the two standard values around q·R1 (the error
//! is monotonic in R2), clamped into the R2 interval the total-resistance range
//! leaves. Those are found by rank arithmetic on the decade table in O(1), so the
//! whole search is O(number of R1 values). The good candidates have R1 in the
//! window [total_min/(1 + q·s), total_max/(1 + q/s)], s the series' largest step:
//! outside it every allowed R2 gives a ratio beyond q·s or q/s. The window is
//! scanned first; the rest (at most 30 decades) only when the window's `count`-th
//! candidate is not already better than that bound, so the ranking is exact.
//! When two-resistor legs are asked for, they are searched for every R1 of the
//! window and every R1 whose exact R2 = q·R1 fits the total range, whatever the
//! single pairs achieved, and ranked with them. A leg made of two resistors
//! (series or parallel) is searched the same way: one part runs over its
//! half-range ([T/2, T] for series, (T, 2T] for parallel) and the other is rounded
//! down and up to complete T.
//!
//! Ranking: by |error| (then fewer parts, smaller total, smaller R1); with a
//! maximum error, the candidates within it come first, fewest parts first, so a
//! single pair that is good enough is not buried under three-resistor ones.
//!
//! The common practice this automates (choosing the nearest standard pair and
//! trimming with a second resistor) is described in, e.g., Horowitz & Hill,
//! *The Art of Electronics*, 3rd ed., appendix C (from memory).

use super::eseries::{in_range, Series, MAX_VALUE, MIN_VALUE};
use crate::check;
use crate::error::{Error, Result};
use alloc::vec::Vec;
use core::cmp::Ordering;
use core::str::FromStr;

/// Most candidates one search returns.
pub const MAX_CANDIDATES: usize = 100;

/// The two-resistor network whose ratio is sought.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum Network {
    /// Non-inverting amplifier, gain 1 + R2/R1 (R1 to ground, R2 feedback).
    NonInverting,
    /// Inverting amplifier, gain −R2/R1 (R1 input, R2 feedback).
    Inverting,
    /// Voltage divider, ratio R1/(R1 + R2) (output across R1).
    Divider,
}

/// The accepted network names.
pub const NETWORK_NAMES: &str = "non-inverting, inverting, divider";

impl FromStr for Network {
    type Err = Error;

    /// # Errors
    /// [`Error::UnknownName`] with `param = "network"`.
    fn from_str(s: &str) -> Result<Self> {
        let t = s.trim();
        [
            ("non-inverting", Network::NonInverting),
            ("noninverting", Network::NonInverting),
            ("inverting", Network::Inverting),
            ("divider", Network::Divider),
        ]
        .iter()
        .find(|(n, _)| n.eq_ignore_ascii_case(t))
        .map(|&(_, n)| n)
        .ok_or(Error::UnknownName {
            param: "network",
            expected: NETWORK_NAMES,
        })
    }
}

impl Network {
    /// R2/R1 for the target; validates the target for this network.
    pub(crate) fn ratio_for(self, target: f64) -> Result<f64> {
        let t = check::finite("target", target)?;
        match self {
            Network::NonInverting if t >= 1.0 => Ok(t - 1.0),
            Network::NonInverting => Err(Error::OutOfDomain {
                param: "target",
                requirement: "must be 1 or more: 1 + R2/R1 cannot be less",
            }),
            Network::Inverting if t != 0.0 => Ok(libm::fabs(t)),
            Network::Inverting => Err(Error::OutOfDomain {
                param: "target",
                requirement: "must not be zero",
            }),
            Network::Divider if t > 0.0 && t < 1.0 => Ok((1.0 - t) / t),
            Network::Divider => Err(Error::OutOfDomain {
                param: "target",
                requirement:
                    "must be greater than 0 and less than 1: R1/(R1 + R2) lies strictly between",
            }),
        }
    }

    /// The network's quantity for a pair (sign of `target` for the inverting gain).
    pub fn value(self, r1: f64, r2: f64, target: f64) -> f64 {
        match self {
            Network::NonInverting => 1.0 + r2 / r1,
            Network::Inverting => {
                let g = r2 / r1;
                if target < 0.0 {
                    -g
                } else {
                    g
                }
            }
            Network::Divider => r1 / (r1 + r2),
        }
    }
}

/// Whether a leg may be made of two resistors.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum Combine {
    /// Single resistors only.
    None,
    /// Two resistors in series allowed.
    Series,
    /// Two resistors in parallel allowed.
    Parallel,
    /// Either allowed.
    Either,
}

/// The accepted combination names.
pub const COMBINE_NAMES: &str = "none, series, parallel, either";

impl FromStr for Combine {
    type Err = Error;

    /// # Errors
    /// [`Error::UnknownName`] with `param = "combine"`.
    fn from_str(s: &str) -> Result<Self> {
        let t = s.trim();
        [
            ("none", Combine::None),
            ("series", Combine::Series),
            ("parallel", Combine::Parallel),
            ("either", Combine::Either),
        ]
        .iter()
        .find(|(n, _)| n.eq_ignore_ascii_case(t))
        .map(|&(_, c)| c)
        .ok_or(Error::UnknownName {
            param: "combine",
            expected: COMBINE_NAMES,
        })
    }
}

/// How a leg is built.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum Joint {
    /// One resistor.
    Single,
    /// Two resistors in series: first + second.
    Series,
    /// Two resistors in parallel: first·second/(first + second).
    Parallel,
}

/// One leg of a network: one resistor or two combined.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Leg {
    /// Effective resistance, Ω.
    pub value: f64,
    /// The (first) resistor, Ω.
    pub first: f64,
    /// The second resistor when combined, Ω.
    pub second: Option<f64>,
    /// How they are joined.
    pub joint: Joint,
}

impl Leg {
    pub(crate) fn single(r: f64) -> Leg {
        Leg {
            value: r,
            first: r,
            second: None,
            joint: Joint::Single,
        }
    }
}

/// A ranked candidate pair.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct PairCandidate {
    /// R1, Ω (see [`Network`] for which resistor it is).
    pub r1: f64,
    /// R2, Ω, possibly two resistors.
    pub r2: Leg,
    /// The gain or ratio the pair gives.
    pub achieved: f64,
    /// achieved/target − 1, a fraction.
    pub error: f64,
    /// R1 + R2, Ω.
    pub total: f64,
}

/// What to search for.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PairSpec {
    /// The network.
    pub network: Network,
    /// Gain (V/V) or divider ratio.
    pub target: f64,
    /// Series the resistors come from.
    pub series: Series,
    /// Least R1 + R2, Ω.
    pub total_min: f64,
    /// Largest R1 + R2, Ω.
    pub total_max: f64,
    /// R1 when it is already chosen (need not be a standard value), Ω.
    pub fixed_r1: Option<f64>,
    /// Required |error| (fraction): the candidates that meet it rank first, fewest
    /// parts first among them, and `meets_max_error` reports on the first.
    pub max_error: Option<f64>,
    /// Which two-resistor R2 legs are searched as well (always, when not
    /// [`Combine::None`]); they are ranked together with the single resistors.
    pub combine: Combine,
    /// How many candidates to return, 1 … [`MAX_CANDIDATES`].
    pub count: usize,
}

impl PairSpec {
    /// A spec with no fixed R1, no required error, single resistors and 10 candidates.
    pub fn new(
        network: Network,
        target: f64,
        series: Series,
        total_min: f64,
        total_max: f64,
    ) -> PairSpec {
        PairSpec {
            network,
            target,
            series,
            total_min,
            total_max,
            fixed_r1: None,
            max_error: None,
            combine: Combine::None,
            count: 10,
        }
    }
}

/// The ranked candidates of a pair search.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct PairResult {
    /// The network searched.
    pub network: Network,
    /// The target gain or ratio.
    pub target: f64,
    /// The exact R2/R1 the target needs.
    pub ideal_ratio: f64,
    /// Candidates ranked as [`best_pairs`] says: per R1 the best single R2 and,
    /// when asked for, the best two-resistor R2 leg. Empty only when no pair at
    /// all fits the total-resistance range.
    pub candidates: Vec<PairCandidate>,
    /// True when the best candidate meets `max_error` (always true without one,
    /// unless there is no candidate). False: the first candidate is the best miss.
    pub meets_max_error: bool,
}

fn by_error(a: &PairCandidate, b: &PairCandidate) -> Ordering {
    libm::fabs(a.error)
        .total_cmp(&libm::fabs(b.error))
        .then(a.total.total_cmp(&b.total))
        .then(a.r1.total_cmp(&b.r1))
}

/// Parts in a candidate: R1 plus one or two for R2.
fn parts(c: &PairCandidate) -> usize {
    if c.r2.joint == Joint::Single {
        2
    } else {
        3
    }
}

/// The ranking of the result: without `max_error`, smallest |error| first (then
/// fewer parts, smaller total, smaller R1); with it, the candidates that meet it
/// first, fewest parts first among them (a two-resistor pair that meets the
/// requirement beats a three-resistor one that beats it further), then by
/// [`by_error`]; the misses after them by [`by_error`].
fn ranked(a: &PairCandidate, b: &PairCandidate, max_error: Option<f64>) -> Ordering {
    match max_error {
        None => libm::fabs(a.error)
            .total_cmp(&libm::fabs(b.error))
            .then(parts(a).cmp(&parts(b)))
            .then(a.total.total_cmp(&b.total))
            .then(a.r1.total_cmp(&b.r1)),
        Some(m) => {
            let meets = |c: &PairCandidate| libm::fabs(c.error) <= m;
            meets(b)
                .cmp(&meets(a))
                .then_with(|| {
                    if meets(a) {
                        parts(a).cmp(&parts(b))
                    } else {
                        Ordering::Equal
                    }
                })
                .then_with(|| ranked(a, b, None))
        }
    }
}

/// The first `count` of `items` in stable order of `cmp`: the same as a stable sort
/// followed by `truncate(count)`, in O(n log count) comparisons. A pair search
/// makes thousands of candidates and keeps ten: sorting them all was a third of a
/// `bestPairs` call at opt-level "s" (node --cpu-prof).
fn first_ranked<T: Copy>(
    items: &[T],
    count: usize,
    mut cmp: impl FnMut(&T, &T) -> Ordering,
) -> Vec<T> {
    let mut top: Vec<T> = Vec::with_capacity(count.min(items.len()) + 1);
    for &c in items {
        // Not before the last kept one: an equal one that came later stays after it.
        if top.len() >= count && top.last().is_some_and(|last| cmp(&c, last).is_ge()) {
            continue;
        }
        let at = top.partition_point(|x| cmp(x, &c).is_le());
        top.insert(at, c);
        top.truncate(count);
    }
    top
}

/// The R1 values whose R2 leg is searched as two resistors: the fixed R1; else
/// the window of the single search and every standard R1 for which the exact
/// ratio fits the total range, R1·(1 + q) in [total_min, total_max] (a two-part
/// leg can land near q·R1 for any of them).
fn combination_r1s(
    series: Series,
    window: &[f64],
    fixed_r1: Option<f64>,
    q: f64,
    total_min: f64,
    total_max: f64,
) -> Vec<f64> {
    if let Some(r1) = fixed_r1 {
        return alloc::vec![r1];
    }
    let clamp = |x: f64| x.clamp(MIN_VALUE, MAX_VALUE);
    let mut first = series.ceil_rank(clamp(total_min / (1.0 + q)));
    let mut last = series.floor_rank(clamp(total_max / (1.0 + q)));
    if let (Some(&lo), Some(&hi)) = (window.first(), window.last()) {
        first = first.min(series.ceil_rank(lo));
        last = last.max(series.floor_rank(hi));
    }
    (first..=last).map(|n| series.value_at(n)).collect()
}

fn validate_count(count: usize) -> Result<usize> {
    if count == 0 {
        Err(Error::OutOfDomain {
            param: "count",
            requirement: "must be at least 1",
        })
    } else if count > MAX_CANDIDATES {
        Err(Error::TooLarge {
            param: "count",
            limit: MAX_CANDIDATES as u64,
        })
    } else {
        Ok(count)
    }
}

fn validate_max_error(max_error: Option<f64>) -> Result<Option<f64>> {
    max_error
        .map(|e| check::positive("max_error", e))
        .transpose()
}

/// The standard values in [a, b] just below and just above t (either may be
/// missing when the interval ends there). a ≤ b, all within the value range.
fn around(series: Series, t: f64, a: f64, b: f64) -> [Option<f64>; 2] {
    let t = t.clamp(a, b);
    // One rank search: the ceiling is the floor when t is a standard value, else
    // the next rank (`Series::ceil_rank`, without searching again).
    let n = series.floor_rank(t);
    let down = series.value_at(n);
    let up = if down == t {
        down
    } else {
        series.value_at(n + 1)
    };
    [(down >= a).then_some(down), (up <= b).then_some(up)]
}

/// The R2 interval that keeps R1 + R2 within the range, within the value range.
fn r2_interval(r1: f64, total_min: f64, total_max: f64) -> Option<(f64, f64)> {
    let a = (total_min - r1).max(MIN_VALUE);
    let b = (total_max - r1).min(MAX_VALUE);
    (a <= b).then_some((a, b))
}

/// Best two-resistor leg with value in [a, b] nearest `t` by the score `err`
/// (smaller is better), over the joints `combine` allows.
fn best_combination(
    series: Series,
    t: f64,
    a: f64,
    b: f64,
    combine: Combine,
    err: impl Fn(f64) -> f64,
) -> Option<(Leg, f64)> {
    let t = t.clamp(a, b);
    let mut best: Option<(Leg, f64)> = None;
    let mut consider = |leg: Leg| {
        if leg.value >= a && leg.value <= b && leg.value.is_finite() {
            let e = err(leg.value);
            if best.as_ref().map_or(true, |&(_, be)| e < be) {
                best = Some((leg, e));
            }
        }
    };
    let in_range = |x: f64| (MIN_VALUE..=MAX_VALUE).contains(&x);
    if matches!(combine, Combine::Series | Combine::Either) && in_range(t / 2.0) {
        // Larger part rb in [t/2, t], smaller part ra ≈ t − rb, ra ≤ rb.
        let (lo, hi) = (series.ceil_rank(t / 2.0), series.floor_rank(t));
        for n in lo..=hi {
            let rb = series.value_at(n);
            let rest = t - rb;
            if !in_range(rest) {
                continue;
            }
            for ra in [
                series.value_at(series.floor_rank(rest)),
                series.value_at(series.ceil_rank(rest)),
            ] {
                if ra <= rb {
                    consider(Leg {
                        value: ra + rb,
                        first: rb,
                        second: Some(ra),
                        joint: Joint::Series,
                    });
                }
            }
        }
    }
    if matches!(combine, Combine::Parallel | Combine::Either) && in_range(2.0 * t) {
        // Smaller part ra in (t, 2t], larger part rb ≈ 1/(1/t − 1/ra), rb ≥ ra.
        let (lo, hi) = (series.floor_rank(t) + 1, series.floor_rank(2.0 * t));
        for n in lo..=hi {
            let ra = series.value_at(n);
            let rest = 1.0 / (1.0 / t - 1.0 / ra);
            if !in_range(rest) {
                continue;
            }
            for rb in [
                series.value_at(series.floor_rank(rest)),
                series.value_at(series.ceil_rank(rest)),
            ] {
                if rb >= ra {
                    consider(Leg {
                        value: ra * rb / (ra + rb),
                        first: ra,
                        second: Some(rb),
                        joint: Joint::Parallel,
                    });
                }
            }
        }
    }
    best
}

/// Ranked standard-value pairs R1, R2 for a gain or divider ratio.
///
/// See the module doc for the networks and the search. Resistances in Ω; the
/// target is a gain in V/V (non-inverting ≥ 1; inverting either sign, the
/// magnitude is matched) or a divider ratio in (0, 1). A target no pair reaches
/// within the constraints is not an error: the result's first candidate is the
/// best miss and `meets_max_error` says whether it is good enough.
///
/// # Errors
/// `target` outside its network's range or not finite; `total_min`, `total_max`,
/// `fixed_r1` not finite, ≤ 0 or outside 10⁻¹⁵ … 10¹⁵ Ω; `total_max` < `total_min`;
/// `fixed_r1` ≥ `total_max`; `max_error` ≤ 0; `count` 0 or above
/// [`MAX_CANDIDATES`].
///
/// # Example
/// ```
/// use loopwright::network::{best_pairs, Network, PairSpec, Series};
/// // Non-inverting gain 10 from E24 with 10 k … 100 kΩ in total: R2/R1 = 9 is
/// // exact with 18 k / 2.0 k or 27 k / 3.0 k.
/// let r = best_pairs(&PairSpec::new(Network::NonInverting, 10.0, Series::E24, 1e4, 1e5)).unwrap();
/// assert_eq!(r.candidates[0].error, 0.0);
/// assert_eq!(r.candidates[0].r2.value / r.candidates[0].r1, 9.0);
/// let bad = PairSpec::new(Network::Divider, 1.5, Series::E24, 1e4, 1e5);
/// assert_eq!(best_pairs(&bad).unwrap_err().param(), "target");
/// ```
pub fn best_pairs(spec: &PairSpec) -> Result<PairResult> {
    let q = spec.network.ratio_for(spec.target)?;
    let total_min = in_range("total_min", spec.total_min)?;
    let total_max = in_range("total_max", spec.total_max)?;
    if total_max < total_min {
        return Err(Error::OutOfDomain {
            param: "total_max",
            requirement: "must be at least total_min",
        });
    }
    let fixed_r1 = spec.fixed_r1.map(|r| in_range("fixed_r1", r)).transpose()?;
    if fixed_r1.is_some_and(|r| r >= total_max) {
        return Err(Error::OutOfDomain {
            param: "fixed_r1",
            requirement: "must be less than total_max",
        });
    }
    let max_error = validate_max_error(spec.max_error)?;
    let count = validate_count(spec.count)?;
    let (series, network, target) = (spec.series, spec.network, spec.target);
    let error_of = |r1: f64, r2: f64| network.value(r1, r2, target) / target - 1.0;

    let make = |r1: f64, r2: Leg| PairCandidate {
        r1,
        r2,
        achieved: network.value(r1, r2.value, target),
        error: error_of(r1, r2.value),
        total: r1 + r2.value,
    };
    // The best single-resistor R2 for each R1 of a rank range.
    let scan = |first: i64, last: i64, out: &mut Vec<PairCandidate>| {
        for r1 in (first..=last).map(|n| series.value_at(n)) {
            let Some((a, b)) = r2_interval(r1, total_min, total_max) else {
                continue;
            };
            let best = around(series, q * r1, a, b)
                .into_iter()
                .flatten()
                .map(|r2| make(r1, Leg::single(r2)))
                .min_by(by_error);
            out.extend(best);
        }
    };

    // R1: the fixed one; or the window first, then every other standard value
    // below total_max (at most 30 decades) unless the window's candidates already
    // beat the bound that every R1 outside it misses by (ratio beyond q·s or q/s).
    let mut candidates: Vec<PairCandidate> = Vec::new();
    let r1_window: Vec<f64> = match fixed_r1 {
        Some(r1) => {
            if let Some((a, b)) = r2_interval(r1, total_min, total_max) {
                candidates.extend(
                    around(series, q * r1, a, b)
                        .into_iter()
                        .flatten()
                        .map(|r2| make(r1, Leg::single(r2))),
                );
            }
            alloc::vec![r1]
        }
        None => {
            let s = series.max_step();
            let clamp = |x: f64| x.clamp(MIN_VALUE, MAX_VALUE);
            let (all_first, all_last) = (
                series.ceil_rank(MIN_VALUE),
                series.floor_rank(clamp(total_max)),
            );
            let w_first = series.ceil_rank(clamp(total_min / (1.0 + q * s)));
            let w_last = series
                .floor_rank(clamp(total_max / (1.0 + q / s)))
                .min(all_last);
            scan(w_first, w_last, &mut candidates);
            crate::sort::sort_by(&mut candidates, by_error);
            let outside_bound =
                libm::fabs(error_of(1.0, q * s)).min(libm::fabs(error_of(1.0, q / s)));
            let settled = candidates
                .get(count - 1)
                .is_some_and(|c| libm::fabs(c.error) <= outside_bound);
            if !settled {
                if w_first > w_last {
                    scan(all_first, all_last, &mut candidates);
                } else {
                    scan(all_first, w_first - 1, &mut candidates);
                    scan(w_last + 1, all_last, &mut candidates);
                }
            }
            (w_first..=w_last).map(|n| series.value_at(n)).collect()
        }
    };

    if spec.combine != Combine::None {
        for r1 in combination_r1s(series, &r1_window, fixed_r1, q, total_min, total_max) {
            let Some((a, b)) = r2_interval(r1, total_min, total_max) else {
                continue;
            };
            let score = |r2: f64| libm::fabs(error_of(r1, r2));
            if let Some((leg, _)) = best_combination(series, q * r1, a, b, spec.combine, score) {
                candidates.push(make(r1, leg));
            }
        }
    }
    // No sort by `by_error` first: `ranked` refines it (two candidates equal by
    // `ranked` are equal by `by_error`), so a stable sort by `by_error` before would
    // change nothing in the result.
    let candidates = first_ranked(&candidates, count, |a, b| ranked(a, b, max_error));
    let meets_max_error = match (candidates.first(), max_error) {
        (None, _) => false,
        (Some(_), None) => true,
        (Some(c), Some(m)) => libm::fabs(c.error) <= m,
    };
    Ok(PairResult {
        network,
        target,
        ideal_ratio: q,
        candidates,
        meets_max_error,
    })
}

/// A single resistance candidate.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct SingleCandidate {
    /// The resistor or the two combined.
    pub leg: Leg,
    /// leg.value/target − 1, a fraction.
    pub error: f64,
}

/// Standard values (and, when allowed and needed, two-resistor combinations) for
/// one resistance: a transresistance feedback resistor (Rf = gain in V/A) or a
/// current-sense resistor (R = V/I).
///
/// Returns the next-down and next-up standard value, then, when `combine` allows
/// and neither meets `max_error` (or no `max_error` is given), the best series and
/// best parallel combination; all sorted by |error|.
///
/// # Errors
/// `target` not finite, ≤ 0 or outside 10⁻¹⁵ … 10¹⁵ Ω; `max_error` ≤ 0.
///
/// # Example
/// ```
/// use loopwright::network::{single_resistor, Combine, Series};
/// // 0.05 Ω sense resistor from E24: exact 0.051 is 2 % high, 0.047 6 % low.
/// let c = single_resistor(0.05, Series::E24, None, Combine::None).unwrap();
/// assert_eq!(c[0].leg.value, 0.051);
/// assert!(single_resistor(-1.0, Series::E24, None, Combine::None).is_err());
/// ```
pub fn single_resistor(
    target: f64,
    series: Series,
    max_error: Option<f64>,
    combine: Combine,
) -> Result<Vec<SingleCandidate>> {
    let t = in_range("target", target)?;
    let max_error = validate_max_error(max_error)?;
    let score = |v: f64| libm::fabs(v / t - 1.0);
    let mut out: Vec<SingleCandidate> = around(series, t, MIN_VALUE, MAX_VALUE)
        .into_iter()
        .flatten()
        .map(|v| SingleCandidate {
            leg: Leg::single(v),
            error: v / t - 1.0,
        })
        .collect();
    out.dedup_by(|a, b| a.leg == b.leg);
    let met = out
        .iter()
        .any(|c| max_error.is_some_and(|m| libm::fabs(c.error) <= m));
    if !met {
        for joint in [Combine::Series, Combine::Parallel] {
            if combine == joint || combine == Combine::Either {
                if let Some((leg, _)) =
                    best_combination(series, t, MIN_VALUE, MAX_VALUE, joint, score)
                {
                    out.push(SingleCandidate {
                        leg,
                        error: leg.value / t - 1.0,
                    });
                }
            }
        }
    }
    crate::sort::sort_by(&mut out, |a, b| {
        libm::fabs(a.error).total_cmp(&libm::fabs(b.error))
    });
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::network::series_values;

    /// Brute force: every (R1, R2) of the series within [lo, hi] each, keeping the
    /// pairs within the total range; best |error| per R1, sorted.
    fn brute(spec: &PairSpec, lo: f64, hi: f64) -> Vec<f64> {
        let vals = series_values(spec.series, lo, hi).unwrap();
        let mut per_r1 = Vec::new();
        for &r1 in &vals {
            let best = vals
                .iter()
                .filter(|&&r2| (spec.total_min..=spec.total_max).contains(&(r1 + r2)))
                .map(|&r2| libm::fabs(spec.network.value(r1, r2, spec.target) / spec.target - 1.0))
                .min_by(f64::total_cmp);
            if let Some(e) = best {
                per_r1.push(e);
            }
        }
        per_r1.sort_by(f64::total_cmp);
        per_r1
    }

    #[test]
    fn first_ranked_equals_a_stable_sort_cut_short() {
        // The reference is the standard library's stable sort, then truncate.
        let mut state = 0x2545_f491_4f6c_dd1d_u64;
        let mut next = move || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            state
        };
        for case in 0..500 {
            let n = (next() % 60) as usize;
            // (key, position): few keys, so many ties whose order shows stability.
            let items: Vec<(u64, usize)> = (0..n).map(|i| (next() % 6, i)).collect();
            let count = 1 + (next() % 12) as usize;
            let by_key = |a: &(u64, usize), b: &(u64, usize)| a.0.cmp(&b.0);
            let mut want = items.clone();
            want.sort_by(by_key);
            want.truncate(count);
            assert_eq!(first_ranked(&items, count, by_key), want, "case {case}");
        }
    }

    #[test]
    fn search_matches_brute_force_on_a_few_targets() {
        for (network, target) in [
            (Network::NonInverting, 7.3),
            (Network::Inverting, -4.4),
            (Network::Divider, 0.123),
        ] {
            for series in [Series::E12, Series::E24, Series::E96] {
                let mut spec = PairSpec::new(network, target, series, 2e3, 2e5);
                spec.count = 5;
                let fast = best_pairs(&spec).unwrap();
                let slow = brute(&spec, 1.0, 1e6);
                for (i, c) in fast.candidates.iter().enumerate() {
                    assert_eq!(
                        libm::fabs(c.error),
                        slow[i],
                        "{network:?} {target} {series} #{i}"
                    );
                    assert!((spec.total_min..=spec.total_max).contains(&c.total));
                }
            }
        }
    }

    #[test]
    fn unreachable_target_gives_the_best_miss() {
        // Gain 1000 with at most 10 kΩ total from E3: R2/R1 ≤ 4.7 k/1 Ω… the window
        // still has pairs; a total range too narrow for any pair gives none.
        let mut spec = PairSpec::new(Network::NonInverting, 3.21, Series::E3, 1e3, 1e5);
        spec.max_error = Some(1e-4);
        let r = best_pairs(&spec).unwrap();
        assert!(!r.meets_max_error && !r.candidates.is_empty());
        let none = PairSpec::new(Network::NonInverting, 2.0, Series::E3, 1000.5, 1000.6);
        let r = best_pairs(&none).unwrap();
        assert!(r.candidates.is_empty() && !r.meets_max_error);
    }

    #[test]
    fn combination_improves_a_miss() {
        let mut spec = PairSpec::new(Network::NonInverting, 3.21, Series::E24, 1e3, 1e5);
        spec.max_error = Some(1e-3);
        let single = best_pairs(&spec).unwrap();
        spec.combine = Combine::Either;
        let combined = best_pairs(&spec).unwrap();
        assert!(libm::fabs(combined.candidates[0].error) < libm::fabs(single.candidates[0].error));
        assert!(combined.meets_max_error);
        let leg = combined.candidates[0].r2;
        let second = leg.second.unwrap();
        let v = match leg.joint {
            Joint::Series => leg.first + second,
            Joint::Parallel => leg.first * second / (leg.first + second),
            Joint::Single => unreachable!(),
        };
        assert_eq!(v, leg.value);
    }

    #[test]
    fn fixed_r1_searches_r2_only() {
        let mut spec = PairSpec::new(Network::Inverting, 22.0, Series::E24, 1e3, 1e6);
        spec.fixed_r1 = Some(10e3);
        let r = best_pairs(&spec).unwrap();
        assert!(r.candidates.iter().all(|c| c.r1 == 10e3));
        assert_eq!(r.candidates[0].r2.value, 220e3);
        spec.fixed_r1 = Some(2e6);
        assert_eq!(best_pairs(&spec).unwrap_err().param(), "fixed_r1");
    }

    #[test]
    fn bad_inputs() {
        let ok = PairSpec::new(Network::NonInverting, 2.0, Series::E24, 1e3, 1e5);
        let e = |f: &dyn Fn(&mut PairSpec)| {
            let mut s = ok;
            f(&mut s);
            best_pairs(&s).unwrap_err().param()
        };
        assert_eq!(e(&|s| s.target = 0.5), "target");
        assert_eq!(e(&|s| s.target = f64::NAN), "target");
        assert_eq!(e(&|s| s.total_min = -1.0), "total_min");
        assert_eq!(e(&|s| s.total_max = 10.0), "total_max");
        assert_eq!(e(&|s| s.max_error = Some(0.0)), "max_error");
        assert_eq!(e(&|s| s.count = 101), "count");
        assert_eq!(
            "bridge".parse::<Network>().unwrap_err().code(),
            "unknown_name"
        );
    }

    #[test]
    fn single_resistor_with_parallel_trim() {
        // 0.05 Ω from E24 within 0.5 %: no single value, 0.1 ‖ 0.1 = 0.05 exactly.
        let c = single_resistor(0.05, Series::E24, Some(0.005), Combine::Parallel).unwrap();
        assert_eq!(c[0].leg.joint, Joint::Parallel);
        assert!(libm::fabs(c[0].error) < 1e-12);
    }
}
