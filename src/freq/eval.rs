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

    /// Multiply by (1 + j·x); rescale when `CHECK`.
    #[inline]
    fn first<const CHECK: bool>(&mut self, x: f64) {
        let re = self.re - x * self.im;
        self.im += x * self.re;
        self.re = re;
        if CHECK {
            self.rescale();
        }
    }

    /// Multiply by (a + j·b); rescale when `CHECK`.
    #[inline]
    fn by<const CHECK: bool>(&mut self, a: f64, b: f64) {
        let re = self.re * a - self.im * b;
        self.im = self.re * b + self.im * a;
        self.re = re;
        if CHECK {
            self.rescale();
        }
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
        let (ln_mag, principal, est) = self.product::<true, true>(f);
        let turns = nearest((est - principal) / TAU);
        (
            ln_mag,
            principal + TAU * turns + self.phase0 - TAU * f * self.delay,
        )
    }

    /// ln|H|, the principal phase of the factor product, and (when `EST`) the
    /// approximate continuous phase of the factors. Without `CHECK` the running
    /// products are never rescaled: only for frequencies where
    /// [`FastModel::products_stay_in_range`] holds, where a rescale could not
    /// trigger anyway, so both forms give the same bits.
    #[inline]
    fn product<const EST: bool, const CHECK: bool>(&self, f: f64) -> (f64, f64, f64) {
        let (w2, rest, wr, wi, est) = self.parts::<EST, CHECK>(f);
        let ln_mag = 0.5 * libm::log(w2) + rest;
        // libm's, not crate::float::atan2: inlined here, 3–4 % of the sweep (src/float.rs).
        (ln_mag, libm::atan2(wi, wr), est)
    }

    /// The factor product w = num/den (without the constant gain, the integrators,
    /// the low cuts' j·x parts and the delay) as |w|², the rest of ln|H|
    /// (ln|H| = ½·ln|w|² + rest), w itself, and (when `EST`) the approximate
    /// continuous phase of the factors.
    #[inline]
    fn parts<const EST: bool, const CHECK: bool>(&self, f: f64) -> (f64, f64, f64, f64, f64) {
        let mut num = Product::ONE;
        let mut den = Product::ONE;
        let mut est = 0.0;
        for &(r, s) in &self.zeros {
            let x = f * r;
            num.first::<CHECK>(s * x);
            if EST {
                est += s * atan_approx(x);
            }
        }
        for &(r, s) in &self.poles {
            let x = f * r;
            den.first::<CHECK>(s * x);
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
            num.by::<CHECK>(a, b);
            if EST {
                est += atan2_upper(b, a);
            }
        }
        for &(r, iq) in &self.pair_poles {
            let x = f * r;
            let (a, b) = ((1.0 - x) * (1.0 + x), x * iq);
            den.by::<CHECK>(a, b);
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
        let rest = num.ln_scale - den.ln_scale + self.rest(f, cut_product);
        (wr * wr + wi * wi, rest, wr, wi, est)
    }

    /// The part of ln|H| outside the factor product w: ln|gain|, the low cuts'
    /// |j·x| parts (their product `cut_product` at `f`) and the integrators.
    #[inline]
    fn rest(&self, f: f64, cut_product: f64) -> f64 {
        let mut rest = self.ln_gain;
        if !self.cuts.is_empty() {
            rest += ln_of_product(cut_product, f, &self.cuts);
        }
        if self.origin != 0.0 {
            rest -= self.origin * libm::log(f);
        }
        rest
    }

    /// The factors' phase moves by at most rate·ln(ratio) rad between two
    /// frequencies a ratio ≥ 1 apart: a real factor's by at most ½·ln(ratio)
    /// (its slope in ln f is x/(1 + x²) ≤ ½), a pair's by at most
    /// max(2Q, 2)·ln(ratio). The rate is the sum of those slopes.
    fn step_rate(&self) -> f64 {
        let first = 0.5 * (self.zeros.len() + self.poles.len()) as f64;
        let pairs: f64 = self
            .pair_zeros
            .iter()
            .chain(&self.pair_poles)
            .map(|&(_, iq)| (2.0 / iq).max(2.0))
            .sum();
        first + pairs
    }

    /// Whether every partial product of the numerator and of the denominator
    /// factors stays inside [2^−`bits`, 2^`bits`] in modulus for all frequencies
    /// in (0, `f_max`]. With `bits` ≤ 200 [`Product::rescale`] (thresholds 2^±400
    /// on the 1-norm, which is at most √2 times the modulus) cannot trigger.
    /// [`PRODUCT_BITS`] (100) keeps w = num/den and the product of two such w far
    /// inside the f64 range for the product form; [`EXPANDED_BITS`] (200) is the
    /// bound of [`Expanded`], whose largest intermediate is the product of a
    /// point's |num|² and the previous point's |den|² (≤ 2^800, below 2^1024) and
    /// whose Horner sums are bounded by the same Π(1 + x_i) as the check below.
    ///
    /// Bounds per factor: |1 + j·x| lies in [1, 1 + |x|] and grows with f; a pair
    /// |(1 − x²) + j·x/Q| is at most 1 + x² + x/Q (triangle inequality) and at least
    /// min over x of √((1 − x²)² + x²/Q²) = (1/Q)·√(1 − 1/(4Q²)) when 1/Q² < 2, else 1
    /// (the minimum of a quadratic in x², by differentiation). A partial product
    /// lies between the product of the lower bounds below 1 and the product of the
    /// upper bounds, so checking those two for each side is enough.
    fn products_stay_in_range(&self, f_max: f64, bits: f64) -> bool {
        let limit = bits * LN_2;
        let side = |first: &[(f64, f64)], pairs: &[(f64, f64)]| {
            let mut hi = 0.0;
            let mut lo = 0.0;
            for &(r, _) in first {
                hi += libm::log1p(f_max * r);
            }
            for &(r, iq) in pairs {
                let x = f_max * r;
                hi += libm::log1p(x * x + x * iq);
                if iq * iq < 2.0 {
                    lo += libm::log(iq * libm::sqrt(1.0 - 0.25 * iq * iq));
                }
            }
            hi < limit && lo > -limit
        };
        side(&self.zeros, &self.pair_zeros) && side(&self.poles, &self.pair_poles)
    }

    /// ln|H| and the continuous phase at ascending frequencies `f`, written to
    /// `ln_mag` and `phase`. When the factors' phase cannot move by a quarter turn
    /// between neighbours, each point is unwrapped against the previous one and
    /// the turn estimate is skipped; otherwise every point is evaluated alone.
    pub(crate) fn sweep(&self, f: &[f64], ln_mag: &mut Vec<f64>, phase: &mut Vec<f64>) {
        self.sweep_in(f, ln_mag, phase, (1.0, 1.0));
    }

    /// [`FastModel::sweep`] with ln|H| and the phase multiplied by `units`
    /// (1 for ln and radians — exact; 20/ln 10 and 180/π for dB and degrees, as
    /// the caller would multiply afterwards, the same bits) as they are written,
    /// so the results are not read and written a second time.
    pub(crate) fn sweep_in(
        &self,
        f: &[f64],
        ln_mag: &mut Vec<f64>,
        phase: &mut Vec<f64>,
        units: (f64, f64),
    ) {
        let (km, kp) = units;
        // step_bound(r) = rate·ln r is below a quarter turn for every neighbour
        // ratio r = f[i+1]/f[i] when each r < e^(π/(2·rate)): one multiplication
        // and comparison a point, no division (f > 0; an infinite limit, no
        // factors, admits all).
        let limit = libm::exp(FRAC_PI_2 / self.step_rate());
        if !f.windows(2).all(|w| w[1] < limit * w[0]) {
            for &x in f {
                let (l, p) = self.eval(x);
                ln_mag.push(l * km);
                phase.push(p * kp);
            }
            return;
        }
        let in_range = |bits| {
            f.last()
                .is_some_and(|&m| self.products_stay_in_range(m, bits))
        };
        match Expanded::of(self) {
            Some(e) if in_range(EXPANDED_BITS) => {
                self.sweep_by_steps(f, ln_mag, phase, units, |x| {
                    let (n2, d2, wr, wi) = e.scaled_ratio(x);
                    let cut_product = self.cuts.iter().fold(1.0, |p, &r| p * (x * r));
                    (n2, d2, self.rest(x, cut_product), wr, wi)
                });
                return;
            }
            None if in_range(PRODUCT_BITS) => {
                self.sweep_by_steps(f, ln_mag, phase, units, |x| {
                    let (w2, rest, wr, wi, _) = self.parts::<false, false>(x);
                    (w2, 1.0, rest, wr, wi)
                });
                return;
            }
            _ => {}
        }
        let mut prev: Option<f64> = None;
        for &x in f {
            let (l, principal, est) = match prev {
                None => self.product::<true, true>(x),
                Some(_) => self.product::<false, true>(x),
            };
            // Continuous phase of the factors: from the estimate at the first
            // point, then the turn nearest the previous point.
            let reference = prev.unwrap_or(est);
            let factors = principal + TAU * nearest((reference - principal) / TAU);
            prev = Some(factors);
            ln_mag.push(l * km);
            phase.push((factors + self.phase0 - TAU * x * self.delay) * kp);
        }
    }

    /// [`FastModel::sweep`] when the products stay in range (no rescaling) and
    /// neighbours are less than a quarter turn apart. The factors' phase moves
    /// from one point to the next by arg(w·w̄ₚ), w̄ₚ the conjugate of the previous
    /// point's w; when that step is small (|tan| ≤ 1/32, the common case of a
    /// dense sweep) it is added as the arctangent series
    /// t − t³/3 + t⁵/5 − t⁷/7 + t⁹/9 − t¹¹/11 (truncation below |t|¹³/13 ≤ 3e-21 rad),
    /// which costs a fraction of an `atan2`. Every [`RESYNC`]-th point, and any
    /// point whose step is larger, takes the principal phase from `atan2` and the
    /// turn nearest the running phase, so the rounding of the summed steps
    /// (about 1e-16 rad each) cannot build up.
    ///
    /// ln|w| steps the same way: with q = |w|²/|wₚ|² and s = (q − 1)/(q + 1) =
    /// (|w|² − |wₚ|²)/(|w|² + |wₚ|²), ½·ln q = atanh s = s + s³/3 + s⁵/5 + … ;
    /// for |s| ≤ 1/32 six terms leave less than |s|¹³/13 ≤ 3e-21, larger steps and
    /// the re-anchoring points take `log`. Source: the series of atanh and of atan,
    /// any calculus text (e.g. Abramowitz & Stegun, Handbook of Mathematical
    /// Functions, 4.1.27 and 4.4.42; from memory).
    ///
    /// `point` gives, at each frequency after the first, |w|², the rest of ln|H|
    /// and w (as [`FastModel::parts`] does, or [`Expanded::ratio`]).
    #[inline]
    fn sweep_by_steps(
        &self,
        f: &[f64],
        ln_mag: &mut Vec<f64>,
        phase: &mut Vec<f64>,
        (km, kp): (f64, f64),
        point: impl Fn(f64) -> (f64, f64, f64, f64, f64),
    ) {
        let Some((&first, later)) = f.split_first() else {
            return;
        };
        let (w2, rest, wr, wi, est) = self.parts::<true, false>(first);
        let principal = libm::atan2(wi, wr);
        let mut factors = principal + TAU * nearest((est - principal) / TAU);
        let (mut pr, mut pi, mut pn2, mut pd2) = (wr, wi, w2, 1.0);
        let mut ln_w = 0.5 * libm::log(w2);
        ln_mag.push((ln_w + rest) * km);
        phase.push((factors + self.phase0 - TAU * first * self.delay) * kp);
        for (i, &x) in later.iter().enumerate() {
            let (n2, d2, rest, wr, wi) = point(x);
            let anchor = (i + 1) % RESYNC == 0;
            // w·w̄ₚ = a + j·b: its argument is the step.
            let a = wr * pr + wi * pi;
            let b = wi * pr - wr * pi;
            // |w|² = n2/d2: q = |w|²/|wₚ|² = (n2·d2ₚ)/(n2ₚ·d2).
            let (up, down) = (n2 * pd2, pn2 * d2);
            let (d, sum) = (up - down, up + down);
            if !anchor && 32.0 * libm::fabs(d) <= sum {
                let s = d / sum;
                let v = s * s;
                ln_w += s * odd_series(v, [1.0 / 3.0, 1.0 / 5.0, 1.0 / 7.0, 1.0 / 9.0, 1.0 / 11.0]);
            } else {
                ln_w = 0.5 * libm::log(n2 / d2);
            }
            if !anchor && a > 0.0 && 32.0 * libm::fabs(b) <= a {
                let t = b / a;
                let u = t * t;
                factors += t * odd_series(
                    u,
                    [-1.0 / 3.0, 1.0 / 5.0, -1.0 / 7.0, 1.0 / 9.0, -1.0 / 11.0],
                );
            } else {
                let principal = libm::atan2(wi, wr);
                factors = principal + TAU * nearest((factors - principal) / TAU);
            }
            (pr, pi, pn2, pd2) = (wr, wi, n2, d2);
            ln_mag.push((ln_w + rest) * km);
            phase.push((factors + self.phase0 - TAU * x * self.delay) * kp);
        }
    }
}

/// The bound, in bits, on each side's partial products for the product form of
/// [`FastModel::sweep_by_steps`] (see [`FastModel::products_stay_in_range`]).
const PRODUCT_BITS: f64 = 100.0;
/// The same bound for [`Expanded`]: the margin search grid reaches three decades
/// past the last corner, where six poles are about 2^100 in modulus, so the
/// product form's bound would send it point by point through `log` and `atan2`.
const EXPANDED_BITS: f64 = 200.0;

/// Most first-order factors on a side that [`Expanded`] multiplies out.
const MAX_EXPANDED: usize = 8;

/// The factor products of a model without complex pairs, multiplied out: the
/// numerator Π(1 + s·σ·f/f_z) and the denominator likewise are polynomials
/// in s = j·f with real coefficients c_k (the elementary symmetric sums of the
/// signed 1/f, built by multiplying one factor at a time), so that
/// P(j·f) = Σ c_k·(j·f)^k = Σ_m (−1)^m·c_2m·u^m + j·f·Σ_m (−1)^m·c_2m+1·u^m with
/// u = f², two Horner evaluations in u instead of one complex product per
/// factor (a chain of dependent multiplications).
///
/// Accuracy: Horner's rule, and the coefficients built by it, err by at most
/// about (2m + 2)·ε·Σ|c_k|·f^k for m factors (N. J. Higham, Accuracy and
/// Stability of Numerical Algorithms, 2nd ed., section 5.1, from memory), and
/// Σ|c_k|·f^k ≤ Π(1 + |x_i|) ≤ 2^(m/2)·Π|1 + j·x_i| (x_i = f/f_i; 1 + x ≤
/// √2·√(1 + x²)), so with at most [`MAX_EXPANDED`] factors a side the relative
/// error of each side is below 18·ε·16 ≈ 3.2e-14, and that of w (so of ln|w|
/// and arg w, rad) below 6.4e-14. A complex pair's factor (1 − x²) + j·x/Q
/// can be far smaller than its terms near resonance (by 2Q), so models with
/// pairs keep the product form.
///
/// The coefficients sit in fixed arrays with their count, so each Horner
/// evaluation is a straight run of multiply-adds chosen by one branch, with
/// no loop.
struct Expanded {
    num_even: Poly,
    num_odd: Poly,
    den_even: Poly,
    den_odd: Poly,
}

/// A polynomial in u of at most [`MAX_EXPANDED`]/2 + 1 coefficients,
/// lowest first.
#[derive(Default)]
struct Poly {
    c: [f64; MAX_EXPANDED / 2 + 1],
    len: usize,
}

impl Poly {
    /// Σ c_k·u^k by Horner's rule.
    #[inline(always)]
    fn at(&self, u: f64) -> f64 {
        let [c0, c1, c2, c3, c4] = self.c;
        match self.len {
            0 => 0.0,
            1 => c0,
            2 => c0 + u * c1,
            3 => c0 + u * (c1 + u * c2),
            4 => c0 + u * (c1 + u * (c2 + u * c3)),
            _ => c0 + u * (c1 + u * (c2 + u * (c3 + u * c4))),
        }
    }
}

impl Expanded {
    /// The expansion of `m`'s factors, or `None` when it has complex pairs,
    /// more than [`MAX_EXPANDED`] first-order factors on a side, or a
    /// coefficient beyond 2^400 in magnitude (so no Horner step can overflow
    /// where [`FastModel::products_stay_in_range`] holds).
    fn of(m: &FastModel) -> Option<Expanded> {
        if !m.pair_zeros.is_empty()
            || !m.pair_poles.is_empty()
            || m.zeros.len() > MAX_EXPANDED
            || m.poles.len() > MAX_EXPANDED
        {
            return None;
        }
        let (num_even, num_odd) = Expanded::side(&m.zeros)?;
        let (den_even, den_odd) = Expanded::side(&m.poles)?;
        Some(Expanded {
            num_even,
            num_odd,
            den_even,
            den_odd,
        })
    }

    /// The even and odd parts, in u = f², of Π(1 + σ·r·(j·f)) over the
    /// factors (r = 1/f_i, σ = ±1), with the signs of j^k folded in.
    fn side(factors: &[(f64, f64)]) -> Option<(Poly, Poly)> {
        let mut c = [0.0; MAX_EXPANDED + 1];
        c[0] = 1.0;
        let degree = factors.len().min(MAX_EXPANDED);
        for (n, &(r, s)) in factors.iter().enumerate().take(MAX_EXPANDED) {
            let a = s * r;
            for k in (1..=n + 1).rev() {
                c[k] += a * c[k - 1];
            }
        }
        if !c.iter().all(|x| libm::fabs(*x) <= BIG) {
            return None;
        }
        // j^(2m) = (−1)^m; j^(2m+1) = j·(−1)^m.
        let (mut even, mut odd) = (Poly::default(), Poly::default());
        for (k, &x) in c.iter().enumerate().take(degree + 1) {
            let signed = if (k / 2) % 2 == 0 { x } else { -x };
            let side = if k % 2 == 0 { &mut even } else { &mut odd };
            if let Some(slot) = side.c.get_mut(k / 2) {
                *slot = signed;
                side.len = k / 2 + 1;
            }
        }
        Some((even, odd))
    }

    /// |num|², |den|² and num·conj(den) = w·|den|² (w = num/den: the same
    /// argument, no division) at frequency `f`.
    #[inline]
    fn scaled_ratio(&self, f: f64) -> (f64, f64, f64, f64) {
        let u = f * f;
        let (nr, ni) = (self.num_even.at(u), f * self.num_odd.at(u));
        let (dr, di) = (self.den_even.at(u), f * self.den_odd.at(u));
        (
            nr * nr + ni * ni,
            dr * dr + di * di,
            nr * dr + ni * di,
            ni * dr - nr * di,
        )
    }
}

/// 1 + c₁·v + c₂·v² + … + c₅·v⁵ in Estrin's form, (1 + c₁v) + v²·(c₂ + c₃v) +
/// v⁴·(c₄ + c₅v): the same terms as Horner's rule in three levels of dependent
/// operations instead of five multiply-adds in a row, so that the stepped sweep's
/// two series (each a chain on the critical path of a point) overlap better.
/// For |v| ≤ 2^−10 (the steps of [`FastModel::sweep_by_steps`]) every term after
/// the first is below 2^−10 and the rounding of the sum is within 2 ulps of 1,
/// as for Horner's rule (Higham, Accuracy and Stability of Numerical Algorithms,
/// 2nd ed., section 5.1, from memory, for both orders of evaluation).
#[inline(always)]
fn odd_series(v: f64, c: [f64; 5]) -> f64 {
    let v2 = v * v;
    (1.0 + c[0] * v) + v2 * ((c[1] + c[2] * v) + v2 * (c[3] + c[4] * v))
}

/// Points between exact re-anchorings of the stepped phase in
/// [`FastModel::sweep_by_steps`].
const RESYNC: usize = 128;

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
            sweep_matches_point_by_point(&fast, &f, |_| 1e-9);
        }
    }

    #[test]
    fn stepped_phase_of_a_dense_sweep_matches_point_by_point_evaluation() {
        // The loop of the benchmark (bench/cases.mjs) and one with a sharp pair,
        // an RHP zero and a delay; eval's atan2 per point is the reference.
        let models = [
            benchmark_amplifier(),
            TransferModel::constant(-2e3)
                .pole(3.0)
                .complex_pole(4e5, 20.0)
                .rhp_zero(8e6)
                .delay(3e-8),
        ];
        for m in &models {
            let fast = FastModel::new(&[m]);
            let f: Vec<f64> = (0..10_000)
                .map(|i| libm::pow(10.0, 9.0 * i as f64 / 9999.0))
                .collect();
            // The stepped path is the one under test.
            assert!(fast.products_stay_in_range(1e9, PRODUCT_BITS));
            sweep_matches_point_by_point(&fast, &f, relative_phase);
        }
    }

    /// The sweep of `fast` over `f` (ascending; sweep_by_steps where it applies)
    /// against one evaluation per point with its own log and atan2 (`eval`):
    /// 1e-13 relative in ln|H|, and `phase_bound(phase)` rad in the phase.
    fn sweep_matches_point_by_point(fast: &FastModel, f: &[f64], phase_bound: fn(f64) -> f64) {
        let (mut l, mut p) = (Vec::new(), Vec::new());
        fast.sweep(f, &mut l, &mut p);
        for (i, &x) in f.iter().enumerate() {
            let (lw, pw) = fast.eval(x);
            assert!(
                (l[i] - lw).abs() <= 1e-13 * lw.abs().max(1.0),
                "f = {x}: {} vs {lw}",
                l[i]
            );
            assert!(
                (p[i] - pw).abs() <= phase_bound(pw),
                "f = {x}: {} vs {pw}",
                p[i]
            );
        }
    }

    /// The amplifier of the benchmark's loop (bench/cases.mjs, A0 1e5 there) with
    /// A0 = 1e4: six real poles, two real zeros.
    fn benchmark_amplifier() -> TransferModel {
        [10.0, 1e5, 1e6, 3e6, 1e7, 3e7]
            .into_iter()
            .fold(TransferModel::constant(1e4), TransferModel::pole)
            .zero(2e6)
            .zero(5e7)
    }

    /// 1e-12 relative to the phase (1e-12 rad below 1 rad).
    fn relative_phase(pw: f64) -> f64 {
        1e-12 * pw.abs().max(1.0)
    }

    #[test]
    fn margin_grid_of_the_benchmark_loop_takes_the_multiplied_out_steps() {
        // The margin search grid of the benchmark's loop (bench/cases.mjs) runs from
        // 0.01 Hz to 5e10 Hz at 40 points a decade: past 2^100 for the product
        // form, inside 2^200 for Expanded, so the stepped multiplied-out path runs
        // (before, every point took log and atan2). One evaluation per point,
        // with its own log and atan2 (eval), is the reference.
        let m = benchmark_amplifier();
        let fast = FastModel::new(&[&m]);
        assert!(Expanded::of(&fast).is_some());
        assert!(!fast.products_stay_in_range(5e10, PRODUCT_BITS));
        assert!(fast.products_stay_in_range(5e10, EXPANDED_BITS));
        let f = crate::freq::response::geometric(0.01, 5e10, 508);
        sweep_matches_point_by_point(&fast, &f, relative_phase);
    }

    #[test]
    fn multiplied_out_factors_match_the_per_factor_sum() {
        // Real-factor models the stepped sweep multiplies out (Expanded): the
        // benchmark's loop, RHP factors with low cuts and integrators, and the
        // most factors a side it takes. The per-factor sum (response::model_log)
        // is the reference; Expanded's bound is 6.4e-14 on ln|w| and arg w.
        let models = [
            benchmark_amplifier(),
            TransferModel::constant(-40.0)
                .rhp_zero(3e5)
                .rhp_pole(20.0)
                .pole(4e6)
                .low_cut(2.0)
                .integrator()
                .delay(1e-8),
            (0..8).fold(TransferModel::constant(3.0), |m, i| {
                m.pole(libm::pow(10.0, 1.0 + i as f64))
                    .zero(libm::pow(10.0, 1.5 + i as f64))
            }),
        ];
        for m in &models {
            let fast = FastModel::new(&[m]);
            assert!(Expanded::of(&fast).is_some());
            let f: Vec<f64> = (0..5000)
                .map(|i| libm::pow(10.0, -1.0 + 9.0 * i as f64 / 4999.0))
                .collect();
            // The stepped path is the one under test.
            assert!(fast.products_stay_in_range(1e8, PRODUCT_BITS));
            let (mut l, mut p) = (Vec::new(), Vec::new());
            fast.sweep(&f, &mut l, &mut p);
            for (i, &x) in f.iter().enumerate() {
                let want = model_log(m, x);
                assert!(
                    (l[i] - want.ln_mag).abs() <= 1e-13 * want.ln_mag.abs().max(1.0),
                    "f = {x}: {} vs {}",
                    l[i],
                    want.ln_mag
                );
                assert!(
                    (p[i] - want.phase).abs() <= 1e-12 * want.phase.abs().max(1.0),
                    "f = {x}: {} vs {}",
                    p[i],
                    want.phase
                );
            }
        }
        // Pairs, and a ninth factor on a side, keep the product form.
        let pair = TransferModel::constant(1.0).complex_pole(1e5, 2.0);
        assert!(Expanded::of(&FastModel::new(&[&pair])).is_none());
        let nine = (0..9).fold(TransferModel::constant(1.0), |m, i| {
            m.pole(1e3 * (i + 1) as f64)
        });
        assert!(Expanded::of(&FastModel::new(&[&nine])).is_none());
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
