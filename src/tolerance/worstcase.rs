//! Worst case of each figure over every part's spread and the temperature range.
//!
//! Method ([`WorstCaseMethod`]):
//! - **corners**, when the corners (2ⁿ for n varied parts, times the t
//!   temperatures) number at most the caller's `max_corners`
//!   ([`DEFAULT_MAX_CORNERS`] by default, at most [`MAX_CORNERS`]): every
//!   combination of each part at its low or high extreme at each temperature,
//!   exact over the corners;
//! - **sensitivity-guided** otherwise: each part is moved alone to its low and
//!   high extreme; for the maximum each part goes to the end that raised the
//!   figure (the minimum: lowered), at each temperature; then single parts are
//!   flipped while that moves the figure further (at most [`REFINE_SWEEPS`]
//!   sweeps).
//!
//! In both, a figure that is **not monotonic** in a part — moving the part
//! alone, the nominal value is above both extremes' (or below both) — is not
//! assumed to peak at a corner: that part is searched inside its range by
//! golden section ([`SEARCH_STEPS`] steps) with the other parts at the extreme
//! found, and the parts so searched are named in the result.

use super::figures::figure_hinted;
use super::parts::TolStage;
use super::spec::{validate_spec, Limit};
use crate::circuit::CircuitResult;
use alloc::string::String;
use alloc::vec::Vec;

/// The default largest corner count for exact enumeration: 256 corners of
/// every figure stay under a second for the costliest figures (margins, noise)
/// in WebAssembly (common practice, no source: a budget for an interactive page).
pub const DEFAULT_MAX_CORNERS: usize = 256;
/// The largest corner count a caller may allow (2¹⁶).
pub const MAX_CORNERS: usize = 65_536;
/// Most flip sweeps of the sensitivity-guided method.
pub const REFINE_SWEEPS: usize = 4;
/// Golden-section steps of the search inside a part's range.
pub const SEARCH_STEPS: usize = 30;

/// How the extremes were found.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum WorstCaseMethod {
    /// Every corner evaluated.
    Corners,
    /// Sensitivity-guided corners with single-part refinement.
    SensitivityGuided,
}

/// One extreme of a figure and the part values giving it.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Extreme {
    /// The figure's value.
    pub value: f64,
    /// The part values at the reference temperature, in the order of
    /// [`WorstCase::parts`].
    pub values: Vec<f64>,
    /// The temperature, °C.
    pub temperature_c: f64,
}

/// The worst case of one figure.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct FigureWorstCase {
    /// The limit it was asked for.
    pub limit: Limit,
    /// The value at nominal parts (the first temperature).
    pub nominal: f64,
    /// The lowest value.
    pub min: Extreme,
    /// The highest value.
    pub max: Extreme,
    /// The parts the figure was found not monotonic in (searched inside).
    pub searched: Vec<String>,
    /// True when both extremes meet the limit.
    pub meets: bool,
}

/// The worst case of a spec.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct WorstCase {
    /// The method used.
    pub method: WorstCaseMethod,
    /// The varied parts' names.
    pub parts: Vec<String>,
    /// Figure evaluations made (one stage solve per figure each).
    pub evaluations: usize,
    /// One entry per limit, in spec order.
    pub figures: Vec<FigureWorstCase>,
    /// True when every figure meets its limit at both extremes.
    pub meets: bool,
}

struct Eval<'a> {
    ts: &'a TolStage,
    spec: &'a [Limit],
    count: usize,
}

impl Eval<'_> {
    fn one(&mut self, k: usize, values: &[f64], t: f64) -> CircuitResult<f64> {
        self.count += 1;
        let b = self.ts.built_at(values, t)?;
        figure_hinted(&self.ts.probe(&b), &self.spec[k].figure, t, None)
    }

    fn all(&mut self, values: &[f64], t: f64) -> CircuitResult<Vec<f64>> {
        let b = self.ts.built_at(values, t)?;
        let p = self.ts.probe(&b);
        self.count += self.spec.len();
        self.spec
            .iter()
            .map(|l| figure_hinted(&p, &l.figure, t, None))
            .collect()
    }
}

fn ends(ts: &TolStage, i: usize) -> [f64; 2] {
    [ts.varied[i].low, ts.varied[i].high]
}

fn better(max: bool, a: f64, b: f64) -> bool {
    if max {
        a > b
    } else {
        a < b
    }
}

/// The worst case of every figure of `spec` over the stage's spreads.
///
/// # Errors
/// The spec's errors ([`validate_spec`]); `max_corners` above [`MAX_CORNERS`]
/// (param `maxCorners`); a figure that cannot be computed at some evaluated
/// point (the stage's or the figure's error).
pub fn worst_case(ts: &TolStage, spec: &[Limit], max_corners: usize) -> CircuitResult<WorstCase> {
    validate_spec(spec)?;
    ts.check_spec(spec)?;
    if max_corners > MAX_CORNERS {
        return Err(crate::error::Error::TooLarge {
            param: "maxCorners",
            limit: MAX_CORNERS as u64,
        }
        .into());
    }
    let n = ts.varied.len();
    let temps = ts.temperatures();
    let nominal = ts.nominal();
    let mut ev = Eval { ts, spec, count: 0 };
    let f_nom = ev.all(&nominal, temps[0])?;
    // Each part alone at its ends: directions and the monotonic check.
    let mut alone: Vec<[Vec<f64>; 2]> = Vec::with_capacity(n);
    for i in 0..n {
        let mut pair: [Vec<f64>; 2] = [Vec::new(), Vec::new()];
        for (side, &x) in ends(ts, i).iter().enumerate() {
            let mut v = nominal.clone();
            v[i] = x;
            pair[side] = ev.all(&v, temps[0])?;
        }
        alone.push(pair);
    }
    let new_extreme = |v: f64, values: &[f64], t: f64| Extreme {
        value: v,
        values: values.to_vec(),
        temperature_c: t,
    };
    let mut lows: Vec<Extreme> = f_nom
        .iter()
        .map(|&v| new_extreme(v, &nominal, temps[0]))
        .collect();
    let mut highs = lows.clone();
    let corners = 1usize
        .checked_shl(n as u32)
        .map_or(usize::MAX, |c| c.saturating_mul(temps.len()));
    let method = if corners <= max_corners {
        WorstCaseMethod::Corners
    } else {
        WorstCaseMethod::SensitivityGuided
    };
    match method {
        WorstCaseMethod::Corners => {
            let mut v = nominal.clone();
            for mask in 0u32..(1u32 << n) {
                for (i, x) in v.iter_mut().enumerate() {
                    *x = ends(ts, i)[((mask >> i) & 1) as usize];
                }
                for &t in &temps {
                    let f = ev.all(&v, t)?;
                    for (k, &y) in f.iter().enumerate() {
                        if y < lows[k].value {
                            lows[k] = new_extreme(y, &v, t);
                        }
                        if y > highs[k].value {
                            highs[k] = new_extreme(y, &v, t);
                        }
                    }
                }
            }
        }
        WorstCaseMethod::SensitivityGuided => {
            for k in 0..spec.len() {
                for (max, slot) in [(false, &mut lows[k]), (true, &mut highs[k])] {
                    let mut v: Vec<f64> = (0..n)
                        .map(|i| {
                            let up = alone[i][1][k] >= alone[i][0][k];
                            ends(ts, i)[usize::from(up == max)]
                        })
                        .collect();
                    for &t in &temps {
                        let y = ev.one(k, &v, t)?;
                        if better(max, y, slot.value) {
                            *slot = new_extreme(y, &v, t);
                        }
                    }
                    let t = slot.temperature_c;
                    v.clone_from(&slot.values);
                    for _ in 0..REFINE_SWEEPS {
                        let mut moved = false;
                        for i in 0..n {
                            let [lo, hi] = ends(ts, i);
                            let keep = v[i];
                            v[i] = if keep == lo { hi } else { lo };
                            let y = ev.one(k, &v, t)?;
                            if better(max, y, slot.value) {
                                *slot = new_extreme(y, &v, t);
                                moved = true;
                            } else {
                                v[i] = keep;
                            }
                        }
                        if !moved {
                            break;
                        }
                    }
                }
            }
        }
    }
    // Parts the figure is not monotonic in: search inside their range.
    let mut out = Vec::with_capacity(spec.len());
    for (k, limit) in spec.iter().enumerate() {
        let mut searched = Vec::new();
        for i in 0..n {
            let (a, b, m) = (alone[i][0][k], alone[i][1][k], f_nom[k]);
            let peak = m > a.max(b);
            let dip = m < a.min(b);
            if !(peak || dip) || ts.varied[i].low == ts.varied[i].high {
                continue;
            }
            searched.push(ts.varied[i].name.clone());
            let slot = if peak { &mut highs[k] } else { &mut lows[k] };
            let mut v = slot.values.clone();
            let t = slot.temperature_c;
            let [mut lo, mut hi] = ends(ts, i);
            let r = 0.5 * (libm::sqrt(5.0) - 1.0);
            for _ in 0..SEARCH_STEPS {
                let (x1, x2) = (hi - r * (hi - lo), lo + r * (hi - lo));
                v[i] = x1;
                let y1 = ev.one(k, &v, t)?;
                v[i] = x2;
                let y2 = ev.one(k, &v, t)?;
                for (x, y) in [(x1, y1), (x2, y2)] {
                    if better(peak, y, slot.value) {
                        let mut w = v.clone();
                        w[i] = x;
                        *slot = new_extreme(y, &w, t);
                    }
                }
                if better(peak, y1, y2) {
                    hi = x2;
                } else {
                    lo = x1;
                }
            }
        }
        let meets = limit.meets(lows[k].value) && limit.meets(highs[k].value);
        out.push(FigureWorstCase {
            limit: *limit,
            nominal: f_nom[k],
            min: lows[k].clone(),
            max: highs[k].clone(),
            searched,
            meets,
        });
    }
    Ok(WorstCase {
        method,
        parts: ts.varied.iter().map(|v| v.name.clone()).collect(),
        evaluations: ev.count,
        meets: out.iter().all(|f| f.meets),
        figures: out,
    })
}
