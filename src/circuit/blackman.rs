//! Return ratio, Blackman's impedance formula and the asymptotic-gain view.
//!
//! All three treat one controlled source of gain k as the loop's reference. Its
//! **return ratio** T: set the independent sources to zero, replace the
//! controlled source by an independent source of value 1 (same nodes, same
//! kind of output), and read the control variable x it produces; T = −k·x.
//!
//! **Blackman's impedance formula** at a port (two nodes):
//! Z = Z0·(1 + Tsc)/(1 + Toc), with Z0 the port impedance when k = 0, Tsc the
//! return ratio with the port shorted and Toc with it open. Source: R. B.
//! Blackman, "Effect of feedback on impedance", Bell System Technical Journal,
//! vol. 22, 1943 (from memory).
//!
//! **Asymptotic gain**: with the controlled source's output u as a second input,
//! linearity gives y = a·s + b·u and x = c·s + d·u; then T = −k·d, the direct
//! transmission G0 = a (k = 0), the asymptotic gain G∞ = a − b·c/d (x forced to
//! zero, k → ∞), and Af = G∞·T/(1 + T) + G0/(1 + T). Source: S. Rosenstark,
//! *Feedback Amplifier Principles*, Macmillan, 1986; R. D. Middlebrook, "The
//! general feedback theorem", 2006 (both from memory).
//!
//! These are exact rearrangements, so they must agree with the direct solve to
//! rounding — and the tests check that they do, on every template.

use super::error::{CircuitError, CircuitResult, Name};
use super::mna::{port_impedance, solve, unit_source, Solution};
use super::netlist::{Circuit, Control, ElementKind};
use super::templates::{build, StageSpec};
use super::twoport::relative_error;
use crate::check;
use crate::error::Error;
use crate::feedback::Sampling;
use num_complex::Complex64;

/// Which quantity is the output of a transfer.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Output<'a> {
    /// V(plus) − V(minus).
    Voltage(&'a str, &'a str),
    /// The current of an element.
    Current(&'a str),
}

impl Output<'_> {
    fn read(&self, s: &Solution) -> CircuitResult<Complex64> {
        match *self {
            Output::Voltage(p, m) => s.voltage_between(p, m),
            Output::Current(e) => s.current(e),
        }
    }
}

/// The controlled source's index, gain and control.
fn controlled(c: &Circuit, name: &str) -> CircuitResult<(usize, f64, Control)> {
    let i = c.element_index(name)?;
    let e = c
        .elements()
        .get(i)
        .ok_or(CircuitError::from(Error::UnknownName {
            param: "controlled",
            expected: "",
        }))?;
    if !e.kind().is_controlled() {
        return Err(CircuitError::new(
            Error::OutOfDomain {
                param: "controlled",
                requirement: "must name a controlled source (vcvs, vccs, ccvs, cccs)",
            },
            e.name(),
        ));
    }
    Ok((i, e.value(), e.control()))
}

/// The control variable (V(c+) − V(c−) or I(control)) in a solution.
fn control_value(c: &Circuit, control: Control, s: &Solution) -> CircuitResult<Complex64> {
    let node = |i: usize| c.nodes().get(i).map(|n| n.as_str()).unwrap_or("0");
    match control {
        Control::Nodes([p, n]) => s.voltage_between(node(p), node(n)),
        Control::Element(name) => s.current(name.as_str()),
        Control::None => Err(CircuitError::from(Error::OutOfDomain {
            param: "controlled",
            requirement: "has no control",
        })),
    }
}

/// Solve with the controlled source replaced by an independent source of value
/// `u` (the other sources as they are in `c`); `short` adds a 0 V source across
/// the port.
fn solve_opened(
    c: &Circuit,
    index: usize,
    u: f64,
    short: Option<(&str, &str)>,
    f: f64,
) -> CircuitResult<Solution> {
    let mut c1 = c.clone();
    c1.replace_with_source(index, u);
    if let Some((p, m)) = short {
        c1.add_internal("short", ElementKind::VoltageSource, p, m, 0.0)?;
    }
    solve(&c1, f)
}

/// The return ratio T of the controlled source `controlled`, with the port
/// `short` shorted if given, at `frequency_hz`.
///
/// # Errors
/// Unknown names; `controlled` not a controlled source; singular solves, named.
///
/// # Example
/// ```
/// use loopwright::circuit::{Circuit, blackman::return_ratio};
/// // A VCVS of gain 99 whose output is divided by 10 and fed back to its − input.
/// let mut c = Circuit::new();
/// c.voltage_source("Vs", "p", "0", 1.0).unwrap();
/// c.vcvs("E", "o", "0", "p", "n", 99.0).unwrap();
/// c.resistor("R1", "o", "n", 9e3).unwrap();
/// c.resistor("R2", "n", "0", 1e3).unwrap();
/// let t = return_ratio(&c, "E", None, 0.0).unwrap();
/// assert!((t.re - 9.9).abs() < 1e-12);
/// assert_eq!(return_ratio(&c, "R1", None, 0.0).unwrap_err().error.param(), "controlled");
/// ```
pub fn return_ratio(
    c: &Circuit,
    controlled_name: &str,
    short: Option<(&str, &str)>,
    frequency_hz: f64,
) -> CircuitResult<Complex64> {
    let (i, k, control) = controlled(c, controlled_name)?;
    let mut c0 = c.clone();
    c0.zero_sources();
    let s = solve_opened(&c0, i, 1.0, short, frequency_hz)?;
    let x = control_value(c, control, &s)?;
    Ok(check::result_complex("return_ratio", -(k * x))?)
}

/// Blackman's formula at a port, beside the direct port impedance.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct BlackmanImpedance {
    /// Port impedance with the controlled source's gain set to zero, Ω.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub z0: Complex64,
    /// Return ratio with the port shorted.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub t_short: Complex64,
    /// Return ratio with the port open.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub t_open: Complex64,
    /// Z0·(1 + Tsc)/(1 + Toc), Ω.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub blackman: Complex64,
    /// The port impedance solved directly, Ω.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub exact: Complex64,
    /// |blackman − exact| / |exact|.
    pub relative_error: f64,
}

/// Blackman's impedance formula at the port (`plus`, `minus`) with respect to
/// the controlled source `controlled`.
///
/// # Errors
/// As [`return_ratio`] and [`port_impedance`]; [`Error::Oscillation`] (param
/// `t_open`) when 1 + Toc = 0.
///
/// # Example
/// ```
/// use loopwright::circuit::{Circuit, blackman::blackman_impedance};
/// let mut c = Circuit::new();
/// c.voltage_source("Vs", "s", "0", 1.0).unwrap();
/// c.resistor("Rs", "s", "p", 1e3).unwrap();
/// c.resistor("Ri", "p", "n", 1e4).unwrap();
/// c.vcvs("E", "o", "0", "p", "n", 1e3).unwrap();
/// c.resistor("R1", "o", "n", 9e3).unwrap();
/// c.resistor("R2", "n", "0", 1e3).unwrap();
/// let z = blackman_impedance(&c.without("Vs").unwrap().without("Rs").unwrap(), "E", "p", "0", 0.0).unwrap();
/// assert!(z.relative_error < 1e-12);
/// assert!(blackman_impedance(&c, "E", "p", "nowhere", 0.0).is_err());
/// ```
pub fn blackman_impedance(
    c: &Circuit,
    controlled_name: &str,
    plus: &str,
    minus: &str,
    frequency_hz: f64,
) -> CircuitResult<BlackmanImpedance> {
    let (i, _, _) = controlled(c, controlled_name)?;
    let exact = port_impedance(c, plus, minus, frequency_hz)?;
    let name = c.elements().get(i).map(|e| e.name()).unwrap_or(Name::EMPTY);
    let z0 = port_impedance(
        &c.with_value(name.as_str(), 0.0)?,
        plus,
        minus,
        frequency_hz,
    )?;
    let t_short = return_ratio(c, controlled_name, Some((plus, minus)), frequency_hz)?;
    let t_open = return_ratio(c, controlled_name, None, frequency_hz)?;
    let one = Complex64::new(1.0, 0.0);
    let d_open = one + t_open;
    if d_open.norm() <= 4.0 * f64::EPSILON * (1.0 + t_open.norm()) {
        return Err(CircuitError::new(
            Error::Oscillation { param: "t_open" },
            name,
        ));
    }
    let blackman = check::result_complex("blackman", z0 * (one + t_short) / d_open)?;
    Ok(BlackmanImpedance {
        z0,
        t_short,
        t_open,
        blackman,
        exact,
        relative_error: relative_error(blackman, exact)?,
    })
}

/// The asymptotic-gain decomposition of a transfer, beside the direct solve.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct AsymptoticGain {
    /// G∞: the transfer with the control variable forced to zero (k → ∞).
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub g_inf: Complex64,
    /// G0: the direct transmission with k = 0.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub g0: Complex64,
    /// The return ratio T.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub t: Complex64,
    /// G∞·T/(1 + T) + G0/(1 + T).
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub af: Complex64,
    /// The transfer solved directly.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub exact: Complex64,
    /// |af − exact| / |exact|.
    pub relative_error: f64,
}

/// The asymptotic-gain decomposition of the transfer from the independent
/// source `source` to `output`, with respect to the controlled source `controlled`.
///
/// # Errors
/// As [`return_ratio`]; `source` not an independent source; [`Error::Unreachable`]
/// (param `t`) when the controlled source does not reach its own control (no
/// loop, so G∞ does not exist); [`Error::Oscillation`] when 1 + T = 0.
///
/// # Example
/// ```
/// use loopwright::circuit::{Circuit, blackman::{asymptotic_gain, Output}};
/// let mut c = Circuit::new();
/// c.voltage_source("Vs", "p", "0", 1.0).unwrap();
/// c.vcvs("E", "o", "0", "p", "n", 99.0).unwrap();
/// c.resistor("R1", "o", "n", 9e3).unwrap();
/// c.resistor("R2", "n", "0", 1e3).unwrap();
/// let g = asymptotic_gain(&c, "E", "Vs", Output::Voltage("o", "0"), 0.0).unwrap();
/// assert!((g.g_inf.re - 10.0).abs() < 1e-12); // 1 + R1/R2
/// assert!(g.relative_error < 1e-12);
/// assert!(asymptotic_gain(&c, "E", "R1", Output::Voltage("o", "0"), 0.0).is_err());
/// ```
pub fn asymptotic_gain(
    c: &Circuit,
    controlled_name: &str,
    source: &str,
    output: Output<'_>,
    frequency_hz: f64,
) -> CircuitResult<AsymptoticGain> {
    let (i, k, control) = controlled(c, controlled_name)?;
    let name = c.elements().get(i).map(|e| e.name()).unwrap_or(Name::EMPTY);
    let (with_source, _) = unit_source(c, source)?;
    let exact = output.read(&solve(&with_source, frequency_hz)?)?;
    // s = 1, u = 0.
    let s1 = solve_opened(&with_source, i, 0.0, None, frequency_hz)?;
    let (a, cc) = (output.read(&s1)?, control_value(c, control, &s1)?);
    // s = 0, u = 1.
    let mut quiet = c.clone();
    quiet.zero_sources();
    let s2 = solve_opened(&quiet, i, 1.0, None, frequency_hz)?;
    let (b, d) = (output.read(&s2)?, control_value(c, control, &s2)?);
    let t = check::result_complex("t", -(k * d))?;
    if d == Complex64::new(0.0, 0.0) {
        return Err(CircuitError::new(
            Error::Unreachable {
                param: "t",
                reason: "the controlled source does not reach its own control, so there is no loop",
            },
            name,
        ));
    }
    let g_inf = check::result_complex("g_inf", a - b * cc / d)?;
    let one = Complex64::new(1.0, 0.0);
    let dd = one + t;
    if dd.norm() <= 4.0 * f64::EPSILON * (1.0 + t.norm()) {
        return Err(CircuitError::new(Error::Oscillation { param: "t" }, name));
    }
    let af = check::result_complex("af", g_inf * t / dd + a / dd)?;
    Ok(AsymptoticGain {
        g_inf,
        g0: a,
        t,
        af,
        exact,
        relative_error: relative_error(af, exact)?,
    })
}

/// Blackman and asymptotic-gain views of a template stage.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct StageViews {
    /// Af by the asymptotic-gain formula (w.r.t. the amplifier's source `A`).
    pub gain: AsymptoticGain,
    /// Blackman at the input port, with the source and Rs removed (Rin).
    pub input: BlackmanImpedance,
    /// Blackman at the load's port, with the load removed (Rout).
    pub output: BlackmanImpedance,
}

/// The asymptotic gain and Blackman's Rin and Rout of a template stage.
///
/// # Errors
/// As [`build`], [`asymptotic_gain`] and [`blackman_impedance`].
pub fn stage_views(spec: &StageSpec, frequency_hz: f64) -> CircuitResult<StageViews> {
    let stage = build(spec)?;
    let t = spec.topology;
    let out = match t.sampling() {
        Sampling::Voltage => Output::Voltage("out", "0"),
        Sampling::Current => Output::Current("Rl"),
    };
    let gain = asymptotic_gain(&stage.circuit, "A", stage.source, out, frequency_hz)?;
    let no_source = stage.circuit.without(stage.source)?.without("Rs")?;
    let input = blackman_impedance(&no_source, "A", "in", "0", frequency_hz)?;
    let (p, m) = stage.load_port;
    let output = blackman_impedance(&stage.circuit.without("Rl")?, "A", p, m, frequency_hz)?;
    Ok(StageViews {
        gain,
        input,
        output,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::templates::{AmplifierModel, FeedbackNetwork};
    use crate::feedback::Topology;

    #[test]
    fn blackman_and_asymptotic_gain_agree_with_the_solve_on_every_template() {
        // Identity (exact rearrangements): agreement to rounding, with
        // capacitances present and at a frequency where they matter.
        for t in Topology::ALL {
            let (gain, rg, ri) = match t {
                Topology::SeriesShunt => (1e4, 1e3, 1e5),
                Topology::ShuntShunt => (-1e8, 0.0, 100.0),
                Topology::SeriesSeries => (1.0, 100.0, 1e5),
                Topology::ShuntSeries => (-1e4, 1e3, 100.0),
            };
            let spec = StageSpec {
                topology: t,
                amplifier: AmplifierModel {
                    ri,
                    ro: 1e3,
                    gain,
                    ci: 10e-12,
                    co: 5e-12,
                },
                network: FeedbackNetwork {
                    rf: 1e4,
                    rg,
                    cf: 2e-12,
                },
                rs: 1e3,
                rl: 2e3,
            };
            for f in [0.0, 1e6] {
                let v = stage_views(&spec, f).unwrap();
                assert!(
                    v.gain.relative_error < 1e-10,
                    "{} {f}: {}",
                    t.name(),
                    v.gain.relative_error
                );
                assert!(
                    v.input.relative_error < 1e-10,
                    "{} {f}: {}",
                    t.name(),
                    v.input.relative_error
                );
                assert!(
                    v.output.relative_error < 1e-10,
                    "{} {f}: {}",
                    t.name(),
                    v.output.relative_error
                );
                assert!(v.gain.t.re > 1.0, "{}", t.name());
            }
        }
    }

    #[test]
    fn no_loop_is_reported() {
        let mut c = Circuit::new();
        c.voltage_source("Vs", "p", "0", 1.0).unwrap();
        c.resistor("R", "p", "0", 1.0).unwrap();
        c.vcvs("E", "o", "0", "p", "0", 5.0).unwrap();
        c.resistor("Rl", "o", "0", 1.0).unwrap();
        let e = asymptotic_gain(&c, "E", "Vs", Output::Voltage("o", "0"), 0.0).unwrap_err();
        assert_eq!((e.error.code(), e.name.as_str()), ("unreachable", "E"));
    }
}
