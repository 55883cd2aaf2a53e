//! Input and output impedance with feedback, per topology.
//!
//! With D = 1 + A·β (A and β as phasors at the frequency of interest):
//! - series mixing multiplies the input impedance: Zif = Zi·D;
//! - shunt mixing divides it: Zif = Zi / D;
//! - voltage (shunt) sampling divides the output impedance: Zof = Zo / D;
//! - current (series) sampling multiplies it: Zof = Zo·D.
//!
//! Zi and Zo are the impedances of the loaded open-loop (A) circuit and A is the
//! gain of that circuit, of the kind the topology needs (short-circuit or
//! open-circuit per the port). These are the ideal-network relations; the loaded
//! two-port analysis lives in the circuit area.
//!
//! Source: Sedra & Smith, *Microelectronic Circuits*, 7th ed., section 10.4 (from
//! memory); Gray, Hurst, Lewis & Meyer, *Analysis and Design of Analog Integrated
//! Circuits*, 5th ed., ch. 8 (from memory).

use super::gain::loop_phasors;
use super::topology::{Mixing, Sampling, Topology};
use crate::check;
use crate::error::Result;
use num_complex::Complex64;

/// Input and output impedance with feedback, in ohms.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FeedbackImpedances {
    /// Input impedance with feedback Zif, Ω.
    pub input: Complex64,
    /// Output impedance with feedback Zof, Ω.
    pub output: Complex64,
    /// The factor D = 1 + A·β that scaled them.
    pub feedback_amount: Complex64,
}

/// Input and output impedance with feedback for phasor A, β and impedances.
///
/// `zi` and `zo` in Ω (complex allowed; resistive part ≥ 0), `a` and `beta` in the
/// topology's units. Zif = Zi·D or Zi/D and Zof = Zo/D or Zo·D, per the module doc.
///
/// # Errors
/// Non-finite parts, `a` = 0, a negative resistive part of `zi` or `zo`,
/// [`crate::Error::Oscillation`] when D = 0.
///
/// # Example
/// ```
/// use loopwright::feedback::{impedances_with_feedback, Topology};
/// use num_complex::Complex64;
/// let r = |x: f64| Complex64::new(x, 0.0);
/// // Voltage amplifier: Zi = 1 MΩ, Zo = 100 Ω, A = 10⁴, β = 0.0999 → D = 1000.
/// let z = impedances_with_feedback(Topology::SeriesShunt, r(1e6), r(100.0), r(1e4), r(0.0999)).unwrap();
/// assert!((z.input.re - 1e9).abs() < 1e-3 && (z.output.re - 0.1).abs() < 1e-12);
/// assert_eq!(
///     impedances_with_feedback(Topology::SeriesShunt, r(-5.0), r(100.0), r(1e4), r(0.1)).unwrap_err().param(),
///     "zi"
/// );
/// ```
pub fn impedances_with_feedback(
    topology: Topology,
    zi: Complex64,
    zo: Complex64,
    a: Complex64,
    beta: Complex64,
) -> Result<FeedbackImpedances> {
    let zi = check::impedance("zi", zi)?;
    let zo = check::impedance("zo", zo)?;
    let d = loop_phasors(a, beta)?.feedback_amount;
    let input = match topology.mixing() {
        Mixing::Series => zi * d,
        Mixing::Shunt => zi / d,
    };
    let output = match topology.sampling() {
        Sampling::Voltage => zo / d,
        Sampling::Current => zo * d,
    };
    Ok(FeedbackImpedances {
        input: check::result_complex("input_impedance", input)?,
        output: check::result_complex("output_impedance", output)?,
        feedback_amount: d,
    })
}

/// Real (resistive) form of [`impedances_with_feedback`]: `ri`, `ro` in Ω (≥ 0),
/// returns (Rif, Rof) in Ω.
///
/// # Errors
/// As [`impedances_with_feedback`].
///
/// # Example
/// ```
/// use loopwright::feedback::{resistances_with_feedback, Topology};
/// // Transresistance stage: Ri = 10 kΩ, Ro = 1 kΩ, A = −10⁵ V/A, β = −10⁻³ A/V → D = 101.
/// let (rif, rof) = resistances_with_feedback(Topology::ShuntShunt, 1e4, 1e3, -1e5, -1e-3).unwrap();
/// assert!((rif - 1e4 / 101.0).abs() < 1e-9 && (rof - 1e3 / 101.0).abs() < 1e-12);
/// assert!(resistances_with_feedback(Topology::ShuntShunt, 1e4, f64::NAN, -1e5, -1e-3).is_err());
/// ```
pub fn resistances_with_feedback(
    topology: Topology,
    ri: f64,
    ro: f64,
    a: f64,
    beta: f64,
) -> Result<(f64, f64)> {
    let z = impedances_with_feedback(
        topology,
        Complex64::new(ri, 0.0),
        Complex64::new(ro, 0.0),
        Complex64::new(a, 0.0),
        Complex64::new(beta, 0.0),
    )?;
    Ok((z.input.re, z.output.re))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn c(re: f64, im: f64) -> Complex64 {
        Complex64::new(re, im)
    }

    #[test]
    fn series_shunt_raises_input_and_lowers_output_by_the_same_factor() {
        // Common practice, no source: series mixing with voltage sampling multiplies
        // Zi and divides Zo by the same 1 + Aβ.
        let (rif, rof) =
            resistances_with_feedback(Topology::SeriesShunt, 2e6, 75.0, 2e5, 0.01).unwrap();
        let d = 1.0 + 2e5 * 0.01;
        assert!((rif / 2e6 - d).abs() < 1e-9 && (75.0 / rof - d).abs() < 1e-9);
    }

    #[test]
    fn each_topology_scales_the_ports_as_its_name_says() {
        let d = 1.0 + 99.0;
        let expect = [
            (Topology::SeriesShunt, 1e3 * d, 1e2 / d),
            (Topology::ShuntSeries, 1e3 / d, 1e2 * d),
            (Topology::SeriesSeries, 1e3 * d, 1e2 * d),
            (Topology::ShuntShunt, 1e3 / d, 1e2 / d),
        ];
        for (t, zif, zof) in expect {
            let (rif, rof) = resistances_with_feedback(t, 1e3, 1e2, 990.0, 0.1).unwrap();
            assert!((rif - zif).abs() <= 1e-9 * zif, "{t}");
            assert!((rof - zof).abs() <= 1e-9 * zof, "{t}");
        }
    }

    #[test]
    fn complex_impedance_with_complex_loop_gain() {
        // Zi = 1 kΩ − j1 kΩ, T = j (90° loop phase): D = 1 + j, Zif = Zi·D = 2 kΩ.
        let z = impedances_with_feedback(
            Topology::SeriesSeries,
            c(1e3, -1e3),
            c(10.0, 0.0),
            c(0.0, 10.0),
            c(0.1, 0.0),
        )
        .unwrap();
        assert!((z.input - c(2e3, 0.0)).norm() < 1e-9);
        assert!((z.output - c(10.0, 10.0)).norm() < 1e-12);
    }

    #[test]
    fn zero_impedance_and_bad_values() {
        let z = resistances_with_feedback(Topology::SeriesShunt, 0.0, 0.0, 10.0, 0.1).unwrap();
        assert_eq!(z, (0.0, 0.0));
        assert_eq!(
            resistances_with_feedback(Topology::SeriesShunt, 1.0, -1.0, 10.0, 0.1)
                .unwrap_err()
                .param(),
            "zo"
        );
        assert_eq!(
            resistances_with_feedback(Topology::SeriesShunt, 1.0, 1.0, -10.0, 0.1)
                .unwrap_err()
                .code(),
            "oscillation"
        );
    }
}
