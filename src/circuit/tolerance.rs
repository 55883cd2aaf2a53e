//! The spread of an element's value: a tolerance and a temperature coefficient.
//!
//! Stored and validated with the circuit (document version 2); the tolerance
//! analyses read them. A tolerance is one of
//! - **uniform ±p %**: the value lies anywhere in value·(1 ± p/100), equally likely;
//! - **normal ±p % at k σ**: the value is normal about the nominal with
//!   σ = value·(p/100)/k (a part sold as ±1 % at 3 σ has σ = 0.333 %);
//! - **limits min/typ/max**: the value lies between min and max; typ, when
//!   given, must equal the element's value.
//!
//! The temperature coefficient is in ppm/K: value(T) = value·(1 + tc·10⁻⁶·(T − T0)).

use crate::check;
use crate::error::{Error, Result};

/// Largest tolerance in percent.
pub const MAX_PERCENT: f64 = 100.0;
/// Largest number of sigmas a normal tolerance may state.
pub const MAX_SIGMAS: f64 = 10.0;
/// Largest |temperature coefficient|, ppm/K (a thermistor is a few 10⁴).
pub const MAX_TEMPCO_PPM: f64 = 1e6;
/// How closely a stated typ must equal the element's value, relative: the same
/// number written two ways (4k7 and 4.7e3) reads to the same f64, so only
/// rounding of the writer's text is allowed for.
const TYP_MATCH_REL: f64 = 1e-12;

/// The spread of one element's value.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(
    feature = "serde",
    serde(tag = "distribution", rename_all = "camelCase")
)]
pub enum Tolerance {
    /// ±`percent` %, uniformly distributed.
    Uniform {
        /// Half-width, % of the value (0 … 100).
        percent: f64,
    },
    /// ±`percent` % at `sigmas` standard deviations, normally distributed.
    Normal {
        /// The stated limit, % of the value (0 … 100).
        percent: f64,
        /// How many σ the limit is (> 0, ≤ 10).
        sigmas: f64,
    },
    /// Between `min` and `max` (in the element's unit).
    Limits {
        /// Lowest value.
        min: f64,
        /// Typical value: the element's own value.
        typ: f64,
        /// Highest value.
        max: f64,
    },
}

/// The distribution names of the document.
pub const DISTRIBUTION_NAMES: &str = "uniform, normal, limits";

impl Tolerance {
    /// The document name of the distribution.
    pub const fn name(&self) -> &'static str {
        match self {
            Tolerance::Uniform { .. } => "uniform",
            Tolerance::Normal { .. } => "normal",
            Tolerance::Limits { .. } => "limits",
        }
    }

    /// Check the tolerance against the element's `value`.
    ///
    /// # Errors
    /// Param `tolerance`: a percent outside 0 … 100, sigmas not in (0, 10],
    /// limits not finite, min above typ or typ above max, or typ not the value.
    ///
    /// # Example
    /// ```
    /// use loopwright::circuit::tolerance::Tolerance;
    /// assert!(Tolerance::Normal { percent: 1.0, sigmas: 3.0 }.validate(4700.0).is_ok());
    /// let e = Tolerance::Uniform { percent: 120.0 }.validate(4700.0).unwrap_err();
    /// assert_eq!(e.param(), "tolerance");
    /// ```
    pub fn validate(&self, value: f64) -> Result<()> {
        const P: &str = "tolerance";
        let percent = |p: f64| -> Result<()> {
            if check::finite(P, p)? < 0.0 || p > MAX_PERCENT {
                return Err(Error::OutOfDomain {
                    param: P,
                    requirement: "percent must be from 0 to 100",
                });
            }
            Ok(())
        };
        match *self {
            Tolerance::Uniform { percent: p } => percent(p),
            Tolerance::Normal { percent: p, sigmas } => {
                percent(p)?;
                if check::finite(P, sigmas)? <= 0.0 || sigmas > MAX_SIGMAS {
                    return Err(Error::OutOfDomain {
                        param: P,
                        requirement: "sigmas must be greater than 0 and at most 10",
                    });
                }
                Ok(())
            }
            Tolerance::Limits { min, typ, max } => {
                for v in [min, typ, max] {
                    check::finite(P, v)?;
                }
                if !(min <= typ && typ <= max) {
                    return Err(Error::OutOfDomain {
                        param: P,
                        requirement: "limits must be in order min ≤ typ ≤ max",
                    });
                }
                if (typ - value).abs() > TYP_MATCH_REL * value.abs() {
                    return Err(Error::OutOfDomain {
                        param: P,
                        requirement: "typ must equal the element's value",
                    });
                }
                Ok(())
            }
        }
    }
}

/// Check a temperature coefficient, ppm/K.
///
/// # Errors
/// Param `tempco`: not finite, or |tc| above [`MAX_TEMPCO_PPM`].
pub fn validate_tempco(ppm_per_k: f64) -> Result<()> {
    if check::finite("tempco", ppm_per_k)?.abs() > MAX_TEMPCO_PPM {
        return Err(Error::OutOfDomain {
            param: "tempco",
            requirement: "must be within ±1e6 ppm/K",
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn each_kind_validates_and_refuses() {
        assert!(Tolerance::Uniform { percent: 0.0 }.validate(1.0).is_ok());
        assert!(Tolerance::Uniform { percent: -1.0 }.validate(1.0).is_err());
        assert!(Tolerance::Normal {
            percent: 5.0,
            sigmas: 0.0
        }
        .validate(1.0)
        .is_err());
        let lim = Tolerance::Limits {
            min: 90.0,
            typ: 100.0,
            max: 110.0,
        };
        assert!(lim.validate(100.0).is_ok());
        assert!(lim.validate(101.0).is_err());
        assert!(Tolerance::Limits {
            min: 120.0,
            typ: 100.0,
            max: 110.0
        }
        .validate(100.0)
        .is_err());
        assert_eq!(
            Tolerance::Uniform { percent: f64::NAN }
                .validate(1.0)
                .unwrap_err()
                .code(),
            "not_finite"
        );
        assert!(validate_tempco(-150.0).is_ok());
        assert_eq!(validate_tempco(2e6).unwrap_err().param(), "tempco");
    }
}
