//! Worst case (extreme values) of an op-amp stage over resistor tolerances and the
//! open-loop gain range.
//!
//! The stage: an amplifier with open-loop gain A (V/V, a single dominant pole at
//! f_p, input resistance r_i, output resistance r_o) and a feedback network R1
//! (to ground or from the input) and R2 (output to the inverting input). The
//! feedback factor is β = R1/(R1 + R2) for both stages and D = 1 + A·β.
//! - non-inverting (series-shunt): Af = A/D, Zin = r_i·D, Zout = r_o/D;
//! - inverting: Af = −(R2/R1)·A·β/D = −A·R2/(R1 + R2 + A·R1),
//!   Zin = R1 + R2/(1 + A) (the summing node is a virtual ground of
//!   impedance R2/(1 + A); r_i taken as infinite there), Zout = r_o/D;
//! - both: closed-loop bandwidth f_p(A)·D (single-pole bandwidth extension),
//!   where f_p(A) is the open-loop dominant pole of that amplifier.
//!
//! How the pole moves with A ([`Hold`]): `pole_hz` is the dominant pole of the
//! typical amplifier (A = a_typ). By default ([`Hold::GainBandwidth`]) the spread of
//! A keeps the gain–bandwidth product GBW = a_typ·f_p fixed, so an amplifier with
//! gain A has its pole at GBW/A and the closed-loop bandwidth is
//! GBW·(1/A + β) ≈ GBW·β. That is how an internally compensated op-amp spreads: its
//! unity-gain frequency is set by the input-stage transconductance and the
//! compensation capacitor (f_T = g_m/(2π·C_c)), while the DC gain also carries the
//! output resistance of the gain stage, which varies much more from part to part
//! (Gray, Hurst, Lewis & Meyer, *Analysis and Design of Analog Integrated
//! Circuits*, 5th ed., ch. 9, from memory). [`Hold::Pole`] keeps f_p fixed instead
//! (bandwidth f_p·(1 + A·β), which swings with A): for an amplifier whose pole is
//! set by an external network that does not track its gain.
//!
//! Each quantity is monotonic in R1, in R2 and in A separately (the derivatives
//! keep their sign over positive values), so its extremes over the tolerance box
//! are at corners of the box: the 8 corners (R1, R2, A each low or high) are
//! evaluated exactly and the corner of each extreme is named.
//!
//! Sources: the closed-loop relations of [`crate::feedback`]; Sedra & Smith,
//! *Microelectronic Circuits*, 7th ed., sections 2.2–2.3 and 10.4 (from memory);
//! evaluating a monotonic function at the corners of the tolerance box is the
//! extreme-value analysis of worst-case circuit analysis (common practice, no
//! source).

use crate::check;
use crate::error::{Error, Result};
use crate::feedback::{closed_loop_gain, feedback_amount, resistances_with_feedback, Topology};
use core::str::FromStr;

/// Which op-amp stage.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum Stage {
    /// Non-inverting amplifier, ideal gain 1 + R2/R1.
    NonInverting,
    /// Inverting amplifier, ideal gain −R2/R1.
    Inverting,
}

/// The accepted stage names.
pub const STAGE_NAMES: &str = "non-inverting, inverting";

impl FromStr for Stage {
    type Err = Error;

    /// # Errors
    /// [`Error::UnknownName`] with `param = "stage"`.
    fn from_str(s: &str) -> Result<Self> {
        let t = s.trim();
        [
            ("non-inverting", Stage::NonInverting),
            ("noninverting", Stage::NonInverting),
            ("inverting", Stage::Inverting),
        ]
        .iter()
        .find(|(n, _)| n.eq_ignore_ascii_case(t))
        .map(|&(_, v)| v)
        .ok_or(Error::UnknownName {
            param: "stage",
            expected: STAGE_NAMES,
        })
    }
}

/// What the open-loop gain spread holds fixed (see the module doc).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum Hold {
    /// The gain–bandwidth product a_typ·f_p: the pole moves to GBW/A (default).
    #[default]
    GainBandwidth,
    /// The dominant pole f_p, whatever A is.
    Pole,
}

/// The accepted names of [`Hold`].
pub const HOLD_NAMES: &str = "gbw, pole";

impl FromStr for Hold {
    type Err = Error;

    /// `gbw` (or `gain-bandwidth`) or `pole`.
    ///
    /// # Errors
    /// [`Error::UnknownName`] with `param = "hold"`.
    fn from_str(s: &str) -> Result<Self> {
        let t = s.trim();
        [
            ("gbw", Hold::GainBandwidth),
            ("gain-bandwidth", Hold::GainBandwidth),
            ("pole", Hold::Pole),
        ]
        .iter()
        .find(|(n, _)| n.eq_ignore_ascii_case(t))
        .map(|&(_, v)| v)
        .ok_or(Error::UnknownName {
            param: "hold",
            expected: HOLD_NAMES,
        })
    }
}

/// A stage with its part tolerances.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StageSpec {
    /// The stage.
    pub stage: Stage,
    /// Nominal R1, Ω.
    pub r1: f64,
    /// Nominal R2, Ω.
    pub r2: f64,
    /// Tolerance of R1 as a fraction (0.01 for 1 %), > 0.
    pub tol_r1: f64,
    /// Tolerance of R2 as a fraction, > 0.
    pub tol_r2: f64,
    /// Least open-loop gain, V/V, > 0.
    pub a_min: f64,
    /// Typical open-loop gain (the nominal), V/V.
    pub a_typ: f64,
    /// Largest open-loop gain, V/V.
    pub a_max: f64,
    /// Amplifier input resistance (open loop), Ω, > 0.
    pub ri: f64,
    /// Amplifier output resistance (open loop), Ω, ≥ 0.
    pub ro: f64,
    /// Open-loop dominant pole of the typical amplifier (A = a_typ), Hz, > 0.
    pub pole_hz: f64,
    /// What the spread of A holds fixed: the gain–bandwidth product (default) or
    /// the pole.
    pub hold: Hold,
}

impl StageSpec {
    /// Validate every field; the error names the field.
    pub(crate) fn validated(&self) -> Result<StageSpec> {
        check::positive("r1", self.r1)?;
        check::positive("r2", self.r2)?;
        check::positive("tol_r1", self.tol_r1)?;
        check::positive("tol_r2", self.tol_r2)?;
        for (p, t) in [("tol_r1", self.tol_r1), ("tol_r2", self.tol_r2)] {
            if t >= 1.0 {
                return Err(Error::OutOfDomain {
                    param: p,
                    requirement: "must be less than 1 (a fraction: 0.01 for 1 %)",
                });
            }
        }
        check::positive("a_min", self.a_min)?;
        check::positive("a_typ", self.a_typ)?;
        check::positive("a_max", self.a_max)?;
        if !(self.a_min <= self.a_typ && self.a_typ <= self.a_max) {
            return Err(Error::OutOfDomain {
                param: "a_typ",
                requirement: "must lie between a_min and a_max",
            });
        }
        check::positive("ri", self.ri)?;
        check::non_negative("ro", self.ro)?;
        check::positive("pole_hz", self.pole_hz)?;
        Ok(*self)
    }
}

/// The four closed-loop quantities of one set of part values.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct StageValues {
    /// Closed-loop gain, V/V (negative for the inverting stage).
    pub gain: f64,
    /// Input impedance, Ω.
    pub input_impedance: f64,
    /// Output impedance, Ω.
    pub output_impedance: f64,
    /// Closed-loop −3 dB bandwidth, Hz.
    pub bandwidth_hz: f64,
}

/// One closed-loop quantity; see [`StageValues`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum Metric {
    /// Closed-loop gain.
    Gain,
    /// Input impedance.
    InputImpedance,
    /// Output impedance.
    OutputImpedance,
    /// Closed-loop bandwidth.
    Bandwidth,
}

/// The accepted metric names.
pub const METRIC_NAMES: &str = "gain, input-impedance, output-impedance, bandwidth";

impl FromStr for Metric {
    type Err = Error;

    /// # Errors
    /// [`Error::UnknownName`] with `param = "metric"`.
    fn from_str(s: &str) -> Result<Self> {
        let t = s.trim();
        [
            ("gain", Metric::Gain),
            ("input-impedance", Metric::InputImpedance),
            ("output-impedance", Metric::OutputImpedance),
            ("bandwidth", Metric::Bandwidth),
        ]
        .iter()
        .find(|(n, _)| n.eq_ignore_ascii_case(t))
        .map(|&(_, v)| v)
        .ok_or(Error::UnknownName {
            param: "metric",
            expected: METRIC_NAMES,
        })
    }
}

impl StageValues {
    /// The value of one metric.
    pub fn get(&self, metric: Metric) -> f64 {
        match metric {
            Metric::Gain => self.gain,
            Metric::InputImpedance => self.input_impedance,
            Metric::OutputImpedance => self.output_impedance,
            Metric::Bandwidth => self.bandwidth_hz,
        }
    }
}

/// The closed-loop gain alone (the Monte Carlo inner loop), formulas as in the
/// module doc. Inputs must be validated and positive.
pub(crate) fn stage_gain(stage: Stage, r1: f64, r2: f64, a: f64) -> Result<f64> {
    let beta = r1 / (r1 + r2);
    let af = closed_loop_gain(a, beta)?;
    Ok(match stage {
        Stage::NonInverting => af,
        Stage::Inverting => -(r2 / (r1 + r2)) * af,
    })
}

/// One metric for one set of part values.
pub(crate) fn stage_metric(
    spec: &StageSpec,
    metric: Metric,
    r1: f64,
    r2: f64,
    a: f64,
) -> Result<f64> {
    let beta = r1 / (r1 + r2);
    match metric {
        Metric::Gain => stage_gain(spec.stage, r1, r2, a),
        Metric::InputImpedance => match spec.stage {
            Stage::NonInverting => {
                Ok(resistances_with_feedback(Topology::SeriesShunt, spec.ri, spec.ro, a, beta)?.0)
            }
            Stage::Inverting => check::result("input_impedance", r1 + r2 / (1.0 + a)),
        },
        Metric::OutputImpedance => {
            Ok(resistances_with_feedback(Topology::SeriesShunt, spec.ri, spec.ro, a, beta)?.1)
        }
        Metric::Bandwidth => {
            let pole = match spec.hold {
                Hold::GainBandwidth => spec.pole_hz * (spec.a_typ / a),
                Hold::Pole => spec.pole_hz,
            };
            check::result("bandwidth_hz", pole * feedback_amount(a, beta)?)
        }
    }
}

/// All four quantities for one set of part values.
///
/// # Errors
/// As [`worst_case`] for the spec; `r1`, `r2`, `a` must be positive and finite.
///
/// # Example
/// ```
/// use loopwright::network::{stage_values, Hold, Stage, StageSpec};
/// let s = StageSpec { stage: Stage::NonInverting, r1: 1e3, r2: 9e3, tol_r1: 0.01, tol_r2: 0.01,
///     a_min: 1e5, a_typ: 2e5, a_max: 1e6, ri: 1e6, ro: 100.0, pole_hz: 10.0, hold: Hold::GainBandwidth };
/// let v = stage_values(&s, 1e3, 9e3, 1e5).unwrap();
/// assert!((v.gain - 1e5 / (1.0 + 1e4)).abs() < 1e-12);
/// assert_eq!(stage_values(&s, 0.0, 9e3, 1e5).unwrap_err().param(), "r1");
/// ```
pub fn stage_values(spec: &StageSpec, r1: f64, r2: f64, a: f64) -> Result<StageValues> {
    let spec = spec.validated()?;
    let r1 = check::positive("r1", r1)?;
    let r2 = check::positive("r2", r2)?;
    let a = check::positive("a", a)?;
    Ok(StageValues {
        gain: stage_metric(&spec, Metric::Gain, r1, r2, a)?,
        input_impedance: stage_metric(&spec, Metric::InputImpedance, r1, r2, a)?,
        output_impedance: stage_metric(&spec, Metric::OutputImpedance, r1, r2, a)?,
        bandwidth_hz: stage_metric(&spec, Metric::Bandwidth, r1, r2, a)?,
    })
}

/// Low or high end of a part's range.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum End {
    /// Nominal × (1 − tolerance), or a_min.
    Low,
    /// Nominal × (1 + tolerance), or a_max.
    High,
}

/// A corner of the tolerance box.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Corner {
    /// R1 end.
    pub r1: End,
    /// R2 end.
    pub r2: End,
    /// Open-loop gain end.
    pub open_loop_gain: End,
}

/// The extremes of one quantity and the corners that give them.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Extremes {
    /// At nominal R1, R2 and a_typ.
    pub nominal: f64,
    /// Smallest value over the corners.
    pub min: f64,
    /// Largest value over the corners.
    pub max: f64,
    /// Where the minimum is.
    pub min_corner: Corner,
    /// Where the maximum is.
    pub max_corner: Corner,
    /// (min − nominal)/|nominal|, %.
    pub low_percent: f64,
    /// (max − nominal)/|nominal|, %.
    pub high_percent: f64,
}

/// Worst case of all four quantities.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct WorstCase {
    /// Closed-loop gain, V/V.
    pub gain: Extremes,
    /// Input impedance, Ω.
    pub input_impedance: Extremes,
    /// Output impedance, Ω.
    pub output_impedance: Extremes,
    /// Closed-loop bandwidth, Hz.
    pub bandwidth_hz: Extremes,
}

/// The 8 corners in a fixed order (R1, R2, A; low before high).
pub const CORNERS: [Corner; 8] = {
    use End::{High as H, Low as L};
    [
        Corner {
            r1: L,
            r2: L,
            open_loop_gain: L,
        },
        Corner {
            r1: L,
            r2: L,
            open_loop_gain: H,
        },
        Corner {
            r1: L,
            r2: H,
            open_loop_gain: L,
        },
        Corner {
            r1: L,
            r2: H,
            open_loop_gain: H,
        },
        Corner {
            r1: H,
            r2: L,
            open_loop_gain: L,
        },
        Corner {
            r1: H,
            r2: L,
            open_loop_gain: H,
        },
        Corner {
            r1: H,
            r2: H,
            open_loop_gain: L,
        },
        Corner {
            r1: H,
            r2: H,
            open_loop_gain: H,
        },
    ]
};

impl Corner {
    /// The part values at this corner: (R1, R2, A).
    pub fn values(&self, spec: &StageSpec) -> (f64, f64, f64) {
        let pick = |end: End, nominal: f64, tol: f64| match end {
            End::Low => nominal * (1.0 - tol),
            End::High => nominal * (1.0 + tol),
        };
        let a = match self.open_loop_gain {
            End::Low => spec.a_min,
            End::High => spec.a_max,
        };
        (
            pick(self.r1, spec.r1, spec.tol_r1),
            pick(self.r2, spec.r2, spec.tol_r2),
            a,
        )
    }
}

/// Extreme values of gain, input and output impedance and bandwidth over the
/// resistor tolerances and the open-loop gain range, with the corner of each.
///
/// Formulas and the corner argument in the module doc.
///
/// # Errors
/// `r1`, `r2`, `a_min`, `a_typ`, `a_max`, `ri`, `pole_hz` not finite or ≤ 0;
/// `ro` < 0; `tol_r1`, `tol_r2` ≤ 0 or ≥ 1; `a_typ` outside `a_min … a_max`;
/// [`Error::Overflow`] when a value overflows.
///
/// # Example
/// ```
/// use loopwright::network::{worst_case, End, Hold, Stage, StageSpec};
/// // Gain 10 from 1 k / 9 k at 1 %, A from 10⁵ to 10⁶.
/// let mut s = StageSpec { stage: Stage::NonInverting, r1: 1e3, r2: 9e3, tol_r1: 0.01, tol_r2: 0.01,
///     a_min: 1e5, a_typ: 2e5, a_max: 1e6, ri: 1e6, ro: 100.0, pole_hz: 10.0, hold: Hold::GainBandwidth };
/// let w = worst_case(&s).unwrap();
/// // Highest gain with R1 low, R2 high and A high.
/// assert_eq!((w.gain.max_corner.r1, w.gain.max_corner.r2), (End::Low, End::High));
/// assert!((w.gain.max - 1.0 - 9.09 / 0.99).abs() < 1e-3);
/// s.tol_r1 = 0.0;
/// assert_eq!(worst_case(&s).unwrap_err().param(), "tol_r1");
/// ```
pub fn worst_case(spec: &StageSpec) -> Result<WorstCase> {
    let spec = spec.validated()?;
    let extremes = |metric: Metric| -> Result<Extremes> {
        let nominal = stage_metric(&spec, metric, spec.r1, spec.r2, spec.a_typ)?;
        let mut lo = (f64::INFINITY, CORNERS[0]);
        let mut hi = (f64::NEG_INFINITY, CORNERS[0]);
        for c in CORNERS {
            let (r1, r2, a) = c.values(&spec);
            let v = stage_metric(&spec, metric, r1, r2, a)?;
            if v < lo.0 {
                lo = (v, c);
            }
            if v > hi.0 {
                hi = (v, c);
            }
        }
        let scale = if nominal == 0.0 {
            0.0
        } else {
            100.0 / libm::fabs(nominal)
        };
        Ok(Extremes {
            nominal,
            min: lo.0,
            max: hi.0,
            min_corner: lo.1,
            max_corner: hi.1,
            low_percent: (lo.0 - nominal) * scale,
            high_percent: (hi.0 - nominal) * scale,
        })
    };
    Ok(WorstCase {
        gain: extremes(Metric::Gain)?,
        input_impedance: extremes(Metric::InputImpedance)?,
        output_impedance: extremes(Metric::OutputImpedance)?,
        bandwidth_hz: extremes(Metric::Bandwidth)?,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn spec(stage: Stage) -> StageSpec {
        StageSpec {
            stage,
            r1: 2e3,
            r2: 47e3,
            tol_r1: 0.05,
            tol_r2: 0.01,
            a_min: 2e3,
            a_typ: 1e4,
            a_max: 5e4,
            ri: 1e6,
            ro: 50.0,
            pole_hz: 20.0,
            hold: Hold::GainBandwidth,
        }
    }

    #[test]
    fn no_interior_point_beats_the_corners() {
        // Dense grid over the box (11³ points): every value within the corner extremes.
        for (stage, hold) in [
            (Stage::NonInverting, Hold::GainBandwidth),
            (Stage::Inverting, Hold::GainBandwidth),
            (Stage::NonInverting, Hold::Pole),
        ] {
            let s = StageSpec {
                hold,
                ..spec(stage)
            };
            let w = worst_case(&s).unwrap();
            for i in 0..=10 {
                for j in 0..=10 {
                    for k in 0..=10 {
                        let f = |n: i32| f64::from(n) / 5.0 - 1.0;
                        let r1 = s.r1 * (1.0 + s.tol_r1 * f(i));
                        let r2 = s.r2 * (1.0 + s.tol_r2 * f(j));
                        let a = s.a_min + (s.a_max - s.a_min) * f64::from(k) / 10.0;
                        let v = stage_values(&s, r1, r2, a).unwrap();
                        for (x, e) in [
                            (v.gain, w.gain),
                            (v.input_impedance, w.input_impedance),
                            (v.output_impedance, w.output_impedance),
                            (v.bandwidth_hz, w.bandwidth_hz),
                        ] {
                            let slack = 1e-12 * (e.min.abs() + e.max.abs());
                            assert!(
                                x >= e.min - slack && x <= e.max + slack,
                                "{stage:?} {i} {j} {k}"
                            );
                        }
                    }
                }
            }
        }
    }

    #[test]
    fn corners_of_the_inverting_gain() {
        // |Af| grows with R2/R1 and with A: most negative gain at R1 low, R2 high, A high.
        let w = worst_case(&spec(Stage::Inverting)).unwrap();
        assert_eq!(
            w.gain.min_corner,
            Corner {
                r1: End::Low,
                r2: End::High,
                open_loop_gain: End::High
            }
        );
        assert_eq!(
            w.gain.max_corner,
            Corner {
                r1: End::High,
                r2: End::Low,
                open_loop_gain: End::Low
            }
        );
        assert!(w.gain.nominal < 0.0 && w.gain.low_percent < 0.0 && w.gain.high_percent > 0.0);
    }

    #[test]
    fn bad_fields_are_named() {
        let mut s = spec(Stage::NonInverting);
        s.tol_r2 = -0.01;
        assert_eq!(worst_case(&s).unwrap_err().param(), "tol_r2");
        let mut s = spec(Stage::NonInverting);
        s.a_typ = 1e6;
        assert_eq!(worst_case(&s).unwrap_err().param(), "a_typ");
        let mut s = spec(Stage::NonInverting);
        s.pole_hz = f64::INFINITY;
        assert_eq!(worst_case(&s).unwrap_err().code(), "not_finite");
        assert_eq!("follower".parse::<Stage>().unwrap_err().param(), "stage");
    }
}
