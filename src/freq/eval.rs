//! Fast evaluation of a model (or of A·β) at one frequency, for sweeps and
//! searches.
//!
//! The per-factor form of [`super::response`] (one log and one arctangent per
//! factor) is exact but slow. Here the factors are multiplied as complex numbers,
//! zeros into a numerator and poles into a denominator — a factor (1 + j·x) costs
//! two multiplications — with the running products rescaled by powers of two so
//! that they never overflow; one log and one atan2 at the end give |H| and the
//! phase modulo 360°. The number of whole turns comes from a cheap sum of
//! approximate arctangents (error ≤ [`ATAN_ERR`] rad per factor, far below half
//! a turn for the most factors a model may hold), so the phase is continuous and
//! as accurate as the per-factor sum. Tests compare both forms.
//!
//! Source: the arctangent approximation π/4·x − x·(x − 1)·(0.2447 + 0.0663·x) on
//! [0, 1] is from S. Rajan, S. Wang, R. Inkol & A. Joyal, "Efficient
//! approximations for the arctangent function", IEEE Signal Processing Magazine,
//! May 2006 (from memory).

use super::model::TransferModel;
use alloc::vec::Vec;
use core::f64::consts::{FRAC_PI_2, FRAC_PI_4, LN_2, PI, TAU};

/// Largest error of [`atan_approx`], rad (measured 0.00151 on a dense grid).
pub(crate) const ATAN_ERR: f64 = 0.0016;
// The turn count is right while the summed approximation error stays below half
// a turn: A and β together hold at most 2·7·MAX_FACTORS factors (five first-order
// kinds, low cuts, pairs).
const _: () = assert!(ATAN_ERR * ((2 * 7 * super::model::MAX_FACTORS) as f64) < PI);

/// Rescale the running products when their 1-norm leaves [2^−400, 2^400].
const BIG: f64 = 2.582_249_878_086_908_6e120; // 2^400
const SMALL: f64 = 3.872_591_914_849_318e-121; // 2^−400
const LN_BIG: f64 = 400.0 * LN_2;

/// Nearest whole number of a turn count (|x| far below 2^53; saturating beyond),
/// by a float-to-integer conversion, which is one instruction in wasm.
#[inline]
fn nearest(x: f64) -> f64 {
    (if x >= 0.0 {
        (x + 0.5) as i64
    } else {
        (x - 0.5) as i64
    }) as f64
}

/// Arctangent of x ≥ 0 to within [`ATAN_ERR`].
fn atan_approx(x: f64) -> f64 {
    if x <= 1.0 {
        FRAC_PI_4 * x - x * (x - 1.0) * (0.2447 + 0.0663 * x)
    } else {
        let y = 1.0 / x;
        FRAC_PI_2 - (FRAC_PI_4 * y - y * (y - 1.0) * (0.2447 + 0.0663 * y))
    }
}

/// atan2(y, x) for y ≥ 0, in [0, π], to within [`ATAN_ERR`].
fn atan2_upper(y: f64, x: f64) -> f64 {
    if x > 0.0 {
        atan_approx(y / x)
    } else if x < 0.0 {
        PI - atan_approx(y / -x)
    } else {
        FRAC_PI_2
    }
}

/// A running complex product with a separate natural-log scale.
#[derive(Clone, Copy)]
struct Product {
    re: f64,
    im: f64,
    ln_scale: f64,
}

impl Product {
    const ONE: Product = Product {
        re: 1.0,
        im: 0.0,
        ln_scale: 0.0,
    };

    /// Multiply by (1 + j·x).
    #[inline]
    fn first(&mut self, x: f64) {
        let re = self.re - x * self.im;
        self.im += x * self.re;
        self.re = re;
        self.rescale();
    }

    /// Multiply by (a + j·b).
    #[inline]
    fn by(&mut self, a: f64, b: f64) {
        let re = self.re * a - self.im * b;
        self.im = self.re * b + self.im * a;
        self.re = re;
        self.rescale();
    }

    #[inline]
    fn rescale(&mut self) {
        let n = libm::fabs(self.re) + libm::fabs(self.im);
        if n > BIG {
            self.re *= SMALL;
            self.im *= SMALL;
            self.ln_scale += LN_BIG;
        } else if n < SMALL && n > 0.0 {
            self.re *= BIG;
            self.im *= BIG;
            self.ln_scale -= LN_BIG;
        }
    }
}

/// A model, or a product of models, prepared for fast evaluation.
#[derive(Debug, Clone, PartialEq, Default)]
pub(crate) struct FastModel {
    /// ln|gain product|.
    ln_gain: f64,
    /// Constant phase: −π per negative gain, −π/2 per integrator, +π/2 per low cut.
    phase0: f64,
    /// Net integrators (their magnitude is f^−k with f in Hz).
    origin: f64,
    /// Total delay, s.
    delay: f64,
    /// 1/f of LHP zeros (+1) and RHP zeros (−1): factor (1 ± j·f/fz), with the sign.
    zeros: Vec<(f64, f64)>,
    /// 1/f of LHP poles (+1) and RHP poles (−1), and of low cuts (+1).
    poles: Vec<(f64, f64)>,
    /// Low cuts: 1/fL (the j·x part; their (1 + j·x) is in `poles`).
    cuts: Vec<f64>,
    /// Complex zero pairs: (1/f0, 1/Q).
    pair_zeros: Vec<(f64, f64)>,
    /// Complex pole pairs: (1/f0, 1/Q).
    pair_poles: Vec<(f64, f64)>,
}

impl FastModel {
    pub(crate) fn new(models: &[&TransferModel]) -> FastModel {
        let mut m = FastModel::default();
        for t in models {
            m.ln_gain += libm::log(libm::fabs(t.gain));
            if t.gain < 0.0 {
                m.phase0 -= PI;
            }
            m.origin += f64::from(t.origin_poles);
            m.phase0 -= FRAC_PI_2 * f64::from(t.origin_poles);
            m.delay += t.delay_s;
            m.zeros.extend(t.zeros_hz.iter().map(|f| (1.0 / f, 1.0)));
            m.zeros
                .extend(t.rhp_zeros_hz.iter().map(|f| (1.0 / f, -1.0)));
            m.poles.extend(t.poles_hz.iter().map(|f| (1.0 / f, 1.0)));
            m.poles
                .extend(t.rhp_poles_hz.iter().map(|f| (1.0 / f, -1.0)));
            m.poles.extend(t.low_cuts_hz.iter().map(|f| (1.0 / f, 1.0)));
            m.cuts.extend(t.low_cuts_hz.iter().map(|f| 1.0 / f));
            m.phase0 += FRAC_PI_2 * t.low_cuts_hz.len() as f64;
            m.pair_zeros
                .extend(t.complex_zeros.iter().map(|p| (1.0 / p.freq_hz, 1.0 / p.q)));
            m.pair_poles
                .extend(t.complex_poles.iter().map(|p| (1.0 / p.freq_hz, 1.0 / p.q)));
        }
        m
    }

    /// ln|H(j2πf)| and the continuous phase in radians, f > 0.
    pub(crate) fn eval(&self, f: f64) -> (f64, f64) {
        let (ln_mag, principal, est) = self.product::<true>(f);
        let turns = nearest((est - principal) / TAU);
        (
            ln_mag,
            principal + TAU * turns + self.phase0 - TAU * f * self.delay,
        )
    }

    /// ln|H|, the principal phase of the factor product, and (when `EST`) the
    /// approximate continuous phase of the factors.
    #[inline]
    fn product<const EST: bool>(&self, f: f64) -> (f64, f64, f64) {
        let mut num = Product::ONE;
        let mut den = Product::ONE;
        let mut est = 0.0;
        for &(r, s) in &self.zeros {
            let x = f * r;
            num.first(s * x);
            if EST {
                est += s * atan_approx(x);
            }
        }
        for &(r, s) in &self.poles {
            let x = f * r;
            den.first(s * x);
            if EST {
                est -= s * atan_approx(x);
            }
        }
        let mut cut_product = 1.0;
        for &r in &self.cuts {
            cut_product *= f * r;
        }
        for &(r, iq) in &self.pair_zeros {
            let x = f * r;
            let (a, b) = ((1.0 - x) * (1.0 + x), x * iq);
            num.by(a, b);
            if EST {
                est += atan2_upper(b, a);
            }
        }
        for &(r, iq) in &self.pair_poles {
            let x = f * r;
            let (a, b) = ((1.0 - x) * (1.0 + x), x * iq);
            den.by(a, b);
            if EST {
                est -= atan2_upper(b, a);
            }
        }
        // w = num / den.
        let inv = 1.0 / (den.re * den.re + den.im * den.im);
        let wr = (num.re * den.re + num.im * den.im) * inv;
        let wi = (num.im * den.re - num.re * den.im) * inv;
        // ln|w| from |w|² (w is a ratio of rescaled products, so |w|² is in range);
        // the low cuts' |j·x| parts were multiplied apart and are logged once.
        let mut ln_mag =
            0.5 * libm::log(wr * wr + wi * wi) + num.ln_scale - den.ln_scale + self.ln_gain;
        if !self.cuts.is_empty() {
            ln_mag += ln_of_product(cut_product, f, &self.cuts);
        }
        if self.origin != 0.0 {
            ln_mag -= self.origin * libm::log(f);
        }
        // libm's, not crate::float::atan2: inlined here, 3–4 % of the sweep (src/float.rs).
        (ln_mag, libm::atan2(wi, wr), est)
    }

    /// Largest change of the factors' phase between two frequencies a ratio
    /// `ratio` ≥ 1 apart, rad: a real factor's phase moves at most ½·ln(ratio)
    /// (its slope in ln f is x/(1 + x²) ≤ ½), a pair's at most max(2Q, 2)·ln(ratio).
    fn step_bound(&self, ratio: f64) -> f64 {
        let lr = libm::log(ratio);
        let first = 0.5 * lr * (self.zeros.len() + self.poles.len()) as f64;
        let pairs: f64 = self
            .pair_zeros
            .iter()
            .chain(&self.pair_poles)
            .map(|&(_, iq)| (2.0 / iq).max(2.0) * lr)
            .sum();
        first + pairs
    }

    /// ln|H| and the continuous phase at ascending frequencies `f`, written to
    /// `ln_mag` and `phase`. When the factors' phase cannot move by a quarter turn
    /// between neighbours, each point is unwrapped against the previous one and
    /// the turn estimate is skipped; otherwise every point is evaluated alone.
    pub(crate) fn sweep(&self, f: &[f64], ln_mag: &mut Vec<f64>, phase: &mut Vec<f64>) {
        let ratio = f.windows(2).map(|w| w[1] / w[0]).fold(1.0, f64::max);
        if self.step_bound(ratio) >= FRAC_PI_2 {
            for &x in f {
                let (l, p) = self.eval(x);
                ln_mag.push(l);
                phase.push(p);
            }
            return;
        }
        let mut prev: Option<f64> = None;
        for &x in f {
            let (l, principal, est) = match prev {
                None => self.product::<true>(x),
                Some(_) => self.product::<false>(x),
            };
            // Continuous phase of the factors: from the estimate at the first
            // point, then the turn nearest the previous point.
            let reference = prev.unwrap_or(est);
            let factors = principal + TAU * nearest((reference - principal) / TAU);
            prev = Some(factors);
            ln_mag.push(l);
            phase.push(factors + self.phase0 - TAU * x * self.delay);
        }
    }
}

/// ln of Π f·r over the low cuts: the product when it is a normal number,
/// otherwise the sum of logs.
fn ln_of_product(p: f64, f: f64, cuts: &[f64]) -> f64 {
    if p.is_normal() {
        libm::log(p)
    } else {
        cuts.iter().map(|r| libm::log(f * r)).sum()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::freq::response::model_log;

    #[test]
    fn atan_approximation_error_is_within_its_bound() {
        let mut worst: f64 = 0.0;
        for i in 0..=100_000 {
            let x = libm::pow(10.0, -4.0 + 8.0 * i as f64 / 100_000.0);
            worst = worst.max((atan_approx(x) - libm::atan(x)).abs());
        }
        assert!(worst <= ATAN_ERR, "{worst}");
        assert!((atan2_upper(1.0, -1.0) - 0.75 * PI).abs() <= ATAN_ERR);
    }

    #[test]
    fn fast_and_per_factor_forms_agree_including_the_turns() {
        // The per-factor sum (response::model_log) is the slow reference.
        let models = [
            TransferModel::constant(-3e4)
                .pole(12.0)
                .zero(3e5)
                .rhp_zero(4e6)
                .rhp_pole(7.0)
                .complex_pole(2e6, 3.0)
                .complex_zero(9e6, 0.4)
                .integrator()
                .low_cut(0.5)
                .delay(2e-8),
            (0..32).fold(TransferModel::constant(1e6), |m, i| {
                m.pole(libm::pow(10.0, i as f64 / 4.0))
            }),
            (0..16).fold(TransferModel::constant(1.0), |m, i| {
                m.complex_pole(1e3 * (1.0 + i as f64 * 1e-3), 1e4)
            }),
            TransferModel::constant(5.0)
                .integrator()
                .integrator()
                .integrator()
                .integrator()
                .zero(1e-3)
                .zero(1e-2),
        ];
        for m in &models {
            let fast = FastModel::new(&[m]);
            for i in 0..4000 {
                let f = libm::pow(10.0, -8.0 + 20.0 * i as f64 / 4000.0);
                let (ln, ph) = fast.eval(f);
                let want = model_log(m, f);
                assert!(
                    (ln - want.ln_mag).abs() <= 1e-12 * want.ln_mag.abs().max(1.0),
                    "f = {f}: {ln} vs {}",
                    want.ln_mag
                );
                assert!(
                    (ph - want.phase).abs() <= 1e-11 * want.phase.abs().max(1.0),
                    "f = {f}: {ph} vs {}",
                    want.phase
                );
            }
        }
    }

    #[test]
    fn sweep_unwrapping_matches_point_by_point_evaluation() {
        let m = TransferModel::constant(3e3)
            .pole(50.0)
            .complex_pole(2e5, 5.0)
            .complex_pole(3e6, 0.6)
            .zero(1e4)
            .delay(1e-7);
        let fast = FastModel::new(&[&m]);
        for n in [50usize, 2000] {
            let f: Vec<f64> = (0..n)
                .map(|i| libm::pow(10.0, 8.0 * i as f64 / (n - 1) as f64))
                .collect();
            let (mut l, mut p) = (Vec::new(), Vec::new());
            fast.sweep(&f, &mut l, &mut p);
            for (i, &x) in f.iter().enumerate() {
                let (lw, pw) = fast.eval(x);
                assert_eq!(l[i], lw);
                assert!(
                    (p[i] - pw).abs() < 1e-9,
                    "n = {n}, f = {x}: {} vs {pw}",
                    p[i]
                );
            }
        }
    }

    #[test]
    fn extreme_frequencies_do_not_overflow() {
        let m = (0..32).fold(TransferModel::constant(1.0), |m, _| m.pole(1e-9));
        let (ln, ph) = FastModel::new(&[&m]).eval(1e15);
        // |H| = (1e24)^−32 → ln = −32·24·ln 10.
        assert!((ln + 32.0 * 24.0 * core::f64::consts::LN_10).abs() < 1e-9);
        assert!((ph + 16.0 * PI).abs() < 1e-9);
    }
}
