//! The systematic two-port method of feedback analysis, next to the exact answer.
//!
//! For each topology the feedback network is a two-port whose parameters are
//! chosen by the way it is connected: series mixing adds voltages and shunt
//! mixing currents at the input; shunt sampling shares the output voltage,
//! series sampling the output current. So:
//!
//! | topology      | parameters | β      | loading at input | loading at output |
//! |---------------|------------|--------|------------------|-------------------|
//! | series-shunt  | h          | h12    | h11 in series    | 1/h22 in shunt    |
//! | shunt-shunt   | y          | y12    | 1/y11 in shunt   | 1/y22 in shunt    |
//! | series-series | z          | z12    | z11 in series    | z22 in series     |
//! | shunt-series  | g          | g12    | 1/g11 in shunt   | g22 in series     |
//!
//! The parameters are extracted numerically from the stage's own feedback
//! elements (test sources at the ports, exact MNA solves). The basic amplifier
//! loaded by them (the "A circuit") gives A, Ri and Ro; then T = A·β,
//! D = 1 + T, Af = A/D, Rif = Ri·D or Ri/D, Rof = Ro/D or Ro·D
//! ([`crate::feedback`]), and the resistances the source and the load actually
//! see: series mixing Rin = Rif − Rs, shunt mixing 1/Rin = 1/Rif − 1/Rs; shunt
//! sampling 1/Rout = 1/Rof − 1/Rl, series sampling Rout = Rof − Rl. The forward
//! transmission of the network (p21) is neglected — that, and the unilateral
//! amplifier, are the method's approximations; the exact solution shows their cost.
//!
//! Source: Sedra & Smith, *Microelectronic Circuits*, 5th ed., sections 8.4–8.7,
//! and 7th ed., ch. 10 (from memory); Gray, Hurst, Lewis & Meyer, *Analysis and
//! Design of Analog Integrated Circuits*, 5th ed., sections 8.4–8.6 (from memory).

use super::error::{CircuitError, CircuitResult};
use super::mna::{port_impedance_in, solve_in, Solution, Solves};
use super::netlist::{Circuit, ElementKind};
use super::templates::{build, build_loaded, Loading, Stage, StageSpec};
use crate::check;
use crate::error::Error;
use crate::feedback::{self as fb, Mixing, Sampling, Topology};
use num_complex::Complex64;

/// Which two-port parameter set.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum ParameterKind {
    /// Hybrid: V1 = h11·I1 + h12·V2, I2 = h21·I1 + h22·V2.
    H,
    /// Admittance: I1 = y11·V1 + y12·V2, I2 = y21·V1 + y22·V2.
    Y,
    /// Impedance: V1 = z11·I1 + z12·I2, V2 = z21·I1 + z22·I2.
    Z,
    /// Inverse hybrid: I1 = g11·V1 + g12·I2, V2 = g21·V1 + g22·I2.
    G,
}

impl ParameterKind {
    /// Its letter as results name it: `"h"`, `"y"`, `"z"` or `"g"`.
    pub const fn letter(self) -> &'static str {
        match self {
            ParameterKind::H => "h",
            ParameterKind::Y => "y",
            ParameterKind::Z => "z",
            ParameterKind::G => "g",
        }
    }

    /// The set the topology's connections call for (see the module table).
    pub const fn for_topology(t: Topology) -> ParameterKind {
        match t {
            Topology::SeriesShunt => ParameterKind::H,
            Topology::ShuntShunt => ParameterKind::Y,
            Topology::SeriesSeries => ParameterKind::Z,
            Topology::ShuntSeries => ParameterKind::G,
        }
    }
}

/// Two-port parameters; port currents flow into the network at the + terminal.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct TwoPortParameters {
    /// Which set.
    pub kind: ParameterKind,
    /// p11.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub p11: Complex64,
    /// p12.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub p12: Complex64,
    /// p21.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub p21: Complex64,
    /// p22.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub p22: Complex64,
}

#[derive(Clone, Copy)]
enum Drive {
    Open,
    Current(f64),
    Voltage(f64),
}

/// Port voltages and currents (into the network) under the given drives.
fn drive(
    sub: &Circuit,
    ports: [(&str, &str); 2],
    drives: [Drive; 2],
    w_hz: f64,
    solves: &mut Solves,
) -> CircuitResult<[(Complex64, Complex64); 2]> {
    let mut c = sub.clone();
    c.reserve(2);
    let tags = ["port1", "port2"];
    for ((&(p, m), d), tag) in ports.iter().zip(drives).zip(tags) {
        match d {
            Drive::Open => {}
            Drive::Current(v) => {
                c.add_internal(tag, ElementKind::CurrentSource, m, p, v)?;
            }
            Drive::Voltage(v) => {
                c.add_internal(tag, ElementKind::VoltageSource, p, m, v)?;
            }
        }
    }
    let s: Solution = solve_in(&c, w_hz, solves)?;
    let mut out = [(Complex64::default(), Complex64::default()); 2];
    for (((&(p, m), d), tag), slot) in ports.iter().zip(drives).zip(tags).zip(out.iter_mut()) {
        let v = s.voltage_between(p, m)?;
        let i = match d {
            Drive::Open => Complex64::default(),
            Drive::Current(x) => Complex64::new(x, 0.0),
            Drive::Voltage(_) => -s.current(super::error::Name::internal(tag).as_str())?,
        };
        *slot = (v, i);
    }
    Ok(out)
}

/// The two-port parameters of the named elements of `c`, between `port1` and
/// `port2` (node pairs, + first), at `frequency_hz`, from exact solves with test
/// sources: a 1 A source or a 1 V source at one port, the other port open or
/// shorted as the parameter's definition needs.
///
/// # Errors
/// Unknown element or node names; an element that is not passive (R, C, L or
/// admittance; param `feedback`, named); a network whose parameters of this kind
/// do not exist (e.g. y parameters of a network whose two ports share a node
/// pair: a singular solve, named).
///
/// # Example
/// ```
/// use loopwright::circuit::{Circuit, twoport::{network_parameters, ParameterKind}};
/// let mut c = Circuit::new();
/// c.resistor("Rf", "out", "fb", 9e3).unwrap();
/// c.resistor("Rg", "fb", "0", 1e3).unwrap();
/// let h = network_parameters(&c, &["Rf", "Rg"], ("fb", "0"), ("out", "0"), ParameterKind::H, 0.0).unwrap();
/// assert!((h.p12.re - 0.1).abs() < 1e-15);      // β = Rg/(Rf + Rg)
/// assert!((h.p11.re - 900.0).abs() < 1e-9);     // Rf ‖ Rg
/// assert!(network_parameters(&c, &["Rx"], ("fb", "0"), ("out", "0"), ParameterKind::H, 0.0).is_err());
/// ```
pub fn network_parameters(
    c: &Circuit,
    elements: &[&str],
    port1: (&str, &str),
    port2: (&str, &str),
    kind: ParameterKind,
    frequency_hz: f64,
) -> CircuitResult<TwoPortParameters> {
    let ports = [port1, port2];
    parameters_in(
        c,
        elements,
        ports,
        kind,
        frequency_hz,
        &mut Solves::default(),
    )
}

/// [`network_parameters`] in the storage of `solves`. Both drives of each
/// parameter set give the network the same matrix (a test voltage source at
/// the same port in both, the other port's test current source or none), so
/// the second solve reuses the first one's factorization.
fn parameters_in(
    c: &Circuit,
    elements: &[&str],
    ports: [(&str, &str); 2],
    kind: ParameterKind,
    frequency_hz: f64,
    solves: &mut Solves,
) -> CircuitResult<TwoPortParameters> {
    let [port1, port2] = ports;
    let mut sub = Circuit::new();
    sub.reserve(elements.len());
    for &name in elements {
        let e = c.element(name)?;
        if !matches!(
            e.kind(),
            ElementKind::Resistor
                | ElementKind::Capacitor
                | ElementKind::Inductor
                | ElementKind::Admittance
        ) {
            return Err(CircuitError::new(
                Error::OutOfDomain {
                    param: "feedback",
                    requirement: "the feedback network must be passive (resistors, capacitors, inductors, admittances)",
                },
                e.name(),
            ));
        }
        let node = |i: usize| c.nodes().get(i).map(|n| n.as_str()).unwrap_or("0");
        let [a, b] = e.nodes();
        sub.add_element(
            name,
            e.kind(),
            node(a),
            node(b),
            None,
            e.value(),
            e.value_im(),
        )?;
    }
    for n in [port1.0, port1.1, port2.0, port2.1] {
        c.node_index(n)?;
    }
    use Drive::*;
    let (p11, p21, p12, p22) = match kind {
        ParameterKind::H => {
            let [(v1, _), (_, i2)] = drive(
                &sub,
                ports,
                [Current(1.0), Voltage(0.0)],
                frequency_hz,
                solves,
            )?;
            let [(v1b, _), (_, i2b)] =
                drive(&sub, ports, [Open, Voltage(1.0)], frequency_hz, solves)?;
            (v1, i2, v1b, i2b)
        }
        ParameterKind::Y => {
            let [(_, i1), (_, i2)] = drive(
                &sub,
                ports,
                [Voltage(1.0), Voltage(0.0)],
                frequency_hz,
                solves,
            )?;
            let [(_, i1b), (_, i2b)] = drive(
                &sub,
                ports,
                [Voltage(0.0), Voltage(1.0)],
                frequency_hz,
                solves,
            )?;
            (i1, i2, i1b, i2b)
        }
        ParameterKind::Z => {
            let [(v1, _), (v2, _)] =
                drive(&sub, ports, [Current(1.0), Open], frequency_hz, solves)?;
            let [(v1b, _), (v2b, _)] =
                drive(&sub, ports, [Open, Current(1.0)], frequency_hz, solves)?;
            (v1, v2, v1b, v2b)
        }
        ParameterKind::G => {
            let [(_, i1), (v2, _)] =
                drive(&sub, ports, [Voltage(1.0), Open], frequency_hz, solves)?;
            let [(_, i1b), (v2b, _)] = drive(
                &sub,
                ports,
                [Voltage(0.0), Current(1.0)],
                frequency_hz,
                solves,
            )?;
            (i1, v2, i1b, v2b)
        }
    };
    Ok(TwoPortParameters {
        kind,
        p11,
        p12,
        p21,
        p22,
    })
}

/// An approximate value beside the exact one.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Compared {
    /// The two-port method's value.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub two_port: Complex64,
    /// The exact (MNA) value.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub exact: Complex64,
    /// |two_port − exact| / |exact|.
    pub relative_error: f64,
}

/// |approx − exact| / |exact|, as an error when exact is zero and approx is not.
pub(crate) fn relative_error(approx: Complex64, exact: Complex64) -> CircuitResult<f64> {
    let diff = (approx - exact).norm();
    if diff == 0.0 {
        return Ok(0.0);
    }
    Ok(check::result("relative_error", diff / exact.norm())?)
}

fn compared(two_port: Complex64, exact: Complex64) -> CircuitResult<Compared> {
    Ok(Compared {
        two_port,
        exact,
        relative_error: relative_error(two_port, exact)?,
    })
}

/// The two-port analysis of a stage, each closed-loop result beside the exact one.
///
/// Units: `a` and `af` in the topology's gain unit ([`Topology::gain_unit`]),
/// `beta` in its reciprocal; impedances in Ω. `rif` includes the source
/// resistance and `rof` the load, as the method forms them; `rin` and `rout` are
/// what the source and the load see.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct TwoPortAnalysis {
    /// The topology.
    pub topology: Topology,
    /// Frequency, Hz.
    pub frequency_hz: f64,
    /// Gain unit, e.g. `"V/A"`.
    pub gain_unit: &'static str,
    /// The feedback network's parameters.
    pub parameters: TwoPortParameters,
    /// Gain of the loaded basic amplifier.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub a: Complex64,
    /// Feedback factor β = p12.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub beta: Complex64,
    /// Loop gain T = A·β.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub loop_gain: Complex64,
    /// Amount of feedback D = 1 + A·β.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub feedback_amount: Complex64,
    /// Input impedance of the loaded basic amplifier (including Rs), Ω.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub ri: Complex64,
    /// Output impedance of the loaded basic amplifier (including Rl), Ω.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub ro: Complex64,
    /// Closed-loop gain Af.
    pub af: Compared,
    /// Input impedance with feedback, including the source resistance, Ω.
    pub rif: Compared,
    /// Output impedance with feedback, including the load, Ω.
    pub rof: Compared,
    /// Input impedance seen by the source, Ω.
    pub rin: Compared,
    /// Output impedance seen by the load, Ω.
    pub rout: Compared,
    /// The ideal closed-loop gain 1/β.
    #[cfg_attr(feature = "serde", serde(serialize_with = "super::cx::serialize"))]
    pub ideal_af: Complex64,
    /// |1/β − Af_exact| / |Af_exact|.
    pub ideal_af_error: f64,
}

/// The stage's output quantity in a solution: V(out) or I(Rl).
pub(crate) fn output_of(t: Topology, s: &Solution) -> CircuitResult<Complex64> {
    match t.sampling() {
        Sampling::Voltage => s.voltage("out"),
        Sampling::Current => s.current("Rl"),
    }
}

/// Input impedance seen by the source (without Rs) and including Rs, each from a
/// test-source solve at node `in` (no cancellation, unlike V(in)/I(Rs)).
fn input_impedances(
    t: Topology,
    stage: &Stage,
    rs: f64,
    f: f64,
    solves: &mut Solves,
) -> CircuitResult<(Complex64, Complex64)> {
    let open = stage.circuit.without_each(&[stage.source, "Rs"])?;
    let rin = port_impedance_in(&open, "in", "0", f, solves)?;
    let rif = match t.mixing() {
        Mixing::Series => rin + rs,
        Mixing::Shunt => {
            let no_source = stage.circuit.without(stage.source)?;
            port_impedance_in(&no_source, "in", "0", f, solves)?
        }
    };
    Ok((rin, rif))
}

/// Output impedance including Rl, with sources zeroed.
fn output_with_load(
    t: Topology,
    stage: &Stage,
    rl: f64,
    f: f64,
    solves: &mut Solves,
) -> CircuitResult<Complex64> {
    match t.sampling() {
        Sampling::Voltage => port_impedance_in(&stage.circuit, "out", "0", f, solves),
        Sampling::Current => {
            let (p, m) = stage.load_port;
            Ok(port_impedance_in(&stage.circuit.without("Rl")?, p, m, f, solves)? + rl)
        }
    }
}

fn parallel_removed(z: Complex64, r: f64) -> CircuitResult<Complex64> {
    // 1/Z' = 1/Z − 1/R.
    let one = Complex64::new(1.0, 0.0);
    Ok(check::result_complex(
        "impedance",
        one / (one / z - one / r),
    )?)
}

/// Run the two-port method on a stage and compare it with the exact solution.
///
/// # Errors
/// As [`build`] for the parts; `frequency` negative or not finite;
/// [`Error::Oscillation`] when D = 1 + A·β is zero; singular or overflowing
/// solves, naming the node or element.
///
/// # Example
/// ```
/// use loopwright::circuit::templates::{AmplifierModel, FeedbackNetwork, StageSpec};
/// use loopwright::circuit::twoport::analyze;
/// use loopwright::feedback::Topology;
/// let spec = StageSpec {
///     topology: Topology::SeriesShunt,
///     amplifier: AmplifierModel { ri: 1e5, ro: 1e3, gain: 1e4, ci: 0.0, co: 0.0 },
///     network: FeedbackNetwork { rf: 1e6, rg: 1e3, cf: 0.0 },
///     rs: 1e4,
///     rl: 2e3,
/// };
/// let r = analyze(&spec, 0.0).unwrap();
/// assert!((r.beta.re - 1e3 / (1e6 + 1e3)).abs() < 1e-15);
/// assert!(r.af.relative_error < 1e-3); // the method is close here
/// assert!(analyze(&spec, -1.0).is_err());
/// ```
pub fn analyze(spec: &StageSpec, frequency_hz: f64) -> CircuitResult<TwoPortAnalysis> {
    let t = spec.topology;
    let f = frequency_hz;
    super::mna::omega(f)?;
    let stage = build(spec)?;
    let kind = ParameterKind::for_topology(t);
    // One storage for every solve below: those of one matrix share its
    // factorization (the network's two drives; a stage and its output
    // impedance, and with shunt mixing its input impedance).
    let solves = &mut Solves::default();
    let params = parameters_in(
        &stage.circuit,
        stage.feedback,
        [stage.input_port, stage.output_port],
        kind,
        f,
        solves,
    )?;
    let one = Complex64::new(1.0, 0.0);
    let inv = |z: Complex64, what: &'static str| -> CircuitResult<Complex64> {
        Ok(check::result_complex(
            what,
            one / check::nonzero_complex(what, z)?,
        )?)
    };
    let loading = match kind {
        ParameterKind::H => Loading {
            input: inv(params.p11, "h11")?,
            output: params.p22,
        },
        ParameterKind::Y => Loading {
            input: params.p11,
            output: params.p22,
        },
        ParameterKind::Z => Loading {
            input: inv(params.p11, "z11")?,
            output: inv(params.p22, "z22")?,
        },
        ParameterKind::G => Loading {
            input: params.p11,
            output: inv(params.p22, "g22")?,
        },
    };
    // The loaded basic amplifier.
    let a_stage = build_loaded(spec, loading)?;
    let a_sol = solve_in(&a_stage.circuit, f, solves)?;
    let a = output_of(t, &a_sol)?;
    let (_, ri) = input_impedances(t, &a_stage, spec.rs, f, solves)?;
    let ro = output_with_load(t, &a_stage, spec.rl, f, solves)?;
    let beta = params.p12;
    let loop_ = fb::loop_phasors(a, beta).map_err(CircuitError::from)?;
    let z = fb::impedances_with_feedback(t, ri, ro, a, beta).map_err(CircuitError::from)?;
    let rin_tp = match t.mixing() {
        Mixing::Series => z.input - spec.rs,
        Mixing::Shunt => parallel_removed(z.input, spec.rs)?,
    };
    let rout_tp = match t.sampling() {
        Sampling::Voltage => parallel_removed(z.output, spec.rl)?,
        Sampling::Current => z.output - spec.rl,
    };
    // The exact solution of the same circuit.
    let sol = solve_in(&stage.circuit, f, solves)?;
    let af_exact = output_of(t, &sol)?;
    let (rin_exact, rif_exact) = input_impedances(t, &stage, spec.rs, f, solves)?;
    let (lp, lm) = stage.load_port;
    let rout_exact = port_impedance_in(&stage.circuit.without("Rl")?, lp, lm, f, solves)?;
    let rof_exact = output_with_load(t, &stage, spec.rl, f, solves)?;
    let ideal_af = inv(beta, "beta")?;
    Ok(TwoPortAnalysis {
        topology: t,
        frequency_hz: f,
        gain_unit: t.gain_unit(),
        parameters: params,
        a,
        beta,
        loop_gain: loop_.loop_gain,
        feedback_amount: loop_.feedback_amount,
        ri,
        ro,
        af: compared(loop_.closed_loop_gain, af_exact)?,
        rif: compared(z.input, rif_exact)?,
        rof: compared(z.output, rof_exact)?,
        rin: compared(rin_tp, rin_exact)?,
        rout: compared(rout_tp, rout_exact)?,
        ideal_af,
        ideal_af_error: relative_error(ideal_af, af_exact)?,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::templates::{AmplifierModel, FeedbackNetwork};

    fn spec(t: Topology, gain: f64, ri: f64, ro: f64) -> StageSpec {
        let rg = if t == Topology::ShuntShunt { 0.0 } else { 1e3 };
        StageSpec {
            topology: t,
            amplifier: AmplifierModel {
                ri,
                ro,
                gain,
                ci: 0.0,
                co: 0.0,
            },
            network: FeedbackNetwork {
                rf: 1e4,
                rg,
                cf: 0.0,
            },
            rs: 1e3,
            rl: 2e3,
        }
    }

    #[test]
    fn parameters_of_the_textbook_networks() {
        // Closed forms of the resistive networks (Sedra & Smith, Microelectronic
        // Circuits, 7th ed., ch. 10, from memory): h of the divider, y of a
        // bridging Rf, z of a sense resistor, g of the Rf–Rg current divider.
        let (rf, rg) = (1e4, 1e3);
        let cases = [
            Topology::SeriesShunt,
            Topology::ShuntShunt,
            Topology::SeriesSeries,
            Topology::ShuntSeries,
        ];
        for t in cases {
            let stage = build(&spec(t, 1.0, 1e3, 1e3)).unwrap();
            let p = network_parameters(
                &stage.circuit,
                stage.feedback,
                stage.input_port,
                stage.output_port,
                ParameterKind::for_topology(t),
                0.0,
            )
            .unwrap();
            let want = match t {
                Topology::SeriesShunt => [
                    rf * rg / (rf + rg),
                    rg / (rf + rg),
                    -rg / (rf + rg),
                    1.0 / (rf + rg),
                ],
                Topology::ShuntShunt => [1.0 / rf, -1.0 / rf, -1.0 / rf, 1.0 / rf],
                // Series-series with rf as the T leg to the amplifier input.
                Topology::SeriesSeries => [rf + rg, rg, rg, rg],
                Topology::ShuntSeries => [
                    1.0 / (rf + rg),
                    -rg / (rf + rg),
                    rg / (rf + rg),
                    rf * rg / (rf + rg),
                ],
            };
            let got = [p.p11, p.p12, p.p21, p.p22];
            for (k, (g, w)) in got.iter().zip(want).enumerate() {
                assert!(
                    (g.re - w).abs() <= 1e-12 * w.abs() && g.im == 0.0,
                    "{} p{}: {} vs {}",
                    t.name(),
                    k,
                    g,
                    w
                );
            }
        }
    }

    #[test]
    fn loop_gain_is_positive_for_the_documented_signs() {
        for (t, g, ri) in [
            (Topology::SeriesShunt, 1e4, 1e5),
            (Topology::ShuntShunt, -1e8, 100.0),
            (Topology::SeriesSeries, 1.0, 1e5),
            (Topology::ShuntSeries, -1e4, 100.0),
        ] {
            let r = analyze(&spec(t, g, ri, 1e3), 0.0).unwrap();
            assert!(r.loop_gain.re > 1.0, "{}: T = {}", t.name(), r.loop_gain);
            // The method is an approximation, but a close one when T is large.
            assert!(
                r.af.relative_error < 1e-2,
                "{}: {}",
                t.name(),
                r.af.relative_error
            );
        }
    }

    #[test]
    fn approaches_one_over_beta_in_the_ideal_limit() {
        // Limit: Ri → ∞ (series) or → 0 (shunt), Ro → 0 (voltage output) or → ∞
        // (current output), gain → ∞: Af → 1/β (Black's feedback equation).
        for t in Topology::ALL {
            let mut last = f64::INFINITY;
            for k in 1..=4 {
                let s = 10f64.powi(k);
                let (ri, ro) = match (t.mixing(), t.sampling()) {
                    (Mixing::Series, Sampling::Voltage) => (1e4 * s, 1e3 / s),
                    (Mixing::Shunt, Sampling::Voltage) => (1e3 / s, 1e3 / s),
                    (Mixing::Series, Sampling::Current) => (1e4 * s, 1e3 * s),
                    (Mixing::Shunt, Sampling::Current) => (1e3 / s, 1e3 * s),
                };
                // Gain scaled by 1/|β| so that T grows as 100·s in every topology.
                let gain = match t {
                    Topology::SeriesShunt => 1e2 * s * 11.0,
                    Topology::ShuntShunt => -1e2 * s * 1e4,
                    Topology::SeriesSeries => 1e2 * s / 1e3,
                    Topology::ShuntSeries => -1e2 * s * 11.0,
                };
                let r = analyze(&spec(t, gain, ri, ro), 0.0).unwrap();
                assert!(
                    r.ideal_af_error < last,
                    "{} step {k}: {} !< {last}",
                    t.name(),
                    r.ideal_af_error
                );
                last = r.ideal_af_error;
            }
            assert!(last < 1e-4, "{}: {last}", t.name());
        }
    }
}
