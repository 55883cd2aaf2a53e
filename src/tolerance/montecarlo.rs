//! Seeded Monte Carlo of a stage's figures over its parts' spreads.
//!
//! Each trial draws every varied part in [`TolStage::varied`] order with the
//! generator of `crate::network::montecarlo` (xoshiro256++, the same uniform
//! and normal deviates, so one seed gives the same numbers natively and in
//! WebAssembly):
//! - uniform: low + (high − low)·u, u uniform on [0, 1);
//! - normal ±p % at k σ: nominal + σ·z, z standard normal drawn again while
//!   |z| > k (the part is screened to its stated limit);
//! - amplifier min/typ/max: the log-normal split at typ with min and max at
//!   3 σ (the open-loop gain's default draw of `crate::network`).
//!
//! The trial's stage is evaluated at each temperature of
//! [`TolStage::temperatures`]; it **passes a limit** when the figure meets it
//! at every one, and passes the spec when it passes every limit. A figure that
//! cannot be computed in a trial (no crossover, no −3 dB point) fails its
//! limit and is counted as undefined. Statistics of each figure
//! (`crate::network::sample_stats`: mean, sd, percentiles by numpy's linear
//! rule, histogram) pool the trials' values at every temperature.

use super::figures::{figure_hinted, is_margin};
use super::gain_trials::{GainTrials, Trial};
use super::parts::{Built, Draw, TolStage};
use super::spec::{validate_spec, Limit};
use crate::circuit::CircuitResult;
use crate::error::Error;
use crate::network::montecarlo::{Draws, GainDistribution, GainRange};
use crate::network::{sample_stats, SampleStats};
use crate::stage::margins::LoopHints;
use alloc::vec::Vec;

/// Most trials of one run.
pub const MAX_TRIALS: usize = 100_000;
/// Most failed trials kept for inspection.
pub const MAX_KEPT_FAILURES: usize = 1000;
/// The σ count of the amplifier's min/typ/max draw.
pub const AMPLIFIER_SIGMAS: f64 = 3.0;

/// The run's settings.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MonteCarloOptions {
    /// Seed of the generator.
    pub seed: u64,
    /// Trials, 2 … [`MAX_TRIALS`].
    pub trials: usize,
    /// Histogram bins, 1 … `crate::network::montecarlo::MAX_BINS`.
    pub bins: usize,
    /// Failed trials to keep, 0 … [`MAX_KEPT_FAILURES`] (the first ones).
    pub keep_failures: usize,
}

/// A trial that failed the spec.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct FailedTrial {
    /// Trial number from 0.
    pub trial: usize,
    /// The drawn part values at the reference temperature.
    pub values: Vec<f64>,
    /// Each limit's figure at each temperature, `None` where undefined:
    /// `figures[limit][temperature]`.
    pub figures: Vec<Vec<Option<f64>>>,
    /// The limits it failed (indices into the spec).
    pub failed_limits: Vec<usize>,
}

/// The result of one limit.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct LimitResult {
    /// The limit.
    pub limit: Limit,
    /// The figure at nominal parts, at each temperature.
    pub nominal: Vec<f64>,
    /// Share of trials meeting it at every temperature, 0 … 1.
    pub yield_fraction: f64,
    /// Trials where the figure could not be computed.
    pub undefined: usize,
    /// Statistics of the defined values (`None` with fewer than 2).
    pub stats: Option<SampleStats>,
}

/// A Monte Carlo run.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct MonteCarlo {
    /// The seed.
    pub seed: u64,
    /// Trials run.
    pub trials: usize,
    /// The temperatures of each trial, °C.
    pub temperatures_c: Vec<f64>,
    /// Share of trials meeting every limit.
    pub yield_fraction: f64,
    /// Per limit, in spec order.
    pub limits: Vec<LimitResult>,
    /// Trials that failed.
    pub failed_count: usize,
    /// The first failed trials (at most `keep_failures`).
    pub failed: Vec<FailedTrial>,
}

/// Draw one trial's values, in [`TolStage::varied`] order.
pub(crate) fn draw(ts: &TolStage, d: &mut Draws, out: &mut Vec<f64>) {
    out.clear();
    for v in &ts.varied {
        let x = match v.draw {
            Draw::Uniform => v.low + (v.high - v.low) * d.unit(),
            Draw::Normal { sigma, k } => loop {
                let z = d.normal();
                if libm::fabs(z) <= k {
                    break (v.nominal + sigma * z).clamp(v.low, v.high);
                }
            },
            Draw::MinTypMax => d.gain(&GainRange::new(
                GainDistribution::LogNormal {
                    k: AMPLIFIER_SIGMAS,
                },
                v.low,
                v.nominal,
                v.high,
            )),
        };
        out.push(x);
    }
}

/// The figures of one trial at `temperature_c` into `out` (spec order,
/// `None` where undefined), the stage and its circuit built from the values.
pub(crate) fn rebuilt_figures(
    ts: &TolStage,
    values: &[f64],
    temperature_c: f64,
    spec: &[Limit],
    hints: Option<&LoopHints>,
    out: &mut Vec<Option<f64>>,
) {
    out.clear();
    let built = ts.built_at(values, temperature_c).ok();
    let probe = built.as_ref().map(|b| ts.probe(b));
    for l in spec {
        out.push(
            probe
                .as_ref()
                .and_then(|p| figure_hinted(p, &l.figure, temperature_c, hints).ok()),
        );
    }
}

/// Run the Monte Carlo of `spec` on the stage.
///
/// # Errors
/// The spec's errors; trials below 2 (param `trials`) or above [`MAX_TRIALS`]
/// (`too_large`); bins out of range (param `bins`); `keepFailures` above
/// [`MAX_KEPT_FAILURES`]; the nominal stage's figures not computable.
pub fn monte_carlo(
    ts: &TolStage,
    spec: &[Limit],
    o: MonteCarloOptions,
) -> CircuitResult<MonteCarlo> {
    validate_spec(spec)?;
    ts.check_spec(spec)?;
    if o.trials > MAX_TRIALS {
        return Err(Error::TooLarge {
            param: "trials",
            limit: MAX_TRIALS as u64,
        }
        .into());
    }
    if o.trials < 2 {
        return Err(Error::OutOfDomain {
            param: "trials",
            requirement: "must be at least 2",
        }
        .into());
    }
    if o.bins == 0 || o.bins > crate::network::montecarlo::MAX_BINS {
        return Err(Error::OutOfDomain {
            param: "bins",
            requirement: "must be from 1 to 1000",
        }
        .into());
    }
    if o.keep_failures > MAX_KEPT_FAILURES {
        return Err(Error::TooLarge {
            param: "keepFailures",
            limit: MAX_KEPT_FAILURES as u64,
        }
        .into());
    }
    let temps = ts.temperatures();
    let nominal_values = ts.nominal();
    let mut nominal = alloc::vec![Vec::with_capacity(temps.len()); spec.len()];
    // The margins of every trial search the grid of the nominal stage's loop
    // (its corners and resonances from both pole sets, found once per
    // temperature) and are signed by Nyquist's criterion: no trial finds poles.
    let wants_margins = spec.iter().any(|l| is_margin(&l.figure));
    let wants_gain_margin = spec
        .iter()
        .any(|l| matches!(l.figure, super::figures::Figure::GainMarginDb));
    let mut hints: Vec<Option<LoopHints>> = Vec::with_capacity(temps.len());
    // A spec of gain figures alone is evaluated on each temperature's circuit
    // built once, the trials' values written into it (`gain_trials`).
    let mut fast: Vec<Option<GainTrials>> = Vec::with_capacity(temps.len());
    for &t in &temps {
        let built = ts.built_at(&nominal_values, t)?;
        let p = ts.probe(&built);
        for (k, l) in spec.iter().enumerate() {
            nominal[k].push(figure_hinted(&p, &l.figure, t, None)?);
        }
        hints.push(match (wants_margins, p.amplifier) {
            (true, Some(a)) => Some(LoopHints::of(p.circuit, a, wants_gain_margin)?),
            _ => None,
        });
        fast.push(match &built {
            Built::Stage(b, _) => GainTrials::new(b, spec),
            Built::Circuit(_) => None,
        });
    }
    let mut row = Vec::with_capacity(spec.len());
    let mut d = Draws::new(o.seed);
    let mut values = Vec::with_capacity(ts.varied.len());
    let mut samples: Vec<Vec<f64>> = alloc::vec![Vec::new(); spec.len()];
    let mut pass = alloc::vec![0usize; spec.len()];
    let mut undefined = alloc::vec![0usize; spec.len()];
    let (mut all_pass, mut failed_count) = (0usize, 0usize);
    let mut failed = Vec::new();
    let mut fig: Vec<Vec<Option<f64>>> = alloc::vec![Vec::new(); spec.len()];
    for trial in 0..o.trials {
        draw(ts, &mut d, &mut values);
        fig.iter_mut().for_each(Vec::clear);
        for ((&t, h), g) in temps.iter().zip(&hints).zip(&mut fast) {
            let done = g
                .as_mut()
                .is_some_and(|g| matches!(g.figures(ts, &values, t, spec, &mut row), Trial::Done));
            if !done {
                rebuilt_figures(ts, &values, t, spec, h.as_ref(), &mut row);
            }
            for (f, y) in fig.iter_mut().zip(&row) {
                f.push(*y);
            }
        }
        let mut failed_limits = Vec::new();
        for (k, l) in spec.iter().enumerate() {
            let mut ok = true;
            let mut any_undefined = false;
            for y in &fig[k] {
                match *y {
                    Some(y) => {
                        samples[k].push(y);
                        ok &= l.meets(y);
                    }
                    None => {
                        any_undefined = true;
                        ok = false;
                    }
                }
            }
            undefined[k] += usize::from(any_undefined);
            if ok {
                pass[k] += 1;
            } else {
                failed_limits.push(k);
            }
        }
        if failed_limits.is_empty() {
            all_pass += 1;
        } else {
            failed_count += 1;
            if failed.len() < o.keep_failures {
                failed.push(FailedTrial {
                    trial,
                    values: values.clone(),
                    figures: fig.clone(),
                    failed_limits,
                });
            }
        }
    }
    let n = o.trials as f64;
    let mut limits = Vec::with_capacity(spec.len());
    for (k, l) in spec.iter().enumerate() {
        let stats = if samples[k].len() >= 2 {
            Some(sample_stats(&mut samples[k], l.lower, l.upper, o.bins)?)
        } else {
            None
        };
        limits.push(LimitResult {
            limit: *l,
            nominal: nominal[k].clone(),
            yield_fraction: pass[k] as f64 / n,
            undefined: undefined[k],
            stats,
        });
    }
    Ok(MonteCarlo {
        seed: o.seed,
        trials: o.trials,
        temperatures_c: temps,
        yield_fraction: all_pass as f64 / n,
        limits,
        failed_count,
        failed,
    })
}
