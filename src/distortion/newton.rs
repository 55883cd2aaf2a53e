//! Solving the closed loop y = A(x − β·y) point by point, with a guarded Newton
//! iteration.
//!
//! With the error signal u = x − β·y the loop equation becomes one equation in u:
//!
//!   g(u) = u + β·A(u) − x = 0,   g'(u) = 1 + β·A'(u),   y = A(u),
//!
//! for A(u) = a1·u + a2·u² + a3·u³. At u = 0, g' = D = 1 + a1·β > 0. The physical
//! solution is the one on the branch through the origin: the interval around u = 0
//! on which g' > 0 (its ends are the roots of the quadratic g'). On that interval g
//! is strictly increasing, so an input x has exactly one solution there when
//! g(u_lo) < x < g(u_hi), and none otherwise: past those inputs the closed-loop
//! transfer curve folds (hysteresis), and the cubic model no longer describes a
//! real amplifier. Such inputs get [`Error::NoConvergence`], never a number from
//! another branch.
//!
//! The iteration keeps a bracket [lo, hi] with g(lo) < 0 < g(hi) and takes the
//! Newton step only when it lands strictly inside the bracket; otherwise it
//! bisects (the safeguarded Newton method, "rtsafe", of Press et al., *Numerical
//! Recipes*, 3rd ed., section 9.4, from memory). Convergence is declared when the
//! residual is at rounding level or the bracket has shrunk to a few ulps.

use super::series::{return_difference, PowerSeries};
use crate::check;
use crate::error::{Error, Result};

/// Most iterations of one solve. Bisection alone halves the bracket each step, so
/// 400 steps reach a few ulps from any finite bracket in f64.
pub const MAX_ITERATIONS: usize = 400;

/// Most doublings when an end of the monotonic interval is unbounded.
const MAX_DOUBLINGS: usize = 1100;

/// The loop y = A(x − β·y) for one amplifier and one β, ready to solve at many x.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LoopSolver {
    amp: PowerSeries,
    beta: f64,
    /// The ends of the monotonic interval of g around u = 0 (±∞ when unbounded).
    u_lo: f64,
    u_hi: f64,
    /// g(u_lo) + x and g(u_hi) + x: the inputs at the fold (±∞ when none).
    x_lo: f64,
    x_hi: f64,
}

/// Roots of c0 + c1·u + c2·u² nearest to zero on each side, for c0 > 0:
/// the interval around 0 where the quadratic stays positive.
fn positive_interval(c0: f64, c1: f64, c2: f64) -> (f64, f64) {
    let inf = f64::INFINITY;
    if c2 == 0.0 {
        if c1 == 0.0 {
            (-inf, inf)
        } else {
            let r = -c0 / c1;
            if r > 0.0 {
                (-inf, r)
            } else {
                (r, inf)
            }
        }
    } else {
        let disc = c1 * c1 - 4.0 * c0 * c2;
        if disc < 0.0 {
            // Only possible with c2 > 0: positive everywhere.
            return (-inf, inf);
        }
        // Stable pair of roots: q = −(c1 + sign(c1)·√disc)/2, r1 = q/c2, r2 = c0/q.
        let s = crate::float::sqrt(disc);
        let q = -0.5 * (c1 + if c1 >= 0.0 { s } else { -s });
        let (r1, r2) = if q == 0.0 {
            (0.0, 0.0)
        } else {
            (q / c2, c0 / q)
        };
        let (lo, hi) = if r1 < r2 { (r1, r2) } else { (r2, r1) };
        if c2 < 0.0 {
            // c0/c2 < 0: one root each side of zero.
            (lo, hi)
        } else if lo > 0.0 {
            (-inf, lo)
        } else {
            (hi, inf)
        }
    }
}

impl LoopSolver {
    /// Prepare the solve for amplifier `amp` in a loop with feedback factor `beta`.
    ///
    /// # Errors
    /// As [`return_difference`]: `beta` not finite, D = 1 + a1·β ≤ 0.
    ///
    /// # Example
    /// ```
    /// use loopwright::distortion::{LoopSolver, PowerSeries};
    /// let amp = PowerSeries::new(1000.0, 0.0, -1000.0).unwrap();
    /// let solver = LoopSolver::new(&amp, 0.01).unwrap();
    /// let y = solver.output(0.05).unwrap();
    /// // y = A(x − β·y) holds at the solution.
    /// assert!((y - amp.output(0.05 - 0.01 * y)).abs() < 1e-12);
    /// // Far past the fold of the transfer curve there is no solution on the branch.
    /// assert_eq!(solver.output(1e3).unwrap_err().code(), "no_convergence");
    /// ```
    pub fn new(amp: &PowerSeries, beta: f64) -> Result<Self> {
        let d = return_difference(amp, beta)?;
        let (u_lo, u_hi) = positive_interval(d, 2.0 * beta * amp.a2, 3.0 * beta * amp.a3);
        let fold = |u: f64| {
            if u.is_finite() {
                u + beta * amp.output(u)
            } else {
                u
            }
        };
        let x_lo = fold(u_lo);
        let x_hi = fold(u_hi);
        Ok(LoopSolver {
            amp: *amp,
            beta,
            u_lo,
            u_hi,
            x_lo: if x_lo.is_nan() { -f64::INFINITY } else { x_lo },
            x_hi: if x_hi.is_nan() { f64::INFINITY } else { x_hi },
        })
    }

    /// The largest peak amplitude of a signal symmetric about zero that stays on
    /// the branch through the origin: min(−x_lo, x_hi), +∞ when the curve never
    /// folds.
    pub fn max_input_amplitude(&self) -> f64 {
        let m = if -self.x_lo < self.x_hi {
            -self.x_lo
        } else {
            self.x_hi
        };
        if m.is_nan() {
            f64::INFINITY
        } else {
            m
        }
    }

    fn g(&self, u: f64, x: f64) -> f64 {
        u + self.beta * self.amp.output(u) - x
    }

    /// The error signal u at input x, the root of g(u) = u + β·A(u) − x.
    ///
    /// `param` names the input in errors.
    ///
    /// # Errors
    /// `x` not finite; [`Error::NoConvergence`] when x lies past the fold of the
    /// closed-loop curve or the iteration limit is reached.
    pub fn error_signal(&self, x: f64, param: &'static str) -> Result<f64> {
        let x = check::finite(param, x)?;
        if x == 0.0 {
            return Ok(0.0);
        }
        if !(self.x_lo < x && x < self.x_hi) {
            return Err(Error::NoConvergence {
                param,
                reason: "the input lies past the fold of the closed-loop transfer curve, where the cubic model has no solution on the branch through zero",
            });
        }
        let d = 1.0 + self.amp.a1 * self.beta;
        // Bracket: g(0) = −x, so zero is one end; find the other inside (u_lo, u_hi).
        let (mut lo, mut hi) = if x > 0.0 {
            (0.0, self.u_hi)
        } else {
            (self.u_lo, 0.0)
        };
        if !lo.is_finite() || !hi.is_finite() {
            // Expand from the linear estimate until g changes sign.
            let mut step = libm::fabs(x / d);
            let mut found = false;
            for _ in 0..MAX_DOUBLINGS {
                let u = if x > 0.0 { step } else { -step };
                let gu = self.g(u, x);
                if !gu.is_finite() {
                    break;
                }
                if (x > 0.0 && gu > 0.0) || (x < 0.0 && gu < 0.0) {
                    if x > 0.0 {
                        hi = u;
                    } else {
                        lo = u;
                    }
                    found = true;
                    break;
                }
                step *= 2.0;
            }
            if !found {
                return Err(Error::NoConvergence {
                    param,
                    reason: "no bracket for the error signal was found in range",
                });
            }
        }
        let mut u = x / d;
        if !(lo < u && u < hi) {
            u = 0.5 * (lo + hi);
        }
        for _ in 0..MAX_ITERATIONS {
            let gu = self.g(u, x);
            let scale = libm::fabs(u) + libm::fabs(self.beta * self.amp.output(u)) + libm::fabs(x);
            if libm::fabs(gu) <= 2.0 * f64::EPSILON * scale {
                return Ok(u);
            }
            if gu < 0.0 {
                lo = u;
            } else {
                hi = u;
            }
            if hi - lo <= 4.0 * f64::EPSILON * (libm::fabs(lo) + libm::fabs(hi)) {
                return Ok(0.5 * (lo + hi));
            }
            let slope = 1.0 + self.beta * self.amp.slope(u);
            let newton = u - gu / slope;
            u = if slope > 0.0 && lo < newton && newton < hi {
                newton
            } else {
                0.5 * (lo + hi)
            };
        }
        Err(Error::NoConvergence {
            param,
            reason: "the Newton iteration reached its limit of 400 steps",
        })
    }

    /// The closed-loop output y at input x: y = A(u) with u from [`Self::error_signal`].
    ///
    /// # Errors
    /// As [`Self::error_signal`] (with `x` as the parameter name).
    pub fn output(&self, x: f64) -> Result<f64> {
        self.output_named(x, "x")
    }

    /// As [`Self::output`], naming the input `param` in errors.
    ///
    /// # Errors
    /// As [`Self::error_signal`].
    pub fn output_named(&self, x: f64, param: &'static str) -> Result<f64> {
        let u = self.error_signal(x, param)?;
        check::result("output", self.amp.output(u))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn residual(amp: &PowerSeries, beta: f64, x: f64, y: f64) -> f64 {
        y - amp.output(x - beta * y)
    }

    #[test]
    fn solves_the_loop_equation_on_both_sides_of_zero() {
        // Identity: the residual of y = A(x − β·y) at the answer is at rounding level.
        let amp = PowerSeries::new(800.0, 120.0, -300.0).unwrap();
        let beta = 0.02;
        let s = LoopSolver::new(&amp, beta).unwrap();
        for &x in &[-1.0, -0.3, -1e-6, 1e-9, 0.01, 0.4, 1.0] {
            let y = s.output(x).unwrap();
            assert!(
                residual(&amp, beta, x, y).abs() < 1e-12 * (1.0 + y.abs()),
                "x={x}"
            );
        }
    }

    #[test]
    fn open_loop_is_the_polynomial_itself() {
        // Identity: β = 0 gives y = A(x) and no fold.
        let amp = PowerSeries::new(3.0, 2.0, 1.0).unwrap();
        let s = LoopSolver::new(&amp, 0.0).unwrap();
        assert!((s.output(0.7).unwrap() - amp.output(0.7)).abs() < 1e-15);
        assert_eq!(s.max_input_amplitude(), f64::INFINITY);
    }

    #[test]
    fn expansive_curve_without_fold_expands_its_bracket() {
        // a3 > 0 and a2 small: g' > 0 everywhere, any input has a solution.
        let amp = PowerSeries::new(100.0, 1.0, 50.0).unwrap();
        let s = LoopSolver::new(&amp, 0.1).unwrap();
        let y = s.output(1e4).unwrap();
        assert!(residual(&amp, 0.1, 1e4, y).abs() < 1e-10 * y.abs());
    }

    #[test]
    fn fold_is_reported_not_crossed() {
        // Compressive cubic: g'(u) = 1 + β(a1 + 3a3u²) vanishes at |u| = √((1+a1β)/(3β|a3|)).
        let amp = PowerSeries::new(100.0, 0.0, -100.0).unwrap();
        let beta = 0.1;
        let s = LoopSolver::new(&amp, beta).unwrap();
        let u_fold = ((1.0 + 10.0) / (3.0 * 0.1 * 100.0f64)).sqrt();
        let x_fold = u_fold + beta * amp.output(u_fold);
        assert!((s.max_input_amplitude() / x_fold - 1.0).abs() < 1e-14);
        assert!(s.output(0.999 * x_fold).is_ok());
        let e = s.output(1.001 * x_fold).unwrap_err();
        assert_eq!((e.code(), e.param()), ("no_convergence", "x"));
        assert_eq!(s.output(f64::NAN).unwrap_err().code(), "not_finite");
    }

    #[test]
    fn interval_of_a_quadratic() {
        // 1 − u²: positive on (−1, 1).
        assert_eq!(positive_interval(1.0, 0.0, -1.0), (-1.0, 1.0));
        // 2 − 3u + u² = (u − 1)(u − 2): positive below 1 around 0.
        assert_eq!(positive_interval(2.0, -3.0, 1.0), (f64::NEG_INFINITY, 1.0));
        // 1 + 2u: positive above −1/2.
        assert_eq!(positive_interval(1.0, 2.0, 0.0), (-0.5, f64::INFINITY));
    }
}
