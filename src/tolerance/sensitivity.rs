//! Sensitivity of each figure to each part, each part's share of the
//! figure's variance, and the part to tighten first.
//!
//! At nominal parts and the analysis temperature ([`TolStage::temperatures`],
//! the first), by central differences with a step h = [`STEP_REL`]·x:
//! - per unit: x·∂F/∂x ≈ x·(F(x + h) − F(x − h))/(2h), the change of F per
//!   relative change of the part (F's unit);
//! - normalised (Bode's classical sensitivity): S = (x/F)·∂F/∂x, `None` when F = 0;
//! - variance share, to first order (the delta method): each part's
//!   (∂F/∂x·σₓ)² over their sum, σₓ the standard deviation of its draw:
//!   uniform (high − low)/√12; normal σ·√(1 − 2kφ(k)/(2Φ(k) − 1)) (truncated
//!   at k σ); amplifier min/typ/max x·(ln max − ln min)/6 with the same
//!   3 σ truncation factor (log-normal, first order).
//!
//! The part to tighten first is the one with the largest share summed over
//! the spec's figures.

use super::figures::figure_hinted;
use super::parts::{Draw, TolStage};
use super::spec::{validate_spec, Limit};
use crate::circuit::CircuitResult;
use alloc::string::String;
use alloc::vec::Vec;

/// Relative step of the central differences (truncation error ~h², rounding
/// ~ε/h: 10⁻⁴ balances them for figures good to 10⁻¹² relative; common
/// practice, no source).
pub const STEP_REL: f64 = 1e-4;

/// One part's effect on one figure.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct PartSensitivity {
    /// The part.
    pub part: String,
    /// x·∂F/∂x, the figure's unit per unit relative change.
    pub per_unit: f64,
    /// (x/F)·∂F/∂x; `None` when F = 0.
    pub normalised: Option<f64>,
    /// Share of the figure's first-order variance, 0 … 1.
    pub variance_share: f64,
}

/// The sensitivities of one figure.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct FigureSensitivity {
    /// The limit.
    pub limit: Limit,
    /// The figure at nominal.
    pub nominal: f64,
    /// First-order standard deviation of the figure.
    pub sd: f64,
    /// Per part, in [`TolStage::varied`] order.
    pub parts: Vec<PartSensitivity>,
    /// The part with the largest share (`None` when nothing varies).
    pub tighten_first: Option<String>,
}

/// Sensitivities of a spec.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Sensitivity {
    /// The temperature they were taken at, °C.
    pub temperature_c: f64,
    /// Per limit, in spec order.
    pub figures: Vec<FigureSensitivity>,
    /// The part with the largest variance share summed over the figures.
    pub tighten_first: Option<String>,
}

/// Standard deviation of a part's draw, in its unit (module doc).
pub fn draw_sd(v: &super::parts::Varied) -> f64 {
    let trunc = |k: f64| {
        let phi = libm::exp(-0.5 * k * k) / libm::sqrt(2.0 * core::f64::consts::PI);
        let mass = libm::erf(k / core::f64::consts::SQRT_2);
        libm::sqrt(1.0 - 2.0 * k * phi / mass)
    };
    match v.draw {
        Draw::Uniform => (v.high - v.low) / libm::sqrt(12.0),
        Draw::Normal { sigma, k } => sigma * trunc(k),
        Draw::MinTypMax => {
            v.nominal * (libm::log(v.high) - libm::log(v.low)) / 6.0
                * trunc(super::montecarlo::AMPLIFIER_SIGMAS)
        }
    }
}

/// Sensitivities of the figures of `spec` to the stage's varied parts.
///
/// # Errors
/// The spec's errors; a figure not computable at or near nominal.
pub fn sensitivity(ts: &TolStage, spec: &[Limit]) -> CircuitResult<Sensitivity> {
    validate_spec(spec)?;
    ts.check_spec(spec)?;
    let t = ts.temperatures()[0];
    let nominal = ts.nominal();
    let eval = |values: &[f64]| -> CircuitResult<Vec<f64>> {
        let b = ts.built_at(values, t)?;
        let p = ts.probe(&b);
        spec.iter()
            .map(|l| figure_hinted(&p, &l.figure, t, None))
            .collect()
    };
    let f0 = eval(&nominal)?;
    let mut per_unit = alloc::vec![Vec::with_capacity(ts.varied.len()); spec.len()];
    for (i, v) in ts.varied.iter().enumerate() {
        let h = STEP_REL * v.nominal;
        let mut x = nominal.clone();
        x[i] = v.nominal + h;
        let up = eval(&x)?;
        x[i] = v.nominal - h;
        let down = eval(&x)?;
        for k in 0..spec.len() {
            per_unit[k].push(v.nominal * (up[k] - down[k]) / (2.0 * h));
        }
    }
    let mut totals = alloc::vec![0.0; ts.varied.len()];
    let mut figures = Vec::with_capacity(spec.len());
    for (k, l) in spec.iter().enumerate() {
        let terms: Vec<f64> = ts
            .varied
            .iter()
            .zip(&per_unit[k])
            .map(|(v, &s)| {
                let rel_sd = draw_sd(v) / v.nominal;
                (s * rel_sd) * (s * rel_sd)
            })
            .collect();
        let var: f64 = terms.iter().sum();
        let parts: Vec<PartSensitivity> = ts
            .varied
            .iter()
            .zip(&per_unit[k])
            .zip(&terms)
            .map(|((v, &s), &term)| PartSensitivity {
                part: v.name.clone(),
                per_unit: s,
                normalised: (f0[k] != 0.0).then(|| s / f0[k]),
                variance_share: if var > 0.0 { term / var } else { 0.0 },
            })
            .collect();
        for (tot, p) in totals.iter_mut().zip(&parts) {
            *tot += p.variance_share;
        }
        figures.push(FigureSensitivity {
            limit: *l,
            nominal: f0[k],
            sd: libm::sqrt(var),
            tighten_first: largest(&parts.iter().map(|p| p.variance_share).collect::<Vec<_>>())
                .map(|i| parts[i].part.clone()),
            parts,
        });
    }
    Ok(Sensitivity {
        temperature_c: t,
        figures,
        tighten_first: largest(&totals).map(|i| ts.varied[i].name.clone()),
    })
}

fn largest(x: &[f64]) -> Option<usize> {
    let mut best: Option<usize> = None;
    for (i, &v) in x.iter().enumerate() {
        if v > 0.0 && best.map_or(true, |b| v > x[b]) {
            best = Some(i);
        }
    }
    best
}
