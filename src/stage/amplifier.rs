//! The amplifier as its datasheet describes it, and its open-loop gain A(jω).
//!
//! Figures (units in the field docs): the open-loop gain A0 as min/typ/max; the
//! gain-bandwidth product or the dominant pole (or both, when they agree);
//! further real poles and zeros; complex pole and zero pairs as frequency and Q;
//! differential and common-mode input resistance and capacitance; output
//! resistance; slew rate; output swing; voltage and current noise densities
//! with their 1/f corners.
//!
//! The open-loop gain at a point of the A0 spread, with s = j·2π·f:
//!
//! A(s) = A0 / (1 + s/ωp) · Π 1/(1 + s/ωk) · Π (1 + s/ωz) · Π (1 − s/ωr)
//!        · Π 1/(1 + s/(Q·ω0) + s²/ω0²) · Π (1 + s/(Q·ω0) + s²/ω0²)
//!
//! (dominant pole ωp, further poles ωk, left-half-plane zeros ωz,
//! right-half-plane zeros ωr, complex pole pairs, complex zero pairs), evaluated
//! directly as this product ([`Amplifier::open_loop_gain`]).
//!
//! **Across the A0 spread the gain-bandwidth product stays fixed by default**
//! ([`BandwidthRule::HoldGbw`]): the dominant pole moves, fp = GBW/A0. In an
//! internally compensated amplifier the gain-bandwidth product is set by the
//! input stage's transconductance and the compensation capacitor
//! (GBW = gm1/(2π·Cc)), which are well controlled, while A0 is a product of
//! output resistances of the gain stages, which spread widely with process and
//! temperature; so a low-A0 part has a higher dominant pole and the same
//! unity-gain frequency. Source: P. R. Gray, P. J. Hurst, S. H. Lewis &
//! R. G. Meyer, *Analysis and Design of Analog Integrated Circuits*, 5th ed.,
//! ch. 9 (from memory). [`BandwidthRule::HoldPole`] keeps the dominant pole
//! instead (the gain-bandwidth product scales with A0): for an amplifier whose
//! dominant pole is set by a part outside the gain stages (an external
//! compensation network, a discrete design).
//!
//! When both the gain-bandwidth product and the dominant pole are given, they
//! must agree with the typical A0 within [`GBW_MATCH_REL`]; the held one
//! (per the rule) is then used as given.

use super::density::NoiseDensity;
use super::spread::{Spread, SpreadPoint};
use crate::check;
use crate::error::{Error, Result};
use crate::freq::{ComplexPair, TransferModel};
use alloc::vec::Vec;
use num_complex::Complex64;

/// Most factors in one list of the model (further poles, zeros, pairs).
pub const MAX_FACTORS: usize = crate::freq::model::MAX_FACTORS;

/// How far a given gain-bandwidth product may stand from typical A0 × the given
/// dominant pole, relative: datasheets round each figure to one or two digits
/// and A0 to whole dB (one dB is 12 %), so a 15 % band accepts honest rounding
/// and still catches a pole or a GBW off by a decade. Common practice, no source.
pub const GBW_MATCH_REL: f64 = 0.15;

/// Which figure stays fixed when A0 moves across its spread (see the module docs).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum BandwidthRule {
    /// The gain-bandwidth product is fixed; the dominant pole is GBW/A0 (default).
    #[default]
    HoldGbw,
    /// The dominant pole is fixed; the gain-bandwidth product is A0·fp.
    HoldPole,
}

/// The names [`BandwidthRule::from_name`] accepts.
pub const BANDWIDTH_RULE_NAMES: &str = "hold-gbw, hold-pole";

impl BandwidthRule {
    /// The document name, `hold-gbw` or `hold-pole`.
    pub const fn name(self) -> &'static str {
        match self {
            BandwidthRule::HoldGbw => "hold-gbw",
            BandwidthRule::HoldPole => "hold-pole",
        }
    }

    /// The rule for a document name.
    ///
    /// # Errors
    /// [`Error::UnknownName`] with param `hold`.
    pub fn from_name(s: &str) -> Result<BandwidthRule> {
        [BandwidthRule::HoldGbw, BandwidthRule::HoldPole]
            .into_iter()
            .find(|r| r.name() == s)
            .ok_or(Error::UnknownName {
                param: "hold",
                expected: BANDWIDTH_RULE_NAMES,
            })
    }
}

/// The output swing limits, V (low < high).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct OutputSwing {
    /// Lowest output voltage, V.
    pub low_v: f64,
    /// Highest output voltage, V.
    pub high_v: f64,
}

/// An amplifier from its datasheet figures: V(out) = A(s)·(V(+) − V(−)).
///
/// Build it with [`Amplifier::from_gbw`] or [`Amplifier::from_dominant_pole`]
/// and the `with_*` methods, or fill the fields; [`Amplifier::validate`] checks
/// everything, naming the field.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Amplifier {
    /// Open-loop DC gain A0, V/V, each > 0, min ≤ typ ≤ max.
    pub a0: Spread,
    /// Gain-bandwidth product, Hz (> 0), if given.
    pub gbw_hz: Option<f64>,
    /// Dominant pole, Hz (> 0), if given.
    pub dominant_pole_hz: Option<f64>,
    /// What stays fixed across the A0 spread.
    pub hold: BandwidthRule,
    /// Further real poles (left half plane), Hz, each > 0.
    pub poles_hz: Vec<f64>,
    /// Real left-half-plane zeros, Hz, each > 0.
    pub zeros_hz: Vec<f64>,
    /// Real right-half-plane zeros, Hz, each > 0.
    pub rhp_zeros_hz: Vec<f64>,
    /// Complex pole pairs (f0 in Hz > 0, Q > 0).
    pub complex_poles: Vec<ComplexPair>,
    /// Complex zero pairs (f0 in Hz > 0, Q > 0).
    pub complex_zeros: Vec<ComplexPair>,
    /// Differential input resistance, Ω (> 0), or `None` for none (open).
    pub rd: Option<f64>,
    /// Differential input capacitance, F (≥ 0; 0 = none).
    pub cd: f64,
    /// Common-mode input resistance from each input to ground, Ω, or `None`.
    pub rcm: Option<f64>,
    /// Common-mode input capacitance from each input to ground, F (≥ 0).
    pub ccm: f64,
    /// Open-loop output resistance, Ω (≥ 0; 0 = an ideal source).
    pub ro: f64,
    /// Slew rate, V/s (> 0), if given.
    pub slew_rate: Option<f64>,
    /// Output swing, if given.
    pub swing: Option<OutputSwing>,
    /// Input voltage noise density (V/√Hz) and its 1/f corner, if given.
    pub voltage_noise: Option<NoiseDensity>,
    /// Input current noise density of each input (A/√Hz) and its corner, if given.
    pub current_noise: Option<NoiseDensity>,
}

impl Amplifier {
    fn bare(a0: Spread) -> Amplifier {
        Amplifier {
            a0,
            gbw_hz: None,
            dominant_pole_hz: None,
            hold: BandwidthRule::HoldGbw,
            poles_hz: Vec::new(),
            zeros_hz: Vec::new(),
            rhp_zeros_hz: Vec::new(),
            complex_poles: Vec::new(),
            complex_zeros: Vec::new(),
            rd: None,
            cd: 0.0,
            rcm: None,
            ccm: 0.0,
            ro: 0.0,
            slew_rate: None,
            swing: None,
            voltage_noise: None,
            current_noise: None,
        }
    }

    /// An amplifier given by A0 and its gain-bandwidth product, Hz (nothing else
    /// yet: ideal input and output). Not validated until used.
    pub fn from_gbw(a0: Spread, gbw_hz: f64) -> Amplifier {
        Amplifier {
            gbw_hz: Some(gbw_hz),
            ..Amplifier::bare(a0)
        }
    }

    /// An amplifier given by A0 and its dominant pole, Hz.
    pub fn from_dominant_pole(a0: Spread, pole_hz: f64) -> Amplifier {
        Amplifier {
            dominant_pole_hz: Some(pole_hz),
            ..Amplifier::bare(a0)
        }
    }

    /// Add a further real pole, Hz.
    pub fn with_pole(mut self, f_hz: f64) -> Amplifier {
        self.poles_hz.push(f_hz);
        self
    }

    /// Add a complex pole pair at `f_hz` with quality factor `q`.
    pub fn with_complex_pole(mut self, f_hz: f64, q: f64) -> Amplifier {
        self.complex_poles.push(ComplexPair { freq_hz: f_hz, q });
        self
    }

    /// Set the input parts: Rd (`None` = open), Cd, Rcm (`None`), Ccm.
    pub fn with_input(mut self, rd: Option<f64>, cd: f64, rcm: Option<f64>, ccm: f64) -> Amplifier {
        self.rd = rd;
        self.cd = cd;
        self.rcm = rcm;
        self.ccm = ccm;
        self
    }

    /// Set the output resistance, Ω.
    pub fn with_ro(mut self, ro: f64) -> Amplifier {
        self.ro = ro;
        self
    }

    /// Check every figure, naming the field (the document's field names).
    ///
    /// # Errors
    /// `a0` not positive or out of order; neither `gbwHz` nor `dominantPoleHz`
    /// given; either not greater than zero; both given and GBW below A0typ·fp
    /// (param `gbwHz`) or above it (param `dominantPoleHz`) by more than
    /// [`GBW_MATCH_REL`]; a corner frequency not greater than zero (`polesHz`,
    /// `zerosHz`, `rhpZerosHz`, `complexPoles`, `complexZeros`) or a pair's Q
    /// not greater than zero; more than [`MAX_FACTORS`] in a list; `rd`, `rcm`
    /// not greater than zero; `cd`, `ccm`, `ro` below zero; `slewRate` not
    /// greater than zero; `swing` with low ≥ high; a negative noise figure.
    ///
    /// # Example
    /// ```
    /// use loopwright::stage::{Amplifier, Spread};
    /// let a0 = Spread { min: 5e4, typ: 2e5, max: 1e6 };
    /// assert!(Amplifier::from_gbw(a0, 10e6).validate().is_ok());
    /// // A0 = 2e5 with its pole at 100 Hz means GBW = 20 MHz, not 1 MHz.
    /// let mut bad = Amplifier::from_gbw(a0, 1e6);
    /// bad.dominant_pole_hz = Some(100.0);
    /// assert_eq!(bad.validate().unwrap_err().param(), "gbwHz");
    /// let q0 = Amplifier::from_gbw(a0, 10e6).with_complex_pole(30e6, 0.0);
    /// assert_eq!(q0.validate().unwrap_err().param(), "complexPoles");
    /// ```
    pub fn validate(&self) -> Result<()> {
        self.a0.validate_positive("a0")?;
        self.validate_bandwidth()?;
        self.validate_factors()?;
        if let Some(rd) = self.rd {
            check::positive("rd", rd)?;
        }
        if let Some(rcm) = self.rcm {
            check::positive("rcm", rcm)?;
        }
        check::non_negative("cd", self.cd)?;
        check::non_negative("ccm", self.ccm)?;
        check::non_negative("ro", self.ro)?;
        if let Some(sr) = self.slew_rate {
            check::positive("slewRate", sr)?;
        }
        if let Some(s) = self.swing {
            check::finite("swing", s.low_v)?;
            check::finite("swing", s.high_v)?;
            if s.low_v >= s.high_v {
                return Err(Error::OutOfDomain {
                    param: "swing",
                    requirement: "the low limit must be below the high limit",
                });
            }
        }
        if let Some(n) = self.voltage_noise {
            n.validate("voltageNoise")?;
        }
        if let Some(n) = self.current_noise {
            n.validate("currentNoise")?;
        }
        Ok(())
    }

    fn validate_bandwidth(&self) -> Result<()> {
        match (self.gbw_hz, self.dominant_pole_hz) {
            (None, None) => Err(Error::OutOfDomain {
                param: "gbwHz",
                requirement: "give the gain-bandwidth product or the dominant pole (or both)",
            }),
            (Some(g), None) => check::positive("gbwHz", g).map(|_| ()),
            (None, Some(p)) => check::positive("dominantPoleHz", p).map(|_| ()),
            (Some(g), Some(p)) => {
                check::positive("gbwHz", g)?;
                check::positive("dominantPoleHz", p)?;
                let product = check::result("dominantPoleHz", self.a0.typ * p)?;
                if g < product * (1.0 - GBW_MATCH_REL) {
                    Err(Error::OutOfDomain {
                        param: "gbwHz",
                        requirement: "is below typical A0 × the dominant pole: the two figures disagree (a single-pole amplifier has GBW = A0·fp)",
                    })
                } else if g > product * (1.0 + GBW_MATCH_REL) {
                    Err(Error::OutOfDomain {
                        param: "dominantPoleHz",
                        requirement: "times typical A0 is well below the gain-bandwidth product: the two figures disagree (a single-pole amplifier has GBW = A0·fp)",
                    })
                } else {
                    Ok(())
                }
            }
        }
    }

    fn validate_factors(&self) -> Result<()> {
        let lists: [(&[f64], &'static str); 3] = [
            (&self.poles_hz, "polesHz"),
            (&self.zeros_hz, "zerosHz"),
            (&self.rhp_zeros_hz, "rhpZerosHz"),
        ];
        for (list, param) in lists {
            too_many(param, list.len())?;
            for &f in list {
                check::positive(param, f)?;
            }
        }
        for (pairs, param) in [
            (&self.complex_poles, "complexPoles"),
            (&self.complex_zeros, "complexZeros"),
        ] {
            too_many(param, pairs.len())?;
            for p in pairs {
                check::positive(param, p.freq_hz)?;
                check::positive(param, p.q)?;
            }
        }
        Ok(())
    }

    /// The gain-bandwidth product at a spread point, Hz: the given (or derived)
    /// GBW under [`BandwidthRule::HoldGbw`], A0(point)·fp under `HoldPole`.
    ///
    /// # Errors
    /// As [`Amplifier::validate`].
    pub fn gbw_at(&self, point: SpreadPoint) -> Result<f64> {
        self.validate_bandwidth()?;
        self.a0.validate_positive("a0")?;
        let a0 = self.a0.at(point);
        let v = match (self.hold, self.gbw_hz, self.dominant_pole_hz) {
            (BandwidthRule::HoldGbw, Some(g), _) => g,
            (BandwidthRule::HoldGbw, None, Some(p)) => self.a0.typ * p,
            (BandwidthRule::HoldPole, _, Some(p)) => a0 * p,
            (BandwidthRule::HoldPole, Some(g), None) => a0 * g / self.a0.typ,
            (_, None, None) => 0.0,
        };
        check::result("gbwHz", v)
    }

    /// The dominant pole at a spread point, Hz: GBW/A0(point) under
    /// [`BandwidthRule::HoldGbw`], the given (or derived) pole under `HoldPole`.
    ///
    /// # Errors
    /// As [`Amplifier::validate`].
    ///
    /// # Example
    /// ```
    /// use loopwright::stage::{Amplifier, BandwidthRule, Spread, SpreadPoint};
    /// let mut a = Amplifier::from_gbw(Spread { min: 5e4, typ: 2e5, max: 1e6 }, 10e6);
    /// assert_eq!(a.dominant_pole_at(SpreadPoint::Min).unwrap(), 200.0); // 10 MHz / 5e4
    /// a.hold = BandwidthRule::HoldPole;
    /// assert_eq!(a.dominant_pole_at(SpreadPoint::Min).unwrap(), 50.0);  // 10 MHz / 2e5
    /// ```
    pub fn dominant_pole_at(&self, point: SpreadPoint) -> Result<f64> {
        let gbw = self.gbw_at(point)?;
        check::result("dominantPoleHz", gbw / self.a0.at(point))
    }

    /// The open-loop gain A(j·2π·f) at a spread point, V/V, evaluated directly as
    /// the product of the module's factors.
    ///
    /// # Errors
    /// As [`Amplifier::validate`]; `frequency` negative or not finite; an
    /// overflowing result.
    ///
    /// # Example
    /// ```
    /// use loopwright::stage::{Amplifier, Spread, SpreadPoint};
    /// // A0 = 1e5, GBW = 1 MHz: the dominant pole at 10 Hz, −45° there.
    /// let a = Amplifier::from_gbw(Spread::fixed(1e5), 1e6);
    /// let g = a.open_loop_gain(10.0, SpreadPoint::Typ).unwrap();
    /// assert!((g.norm() - 1e5 / 2f64.sqrt()).abs() < 1e-6);
    /// assert!((g.arg().to_degrees() + 45.0).abs() < 1e-12);
    /// assert_eq!(a.open_loop_gain(-1.0, SpreadPoint::Typ).unwrap_err().param(), "frequency");
    /// ```
    pub fn open_loop_gain(&self, f_hz: f64, point: SpreadPoint) -> Result<Complex64> {
        self.validate()?;
        check::non_negative("frequency", f_hz)?;
        let fp = self.dominant_pole_at(point)?;
        let g = self.a0.at(point) * self.further_factors(f_hz) / pole(f_hz, fp);
        check::result_complex("openLoopGain", g)
    }

    /// The product of the factors after A0 and the dominant pole at `f_hz`
    /// (validated by the caller).
    pub(crate) fn further_factors(&self, f_hz: f64) -> Complex64 {
        let one = Complex64::new(1.0, 0.0);
        let mut h = one;
        for &fk in &self.poles_hz {
            h /= pole(f_hz, fk);
        }
        for &fz in &self.zeros_hz {
            h *= pole(f_hz, fz);
        }
        for &fr in &self.rhp_zeros_hz {
            h *= Complex64::new(1.0, -f_hz / fr);
        }
        for p in &self.complex_poles {
            h /= pair(f_hz, p);
        }
        for p in &self.complex_zeros {
            h *= pair(f_hz, p);
        }
        h
    }

    /// The open-loop gain as a pole-list model of [`crate::freq`] at a spread
    /// point (the dominant pole first), for the pole-list analyses.
    ///
    /// # Errors
    /// As [`Amplifier::validate`].
    pub fn transfer_model(&self, point: SpreadPoint) -> Result<TransferModel> {
        self.validate()?;
        let mut poles_hz = Vec::with_capacity(self.poles_hz.len() + 1);
        poles_hz.push(self.dominant_pole_at(point)?);
        poles_hz.extend_from_slice(&self.poles_hz);
        Ok(TransferModel {
            gain: self.a0.at(point),
            poles_hz,
            zeros_hz: self.zeros_hz.clone(),
            rhp_zeros_hz: self.rhp_zeros_hz.clone(),
            complex_poles: self.complex_poles.clone(),
            complex_zeros: self.complex_zeros.clone(),
            ..TransferModel::default()
        })
    }
}

/// 1 + j·f/fc.
fn pole(f_hz: f64, fc: f64) -> Complex64 {
    Complex64::new(1.0, f_hz / fc)
}

/// 1 + s/(Q·ω0) + s²/ω0² at s = j·2π·f: 1 − (f/f0)² + j·f/(Q·f0).
fn pair(f_hz: f64, p: &ComplexPair) -> Complex64 {
    let x = f_hz / p.freq_hz;
    Complex64::new(1.0 - x * x, x / p.q)
}

fn too_many(param: &'static str, n: usize) -> Result<()> {
    if n > MAX_FACTORS {
        Err(Error::TooLarge {
            param,
            limit: MAX_FACTORS as u64,
        })
    } else {
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn a0() -> Spread {
        Spread {
            min: 5e4,
            typ: 2e5,
            max: 1e6,
        }
    }

    #[test]
    fn gbw_is_held_across_the_spread_by_default() {
        // Definition of the rule (module docs): fp = GBW/A0 at each point.
        let a = Amplifier::from_gbw(a0(), 8e6);
        for p in SpreadPoint::ALL {
            let fp = a.dominant_pole_at(p).unwrap();
            assert!((fp * a0().at(p) - 8e6).abs() < 1e-6);
            // Well above the dominant pole |A| ≈ GBW/f at every point.
            let g = a.open_loop_gain(1e5, p).unwrap();
            assert!((g.norm() * 1e5 / 8e6 - 1.0).abs() < 1e-4, "{p:?}");
        }
        let mut held = a.clone();
        held.hold = BandwidthRule::HoldPole;
        assert_eq!(held.dominant_pole_at(SpreadPoint::Max).unwrap(), 40.0);
        assert_eq!(held.gbw_at(SpreadPoint::Max).unwrap(), 4e7);
    }

    #[test]
    fn direct_product_matches_the_pole_list_model() {
        // Two routes to the same product: the freq area's evaluation of the
        // TransferModel (its own factor code) and the direct product here.
        let mut a = Amplifier::from_gbw(a0(), 10e6)
            .with_pole(20e6)
            .with_complex_pole(60e6, 0.8);
        a.zeros_hz.push(90e6);
        a.rhp_zeros_hz.push(300e6);
        a.complex_zeros.push(ComplexPair {
            freq_hz: 150e6,
            q: 2.0,
        });
        let l = crate::freq::FeedbackLoop::with_constant_beta(
            a.transfer_model(SpreadPoint::Min).unwrap(),
            1.0,
        )
        .unwrap();
        for f in [1.0, 1e3, 1e6, 3e7, 6e7, 2e8] {
            let direct = a.open_loop_gain(f, SpreadPoint::Min).unwrap();
            let model = crate::freq::loop_gain_at(&l, f).unwrap();
            assert!((direct - model).norm() <= 1e-12 * model.norm(), "{f}");
        }
    }

    #[test]
    fn bad_figures_name_the_field() {
        let e = |a: Amplifier| a.validate().unwrap_err().param();
        assert_eq!(e(Amplifier::bare(a0())), "gbwHz");
        assert_eq!(e(Amplifier::from_gbw(a0(), -1.0)), "gbwHz");
        assert_eq!(
            e(Amplifier::from_dominant_pole(a0(), 0.0)),
            "dominantPoleHz"
        );
        let mut both = Amplifier::from_gbw(a0(), 1e7);
        both.dominant_pole_hz = Some(50.0); // 2e5·50 = 1e7: agree
        assert!(both.validate().is_ok());
        both.dominant_pole_hz = Some(5.0); // 1e6 ≪ 1e7
        assert_eq!(e(both.clone()), "dominantPoleHz");
        both.dominant_pole_hz = Some(500.0); // 1e8 ≫ 1e7
        assert_eq!(e(both), "gbwHz");
        assert_eq!(e(Amplifier::from_gbw(a0(), 1e7).with_pole(-3.0)), "polesHz");
        assert_eq!(
            e(Amplifier::from_gbw(a0(), 1e7).with_complex_pole(1e7, -1.0)),
            "complexPoles"
        );
        assert_eq!(
            e(Amplifier::from_gbw(a0(), 1e7).with_input(Some(0.0), 0.0, None, 0.0)),
            "rd"
        );
        assert_eq!(e(Amplifier::from_gbw(a0(), 1e7).with_ro(-1.0)), "ro");
        let mut s = Amplifier::from_gbw(a0(), 1e7);
        s.swing = Some(OutputSwing {
            low_v: 5.0,
            high_v: -5.0,
        });
        assert_eq!(e(s), "swing");
        let mut n = Amplifier::from_gbw(a0(), 1e7);
        n.voltage_noise = Some(NoiseDensity {
            density: -1e-9,
            corner_hz: 10.0,
        });
        assert_eq!(e(n), "voltageNoise");
        let mut many = Amplifier::from_gbw(a0(), 1e7);
        many.poles_hz = alloc::vec![1e8; MAX_FACTORS + 1];
        assert_eq!(many.validate().unwrap_err().code(), "too_large");
    }
}
