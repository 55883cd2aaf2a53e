//! Thermal (Johnson–Nyquist) noise of a resistor.
//!
//! A resistor R at absolute temperature T has an open-circuit noise voltage
//! density e = √(4·k·T·R) V/√Hz, or, as a Norton source, a current density
//! i = √(4·k·T/R) A/√Hz, white up to far beyond any amplifier bandwidth.
//! k is the Boltzmann constant, exactly 1.380649 × 10⁻²³ J/K since the 2019
//! redefinition of the SI (BIPM, *The International System of Units*, 9th ed.,
//! 2019).
//!
//! Source: H. Nyquist, "Thermal agitation of electric charge in conductors",
//! Phys. Rev. 32, 1928 (from memory).

use crate::check;
use crate::error::Result;

/// The Boltzmann constant, J/K, exact by definition of the SI (2019).
pub const BOLTZMANN: f64 = 1.380_649e-23;

/// Thermal noise voltage density of a resistor, √(4·k·T·R), V/√Hz.
///
/// `resistance_ohm` ≥ 0 (Ω), `temperature_k` > 0 (K).
///
/// # Errors
/// Non-finite values; a negative resistance; a temperature of zero or below.
///
/// # Example
/// ```
/// use loopwright::noise::thermal_noise_density;
/// // 1 kΩ at 300 K: about 4.07 nV/√Hz.
/// assert!((thermal_noise_density(1e3, 300.0).unwrap() - 4.07e-9).abs() < 0.01e-9);
/// assert_eq!(thermal_noise_density(1e3, -10.0).unwrap_err().param(), "temperature_k");
/// ```
pub fn thermal_noise_density(resistance_ohm: f64, temperature_k: f64) -> Result<f64> {
    let r = check::non_negative("resistance_ohm", resistance_ohm)?;
    let t = check::positive("temperature_k", temperature_k)?;
    check::result(
        "thermal_noise_density",
        crate::float::sqrt(4.0 * BOLTZMANN * t * r),
    )
}

/// Thermal noise current density of a resistor, √(4·k·T/R), A/√Hz.
///
/// `resistance_ohm` > 0 (Ω), `temperature_k` > 0 (K).
///
/// # Errors
/// Non-finite values; a resistance or temperature of zero or below.
///
/// # Example
/// ```
/// use loopwright::noise::thermal_noise_current_density;
/// // 1 kΩ at 300 K: 4.07 nV/√Hz ÷ 1 kΩ = 4.07 pA/√Hz.
/// assert!((thermal_noise_current_density(1e3, 300.0).unwrap() - 4.07e-12).abs() < 0.01e-12);
/// assert_eq!(thermal_noise_current_density(0.0, 300.0).unwrap_err().param(), "resistance_ohm");
/// ```
pub fn thermal_noise_current_density(resistance_ohm: f64, temperature_k: f64) -> Result<f64> {
    let r = check::positive("resistance_ohm", resistance_ohm)?;
    let t = check::positive("temperature_k", temperature_k)?;
    check::result(
        "thermal_noise_current_density",
        crate::float::sqrt(4.0 * BOLTZMANN * t / r),
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_kilohm_at_300_kelvin() {
        // Common practice, no source: 1 kΩ at 300 K ≈ 4.07 nV/√Hz.
        let e = thermal_noise_density(1e3, 300.0).unwrap();
        assert!((e * 1e9 - 4.07).abs() < 0.005, "{e}");
    }

    #[test]
    fn scales_as_the_square_root_of_r_and_t() {
        // Identity: e² ∝ R·T; Norton and Thévenin forms agree, i·R = e.
        let e1 = thermal_noise_density(2.2e3, 310.0).unwrap();
        let e4 = thermal_noise_density(8.8e3, 310.0).unwrap();
        assert!((e4 / e1 - 2.0).abs() < 1e-15);
        let i = thermal_noise_current_density(2.2e3, 310.0).unwrap();
        assert!((i * 2.2e3 / e1 - 1.0).abs() < 1e-15);
        assert_eq!(thermal_noise_density(0.0, 300.0), Ok(0.0));
    }

    #[test]
    fn bad_inputs_are_named() {
        assert_eq!(
            thermal_noise_density(-1.0, 300.0).unwrap_err().param(),
            "resistance_ohm"
        );
        assert_eq!(
            thermal_noise_density(1.0, f64::NAN).unwrap_err().code(),
            "not_finite"
        );
        assert_eq!(
            thermal_noise_density(1.0, 0.0).unwrap_err().param(),
            "temperature_k"
        );
    }
}
