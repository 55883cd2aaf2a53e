//! The adjoint (transposed) nodal system: one solve per frequency gives the
//! transfer from every source to the output.
//!
//! The circuit is M·x = b with M = G + s·C. The output is y = cᵀ·x, so
//! y = cᵀ·M⁻¹·b = zᵀ·b with Mᵀ·z = c: z holds, in each row, the output per
//! unit of right-hand side in that row. A current i from node a to node b
//! (b = …, −i at a, +i at b) reaches the output as (z_b − z_a)·i; the
//! amplifier's voltage noise e enters the row of its first state as A0·e.
//! This is Tellegen's theorem in matrix form (the adjoint network): one
//! factorisation and one solve serve every source. Source: S. W. Director &
//! R. A. Rohrer, "The generalized adjoint network and network sensitivities",
//! IEEE Trans. Circuit Theory 16(3), 1969; Vlach & Singhal, *Computer Methods
//! for Circuit Analysis and Design*, 2nd ed., ch. 6 (both from memory).
//!
//! The transposed matrix is factored by the same LU with partial pivoting and
//! equilibration ([`crate::circuit::lu`]) and refined once, as the forward
//! solver does, in the sweeper's storage for it
//! ([`Sweeper::solve_transposed_into`]: no allocation per frequency, and the
//! elimination of one frequency replayed at the next).

use super::output::Selector;
use crate::circuit::mna::Sweeper;
use crate::circuit::{Circuit, CircuitError, CircuitResult};
use crate::error::Error;
use alloc::vec::Vec;
use core::f64::consts::TAU;
use num_complex::Complex64;

/// A circuit laid out once, solved transposed at any frequency.
pub(crate) struct Adjoint<'a> {
    pub sweeper: Sweeper<'a>,
    checked: bool,
}

impl<'a> Adjoint<'a> {
    /// Lay out and assemble G and C.
    ///
    /// # Errors
    /// As [`crate::circuit::solve`]: an unknown control element.
    pub fn new(c: &'a Circuit) -> CircuitResult<Adjoint<'a>> {
        Ok(Adjoint {
            sweeper: Sweeper::new(c)?,
            checked: false,
        })
    }

    /// z with Mᵀ(f)·z = c(f), for f > 0.
    ///
    /// The first call also solves the circuit forward once, so that a
    /// floating node, a loop of voltage sources or a singular system is
    /// reported with the forward solver's names.
    ///
    /// # Errors
    /// `frequency_hz` not greater than zero (param `frequencies_hz`); the
    /// circuit's faults as [`crate::circuit::solve`]; a non-finite solution.
    pub fn solve(
        &mut self,
        frequency_hz: f64,
        selector: &Selector,
    ) -> CircuitResult<Vec<Complex64>> {
        if !(frequency_hz > 0.0 && frequency_hz.is_finite()) {
            return Err(CircuitError::from(Error::OutOfDomain {
                param: "frequencies_hz",
                requirement: "each frequency must be finite and greater than zero",
            }));
        }
        if !self.checked {
            self.sweeper.solve_at(frequency_hz)?;
            self.checked = true;
        }
        let w = TAU * frequency_hz;
        let rhs = selector.at(w);
        let mut z = alloc::vec![Complex64::default(); self.sweeper.lay.size];
        self.sweeper
            .solve_transposed_into(w, &rhs, &mut z)
            .map_err(|_| {
                CircuitError::from(Error::Singular {
                    param: "frequencies_hz",
                    reason: "the circuit equations are singular at this frequency (a resonance without loss?)",
                })
            })?;
        if z.iter().all(|v| v.re.is_finite() && v.im.is_finite()) {
            Ok(z)
        } else {
            Err(CircuitError::from(Error::Overflow { param: "transfer" }))
        }
    }
}
