//! Design helpers on a stage document: the value of one part that gives a
//! target phase margin, found on the stage's full circuit (its loop gain
//! through [`super::margins`]).
//!
//! | helper | part changed | answer |
//! |---|---|---|
//! | [`feedback_capacitor_for_margin`] | `cf` | the smallest Cf that reaches the target (most bandwidth) |
//! | [`isolation_resistor_for_margin`] | `riso`, with `cl` set | the smallest Riso that reaches it |
//! | [`max_load_capacitance_for_margin`] | `cl` | the largest Cl reached from the smallest load up without the margin falling below the target |
//! | [`dominant_pole_for_margin`] | the amplifier's dominant pole (A0 held) | the highest pole frequency that reaches it |
//! | [`max_beta_for_margin`] | `rg` (Rf held) | the largest β = Rg/(Rf + Rg), the smallest noise gain, that reaches it |
//!
//! **Method.** The phase margin (the worst over every unity crossing, signed
//! by the closed-loop poles; no crossing counts as 180°) is computed at
//! [`SCAN_POINTS_PER_DECADE`] log-spaced values over the part's range
//! ([`range_of`]); every change between meeting and missing the target
//! brackets a boundary, which the Illinois variant of regula falsi refines in
//! ln(value) to [`VALUE_REL_TOL`]. Nothing assumes the margin is monotonic in
//! the value: every feasible interval over the range is reported in
//! [`Design::feasible`], and the helper's answer is the end of one of them as
//! the table says. A boundary closer than one scan step to another is not
//! resolved (two boundaries inside one step look like none).
//! Source: regula falsi with the Illinois modification, G. Dahlquist &
//! Å. Björck, *Numerical Methods*, Prentice-Hall, 1974, §6.2 (from memory).

use super::document::Stage;
use super::margins::circuit_margins_with_density;
use crate::circuit::{CircuitError, CircuitResult};
use crate::error::Error;
use alloc::vec::Vec;

/// Scan points per decade of the part's value.
pub const SCAN_POINTS_PER_DECADE: f64 = 4.0;
/// Relative tolerance of a refined boundary value.
pub const VALUE_REL_TOL: f64 = 1e-6;
/// Grid density of the margin search inside the helpers (the margins do not
/// depend on it: corners and resonances are on the grid; property test in
/// tests/stage_loop.rs).
pub const MARGIN_POINTS_PER_DECADE: u32 = 5;
/// Most refinement steps per boundary.
const MAX_REFINE_STEPS: usize = 60;

/// Which part a helper changes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum DesignPart {
    /// The feedback capacitor, F.
    Cf,
    /// The isolation resistor, Ω.
    Riso,
    /// The load capacitance, F.
    Cl,
    /// The amplifier's dominant pole, Hz (A0 held, the gain-bandwidth product follows).
    DominantPoleHz,
    /// The gain-setting resistor, Ω (Rf held): sets β.
    Rg,
}

impl DesignPart {
    /// The field name, as in the stage document.
    pub const fn name(self) -> &'static str {
        match self {
            DesignPart::Cf => "cf",
            DesignPart::Riso => "riso",
            DesignPart::Cl => "cl",
            DesignPart::DominantPoleHz => "dominantPoleHz",
            DesignPart::Rg => "rg",
        }
    }
}

/// The scanned range of each part: (lowest, highest).
/// Cf 1 aF…100 nF; Riso 1 mΩ…100 kΩ; Cl 1 fF…10 mF; dominant pole 1 mHz…1 GHz;
/// Rg from 1e-6·Rf to 1e6·Rf (β from about 1e-6 to 1 − 1e-6).
pub fn range_of(part: DesignPart, stage: &Stage) -> (f64, f64) {
    match part {
        DesignPart::Cf => (1e-18, 1e-7),
        DesignPart::Riso => (1e-3, 1e5),
        DesignPart::Cl => (1e-15, 1e-2),
        DesignPart::DominantPoleHz => (1e-3, 1e9),
        DesignPart::Rg => {
            let rf = stage.parts.rf.unwrap_or(1.0);
            (rf * 1e-6, rf * 1e6)
        }
    }
}

/// One helper's answer.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Design {
    /// The part changed.
    pub part: DesignPart,
    /// Its value: F, Ω or Hz.
    pub value: f64,
    /// The phase margin with that value, degrees (180 when |T| never reaches 1).
    pub phase_margin_deg: f64,
    /// The unity-gain crossover of the worst crossing, Hz, if any.
    pub crossover_hz: Option<f64>,
    /// For [`max_beta_for_margin`]: β = Rg/(Rf + Rg) of the answer.
    pub beta: Option<f64>,
    /// Every interval of the scanned range where the margin meets the target,
    /// ascending, ends refined.
    pub feasible: Vec<(f64, f64)>,
    /// True when the answer is an end of the scanned range (the target is
    /// met there, and perhaps beyond).
    pub at_range_end: bool,
}

/// Margin and crossover of the stage with `part` at `x`.
fn margin_at(stage: &Stage, part: DesignPart, x: f64) -> CircuitResult<(f64, Option<f64>)> {
    let mut s = stage.clone();
    match part {
        DesignPart::Cf => s.parts.cf = Some(x),
        DesignPart::Riso => s.parts.riso = Some(x),
        DesignPart::Cl => s.parts.cl = Some(x),
        DesignPart::Rg => s.parts.rg = Some(x),
        DesignPart::DominantPoleHz => {
            s.amplifier.dominant_pole_hz = Some(x);
            s.amplifier.gbw_hz = None;
        }
    }
    let b = s.circuit()?;
    let m = circuit_margins_with_density(&b.circuit, b.amplifier, MARGIN_POINTS_PER_DECADE)?;
    Ok((m.phase_margin_deg.unwrap_or(180.0), m.crossover_hz))
}

/// A scanned or refined point: ln(value), margin − target.
#[derive(Clone, Copy)]
struct Point {
    ln: f64,
    gap: f64,
}

/// Refine the boundary between `a` and `b` (one meets the target, the other
/// does not); returns the feasible end of the final bracket.
fn refine(g: &dyn Fn(f64) -> CircuitResult<f64>, mut a: Point, mut b: Point) -> CircuitResult<f64> {
    let tol = VALUE_REL_TOL;
    let mut side = 0i8;
    for _ in 0..MAX_REFINE_STEPS {
        if libm::fabs(b.ln - a.ln) <= tol {
            break;
        }
        let x = if a.gap.is_finite() && b.gap.is_finite() && a.gap != b.gap {
            let t = a.gap / (a.gap - b.gap);
            // Keep the step inside the bracket, off its ends.
            a.ln + t.clamp(0.05, 0.95) * (b.ln - a.ln)
        } else {
            0.5 * (a.ln + b.ln)
        };
        let p = Point { ln: x, gap: g(x)? };
        if (p.gap >= 0.0) == (a.gap >= 0.0) {
            a = p;
            if side == -1 {
                b.gap *= 0.5;
            }
            side = -1;
        } else {
            b = p;
            if side == 1 {
                a.gap *= 0.5;
            }
            side = 1;
        }
    }
    // a and b never swap sides: the feasible one is the one with gap ≥ 0
    // (halved gaps keep their sign).
    Ok(if a.gap >= 0.0 { a.ln } else { b.ln })
}

/// Scan, refine every boundary, and return the feasible intervals (ln values).
fn feasible_intervals(
    stage: &Stage,
    part: DesignPart,
    target: f64,
) -> CircuitResult<Vec<(f64, f64)>> {
    let (lo, hi) = range_of(part, stage);
    let (a, b) = (libm::log(lo), libm::log(hi));
    let n = (libm::log10(hi / lo) * SCAN_POINTS_PER_DECADE) as usize + 1;
    let g = |x: f64| -> CircuitResult<f64> { Ok(margin_at(stage, part, libm::exp(x))?.0 - target) };
    let mut out = Vec::new();
    let mut start: Option<f64> = None;
    let mut prev: Option<Point> = None;
    for i in 0..=n {
        let ln = a + (b - a) * i as f64 / n as f64;
        let p = Point { ln, gap: g(ln)? };
        let ok = p.gap >= 0.0;
        match prev {
            None if ok => start = Some(ln),
            Some(q) if ok != (q.gap >= 0.0) => {
                let edge = refine(&g, q, p)?;
                if ok {
                    start = Some(edge);
                } else if let Some(s) = start.take() {
                    out.push((s, edge));
                }
            }
            _ => {}
        }
        prev = Some(p);
    }
    if let Some(s) = start {
        out.push((s, b));
    }
    Ok(out)
}

fn check_target(target_pm_deg: f64) -> CircuitResult<()> {
    if !target_pm_deg.is_finite() {
        return Err(Error::NotFinite {
            param: "target_pm_deg",
        }
        .into());
    }
    if !(target_pm_deg > 0.0 && target_pm_deg < 180.0) {
        return Err(Error::OutOfDomain {
            param: "target_pm_deg",
            requirement: "must be between 0 and 180 degrees",
        }
        .into());
    }
    Ok(())
}

/// Which end of which interval a helper answers with.
#[derive(Clone, Copy, PartialEq)]
enum Pick {
    /// The lower end of the lowest interval.
    Smallest,
    /// The upper end of the highest interval.
    Largest,
    /// The upper end of the interval that starts at the range's low end.
    LargestFromBelow,
}

fn design(
    stage: &Stage,
    part: DesignPart,
    target_pm_deg: f64,
    pick: Pick,
) -> CircuitResult<Design> {
    check_target(target_pm_deg)?;
    stage.validate().map_err(CircuitError::from)?;
    let (lo, hi) = range_of(part, stage);
    let ivs = feasible_intervals(stage, part, target_pm_deg)?;
    let unreachable = |reason: &'static str| {
        CircuitError::from(Error::Unreachable {
            param: part.name(),
            reason,
        })
    };
    let ln = match pick {
        Pick::Smallest => ivs.first().map(|iv| iv.0),
        Pick::Largest => ivs.last().map(|iv| iv.1),
        Pick::LargestFromBelow => ivs
            .first()
            .filter(|iv| iv.0 <= libm::log(lo))
            .map(|iv| iv.1),
    }
    .ok_or_else(|| {
        unreachable(if pick == Pick::LargestFromBelow {
            "the target margin is missed already with the smallest value of the scanned range"
        } else {
            "no value in the scanned range reaches the target margin"
        })
    })?;
    let value = libm::exp(ln);
    let (pm, fc) = margin_at(stage, part, value)?;
    let at_end = value >= hi * (1.0 - 1e-12) || value <= lo * (1.0 + 1e-12);
    let beta = (part == DesignPart::Rg)
        .then(|| stage.parts.rf.map(|rf| value / (rf + value)))
        .flatten();
    Ok(Design {
        part,
        value,
        phase_margin_deg: pm,
        crossover_hz: fc,
        beta,
        feasible: ivs
            .iter()
            .map(|&(a, b)| (libm::exp(a), libm::exp(b)))
            .collect(),
        at_range_end: at_end,
    })
}

/// The smallest feedback capacitor (across Rf) that gives `target_pm_deg`.
///
/// # Errors
/// `target_pm_deg` outside (0°, 180°) (param `target_pm_deg`); a stage
/// without Rf (param `cf`: Cf sits across Rf) or otherwise invalid, named;
/// no Cf in 1 aF…100 nF reaching the target ([`Error::Unreachable`], param `cf`).
pub fn feedback_capacitor_for_margin(stage: &Stage, target_pm_deg: f64) -> CircuitResult<Design> {
    if stage.parts.rf.is_none() {
        return Err(Error::OutOfDomain {
            param: "cf",
            requirement: "Cf sits across Rf: the stage needs Rf",
        }
        .into());
    }
    design(stage, DesignPart::Cf, target_pm_deg, Pick::Smallest)
}

/// The smallest isolation resistor that gives `target_pm_deg` with the load
/// capacitance `cl` (F, > 0; it replaces the stage's own).
///
/// # Errors
/// `cl` not finite and positive (param `cl`); as [`feedback_capacitor_for_margin`]
/// for the target and the stage; no Riso in 1 mΩ…100 kΩ reaching it (param `riso`).
pub fn isolation_resistor_for_margin(
    stage: &Stage,
    cl: f64,
    target_pm_deg: f64,
) -> CircuitResult<Design> {
    crate::check::positive("cl", cl).map_err(CircuitError::from)?;
    let mut s = stage.clone();
    s.parts.cl = Some(cl);
    design(&s, DesignPart::Riso, target_pm_deg, Pick::Smallest)
}

/// The largest load capacitance reached from 1 fF up with the phase margin
/// at or above `target_pm_deg` all the way.
///
/// # Errors
/// As [`feedback_capacitor_for_margin`] for the target and the stage; the
/// target missed already at 1 fF (param `cl`).
pub fn max_load_capacitance_for_margin(stage: &Stage, target_pm_deg: f64) -> CircuitResult<Design> {
    design(stage, DesignPart::Cl, target_pm_deg, Pick::LargestFromBelow)
}

/// The highest dominant-pole frequency of the amplifier (A0 held, so the
/// gain-bandwidth product is A0·fp) that gives `target_pm_deg`.
///
/// # Errors
/// As [`feedback_capacitor_for_margin`] for the target and the stage; no
/// pole in 1 mHz…1 GHz reaching it (param `dominantPoleHz`).
pub fn dominant_pole_for_margin(stage: &Stage, target_pm_deg: f64) -> CircuitResult<Design> {
    design(
        stage,
        DesignPart::DominantPoleHz,
        target_pm_deg,
        Pick::Largest,
    )
}

/// The largest β = Rg/(Rf + Rg) (the smallest noise gain 1/β), by Rg with Rf
/// held, that gives `target_pm_deg`: a non-inverting or inverting stage.
///
/// # Errors
/// Another kind of stage, or one without Rf and Rg (param `rg`); as
/// [`feedback_capacitor_for_margin`] for the target; no Rg in
/// 1e-6·Rf…1e6·Rf reaching it (param `rg`).
pub fn max_beta_for_margin(stage: &Stage, target_pm_deg: f64) -> CircuitResult<Design> {
    use super::document::StageKind;
    let divider = matches!(stage.kind, StageKind::NonInverting | StageKind::Inverting);
    if !divider || stage.parts.rf.is_none() || stage.parts.rg.is_none() {
        return Err(Error::OutOfDomain {
            param: "rg",
            requirement: "β is set by Rg against Rf: a non-inverting or inverting stage with both",
        }
        .into());
    }
    design(stage, DesignPart::Rg, target_pm_deg, Pick::Largest)
}
