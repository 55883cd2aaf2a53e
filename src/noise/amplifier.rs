//! The noise of an op-amp: an input voltage noise density and an input current
//! noise density, each white with an optional 1/f (flicker) corner.
//!
//! e_n(f)² = e_n²·(1 + f_ce/f),  i_n(f)² = i_n²·(1 + f_ci/f)
//!
//! where e_n, i_n are the white (high-frequency) densities from the data sheet and
//! f_ce, f_ci the frequencies where the 1/f part equals the white part (0 for none).
//! The current noise is taken as equal and uncorrelated at both inputs.
//!
//! Source: the usual data-sheet model, e.g. Motchenbacher & Connelly,
//! *Low-Noise Electronic System Design*, 1993, ch. 1 (from memory).

use crate::check;
use crate::error::Result;

/// The input noise of an op-amp.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct AmplifierNoise {
    /// White input voltage noise density e_n, V/√Hz.
    pub voltage_density: f64,
    /// 1/f corner of the voltage noise, Hz (0: none).
    pub voltage_corner_hz: f64,
    /// White input current noise density i_n at each input, A/√Hz.
    pub current_density: f64,
    /// 1/f corner of the current noise, Hz (0: none).
    pub current_corner_hz: f64,
}

fn with_corner(white: f64, corner: f64, f: f64) -> f64 {
    let w2 = white * white;
    if corner == 0.0 {
        w2
    } else {
        w2 * (1.0 + corner / f)
    }
}

impl AmplifierNoise {
    /// A checked amplifier noise model.
    ///
    /// # Errors
    /// Any value not finite or negative (named `voltage_density`,
    /// `voltage_corner_hz`, `current_density`, `current_corner_hz`).
    ///
    /// # Example
    /// ```
    /// use loopwright::noise::AmplifierNoise;
    /// // 4 nV/√Hz with a 10 Hz corner, 0.5 pA/√Hz with a 200 Hz corner.
    /// let amp = AmplifierNoise::new(4e-9, 10.0, 0.5e-12, 200.0).unwrap();
    /// assert!((amp.voltage_density_at(10.0) - 4e-9 * 2f64.sqrt()).abs() < 1e-24);
    /// assert_eq!(AmplifierNoise::new(-4e-9, 0.0, 0.0, 0.0).unwrap_err().param(), "voltage_density");
    /// ```
    pub fn new(
        voltage_density: f64,
        voltage_corner_hz: f64,
        current_density: f64,
        current_corner_hz: f64,
    ) -> Result<Self> {
        Ok(AmplifierNoise {
            voltage_density: check::non_negative("voltage_density", voltage_density)?,
            voltage_corner_hz: check::non_negative("voltage_corner_hz", voltage_corner_hz)?,
            current_density: check::non_negative("current_density", current_density)?,
            current_corner_hz: check::non_negative("current_corner_hz", current_corner_hz)?,
        })
    }

    /// True when either density has a 1/f part (the integral must then start
    /// above 0 Hz).
    pub fn has_flicker(&self) -> bool {
        (self.voltage_corner_hz > 0.0 && self.voltage_density > 0.0)
            || (self.current_corner_hz > 0.0 && self.current_density > 0.0)
    }

    /// e_n(f)², V²/Hz. `f` > 0 Hz when there is a voltage corner.
    pub fn voltage_psd_at(&self, f: f64) -> f64 {
        with_corner(self.voltage_density, self.voltage_corner_hz, f)
    }

    /// i_n(f)², A²/Hz. `f` > 0 Hz when there is a current corner.
    pub fn current_psd_at(&self, f: f64) -> f64 {
        with_corner(self.current_density, self.current_corner_hz, f)
    }

    /// e_n(f) = e_n·√(1 + f_ce/f), V/√Hz.
    pub fn voltage_density_at(&self, f: f64) -> f64 {
        crate::float::sqrt(self.voltage_psd_at(f))
    }

    /// i_n(f) = i_n·√(1 + f_ci/f), A/√Hz.
    pub fn current_density_at(&self, f: f64) -> f64 {
        crate::float::sqrt(self.current_psd_at(f))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn at_the_corner_the_density_is_root_two_times_white() {
        // Definition of the 1/f corner: the 1/f and white powers are equal there.
        let amp = AmplifierNoise::new(10e-9, 100.0, 1e-12, 1e3).unwrap();
        assert!((amp.voltage_density_at(100.0) / 10e-9 - 2f64.sqrt()).abs() < 1e-15);
        assert!((amp.current_density_at(1e3) / 1e-12 - 2f64.sqrt()).abs() < 1e-15);
        // Ten times above the corner the excess is 5 %.
        assert!((amp.voltage_density_at(1e3) / 10e-9 - 1.1f64.sqrt()).abs() < 1e-15);
        assert!(amp.has_flicker());
    }

    #[test]
    fn without_corners_it_is_white_down_to_zero() {
        let amp = AmplifierNoise::new(3e-9, 0.0, 2e-12, 0.0).unwrap();
        assert_eq!(amp.voltage_psd_at(0.0), 9e-18);
        assert!(!amp.has_flicker());
    }

    #[test]
    fn bad_inputs_are_named() {
        assert_eq!(
            AmplifierNoise::new(1e-9, -1.0, 0.0, 0.0)
                .unwrap_err()
                .param(),
            "voltage_corner_hz"
        );
        assert_eq!(
            AmplifierNoise::new(1e-9, 0.0, f64::NAN, 0.0)
                .unwrap_err()
                .param(),
            "current_density"
        );
        assert_eq!(
            AmplifierNoise::new(1e-9, 0.0, 0.0, f64::INFINITY)
                .unwrap_err()
                .param(),
            "current_corner_hz"
        );
    }
}
