//! Choosing parts against a spec: which preferred-number series, tolerance grade
//! and leg build (one resistor, or two in series or parallel) meet a gain or ratio
//! with a tolerance, ranked by yield and by a simple cost order.
//!
//! # The spec
//! A target T (a non-inverting or inverting gain, or a divider ratio, see
//! [`Network`]) with a relative tolerance t: the stage passes when its value lies in
//! [T·(1 − t), T·(1 + t)], or in limits given directly (`limits`, with T's sign).
//! Every network here is set by q = R2/R1, and its value is
//! monotonic in q, so the window maps to an interval [q_lo, q_hi] of q:
//! - non-inverting, ideal: G = 1 + q; with an amplifier of finite open-loop gain A
//!   the closed-loop gain is G = (1 + q)·A/(A + 1 + q), so 1 + q = G·A/(A − G);
//! - inverting, ideal: |G| = q; with A: |G| = q·A/(A + 1 + q), so
//!   q = |G|·(A + 1)/(A − |G|);
//! - divider: k = 1/(1 + q), decreasing in q, so q = (1 − k)/k with the ends swapped.
//!
//! (The closed-loop forms are G = G∞/(1 + G∞/A) with the noise gain G∞ = 1 + q, and
//! |G| = q/(1 + (1 + q)/A); any feedback textbook, e.g. Franco, *Design with
//! Operational Amplifiers and Analog Integrated Circuits*, 4th ed., ch. 1, from
//! memory.) A limit at or above A cannot be reached by any q:
//! [`Error::Unreachable`] names `open_loop_gain`.
//!
//! # Parts
//! Each resistor is uniform over its nominal ± its grade (the usual reading of a
//! tolerance band when nothing else is known; common practice, no source),
//! independently of the others. A two-part leg has both its parts of the grade.
//!
//! # Yield
//! - one resistor per leg: exact. With R1 = n1·(1 + u), R2 = n2·(1 + v), u and v
//!   uniform on [−p, p],
//!   P(R2/R1 ≤ c) = (1/2p)·∫₋ₚ^ₚ clamp((c·n1·(1 + u)/n2 − 1 + p)/(2p), 0, 1) du,
//!   the integrand being piecewise linear in u, so the integral is a sum of
//!   trapezoids between its two corners (the conditional CDF of a ratio of two
//!   uniform variables; e.g. Papoulis & Pillai, *Probability, Random Variables and
//!   Stochastic Processes*, 4th ed., §6-2, from memory). Yield =
//!   P(R2/R1 ≤ q_hi) − P(R2/R1 < q_lo); `yield_std_error` is 0;
//! - a two-part leg: seeded Monte Carlo (xoshiro256++, as in
//!   [`super::montecarlo`]), `trials` draws, every choice from the same seed;
//!   `yield_std_error` = √(y·(1 − y)/N), the binomial standard error;
//! - either way, when the worst case lies wholly inside the window the yield is 1,
//!   and when wholly outside, 0 (exact, no draws).
//!
//! The worst case is at the corners: every leg's value scales by (1 ± p) with its
//! parts, so q ranges over q₀·(1 − p)/(1 + p) … q₀·(1 + p)/(1 − p).
//!
//! # Which series with which grade
//! A series is offered in its customary tolerance and tighter, never looser
//! ([`Series::tolerance`]: E96 from 1 %, E192 from 0.5 %): that is how the trade
//! sells them (common practice, no source). A coarser series at a tight grade is
//! kept (E24 values are made in 0.1 %).
//!
//! # Which pair
//! For each series and leg build, [`best_pairs`] gives the [`CANDIDATES_PER_BUILD`]
//! pairs nearest the q that puts the value at T (with A, the q whose closed-loop
//! value is T) within the total-resistance range, ranked as there (|error|, then
//! smaller total, then smaller R1). For one-resistor legs the pair of highest exact
//! yield is kept for each grade (the first of that ranking on a tie, yields within
//! 10⁻¹² being equal); for two-part legs the nearest pair (one Monte Carlo run per
//! grade).
//!
//! # Cost order and ranking
//! Cost order (common practice, no source): the looser grade first (the grade sets
//! the price: a 0.1 % thin-film part costs several 1 % thick-film ones), then fewer
//! parts, then the coarser series (more widely stocked). `cost_rank` is a choice's
//! 1-based place in that order. The choices whose yield reaches `min_yield` come
//! first, in cost order; the rest follow by yield, highest first. The first meeting
//! choice is `recommended`; when none meets the spec, `recommended` is `None` and
//! the first choice is the best miss.
//!
//! # Limits (bounded work)
//! At most [`MAX_GRADES`] grades and the seven series, so at most 7·8·3 = 168
//! choices; `trials` from [`MIN_TRIALS`] to [`MAX_TRIALS`], at most one Monte
//! Carlo run per two-part choice (≤ 112 runs).

use super::eseries::{in_range, Series};
use super::pairs::{best_pairs, Combine, Joint, Leg, Network, PairSpec};
use crate::check;
use crate::error::{Error, Result};
use alloc::vec::Vec;
use core::cmp::Ordering;
use rand_core::{RngCore, SeedableRng};
use rand_xoshiro::Xoshiro256PlusPlus;

/// Most tolerance grades one search takes.
pub const MAX_GRADES: usize = 8;
/// Fewest Monte Carlo trials for a two-part leg.
pub const MIN_TRIALS: usize = 1_000;
/// Most Monte Carlo trials for a two-part leg.
pub const MAX_TRIALS: usize = 200_000;
/// Exact yields closer than this are taken as equal when a pair is chosen.
const YIELD_TIE: f64 = 1e-12;
/// Pairs tried per series and leg build.
pub const CANDIDATES_PER_BUILD: usize = 5;
/// The grades tried by default, as fractions: 5, 2, 1, 0.5, 0.25, 0.1 %.
pub const DEFAULT_GRADES: [f64; 6] = [0.05, 0.02, 0.01, 0.005, 0.0025, 0.001];
/// The series tried by default.
pub const DEFAULT_SERIES: [Series; 6] = [
    Series::E6,
    Series::E12,
    Series::E24,
    Series::E48,
    Series::E96,
    Series::E192,
];

/// What to choose parts for.
#[derive(Debug, Clone, PartialEq)]
pub struct ChooseSpec {
    /// The network.
    pub network: Network,
    /// Gain (V/V) or divider ratio T.
    pub target: f64,
    /// Relative half-width t of the window T·(1 ± t), a fraction in (0, 1).
    pub tolerance: f64,
    /// Or the window's own ends (lower, upper), in the network's quantity with the
    /// target's sign; when given, `tolerance` is not used (and not checked).
    pub limits: Option<(f64, f64)>,
    /// The amplifier's open-loop gain A (V/V) at the frequency of interest, for the
    /// amplifier networks; `None` for an ideal amplifier.
    pub open_loop_gain: Option<f64>,
    /// Series to try, each once (1 … 7).
    pub series: Vec<Series>,
    /// Tolerance grades to try, fractions in (0, 1), 1 … [`MAX_GRADES`].
    pub grades: Vec<f64>,
    /// Which two-part R2 legs are tried besides one resistor.
    pub combine: Combine,
    /// Least R1 + R2, Ω.
    pub total_min: f64,
    /// Largest R1 + R2, Ω.
    pub total_max: f64,
    /// Yield a choice must reach to meet the spec, in (0, 1].
    pub min_yield: f64,
    /// Monte Carlo trials for a two-part leg.
    pub trials: usize,
    /// Seed of the Monte Carlo draws.
    pub seed: u64,
}

impl ChooseSpec {
    /// The default search: series E6 … E192, grades 5 … 0.1 %, one resistor or
    /// two in series or parallel, 1 k … 1 MΩ in total, ideal amplifier, minimum
    /// yield 0.99, 20 000 trials, seed 1.
    pub fn new(network: Network, target: f64, tolerance: f64) -> ChooseSpec {
        ChooseSpec {
            network,
            target,
            tolerance,
            limits: None,
            open_loop_gain: None,
            series: DEFAULT_SERIES.to_vec(),
            grades: DEFAULT_GRADES.to_vec(),
            combine: Combine::Either,
            total_min: 1e3,
            total_max: 1e6,
            min_yield: 0.99,
            trials: 20_000,
            seed: 1,
        }
    }
}

/// How a yield was found.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum YieldMethod {
    /// Closed form (or the worst case wholly inside or outside the window).
    Exact,
    /// Seeded Monte Carlo; see `yield_std_error`.
    MonteCarlo,
}

/// One series, grade and leg build with its pair, spread and yield.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Choice {
    /// The series.
    pub series: Series,
    /// The tolerance grade, a fraction.
    pub grade: f64,
    /// R1, Ω.
    pub r1: f64,
    /// R2, Ω, one resistor or two.
    pub r2: Leg,
    /// Resistors used: 2 or 3.
    pub parts: usize,
    /// The value with nominal parts (closed-loop with A when given).
    pub nominal: f64,
    /// nominal/target − 1, a fraction.
    pub nominal_error: f64,
    /// Least value over the tolerance corners.
    pub worst_low: f64,
    /// Largest value over the tolerance corners.
    pub worst_high: f64,
    /// Share of builds within the window, 0 … 1.
    #[cfg_attr(feature = "serde", serde(rename = "yield"))]
    pub yield_: f64,
    /// Standard error of `yield_` (0 when exact).
    pub yield_std_error: f64,
    /// How the yield was found.
    pub method: YieldMethod,
    /// 1-based place in the cost order (see the module doc).
    pub cost_rank: usize,
    /// Whether the yield reaches `min_yield`.
    pub meets: bool,
}

/// The ranked choices.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct ChooseResult {
    /// The network.
    pub network: Network,
    /// The target.
    pub target: f64,
    /// Lower end of the window.
    pub low: f64,
    /// Upper end of the window.
    pub high: f64,
    /// The R2/R1 that puts the value at the target (with A when given).
    pub ideal_ratio: f64,
    /// Normalised sensitivity of the value to R2 at the ideal ratio,
    /// (R2/V)·∂V/∂R2; the sensitivity to R1 is its negative (V depends on R2/R1
    /// only). Non-inverting: q/(1 + q) − q/(A + 1 + q); inverting:
    /// 1 − q/(A + 1 + q); divider: −q/(1 + q) (the A terms vanish without A).
    pub sensitivity_r2: f64,
    /// Minimum yield asked for.
    pub min_yield: f64,
    /// Every choice, ranked: those meeting `min_yield` in cost order, then the rest
    /// by yield.
    pub choices: Vec<Choice>,
    /// The cheapest choice meeting `min_yield`; `None` when none does (then the
    /// first choice is the best miss).
    pub recommended: Option<Choice>,
}

fn validate_fraction(param: &'static str, x: f64) -> Result<f64> {
    let x = check::positive(param, x)?;
    if x >= 1.0 {
        return Err(Error::OutOfDomain {
            param,
            requirement: "must be less than 1 (100 %)",
        });
    }
    Ok(x)
}

/// The value of the network for q = R2/R1, with the open-loop gain when given.
fn value_of(network: Network, q: f64, a: Option<f64>, sign: f64) -> f64 {
    match (network, a) {
        (Network::NonInverting, None) => 1.0 + q,
        (Network::NonInverting, Some(a)) => (1.0 + q) * a / (a + 1.0 + q),
        (Network::Inverting, None) => sign * q,
        (Network::Inverting, Some(a)) => sign * q * a / (a + 1.0 + q),
        (Network::Divider, _) => 1.0 / (1.0 + q),
    }
}

/// q for a value v of the network (v > 0, v < A when A is given, checked by the caller).
fn ratio_of(network: Network, v: f64, a: Option<f64>) -> f64 {
    match (network, a) {
        (Network::NonInverting, None) => v - 1.0,
        (Network::NonInverting, Some(a)) => v * a / (a - v) - 1.0,
        (Network::Inverting, None) => v,
        (Network::Inverting, Some(a)) => v * (a + 1.0) / (a - v),
        (Network::Divider, _) => (1.0 - v) / v,
    }
}

/// ∫ₐᵇ clamp(h(u), 0, 1) du for h(u) = h0 + s·u, s > 0 (exact: the integrand is
/// piecewise linear with corners where h = 0 and h = 1).
fn clamped_linear_integral(h0: f64, s: f64, a: f64, b: f64) -> f64 {
    let h = |u: f64| h0 + s * u;
    let u0 = (-h0 / s).clamp(a, b); // h = 0
    let u1 = ((1.0 - h0) / s).clamp(a, b); // h = 1
                                           // [a, u0]: 0; [u0, u1]: linear, trapezoid; [u1, b]: 1.
    (u1 - u0) * (h(u0) + h(u1)) / 2.0 + (b - u1)
}

/// P(R2/R1 ≤ c) for R1 uniform on n1·[1 − p, 1 + p], R2 on n2·[1 − p, 1 + p].
fn ratio_cdf(c: f64, n1: f64, n2: f64, p: f64) -> f64 {
    if c <= 0.0 {
        return 0.0;
    }
    // v ≤ k·(1 + u) − 1 with k = c·n1/n2; P over v: (k(1 + u) − 1 + p)/(2p).
    let k = c * n1 / n2;
    let h0 = (k - 1.0 + p) / (2.0 * p);
    let s = k / (2.0 * p);
    (clamped_linear_integral(h0, s, -p, p) / (2.0 * p)).clamp(0.0, 1.0)
}

/// The exact yield of a one-resistor-per-leg pair: P(q_lo ≤ R2/R1 ≤ q_hi).
fn exact_yield(q_lo: f64, q_hi: f64, n1: f64, n2: f64, p: f64) -> f64 {
    (ratio_cdf(q_hi, n1, n2, p) - ratio_cdf(q_lo, n1, n2, p)).clamp(0.0, 1.0)
}

/// Uniform doubles in [0, 1) from the top 53 bits.
fn unit(rng: &mut Xoshiro256PlusPlus) -> f64 {
    (rng.next_u64() >> 11) as f64 * (1.0 / 9_007_199_254_740_992.0)
}

/// Monte Carlo yield of R1 and a two-part R2 leg: (yield, standard error).
fn monte_carlo_yield(
    q_lo: f64,
    q_hi: f64,
    r1: f64,
    leg: Leg,
    p: f64,
    trials: usize,
    seed: u64,
) -> (f64, f64) {
    let mut rng = Xoshiro256PlusPlus::seed_from_u64(seed);
    let draw = |n: f64, rng: &mut Xoshiro256PlusPlus| n * (1.0 + p * (2.0 * unit(rng) - 1.0));
    let second = leg.second.unwrap_or(0.0);
    let mut inside = 0usize;
    for _ in 0..trials {
        let a = draw(r1, &mut rng);
        let f = draw(leg.first, &mut rng);
        let s = draw(second, &mut rng);
        let r2 = match leg.joint {
            Joint::Series => f + s,
            Joint::Parallel => f * s / (f + s),
            Joint::Single => f,
        };
        let q = r2 / a;
        if q >= q_lo && q <= q_hi {
            inside += 1;
        }
    }
    let n = trials as f64;
    let y = inside as f64 / n;
    (y, libm::sqrt(y * (1.0 - y) / n))
}

/// The spec's window mapped onto q = R2/R1 (see the module doc).
#[derive(Debug, Clone, Copy)]
struct Window {
    network: Network,
    target: f64,
    a: Option<f64>,
    sign: f64,
    low: f64,
    high: f64,
    q_lo: f64,
    q_hi: f64,
    q_target: f64,
}

impl Window {
    fn new(
        network: Network,
        target: f64,
        tolerance: f64,
        limits: Option<(f64, f64)>,
        a: Option<f64>,
    ) -> Result<Window> {
        let target = check::finite("target", target)?;
        network.ratio_for(target)?;
        let magnitude = libm::fabs(target);
        let sign = if target < 0.0 { -1.0 } else { 1.0 };
        let (low_mag, high_mag) = match limits {
            None => {
                let t = validate_fraction("tolerance", tolerance)?;
                (magnitude * (1.0 - t), magnitude * (1.0 + t))
            }
            Some((lower, upper)) => {
                let lower = check::finite("lower", lower)?;
                let upper = check::finite("upper", upper)?;
                if upper <= lower {
                    return Err(Error::OutOfDomain {
                        param: "upper",
                        requirement: "must be greater than lower",
                    });
                }
                for (param, x) in [("lower", lower), ("upper", upper)] {
                    if x * sign <= 0.0 {
                        return Err(Error::OutOfDomain {
                            param,
                            requirement: "must have the target's sign and not be zero",
                        });
                    }
                }
                let (x, y) = (libm::fabs(lower), libm::fabs(upper));
                (x.min(y), x.max(y))
            }
        };
        let a = a
            .map(|a| check::positive("open_loop_gain", a))
            .transpose()?;
        if a.is_some() && network == Network::Divider {
            return Err(Error::OutOfDomain {
                param: "open_loop_gain",
                requirement: "applies to the amplifier networks only; leave it out for a divider",
            });
        }
        // q at the window's ends and at the target.
        if let Some(a) = a {
            if high_mag >= a {
                return Err(Error::Unreachable {
                    param: "open_loop_gain",
                    reason: "must be above the window's upper end: no feedback network reaches a gain at or above the open-loop gain",
                });
            }
        }
        if network == Network::Divider && high_mag >= 1.0 {
            return Err(Error::OutOfDomain {
                param: "tolerance",
                requirement: "must keep the divider window below 1",
            });
        }
        let (qa, qb) = (
            ratio_of(network, low_mag, a),
            ratio_of(network, high_mag, a),
        );
        let (q_lo, q_hi) = if qa <= qb { (qa, qb) } else { (qb, qa) };
        let q_target = ratio_of(network, magnitude, a);
        if !(q_lo.is_finite() && q_hi.is_finite() && q_hi > 0.0) {
            return Err(Error::OutOfDomain {
                param: "tolerance",
                requirement: "must leave a window the network can reach",
            });
        }
        Ok(Window {
            network,
            target,
            a,
            sign,
            low: if sign < 0.0 { -high_mag } else { low_mag },
            high: if sign < 0.0 { -low_mag } else { high_mag },
            q_lo,
            q_hi,
            q_target,
        })
    }

    fn value(&self, q: f64) -> f64 {
        value_of(self.network, q, self.a, self.sign)
    }
}

/// The nominal, worst case and yield of one pair at one grade.
fn judge(w: &Window, series: Series, p: f64, r1: f64, r2: Leg, trials: usize, seed: u64) -> Choice {
    let spread = (1.0 + p) / (1.0 - p);
    let q0 = r2.value / r1;
    let (qmin, qmax) = (q0 / spread, q0 * spread);
    let (va, vb) = (w.value(qmin), w.value(qmax));
    let (yield_, se, method) = if qmin >= w.q_lo && qmax <= w.q_hi {
        (1.0, 0.0, YieldMethod::Exact)
    } else if qmax < w.q_lo || qmin > w.q_hi {
        (0.0, 0.0, YieldMethod::Exact)
    } else if r2.joint == Joint::Single {
        (
            exact_yield(w.q_lo, w.q_hi, r1, r2.value, p),
            0.0,
            YieldMethod::Exact,
        )
    } else {
        let (y, se) = monte_carlo_yield(w.q_lo, w.q_hi, r1, r2, p, trials, seed);
        (y, se, YieldMethod::MonteCarlo)
    };
    let nominal = w.value(q0);
    Choice {
        series,
        grade: p,
        r1,
        r2,
        parts: if r2.joint == Joint::Single { 2 } else { 3 },
        nominal,
        nominal_error: nominal / w.target - 1.0,
        worst_low: va.min(vb),
        worst_high: va.max(vb),
        yield_,
        yield_std_error: se,
        method,
        cost_rank: 0,
        meets: false,
    }
}

fn validate_trials(trials: usize) -> Result<usize> {
    if trials < MIN_TRIALS {
        return Err(Error::OutOfDomain {
            param: "trials",
            requirement: "must be at least 1000",
        });
    }
    if trials > MAX_TRIALS {
        return Err(Error::TooLarge {
            param: "trials",
            limit: MAX_TRIALS as u64,
        });
    }
    Ok(trials)
}

/// One given pair to judge against a spec: see [`pair_yield`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PairYieldSpec {
    /// The network.
    pub network: Network,
    /// Gain (V/V) or divider ratio T.
    pub target: f64,
    /// Relative half-width t of the window T·(1 ± t).
    pub tolerance: f64,
    /// The amplifier's open-loop gain A (V/V), or `None` for an ideal amplifier.
    pub open_loop_gain: Option<f64>,
    /// R1, Ω.
    pub r1: f64,
    /// R2's first resistor, Ω.
    pub r2: f64,
    /// R2's second resistor, Ω, with how it is joined; `None` for one resistor.
    pub r2_second: Option<(f64, Joint)>,
    /// Tolerance grade of every part, a fraction in (0, 1).
    pub grade: f64,
    /// Monte Carlo trials when R2 has two parts.
    pub trials: usize,
    /// Seed of the draws.
    pub seed: u64,
}

/// Nominal, worst case and yield of a given pair against a window, computed as
/// [`choose_parts`] does (exact for one resistor per leg, seeded Monte Carlo
/// for a two-part leg). The result's `series` is the coarsest series holding every
/// part (E192 when none does: the values are then taken as given), `cost_rank`
/// is 1 and `meets` says whether the yield is 1.
///
/// # Errors
/// As [`choose_parts`] for `target`, `tolerance`, `open_loop_gain`, `trials`;
/// `r1`, `r2`, `r2_second` not finite or outside 10⁻¹⁵ … 10¹⁵ Ω; `r2_second`
/// with [`Joint::Single`]; `grade` not in (0, 1).
///
/// # Example
/// ```
/// use loopwright::network::{pair_yield, Network, PairYieldSpec};
/// // 10 k / 470 k at 1 % against gain 48 ± 0.5 %: 44.5 %.
/// let c = pair_yield(&PairYieldSpec {
///     network: Network::NonInverting, target: 48.0, tolerance: 0.005, open_loop_gain: None,
///     r1: 10e3, r2: 470e3, r2_second: None, grade: 0.01, trials: 20_000, seed: 1,
/// }).unwrap();
/// assert!((c.yield_ - 0.4455).abs() < 1e-3);
/// ```
pub fn pair_yield(spec: &PairYieldSpec) -> Result<Choice> {
    let w = Window::new(
        spec.network,
        spec.target,
        spec.tolerance,
        None,
        spec.open_loop_gain,
    )?;
    let r1 = in_range("r1", spec.r1)?;
    let first = in_range("r2", spec.r2)?;
    let p = validate_fraction("grade", spec.grade)?;
    let trials = validate_trials(spec.trials)?;
    let leg = match spec.r2_second {
        None => Leg::single(first),
        Some((second, joint)) => {
            let second = in_range("r2_second", second)?;
            let value = match joint {
                Joint::Series => first + second,
                Joint::Parallel => first * second / (first + second),
                Joint::Single => {
                    return Err(Error::OutOfDomain {
                        param: "r2_second",
                        requirement: "needs a series or parallel joint",
                    })
                }
            };
            Leg {
                value,
                first,
                second: Some(second),
                joint,
            }
        }
    };
    let holds = |s: Series| {
        let parts = [Some(r1), Some(first), spec.r2_second.map(|(x, _)| x)];
        parts.iter().flatten().all(|&x| {
            super::eseries::standard_value(s, x, super::eseries::Rounding::Nearest)
                .is_ok_and(|v| libm::fabs(v / x - 1.0) < 1e-12)
        })
    };
    let series = Series::ALL
        .iter()
        .copied()
        .find(|&s| holds(s))
        .unwrap_or(Series::E192);
    let mut c = judge(&w, series, p, r1, leg, trials, spec.seed);
    c.cost_rank = 1;
    c.meets = c.yield_ >= 1.0;
    Ok(c)
}

fn cost_order(a: &Choice, b: &Choice) -> Ordering {
    b.grade
        .total_cmp(&a.grade)
        .then(a.parts.cmp(&b.parts))
        .then(a.series.len().cmp(&b.series.len()))
}

/// Ranked choices of series, grade and leg build for a target with a tolerance.
///
/// See the module doc for the spec, the yield, the cost order and the limits.
/// A spec no choice meets is not an error: `recommended` is `None` and the first
/// choice is the best miss (highest yield).
///
/// # Errors
/// `target` outside its network's range; `tolerance` (without `limits`), each
/// of `grades` not in (0, 1); `lower`, `upper` (the `limits`) not finite,
/// `upper` ≤ `lower`, either of the other sign than the target or zero; `open_loop_gain` not finite or ≤ 0, given for a divider, or not
/// above the window's upper end (`Unreachable`); `series` or `grades` empty,
/// `grades` above [`MAX_GRADES`]; `total_min`, `total_max` as in [`best_pairs`];
/// `min_yield` not in (0, 1]; `trials` outside [`MIN_TRIALS`] … [`MAX_TRIALS`].
///
/// # Example
/// ```
/// use loopwright::network::{choose_parts, ChooseSpec, Network};
/// // Gain 48 ± 0.5 %: no one-resistor E96 pair at 1 % reaches 99 % yield.
/// let r = choose_parts(&ChooseSpec::new(Network::NonInverting, 48.0, 0.005)).unwrap();
/// let best = r.recommended.unwrap();
/// assert!(best.yield_ >= 0.99 && best.grade < 0.01);
/// let mut bad = ChooseSpec::new(Network::NonInverting, 48.0, 1.5);
/// assert_eq!(choose_parts(&bad).unwrap_err().param(), "tolerance");
/// bad.tolerance = 0.005;
/// bad.grades = vec![-0.01];
/// assert_eq!(choose_parts(&bad).unwrap_err().param(), "grades");
/// ```
pub fn choose_parts(spec: &ChooseSpec) -> Result<ChooseResult> {
    let network = spec.network;
    let target = spec.target;
    let w = Window::new(
        network,
        target,
        spec.tolerance,
        spec.limits,
        spec.open_loop_gain,
    )?;
    if spec.series.is_empty() {
        return Err(Error::OutOfDomain {
            param: "series",
            requirement: "must name at least one series",
        });
    }
    if spec.grades.is_empty() {
        return Err(Error::OutOfDomain {
            param: "grades",
            requirement: "must give at least one tolerance grade",
        });
    }
    if spec.grades.len() > MAX_GRADES {
        return Err(Error::TooLarge {
            param: "grades",
            limit: MAX_GRADES as u64,
        });
    }
    let mut grades = Vec::with_capacity(spec.grades.len());
    for &g in &spec.grades {
        grades.push(validate_fraction("grades", g)?);
    }
    let total_min = in_range("total_min", spec.total_min)?;
    let total_max = in_range("total_max", spec.total_max)?;
    let min_yield = check::positive("min_yield", spec.min_yield)?;
    if min_yield > 1.0 {
        return Err(Error::OutOfDomain {
            param: "min_yield",
            requirement: "must be at most 1",
        });
    }
    validate_trials(spec.trials)?;

    // The pair search works on the ideal network: its target is the ideal value
    // at q_target.
    let pair_target = value_of(network, w.q_target, None, w.sign);

    let mut series: Vec<Series> = Vec::new();
    for &s in &spec.series {
        if !series.contains(&s) {
            series.push(s);
        }
    }
    let joints: &[Combine] = match spec.combine {
        Combine::None => &[Combine::None],
        Combine::Series => &[Combine::None, Combine::Series],
        Combine::Parallel => &[Combine::None, Combine::Parallel],
        Combine::Either => &[Combine::None, Combine::Series, Combine::Parallel],
    };

    let mut choices: Vec<Choice> = Vec::new();
    for &s in &series {
        for &joint in joints {
            let mut ps = PairSpec::new(network, pair_target, s, total_min, total_max);
            ps.combine = joint;
            ps.count = 3 * CANDIDATES_PER_BUILD;
            let found = best_pairs(&ps)?;
            let pairs: Vec<_> = found
                .candidates
                .into_iter()
                .filter(|c| match joint {
                    Combine::None => c.r2.joint == Joint::Single,
                    Combine::Series => c.r2.joint == Joint::Series,
                    _ => c.r2.joint == Joint::Parallel,
                })
                .take(CANDIDATES_PER_BUILD)
                .collect();
            if pairs.is_empty() {
                continue;
            }
            for &p in grades.iter().filter(|&&p| p <= s.tolerance()) {
                let judge = |r1: f64, r2: Leg| judge(&w, s, p, r1, r2, spec.trials, spec.seed);
                let best = if joint == Combine::None {
                    // Highest yield; yields within YIELD_TIE are a tie (the same
                    // ratio scaled by a decade differs in the last bits), and a tie
                    // keeps the earlier pair of the ranking (nearer nominal, then
                    // smaller total).
                    let mut best: Option<Choice> = None;
                    for c in pairs.iter().map(|c| judge(c.r1, c.r2)) {
                        if best.map_or(true, |b| c.yield_ > b.yield_ + YIELD_TIE) {
                            best = Some(c);
                        }
                    }
                    best
                } else {
                    pairs.first().map(|c| judge(c.r1, c.r2))
                };
                choices.extend(best);
            }
        }
    }
    for c in &mut choices {
        c.meets = c.yield_ >= min_yield;
    }
    crate::sort::sort_by(&mut choices, cost_order);
    for (i, c) in choices.iter_mut().enumerate() {
        c.cost_rank = i + 1;
    }
    crate::sort::sort_by(&mut choices, |x, y| {
        y.meets.cmp(&x.meets).then_with(|| {
            if x.meets {
                x.cost_rank.cmp(&y.cost_rank)
            } else {
                y.yield_
                    .total_cmp(&x.yield_)
                    .then(x.cost_rank.cmp(&y.cost_rank))
            }
        })
    });
    let recommended = choices.first().copied().filter(|c| c.meets);
    let sensitivity_r2 = {
        let q = w.q_target;
        let loss = w.a.map_or(0.0, |a| q / (a + 1.0 + q));
        match network {
            Network::NonInverting => q / (1.0 + q) - loss,
            Network::Inverting => 1.0 - loss,
            Network::Divider => -q / (1.0 + q),
        }
    };
    Ok(ChooseResult {
        network,
        target,
        low: w.low,
        high: w.high,
        ideal_ratio: w.q_target,
        sensitivity_r2,
        min_yield,
        choices,
        recommended,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn spec48() -> ChooseSpec {
        let mut s = ChooseSpec::new(Network::NonInverting, 48.0, 0.005);
        s.total_min = 1e4;
        s.total_max = 1e6;
        s
    }

    #[test]
    fn exact_yield_agrees_with_monte_carlo_of_the_same_pair() {
        // The closed form against the module's own Monte Carlo of a one-resistor
        // leg (a different computation: draws, not areas), within 4 standard errors.
        for (r1, r2, p) in [
            (24.3e3, 1.15e6, 0.01),
            (10e3, 470e3, 0.005),
            (1e3, 47.5e3, 0.02),
        ] {
            let (lo, hi) = (48.0 * 0.995 - 1.0, 48.0 * 1.005 - 1.0);
            let exact = exact_yield(lo, hi, r1, r2, p);
            let (mc, se) = monte_carlo_yield(lo, hi, r1, Leg::single(r2), p, 200_000, 7);
            assert!(
                libm::fabs(exact - mc) <= 4.0 * se,
                "{r1} {r2} {p}: {exact} vs {mc} ± {se}"
            );
        }
    }

    #[test]
    fn exactly_centred_pair_at_one_percent() {
        // Linear estimate (common practice, no source): the gain error is
        // (47/48)(e2 − e1), triangular with half-width (47/48)·2 %, so
        // P(|error| ≤ 0.5 %) ≈ 1 − (1 − 0.5/1.958)² = 0.4455. The exact value is
        // checked to 1e-9 against mpmath in tests/network_choose.rs.
        let (lo, hi) = (48.0 * 0.995 - 1.0, 48.0 * 1.005 - 1.0);
        let y = exact_yield(lo, hi, 10e3, 470e3, 0.01);
        let w = 47.0 / 48.0 * 0.02;
        let linear = 1.0 - (1.0 - 0.005 / w) * (1.0 - 0.005 / w);
        assert!(libm::fabs(y - linear) < 2e-3, "{y} vs {linear}");
    }

    #[test]
    fn yield_is_one_when_the_worst_case_is_inside_the_window() {
        let mut s = spec48();
        s.tolerance = 0.2;
        let r = choose_parts(&s).unwrap();
        for c in &r.choices {
            if c.worst_low >= r.low && c.worst_high <= r.high {
                assert_eq!(c.yield_, 1.0, "{c:?}");
            }
        }
        assert!(r.choices.iter().any(|c| c.yield_ == 1.0));
    }

    #[test]
    fn e96_alone_does_not_reach_48_within_half_a_percent() {
        let mut s = spec48();
        s.series = alloc::vec![Series::E96];
        s.grades = alloc::vec![0.01, 0.001];
        s.combine = Combine::None;
        let r = choose_parts(&s).unwrap();
        assert!(r.recommended.is_none());
        let best = r.choices[0];
        assert!(libm::fabs(best.nominal_error) > 0.005, "{best:?}");
        // With a two-part leg at 0.1 % the nominal is exact and the yield 1.
        s.combine = Combine::Either;
        let r = choose_parts(&s).unwrap();
        let rec = r.recommended.unwrap();
        assert_eq!((rec.grade, rec.parts, rec.yield_), (0.001, 3, 1.0));
    }

    #[test]
    fn sensitivity_and_loop_gain() {
        let mut s = spec48();
        let r = choose_parts(&s).unwrap();
        // S_R2 = (G − 1)/G for the ideal non-inverting gain.
        assert!(libm::fabs(r.sensitivity_r2 - 47.0 / 48.0) < 1e-15);
        // With A = 1e4 the pair must be set higher: 1 + q = 48·A/(A − 48).
        s.open_loop_gain = Some(1e4);
        let r = choose_parts(&s).unwrap();
        assert!(libm::fabs(1.0 + r.ideal_ratio - 48.0 * 1e4 / (1e4 - 48.0)) < 1e-9);
        for c in &r.choices {
            let q = c.r2.value / c.r1;
            let g = (1.0 + q) * 1e4 / (1e4 + 1.0 + q);
            assert!(libm::fabs(c.nominal - g) < 1e-12);
        }
    }

    #[test]
    fn seeded_and_reproducible() {
        let a = choose_parts(&spec48()).unwrap();
        let b = choose_parts(&spec48()).unwrap();
        assert_eq!(a, b);
        let mut s = spec48();
        s.seed = 2;
        let c = choose_parts(&s).unwrap();
        assert!(a
            .choices
            .iter()
            .zip(&c.choices)
            .any(|(x, y)| x.yield_ != y.yield_));
    }

    #[test]
    fn ranking_meets_first_in_cost_order() {
        let r = choose_parts(&spec48()).unwrap();
        let meets: Vec<_> = r.choices.iter().take_while(|c| c.meets).collect();
        assert!(!meets.is_empty());
        assert!(meets.windows(2).all(|w| w[0].cost_rank < w[1].cost_rank));
        let rest = &r.choices[meets.len()..];
        assert!(rest.iter().all(|c| !c.meets));
        assert!(rest.windows(2).all(|w| w[0].yield_ >= w[1].yield_));
        assert_eq!(r.recommended, Some(r.choices[0]));
        // No series looser than its customary tolerance.
        assert!(r.choices.iter().all(|c| c.grade <= c.series.tolerance()));
    }

    #[test]
    fn bad_inputs_name_their_field() {
        let e = |f: &dyn Fn(&mut ChooseSpec)| {
            let mut s = spec48();
            f(&mut s);
            choose_parts(&s).unwrap_err().param()
        };
        assert_eq!(e(&|s| s.target = 0.5), "target");
        assert_eq!(e(&|s| s.target = f64::NAN), "target");
        assert_eq!(e(&|s| s.tolerance = 0.0), "tolerance");
        assert_eq!(e(&|s| s.tolerance = 1.0), "tolerance");
        assert_eq!(e(&|s| s.grades = alloc::vec![0.01, -0.01]), "grades");
        assert_eq!(e(&|s| s.grades = alloc::vec![1.5]), "grades");
        assert_eq!(e(&|s| s.grades = alloc::vec![0.01; 9]), "grades");
        assert_eq!(e(&|s| s.grades.clear()), "grades");
        assert_eq!(e(&|s| s.series.clear()), "series");
        assert_eq!(e(&|s| s.open_loop_gain = Some(48.0)), "open_loop_gain");
        assert_eq!(e(&|s| s.open_loop_gain = Some(-1.0)), "open_loop_gain");
        assert_eq!(e(&|s| s.min_yield = 1.5), "min_yield");
        assert_eq!(e(&|s| s.min_yield = 0.0), "min_yield");
        assert_eq!(e(&|s| s.trials = 10), "trials");
        assert_eq!(e(&|s| s.trials = MAX_TRIALS + 1), "trials");
        assert_eq!(e(&|s| s.total_max = 10.0), "total_max");
        let mut d = ChooseSpec::new(Network::Divider, 0.1, 0.01);
        d.open_loop_gain = Some(1e5);
        assert_eq!(choose_parts(&d).unwrap_err().param(), "open_loop_gain");
        d.open_loop_gain = None;
        d.target = 0.999;
        assert_eq!(choose_parts(&d).unwrap_err().param(), "tolerance");
    }

    #[test]
    fn inverting_and_divider_windows() {
        let r = choose_parts(&ChooseSpec::new(Network::Inverting, -10.0, 0.01)).unwrap();
        assert!(r.low < r.high && r.low < -10.0 && r.high > -10.0);
        assert!(r.choices.iter().all(|c| c.nominal < 0.0));
        // A window given by its ends: inverting −47.76 … −48.24 is the ±0.5 % one.
        let mut by_tol = ChooseSpec::new(Network::Inverting, -48.0, 0.005);
        by_tol.grades = alloc::vec![0.01];
        let mut by_ends = by_tol.clone();
        by_ends.tolerance = f64::NAN;
        by_ends.limits = Some((-48.0 * 1.005, -48.0 * 0.995));
        assert_eq!(
            choose_parts(&by_tol).unwrap(),
            choose_parts(&by_ends).unwrap()
        );
        by_ends.limits = Some((-40.0, -50.0));
        assert_eq!(choose_parts(&by_ends).unwrap_err().param(), "upper");
        by_ends.limits = Some((-50.0, 40.0));
        assert_eq!(choose_parts(&by_ends).unwrap_err().param(), "upper");
        by_ends.limits = Some((f64::NAN, -40.0));
        assert_eq!(choose_parts(&by_ends).unwrap_err().param(), "lower");
        let r = choose_parts(&ChooseSpec::new(Network::Divider, 0.25, 0.01)).unwrap();
        assert!(r.recommended.is_some());
        let c = r.recommended.unwrap();
        assert!(c.yield_ >= 0.99 && c.meets);
        assert!(c.worst_low <= c.nominal && c.nominal <= c.worst_high);
    }
}
