//! Every unity-gain crossover and every −180° phase crossover of the loop gain.
//!
//! Method: sample ln|T| and the continuous phase of T on a log grid that spans
//! every corner of the model with three decades to spare and reaches past the
//! asymptotic crossings at both ends, with every corner frequency on it and, around
//! each complex pair, a local grid of spacing set by its Q plus the peak (or notch)
//! of |T| there, so a narrow resonance that lifts |T| just above 1 is not stepped
//! over whatever the density of the log grid; every sign change of ln|T| (or of
//! ∠T + 180° − m·360° for any whole m) between neighbours brackets one crossing,
//! which Brent's method then refines in ln f to a relative frequency tolerance of
//! [`CROSSING_REL_TOL`]. The answer does not depend on the grid density as long as
//! neighbouring crossings are a grid step apart (a resonance step near its pair).
//!
//! Source: R. P. Brent, *Algorithms for Minimization without Derivatives*, 1973,
//! ch. 4 (the zero finder; from memory).

use super::bandwidth::golden_max;
use super::evaluated::EvaluatedLoop;
use super::model::{ComplexPair, FeedbackLoop};
use super::response::loop_log;
use crate::error::{Error, Result};
use alloc::vec::Vec;

/// Relative tolerance of every refined crossing frequency.
pub const CROSSING_REL_TOL: f64 = 1e-12;
/// Grid density used unless another is chosen, points per decade.
pub const DEFAULT_POINTS_PER_DECADE: u32 = 40;
/// Least and most grid points per decade accepted.
pub const POINTS_PER_DECADE_RANGE: (u32, u32) = (4, 2000);
use super::evaluated::{MARGIN_DECADES, MAX_SPAN_DECADES};
/// Phase crossings are searched only where |T| ≥ 10^(−MAX_GAIN_MARGIN_DB/20).
pub const MAX_GAIN_MARGIN_DB: f64 = 240.0;
const LN_MIN_LOOP_GAIN: f64 = -MAX_GAIN_MARGIN_DB / 20.0 * core::f64::consts::LN_10;
/// Most phase crossings one loop may have within the search range (a long delay
/// in front of a wide loop can turn the phase many times).
pub const MAX_PHASE_CROSSINGS: usize = 5000;

/// The frequency interval [lo, hi] in Hz where crossings are searched.
pub(crate) fn search_range(l: &FeedbackLoop) -> (f64, f64) {
    let corners = l.corners_hz();
    let (mut lo, mut hi) = match (corners.first(), corners.last()) {
        (Some(&a), Some(&b)) => (a, b),
        _ => (1.0, 1.0),
    };
    let spread = libm::pow(10.0, MARGIN_DECADES);
    lo /= spread;
    hi *= spread;
    // Past the outermost corners |T| follows a straight asymptote; put its unity
    // crossing inside the range with a decade to spare.
    let r = l.relative_degree();
    if r > 0 {
        let ln_t = loop_log(l, hi).ln_mag;
        let fx = hi * libm::exp(ln_t / r as f64);
        if fx.is_finite() && fx * 10.0 > hi {
            hi = fx * 10.0;
        }
    }
    let k = l.low_frequency_order();
    if k != 0 {
        let ln_t = loop_log(l, lo).ln_mag;
        let fx = lo * libm::exp(ln_t / k as f64);
        if fx.is_finite() && fx > 0.0 && fx / 10.0 < lo {
            lo = fx / 10.0;
        }
    }
    lo = lo.max(super::response::MIN_SWEEP_HZ);
    hi = hi.min(super::response::MAX_SWEEP_HZ);
    if libm::log10(hi / lo) > MAX_SPAN_DECADES {
        // Keep the high end (where margins live) and trim the low end.
        lo = hi / libm::pow(10.0, MAX_SPAN_DECADES);
    }
    (lo, hi)
}

/// The grid density `ppd` checked against [`POINTS_PER_DECADE_RANGE`].
pub(crate) fn check_density(ppd: u32) -> Result<()> {
    let (lo_ppd, hi_ppd) = POINTS_PER_DECADE_RANGE;
    if ppd < lo_ppd || ppd > hi_ppd {
        return Err(Error::OutOfDomain {
            param: "points_per_decade",
            requirement: "must be between 4 and 2000",
        });
    }
    Ok(())
}

/// The search grid: a log grid over the search range at `ppd` points per
/// decade, with every corner frequency on it, and around each complex pair a
/// local grid set by that pair's own Q (its resonance is f0/Q wide), with the
/// extremum of |T| near the pair (a peak for a pole pair, a notch for a zero
/// pair) located by golden section and put on the grid too. Ascending.
pub(crate) fn grid<L: EvaluatedLoop + ?Sized>(l: &L, ppd: u32) -> Result<Vec<f64>> {
    check_density(ppd)?;
    let (lo, hi) = l.search_range();
    let n = (crate::float::ceil(libm::log10(hi / lo) * f64::from(ppd)) as usize).max(2) + 1;
    let f = super::response::geometric(lo, hi, n);
    let inside = |x: f64| x > lo && x < hi;
    let hints = l.hints();
    let mut extra: Vec<f64> = hints
        .sorted_corners()
        .into_iter()
        .filter(|&x| inside(x))
        .collect();
    for &(pair, is_pole) in &hints.pairs {
        extra.extend(resonance_points(l, pair, is_pole).filter(|&x| inside(x)));
    }
    let mut f = merge_ascending(f, extra);
    f.dedup();
    Ok(f)
}

/// `grid` and `extra` as one list in ascending total order (`f64::total_cmp`), the
/// same list as sorting their concatenation. The log-spaced grid is already
/// ascending (checked, sorted if not) and the extra points are a few, so they are
/// sorted alone and merged in, O(n), instead of sorting the whole list: the sort's
/// comparison through a `dyn` closure was about a tenth of a margins call.
fn merge_ascending(mut grid: Vec<f64>, mut extra: Vec<f64>) -> Vec<f64> {
    let ascending = |v: &[f64]| v.windows(2).all(|w| w[0].total_cmp(&w[1]).is_le());
    if !ascending(&grid) {
        crate::sort::sort_by(&mut grid, f64::total_cmp);
    }
    crate::sort::sort_by(&mut extra, f64::total_cmp);
    let mut out = Vec::with_capacity(grid.len() + extra.len());
    let mut rest = extra.as_slice();
    for &x in &grid {
        while let Some((&e, tail)) = rest.split_first() {
            if e.total_cmp(&x).is_lt() {
                out.push(e);
                rest = tail;
            } else {
                break;
            }
        }
        out.push(x);
    }
    out.extend_from_slice(rest);
    out
}

/// Local grid points per resonance width f0/Q (in ln f, 1/Q).
const POINTS_PER_RESONANCE_WIDTH: f64 = 8.0;
/// Resonance widths covered by the local grid on each side of f0.
const RESONANCE_WIDTHS: i32 = 4;
/// Pairs with a Q below this get no local grid (no peak, a broad phase change
/// that the log grid follows).
const LOCAL_GRID_MIN_Q: f64 = 0.5;

/// The local grid of one pair: f0·exp(k/(8Q)) for |k| ≤ 32, the pair's own
/// extremum f0·√(1 − 1/(2Q²)) (Q > 1/√2), and the extremum of ln|T| within a
/// resonance width of f0, by golden section.
fn resonance_points<L: EvaluatedLoop + ?Sized>(
    l: &L,
    pair: ComplexPair,
    is_pole: bool,
) -> impl Iterator<Item = f64> + '_ {
    let (f0, q) = (pair.freq_hz, pair.q);
    let local = q > LOCAL_GRID_MIN_Q;
    let step = 1.0 / (POINTS_PER_RESONANCE_WIDTH * q);
    let k = if local {
        (POINTS_PER_RESONANCE_WIDTH as i32) * RESONANCE_WIDTHS
    } else {
        -1
    };
    let own = (q * q > 0.5).then(|| f0 * crate::float::sqrt(1.0 - 0.5 / (q * q)));
    let extremum = local.then(|| {
        let sign = if is_pole { 1.0 } else { -1.0 };
        let h = move |x: f64| sign * l.eval(libm::exp(x)).0;
        let x0 = libm::log(f0);
        libm::exp(golden_max(&h, x0 - 1.0 / q, x0 + 1.0 / q).0)
    });
    (-k..=k)
        .map(move |i| f0 * libm::exp(f64::from(i) * step))
        .chain(own)
        .chain(extremum)
}

/// Brent's zero finder for g on [a, b] in x, with g(a)·g(b) ≤ 0; stops when the
/// bracket is below `tol` (absolute, in x).
pub(crate) fn brent(
    g: &dyn Fn(f64) -> f64,
    mut a: f64,
    mut b: f64,
    mut fa: f64,
    mut fb: f64,
    tol: f64,
) -> f64 {
    if fa == 0.0 {
        return a;
    }
    if fb == 0.0 {
        return b;
    }
    let (mut c, mut fc) = (a, fa);
    let mut d = b - a;
    let mut e = d;
    for _ in 0..200 {
        if (fb > 0.0) == (fc > 0.0) {
            c = a;
            fc = fa;
            d = b - a;
            e = d;
        }
        if libm::fabs(fc) < libm::fabs(fb) {
            a = b;
            b = c;
            c = a;
            fa = fb;
            fb = fc;
            fc = fa;
        }
        let tol1 = 2.0 * f64::EPSILON * libm::fabs(b) + 0.5 * tol;
        let xm = 0.5 * (c - b);
        if libm::fabs(xm) <= tol1 || fb == 0.0 {
            return b;
        }
        if libm::fabs(e) >= tol1 && libm::fabs(fa) > libm::fabs(fb) {
            let s = fb / fa;
            let (mut p, mut q);
            if a == c {
                p = 2.0 * xm * s;
                q = 1.0 - s;
            } else {
                let qq = fa / fc;
                let r = fb / fc;
                p = s * (2.0 * xm * qq * (qq - r) - (b - a) * (r - 1.0));
                q = (qq - 1.0) * (r - 1.0) * (s - 1.0);
            }
            if p > 0.0 {
                q = -q;
            }
            p = libm::fabs(p);
            if 2.0 * p < (3.0 * xm * q - libm::fabs(tol1 * q)).min(libm::fabs(e * q)) {
                e = d;
                d = p / q;
            } else {
                d = xm;
                e = d;
            }
        } else {
            d = xm;
            e = d;
        }
        a = b;
        fa = fb;
        b += if libm::fabs(d) > tol1 {
            d
        } else if xm > 0.0 {
            tol1
        } else {
            -tol1
        };
        fb = g(b);
    }
    b
}

/// Refine a sign change of `g` (a function of ln f) between grid frequencies.
fn refine(g: &dyn Fn(f64) -> f64, f0: f64, f1: f64, g0: f64, g1: f64) -> f64 {
    libm::exp(brent(
        g,
        libm::log(f0),
        libm::log(f1),
        g0,
        g1,
        CROSSING_REL_TOL,
    ))
}

/// Frequencies (Hz, ascending) where |T(j2πf)| = 1, at `ppd` grid points per decade.
///
/// # Errors
/// `points_per_decade` outside 4…2000.
///
/// # Example
/// ```
/// use loopwright::freq::{gain_crossings_hz, FeedbackLoop, TransferModel};
/// // T = 1000/(1 + s/ω1): |T| = 1 at f = 10 Hz·√(1000² − 1).
/// let l = FeedbackLoop::with_constant_beta(TransferModel::constant(1e4).pole(10.0), 0.1).unwrap();
/// let c = gain_crossings_hz(&l, 40).unwrap();
/// assert_eq!(c.len(), 1);
/// assert!((c[0] / (10.0 * (1e6f64 - 1.0).sqrt()) - 1.0).abs() < 1e-11);
/// assert!(gain_crossings_hz(&l, 1).is_err());
/// ```
pub fn gain_crossings_hz<L: EvaluatedLoop + ?Sized>(l: &L, ppd: u32) -> Result<Vec<f64>> {
    Ok(scan(l, ppd)?.0.into_iter().map(|(f, _)| f).collect())
}

/// The error of a loop gain that could not be evaluated (a NaN ln|T|).
pub(crate) fn failed() -> Error {
    Error::Overflow { param: "loopGain" }
}

/// Unity-gain crossings (frequency, rising) and −180° crossings (frequency).
pub(crate) type Scan = (Vec<(f64, bool)>, Vec<f64>);

/// Both kinds of crossing from one pass over the grid: unity-gain crossings with
/// their direction (`true` when |T| rises through 1 as f rises), and −180°
/// crossings.
pub(crate) fn scan<L: EvaluatedLoop + ?Sized>(l: &L, ppd: u32) -> Result<Scan> {
    let f = grid(l, ppd)?;
    let (mut ln, mut ph) = (Vec::with_capacity(f.len()), Vec::with_capacity(f.len()));
    l.sweep(&f, &mut ln, &mut ph);
    if ln.iter().any(|x| x.is_nan()) {
        return Err(failed());
    }
    let g = |x: f64| l.eval(libm::exp(x)).0;
    let mut gains = Vec::new();
    let mut phases = Vec::new();
    for i in 1..f.len() {
        let (fp, fi) = (f[i - 1], f[i]);
        let (gp, gi) = (ln[i - 1], ln[i]);
        // A sign change brackets a crossing; a grid point exactly on |T| = 1 is
        // one when reached from a nonzero side (so |T| ≡ 1 gives none).
        if gp != 0.0 && gi != 0.0 && (gp < 0.0) != (gi < 0.0) {
            gains.push((refine(&g, fp, fi, gp, gi), gi > gp));
        } else if gi == 0.0 && gp != 0.0 {
            gains.push((fi, gp < 0.0));
        }
        // Phase crossings where the loop gain is too small to matter (gain margin
        // above MAX_GAIN_MARGIN_DB) are not searched.
        if gp < LN_MIN_LOOP_GAIN && gi < LN_MIN_LOOP_GAIN {
            continue;
        }
        let (pp, pi) = (ph[i - 1].to_degrees(), ph[i].to_degrees());
        // Every level −180° + 360°·m strictly inside (min, max] of the step.
        let (lo, hi) = if pp < pi { (pp, pi) } else { (pi, pp) };
        let m_lo = crate::float::floor((lo + 180.0) / 360.0) as i64 + 1;
        let m_hi = crate::float::floor((hi + 180.0) / 360.0) as i64;
        if m_hi - m_lo + 1 + phases.len() as i64 > MAX_PHASE_CROSSINGS as i64 {
            return Err(Error::TooLarge {
                param: "phase_crossings",
                limit: MAX_PHASE_CROSSINGS as u64,
            });
        }
        if m_lo > m_hi {
            continue;
        }
        let first = phases.len();
        let (xp, xi) = (libm::log(fp), libm::log(fi));
        for m in m_lo..=m_hi {
            let level = -180.0 + 360.0 * m as f64;
            // The phase on the branch of the straight line between the two
            // grid phases (a continuous phase is taken as it is).
            let h = move |x: f64| {
                let hint = (pp + (pi - pp) * (x - xp) / (xi - xp)).to_radians();
                l.eval_near(libm::exp(x), hint).1.to_degrees() - level
            };
            phases.push(refine(&h, fp, fi, pp - level, pi - level));
        }
        if let Some(tail) = phases.get_mut(first..) {
            crate::sort::sort_by(tail, f64::total_cmp);
        }
    }
    Ok((gains, phases))
}

/// Frequencies (Hz, ascending) where the continuous phase of T passes −180° plus
/// any whole number of turns, at `ppd` grid points per decade. Only where
/// |T| ≥ −[`MAX_GAIN_MARGIN_DB`] dB (a gain margin beyond that is no margin
/// question).
///
/// # Errors
/// `points_per_decade` outside 4…2000; [`Error::TooLarge`] (`phase_crossings`)
/// past [`MAX_PHASE_CROSSINGS`].
///
/// # Example
/// ```
/// use loopwright::freq::{phase_crossings_hz, FeedbackLoop, TransferModel};
/// // Three equal poles at 1 kHz: −180° where each pole gives −60°, at √3 kHz.
/// let a = TransferModel::constant(4.0).pole(1e3).pole(1e3).pole(1e3);
/// let l = FeedbackLoop::with_constant_beta(a, 1.0).unwrap();
/// let c = phase_crossings_hz(&l, 40).unwrap();
/// assert!((c[0] / (1e3 * 3f64.sqrt()) - 1.0).abs() < 1e-11);
/// ```
pub fn phase_crossings_hz<L: EvaluatedLoop + ?Sized>(l: &L, ppd: u32) -> Result<Vec<f64>> {
    Ok(scan(l, ppd)?.1)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::freq::model::TransferModel;

    #[test]
    fn merge_ascending_equals_sorting_the_concatenation() {
        // The reference is the standard library's sort of the two lists joined.
        let mut state = 0x9e37_79b9_7f4a_7c15_u64;
        let mut next = move || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            state
        };
        let special = [0.0, -0.0, 1.0, 1.0, f64::MIN_POSITIVE, 1e9, f64::NAN];
        for case in 0..400 {
            let n = (next() % 40) as usize;
            let m = (next() % 12) as usize;
            let pick = |r: u64| {
                if r % 5 == 0 {
                    special[(r / 5 % special.len() as u64) as usize]
                } else {
                    (r % 1000) as f64 / 7.0
                }
            };
            let mut grid: Vec<f64> = (0..n).map(|_| pick(next())).collect();
            // Most cases an ascending grid as `grid` makes, some not.
            if case % 4 != 0 {
                grid.sort_by(f64::total_cmp);
            }
            let extra: Vec<f64> = (0..m).map(|_| pick(next())).collect();
            let mut want = [grid.clone(), extra.clone()].concat();
            want.sort_by(f64::total_cmp);
            let got = merge_ascending(grid, extra);
            let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
            assert_eq!(bits(&got), bits(&want), "case {case}");
        }
    }

    #[test]
    fn brent_finds_a_simple_root() {
        let g = |x: f64| x * x - 2.0;
        let r = brent(&g, 0.0, 2.0, -2.0, 2.0, 1e-15);
        assert!((r - 2f64.sqrt()).abs() < 1e-14);
    }

    #[test]
    fn integrator_crossing_is_found() {
        // T = 1000·(2π·1 Hz)/s → |T| = 1000/f = 1 at 1000 Hz exactly.
        let l = FeedbackLoop::with_constant_beta(TransferModel::constant(1e3).integrator(), 1.0)
            .unwrap();
        let c = gain_crossings_hz(&l, 10).unwrap();
        assert_eq!(c.len(), 1);
        assert!((c[0] - 1e3).abs() < 1e-8);
        assert!(phase_crossings_hz(&l, 10).unwrap().is_empty());
    }

    #[test]
    fn a_delay_gives_many_phase_crossings() {
        // T = 10·exp(−sτ)/(1 + s/ω): phase crossings above the pole, one per turn.
        let m = TransferModel::constant(10.0).pole(1e3).delay(1e-5);
        let l = FeedbackLoop::with_constant_beta(m, 1.0).unwrap();
        let c = phase_crossings_hz(&l, 40).unwrap();
        assert!(c.len() > 3);
        for &f in &c {
            let p = loop_log(&l, f).deg();
            let k = crate::float::round((p + 180.0) / 360.0);
            assert!(
                (p + 180.0 - 360.0 * k).abs() < 1e-12 * p.abs().max(360.0),
                "phase {p} at {f}"
            );
        }
    }

    #[test]
    fn a_long_delay_before_a_wide_loop_is_bounded() {
        // τ = 1 ms in front of a loop reaching 1 GHz: millions of turns while |T|
        // is still large; refused with the limit instead of looping for ever.
        let m = TransferModel::constant(1e5).pole(1.0).pole(1e9).delay(1e-3);
        let l = FeedbackLoop::with_constant_beta(m, 1.0).unwrap();
        let e = phase_crossings_hz(&l, 40).unwrap_err();
        assert_eq!((e.code(), e.param()), ("too_large", "phase_crossings"));
        // A delay whose turns happen where |T| is tiny is fine.
        let m = TransferModel::constant(10.0)
            .pole(1.0)
            .pole(2.0)
            .pole(3.0)
            .delay(1e-9);
        let l = FeedbackLoop::with_constant_beta(m, 1.0).unwrap();
        assert!(phase_crossings_hz(&l, 40).unwrap().len() < 10);
    }

    #[test]
    fn no_crossover_when_the_loop_gain_stays_below_one() {
        let l =
            FeedbackLoop::with_constant_beta(TransferModel::constant(0.5).pole(1e3).pole(1e4), 1.0)
                .unwrap();
        assert!(gain_crossings_hz(&l, 40).unwrap().is_empty());
    }
}
