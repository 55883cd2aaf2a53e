//! The varied parts of a stage: each part's tolerance and temperature
//! coefficient, the amplifier's min/typ/max figures, and the temperature range;
//! and the stage's circuit at one set of part values and one temperature.
//!
//! A part's value at temperature T (°C) is
//! value(T) = v·(1 + tc·10⁻⁶·(T − [`REFERENCE_C`])), v the value at the
//! reference temperature (drawn from its tolerance), tc in ppm/K
//! (the linear temperature coefficient of IEC 60115-1).
//!
//! Extremes of each part (the worst case's corners):
//! - uniform ±p % and normal ±p % at k σ: v·(1 ± p/100) (a part sold as ±p %
//!   is screened to it, so the normal draw is truncated there too);
//! - limits: min and max;
//! - an amplifier figure given as min/typ/max: min and max.

use super::figures::{circuit_grid_top, Probe};
use crate::circuit::blackman::Output;
use crate::circuit::tolerance::{validate_tempco, Tolerance};
use crate::circuit::{Circuit, CircuitError, CircuitResult, ElementKind, Name};
use crate::error::{Error, Result};
use crate::stage::{Amplifier, BandwidthRule, Spread, SpreadPoint, Stage, StageCircuit};
use alloc::string::String;
use alloc::vec::Vec;

/// The temperature at which part values are stated, °C (IEC 60115-1 reference).
pub const REFERENCE_C: f64 = 25.0;
/// The widest temperature range accepted, °C.
pub const TEMPERATURE_LIMITS_C: [f64; 2] = [-273.15, 1000.0];
/// The stage parts that may carry a spread (the stage document's part names).
pub const PART_NAMES: &str = "rf, rg, cf, rs, cs, rl, cl, riso";

/// The spread of one stage part.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PartSpread {
    /// The stage part: `rf`, `rg`, `cf`, `rs`, `cs`, `rl`, `cl` or `riso`.
    pub part: &'static str,
    /// Its tolerance (`None`: exact at the reference temperature).
    pub tolerance: Option<Tolerance>,
    /// Its temperature coefficient, ppm/K (`None`: 0).
    pub tempco_ppm: Option<f64>,
}

/// The spreads of the amplifier beyond A0 (whose min/typ/max is in its
/// model), each min/typ/max with typ the model's own figure.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct AmplifierSpread {
    /// Gain-bandwidth product, Hz (typ = the model's GBW).
    pub gbw_hz: Option<Spread>,
    /// Open-loop output resistance, Ω (typ = the model's `ro`).
    pub ro: Option<Spread>,
}

/// How a varied quantity is drawn in the Monte Carlo.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Draw {
    /// Uniform between the extremes.
    Uniform,
    /// Normal about the nominal, σ = nominal·p/(100·k), truncated at ±k σ.
    Normal {
        /// Standard deviation, in the part's unit.
        sigma: f64,
        /// Truncation, σ.
        k: f64,
    },
    /// A datasheet min/typ/max: log-normal split at typ with min and max at
    /// 3 σ on their own side (as the open-loop gain of `crate::network`).
    MinTypMax,
}

/// One varied quantity.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Varied {
    /// Its name: the circuit element (`Rf`, `Cl`…) or `U1.a0`, `U1.gbwHz`, `U1.ro`.
    pub name: String,
    /// Nominal value at the reference temperature.
    pub nominal: f64,
    /// Lowest value at the reference temperature.
    pub low: f64,
    /// Highest value at the reference temperature.
    pub high: f64,
    /// Temperature coefficient, ppm/K.
    pub tempco_ppm: f64,
    #[cfg_attr(feature = "serde", serde(skip))]
    pub(crate) draw: Draw,
    #[cfg_attr(feature = "serde", serde(skip))]
    pub(crate) slot: Slot,
}

/// Where a varied value goes in the stage or circuit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) enum Slot {
    /// A stage part ([`NAMES`] order).
    Part(usize),
    /// The stage amplifier's A0, GBW, Ro.
    A0,
    Gbw,
    Ro,
    /// A circuit element's value (its index in the circuit).
    Element(usize),
    /// A circuit amplifier's A0, GBW, Ro (the index into
    /// [`CircuitSubject::amplifiers`]).
    AmpA0(usize),
    AmpGbw(usize),
    AmpRo(usize),
}

/// The names a circuit document's figures are read at (as `circuitGain`,
/// `circuitLoopGain` name them).
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct CircuitPorts {
    /// The independent source carrying the signal (the gain is per unit of it).
    pub input: String,
    /// The output node (empty when the output is `output_element`'s current).
    pub output: String,
    /// The node the output is read against (`None`: ground, `0`).
    pub output_minus: Option<String>,
    /// The element whose current is the output, in place of a node voltage
    /// (`None`: the voltage at `output`), as `circuitGain`'s `outputElement`:
    /// the gain is then that current per unit of the input (A/V from a
    /// voltage source, A/A from a current source).
    pub output_element: Option<String>,
    /// The amplifier (or controlled source) whose loop the margins are read
    /// at (`None`: the circuit's only amplifier element, if it has one).
    pub controlled: Option<String>,
}

/// A circuit amplifier whose model figures vary: its element index and the
/// typical GBW and dominant pole of its model.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct VariedAmplifier {
    pub element: usize,
    gbw_typ: f64,
    pole_typ: f64,
}

/// A circuit document as the subject of the analyses.
#[derive(Debug, Clone, PartialEq)]
pub struct CircuitSubject {
    /// The circuit at its nominal values.
    pub circuit: Circuit,
    /// Its ports.
    pub ports: CircuitPorts,
    /// The loop's amplifier for the margins (the named or the only one).
    pub controlled: Option<String>,
    pub(crate) amplifiers: Vec<VariedAmplifier>,
}

/// What the spreads apply to: a stage document or a circuit document.
#[derive(Debug, Clone, PartialEq)]
pub enum Subject {
    /// A stage (at most the eight parts of [`PART_NAMES`] and `U1`).
    Stage(alloc::boxed::Box<Stage>),
    /// A circuit: any element may carry a tolerance and a tempco, any
    /// amplifier element a min/typ/max A0.
    Circuit(alloc::boxed::Box<CircuitSubject>),
}

/// A stage or circuit with the spreads of its parts and a temperature range.
#[derive(Debug, Clone, PartialEq)]
pub struct TolStage {
    /// The stage or circuit at its nominal values.
    pub subject: Subject,
    /// The varied quantities, in draw order: for a stage, parts in
    /// [`PART_NAMES`] order, then A0, GBW, Ro; for a circuit, the elements in
    /// document order, then each amplifier's A0, GBW, Ro.
    pub varied: Vec<Varied>,
    /// Temperature range, °C, low ≤ high.
    pub temperature_c: [f64; 2],
    gbw_typ: f64,
    pole_typ: f64,
}

/// The built circuit of one set of values at one temperature.
pub(crate) enum Built {
    /// A stage's circuit and the top of its bandwidth grid, Hz.
    Stage(StageCircuit, f64),
    /// A circuit document's circuit.
    Circuit(Circuit),
}

fn slot_of(parts: &crate::stage::StageParts, k: usize) -> Option<f64> {
    [
        parts.rf, parts.rg, parts.cf, parts.rs, parts.cs, parts.rl, parts.cl, parts.riso,
    ]
    .get(k)
    .copied()
    .flatten()
}

/// The value of part slot `k` (the order of [`NAMES`]).
pub(crate) fn slot_value(parts: &crate::stage::StageParts, k: usize) -> Option<f64> {
    match k {
        0 => parts.rf,
        1 => parts.rg,
        2 => parts.cf,
        3 => parts.rs,
        4 => parts.cs,
        5 => parts.rl,
        6 => parts.cl,
        _ => parts.riso,
    }
}

fn set_slot(parts: &mut crate::stage::StageParts, k: usize, v: f64) {
    let field = match k {
        0 => &mut parts.rf,
        1 => &mut parts.rg,
        2 => &mut parts.cf,
        3 => &mut parts.rs,
        4 => &mut parts.cs,
        5 => &mut parts.rl,
        6 => &mut parts.cl,
        _ => &mut parts.riso,
    };
    *field = Some(v);
}

/// Each part slot's field name and its element's name in the stage circuit.
pub(crate) const NAMES: [(&str, &str); 8] = [
    ("rf", "Rf"),
    ("rg", "Rg"),
    ("cf", "Cf"),
    ("rs", "Rs"),
    ("cs", "Cs"),
    ("rl", "Rl"),
    ("cl", "Cl"),
    ("riso", "Riso"),
];

fn named(e: Error, name: &str) -> CircuitError {
    CircuitError::new(e, Name::truncated(name))
}

fn extremes(t: Tolerance, v: f64) -> (f64, f64, Draw) {
    match t {
        Tolerance::Uniform { percent } => {
            let d = v * percent / 100.0;
            (v - d, v + d, Draw::Uniform)
        }
        Tolerance::Normal { percent, sigmas } => {
            let d = v * percent / 100.0;
            (
                v - d,
                v + d,
                Draw::Normal {
                    sigma: d / sigmas,
                    k: sigmas,
                },
            )
        }
        Tolerance::Limits { min, max, .. } => (min, max, Draw::Uniform),
    }
}

fn check_temperatures(temperature_c: [f64; 2]) -> Result<()> {
    for t in temperature_c {
        crate::check::finite("temperature", t)?;
        if !(TEMPERATURE_LIMITS_C[0]..=TEMPERATURE_LIMITS_C[1]).contains(&t) {
            return Err(Error::OutOfDomain {
                param: "temperature",
                requirement: "must be from -273.15 to 1000 °C",
            });
        }
    }
    if temperature_c[0] > temperature_c[1] {
        return Err(Error::OutOfDomain {
            param: "temperature",
            requirement: "low must not be above high",
        });
    }
    Ok(())
}

/// One part of value `v` with its tolerance and tempco as a varied quantity.
fn varied_part(
    element: &str,
    v: f64,
    tolerance: Option<Tolerance>,
    tempco_ppm: Option<f64>,
    slot: Slot,
) -> CircuitResult<Varied> {
    let (low, high, draw) = match tolerance {
        Some(t) => {
            t.validate(v).map_err(|e| named(e, element))?;
            extremes(t, v)
        }
        None => (v, v, Draw::Uniform),
    };
    if low <= 0.0 {
        return Err(named(
            Error::OutOfDomain {
                param: "tolerance",
                requirement: "must leave the part's value above zero",
            },
            element,
        ));
    }
    let tc = tempco_ppm.unwrap_or(0.0);
    validate_tempco(tc).map_err(|e| named(e, element))?;
    Ok(Varied {
        name: String::from(element),
        nominal: v,
        low,
        high,
        tempco_ppm: tc,
        draw,
        slot,
    })
}

/// A model's min/typ/max figure as a varied quantity named `{element}.{param}`,
/// or `None` when it does not spread.
fn varied_spread(
    element: &str,
    param: &'static str,
    s: Spread,
    typ: f64,
    slot: Slot,
) -> CircuitResult<Option<Varied>> {
    s.validate_positive(param).map_err(|e| named(e, element))?;
    if (s.typ - typ).abs() > 1e-12 * typ.abs() {
        return Err(named(
            Error::OutOfDomain {
                param,
                requirement: "typ must equal the amplifier model's figure",
            },
            element,
        ));
    }
    Ok((s.min < s.max).then(|| Varied {
        name: alloc::format!("{element}.{param}"),
        nominal: s.typ,
        low: s.min,
        high: s.max,
        tempco_ppm: 0.0,
        draw: Draw::MinTypMax,
        slot,
    }))
}

/// The only amplifier element of a circuit, if it has exactly one.
pub fn only_amplifier(c: &Circuit) -> Option<String> {
    let mut amps = c
        .elements()
        .iter()
        .filter(|e| e.kind() == ElementKind::Amplifier);
    match (amps.next(), amps.next()) {
        (Some(a), None) => Some(String::from(a.name().as_str())),
        _ => None,
    }
}

fn port_error(param: &'static str, requirement: &'static str, name: &str) -> CircuitError {
    named(Error::OutOfDomain { param, requirement }, name)
}

impl TolStage {
    /// A circuit document with the spreads its elements carry (`tolerance`,
    /// `tempco`), each amplifier element's min/typ/max A0 (from its model),
    /// further amplifier spreads by element name (`amplifiers`: GBW and Ro,
    /// typ the model's own), a temperature range (°C), and the names its
    /// figures are read at.
    ///
    /// # Errors
    /// Param `input`: not an independent source of the circuit; `output`,
    /// `outputMinus`: not a node of it; `outputElement`: not an element of
    /// it, or given with `output` or `outputMinus`; `controlled`: not an amplifier or
    /// controlled source of it; `amplifierSpread` (naming the element): a
    /// spread for an element that is not an amplifier, or given twice; as
    /// [`TolStage::new`] for the tolerances, tempcos, amplifier spreads and
    /// temperatures.
    pub fn from_circuit(
        circuit: &Circuit,
        ports: CircuitPorts,
        amplifiers: &[(String, AmplifierSpread)],
        temperature_c: [f64; 2],
    ) -> CircuitResult<TolStage> {
        check_temperatures(temperature_c)?;
        match circuit.element(&ports.input) {
            Ok(e) if e.kind().is_independent() => {}
            _ => {
                return Err(port_error(
                    "input",
                    "must name an independent source of the circuit",
                    &ports.input,
                ))
            }
        }
        if let Some(element) = &ports.output_element {
            if !ports.output.is_empty() || ports.output_minus.is_some() {
                return Err(port_error(
                    "outputElement",
                    "give output (and outputMinus) or outputElement, not both",
                    element,
                ));
            }
            if circuit.element(element).is_err() {
                return Err(port_error(
                    "outputElement",
                    "must name an element of the circuit",
                    element,
                ));
            }
        } else if circuit.node_index(&ports.output).is_err() {
            return Err(port_error(
                "output",
                "must name a node of the circuit",
                &ports.output,
            ));
        }
        if let Some(m) = &ports.output_minus {
            if circuit.node_index(m).is_err() {
                return Err(port_error(
                    "outputMinus",
                    "must name a node of the circuit",
                    m,
                ));
            }
        }
        let controlled = match &ports.controlled {
            Some(c) => match circuit.element(c) {
                Ok(e) if e.kind().is_controlled() || e.kind() == ElementKind::Amplifier => {
                    Some(c.clone())
                }
                _ => {
                    return Err(port_error(
                        "controlled",
                        "must name an amplifier or controlled source of the circuit",
                        c,
                    ))
                }
            },
            None => only_amplifier(circuit),
        };
        for (k, (name, _)) in amplifiers.iter().enumerate() {
            let is_amp = circuit
                .element(name)
                .is_ok_and(|e| e.kind() == ElementKind::Amplifier);
            if !is_amp || amplifiers[..k].iter().any(|(n, _)| n == name) {
                return Err(port_error(
                    "amplifierSpread",
                    "must name each amplifier element of the circuit once",
                    name,
                ));
            }
        }
        let mut varied = Vec::new();
        for (i, e) in circuit.elements().iter().enumerate() {
            if e.tolerance().is_some() || e.tempco_ppm().is_some() {
                let name = e.name();
                varied.push(varied_part(
                    name.as_str(),
                    e.value(),
                    e.tolerance(),
                    e.tempco_ppm(),
                    Slot::Element(i),
                )?);
            }
        }
        let mut amps = Vec::new();
        for (i, e) in circuit.elements().iter().enumerate() {
            let Some(part) = e.amplifier() else { continue };
            let name = e.name();
            let name = name.as_str();
            let model = &part.model;
            let k = amps.len();
            let before = varied.len();
            let a0 = model.a0;
            if a0.min < a0.max {
                varied.push(Varied {
                    name: alloc::format!("{name}.a0"),
                    nominal: a0.typ,
                    low: a0.min,
                    high: a0.max,
                    tempco_ppm: 0.0,
                    draw: Draw::MinTypMax,
                    slot: Slot::AmpA0(k),
                });
            }
            let gbw_typ = model.gbw_at(SpreadPoint::Typ).map_err(|e| named(e, name))?;
            let pole_typ = model
                .dominant_pole_at(SpreadPoint::Typ)
                .map_err(|e| named(e, name))?;
            let spread = amplifiers
                .iter()
                .find(|(n, _)| n == name)
                .map(|(_, s)| *s)
                .unwrap_or_default();
            for (param, s, typ, slot) in [
                ("gbwHz", spread.gbw_hz, gbw_typ, Slot::AmpGbw(k)),
                ("ro", spread.ro, model.ro, Slot::AmpRo(k)),
            ] {
                if let Some(s) = s {
                    varied.extend(varied_spread(name, param, s, typ, slot)?);
                }
            }
            if varied.len() > before {
                amps.push(VariedAmplifier {
                    element: i,
                    gbw_typ,
                    pole_typ,
                });
            }
        }
        Ok(TolStage {
            subject: Subject::Circuit(alloc::boxed::Box::new(CircuitSubject {
                circuit: circuit.clone(),
                ports,
                controlled,
                amplifiers: amps,
            })),
            varied,
            temperature_c,
            gbw_typ: 0.0,
            pole_typ: 0.0,
        })
    }

    /// The figures' view of a circuit built by [`TolStage::built_at`].
    pub(crate) fn probe<'a>(&'a self, b: &'a Built) -> Probe<'a> {
        match (b, &self.subject) {
            (Built::Stage(sc, top), _) => Probe::of_stage(sc, *top),
            (Built::Circuit(c), Subject::Circuit(cs)) => Probe {
                circuit: c,
                source: &cs.ports.input,
                output: match &cs.ports.output_element {
                    Some(e) => Output::Current(e),
                    None => Output::Voltage(
                        &cs.ports.output,
                        cs.ports.output_minus.as_deref().unwrap_or("0"),
                    ),
                },
                amplifier: cs.controlled.as_deref(),
                top_hz: circuit_grid_top(c),
                stage: None,
            },
            // Not built by this subject: no source, every figure refuses.
            (Built::Circuit(c), Subject::Stage(_)) => Probe {
                circuit: c,
                source: "",
                output: Output::Voltage("", ""),
                amplifier: None,
                top_hz: circuit_grid_top(c),
                stage: None,
            },
        }
    }

    /// Check that every figure of `spec` can be read on the subject.
    ///
    /// # Errors
    /// Param `controlled`: a margin figure on a circuit with no loop named
    /// (none or several amplifiers, `controlled` not given).
    pub(crate) fn check_spec(&self, spec: &[super::spec::Limit]) -> CircuitResult<()> {
        if let Subject::Circuit(cs) = &self.subject {
            if cs.controlled.is_none() && spec.iter().any(|l| super::figures::is_margin(&l.figure))
            {
                return Err(super::figures::no_loop());
            }
        }
        Ok(())
    }

    /// The stage, when the subject is a stage document.
    pub fn stage(&self) -> Option<&Stage> {
        match &self.subject {
            Subject::Stage(s) => Some(s),
            Subject::Circuit(_) => None,
        }
    }

    /// Write `values` (reference temperature, [`TolStage::varied`] order)
    /// moved to `temperature_c` into `c`, a circuit with the elements of the
    /// subject circuit (its copy, or one with the same elements first and
    /// test parts after).
    ///
    /// # Errors
    /// Param `values`: a wrong count; a value at or below zero at the
    /// temperature (naming the element).
    pub(crate) fn write_circuit(
        &self,
        cs: &CircuitSubject,
        values: &[f64],
        temperature_c: f64,
        c: &mut Circuit,
    ) -> CircuitResult<()> {
        if values.len() != self.varied.len() {
            return Err(Error::OutOfDomain {
                param: "values",
                requirement: "must give one value per varied part",
            }
            .into());
        }
        let dt = temperature_c - REFERENCE_C;
        let originals = cs.circuit.elements();
        // Each varied amplifier from its document model: A0 at its point, GBW
        // ratio 1, Ro as given, then the trial's values.
        let mut amp_values: Vec<(f64, f64, f64)> = cs
            .amplifiers
            .iter()
            .map(|a| {
                let part = originals[a.element].amplifier();
                part.map_or((0.0, 1.0, 0.0), |p| {
                    (p.model.a0.at(p.point), 1.0, p.model.ro)
                })
            })
            .collect();
        let elements = c.elements_mut();
        for (v, &x) in self.varied.iter().zip(values) {
            let x = x * (1.0 + v.tempco_ppm * 1e-6 * dt);
            match v.slot {
                Slot::Element(i) => {
                    if x <= 0.0 || !x.is_finite() {
                        return Err(named(
                            Error::OutOfDomain {
                                param: "tempco",
                                requirement: "must leave the part's value above zero over the temperature range",
                            },
                            &v.name,
                        ));
                    }
                    elements[i].value = x;
                }
                Slot::AmpA0(k) => amp_values[k].0 = x,
                Slot::AmpGbw(k) => amp_values[k].1 = x / cs.amplifiers[k].gbw_typ,
                Slot::AmpRo(k) => amp_values[k].2 = x,
                Slot::Part(_) | Slot::A0 | Slot::Gbw | Slot::Ro => {}
            }
        }
        for (a, (a0, ratio, ro)) in cs.amplifiers.iter().zip(amp_values) {
            let Some(part) = elements[a.element].amplifier.as_deref_mut() else {
                continue;
            };
            let m = &mut part.model;
            m.a0 = Spread::fixed(a0);
            m.ro = ro;
            match m.hold {
                BandwidthRule::HoldGbw => {
                    m.gbw_hz = Some(a.gbw_typ * ratio);
                    m.dominant_pole_hz = None;
                }
                BandwidthRule::HoldPole => {
                    m.dominant_pole_hz = Some(a.pole_typ * ratio);
                    m.gbw_hz = None;
                }
            }
            part.point = SpreadPoint::Typ;
        }
        Ok(())
    }

    /// The circuit of the subject at `values` and `temperature_c`.
    ///
    /// # Errors
    /// As [`TolStage::stage_at`] for a stage; as the circuit writer for a circuit.
    pub(crate) fn built_at(&self, values: &[f64], temperature_c: f64) -> CircuitResult<Built> {
        match &self.subject {
            Subject::Stage(_) => {
                let stage = self.stage_at(values, temperature_c)?;
                let top =
                    stage.amplifier.gbw_at(SpreadPoint::Typ)? * super::figures::GRID_TOP_PER_GBW;
                Ok(Built::Stage(stage.circuit()?, top))
            }
            Subject::Circuit(cs) => {
                let mut c = cs.circuit.clone();
                self.write_circuit(cs, values, temperature_c, &mut c)?;
                Ok(Built::Circuit(c))
            }
        }
    }

    /// The stage with the spreads of its parts, the amplifier's spreads and a
    /// temperature range (°C).
    ///
    /// # Errors
    /// The stage's own errors; a spread for a part the stage does not have or
    /// does not know (param `part`, naming it), given twice (param `part`);
    /// a tolerance or tempco that does not validate (params `tolerance`,
    /// `tempco`, naming the element), a tolerance reaching 100 % (a part of
    /// value zero); an amplifier spread not positive or out of order or whose
    /// typ is not the model's figure (params `gbwHz`, `ro`); a temperature not
    /// finite, outside [`TEMPERATURE_LIMITS_C`] or low above high
    /// (param `temperature`).
    pub fn new(
        stage: &Stage,
        spreads: &[PartSpread],
        amplifier: AmplifierSpread,
        temperature_c: [f64; 2],
    ) -> CircuitResult<TolStage> {
        stage.circuit()?;
        check_temperatures(temperature_c)?;
        let mut varied = Vec::new();
        for (k, (part, element)) in NAMES.iter().enumerate() {
            let mut found = spreads.iter().filter(|s| s.part == *part);
            let Some(s) = found.next() else { continue };
            if found.next().is_some() {
                return Err(named(
                    Error::OutOfDomain {
                        param: "part",
                        requirement: "has two spreads; give each part once",
                    },
                    element,
                ));
            }
            let Some(v) = slot_of(&stage.parts, k) else {
                return Err(named(
                    Error::OutOfDomain {
                        param: "part",
                        requirement: "has a spread but is not in the stage",
                    },
                    element,
                ));
            };
            varied.push(varied_part(
                element,
                v,
                s.tolerance,
                s.tempco_ppm,
                Slot::Part(k),
            )?);
        }
        if let Some(s) = spreads
            .iter()
            .find(|s| NAMES.iter().all(|(p, _)| *p != s.part))
        {
            return Err(named(
                Error::UnknownName {
                    param: "part",
                    expected: PART_NAMES,
                },
                s.part,
            ));
        }
        let model = &stage.amplifier;
        let a0 = model.a0;
        if a0.min < a0.max {
            varied.push(Varied {
                name: String::from("U1.a0"),
                nominal: a0.typ,
                low: a0.min,
                high: a0.max,
                tempco_ppm: 0.0,
                draw: Draw::MinTypMax,
                slot: Slot::A0,
            });
        }
        let gbw_typ = model.gbw_at(SpreadPoint::Typ)?;
        let pole_typ = model.dominant_pole_at(SpreadPoint::Typ)?;
        for (param, spread, typ, slot) in [
            ("gbwHz", amplifier.gbw_hz, gbw_typ, Slot::Gbw),
            ("ro", amplifier.ro, model.ro, Slot::Ro),
        ] {
            let Some(s) = spread else { continue };
            s.validate_positive(param)?;
            if (s.typ - typ).abs() > 1e-12 * typ.abs() {
                return Err(Error::OutOfDomain {
                    param,
                    requirement: "typ must equal the amplifier model's figure",
                }
                .into());
            }
            if s.min < s.max {
                varied.push(Varied {
                    name: alloc::format!("U1.{param}"),
                    nominal: s.typ,
                    low: s.min,
                    high: s.max,
                    tempco_ppm: 0.0,
                    draw: Draw::MinTypMax,
                    slot,
                });
            }
        }
        Ok(TolStage {
            subject: Subject::Stage(alloc::boxed::Box::new(stage.clone())),
            varied,
            temperature_c,
            gbw_typ,
            pole_typ,
        })
    }

    /// The nominal values, in [`TolStage::varied`] order.
    pub fn nominal(&self) -> Vec<f64> {
        self.varied.iter().map(|v| v.nominal).collect()
    }

    /// The temperatures a figure is evaluated at: both ends of the range, or
    /// one when the range is a point or no part has a temperature coefficient
    /// (then the reference temperature if it is inside the range, else the low end).
    pub fn temperatures(&self) -> Vec<f64> {
        let [lo, hi] = self.temperature_c;
        if self.varied.iter().any(|v| v.tempco_ppm != 0.0) && lo < hi {
            alloc::vec![lo, hi]
        } else if (lo..=hi).contains(&REFERENCE_C) {
            alloc::vec![REFERENCE_C]
        } else {
            alloc::vec![lo]
        }
    }

    /// The stage at `values` (reference temperature, [`TolStage::varied`]
    /// order) moved to `temperature_c`.
    ///
    /// # Errors
    /// A wrong number of values (param `values`); the stage's own errors.
    pub fn stage_at(&self, values: &[f64], temperature_c: f64) -> Result<Stage> {
        if values.len() != self.varied.len() {
            return Err(Error::OutOfDomain {
                param: "values",
                requirement: "must give one value per varied part",
            });
        }
        let Subject::Stage(stage) = &self.subject else {
            return Err(Error::OutOfDomain {
                param: "stage",
                requirement: "is a circuit document: its values are written by the circuit path",
            });
        };
        let mut s = Stage::clone(stage);
        let mut a0 = s.amplifier.a0.at(s.point);
        let mut gbw_ratio = 1.0;
        let dt = temperature_c - REFERENCE_C;
        for (v, &x) in self.varied.iter().zip(values) {
            let x = x * (1.0 + v.tempco_ppm * 1e-6 * dt);
            match v.slot {
                Slot::Part(k) => set_slot(&mut s.parts, k, x),
                Slot::A0 => a0 = x,
                Slot::Gbw => gbw_ratio = x / self.gbw_typ,
                Slot::Ro => s.amplifier.ro = x,
                Slot::Element(_) | Slot::AmpA0(_) | Slot::AmpGbw(_) | Slot::AmpRo(_) => {}
            }
        }
        let m: &mut Amplifier = &mut s.amplifier;
        m.a0 = Spread::fixed(a0);
        match m.hold {
            BandwidthRule::HoldGbw => {
                m.gbw_hz = Some(self.gbw_typ * gbw_ratio);
                m.dominant_pole_hz = None;
            }
            BandwidthRule::HoldPole => {
                m.dominant_pole_hz = Some(self.pole_typ * gbw_ratio);
                m.gbw_hz = None;
            }
        }
        s.point = SpreadPoint::Typ;
        Ok(s)
    }

    /// The circuit of [`TolStage::stage_at`].
    ///
    /// # Errors
    /// As [`TolStage::stage_at`].
    pub fn circuit_at(&self, values: &[f64], temperature_c: f64) -> CircuitResult<StageCircuit> {
        self.stage_at(values, temperature_c)?.circuit()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::stage::{StageKind, StageParts};

    fn stage() -> Stage {
        Stage {
            kind: StageKind::NonInverting,
            amplifier: Amplifier::from_gbw(
                Spread {
                    min: 5e4,
                    typ: 2e5,
                    max: 1e6,
                },
                1e7,
            ),
            point: SpreadPoint::Typ,
            parts: StageParts {
                rf: Some(47e3),
                rg: Some(1e3),
                ..StageParts::default()
            },
        }
    }

    #[test]
    fn spreads_read_and_refuse_naming_the_part() {
        let u = |p| Some(Tolerance::Uniform { percent: p });
        let sp = |part, t| PartSpread {
            part,
            tolerance: t,
            tempco_ppm: Some(100.0),
        };
        let t = TolStage::new(
            &stage(),
            &[sp("rf", u(1.0)), sp("rg", u(1.0))],
            AmplifierSpread::default(),
            [-40.0, 85.0],
        )
        .unwrap();
        assert_eq!(t.varied.len(), 3);
        assert_eq!((t.varied[0].low, t.varied[0].high), (46530.0, 47470.0));
        assert_eq!(t.temperatures(), [-40.0, 85.0]);
        // 100 ppm/K over 60 K above the reference: +0.6 %.
        let s = t.stage_at(&t.nominal(), 85.0).unwrap();
        assert!((s.parts.rf.unwrap() / 47e3 - 1.006).abs() < 1e-12);
        let e = |spreads: &[PartSpread]| {
            let e = TolStage::new(&stage(), spreads, AmplifierSpread::default(), [25.0, 25.0])
                .unwrap_err();
            (e.error.param(), String::from(e.name.as_str()))
        };
        assert_eq!(e(&[sp("rf", u(-1.0))]), ("tolerance", String::from("Rf")));
        assert_eq!(e(&[sp("rf", u(101.0))]), ("tolerance", String::from("Rf")));
        assert_eq!(e(&[sp("rf", u(100.0))]), ("tolerance", String::from("Rf")));
        assert_eq!(e(&[sp("cl", u(1.0))]), ("part", String::from("Cl")));
        assert_eq!(e(&[sp("rx", u(1.0))]).0, "part");
        assert_eq!(e(&[sp("rf", u(1.0)), sp("rf", u(2.0))]).0, "part");
        let bad_limits = Some(Tolerance::Limits {
            min: 48e3,
            typ: 47e3,
            max: 49e3,
        });
        assert_eq!(e(&[sp("rf", bad_limits)]).0, "tolerance");
        let gbw = AmplifierSpread {
            gbw_hz: Some(Spread {
                min: 8e6,
                typ: 1e7,
                max: 9e6,
            }),
            ro: None,
        };
        let err = TolStage::new(&stage(), &[], gbw, [0.0, 70.0]).unwrap_err();
        assert_eq!(err.error.param(), "gbwHz");
        let err = TolStage::new(&stage(), &[], AmplifierSpread::default(), [70.0, 0.0]);
        assert_eq!(err.unwrap_err().error.param(), "temperature");
    }
}
