//! The stage: a common amplifier stage from its parts and its amplifier, and
//! the full circuit (document version 2) it stands for.
//!
//! | kind | source | network | gain |
//! |---|---|---|---|
//! | `non-inverting` | `Vs` (1 V) at `src`, `Rs` src→in, `Cs` in→0 | `Rf` F→fb (‖ `Cf`), `Rg` fb→0; no `rf` and no `rg`: a follower (fb is F) | V(out)/V(Vs), ≈ 1 + Rf/Rg |
//! | `inverting` | `Vs` (1 V) at `src`, `Rs` src→in, `Cs` in→0, `Rg` in→fb | `Rf` F→fb (‖ `Cf`); + input grounded | ≈ −Rf/(Rs + Rg) |
//! | `transimpedance` | `Is` (1 A) into `fb`, sensor capacitance `Cs` fb→0, shunt resistance `Rs` fb→0 | `Rf` F→fb (‖ `Cf`); + input grounded | V(out)/I(Is) in V/A, ≈ −Rf |
//! | `transconductance` | as `non-inverting` | load `Rl` out→fb (‖ `Cl`) inside the loop, sense `Rg` fb→0 (‖ `Cf`) | I(Rl)/V(Vs) in A/V, ≈ 1/Rg |
//! | `current-amplifier` | as `transimpedance` | load `Rl` out→ld (‖ `Cl`), sense `Rg` ld→0, `Rf` ld→fb (‖ `Cf`); + input grounded | I(Rl)/I(Is) in A/A, ≈ −(1 + Rf/Rg) |
//!
//! The five are the op-amp forms of the four feedback topologies:
//! non-inverting is series-shunt, transimpedance (and inverting) shunt-shunt,
//! transconductance series-series, current-amplifier shunt-series.
//!
//! The amplifier is `U1` (output F, reference `0`, inputs [`in`, `fb`] for
//! the non-inverting stage and [`0`, `fb`] otherwise). F is its output pin:
//! node `out` when there is no isolation resistor, node `amp` when there is,
//! with `Riso` amp→out. The load `Rl` and `Cl` sit at `out` to ground. The
//! feedback is taken at the amplifier's pin (F), so an isolation resistor
//! sits outside the loop's resistive path and adds a zero to the loop gain
//! (see `docs/stage.md`). When `rs` is not given for a voltage source, `Vs`
//! drives `in` directly.
//!
//! A part that is not there is left out; a part that is there is a value
//! greater than zero. Required parts per kind: inverting `rf`, `rg`;
//! transimpedance `rf` (no `rg`); non-inverting `rf` with `rg` (or neither,
//! for a follower); transconductance `rg`, `rl` (no `rf`; `cf` across Rg);
//! current-amplifier `rf`, `rg`, `rl`; elsewhere `cf` needs `rf`.

use super::amplifier::Amplifier;
use super::spread::SpreadPoint;
use crate::check;
use crate::circuit::{Circuit, CircuitError, CircuitResult};
use crate::error::{Error, Result};

/// Which common stage.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum StageKind {
    /// Input at the + input; gain 1 + Rf/Rg.
    NonInverting,
    /// Input through Rg to the − input; gain −Rf/Rg.
    Inverting,
    /// A current source (photodiode, sensor) at the − input; gain −Rf in V/A.
    Transimpedance,
    /// Input at the + input, the load inside the loop over a sense resistor
    /// Rg; output the load current, gain 1/Rg in A/V.
    Transconductance,
    /// A current source at the − input, the load current sensed by Rg and
    /// fed back through Rf; gain −(1 + Rf/Rg) in A/A.
    CurrentAmplifier,
}

/// The kind names of the stage document.
pub const STAGE_KIND_NAMES: &str =
    "non-inverting, inverting, transimpedance, transconductance, current-amplifier";

impl StageKind {
    /// All kinds.
    pub const ALL: [StageKind; 5] = [
        StageKind::NonInverting,
        StageKind::Inverting,
        StageKind::Transimpedance,
        StageKind::Transconductance,
        StageKind::CurrentAmplifier,
    ];

    /// The document name.
    pub const fn name(self) -> &'static str {
        match self {
            StageKind::NonInverting => "non-inverting",
            StageKind::Inverting => "inverting",
            StageKind::Transimpedance => "transimpedance",
            StageKind::Transconductance => "transconductance",
            StageKind::CurrentAmplifier => "current-amplifier",
        }
    }

    /// The kind for a document name.
    ///
    /// # Errors
    /// [`Error::UnknownName`] with param `kind`.
    pub fn from_name(s: &str) -> Result<StageKind> {
        StageKind::ALL
            .into_iter()
            .find(|k| k.name() == s)
            .ok_or(Error::UnknownName {
                param: "kind",
                expected: STAGE_KIND_NAMES,
            })
    }
}

/// The parts of a stage; `None` = the part is not there. Ω and F.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct StageParts {
    /// Feedback resistor, Ω.
    pub rf: Option<f64>,
    /// Gain-setting resistor (to ground, or in series with the input), Ω.
    pub rg: Option<f64>,
    /// Capacitor across Rf, F.
    pub cf: Option<f64>,
    /// Source resistance (series for a voltage source, shunt for a current source), Ω.
    pub rs: Option<f64>,
    /// Source capacitance to ground (a cable, a photodiode's junction), F.
    pub cs: Option<f64>,
    /// Load resistance, Ω.
    pub rl: Option<f64>,
    /// Load capacitance, F.
    pub cl: Option<f64>,
    /// Isolation resistor between the amplifier's output and the load, Ω.
    pub riso: Option<f64>,
}

/// A stage: its kind, its amplifier (at a point of the A0 spread) and its parts.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Stage {
    /// Which stage.
    pub kind: StageKind,
    /// The amplifier.
    pub amplifier: Amplifier,
    /// The point of the A0 spread the circuit uses.
    pub point: SpreadPoint,
    /// The parts.
    pub parts: StageParts,
}

/// Names of what [`Stage::circuit`] creates, for the analyses.
#[derive(Debug, Clone, PartialEq)]
pub struct StageCircuit {
    /// The full circuit (its document: [`crate::circuit::json::write_circuit`]).
    pub circuit: Circuit,
    /// The independent source: `Vs` (1 V) or `Is` (1 A).
    pub source: &'static str,
    /// The amplifier element, `U1`.
    pub amplifier: &'static str,
    /// The output node, `out`.
    pub output: &'static str,
    /// The node where the source meets the stage (`in`, or `fb` for transimpedance).
    pub input: &'static str,
    /// The unit of the output per unit of the source: `V/V`, `V/A`, `A/V`, `A/A`.
    pub gain_unit: &'static str,
    /// The element whose current is the output (`Rl`) for the current-output
    /// stages; `None` when the output is V(out).
    pub output_current: Option<&'static str>,
}

impl StageCircuit {
    /// The circuit whose impedance at [`StageCircuit::input`] is the stage's
    /// input impedance: without the source, and without the series source
    /// resistance of a voltage source (a transimpedance stage keeps its
    /// sensor's `Cs` and `Rs`, which are part of what the input node sees).
    ///
    /// # Errors
    /// None in practice (the names are the builder's own); an unknown name
    /// would be reported as by [`Circuit::without`].
    pub fn input_impedance_circuit(&self) -> CircuitResult<Circuit> {
        let c = self.circuit.without(self.source)?;
        if self.source == "Vs" && c.element_index("Rs").is_ok() {
            return c.without("Rs");
        }
        Ok(c)
    }
}

fn present(param: &'static str, v: Option<f64>) -> Result<Option<f64>> {
    v.map(|x| check::positive(param, x)).transpose()
}

fn required(param: &'static str, v: Option<f64>, requirement: &'static str) -> Result<f64> {
    present(param, v)?.ok_or(Error::OutOfDomain { param, requirement })
}

impl Stage {
    /// Check the amplifier and the parts, naming the field.
    ///
    /// # Errors
    /// A part given as zero, negative or not finite (param: the part); a
    /// required part missing, or a part the kind does not take (param: the
    /// part); the amplifier's errors ([`Amplifier::validate`]).
    pub fn validate(&self) -> Result<()> {
        self.amplifier.validate()?;
        let p = &self.parts;
        for (name, v) in [
            ("rf", p.rf),
            ("rg", p.rg),
            ("cf", p.cf),
            ("rs", p.rs),
            ("cs", p.cs),
            ("rl", p.rl),
            ("cl", p.cl),
            ("riso", p.riso),
        ] {
            present(name, v)?;
        }
        match self.kind {
            StageKind::NonInverting => {
                if p.rg.is_some() {
                    required("rf", p.rf, "a non-inverting stage with Rg needs Rf")?;
                } else if p.rf.is_some() {
                    required(
                        "rg",
                        p.rg,
                        "a non-inverting stage with Rf needs Rg (leave both out for a follower)",
                    )?;
                }
            }
            StageKind::Inverting => {
                required("rf", p.rf, "an inverting stage needs Rf")?;
                required("rg", p.rg, "an inverting stage needs Rg")?;
            }
            StageKind::Transconductance => {
                required(
                    "rg",
                    p.rg,
                    "a transconductance stage needs the sense resistor Rg",
                )?;
                required(
                    "rl",
                    p.rl,
                    "a transconductance stage needs its load Rl (inside the loop)",
                )?;
                if p.rf.is_some() {
                    return Err(Error::OutOfDomain {
                        param: "rf",
                        requirement:
                            "a transconductance stage has no Rf (the load is the feedback path)",
                    });
                }
            }
            StageKind::CurrentAmplifier => {
                required("rf", p.rf, "a current amplifier needs Rf")?;
                required(
                    "rg",
                    p.rg,
                    "a current amplifier needs the sense resistor Rg",
                )?;
                required(
                    "rl",
                    p.rl,
                    "a current amplifier needs its load Rl (inside the loop)",
                )?;
            }
            StageKind::Transimpedance => {
                required("rf", p.rf, "a transimpedance stage needs Rf")?;
                if p.rg.is_some() {
                    return Err(Error::OutOfDomain {
                        param: "rg",
                        requirement: "a transimpedance stage has no Rg (the source is a current into the − input)",
                    });
                }
            }
        }
        if p.cf.is_some() && p.rf.is_none() && self.kind != StageKind::Transconductance {
            return Err(Error::OutOfDomain {
                param: "cf",
                requirement: "Cf sits across Rf: give Rf too",
            });
        }
        Ok(())
    }

    /// Build the full circuit with the fixed names of the module table.
    ///
    /// # Errors
    /// As [`Stage::validate`].
    ///
    /// # Example
    /// ```
    /// use loopwright::circuit::solve;
    /// use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
    /// let stage = Stage {
    ///     kind: StageKind::Inverting,
    ///     amplifier: Amplifier::from_gbw(Spread::fixed(1e6), 1e7),
    ///     point: SpreadPoint::Typ,
    ///     parts: StageParts { rf: Some(10e3), rg: Some(1e3), ..StageParts::default() },
    /// };
    /// let built = stage.circuit().unwrap();
    /// let v = solve(&built.circuit, 1.0).unwrap().voltage("out").unwrap();
    /// assert!((v.re + 10.0).abs() < 1e-3);
    /// let bad = Stage { parts: StageParts { rg: None, ..stage.parts }, ..stage };
    /// assert_eq!(bad.circuit().unwrap_err().error.param(), "rg");
    /// ```
    pub fn circuit(&self) -> CircuitResult<StageCircuit> {
        self.validate().map_err(CircuitError::from)?;
        if matches!(
            self.kind,
            StageKind::Transconductance | StageKind::CurrentAmplifier
        ) {
            return self.current_output_circuit();
        }
        let p = &self.parts;
        let mut c = Circuit::new();
        let pin = if p.riso.is_some() { "amp" } else { "out" };
        let (source, input, gain_unit) = self.source(&mut c)?;
        let (plus, minus) = match self.kind {
            StageKind::NonInverting if p.rf.is_none() => ("in", pin),
            StageKind::NonInverting => ("in", "fb"),
            _ => ("0", "fb"),
        };
        c.amplifier(
            "U1",
            pin,
            "0",
            plus,
            minus,
            self.amplifier.clone(),
            self.point,
        )?;
        if let Some(rf) = p.rf {
            c.resistor("Rf", pin, "fb", rf)?;
        }
        if let Some(cf) = p.cf {
            c.capacitor("Cf", pin, "fb", cf)?;
        }
        if let (StageKind::NonInverting, Some(rg)) = (self.kind, p.rg) {
            c.resistor("Rg", "fb", "0", rg)?;
        }
        if let Some(riso) = p.riso {
            c.resistor("Riso", "amp", "out", riso)?;
        }
        if let Some(rl) = p.rl {
            c.resistor("Rl", "out", "0", rl)?;
        }
        if let Some(cl) = p.cl {
            c.capacitor("Cl", "out", "0", cl)?;
        }
        Ok(StageCircuit {
            circuit: c,
            source,
            amplifier: "U1",
            output: "out",
            input,
            gain_unit,
            output_current: None,
        })
    }

    /// The two current-output stages: the load inside the loop.
    fn current_output_circuit(&self) -> CircuitResult<StageCircuit> {
        let p = &self.parts;
        let mut c = Circuit::new();
        let pin = if p.riso.is_some() { "amp" } else { "out" };
        let current_in = self.kind == StageKind::CurrentAmplifier;
        let (source, input) = if current_in {
            c.current_source("Is", "0", "fb", 1.0)?;
            if let Some(cs) = p.cs {
                c.capacitor("Cs", "fb", "0", cs)?;
            }
            if let Some(rs) = p.rs {
                c.resistor("Rs", "fb", "0", rs)?;
            }
            ("Is", "fb")
        } else {
            match p.rs {
                Some(rs) => {
                    c.voltage_source("Vs", "src", "0", 1.0)?;
                    c.resistor("Rs", "src", "in", rs)?;
                }
                None => c.voltage_source("Vs", "in", "0", 1.0)?,
            }
            if let Some(cs) = p.cs {
                c.capacitor("Cs", "in", "0", cs)?;
            }
            ("Vs", "in")
        };
        let plus = if current_in { "0" } else { "in" };
        c.amplifier(
            "U1",
            pin,
            "0",
            plus,
            "fb",
            self.amplifier.clone(),
            self.point,
        )?;
        if let Some(riso) = p.riso {
            c.resistor("Riso", "amp", "out", riso)?;
        }
        // The sense node: fb itself (transconductance) or ld (current amplifier).
        let sense = if current_in { "ld" } else { "fb" };
        let (rl, rg) = (p.rl.unwrap_or(1.0), p.rg.unwrap_or(1.0));
        c.resistor("Rl", "out", sense, rl)?;
        if let Some(cl) = p.cl {
            c.capacitor("Cl", "out", sense, cl)?;
        }
        c.resistor("Rg", sense, "0", rg)?;
        if current_in {
            if let Some(rf) = p.rf {
                c.resistor("Rf", "ld", "fb", rf)?;
            }
            if let Some(cf) = p.cf {
                c.capacitor("Cf", "ld", "fb", cf)?;
            }
        } else if let Some(cf) = p.cf {
            c.capacitor("Cf", "fb", "0", cf)?;
        }
        Ok(StageCircuit {
            circuit: c,
            source,
            amplifier: "U1",
            output: "out",
            input,
            gain_unit: if current_in { "A/A" } else { "A/V" },
            output_current: Some("Rl"),
        })
    }

    /// The source and its parts; returns (source, input node, gain unit).
    fn source(&self, c: &mut Circuit) -> CircuitResult<(&'static str, &'static str, &'static str)> {
        let p = &self.parts;
        if self.kind == StageKind::Transimpedance {
            c.current_source("Is", "0", "fb", 1.0)?;
            if let Some(cs) = p.cs {
                c.capacitor("Cs", "fb", "0", cs)?;
            }
            if let Some(rs) = p.rs {
                c.resistor("Rs", "fb", "0", rs)?;
            }
            return Ok(("Is", "fb", "V/A"));
        }
        match p.rs {
            Some(rs) => {
                c.voltage_source("Vs", "src", "0", 1.0)?;
                c.resistor("Rs", "src", "in", rs)?;
            }
            None => c.voltage_source("Vs", "in", "0", 1.0)?,
        }
        if let Some(cs) = p.cs {
            c.capacitor("Cs", "in", "0", cs)?;
        }
        if let (StageKind::Inverting, Some(rg)) = (self.kind, p.rg) {
            c.resistor("Rg", "in", "fb", rg)?;
        }
        Ok(("Vs", "in", "V/V"))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::solve;
    use crate::stage::Spread;

    fn stage(kind: StageKind, parts: StageParts) -> Stage {
        Stage {
            kind,
            amplifier: Amplifier::from_gbw(Spread::fixed(1e6), 1e7).with_ro(50.0),
            point: SpreadPoint::Typ,
            parts,
        }
    }

    #[test]
    fn current_output_stages_give_their_ideal_gain() {
        // Ideal gains of the op-amp transconductance and current amplifiers
        // (e.g. Franco, Design with Operational Amplifiers and Analog Integrated
        // Circuits, 4th ed., ch. 2, from memory): I(Rl)/Vs = 1/Rg and
        // I(Rl)/Is = −(1 + Rf/Rg). A0 = 1e6 leaves a loop-gain error below 1e-4.
        let gm = stage(
            StageKind::Transconductance,
            StageParts {
                rg: Some(100.0),
                rl: Some(1e3),
                cl: Some(1e-9),
                rs: Some(50.0),
                ..StageParts::default()
            },
        );
        let b = gm.circuit().unwrap();
        assert_eq!((b.gain_unit, b.output_current), ("A/V", Some("Rl")));
        let i = solve(&b.circuit, 0.1).unwrap().current("Rl").unwrap();
        assert!((i.re / 0.01 - 1.0).abs() < 1e-3, "{i}");
        let ai = stage(
            StageKind::CurrentAmplifier,
            StageParts {
                rf: Some(9e3),
                rg: Some(1e3),
                rl: Some(100.0),
                ..StageParts::default()
            },
        );
        let b = ai.circuit().unwrap();
        let i = solve(&b.circuit, 0.1).unwrap().current("Rl").unwrap();
        assert!((i.re / -10.0 - 1.0).abs() < 1e-3, "{i}");
        let e = |kind, parts| stage(kind, parts).circuit().unwrap_err().error.param();
        let p = StageParts::default();
        assert_eq!(
            e(
                StageKind::Transconductance,
                StageParts { rl: Some(1.0), ..p }
            ),
            "rg"
        );
        assert_eq!(
            e(
                StageKind::CurrentAmplifier,
                StageParts {
                    rf: Some(1.0),
                    rg: Some(1.0),
                    ..p
                }
            ),
            "rl"
        );
        assert_eq!(
            e(
                StageKind::Transconductance,
                StageParts {
                    rl: Some(1.0),
                    rg: Some(1.0),
                    rf: Some(1.0),
                    ..p
                }
            ),
            "rf"
        );
    }

    #[test]
    fn each_kind_gives_its_ideal_gain_at_low_frequency() {
        // Ideal gains (any op-amp text, e.g. Sedra & Smith, Microelectronic
        // Circuits, 7th ed., ch. 2, from memory): 1 + Rf/Rg, −Rf/(Rs + Rg), −Rf, 1.
        let r = |rf, rg| StageParts {
            rf: Some(rf),
            rg: Some(rg),
            rs: Some(100.0),
            rl: Some(2e3),
            cl: Some(1e-9),
            riso: Some(20.0),
            ..StageParts::default()
        };
        let cases = [
            (stage(StageKind::NonInverting, r(9e3, 1e3)), 10.0),
            (stage(StageKind::Inverting, r(10e3, 900.0)), -10.0),
            (
                stage(
                    StageKind::Transimpedance,
                    StageParts {
                        rf: Some(1e5),
                        cs: Some(10e-12),
                        ..StageParts::default()
                    },
                ),
                -1e5,
            ),
            (stage(StageKind::NonInverting, StageParts::default()), 1.0),
        ];
        for (s, ideal) in cases {
            let built = s.circuit().unwrap();
            let v = solve(&built.circuit, 0.1).unwrap().voltage("out").unwrap();
            let load = if s.parts.rl.is_some() {
                2e3 / 2020.0
            } else {
                1.0
            };
            // Within 1e-3 of ideal: A0 = 1e6 leaves a loop-gain error below 1e-4.
            assert!(
                (v.re / (ideal * load) - 1.0).abs() < 1e-3,
                "{:?}: {v}",
                s.kind
            );
        }
    }

    #[test]
    fn bad_parts_name_the_field() {
        let e = |kind, parts| stage(kind, parts).circuit().unwrap_err().error.param();
        let p = StageParts::default();
        assert_eq!(
            e(StageKind::Inverting, StageParts { rg: Some(1e3), ..p }),
            "rf"
        );
        assert_eq!(
            e(StageKind::Inverting, StageParts { rf: Some(1e3), ..p }),
            "rg"
        );
        assert_eq!(e(StageKind::Transimpedance, p), "rf");
        assert_eq!(
            e(
                StageKind::Transimpedance,
                StageParts {
                    rf: Some(1e3),
                    rg: Some(1.0),
                    ..p
                }
            ),
            "rg"
        );
        assert_eq!(
            e(StageKind::NonInverting, StageParts { rg: Some(1e3), ..p }),
            "rf"
        );
        assert_eq!(
            e(StageKind::NonInverting, StageParts { cl: Some(0.0), ..p }),
            "cl"
        );
        assert_eq!(
            e(
                StageKind::NonInverting,
                StageParts {
                    riso: Some(-5.0),
                    ..p
                }
            ),
            "riso"
        );
        assert_eq!(
            e(
                StageKind::NonInverting,
                StageParts {
                    cf: Some(1e-12),
                    ..p
                }
            ),
            "cf"
        );
        let mut s = stage(StageKind::NonInverting, p);
        s.amplifier.complex_poles.push(crate::freq::ComplexPair {
            freq_hz: 1e7,
            q: 0.0,
        });
        assert_eq!(s.circuit().unwrap_err().error.param(), "complexPoles");
    }
}
