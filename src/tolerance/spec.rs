//! A spec: limits on figures. A value meets a limit when lower ≤ value ≤ upper
//! (inclusive; a missing side is open).

use super::figures::Figure;
use crate::check;
use crate::error::{Error, Result};
use alloc::vec::Vec;

/// Most limits in one spec.
pub const MAX_LIMITS: usize = 32;

/// One limit on one figure.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Limit {
    /// The figure.
    pub figure: Figure,
    /// Lowest acceptable value, if any.
    pub lower: Option<f64>,
    /// Highest acceptable value, if any.
    pub upper: Option<f64>,
}

impl Limit {
    /// True when `value` is within the limit.
    pub fn meets(&self, value: f64) -> bool {
        self.lower.map_or(true, |l| value >= l) && self.upper.map_or(true, |u| value <= u)
    }
}

/// Check a spec: the figures' settings, finite limits, lower ≤ upper, at most
/// [`MAX_LIMITS`] limits.
///
/// # Errors
/// A figure's own errors ([`Figure::validate`]); a limit not finite (params
/// `lower`, `upper`); lower above upper (param `upper`); more than
/// [`MAX_LIMITS`] (param `spec`); no limit at all (param `spec`).
pub fn validate_spec(spec: &[Limit]) -> Result<()> {
    if spec.is_empty() {
        return Err(Error::OutOfDomain {
            param: "spec",
            requirement: "must hold at least one figure",
        });
    }
    if spec.len() > MAX_LIMITS {
        return Err(Error::TooLarge {
            param: "spec",
            limit: MAX_LIMITS as u64,
        });
    }
    for l in spec {
        l.figure.validate()?;
        let lo = l.lower.map(|x| check::finite("lower", x)).transpose()?;
        let hi = l.upper.map(|x| check::finite("upper", x)).transpose()?;
        if let (Some(lo), Some(hi)) = (lo, hi) {
            if lo > hi {
                return Err(Error::OutOfDomain {
                    param: "upper",
                    requirement: "must not be below lower",
                });
            }
        }
    }
    Ok(())
}

/// The figures of a spec, in order.
pub fn figures(spec: &[Limit]) -> Vec<Figure> {
    spec.iter().map(|l| l.figure).collect()
}
