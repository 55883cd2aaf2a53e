//! Input validation shared by every area: each helper returns the value when it is
//! acceptable and an [`Error`] naming the parameter when it is not. Results are
//! passed through [`result`] so that no NaN or infinity ever leaves the crate.

use crate::error::{Error, Result};
use num_complex::Complex64;

/// The value itself when finite.
///
/// # Errors
/// [`Error::NotFinite`] for NaN and ±∞.
pub fn finite(param: &'static str, x: f64) -> Result<f64> {
    if x.is_finite() {
        Ok(x)
    } else {
        Err(Error::NotFinite { param })
    }
}

/// A finite value that is not zero.
pub fn nonzero(param: &'static str, x: f64) -> Result<f64> {
    if finite(param, x)? == 0.0 {
        Err(Error::OutOfDomain {
            param,
            requirement: "must not be zero",
        })
    } else {
        Ok(x)
    }
}

/// A finite value greater than zero.
pub fn positive(param: &'static str, x: f64) -> Result<f64> {
    if finite(param, x)? > 0.0 {
        Ok(x)
    } else {
        Err(Error::OutOfDomain {
            param,
            requirement: "must be greater than zero",
        })
    }
}

/// A finite value that is zero or greater.
pub fn non_negative(param: &'static str, x: f64) -> Result<f64> {
    if finite(param, x)? >= 0.0 {
        Ok(x)
    } else {
        Err(Error::OutOfDomain {
            param,
            requirement: "must be zero or greater",
        })
    }
}

/// A complex value whose parts are both finite.
pub fn finite_complex(param: &'static str, z: Complex64) -> Result<Complex64> {
    if z.re.is_finite() && z.im.is_finite() {
        Ok(z)
    } else {
        Err(Error::NotFinite { param })
    }
}

/// A complex value with finite parts that is not zero.
pub fn nonzero_complex(param: &'static str, z: Complex64) -> Result<Complex64> {
    if finite_complex(param, z)? == Complex64::new(0.0, 0.0) {
        Err(Error::OutOfDomain {
            param,
            requirement: "must not be zero",
        })
    } else {
        Ok(z)
    }
}

/// A passive impedance: finite parts and a resistive part of zero or more
/// (a negative resistance is not a physical source or load impedance here).
pub fn impedance(param: &'static str, z: Complex64) -> Result<Complex64> {
    if finite_complex(param, z)?.re < 0.0 {
        Err(Error::OutOfDomain {
            param,
            requirement: "must have a resistive (real) part of zero or more",
        })
    } else {
        Ok(z)
    }
}

/// A computed real result: [`Error::Overflow`] instead of ±∞ or NaN.
#[inline]
pub fn result(quantity: &'static str, x: f64) -> Result<f64> {
    if x.is_finite() {
        Ok(x)
    } else {
        Err(Error::Overflow { param: quantity })
    }
}

/// A computed complex result: [`Error::Overflow`] instead of ±∞ or NaN parts.
pub fn result_complex(quantity: &'static str, z: Complex64) -> Result<Complex64> {
    if z.re.is_finite() && z.im.is_finite() {
        Ok(z)
    } else {
        Err(Error::Overflow { param: quantity })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rejects_each_bad_kind_with_the_parameter_name() {
        assert_eq!(finite("a", f64::NAN), Err(Error::NotFinite { param: "a" }));
        assert_eq!(
            finite("a", f64::NEG_INFINITY),
            Err(Error::NotFinite { param: "a" })
        );
        assert_eq!(nonzero("a", 0.0).unwrap_err().param(), "a");
        assert_eq!(positive("r", -1.0).unwrap_err().code(), "out_of_domain");
        assert_eq!(positive("r", 0.0).unwrap_err().code(), "out_of_domain");
        assert_eq!(non_negative("r", -0.1).unwrap_err().code(), "out_of_domain");
        assert_eq!(non_negative("r", 0.0), Ok(0.0));
        assert_eq!(
            impedance("zi", Complex64::new(-1.0, 5.0))
                .unwrap_err()
                .param(),
            "zi"
        );
        assert_eq!(
            impedance("zi", Complex64::new(0.0, -5.0)),
            Ok(Complex64::new(0.0, -5.0))
        );
        assert_eq!(
            result("af", f64::INFINITY),
            Err(Error::Overflow { param: "af" })
        );
        assert_eq!(
            nonzero_complex("a", Complex64::new(0.0, 0.0))
                .unwrap_err()
                .code(),
            "out_of_domain"
        );
    }
}
