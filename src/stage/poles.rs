//! The closed-loop poles of a circuit from its nodal matrices, with a
//! stability verdict.
//!
//! The nodal system is (G + s·C)·x = b, the amplifier elements' poles and
//! zeros realised as internal state ([`crate::circuit`], `amplifier_stamp`),
//! so the circuit's natural frequencies are the finite generalized
//! eigenvalues of the pencil: det(G + s·C) = 0. **Generalized eigenvalues,
//! not the characteristic polynomial**: the polynomial's coefficients span
//! the products of time constants from 1 Hz to 1 GHz and lose the far poles
//! to rounding, while the eigenvalues of the matrices keep each pole's
//! relative accuracy. C is singular (resistive nodes, voltage sources, the
//! amplifier's algebraic output), so the pencil is shifted and inverted:
//! with a real σ where G + σ·C is regular, M = (G + σ·C)⁻¹·C has the
//! eigenvalue μ = −1/(s − σ) for each finite s, and 0 for the infinite ones;
//! μ comes from the QR algorithm ([`super::eigen`]), s = σ − 1/μ. Each pole
//! is then refined by shifted inverse iteration on the pencil itself and kept
//! only when its eigenvector has a backward error below
//! [`POLE_BACKWARD_TOL`] (this drops the rounding images of the infinite
//! eigenvalues, which a singular C with capacitors across voltage-defined
//! branches scatters far out). Source: the shift-and-invert transformation,
//! Y. Saad, *Numerical Methods for Large Eigenvalue Problems*, 2nd ed., SIAM,
//! 2011, ch. 8; inverse iteration and backward error, N. J. Higham, *Accuracy and Stability of Numerical Algorithms*,
//! 2nd ed., SIAM, 2002, ch. 7 (all from memory).
//!
//! Verdict: every pole with Re s < 0 (beyond [`MARGINAL_REL`]·|s|) is stable;
//! a pole on the imaginary axis within that band (or at 0) is marginal; any
//! pole to the right of it is unstable.

use super::eigen::eigenvalues;
use crate::check;
use crate::circuit::lu::{Lu, Pattern};
use crate::circuit::mna::Sweeper;
use crate::circuit::{Circuit, CircuitError, CircuitResult, ElementKind};
use crate::error::Error;
use crate::freq::{Pole, Verdict};
use alloc::vec::Vec;
use core::f64::consts::TAU;
use num_complex::Complex64;

/// An eigenvalue μ of the shifted, inverted pencil counts as infinite (s = ∞)
/// when |μ| ≤ INFINITE_REL·max|μ|: poles more than 1e11 times farther from
/// the shift than the nearest pole are not resolved (1 Hz to 100 GHz).
pub const INFINITE_REL: f64 = 1e-11;
/// Largest backward error (row-equilibrated, normwise) of a pole's eigenvector
/// for the pole to be kept: far above the 1e-15 of a true eigenvalue after
/// refinement, far below the O(1) of a spurious one.
pub const POLE_BACKWARD_TOL: f64 = 1e-8;
/// A pole with |Re s| ≤ MARGINAL_REL·|s| is on the imaginary axis.
pub const MARGINAL_REL: f64 = 1e-9;
/// How far refinement may move a pole, relative: farther means it ran to
/// another pole, and the first estimate is dropped as spurious.
const REFINE_JUMP_REL: f64 = 1e-4;
/// Relative step off a pole at which the pencil is factored when it is
/// singular to working precision at the pole (above the LU's pivot tolerance).
const SHIFT_NUDGE: f64 = 1e-9;
/// Inverse-iteration steps per pole.
const REFINE_STEPS: usize = 5;
/// Shifts tried in turn until G + σ·C is regular, rad/s.
const SHIFTS: [f64; 5] = [0.0, TAU * 1.0, TAU * 1e3, -TAU * 7.0, TAU * 1e6];

/// The poles of a circuit and what they say.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct CircuitPoles {
    /// Poles sorted by natural frequency; complex ones as conjugate pairs.
    pub poles: Vec<Pole>,
    /// Stability verdict.
    pub verdict: Verdict,
    /// The shift σ used, rad/s.
    pub shift: f64,
}

/// The pencil: G (real) and C, n × n row-major.
struct Pencil {
    n: usize,
    g: Vec<f64>,
    c: Vec<f64>,
}

impl Pencil {
    fn at(&self, s: Complex64) -> Vec<Complex64> {
        self.g
            .iter()
            .zip(&self.c)
            .map(|(&g, &c)| Complex64::from(g) + s * c)
            .collect()
    }

    fn c_times(&self, v: &[Complex64]) -> Vec<Complex64> {
        self.c
            .chunks_exact(self.n.max(1))
            .map(|row| row.iter().zip(v).map(|(&c, &x)| x * c).sum())
            .collect()
    }

    /// The backward error of (s, v) on the row-equilibrated pencil:
    /// max_i |((G + sC)·v)_i| / (d_i·‖v‖∞), d_i = max_j (|G_ij| + |s|·|C_ij|).
    fn backward_error(&self, s: Complex64, v: &[Complex64]) -> f64 {
        let n = self.n.max(1);
        let vmax = v.iter().map(|z| z.norm()).fold(0.0, f64::max);
        if vmax.is_nan() || vmax <= 0.0 {
            return f64::INFINITY;
        }
        let mut worst: f64 = 0.0;
        for (grow, crow) in self.g.chunks_exact(n).zip(self.c.chunks_exact(n)) {
            let (mut r, mut d) = (Complex64::new(0.0, 0.0), 0.0f64);
            for ((&g, &c), &x) in grow.iter().zip(crow).zip(v) {
                r += x * (Complex64::from(g) + s * c);
                d = d.max(libm::fabs(g) + s.norm() * libm::fabs(c));
            }
            if d > 0.0 {
                worst = worst.max(r.norm() / (d * vmax));
            }
        }
        worst
    }
}

fn pencil(c: &Circuit) -> CircuitResult<Pencil> {
    if let Some(e) = c
        .elements()
        .iter()
        .find(|e| e.kind() == ElementKind::Admittance && e.value_im() != 0.0)
    {
        return Err(CircuitError::new(
            Error::OutOfDomain {
                param: "element",
                requirement: "a fixed complex admittance is not a circuit element with poles; the pole analysis takes R, L, C, sources and amplifiers",
            },
            e.name(),
        ));
    }
    let sw = Sweeper::new(c)?;
    Ok(Pencil {
        n: sw.lay.size,
        g: sw.g.iter().map(|z| z.re).collect(),
        c: sw.cap.clone(),
    })
}

/// M = (G + σC)⁻¹·C for the first shift σ that makes G + σC regular.
fn shifted_inverse(p: &Pencil) -> CircuitResult<(f64, Vec<f64>)> {
    let n = p.n;
    for sigma in SHIFTS {
        let Ok(lu) = Lu::factor(n, p.at(Complex64::from(sigma))) else {
            continue;
        };
        let mut m = alloc::vec![0.0; n * n];
        for j in 0..n {
            let col: Vec<Complex64> = (0..n)
                .map(|i| Complex64::from(p.c.get(i * n + j).copied().unwrap_or(0.0)))
                .collect();
            for (i, y) in lu.solve(&col).iter().enumerate() {
                if let Some(x) = m.get_mut(i * n + j) {
                    *x = y.re;
                }
            }
        }
        return Ok((sigma, m));
    }
    Err(CircuitError::from(Error::Singular {
        param: "circuit",
        reason: "G + s·C is singular at every trial s: the circuit's equations do not determine its unknowns",
    }))
}

/// Shifted inverse iteration from `s0`; the refined pole if it verifies.
fn refine(p: &Pencil, s0: Complex64, lu: &mut Lu) -> Option<Complex64> {
    let n = p.n;
    let mut s = s0;
    let mut v = alloc::vec![Complex64::new(1.0, 0.0); n];
    // G + shift·C into the shared storage, factored on the pencil's pattern:
    // the same bits as a fresh Lu::factor, without its allocations, and the
    // elimination of the previous step replayed while its pivots still hold.
    let factor = |lu: &mut Lu, shift: Complex64| {
        for (a, (&g, &c)) in lu.matrix_mut().iter_mut().zip(p.g.iter().zip(&p.c)) {
            *a = Complex64::from(g) + shift * c;
        }
        lu.factor_pattern()
    };
    for step in 0..REFINE_STEPS {
        // At the pole itself the pencil is singular to working precision:
        // factor a hair away from it (the iteration converges all the same).
        let mut shift = s;
        if factor(lu, shift).is_err() {
            shift = s * (1.0 + SHIFT_NUDGE);
            if factor(lu, shift).is_err() {
                break;
            }
        }
        let y = lu.solve(&p.c_times(&v));
        let norm = y.iter().map(|z| z.norm()).fold(0.0, f64::max);
        if !(norm > 0.0 && norm.is_finite()) {
            break;
        }
        if step > 0 {
            // v is an eigenvector estimate: (G + sC)⁻¹C·v = μ·v, λ = s − 1/μ.
            let num: Complex64 = v.iter().zip(&y).map(|(a, b)| a.conj() * b).sum();
            let den: f64 = v.iter().map(|a| a.norm_sqr()).sum();
            let mu = num / den;
            if mu.norm() > 0.0 {
                s = shift - 1.0 / mu;
            }
        }
        v = y.iter().map(|z| z / norm).collect();
    }
    let moved = (s - s0).norm() <= REFINE_JUMP_REL * s0.norm().max(1e-300);
    (moved && s.re.is_finite() && s.im.is_finite() && p.backward_error(s, &v) <= POLE_BACKWARD_TOL)
        .then_some(s)
}

fn pole(s: Complex64) -> Pole {
    let mag = s.norm();
    let zeta = if mag > 0.0 { -s.re / mag } else { 0.0 };
    Pole {
        re: s.re,
        im: s.im,
        natural_hz: mag / TAU,
        zeta,
        q: (s.im != 0.0 && zeta > 0.0).then(|| 1.0 / (2.0 * zeta)),
    }
}

fn verdict(poles: &[Pole]) -> Verdict {
    let mut v = Verdict::Stable;
    for p in poles {
        let mag = libm::hypot(p.re, p.im);
        if p.re > MARGINAL_REL * mag {
            return Verdict::Unstable;
        }
        if p.re >= -MARGINAL_REL * mag {
            v = Verdict::Marginal;
        }
    }
    v
}

/// The closed-loop poles of a circuit (independent sources at zero: voltage
/// sources short, current sources open) and the stability verdict.
///
/// # Errors
/// A fixed complex admittance in the circuit (param `element`, named); a
/// circuit whose equations are singular at every trial shift (param
/// `circuit`); the QR iteration not settling (param `poles`); the circuit's
/// layout errors (unknown control elements).
///
/// # Example
/// ```
/// use loopwright::circuit::Circuit;
/// use loopwright::stage::poles::circuit_poles;
/// use loopwright::freq::Verdict;
/// // R = 1 kΩ, C = 1 µF: one pole at −1/(RC) = −1000 rad/s.
/// let mut c = Circuit::new();
/// c.voltage_source("V1", "in", "0", 1.0).unwrap();
/// c.resistor("R1", "in", "out", 1e3).unwrap();
/// c.capacitor("C1", "out", "0", 1e-6).unwrap();
/// let p = circuit_poles(&c).unwrap();
/// assert_eq!(p.poles.len(), 1);
/// assert!((p.poles[0].re + 1000.0).abs() < 1e-9);
/// assert_eq!(p.verdict, Verdict::Stable);
/// ```
pub fn circuit_poles(c: &Circuit) -> CircuitResult<CircuitPoles> {
    let p = pencil(c)?;
    let (sigma, m) = shifted_inverse(&p)?;
    let mu = eigenvalues(p.n, &m)?;
    let largest = mu.iter().map(|z| z.norm()).fold(0.0, f64::max);
    let mut poles = Vec::new();
    let pattern = Pattern::from_fn(p.n, |i| {
        p.g.get(i).is_some_and(|&g| g != 0.0) || p.c.get(i).is_some_and(|&c| c != 0.0)
    });
    let mut lu = Lu::with_pattern(pattern);
    for z in mu
        .iter()
        .filter(|z| z.norm() > INFINITE_REL * largest && z.im >= 0.0)
    {
        let s0 = Complex64::from(sigma) - 1.0 / z;
        if let Some(s) = refine(&p, s0, &mut lu) {
            let s = check::result_complex("poles", s)?;
            poles.push(pole(s));
            if z.im > 0.0 {
                poles.push(pole(s.conj()));
            }
        }
    }
    crate::sort::sort_by(&mut poles, |a, b| {
        a.natural_hz
            .total_cmp(&b.natural_hz)
            .then(a.im.total_cmp(&b.im))
    });
    Ok(CircuitPoles {
        verdict: verdict(&poles),
        poles,
        shift: sigma,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::freq::{closed_loop_poles, FeedbackLoop};
    use crate::stage::{Amplifier, Spread, SpreadPoint};

    #[test]
    fn series_rlc_gives_its_textbook_pair() {
        // Series RLC: s² + (R/L)s + 1/(LC) = 0 (any circuits text).
        let (r, l, cap) = (10.0, 1e-3, 1e-6);
        let mut c = Circuit::new();
        c.voltage_source("V1", "a", "0", 1.0).unwrap();
        c.resistor("R1", "a", "b", r).unwrap();
        c.inductor("L1", "b", "o", l).unwrap();
        c.capacitor("C1", "o", "0", cap).unwrap();
        let p = circuit_poles(&c).unwrap();
        assert_eq!(p.poles.len(), 2);
        let alpha = r / (2.0 * l);
        let wd = libm::sqrt(1.0 / (l * cap) - alpha * alpha);
        for q in &p.poles {
            assert!((q.re + alpha).abs() < 1e-9 * alpha);
            assert!((q.im.abs() - wd).abs() < 1e-9 * wd);
        }
    }

    #[test]
    fn a_follower_has_the_poles_of_one_plus_a() {
        // Ideal follower: the closed-loop poles are the roots of 1 + A(s) = 0;
        // the freq area finds them as polynomial roots (an independent route).
        let amp = Amplifier::from_gbw(Spread::fixed(2e5), 1e7)
            .with_pole(3e7)
            .with_complex_pole(8e7, 1.2);
        let mut c = Circuit::new();
        c.voltage_source("Vs", "in", "0", 1.0).unwrap();
        c.amplifier("U1", "out", "0", "in", "out", amp.clone(), SpreadPoint::Typ)
            .unwrap();
        let got = circuit_poles(&c).unwrap();
        let l =
            FeedbackLoop::with_constant_beta(amp.transfer_model(SpreadPoint::Typ).unwrap(), 1.0)
                .unwrap();
        let want = closed_loop_poles(&l).unwrap();
        assert_eq!(got.poles.len(), want.poles.len());
        assert_eq!(got.verdict, want.verdict);
        for (g, w) in got.poles.iter().zip(&want.poles) {
            let d = libm::hypot(g.re - w.re, g.im - w.im);
            // Polynomial roots of a degree-4 characteristic equation: 1e-9 relative.
            assert!(d < 1e-9 * libm::hypot(w.re, w.im), "{g:?} vs {w:?}");
        }
    }

    #[test]
    fn an_ideal_source_driving_a_capacitor_has_no_spurious_poles() {
        // Ro = 0 with a load capacitor straight across the output: C across a
        // voltage-defined branch (an index-2 pencil). One amplifier pole, β = 1:
        // a single closed-loop pole at −ωp·(1 + A0).
        let amp = Amplifier::from_dominant_pole(Spread::fixed(1e4), 100.0);
        let mut c = Circuit::new();
        c.voltage_source("Vs", "in", "0", 1.0).unwrap();
        c.amplifier("U1", "out", "0", "in", "out", amp, SpreadPoint::Typ)
            .unwrap();
        c.capacitor("Cl", "out", "0", 1e-6).unwrap();
        let p = circuit_poles(&c).unwrap();
        assert_eq!(p.poles.len(), 1, "{:?}", p.poles);
        let want = -TAU * 100.0 * (1.0 + 1e4);
        assert!((p.poles[0].re - want).abs() < 1e-9 * want.abs());
        assert_eq!(p.verdict, Verdict::Stable);
    }

    #[test]
    fn positive_feedback_is_unstable() {
        // Output fed to the + input through a divider with gain above 1/A0:
        // a real right-half-plane pole.
        let amp = Amplifier::from_gbw(Spread::fixed(1e3), 1e6);
        let mut c = Circuit::new();
        c.amplifier("U1", "out", "0", "fb", "0", amp, SpreadPoint::Typ)
            .unwrap();
        c.resistor("R1", "out", "fb", 9e3).unwrap();
        c.resistor("R2", "fb", "0", 1e3).unwrap();
        let p = circuit_poles(&c).unwrap();
        assert_eq!(p.verdict, Verdict::Unstable);
        // s = ωp·(A0·β − 1) with β = 0.1: 2π·1 kHz·99.
        let want = TAU * 1e3 * 99.0;
        assert!((p.poles[0].re - want).abs() < 1e-9 * want);
    }
}
