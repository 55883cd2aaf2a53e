//! Preferred-number series E3 … E192 for resistors and capacitors.
//!
//! Each series lists the values of one decade; a standard value is a table entry
//! times a power of ten. The tables are the ones printed in IEC 60063:2015
//! *Preferred number series for resistors and capacitors*, tables 1–3 (from memory,
//! and checked against the PyPI `eseries` package by
//! `tests/reference/network_eseries.py`). For E24 and below they are *not* the
//! rounded geometric values 10^(i/n): the standard keeps the historical 2.7, 3.0,
//! 3.3, 3.6, 3.9, 4.3, 4.7 and 8.2 where the geometric rule gives 2.6, 2.9, 3.2,
//! 3.5, 3.8, 4.2, 4.6 and 8.3; E192 has 9.20 where the rule gives 9.19.
//!
//! Customary tolerances (the ones the standard pairs with each series; E3 is
//! "wider than 20 %", taken as 40 % here as in the `eseries` package): E3 40 %,
//! E6 20 %, E12 10 %, E24 5 %, E48 2 %, E96 1 %, E192 0.5 %.
//!
//! A standard value is found by its *rank*: rank n is entry n mod N of the table in
//! decade ⌊n / N⌋. Values are formed as integer × 10^k with an exact power of ten,
//! so 4.7 kΩ is exactly the double nearest to 4700 and 0.47 Ω the one nearest to
//! 0.47.

use crate::check;
use crate::error::{Error, Result};
use alloc::vec::Vec;
use core::fmt;
use core::str::FromStr;

/// Smallest value the lookups accept, in the value's unit (1 f, e.g. 1 fF).
pub const MIN_VALUE: f64 = 1e-15;
/// Largest value the lookups accept (10¹⁵, e.g. 1 PΩ).
pub const MAX_VALUE: f64 = 1e15;
/// Most values [`series_values`] lists in one call.
pub const MAX_LISTED_VALUES: usize = 2_000;

const E3: [u16; 3] = [10, 22, 47];
const E6: [u16; 6] = [10, 15, 22, 33, 47, 68];
const E12: [u16; 12] = [10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82];
const E24: [u16; 24] = [
    10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91,
];
const E48: [u16; 48] = [
    100, 105, 110, 115, 121, 127, 133, 140, 147, 154, 162, 169, 178, 187, 196, 205, 215, 226, 237,
    249, 261, 274, 287, 301, 316, 332, 348, 365, 383, 402, 422, 442, 464, 487, 511, 536, 562, 590,
    619, 649, 681, 715, 750, 787, 825, 866, 909, 953,
];
const E96: [u16; 96] = [
    100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147, 150, 154,
    158, 162, 165, 169, 174, 178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232, 237, 243,
    249, 255, 261, 267, 274, 280, 287, 294, 301, 309, 316, 324, 332, 340, 348, 357, 365, 374, 383,
    392, 402, 412, 422, 432, 442, 453, 464, 475, 487, 499, 511, 523, 536, 549, 562, 576, 590, 604,
    619, 634, 649, 665, 681, 698, 715, 732, 750, 768, 787, 806, 825, 845, 866, 887, 909, 931, 953,
    976,
];
const E192: [u16; 192] = [
    100, 101, 102, 104, 105, 106, 107, 109, 110, 111, 113, 114, 115, 117, 118, 120, 121, 123, 124,
    126, 127, 129, 130, 132, 133, 135, 137, 138, 140, 142, 143, 145, 147, 149, 150, 152, 154, 156,
    158, 160, 162, 164, 165, 167, 169, 172, 174, 176, 178, 180, 182, 184, 187, 189, 191, 193, 196,
    198, 200, 203, 205, 208, 210, 213, 215, 218, 221, 223, 226, 229, 232, 234, 237, 240, 243, 246,
    249, 252, 255, 258, 261, 264, 267, 271, 274, 277, 280, 284, 287, 291, 294, 298, 301, 305, 309,
    312, 316, 320, 324, 328, 332, 336, 340, 344, 348, 352, 357, 361, 365, 370, 374, 379, 383, 388,
    392, 397, 402, 407, 412, 417, 422, 427, 432, 437, 442, 448, 453, 459, 464, 470, 475, 481, 487,
    493, 499, 505, 511, 517, 523, 530, 536, 542, 549, 556, 562, 569, 576, 583, 590, 597, 604, 612,
    619, 626, 634, 642, 649, 657, 665, 673, 681, 690, 698, 706, 715, 723, 732, 741, 750, 759, 768,
    777, 787, 796, 806, 816, 825, 835, 845, 856, 866, 876, 887, 898, 909, 920, 931, 942, 953, 965,
    976, 988,
];

/// Exact powers of ten 10⁰ … 10²² (every one is a double without rounding).
const POW10: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// The accepted series names, for error messages and help text.
pub const SERIES_NAMES: &str = "E3, E6, E12, E24, E48, E96, E192";

/// One of the IEC 60063 preferred-number series.
///
/// Parse it from its name, case-insensitively (`"E24"`, `"e96"`).
///
/// # Example
/// ```
/// use loopwright::network::Series;
/// let s: Series = "e24".parse().unwrap();
/// assert_eq!((s, s.tolerance(), s.significant_digits()), (Series::E24, 0.05, 2));
/// assert_eq!("E25".parse::<Series>().unwrap_err().code(), "unknown_name");
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub enum Series {
    /// 3 values a decade, > 20 % (40 % customary).
    E3,
    /// 6 values a decade, 20 %.
    E6,
    /// 12 values a decade, 10 %.
    E12,
    /// 24 values a decade, 5 %.
    E24,
    /// 48 values a decade, 2 %.
    E48,
    /// 96 values a decade, 1 %.
    E96,
    /// 192 values a decade, 0.5 % (also sold at 0.25 % and 0.1 %).
    E192,
}

impl Series {
    /// All seven, coarsest first.
    pub const ALL: [Series; 7] = [
        Series::E3,
        Series::E6,
        Series::E12,
        Series::E24,
        Series::E48,
        Series::E96,
        Series::E192,
    ];

    /// The name, e.g. `"E24"`.
    pub const fn name(self) -> &'static str {
        match self {
            Series::E3 => "E3",
            Series::E6 => "E6",
            Series::E12 => "E12",
            Series::E24 => "E24",
            Series::E48 => "E48",
            Series::E96 => "E96",
            Series::E192 => "E192",
        }
    }

    /// The table of one decade as integers: 10 … 91 (two significant digits, E3 to
    /// E24) or 100 … 988 (three digits, E48 to E192).
    pub const fn mantissas(self) -> &'static [u16] {
        match self {
            Series::E3 => &E3,
            Series::E6 => &E6,
            Series::E12 => &E12,
            Series::E24 => &E24,
            Series::E48 => &E48,
            Series::E96 => &E96,
            Series::E192 => &E192,
        }
    }

    /// Values a decade (3, 6, …, 192).
    pub const fn len(self) -> usize {
        self.mantissas().len()
    }

    /// Always false: every series has values. (Pairs with [`Series::len`].)
    pub const fn is_empty(self) -> bool {
        false
    }

    /// Significant digits of the values: 2 up to E24, 3 from E48.
    pub const fn significant_digits(self) -> u32 {
        match self {
            Series::E3 | Series::E6 | Series::E12 | Series::E24 => 2,
            Series::E48 | Series::E96 | Series::E192 => 3,
        }
    }

    /// Customary tolerance as a fraction (0.05 for E24); see the module doc.
    pub const fn tolerance(self) -> f64 {
        match self {
            Series::E3 => 0.4,
            Series::E6 => 0.2,
            Series::E12 => 0.1,
            Series::E24 => 0.05,
            Series::E48 => 0.02,
            Series::E96 => 0.01,
            Series::E192 => 0.005,
        }
    }

    /// Largest ratio between neighbouring values, across the decade boundary too
    /// (2.2 for E3: 10 → 22; 4.7 → 10 is 2.13).
    pub fn max_step(self) -> f64 {
        let m = self.mantissas();
        let decade = 10.0 * f64::from(m.first().copied().unwrap_or(1));
        let mut step = decade / f64::from(m.last().copied().unwrap_or(1));
        for w in m.windows(2) {
            if let [a, b] = *w {
                let r = f64::from(b) / f64::from(a);
                if r > step {
                    step = r;
                }
            }
        }
        step
    }

    /// The standard value of rank `n` (see the module doc), exact to the double.
    pub(crate) fn value_at(self, n: i64) -> f64 {
        let len = self.len() as i64;
        let decade = n.div_euclid(len);
        let idx = n.rem_euclid(len) as usize;
        let m = self.mantissas().get(idx).copied().unwrap_or(0);
        scaled(m, decade - i64::from(self.significant_digits()) + 1)
    }

    /// Rank of the largest standard value ≤ `x`; `x` must be in
    /// [`MIN_VALUE`, `MAX_VALUE`].
    pub(crate) fn floor_rank(self, x: f64) -> i64 {
        let len = self.len() as i64;
        let decade = crate::float::floor(libm::log10(x)) as i64;
        let shift = decade - i64::from(self.significant_digits()) + 1;
        let idx = self.mantissas().partition_point(|&m| scaled(m, shift) <= x) as i64;
        let mut n = decade * len + idx - 1;
        // log10 may round across a decade boundary; a step or two mends it.
        while self.value_at(n) > x {
            n -= 1;
        }
        while self.value_at(n + 1) <= x {
            n += 1;
        }
        n
    }

    /// Rank of the smallest standard value ≥ `x` (same range as `floor_rank`).
    pub(crate) fn ceil_rank(self, x: f64) -> i64 {
        let n = self.floor_rank(x);
        if self.value_at(n) == x {
            n
        } else {
            n + 1
        }
    }
}

/// m·10^k with an exact power of ten (|k| ≤ 22 in the accepted range).
fn scaled(m: u16, k: i64) -> f64 {
    let m = f64::from(m);
    let p = POW10
        .get(k.unsigned_abs() as usize)
        .copied()
        .unwrap_or(f64::INFINITY);
    if k >= 0 {
        m * p
    } else {
        m / p
    }
}

impl fmt::Display for Series {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Series {
    type Err = Error;

    /// # Errors
    /// [`Error::UnknownName`] with `param = "series"`.
    fn from_str(s: &str) -> Result<Self> {
        let t = s.trim();
        Series::ALL
            .iter()
            .copied()
            .find(|x| x.name().eq_ignore_ascii_case(t))
            .ok_or(Error::UnknownName {
                param: "series",
                expected: SERIES_NAMES,
            })
    }
}

/// Which standard value to take for a given value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum Rounding {
    /// The value with the smallest |v − x| (the lower one on a tie).
    Nearest,
    /// The smallest standard value ≥ x.
    Up,
    /// The largest standard value ≤ x.
    Down,
    /// The smallest standard value > x (the next one up, even from a standard value).
    Above,
    /// The largest standard value < x.
    Below,
}

/// The accepted rounding names.
pub const ROUNDING_NAMES: &str = "nearest, up, down, above, below";

impl FromStr for Rounding {
    type Err = Error;

    /// # Errors
    /// [`Error::UnknownName`] with `param = "rounding"`.
    fn from_str(s: &str) -> Result<Self> {
        const NAMES: [(&str, Rounding); 5] = [
            ("nearest", Rounding::Nearest),
            ("up", Rounding::Up),
            ("down", Rounding::Down),
            ("above", Rounding::Above),
            ("below", Rounding::Below),
        ];
        let t = s.trim();
        NAMES
            .iter()
            .find(|(n, _)| n.eq_ignore_ascii_case(t))
            .map(|&(_, r)| r)
            .ok_or(Error::UnknownName {
                param: "rounding",
                expected: ROUNDING_NAMES,
            })
    }
}

/// A value in the accepted range [`MIN_VALUE`, `MAX_VALUE`].
pub(crate) fn in_range(param: &'static str, x: f64) -> Result<f64> {
    let x = check::positive(param, x)?;
    if (MIN_VALUE..=MAX_VALUE).contains(&x) {
        Ok(x)
    } else {
        Err(Error::OutOfDomain {
            param,
            requirement: "must lie between 1e-15 and 1e15",
        })
    }
}

/// The standard value of `series` next to `value`, by `rounding`.
///
/// `value` in any unit (Ω, F, H), 10⁻¹⁵ … 10¹⁵; the result in the same unit.
///
/// # Errors
/// `value` not finite, ≤ 0 or outside 10⁻¹⁵ … 10¹⁵.
///
/// # Example
/// ```
/// use loopwright::network::{standard_value, Rounding, Series};
/// assert_eq!(standard_value(Series::E12, 5000.0, Rounding::Nearest).unwrap(), 4700.0);
/// assert_eq!(standard_value(Series::E12, 5000.0, Rounding::Up).unwrap(), 5600.0);
/// assert_eq!(standard_value(Series::E24, 0.0047, Rounding::Above).unwrap(), 0.0051);
/// assert_eq!(standard_value(Series::E24, -1.0, Rounding::Up).unwrap_err().param(), "value");
/// ```
pub fn standard_value(series: Series, value: f64, rounding: Rounding) -> Result<f64> {
    let x = in_range("value", value)?;
    let down = series.floor_rank(x);
    let n = match rounding {
        Rounding::Down => down,
        Rounding::Up => series.ceil_rank(x),
        Rounding::Above => down + 1,
        Rounding::Below => series.ceil_rank(x) - 1,
        Rounding::Nearest => {
            let (lo, hi) = (series.value_at(down), series.value_at(down + 1));
            if hi - x < x - lo {
                down + 1
            } else {
                down
            }
        }
    };
    Ok(series.value_at(n))
}

/// The standard values around a value and the error of the nearest one.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Neighbours {
    /// The series searched.
    pub series: Series,
    /// Largest standard value ≤ the value.
    pub down: f64,
    /// Smallest standard value ≥ the value.
    pub up: f64,
    /// The nearer of the two (the lower on a tie).
    pub nearest: f64,
    /// (nearest − value)/value, a fraction.
    pub error: f64,
    /// The series' customary tolerance, a fraction.
    pub tolerance: f64,
}

/// Next-down, next-up and nearest standard value with the relative error.
///
/// # Errors
/// As [`standard_value`].
///
/// # Example
/// ```
/// use loopwright::network::{neighbours, Series};
/// let n = neighbours(Series::E96, 12_345.0).unwrap();
/// assert_eq!((n.down, n.up, n.nearest), (12_100.0, 12_400.0, 12_400.0));
/// assert!((n.error - 55.0 / 12_345.0).abs() < 1e-15);
/// assert_eq!(neighbours(Series::E96, f64::NAN).unwrap_err().code(), "not_finite");
/// ```
pub fn neighbours(series: Series, value: f64) -> Result<Neighbours> {
    let x = in_range("value", value)?;
    let down = series.value_at(series.floor_rank(x));
    let up = series.value_at(series.ceil_rank(x));
    let nearest = if up - x < x - down { up } else { down };
    Ok(Neighbours {
        series,
        down,
        up,
        nearest,
        error: (nearest - x) / x,
        tolerance: series.tolerance(),
    })
}

/// Every standard value of `series` from `low` to `high` inclusive, ascending.
///
/// # Errors
/// `low`/`high` not finite, ≤ 0 or outside 10⁻¹⁵ … 10¹⁵; `high` < `low`
/// (`high` named); more than [`MAX_LISTED_VALUES`] values ([`Error::TooLarge`]
/// on `high`).
///
/// # Example
/// ```
/// use loopwright::network::{series_values, Series};
/// assert_eq!(series_values(Series::E6, 1.0, 10.0).unwrap(), [1.0, 1.5, 2.2, 3.3, 4.7, 6.8, 10.0]);
/// assert_eq!(series_values(Series::E6, 10.0, 1.0).unwrap_err().param(), "high");
/// ```
pub fn series_values(series: Series, low: f64, high: f64) -> Result<Vec<f64>> {
    let low = in_range("low", low)?;
    let high = in_range("high", high)?;
    if high < low {
        return Err(Error::OutOfDomain {
            param: "high",
            requirement: "must be at least low",
        });
    }
    let first = series.ceil_rank(low);
    let last = series.floor_rank(high);
    let count = (last - first + 1).max(0);
    if count > MAX_LISTED_VALUES as i64 {
        return Err(Error::TooLarge {
            param: "high",
            limit: MAX_LISTED_VALUES as u64,
        });
    }
    Ok((first..=last).map(|n| series.value_at(n)).collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn table_sizes_and_order() {
        for s in Series::ALL {
            let m = s.mantissas();
            assert_eq!(m.len(), s.name()[1..].parse::<usize>().unwrap());
            assert!(m.windows(2).all(|w| w[0] < w[1]), "{s} not ascending");
            let lo = if s.significant_digits() == 2 { 10 } else { 100 };
            assert!(m[0] == lo && *m.last().unwrap() < 10 * lo);
        }
    }

    #[test]
    fn coarser_series_are_subsets_of_finer_ones() {
        // IEC 60063: each series holds every other value of the next finer one.
        let pairs = [
            (Series::E3, Series::E6),
            (Series::E6, Series::E12),
            (Series::E12, Series::E24),
        ];
        for (c, f) in pairs {
            let every_other: Vec<u16> = f.mantissas().iter().step_by(2).copied().collect();
            assert_eq!(c.mantissas(), &every_other[..]);
        }
        for (c, f) in [(Series::E48, Series::E96), (Series::E96, Series::E192)] {
            let every_other: Vec<u16> = f.mantissas().iter().step_by(2).copied().collect();
            assert_eq!(c.mantissas(), &every_other[..]);
        }
    }

    #[test]
    fn e24_differs_from_the_geometric_rule_where_the_standard_says() {
        // IEC 60063 (from memory): eight E24 values are not round(10^(i/24), 1).
        let differ: Vec<u16> = E24
            .iter()
            .enumerate()
            .filter(|&(i, &m)| {
                let g = crate::float::round(10.0 * libm::pow(10.0, i as f64 / 24.0)) as u16;
                g != m
            })
            .map(|(_, &m)| m)
            .collect();
        assert_eq!(differ, [27, 30, 33, 36, 39, 43, 47, 82]);
    }

    #[test]
    fn ranks_round_trip_across_decades() {
        for s in Series::ALL {
            for n in -20 * s.len() as i64..20 * s.len() as i64 {
                let v = s.value_at(n);
                if !(MIN_VALUE..=MAX_VALUE).contains(&v) {
                    continue;
                }
                assert_eq!(s.floor_rank(v), n, "{s} rank {n}");
                assert_eq!(s.ceil_rank(v), n);
                assert_eq!(s.floor_rank(v * (1.0 + 1e-12)), n);
                assert_eq!(s.ceil_rank(v * (1.0 - 1e-12)), n);
            }
        }
    }

    #[test]
    fn rounding_modes_on_and_between_values() {
        let s = Series::E24;
        assert_eq!(standard_value(s, 4700.0, Rounding::Up), Ok(4700.0));
        assert_eq!(standard_value(s, 4700.0, Rounding::Down), Ok(4700.0));
        assert_eq!(standard_value(s, 4700.0, Rounding::Above), Ok(5100.0));
        assert_eq!(standard_value(s, 4700.0, Rounding::Below), Ok(4300.0));
        assert_eq!(standard_value(s, 9.5, Rounding::Up), Ok(10.0));
        assert_eq!(standard_value(s, 10.5, Rounding::Nearest), Ok(10.0)); // tie → lower
        assert_eq!(standard_value(s, 1e-15, Rounding::Down), Ok(1e-15));
        assert_eq!(standard_value(s, 1e15, Rounding::Up), Ok(1e15));
    }

    #[test]
    fn bad_values_and_names() {
        assert_eq!(
            standard_value(Series::E6, 0.0, Rounding::Up)
                .unwrap_err()
                .code(),
            "out_of_domain"
        );
        assert_eq!(
            standard_value(Series::E6, 1e16, Rounding::Up)
                .unwrap_err()
                .param(),
            "value"
        );
        assert_eq!("E5".parse::<Series>().unwrap_err().param(), "series");
        assert_eq!(
            "sideways".parse::<Rounding>().unwrap_err().param(),
            "rounding"
        );
        assert_eq!(
            series_values(Series::E192, 1.0, 1e12).unwrap_err().code(),
            "too_large"
        );
    }

    #[test]
    fn max_step_of_e3_is_ten_to_twenty_two() {
        assert!((Series::E3.max_step() - 2.2).abs() < 1e-15);
        // E192 1.02 → 1.04 is its widest step.
        assert!((Series::E192.max_step() - 104.0 / 102.0).abs() < 1e-15);
    }
}
