//! The loop gain of a circuit broken at a node by double injection, for a
//! loop without a single controlled source to open (or to check one).
//!
//! The break point is where a two-terminal element `element` (a resistor,
//! capacitor or inductor) meets `node`; [`LoopDirection`] says whether the
//! signal runs around the loop from the node into the element (the element
//! is the *load side*, everything else at the node the *driver side*) or from
//! the element into the node (the other way round). Every independent source
//! is at zero. Two solves per frequency:
//! - **voltage injection**: a 1 V source in series between the node and the
//!   element's terminal; v_x is the voltage on the load side, v_y on the
//!   driver side: T_v = −v_y/v_x;
//! - **current injection**: 1 A into the node; i_x flows from the node into
//!   the load side, i_y = i_x − 1 arrives from the driver side: T_i = −i_y/i_x.
//!
//! Then T = (T_v·T_i − 1)/(T_v + T_i + 2), the loop gain independent of the
//! impedances on either side of the break. With an ideal driver (zero output
//! impedance) T_v alone is T; with an ideal load (infinite input impedance)
//! T_i alone is. At a break next to a controlled source this equals the
//! return ratio of [`super::loop_gain`] (tests/stage_injection.rs).
//! Source: R. D. Middlebrook, "Measurement of loop gain in feedback systems",
//! *International Journal of Electronics* 38(4), 1975, pp. 485–512 (from memory).

use super::loop_gain::ResponseSweep;
use crate::check;
use crate::circuit::mna::{node_voltage, Sweeper, MAX_SWEEP};
use crate::circuit::{Circuit, CircuitError, CircuitResult, ElementKind};
use crate::error::Error;
use alloc::vec::Vec;
use core::f64::consts::TAU;
use num_complex::Complex64;

/// The loop gain by double injection and its two one-sided ratios.
#[derive(Debug, Clone, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct DoubleInjection {
    /// T = (T_v·T_i − 1)/(T_v + T_i + 2).
    pub loop_gain: ResponseSweep,
    /// T_v = −v_y/v_x, from the voltage injection.
    pub voltage_ratio: ResponseSweep,
    /// T_i = −i_y/i_x, from the current injection.
    pub current_ratio: ResponseSweep,
}

/// Which way the signal runs around the loop at the break.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum LoopDirection {
    /// From the node into the element (the element is the load side).
    IntoElement,
    /// From the element into the node (the element is the driver side).
    FromElement,
}

/// The element's admittance at s and its far node.
struct Branch {
    kind: ElementKind,
    value: f64,
    far: usize,
}

impl Branch {
    fn admittance(&self, s: Complex64) -> Complex64 {
        match self.kind {
            ElementKind::Resistor => Complex64::from(1.0 / self.value),
            ElementKind::Capacitor => s * self.value,
            _ => 1.0 / (s * self.value),
        }
    }
}

/// The element at the break, checked, and the node's index.
fn break_point(c: &Circuit, node: &str, element: &str) -> CircuitResult<(usize, usize, Branch)> {
    let i = c.element_index(element)?;
    let e = c
        .elements()
        .get(i)
        .ok_or(CircuitError::from(Error::UnknownName {
            param: "element",
            expected: "the name of an element of the circuit",
        }))?;
    if !matches!(
        e.kind(),
        ElementKind::Resistor | ElementKind::Capacitor | ElementKind::Inductor
    ) {
        return Err(CircuitError::named(
            Error::OutOfDomain {
                param: "element",
                requirement: "the loop is broken beside a resistor, capacitor or inductor",
            },
            element,
        ));
    }
    let n = c.node_index(node)?;
    let [a, b] = e.nodes();
    let far = match (a == n, b == n) {
        (true, _) => b,
        (_, true) => a,
        _ => {
            return Err(CircuitError::named(
                Error::OutOfDomain {
                    param: "node",
                    requirement: "must be a terminal of the element at the break",
                },
                node,
            ))
        }
    };
    Ok((
        i,
        n,
        Branch {
            kind: e.kind(),
            value: e.value(),
            far,
        },
    ))
}

/// The voltage-injection circuit: the element moved to a new node `#x`, a
/// 1 V source from the node (−) to `#x` (+).
fn voltage_circuit(
    quiet: &Circuit,
    node: &str,
    element: &str,
    br: &Branch,
) -> CircuitResult<Circuit> {
    let mut cv = quiet.without(element)?;
    let far = quiet
        .nodes()
        .get(br.far)
        .map_or("0", |n| if n.is_ground() { "0" } else { n.as_str() });
    cv.add_internal("load", br.kind, "#x", far, br.value)?;
    cv.add_internal("vz", ElementKind::VoltageSource, "#x", node, 1.0)?;
    Ok(cv)
}

/// The loop gain of `c` broken at `node` beside `element` by double injection,
/// the signal running as `direction` says, at each of `frequencies_hz` (> 0).
///
/// # Errors
/// More than [`MAX_SWEEP`] frequencies (param `frequencies`); unknown names;
/// `element` not a resistor, capacitor or inductor (param `element`); `node`
/// not one of its terminals (param `node`); a zero or negative frequency
/// (param `frequency`); a singular circuit, named; a loop gain that is not
/// finite (T_v + T_i = −2: param `loopGain`).
///
/// # Example
/// ```
/// use loopwright::stage::injection::double_injection;
/// use loopwright::stage::loop_gain::return_ratio_samples;
/// use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
/// use loopwright::stage::injection::LoopDirection;
/// // Broken where Rf meets the − input (the signal comes out of Rf into the
/// // node) and where it leaves the output: the return ratio at U1 both times.
/// let s = Stage {
///     kind: StageKind::Inverting,
///     amplifier: Amplifier::from_gbw(Spread::fixed(1e5), 1e7).with_ro(50.0),
///     point: SpreadPoint::Typ,
///     parts: StageParts { rf: Some(1e4), rg: Some(1e3), ..StageParts::default() },
/// }.circuit().unwrap();
/// let t = return_ratio_samples(&s.circuit, "U1", &[1e3, 1e6]).unwrap();
/// for (node, way) in [("fb", LoopDirection::FromElement), ("out", LoopDirection::IntoElement)] {
///     let d = double_injection(&s.circuit, node, "Rf", way, &[1e3, 1e6]).unwrap();
///     for (a, b) in d.loop_gain.complex().iter().zip(&t) {
///         assert!((a - b).norm() < 1e-9 * b.norm());
///     }
/// }
/// ```
pub fn double_injection(
    c: &Circuit,
    node: &str,
    element: &str,
    direction: LoopDirection,
    frequencies_hz: &[f64],
) -> CircuitResult<DoubleInjection> {
    if frequencies_hz.len() > MAX_SWEEP {
        return Err(Error::TooLarge {
            param: "frequencies",
            limit: MAX_SWEEP as u64,
        }
        .into());
    }
    let mut quiet = c.clone();
    quiet.zero_sources();
    let (_, n, br) = break_point(&quiet, node, element)?;
    let cv = voltage_circuit(&quiet, node, element, &br)?;
    let x = cv.node_index("#x")?;
    let mut ci = quiet.clone();
    ci.add_internal("iz", ElementKind::CurrentSource, "0", node, 1.0)?;
    let (mut sv, mut si) = (Sweeper::new(&cv)?, Sweeper::new(&ci)?);
    let (mut tv, mut ti, mut t) = (Vec::new(), Vec::new(), Vec::new());
    for &f in frequencies_hz {
        check::positive("frequency", f).map_err(CircuitError::from)?;
        let xv = sv.solve_at(f)?;
        let (at_node, at_element) = (node_voltage(&xv, n), node_voltage(&xv, x));
        let xi = si.solve_at(f)?;
        let s = Complex64::new(0.0, TAU * f);
        // Current from the node into the element.
        let into = (node_voltage(&xi, n) - node_voltage(&xi, br.far)) * br.admittance(s);
        let (v_ratio, i_ratio) = match direction {
            LoopDirection::IntoElement => (-at_node / at_element, -(into - 1.0) / into),
            // The driver is the element: i_y = −into arrives from it, and
            // i_x = i_y + 1 leaves into the rest of the node.
            LoopDirection::FromElement => (-at_element / at_node, into / (1.0 - into)),
        };
        let loop_gain = (v_ratio * i_ratio - 1.0) / (v_ratio + i_ratio + 2.0);
        tv.push(check::result_complex("voltageRatio", v_ratio)?);
        ti.push(check::result_complex("currentRatio", i_ratio)?);
        t.push(check::result_complex("loopGain", loop_gain)?);
    }
    Ok(DoubleInjection {
        loop_gain: ResponseSweep::from_samples("loopGain", frequencies_hz, &t)?,
        voltage_ratio: ResponseSweep::from_samples("voltageRatio", frequencies_hz, &tv)?,
        current_ratio: ResponseSweep::from_samples("currentRatio", frequencies_hz, &ti)?,
    })
}
