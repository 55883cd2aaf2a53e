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

use crate::circuit::tolerance::{validate_tempco, Tolerance};
use crate::circuit::{CircuitError, CircuitResult, Name};
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

/// Where a varied value goes in the stage.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) enum Slot {
    Part(usize),
    A0,
    Gbw,
    Ro,
}

/// A stage with the spreads of its parts and a temperature range.
#[derive(Debug, Clone, PartialEq)]
pub struct TolStage {
    /// The stage at its nominal values.
    pub stage: Stage,
    /// The varied quantities, in draw order: parts in [`PART_NAMES`] order,
    /// then A0, GBW, Ro.
    pub varied: Vec<Varied>,
    /// Temperature range, °C, low ≤ high.
    pub temperature_c: [f64; 2],
    gbw_typ: f64,
    pole_typ: f64,
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

impl TolStage {
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
        for t in temperature_c {
            crate::check::finite("temperature", t)?;
            if !(TEMPERATURE_LIMITS_C[0]..=TEMPERATURE_LIMITS_C[1]).contains(&t) {
                return Err(Error::OutOfDomain {
                    param: "temperature",
                    requirement: "must be from -273.15 to 1000 °C",
                }
                .into());
            }
        }
        if temperature_c[0] > temperature_c[1] {
            return Err(Error::OutOfDomain {
                param: "temperature",
                requirement: "low must not be above high",
            }
            .into());
        }
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
            let (low, high, draw) = match s.tolerance {
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
            let tc = s.tempco_ppm.unwrap_or(0.0);
            validate_tempco(tc).map_err(|e| named(e, element))?;
            varied.push(Varied {
                name: String::from(*element),
                nominal: v,
                low,
                high,
                tempco_ppm: tc,
                draw,
                slot: Slot::Part(k),
            });
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
            stage: stage.clone(),
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
        let mut s = self.stage.clone();
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
