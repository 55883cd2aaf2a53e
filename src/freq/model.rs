//! The open-loop model A(s) and the feedback model β(s), and the loop they form.
//!
//! A [`TransferModel`] is a gain times factors, each normalised so that the gain
//! keeps its plain meaning (with s = j·2π·f):
//!
//! | factor | in the model | form |
//! |---|---|---|
//! | real pole at fp (left half plane) | `poles_hz` | 1 / (1 + s/ωp) |
//! | real zero at fz (left half plane) | `zeros_hz` | (1 + s/ωz) |
//! | right-half-plane zero at fz | `rhp_zeros_hz` | (1 − s/ωz) |
//! | right-half-plane pole at fp | `rhp_poles_hz` | 1 / (1 − s/ωp) |
//! | complex pole pair (f0, Q) | `complex_poles` | 1 / (1 + s/(Q·ω0) + s²/ω0²) |
//! | complex zero pair (f0, Q) | `complex_zeros` | (1 + s/(Q·ω0) + s²/ω0²) |
//! | pole at the origin (integrator) | `origin_poles` | ω1 / s, ω1 = 2π·1 Hz |
//! | low-frequency cut (coupling capacitor) at fL | `low_cuts_hz` | s / (s + ωL) |
//! | pure time delay τ | `delay_s` | exp(−s·τ) |
//!
//! So `gain` is the DC gain when there are no integrators and no low cuts, the
//! midband gain AM when there are low cuts, and the magnitude of the integrator
//! part at 1 Hz when there are integrators. Its sign is kept: a negative gain is a
//! phase of −180°.
//!
//! The loop gain is T(s) = A(s)·β(s); the closed-loop gain Af(s) = A(s)/(1 + T(s)).
//! Sweeps use the delay exactly; the closed-loop poles and the step response use a
//! Padé approximant of the delay of [`FeedbackLoop::pade_order`] (default
//! [`DEFAULT_PADE_ORDER`]).
//!
//! Source: the factor forms are the standard Bode forms, e.g. Franklin, Powell &
//! Emami-Naeini, *Feedback Control of Dynamic Systems*, 7th ed., ch. 6 (from memory).

use super::eval::FastModel;
use crate::check;
use crate::error::{Error, Result};
use alloc::vec::Vec;

/// Most factors of one kind in one model.
pub const MAX_FACTORS: usize = 32;
/// Highest order of the characteristic polynomial (poles of A, of β and of the
/// Padé approximant together).
pub const MAX_ORDER: usize = 64;
/// Highest Padé order for a delay.
pub const MAX_PADE_ORDER: u32 = 10;
/// Padé order used for a delay unless another is chosen.
pub const DEFAULT_PADE_ORDER: u32 = 6;
/// Most integrators in one model.
pub const MAX_ORIGIN_POLES: u32 = 4;

/// A complex pole or zero pair given by its natural frequency and its Q.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct ComplexPair {
    /// Natural (undamped) frequency f0, Hz, > 0.
    pub freq_hz: f64,
    /// Quality factor Q = 1/(2ζ), > 0.
    pub q: f64,
}

/// A gain with poles, zeros, integrators, low cuts and a delay: an open-loop
/// amplifier A(s) or a feedback network β(s). See the module docs for the forms.
#[derive(Debug, Clone, PartialEq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct TransferModel {
    /// DC (or midband, or 1 Hz integrator) gain, nonzero, in the model's unit.
    pub gain: f64,
    /// Real left-half-plane poles, Hz, each > 0.
    pub poles_hz: Vec<f64>,
    /// Real left-half-plane zeros, Hz, each > 0.
    pub zeros_hz: Vec<f64>,
    /// Right-half-plane zeros, Hz, each > 0.
    pub rhp_zeros_hz: Vec<f64>,
    /// Right-half-plane poles (an open-loop unstable amplifier), Hz, each > 0.
    pub rhp_poles_hz: Vec<f64>,
    /// Complex pole pairs in the left half plane.
    pub complex_poles: Vec<ComplexPair>,
    /// Complex zero pairs in the left half plane.
    pub complex_zeros: Vec<ComplexPair>,
    /// Number of poles at the origin (integrators), at most [`MAX_ORIGIN_POLES`].
    pub origin_poles: u32,
    /// Low-frequency cut-offs s/(s + ωL) (a zero at the origin and a pole at fL), Hz.
    pub low_cuts_hz: Vec<f64>,
    /// Pure time delay, s, ≥ 0.
    pub delay_s: f64,
}

impl TransferModel {
    /// A frequency-independent gain (a resistive β, say).
    pub fn constant(gain: f64) -> Self {
        TransferModel {
            gain,
            ..Default::default()
        }
    }
    /// Add a real left-half-plane pole at `f_hz`.
    pub fn pole(mut self, f_hz: f64) -> Self {
        self.poles_hz.push(f_hz);
        self
    }
    /// Add a real left-half-plane zero at `f_hz`.
    pub fn zero(mut self, f_hz: f64) -> Self {
        self.zeros_hz.push(f_hz);
        self
    }
    /// Add a right-half-plane zero at `f_hz`.
    pub fn rhp_zero(mut self, f_hz: f64) -> Self {
        self.rhp_zeros_hz.push(f_hz);
        self
    }
    /// Add a right-half-plane pole at `f_hz`.
    pub fn rhp_pole(mut self, f_hz: f64) -> Self {
        self.rhp_poles_hz.push(f_hz);
        self
    }
    /// Add a complex pole pair at natural frequency `f_hz` with quality factor `q`.
    pub fn complex_pole(mut self, f_hz: f64, q: f64) -> Self {
        self.complex_poles.push(ComplexPair { freq_hz: f_hz, q });
        self
    }
    /// Add a complex zero pair at natural frequency `f_hz` with quality factor `q`.
    pub fn complex_zero(mut self, f_hz: f64, q: f64) -> Self {
        self.complex_zeros.push(ComplexPair { freq_hz: f_hz, q });
        self
    }
    /// Add a pole at the origin (an integrator, ω1/s with ω1 = 2π·1 Hz).
    pub fn integrator(mut self) -> Self {
        self.origin_poles += 1;
        self
    }
    /// Add a low-frequency cut s/(s + ωL) at `f_hz`.
    pub fn low_cut(mut self, f_hz: f64) -> Self {
        self.low_cuts_hz.push(f_hz);
        self
    }
    /// Set the pure time delay, s.
    pub fn delay(mut self, seconds: f64) -> Self {
        self.delay_s = seconds;
        self
    }

    /// Number of poles (finite and at the origin), counting a pair as two and a
    /// low cut as one.
    pub fn pole_count(&self) -> usize {
        self.poles_hz.len()
            + self.rhp_poles_hz.len()
            + 2 * self.complex_poles.len()
            + self.origin_poles as usize
            + self.low_cuts_hz.len()
    }

    /// Number of zeros (finite and at the origin), counting a pair as two and a
    /// low cut as one.
    pub fn zero_count(&self) -> usize {
        self.zeros_hz.len()
            + self.rhp_zeros_hz.len()
            + 2 * self.complex_zeros.len()
            + self.low_cuts_hz.len()
    }

    /// True when there is nothing but the gain.
    pub fn is_constant(&self) -> bool {
        self.pole_count() == 0 && self.zero_count() == 0 && self.delay_s == 0.0
    }

    /// Every corner frequency of the model in Hz (poles, zeros, pair frequencies,
    /// low cuts, and 1/(2πτ) for a delay).
    pub(crate) fn corners_hz(&self, out: &mut Vec<f64>) {
        out.extend_from_slice(&self.poles_hz);
        out.extend_from_slice(&self.zeros_hz);
        out.extend_from_slice(&self.rhp_zeros_hz);
        out.extend_from_slice(&self.rhp_poles_hz);
        out.extend(self.complex_poles.iter().map(|p| p.freq_hz));
        out.extend(self.complex_zeros.iter().map(|p| p.freq_hz));
        out.extend_from_slice(&self.low_cuts_hz);
        if self.delay_s > 0.0 {
            out.push(1.0 / (core::f64::consts::TAU * self.delay_s));
        }
    }

    fn validate(&self, role: Role) -> Result<()> {
        check::nonzero(role.name(Field::Gain), self.gain)?;
        let lists: [(&[f64], Field); 5] = [
            (&self.poles_hz, Field::Poles),
            (&self.zeros_hz, Field::Zeros),
            (&self.rhp_zeros_hz, Field::RhpZeros),
            (&self.rhp_poles_hz, Field::RhpPoles),
            (&self.low_cuts_hz, Field::LowCuts),
        ];
        for (list, field) in lists {
            let param = role.name(field);
            too_many(param, list.len())?;
            for &f in list {
                corner(param, f)?;
            }
        }
        for (pairs, field) in [
            (&self.complex_poles, Field::ComplexPoles),
            (&self.complex_zeros, Field::ComplexZeros),
        ] {
            let param = role.name(field);
            too_many(param, pairs.len())?;
            for p in pairs {
                corner(param, p.freq_hz)?;
                let q = check::positive(param, p.q)?;
                if !(MIN_Q..=MAX_Q).contains(&q) {
                    return Err(Error::OutOfDomain {
                        param,
                        requirement: "Q must be between 1e-6 and 1e6",
                    });
                }
            }
        }
        if self.origin_poles > MAX_ORIGIN_POLES {
            return Err(Error::TooLarge {
                param: role.name(Field::OriginPoles),
                limit: MAX_ORIGIN_POLES as u64,
            });
        }
        let delay = check::non_negative(role.name(Field::Delay), self.delay_s)?;
        if delay > 0.0 && !(MIN_HZ..=MAX_HZ).contains(&(1.0 / delay)) {
            return Err(Error::OutOfDomain {
                param: role.name(Field::Delay),
                requirement: "must be 0, or between 1e-12 s and 1e9 s",
            });
        }
        Ok(())
    }
}

/// Lowest corner frequency accepted, Hz.
pub const MIN_HZ: f64 = 1e-9;
/// Highest corner frequency accepted, Hz.
pub const MAX_HZ: f64 = 1e12;
const MIN_Q: f64 = 1e-6;
const MAX_Q: f64 = 1e6;

fn corner(param: &'static str, f: f64) -> Result<f64> {
    let f = check::positive(param, f)?;
    if (MIN_HZ..=MAX_HZ).contains(&f) {
        Ok(f)
    } else {
        Err(Error::OutOfDomain {
            param,
            requirement: "each frequency must be between 1e-9 Hz and 1e12 Hz",
        })
    }
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

#[derive(Clone, Copy)]
enum Role {
    A,
    Beta,
}

#[derive(Clone, Copy)]
enum Field {
    Gain,
    Poles,
    Zeros,
    RhpZeros,
    RhpPoles,
    ComplexPoles,
    ComplexZeros,
    OriginPoles,
    LowCuts,
    Delay,
}

impl Role {
    /// The parameter name of a field of this model, as errors spell it.
    fn name(self, field: Field) -> &'static str {
        match (self, field) {
            (Role::A, Field::Gain) => "a.gain",
            (Role::A, Field::Poles) => "a.poles_hz",
            (Role::A, Field::Zeros) => "a.zeros_hz",
            (Role::A, Field::RhpZeros) => "a.rhp_zeros_hz",
            (Role::A, Field::RhpPoles) => "a.rhp_poles_hz",
            (Role::A, Field::ComplexPoles) => "a.complex_poles",
            (Role::A, Field::ComplexZeros) => "a.complex_zeros",
            (Role::A, Field::OriginPoles) => "a.origin_poles",
            (Role::A, Field::LowCuts) => "a.low_cuts_hz",
            (Role::A, Field::Delay) => "a.delay_s",
            (Role::Beta, Field::Gain) => "beta.gain",
            (Role::Beta, Field::Poles) => "beta.poles_hz",
            (Role::Beta, Field::Zeros) => "beta.zeros_hz",
            (Role::Beta, Field::RhpZeros) => "beta.rhp_zeros_hz",
            (Role::Beta, Field::RhpPoles) => "beta.rhp_poles_hz",
            (Role::Beta, Field::ComplexPoles) => "beta.complex_poles",
            (Role::Beta, Field::ComplexZeros) => "beta.complex_zeros",
            (Role::Beta, Field::OriginPoles) => "beta.origin_poles",
            (Role::Beta, Field::LowCuts) => "beta.low_cuts_hz",
            (Role::Beta, Field::Delay) => "beta.delay_s",
        }
    }
}

/// A validated feedback loop: the open-loop amplifier A(s), the feedback network
/// β(s) and the Padé order used for a delay in pole computations.
///
/// Every analysis in [`crate::freq`] takes a `FeedbackLoop`, so the checks run once.
#[derive(Debug, Clone, PartialEq)]
pub struct FeedbackLoop {
    a: TransferModel,
    beta: TransferModel,
    pade_order: u32,
    /// A·β prepared for fast evaluation.
    fast_loop: FastModel,
    /// A alone prepared for fast evaluation.
    fast_amp: FastModel,
}

impl FeedbackLoop {
    /// A loop from the amplifier `a` and the feedback network `beta`, with the
    /// default Padé order.
    ///
    /// # Errors
    /// Each field is checked and a failure names it (`a.poles_hz`, `beta.gain`, …):
    /// a gain zero or not finite; a pole or zero frequency not in 1e-9…1e12 Hz (an
    /// explicit pole at the origin is `origin_poles`); Q not in 1e-6…1e6; more than
    /// [`MAX_FACTORS`] factors of a kind or [`MAX_ORIGIN_POLES`] integrators; a
    /// negative delay. `beta.origin_poles` must be 0. The loop must be proper:
    /// A alone and A·β together may not have more zeros than poles (`a.zeros_hz` or
    /// `beta.zeros_hz` named); the characteristic polynomial may not exceed
    /// [`MAX_ORDER`] (`beta` named, [`Error::TooLarge`]).
    ///
    /// # Example
    /// ```
    /// use loopwright::freq::{FeedbackLoop, TransferModel};
    /// let a = TransferModel::constant(1e5).pole(10.0).pole(1e6);
    /// assert!(FeedbackLoop::new(a.clone(), TransferModel::constant(0.1)).is_ok());
    /// let bad = a.clone().pole(-5.0);
    /// assert_eq!(FeedbackLoop::new(bad, TransferModel::constant(0.1)).unwrap_err().param(), "a.poles_hz");
    /// ```
    pub fn new(a: TransferModel, beta: TransferModel) -> Result<Self> {
        Self::with_pade_order(a, beta, DEFAULT_PADE_ORDER)
    }

    /// As [`FeedbackLoop::new`] with a chosen Padé order (1…[`MAX_PADE_ORDER`]) for
    /// the delay in pole and step computations.
    ///
    /// # Errors
    /// As [`FeedbackLoop::new`], and `pade_order` outside 1…10.
    ///
    /// # Example
    /// ```
    /// use loopwright::freq::{FeedbackLoop, TransferModel};
    /// let a = TransferModel::constant(1e3).pole(1e3).delay(1e-6);
    /// let b = TransferModel::constant(0.1);
    /// assert_eq!(FeedbackLoop::with_pade_order(a.clone(), b.clone(), 8).unwrap().pade_order(), 8);
    /// assert_eq!(FeedbackLoop::with_pade_order(a, b, 11).unwrap_err().param(), "pade_order");
    /// ```
    pub fn with_pade_order(a: TransferModel, beta: TransferModel, pade_order: u32) -> Result<Self> {
        a.validate(Role::A)?;
        beta.validate(Role::Beta)?;
        if pade_order == 0 || pade_order > MAX_PADE_ORDER {
            return Err(Error::OutOfDomain {
                param: "pade_order",
                requirement: "must be between 1 and 10",
            });
        }
        if beta.origin_poles > 0 {
            return Err(Error::OutOfDomain {
                param: "beta.origin_poles",
                requirement:
                    "must be 0: a feedback network with an integrator has no closed-loop gain at DC",
            });
        }
        if a.zero_count() > a.pole_count() {
            return Err(Error::OutOfDomain {
                param: "a.zeros_hz",
                requirement: "the amplifier may not have more zeros than poles (the response would be improper)",
            });
        }
        if a.zero_count() + beta.zero_count() > a.pole_count() + beta.pole_count() {
            return Err(Error::OutOfDomain {
                param: "beta.zeros_hz",
                requirement: "the loop gain A·β may not have more zeros than poles (the response would be improper)",
            });
        }
        let delays = u32::from(a.delay_s > 0.0) + u32::from(beta.delay_s > 0.0);
        let order = a.pole_count().max(a.zero_count())
            + beta.pole_count().max(beta.zero_count())
            + (delays * pade_order) as usize;
        if order > MAX_ORDER {
            return Err(Error::TooLarge {
                param: "beta",
                limit: MAX_ORDER as u64,
            });
        }
        let fast_loop = FastModel::new(&[&a, &beta]);
        let fast_amp = FastModel::new(&[&a]);
        Ok(FeedbackLoop {
            a,
            beta,
            pade_order,
            fast_loop,
            fast_amp,
        })
    }

    /// A loop with a frequency-independent β.
    ///
    /// # Errors
    /// As [`FeedbackLoop::new`].
    pub fn with_constant_beta(a: TransferModel, beta: f64) -> Result<Self> {
        Self::new(a, TransferModel::constant(beta))
    }

    /// The open-loop amplifier model.
    pub fn amplifier(&self) -> &TransferModel {
        &self.a
    }
    /// The feedback network model.
    pub fn feedback(&self) -> &TransferModel {
        &self.beta
    }
    /// The Padé order used for a delay in pole computations.
    pub fn pade_order(&self) -> u32 {
        self.pade_order
    }
    pub(crate) fn fast_loop(&self) -> &FastModel {
        &self.fast_loop
    }
    pub(crate) fn fast_amp(&self) -> &FastModel {
        &self.fast_amp
    }

    /// True when the loop gain A·β has a pole in the right half plane, so the
    /// Bode reading of the margins does not apply.
    pub fn open_loop_unstable(&self) -> bool {
        !self.a.rhp_poles_hz.is_empty() || !self.beta.rhp_poles_hz.is_empty()
    }

    /// Every corner frequency of A and β, Hz, sorted; when there is none, the
    /// frequency where the integrators alone reach |T| = 1, or 1 Hz.
    pub(crate) fn corners_hz(&self) -> Vec<f64> {
        let mut c = Vec::new();
        self.a.corners_hz(&mut c);
        self.beta.corners_hz(&mut c);
        crate::sort::sort_by(&mut c, f64::total_cmp);
        c
    }

    /// Net number of integrators minus low cuts (the log-log slope of |T| at very
    /// low frequency is −this).
    pub(crate) fn low_frequency_order(&self) -> i64 {
        (self.a.origin_poles + self.beta.origin_poles) as i64
            - (self.a.low_cuts_hz.len() + self.beta.low_cuts_hz.len()) as i64
    }

    /// Relative degree of T (poles minus zeros): |T| falls as f^−this at very high
    /// frequency.
    pub(crate) fn relative_degree(&self) -> i64 {
        (self.a.pole_count() + self.beta.pole_count()) as i64
            - (self.a.zero_count() + self.beta.zero_count()) as i64
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn a() -> TransferModel {
        TransferModel::constant(1e5).pole(10.0).pole(1e6)
    }

    #[test]
    fn builder_counts_factors() {
        let m = a()
            .zero(1e7)
            .complex_pole(1e7, 0.7)
            .integrator()
            .low_cut(1.0)
            .rhp_zero(1e8);
        assert_eq!(m.pole_count(), 2 + 2 + 1 + 1);
        assert_eq!(m.zero_count(), 1 + 1 + 1);
        assert!(!m.is_constant());
        assert!(TransferModel::constant(0.1).is_constant());
    }

    #[test]
    fn rejects_bad_fields_by_name() {
        let b = TransferModel::constant(0.1);
        let e = |m: TransferModel| FeedbackLoop::new(m, b.clone()).unwrap_err();
        assert_eq!(e(a().pole(0.0)).param(), "a.poles_hz");
        assert_eq!(e(a().complex_pole(1e3, 0.0)).param(), "a.complex_poles");
        assert_eq!(e(a().complex_pole(1e3, -1.0)).code(), "out_of_domain");
        assert_eq!(e(a().zero(f64::NAN)).code(), "not_finite");
        assert_eq!(e(a().delay(-1e-9)).param(), "a.delay_s");
        assert_eq!(e(TransferModel::constant(0.0)).param(), "a.gain");
        assert_eq!(e(a().zero(1.0).zero(2.0).zero(3.0)).param(), "a.zeros_hz");
        let many = (0..33).fold(TransferModel::constant(1.0), |m, i| m.pole(1.0 + i as f64));
        assert_eq!(e(many).code(), "too_large");
        assert_eq!(
            FeedbackLoop::new(a(), TransferModel::constant(0.0))
                .unwrap_err()
                .param(),
            "beta.gain"
        );
        assert_eq!(
            FeedbackLoop::new(
                a(),
                TransferModel::constant(0.1).zero(1.0).zero(2.0).zero(3.0)
            )
            .unwrap_err()
            .param(),
            "beta.zeros_hz"
        );
        assert_eq!(
            FeedbackLoop::new(a(), TransferModel::constant(0.1).integrator())
                .unwrap_err()
                .param(),
            "beta.origin_poles"
        );
        assert_eq!(
            FeedbackLoop::with_pade_order(a(), b, 0)
                .unwrap_err()
                .param(),
            "pade_order"
        );
    }

    #[test]
    fn a_zero_in_beta_is_fine_while_the_loop_stays_proper() {
        // A feedback capacitor's zero: β = 0.1·(1 + s/ωz), with a two-pole A.
        let l = FeedbackLoop::new(a(), TransferModel::constant(0.1).zero(1e5)).unwrap();
        assert_eq!(l.relative_degree(), 1);
    }
}
