//! A datasheet figure given as minimum, typical and maximum, and the choice of
//! which of the three an analysis uses.

use crate::check;
use crate::error::{Error, Result};

/// Which point of a min/typ/max spread an analysis uses.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum SpreadPoint {
    /// The minimum.
    Min,
    /// The typical value (the default).
    #[default]
    Typ,
    /// The maximum.
    Max,
}

/// The names [`SpreadPoint::from_name`] accepts.
pub const SPREAD_POINT_NAMES: &str = "min, typ, max";

impl SpreadPoint {
    /// All three points, min first.
    pub const ALL: [SpreadPoint; 3] = [SpreadPoint::Min, SpreadPoint::Typ, SpreadPoint::Max];

    /// The document name: `min`, `typ` or `max`.
    pub const fn name(self) -> &'static str {
        match self {
            SpreadPoint::Min => "min",
            SpreadPoint::Typ => "typ",
            SpreadPoint::Max => "max",
        }
    }

    /// The point for a document name, reported under `param`.
    ///
    /// # Errors
    /// [`Error::UnknownName`] for anything but `min`, `typ`, `max`.
    pub fn from_name(param: &'static str, s: &str) -> Result<SpreadPoint> {
        SpreadPoint::ALL
            .into_iter()
            .find(|p| p.name() == s)
            .ok_or(Error::UnknownName {
                param,
                expected: SPREAD_POINT_NAMES,
            })
    }
}

/// A figure with its minimum, typical and maximum (a datasheet line).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct Spread {
    /// Minimum.
    pub min: f64,
    /// Typical.
    pub typ: f64,
    /// Maximum.
    pub max: f64,
}

impl Spread {
    /// A figure without spread: min = typ = max = `value`.
    pub const fn fixed(value: f64) -> Spread {
        Spread {
            min: value,
            typ: value,
            max: value,
        }
    }

    /// The value at a point of the spread.
    pub const fn at(&self, point: SpreadPoint) -> f64 {
        match point {
            SpreadPoint::Min => self.min,
            SpreadPoint::Typ => self.typ,
            SpreadPoint::Max => self.max,
        }
    }

    /// Check that all three are finite and greater than zero and in order
    /// min ≤ typ ≤ max, reporting under `param`.
    ///
    /// # Errors
    /// [`Error::NotFinite`], or [`Error::OutOfDomain`] for a value not greater
    /// than zero or out of order.
    ///
    /// # Example
    /// ```
    /// use loopwright::stage::Spread;
    /// assert!(Spread { min: 5e4, typ: 2e5, max: 1e6 }.validate_positive("a0").is_ok());
    /// let e = Spread { min: 3e5, typ: 2e5, max: 1e6 }.validate_positive("a0").unwrap_err();
    /// assert_eq!(e.param(), "a0");
    /// ```
    pub fn validate_positive(&self, param: &'static str) -> Result<()> {
        for v in [self.min, self.typ, self.max] {
            check::positive(param, v)?;
        }
        if self.min <= self.typ && self.typ <= self.max {
            Ok(())
        } else {
            Err(Error::OutOfDomain {
                param,
                requirement: "must be in order min ≤ typ ≤ max",
            })
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn points_and_names() {
        let s = Spread {
            min: 1.0,
            typ: 2.0,
            max: 3.0,
        };
        assert_eq!(SpreadPoint::ALL.map(|p| s.at(p)), [1.0, 2.0, 3.0]);
        assert_eq!(SpreadPoint::from_name("p", "max"), Ok(SpreadPoint::Max));
        assert_eq!(SpreadPoint::from_name("p", "mid").unwrap_err().param(), "p");
        assert_eq!(Spread::fixed(4.0).validate_positive("x"), Ok(()));
        assert_eq!(
            Spread::fixed(0.0)
                .validate_positive("x")
                .unwrap_err()
                .code(),
            "out_of_domain"
        );
        assert_eq!(
            Spread::fixed(f64::NAN)
                .validate_positive("x")
                .unwrap_err()
                .code(),
            "not_finite"
        );
    }
}
