//! Seeded Monte Carlo of an op-amp stage over resistor tolerances and the
//! open-loop gain spread.
//!
//! Each trial draws R1, R2 and A (in that order) and evaluates one quantity of
//! the stage (formulas in [`super::worstcase`]):
//! Resistors ([`Distribution`]):
//! - uniform: R = R_nom·(1 + tol·u), u uniform on [−1, 1);
//! - normal: R = R_nom·(1 + tol·z/k), z standard normal, so the tolerance is k
//!   standard deviations (k = 3 is customary). A draw that would make a part
//!   zero or negative is drawn again (a truncation beyond k·(1/tol) standard
//!   deviations, never reached for tolerances below 10 % and k ≥ 3).
//!
//! Open-loop gain ([`GainDistribution`]), from the data sheet's a_min, a_typ and
//! a_max. Gains spread by ratios (data sheets quote them in dB), so the
//! distributions live on x = ln A (l = ln a_min, m = ln a_typ, h = ln a_max):
//! - log-normal (the default): a split normal on ln A with its median at ln a_typ,
//!   x = m + σ·z with z standard normal truncated to |z| ≤ k (drawn again
//!   outside), σ = (m − l)/k below the median and (h − m)/k above it. Typical is
//!   read as the centre of production (half the parts below, half above) and min
//!   and max as the screened limits, k standard deviations out on their own side
//!   (k = 3 customary); an asymmetric data sheet (typical 2e4 between 1e4 and
//!   1e6) keeps its asymmetry. It honours all three figures: never outside
//!   min … max (which the worst case also treats as hard limits), median at
//!   typical. Why the default: a data sheet's typical is a central value of
//!   production, not a most-likely value or a midpoint (common practice, no
//!   source);
//! - log-triangular: ln A triangular from l to h with its mode at m, drawn by
//!   inverting its distribution function: with u uniform on [0, 1),
//!   x = l + √(u·(h − l)·(m − l)) for u·(h − l) < m − l, else
//!   x = h − √((1 − u)·(h − l)·(h − m)). The three-point (least, most likely,
//!   largest) estimate; its median lies toward the longer side;
//! - log-uniform: ln A uniform from l to h (a_typ unused), for a data sheet
//!   whose typical is not to be trusted;
//! - uniform: A uniform on [a_min, a_max) (a_typ unused; the 0.1 behaviour,
//!   whose mean follows (a_min + a_max)/2, kept for comparison).
//!
//! Generator: xoshiro256++ (D. Blackman & S. Vigna, "Scrambled linear
//! pseudorandom number generators", ACM TOMS 47(4), 2021, from memory) from the
//! `rand_xoshiro` crate, seeded by its `seed_from_u64` (SplitMix64); 64-bit integer
//! operations only, which WebAssembly has natively. Uniform doubles from the top
//! 53 bits; normal deviates by
//! Marsaglia's polar form of the Box–Muller transform (G. Marsaglia & T. A. Bray,
//! "A convenient method for generating normal variables", SIAM Review 6(3),
//! 1964, from memory), with `libm::log` and a correctly rounded square root
//! (`crate::float`). Only IEEE-754 basic operations and libm (pure Rust, no
//! platform maths) are used, and the sums run
//! in trial order, so the same seed gives bit-identical results natively and in
//! WebAssembly.
//!
//! Statistics: mean; sample standard deviation (n − 1) about it (two passes);
//! percentiles 0.1, 1, 5, 50, 95, 99 and 99.9 by linear interpolation between
//! order statistics at (n − 1)·p/100 (numpy's default, "linear"); yield = share of
//! trials within the spec limits (inclusive); histogram of equal bins from the
//! smallest to the largest value.

#[cfg(any(test, doc))]
use super::worstcase::stage_gain;
use super::worstcase::{stage_metric, Metric, Stage, StageSpec};
use crate::check;
use crate::error::{Error, Result};
use alloc::vec::Vec;
use core::str::FromStr;
use rand_core::{RngCore, SeedableRng};
use rand_xoshiro::Xoshiro256PlusPlus;

/// Most trials one run may ask for.
pub const MAX_TRIALS: usize = 1_000_000;
/// Most histogram bins.
pub const MAX_BINS: usize = 1000;
/// The percentiles reported, in %.
pub const PERCENTILES: [f64; 7] = [0.1, 1.0, 5.0, 50.0, 95.0, 99.0, 99.9];
/// Largest seed the JS number form accepts, 2⁵³ − 1 (`Number.MAX_SAFE_INTEGER`).
pub const MAX_NUMBER_SEED: f64 = 9_007_199_254_740_991.0;

/// How a part value is spread about its nominal.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase", tag = "kind"))]
pub enum Distribution {
    /// Uniform over the tolerance band.
    Uniform,
    /// Normal with the tolerance at k standard deviations.
    Normal {
        /// Standard deviations per tolerance, > 0 (3 customary).
        k: f64,
    },
}

impl Distribution {
    /// Parse `"uniform"` or `"normal"` (the latter with the given k, whose
    /// parameter name is `k_param` in errors).
    ///
    /// # Errors
    /// [`Error::UnknownName`] on `distribution`; `k` not finite or ≤ 0 for normal.
    pub fn from_name(name: &str, k: f64, k_param: &'static str) -> Result<Distribution> {
        let t = name.trim();
        if t.eq_ignore_ascii_case("uniform") {
            Ok(Distribution::Uniform)
        } else if t.eq_ignore_ascii_case("normal") {
            Ok(Distribution::Normal {
                k: check::positive(k_param, k)?,
            })
        } else {
            Err(Error::UnknownName {
                param: "distribution",
                expected: "uniform, normal",
            })
        }
    }
}

/// How the open-loop gain is spread between a_min and a_max (module doc).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case", tag = "kind"))]
pub enum GainDistribution {
    /// ln A a split normal with its median at ln a_typ and a_min, a_max k standard
    /// deviations out on their sides, truncated there (the default, k = 3).
    LogNormal {
        /// Standard deviations from typical to each limit, > 0 (3 customary).
        k: f64,
    },
    /// ln A triangular with its mode at ln a_typ.
    LogTriangular,
    /// ln A uniform between ln a_min and ln a_max.
    LogUniform,
    /// A uniform between a_min and a_max.
    Uniform,
}

/// The accepted gain distribution names.
pub const GAIN_DISTRIBUTION_NAMES: &str = "log-normal, log-triangular, log-uniform, uniform";

impl Default for GainDistribution {
    /// The log-normal with k = 3 (see the module doc for why).
    fn default() -> Self {
        GainDistribution::LogNormal { k: 3.0 }
    }
}

impl GainDistribution {
    /// Parse a name of [`GAIN_DISTRIBUTION_NAMES`] (the log-normal with the given
    /// k, whose parameter name is `k_param` in errors).
    ///
    /// # Errors
    /// [`Error::UnknownName`] on `gain_distribution`; `k` not finite or ≤ 0 for
    /// log-normal.
    ///
    /// # Example
    /// ```
    /// use loopwright::network::GainDistribution;
    /// assert_eq!(GainDistribution::from_name("log-triangular", 3.0, "k_gain").unwrap(), GainDistribution::LogTriangular);
    /// assert_eq!(GainDistribution::from_name("normal", 3.0, "k_gain").unwrap_err().param(), "gain_distribution");
    /// ```
    pub fn from_name(name: &str, k: f64, k_param: &'static str) -> Result<GainDistribution> {
        let t = name.trim();
        let is = |n: &str| t.eq_ignore_ascii_case(n);
        if is("log-triangular") {
            Ok(GainDistribution::LogTriangular)
        } else if is("log-uniform") {
            Ok(GainDistribution::LogUniform)
        } else if is("log-normal") {
            Ok(GainDistribution::LogNormal {
                k: check::positive(k_param, k)?,
            })
        } else if is("uniform") {
            Ok(GainDistribution::Uniform)
        } else {
            Err(Error::UnknownName {
                param: "gain_distribution",
                expected: GAIN_DISTRIBUTION_NAMES,
            })
        }
    }
}

/// A Monte Carlo run.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MonteCarloSpec {
    /// The stage and its tolerances.
    pub stage: StageSpec,
    /// Spread of R1 and R2.
    pub resistors: Distribution,
    /// Spread of the open-loop gain.
    pub open_loop_gain: GainDistribution,
    /// Which quantity to collect.
    pub metric: Metric,
    /// Trials, 2 … [`MAX_TRIALS`].
    pub trials: usize,
    /// Generator seed.
    pub seed: u64,
    /// Lower spec limit for the yield (inclusive), in the metric's unit.
    pub lower: Option<f64>,
    /// Upper spec limit for the yield (inclusive).
    pub upper: Option<f64>,
    /// Histogram bins, 1 … [`MAX_BINS`].
    pub bins: usize,
}

/// One percentile.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Percentile {
    /// Percent, e.g. 99.9.
    pub percent: f64,
    /// The value below which that share of trials falls.
    pub value: f64,
}

/// Histogram of equal-width bins, ready to plot.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Histogram {
    /// Bin edges, bins + 1 of them, ascending (all equal when every trial gave
    /// the same value).
    pub edges: Vec<f64>,
    /// Trials per bin; the last bin includes its upper edge.
    pub counts: Vec<u32>,
}

/// Statistics of a sample.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct SampleStats {
    /// Sample size.
    pub count: usize,
    /// Arithmetic mean.
    pub mean: f64,
    /// Sample standard deviation (n − 1).
    pub sd: f64,
    /// Smallest value.
    pub min: f64,
    /// Largest value.
    pub max: f64,
    /// The [`PERCENTILES`].
    pub percentiles: [Percentile; 7],
    /// Share of values within the limits, 0 … 1; `None` without limits.
    pub yield_fraction: Option<f64>,
    /// Histogram.
    pub histogram: Histogram,
}

/// A Monte Carlo result.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct MonteCarloResult {
    /// The quantity collected.
    pub metric: Metric,
    /// The seed used.
    pub seed: u64,
    /// The quantity at nominal R1, R2 and a_typ.
    pub nominal: f64,
    /// Statistics of the trials.
    pub stats: SampleStats,
}

/// A seed given as a JS number: an integer from 0 to 2⁵³ − 1.
///
/// # Errors
/// `seed` not finite, negative, fractional or above 2⁵³ − 1.
///
/// # Example
/// ```
/// use loopwright::network::seed_from_number;
/// assert_eq!(seed_from_number(42.0).unwrap(), 42);
/// assert_eq!(seed_from_number(1.5).unwrap_err().param(), "seed");
/// ```
pub fn seed_from_number(seed: f64) -> Result<u64> {
    let s = check::non_negative("seed", seed)?;
    if s != crate::float::trunc(s) || s > MAX_NUMBER_SEED {
        return Err(Error::OutOfDomain {
            param: "seed",
            requirement: "must be a whole number from 0 to 2^53 - 1",
        });
    }
    Ok(s as u64)
}

/// A count given as a JS number: a whole number from 0 to `limit`.
///
/// # Errors
/// [`Error::NotFinite`]; [`Error::OutOfDomain`] when negative or fractional;
/// [`Error::TooLarge`] above `limit`; all on `param`.
///
/// # Example
/// ```
/// use loopwright::network::montecarlo::count_from_number;
/// assert_eq!(count_from_number("trials", 1e6, 1_000_000).unwrap(), 1_000_000);
/// assert_eq!(count_from_number("trials", 1e10, 1_000_000).unwrap_err().code(), "too_large");
/// ```
pub fn count_from_number(param: &'static str, x: f64, limit: usize) -> Result<usize> {
    let x = check::non_negative(param, x)?;
    if x != crate::float::trunc(x) {
        return Err(Error::OutOfDomain {
            param,
            requirement: "must be a whole number",
        });
    }
    if x > limit as f64 {
        return Err(Error::TooLarge {
            param,
            limit: limit as u64,
        });
    }
    Ok(x as usize)
}

/// The generator and the spare normal deviate of the polar method.
pub(crate) struct Draws {
    rng: Xoshiro256PlusPlus,
    spare: Option<f64>,
}

impl Draws {
    pub(crate) fn new(seed: u64) -> Draws {
        Draws {
            rng: Xoshiro256PlusPlus::seed_from_u64(seed),
            spare: None,
        }
    }

    /// Uniform on [0, 1) with 53 random bits.
    #[inline(always)]
    pub(crate) fn unit(&mut self) -> f64 {
        (self.rng.next_u64() >> 11) as f64 * (1.0 / 9_007_199_254_740_992.0)
    }

    /// Standard normal by the polar method (two deviates per accepted pair).
    pub(crate) fn normal(&mut self) -> f64 {
        if let Some(z) = self.spare.take() {
            return z;
        }
        loop {
            let u = 2.0 * self.unit() - 1.0;
            let v = 2.0 * self.unit() - 1.0;
            let s = u * u + v * v;
            if s > 0.0 && s < 1.0 {
                let f = crate::float::sqrt(-2.0 * libm::log(s) / s);
                self.spare = Some(v * f);
                return u * f;
            }
        }
    }

    /// A positive part value about `nominal` with relative tolerance `tol`.
    #[inline(always)]
    fn part(&mut self, dist: Distribution, nominal: f64, tol: f64) -> f64 {
        loop {
            let x = match dist {
                Distribution::Uniform => nominal * (1.0 + tol * (2.0 * self.unit() - 1.0)),
                Distribution::Normal { k } => nominal * (1.0 + tol * self.normal() / k),
            };
            if x > 0.0 {
                return x;
            }
        }
    }

    /// An open-loop gain drawn from `range` (a_min, a_typ, a_max and their
    /// logarithms, taken once per run), by its distribution (module doc). Always
    /// within [a_min, a_max].
    #[inline(always)]
    pub(crate) fn gain(&mut self, range: &GainRange) -> f64 {
        let GainRange {
            dist,
            lo,
            hi,
            l,
            m,
            h,
        } = *range;
        let x = match dist {
            GainDistribution::Uniform => return lo + (hi - lo) * self.unit(),
            GainDistribution::LogUniform => l + (h - l) * self.unit(),
            GainDistribution::LogTriangular => {
                let u = self.unit();
                if h <= l {
                    l
                } else if u * (h - l) < m - l {
                    l + crate::float::sqrt(u * (h - l) * (m - l))
                } else {
                    h - crate::float::sqrt((1.0 - u) * (h - l) * (h - m))
                }
            }
            GainDistribution::LogNormal { k } => loop {
                let z = self.normal();
                if libm::fabs(z) <= k {
                    let sigma = if z < 0.0 { (m - l) / k } else { (h - m) / k };
                    break m + sigma * z;
                }
            },
        };
        // exp(ln lo) may round a hair outside the range: keep the draw inside.
        libm::exp(x).clamp(lo, hi)
    }
}

/// The open-loop gain's range for [`Draws::gain`]: a_min (`lo`) ≤ a_typ ≤ a_max
/// (`hi`), all > 0, and their natural logarithms `l`, `m`, `h`, computed once per
/// run instead of once per trial (the same values, so the same draws).
#[derive(Clone, Copy)]
pub(crate) struct GainRange {
    dist: GainDistribution,
    lo: f64,
    hi: f64,
    l: f64,
    m: f64,
    h: f64,
}

impl GainRange {
    pub(crate) fn new(dist: GainDistribution, lo: f64, typ: f64, hi: f64) -> GainRange {
        GainRange {
            dist,
            lo,
            hi,
            l: libm::log(lo),
            m: libm::log(typ),
            h: libm::log(hi),
        }
    }
}

/// The closed-loop gain of the Monte Carlo inner loop: the operations of
/// [`stage_gain`] (β = R1/(R1 + R2), T = A·β, D = 1 + T, Af = A/D, times
/// −R2/(R1 + R2) when inverting) in the same order, so bit-identical to it, without
/// the oscillation test of [`crate::feedback::closed_loop_gain`]: the parts are
/// drawn positive, so D > 1 and the loop cannot oscillate. The test
/// `inner_loop_gain_equals_the_feedback_relation` checks the identity.
#[inline(always)]
fn gain_of_positive_parts(stage: Stage, r1: f64, r2: f64, a: f64) -> Result<f64> {
    let sum = r1 + r2;
    let beta = r1 / sum;
    let af = a / (1.0 + a * beta);
    let v = match stage {
        Stage::NonInverting => af,
        Stage::Inverting => -(r2 / sum) * af,
    };
    check::result("gain", v)
}

fn validate_distribution(param: &'static str, d: Distribution) -> Result<Distribution> {
    match d {
        Distribution::Uniform => Ok(d),
        Distribution::Normal { k } => check::positive(param, k).map(|k| Distribution::Normal { k }),
    }
}

fn validate_gain_distribution(d: GainDistribution) -> Result<GainDistribution> {
    match d {
        GainDistribution::LogNormal { k } => {
            check::positive("k_gain", k).map(|k| GainDistribution::LogNormal { k })
        }
        other => Ok(other),
    }
}

fn validate_trials(trials: usize) -> Result<usize> {
    if trials > MAX_TRIALS {
        Err(Error::TooLarge {
            param: "trials",
            limit: MAX_TRIALS as u64,
        })
    } else if trials < 2 {
        Err(Error::OutOfDomain {
            param: "trials",
            requirement: "must be at least 2",
        })
    } else {
        Ok(trials)
    }
}

fn validate_limits(lower: Option<f64>, upper: Option<f64>) -> Result<()> {
    let lower = lower.map(|x| check::finite("lower", x)).transpose()?;
    let upper = upper.map(|x| check::finite("upper", x)).transpose()?;
    if let (Some(l), Some(u)) = (lower, upper) {
        if u < l {
            return Err(Error::OutOfDomain {
                param: "upper",
                requirement: "must be at least lower",
            });
        }
    }
    Ok(())
}

fn validate_bins(bins: usize) -> Result<usize> {
    if bins > MAX_BINS {
        Err(Error::TooLarge {
            param: "bins",
            limit: MAX_BINS as u64,
        })
    } else if bins == 0 {
        Err(Error::OutOfDomain {
            param: "bins",
            requirement: "must be at least 1",
        })
    } else {
        Ok(bins)
    }
}

/// Draw the trials of a run and return the raw values, in trial order.
///
/// # Errors
/// As [`monte_carlo`].
pub fn monte_carlo_samples(spec: &MonteCarloSpec) -> Result<Vec<f64>> {
    let stage = spec.stage.validated()?;
    let resistors = validate_distribution("k", spec.resistors)?;
    let gain_dist = validate_gain_distribution(spec.open_loop_gain)?;
    let trials = validate_trials(spec.trials)?;
    let gain_range = GainRange::new(gain_dist, stage.a_min, stage.a_typ, stage.a_max);
    let mut draws = Draws::new(spec.seed);
    let mut out = Vec::with_capacity(trials);
    for _ in 0..trials {
        let r1 = draws.part(resistors, stage.r1, stage.tol_r1);
        let r2 = draws.part(resistors, stage.r2, stage.tol_r2);
        let a = draws.gain(&gain_range);
        let v = if spec.metric == Metric::Gain {
            gain_of_positive_parts(stage.stage, r1, r2, a)?
        } else {
            stage_metric(&stage, spec.metric, r1, r2, a)?
        };
        out.push(v);
    }
    Ok(out)
}

/// Monte Carlo of one quantity of a stage: mean, standard deviation,
/// percentiles, yield and histogram, reproducible from the seed.
///
/// Sampling and statistics as in the module doc.
///
/// # Errors
/// The stage fields as in [`super::worst_case`] (tolerances ≤ 0 rejected);
/// `k` / `k_gain` (normal k of the resistors / log-normal k of the gain) not
/// finite or ≤ 0;
/// `trials` < 2 or above [`MAX_TRIALS`] ([`Error::TooLarge`]); `lower`/`upper`
/// not finite or `upper` < `lower`; `bins` 0 or above [`MAX_BINS`].
///
/// # Example
/// ```
/// use loopwright::network::{monte_carlo, Distribution, GainDistribution, Hold, Metric,
///     MonteCarloSpec, Stage, StageSpec};
/// let stage = StageSpec { stage: Stage::NonInverting, r1: 1e3, r2: 9e3, tol_r1: 0.01, tol_r2: 0.01,
///     a_min: 1e5, a_typ: 2e5, a_max: 1e6, ri: 1e6, ro: 100.0, pole_hz: 10.0,
///     hold: Hold::GainBandwidth };
/// let mut spec = MonteCarloSpec { stage, resistors: Distribution::Normal { k: 3.0 },
///     open_loop_gain: GainDistribution::LogTriangular, metric: Metric::Gain, trials: 10_000, seed: 7,
///     lower: Some(9.9), upper: Some(10.1), bins: 40 };
/// let r = monte_carlo(&spec).unwrap();
/// assert!((r.stats.mean - 10.0).abs() < 0.01 && r.stats.yield_fraction.unwrap() > 0.9);
/// assert_eq!(r, monte_carlo(&spec).unwrap()); // same seed, same numbers
/// spec.trials = 2_000_000;
/// assert_eq!(monte_carlo(&spec).unwrap_err().code(), "too_large");
/// ```
pub fn monte_carlo(spec: &MonteCarloSpec) -> Result<MonteCarloResult> {
    validate_limits(spec.lower, spec.upper)?;
    let bins = validate_bins(spec.bins)?;
    let mut samples = monte_carlo_samples(spec)?;
    let stage = spec.stage;
    let nominal = stage_metric(&stage, spec.metric, stage.r1, stage.r2, stage.a_typ)?;
    let stats = sample_stats(&mut samples, spec.lower, spec.upper, bins)?;
    Ok(MonteCarloResult {
        metric: spec.metric,
        seed: spec.seed,
        nominal,
        stats,
    })
}

/// Statistics of any sample (reordered in place): mean, sd, min, max,
/// percentiles, yield within [lower, upper] and a histogram of `bins` bins.
///
/// # Errors
/// `samples` with fewer than 2 values, more than [`MAX_TRIALS`] or a non-finite
/// value; limits and `bins` as in [`monte_carlo`].
///
/// # Example
/// ```
/// use loopwright::network::sample_stats;
/// let mut x: Vec<f64> = (0..=100).map(f64::from).collect();
/// let s = sample_stats(&mut x, None, Some(49.5), 10).unwrap();
/// assert_eq!((s.mean, s.percentiles[3].value, s.yield_fraction), (50.0, 50.0, Some(50.0 / 101.0)));
/// assert_eq!(sample_stats(&mut [1.0], None, None, 10).unwrap_err().param(), "samples");
/// ```
pub fn sample_stats(
    samples: &mut [f64],
    lower: Option<f64>,
    upper: Option<f64>,
    bins: usize,
) -> Result<SampleStats> {
    validate_limits(lower, upper)?;
    let bins = validate_bins(bins)?;
    let n = samples.len();
    if n > MAX_TRIALS {
        return Err(Error::TooLarge {
            param: "samples",
            limit: MAX_TRIALS as u64,
        });
    }
    if n < 2 {
        return Err(Error::OutOfDomain {
            param: "samples",
            requirement: "must hold at least 2 values",
        });
    }
    let mut sum = 0.0;
    let mut min = f64::INFINITY;
    let mut max = f64::NEG_INFINITY;
    for &x in samples.iter() {
        check::finite("samples", x)?;
        sum += x;
        min = min.min(x);
        max = max.max(x);
    }
    let mean = check::result("mean", sum / n as f64)?;
    let mut ss = 0.0;
    let mut inside = 0usize;
    for &x in samples.iter() {
        let d = x - mean;
        ss += d * d;
        if lower.map_or(true, |l| x >= l) && upper.map_or(true, |u| x <= u) {
            inside += 1;
        }
    }
    let sd = check::result("sd", crate::float::sqrt(ss / (n - 1) as f64))?;
    let yield_fraction = (lower.is_some() || upper.is_some()).then(|| inside as f64 / n as f64);

    let width = (max - min) / bins as f64;
    let edges: Vec<f64> = (0..=bins)
        .map(|i| {
            if i == bins {
                max
            } else {
                min + width * i as f64
            }
        })
        .collect();
    let mut counts = alloc::vec![0u32; bins];
    for &x in samples.iter() {
        let i = if width > 0.0 {
            crate::float::floor((x - min) / width) as usize
        } else {
            0
        };
        if let Some(c) = counts.get_mut(i.min(bins - 1)) {
            *c += 1;
        }
    }

    // Order statistics needed by the percentiles: floor(h) and floor(h) + 1.
    let positions = PERCENTILES.map(|p| (n - 1) as f64 * p / 100.0);
    let mut wanted: Vec<usize> = Vec::with_capacity(14);
    for h in positions {
        let lo = crate::float::floor(h) as usize;
        wanted.push(lo);
        if lo + 1 < n {
            wanted.push(lo + 1);
        }
    }
    crate::sort::sort_by(&mut wanted, usize::cmp);
    wanted.dedup();
    let mut found: Vec<(usize, f64)> = Vec::with_capacity(wanted.len());
    select_many(samples, 0, &wanted, &mut found);
    let stat = |k: usize| {
        found
            .iter()
            .find(|&&(i, _)| i == k)
            .map_or(0.0, |&(_, v)| v)
    };
    let percentiles = core::array::from_fn(|j| {
        let h = positions[j];
        let lo = crate::float::floor(h) as usize;
        let frac = h - lo as f64;
        let a = stat(lo);
        let value = if frac > 0.0 {
            a + frac * (stat(lo + 1) - a)
        } else {
            a
        };
        Percentile {
            percent: PERCENTILES[j],
            value,
        }
    });
    Ok(SampleStats {
        count: n,
        mean,
        sd,
        min,
        max,
        percentiles,
        yield_fraction,
        histogram: Histogram { edges, counts },
    })
}

/// Put the order statistics at the sorted absolute indices `ks` (all within
/// `base .. base + data.len()`) into `out`, by recursive selection: O(n log m).
fn select_many(data: &mut [f64], base: usize, ks: &[usize], out: &mut Vec<(usize, f64)>) {
    let mid = ks.len() / 2;
    let Some(&k) = ks.get(mid) else { return };
    let Some(local) = k.checked_sub(base).filter(|&l| l < data.len()) else {
        return;
    };
    let (left, &mut v, right) = data.select_nth_unstable_by(local, f64::total_cmp);
    out.push((k, v));
    select_many(left, base, ks.get(..mid).unwrap_or(&[]), out);
    select_many(right, k + 1, ks.get(mid + 1..).unwrap_or(&[]), out);
}

impl FromStr for Distribution {
    type Err = Error;

    /// `"uniform"`, or `"normal"` with k = 3.
    ///
    /// # Errors
    /// [`Error::UnknownName`] on `distribution`.
    fn from_str(s: &str) -> Result<Self> {
        Distribution::from_name(s, 3.0, "k")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn spec() -> MonteCarloSpec {
        MonteCarloSpec {
            stage: StageSpec {
                stage: Stage::Inverting,
                r1: 10e3,
                r2: 47e3,
                tol_r1: 0.01,
                tol_r2: 0.01,
                a_min: 5e4,
                a_typ: 1e5,
                a_max: 2e5,
                ri: 1e6,
                ro: 75.0,
                pole_hz: 5.0,
                hold: crate::network::Hold::GainBandwidth,
            },
            resistors: Distribution::Uniform,
            open_loop_gain: GainDistribution::Uniform,
            metric: Metric::Gain,
            trials: 20_000,
            seed: 1,
            lower: None,
            upper: None,
            bins: 20,
        }
    }

    #[test]
    fn percentiles_match_a_full_sort() {
        // Slow reference: sort everything and interpolate as numpy's "linear".
        let s = spec();
        let raw = monte_carlo_samples(&s).unwrap();
        let mut sorted = raw.clone();
        sorted.sort_by(f64::total_cmp);
        let stats = sample_stats(&mut raw.clone(), None, None, 10).unwrap();
        for p in stats.percentiles {
            let h = (sorted.len() - 1) as f64 * p.percent / 100.0;
            let lo = h.floor() as usize;
            let want = sorted[lo]
                + (h - lo as f64) * (sorted[(lo + 1).min(sorted.len() - 1)] - sorted[lo]);
            assert_eq!(p.value, want, "p{}", p.percent);
        }
        assert_eq!(
            stats.histogram.counts.iter().sum::<u32>() as usize,
            raw.len()
        );
        assert_eq!((stats.min, stats.max), (sorted[0], *sorted.last().unwrap()));
    }

    #[test]
    fn monte_carlo_stays_inside_the_worst_case() {
        let s = spec();
        let w = crate::network::worst_case(&s.stage).unwrap();
        let r = monte_carlo(&s).unwrap();
        assert!(r.stats.min >= w.gain.min && r.stats.max <= w.gain.max);
    }

    #[test]
    fn seeds_reproduce_and_differ() {
        let a = monte_carlo_samples(&spec()).unwrap();
        let b = monte_carlo_samples(&spec()).unwrap();
        let mut other = spec();
        other.seed = 2;
        assert_eq!(a, b);
        assert_ne!(a, monte_carlo_samples(&other).unwrap());
    }

    #[test]
    fn bad_inputs_are_named() {
        let mut s = spec();
        s.trials = MAX_TRIALS + 1;
        assert_eq!(
            monte_carlo(&s).unwrap_err(),
            Error::TooLarge {
                param: "trials",
                limit: 1_000_000
            }
        );
        let mut s = spec();
        s.resistors = Distribution::Normal { k: 0.0 };
        assert_eq!(monte_carlo(&s).unwrap_err().param(), "k");
        let mut s = spec();
        s.open_loop_gain = GainDistribution::LogNormal { k: f64::NAN };
        assert_eq!(monte_carlo(&s).unwrap_err().param(), "k_gain");
        let mut s = spec();
        s.stage.tol_r1 = 0.0;
        assert_eq!(monte_carlo(&s).unwrap_err().param(), "tol_r1");
        let mut s = spec();
        (s.lower, s.upper) = (Some(2.0), Some(1.0));
        assert_eq!(monte_carlo(&s).unwrap_err().param(), "upper");
        let mut s = spec();
        s.bins = 0;
        assert_eq!(monte_carlo(&s).unwrap_err().param(), "bins");
        assert_eq!(seed_from_number(-1.0).unwrap_err().param(), "seed");
        assert_eq!(
            "lognormal".parse::<Distribution>().unwrap_err().param(),
            "distribution"
        );
    }

    #[test]
    fn inner_loop_gain_equals_the_feedback_relation() {
        // Identity: the inlined gain is bit-identical to the one built on
        // crate::feedback::closed_loop_gain, over a spread of positive parts.
        let mut d = Draws::new(5);
        for _ in 0..20_000 {
            let r1 = libm::pow(10.0, 6.0 * d.unit());
            let r2 = libm::pow(10.0, 6.0 * d.unit());
            let a = libm::pow(10.0, 1.0 + 6.0 * d.unit());
            for stage in [Stage::NonInverting, Stage::Inverting] {
                let fast = gain_of_positive_parts(stage, r1, r2, a).unwrap();
                assert_eq!(
                    fast.to_bits(),
                    stage_gain(stage, r1, r2, a).unwrap().to_bits(),
                    "{r1} {r2} {a}"
                );
            }
        }
    }

    #[test]
    fn polar_method_gives_standard_normal_quantiles() {
        // Standard normal quantiles z(0.95) = 1.644854, z(0.99) = 2.326348,
        // z(0.999) = 3.090232 (Abramowitz & Stegun, *Handbook of Mathematical
        // Functions*, 1964, table 26.5, from memory). Bound: 5 standard errors of a
        // sample quantile, √(p(1 − p)/n)/φ(z).
        let n = 200_000;
        let mut d = Draws::new(31);
        let mut x: Vec<f64> = (0..n).map(|_| d.normal()).collect();
        let s = sample_stats(&mut x, Some(-1.0), Some(1.0), 10).unwrap();
        let phi =
            |z: f64| libm::exp(-0.5 * z * z) / crate::float::sqrt(2.0 * core::f64::consts::PI);
        for (idx, p, z) in [
            (3, 0.5, 0.0),
            (4, 0.95, 1.644_854),
            (5, 0.99, 2.326_348),
            (6, 0.999, 3.090_232),
        ] {
            let se = crate::float::sqrt(p * (1.0 - p) / n as f64) / phi(z);
            assert!(
                (s.percentiles[idx].value - z).abs() < 5.0 * se,
                "p{p}: {}",
                s.percentiles[idx].value
            );
            assert!(
                (s.percentiles[6 - idx].value + z).abs() < 5.0 * se,
                "mirror of p{p}"
            );
        }
        // Within ±1σ: 0.682689 (same table), binomial bound.
        let y = s.yield_fraction.unwrap();
        assert!(
            (y - 0.682_689).abs() < 5.0 * crate::float::sqrt(0.2167 / n as f64),
            "{y}"
        );
        assert!(
            libm::fabs(s.mean) < 5.0 / crate::float::sqrt(n as f64)
                && libm::fabs(s.sd - 1.0) < 5.0 / crate::float::sqrt(2.0 * n as f64)
        );
    }

    #[test]
    fn constant_sample_has_one_full_bin() {
        let mut x = [3.0; 10];
        let s = sample_stats(&mut x, Some(3.0), Some(3.0), 4).unwrap();
        assert_eq!((s.sd, s.yield_fraction), (0.0, Some(1.0)));
        assert_eq!(s.histogram.counts, [10, 0, 0, 0]);
        assert!(s.percentiles.iter().all(|p| p.value == 3.0));
    }
}
