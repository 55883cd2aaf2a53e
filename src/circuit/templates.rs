//! Circuits for the four feedback topologies, built from an amplifier model, a
//! feedback network, a source resistance and a load.
//!
//! The amplifier model has the input resistance `ri`, output resistance `ro`, an
//! open-circuit gain of the kind the topology needs, and optional input and
//! output capacitances (0 = none). Gains are signed as they act in the circuit,
//! so that negative feedback needs the sign shown:
//!
//! | topology      | source         | amplifier (controlled source)        | feedback network                      | output |
//! |---------------|----------------|--------------------------------------|---------------------------------------|--------|
//! | series-shunt  | Vs in series Rs | VCVS, μ V/V > 0, across Ri (in, fb) | Rf out→fb (‖ Cf), Rg fb→0             | V(out) |
//! | shunt-shunt   | Is ‖ Rs        | CCVS, rm V/A < 0, of the current in Ri | Rf out→in (‖ Cf); `rg` must be 0     | V(out) |
//! | series-series | Vs in series Rs | VCCS, gm A/V > 0, Norton with Ro     | sense Rg ld→0 (‖ Cf), Rf ld→fb or none (rf = 0: fb is ld) | I(Rl) |
//! | shunt-series  | Is ‖ Rs        | CCCS, ai A/A < 0, Norton with Ro     | sense Rg ld→0, Rf ld→in (‖ Cf)        | I(Rl)  |
//!
//! Node names: `src` (Thevenin source), `in` (input), `fb` (amplifier input on
//! the feedback side, series mixing), `x` (behind the 0 V ammeter `Vi` that
//! measures the amplifier input current, shunt mixing), `a` (behind Ro, voltage
//! output), `out`, `ld` (return end of the load, series sampling). Element names:
//! `Vs`/`Is`, `Rs`, `Ri`, `Ci`, `Vi`, `A`, `Ro`, `Co`, `Rl`, `Rf`, `Rg`, `Cf`.
//! The sources have value 1 (V or A), so node voltages and currents are
//! transfers per unit of the source.
//!
//! The same builder makes the loaded basic amplifier of the two-port method
//! ([`Loading`]): the feedback network is left out and its loading appears as
//! one admittance at each port, with separate nodes `fb` and `ld`.

use super::error::{CircuitError, CircuitResult};
use super::netlist::{Circuit, ElementKind};
use crate::check;
use crate::error::Error;
use crate::feedback::{Mixing, Sampling, Topology};
use num_complex::Complex64;

/// The basic amplifier: resistances in Ω, capacitances in F (0 = none), gain in
/// the topology's unit (V/V, V/A, A/V or A/A; see the module table for signs).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct AmplifierModel {
    /// Input resistance Ri, Ω (> 0).
    pub ri: f64,
    /// Output resistance Ro, Ω (> 0).
    pub ro: f64,
    /// Open-circuit gain of the topology's kind (finite, not zero).
    pub gain: f64,
    /// Input capacitance, F (≥ 0; 0 = none).
    pub ci: f64,
    /// Output capacitance, F (≥ 0; 0 = none).
    pub co: f64,
}

/// The feedback network (see the module table for each topology's use).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct FeedbackNetwork {
    /// The resistor that returns the signal to the input, Ω.
    pub rf: f64,
    /// The resistor to ground (divider foot or current sense), Ω.
    pub rg: f64,
    /// Capacitance across the network's main resistor, F (0 = none).
    pub cf: f64,
}

/// A stage: the topology and its parts.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct StageSpec {
    /// Which of the four topologies.
    pub topology: Topology,
    /// The basic amplifier.
    pub amplifier: AmplifierModel,
    /// The feedback network.
    pub network: FeedbackNetwork,
    /// Source resistance, Ω (> 0): series with Vs, or across Is.
    pub rs: f64,
    /// Load resistance, Ω (> 0).
    pub rl: f64,
}

/// The loading admittances (S) that replace the feedback network in the basic
/// amplifier of the two-port method: `input` at the mixing port, `output` at the
/// sampling port, each from the port node to ground.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Loading {
    /// Admittance at the input port (node `fb` or `in`), S.
    pub input: Complex64,
    /// Admittance at the output port (node `out` or `ld`), S.
    pub output: Complex64,
}

/// A built stage and where its quantities are.
#[derive(Debug, Clone, PartialEq)]
pub struct Stage {
    /// The circuit.
    pub circuit: Circuit,
    /// Name of the independent source (`Vs` or `Is`), value 1.
    pub source: &'static str,
    /// Feedback-network elements present in the circuit.
    pub feedback: &'static [&'static str],
    /// Mixing port of the feedback network (plus, minus).
    pub input_port: (&'static str, &'static str),
    /// Sampling port of the feedback network (plus, minus).
    pub output_port: (&'static str, &'static str),
    /// The node pair the load sits across (`out`, `0` or `out`, `ld`/`fb`).
    pub load_port: (&'static str, &'static str),
}

const FB_SERIES_SHUNT: [&str; 3] = ["Rf", "Rg", "Cf"];
const FB_SHUNT_SHUNT: [&str; 2] = ["Rf", "Cf"];

fn present(c: &Circuit, names: &'static [&'static str]) -> &'static [&'static str] {
    // Every list is ordered so that the optional parts come last; cut at the
    // first one missing from the circuit.
    let n = names
        .iter()
        .take_while(|n| c.element_index(n).is_ok())
        .count();
    names.get(..n).unwrap_or(names)
}

impl StageSpec {
    /// Check every number and the sign rules, naming the parameter.
    ///
    /// # Errors
    /// `ri`, `ro`, `rs`, `rl` not greater than zero; `gain` zero or not finite;
    /// `ci`, `co`, `cf` negative; `rf`, `rg` per the topology (`rg` must be 0 for
    /// shunt-shunt; `rf` may be 0 for series-series only).
    pub fn validate(&self) -> crate::Result<()> {
        let a = &self.amplifier;
        check::positive("ri", a.ri)?;
        check::positive("ro", a.ro)?;
        check::nonzero("gain", a.gain)?;
        check::non_negative("ci", a.ci)?;
        check::non_negative("co", a.co)?;
        check::non_negative("cf", self.network.cf)?;
        check::positive("rs", self.rs)?;
        check::positive("rl", self.rl)?;
        let n = &self.network;
        match self.topology {
            Topology::SeriesShunt | Topology::ShuntSeries => {
                check::positive("rf", n.rf)?;
                check::positive("rg", n.rg)?;
            }
            Topology::ShuntShunt => {
                check::positive("rf", n.rf)?;
                if check::finite("rg", n.rg)? != 0.0 {
                    return Err(Error::OutOfDomain {
                        param: "rg",
                        requirement:
                            "must be 0: the shunt-shunt network is Rf (with optional Cf) alone",
                    });
                }
            }
            Topology::SeriesSeries => {
                check::non_negative("rf", n.rf)?;
                check::positive("rg", n.rg)?;
            }
        }
        Ok(())
    }
}

/// Build the closed-loop circuit of a stage.
///
/// # Errors
/// As [`StageSpec::validate`].
///
/// # Example
/// ```
/// use loopwright::circuit::templates::{build, AmplifierModel, FeedbackNetwork, StageSpec};
/// use loopwright::circuit::solve;
/// use loopwright::feedback::Topology;
/// let spec = StageSpec {
///     topology: Topology::SeriesShunt,
///     amplifier: AmplifierModel { ri: 1e6, ro: 10.0, gain: 1e6, ci: 0.0, co: 0.0 },
///     network: FeedbackNetwork { rf: 9e3, rg: 1e3, cf: 0.0 },
///     rs: 50.0,
///     rl: 1e4,
/// };
/// let stage = build(&spec).unwrap();
/// let vout = solve(&stage.circuit, 0.0).unwrap().voltage("out").unwrap();
/// assert!((vout.re - 10.0).abs() < 1e-3); // ≈ 1 + Rf/Rg
/// let bad = StageSpec { rl: -1.0, ..spec };
/// assert_eq!(build(&bad).unwrap_err().error.param(), "rl");
/// ```
pub fn build(spec: &StageSpec) -> CircuitResult<Stage> {
    build_with(spec, None)
}

/// Build the basic amplifier loaded by the given admittances in place of the
/// feedback network (the "A circuit" of the two-port method).
///
/// # Errors
/// As [`StageSpec::validate`]; loading admittances with a negative real part.
pub fn build_loaded(spec: &StageSpec, loading: Loading) -> CircuitResult<Stage> {
    build_with(spec, Some(loading))
}

fn build_with(spec: &StageSpec, loading: Option<Loading>) -> CircuitResult<Stage> {
    spec.validate()?;
    let t = spec.topology;
    let mut c = Circuit::new();
    // A template stage has 14 elements at most (and fewer nodes).
    c.reserve(16);
    let source = add_source(&mut c, t, spec.rs)?;
    add_amplifier_input(&mut c, t, &spec.amplifier)?;
    // Series-series with rf = 0: the amplifier's feedback input is the sense node.
    let sense = if t == Topology::SeriesSeries && spec.network.rf == 0.0 && loading.is_none() {
        "fb"
    } else {
        "ld"
    };
    add_controlled_source(&mut c, t, spec.amplifier.gain)?;
    add_output_and_load(&mut c, t, &spec.amplifier, spec.rl, sense)?;
    let (input_port, output_port, load_port) = ports(t, sense);
    let feedback = match loading {
        Some(l) => {
            for (tag, (p, m), y) in [("Y1", input_port, l.input), ("Y2", output_port, l.output)] {
                check::finite_complex("loading", y).map_err(CircuitError::from)?;
                c.add_element(tag, ElementKind::Admittance, p, m, None, y.re, y.im)?;
            }
            &[][..]
        }
        None => add_feedback_network(&mut c, t, &spec.network, sense)?,
    };
    Ok(Stage {
        circuit: c,
        source,
        feedback,
        input_port,
        output_port,
        load_port,
    })
}

/// Add a two-terminal element with no controlling quantity.
fn add(
    c: &mut Circuit,
    name: &str,
    kind: ElementKind,
    p: &str,
    m: &str,
    value: f64,
) -> CircuitResult<()> {
    c.add_element(name, kind, p, m, None, value, 0.0)
}

/// The signal source with its resistance: a voltage source in series for series
/// mixing, a current source in parallel for shunt mixing. Returns the source's name.
fn add_source(c: &mut Circuit, t: Topology, rs: f64) -> CircuitResult<&'static str> {
    use ElementKind::*;
    match t.mixing() {
        Mixing::Series => {
            add(c, "Vs", VoltageSource, "src", "0", 1.0)?;
            add(c, "Rs", Resistor, "src", "in", rs)?;
            Ok("Vs")
        }
        Mixing::Shunt => {
            add(c, "Is", CurrentSource, "0", "in", 1.0)?;
            add(c, "Rs", Resistor, "in", "0", rs)?;
            Ok("Is")
        }
    }
}

/// The amplifier's input resistance (and capacitance): between the inputs for series
/// mixing; to ground through a zero-volt sense source `Vi` for shunt mixing.
fn add_amplifier_input(c: &mut Circuit, t: Topology, a: &AmplifierModel) -> CircuitResult<()> {
    use ElementKind::*;
    match t.mixing() {
        Mixing::Series => {
            add(c, "Ri", Resistor, "in", "fb", a.ri)?;
            if a.ci > 0.0 {
                add(c, "Ci", Capacitor, "in", "fb", a.ci)?;
            }
        }
        Mixing::Shunt => {
            add(c, "Vi", VoltageSource, "in", "x", 0.0)?;
            add(c, "Ri", Resistor, "x", "0", a.ri)?;
            if a.ci > 0.0 {
                add(c, "Ci", Capacitor, "in", "0", a.ci)?;
            }
        }
    }
    Ok(())
}

/// The amplifier `A` as the controlled source the topology needs: voltage- or
/// current-controlled by the input, voltage or current out.
fn add_controlled_source(c: &mut Circuit, t: Topology, gain: f64) -> CircuitResult<()> {
    use super::ControlSpec::{Element, Nodes};
    use ElementKind::*;
    let (kind, p, m, control) = match t {
        Topology::SeriesShunt => (Vcvs, "a", "0", Nodes("in", "fb")),
        Topology::ShuntShunt => (Ccvs, "a", "0", Element("Vi")),
        Topology::SeriesSeries => (Vccs, "0", "out", Nodes("in", "fb")),
        Topology::ShuntSeries => (Cccs, "0", "out", Element("Vi")),
    };
    c.add_element("A", kind, p, m, Some(control), gain, 0.0)
}

/// The amplifier's output resistance (and capacitance) and the load: in series to the
/// output node for voltage sampling; in parallel, with the load in series to the sense
/// node, for current sampling.
fn add_output_and_load(
    c: &mut Circuit,
    t: Topology,
    a: &AmplifierModel,
    rl: f64,
    sense: &str,
) -> CircuitResult<()> {
    use ElementKind::*;
    match t.sampling() {
        Sampling::Voltage => {
            add(c, "Ro", Resistor, "a", "out", a.ro)?;
            add(c, "Rl", Resistor, "out", "0", rl)?;
        }
        Sampling::Current => {
            add(c, "Ro", Resistor, "out", "0", a.ro)?;
            add(c, "Rl", Resistor, "out", sense, rl)?;
        }
    }
    if a.co > 0.0 {
        add(c, "Co", Capacitor, "out", "0", a.co)?;
    }
    Ok(())
}

/// A pair of nodes (positive, negative).
type Port = (&'static str, &'static str);

/// The feedback network's input and output ports and the load's port.
fn ports(t: Topology, sense: &'static str) -> (Port, Port, Port) {
    let (input_port, output_port) = match t {
        Topology::SeriesShunt => (("fb", "0"), ("out", "0")),
        Topology::ShuntShunt => (("in", "0"), ("out", "0")),
        Topology::SeriesSeries => (("fb", "0"), (sense, "0")),
        Topology::ShuntSeries => (("in", "0"), ("ld", "0")),
    };
    let load_port = match t.sampling() {
        Sampling::Voltage => ("out", "0"),
        Sampling::Current => ("out", output_port.0),
    };
    (input_port, output_port, load_port)
}

/// The resistive (optionally R‖C) feedback network of the topology. Returns the names
/// of its elements in the order the two-port extraction expects.
fn add_feedback_network(
    c: &mut Circuit,
    t: Topology,
    n: &FeedbackNetwork,
    sense: &str,
) -> CircuitResult<&'static [&'static str]> {
    use ElementKind::*;
    match t {
        Topology::SeriesShunt => {
            add(c, "Rf", Resistor, "out", "fb", n.rf)?;
            add(c, "Rg", Resistor, "fb", "0", n.rg)?;
            if n.cf > 0.0 {
                add(c, "Cf", Capacitor, "out", "fb", n.cf)?;
            }
        }
        Topology::ShuntShunt => {
            add(c, "Rf", Resistor, "out", "in", n.rf)?;
            if n.cf > 0.0 {
                add(c, "Cf", Capacitor, "out", "in", n.cf)?;
            }
        }
        Topology::SeriesSeries => {
            add(c, "Rg", Resistor, sense, "0", n.rg)?;
            if n.cf > 0.0 {
                add(c, "Cf", Capacitor, sense, "0", n.cf)?;
            }
            if n.rf > 0.0 {
                add(c, "Rf", Resistor, "ld", "fb", n.rf)?;
            }
        }
        Topology::ShuntSeries => {
            add(c, "Rf", Resistor, "ld", "in", n.rf)?;
            add(c, "Rg", Resistor, "ld", "0", n.rg)?;
            if n.cf > 0.0 {
                add(c, "Cf", Capacitor, "ld", "in", n.cf)?;
            }
        }
    }
    Ok(match t {
        Topology::SeriesShunt | Topology::ShuntSeries => present(c, &FB_SERIES_SHUNT),
        Topology::ShuntShunt => present(c, &FB_SHUNT_SHUNT),
        Topology::SeriesSeries => match (n.rf > 0.0, n.cf > 0.0) {
            (true, true) => &["Rg", "Cf", "Rf"],
            (true, false) => &["Rg", "Rf"],
            (false, true) => &["Rg", "Cf"],
            (false, false) => &["Rg"],
        },
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::solve;

    pub(crate) fn spec(t: Topology) -> StageSpec {
        // A round-number stage of our own per topology, gains signed for negative feedback.
        let (gain, rg, ri) = match t {
            Topology::SeriesShunt => (1e4, 1e3, 1e5),
            Topology::ShuntShunt => (-1e8, 0.0, 100.0),
            Topology::SeriesSeries => (1.0, 100.0, 1e5),
            Topology::ShuntSeries => (-1e4, 1e3, 100.0),
        };
        StageSpec {
            topology: t,
            amplifier: AmplifierModel {
                ri,
                ro: 1e3,
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
    fn every_topology_builds_and_solves_near_one_over_beta() {
        // Ideal gains 1/β per topology (any feedback text, e.g. Sedra & Smith,
        // Microelectronic Circuits, 7th ed., ch. 10, from memory): 1 + Rf/Rg,
        // −Rf, 1/Rg (with rf forming a separate T leg, still 1/Rg), −(1 + Rf/Rg).
        for t in Topology::ALL {
            let s = spec(t);
            let stage = build(&s).unwrap();
            let sol = solve(&stage.circuit, 0.0).unwrap();
            let (got, ideal) = match t {
                Topology::SeriesShunt => (sol.voltage("out").unwrap(), 11.0),
                Topology::ShuntShunt => (sol.voltage("out").unwrap(), -1e4),
                Topology::SeriesSeries => (sol.current("Rl").unwrap(), 0.01),
                Topology::ShuntSeries => (sol.current("Rl").unwrap(), -11.0),
            };
            let err = (got.re - ideal).abs() / ideal.abs();
            assert!(err < 0.05, "{}: {} vs {}", t.name(), got.re, ideal);
            assert!(got.im.abs() < 1e-12);
        }
    }

    #[test]
    fn loaded_variant_has_no_feedback_elements() {
        for t in Topology::ALL {
            let y = Complex64::new(1e-3, 0.0);
            let stage = build_loaded(
                &spec(t),
                Loading {
                    input: y,
                    output: y,
                },
            )
            .unwrap();
            assert!(stage.circuit.element_index("Rf").is_err());
            assert!(stage.circuit.element_index("Y1").is_ok());
            assert!(solve(&stage.circuit, 0.0).is_ok(), "{}", t.name());
        }
    }

    #[test]
    fn rejects_bad_parts_by_name() {
        let s = spec(Topology::ShuntShunt);
        let bad = StageSpec {
            network: FeedbackNetwork {
                rg: 5.0,
                ..s.network
            },
            ..s
        };
        assert_eq!(build(&bad).unwrap_err().error.param(), "rg");
        let bad = StageSpec {
            amplifier: AmplifierModel {
                gain: 0.0,
                ..s.amplifier
            },
            ..s
        };
        assert_eq!(build(&bad).unwrap_err().error.param(), "gain");
        let bad = StageSpec {
            amplifier: AmplifierModel {
                ri: f64::INFINITY,
                ..s.amplifier
            },
            ..s
        };
        assert_eq!(build(&bad).unwrap_err().error.code(), "not_finite");
        let y = Complex64::new(-1.0, 0.0);
        assert_eq!(
            build_loaded(
                &s,
                Loading {
                    input: y,
                    output: y
                }
            )
            .unwrap_err()
            .error
            .param(),
            "value"
        );
    }
}
