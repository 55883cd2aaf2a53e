//! Values as people type them and numbers as people read them: the one reader
//! ([`read`], [`read_list`], [`scan`]) and the one display ([`format_value`],
//! [`format_full`], [`format_si`], [`letter_code`]) of loopwright. The worksheet,
//! the circuit document, the page's cards and the JS API all go through here.
//!
//! # What is read
//! - A decimal number with an optional sign (`-`, `+` or the minus sign U+2212)
//!   and exponent: `4700`, `-2.5`, `1e-9`, `.47`, `1.5e3k` (= 1.5 M).
//! - An SI prefix after it, attached or after one space: `f p n u µ m k M G T`
//!   (both µ U+00B5 and μ U+03BC; `u` for µ and `K` for k as in trade use).
//!   Case matters: `m` is milli, `M` mega, `f` femto (farad is `F`).
//! - Or an IEC 60062 letter code, the letter standing where the decimal point
//!   would be: `4k7` = 4.7 k, `2R2` = 2.2, `1M5`, `4n7`, `6µ8`, `4F7` = 4.7 F
//!   (the letter `F` marks farads, so nothing may follow it); `10R` and `470R`
//!   (R marks ohms; only Ω, ohm or ohms may follow). A whole text may open with
//!   `R p n u µ`: `R47` = 0.47, `p68` = 0.68 p (in a formula `R47` is a cell, so
//!   write `0R47` there). A code has no decimal point or exponent, and only one
//!   multiplier: `4k7k` and `4.7k7` are errors.
//! - Then a unit word, attached or after one space: `Ω` (U+03A9 or the ohm sign
//!   U+2126), `ohm`, `ohms`, `V A W S Hz F H s`, and `dB` where the context allows
//!   a level (never with a prefix). The prefix is written on the unit:
//!   `4.7 kΩ` and `4.7kΩ`, not `4.7 k Ω`. Unit symbols are case-sensitive
//!   (`S` siemens, `s` second; `hz` is an error).
//! - `%` at the end (÷ 100), attached or after one space, where the context
//!   allows it, without prefix or unit.
//! - A part's spread ([`read_spread`]): `±1 %`, `1 % normal 3σ`, `46.5k…47.5k`,
//!   `45k/47k/49k`, `25 ppm/K`, each number read as above.
//! - Lists ([`read_list`]): items separated by `,` or `;`; a blank alone does
//!   not separate (`4.7 k` is one value), an empty item is an error.
//!
//! Anything else is an [`crate::Error::Syntax`] with the 1-based column where
//! reading stopped and why; never a guess. In particular `1Meg` (write `1M`),
//! `4,7` (a comma is no decimal point), `4 700` (no digit groups), `0x10`,
//! `inf`, `10 kHZ`, two blanks, and a number nonzero below the smallest double.
//! A value beyond the double range is [`crate::Error::Overflow`].
//!
//! The value comes from one decimal-to-binary conversion of the digits and the
//! combined power of ten, so `4k7` and `4.7k` are exactly the double nearest 4700.
//!
//! Sources: SI Brochure (BIPM, 9th ed., 2019), table 7 (prefixes) and §5.4.3
//! (space between number and unit, prefix attached to the unit symbol);
//! IEC 60062:2016 *Marking codes for resistors and capacitors*, clause 4 (letter
//! code, from memory).

mod decimal;
mod format;
mod read;
mod spread;
mod unit;

pub use format::{
    format_full, format_plain, format_si, format_value, letter_code, unit_takes_no_prefix,
    write_full, MAX_UNIT_LEN,
};
pub use read::{read, read_list, scan, ReadOptions, Reading, MAX_DIGITS, MAX_LIST_ITEMS};
pub use spread::{read_range, read_spread, TypedSpread, TypedTolerance, DEFAULT_SIGMAS};
pub use unit::Unit;

use crate::error::Result;

/// Read a component value with any unit, no dB and no `%` ([`ReadOptions::VALUE`]).
///
/// # Errors
/// As [`read`].
///
/// # Example
/// ```
/// use loopwright::notation::{parse_value_with_unit, Unit};
/// let p = parse_value_with_unit("4.7 kΩ").unwrap();
/// assert_eq!((p.value, p.unit), (4700.0, Some(Unit::Ohm)));
/// assert_eq!(parse_value_with_unit("4k7k").unwrap_err().param(), "text");
/// ```
pub fn parse_value_with_unit(text: &str) -> Result<Reading> {
    read(text, &ReadOptions::VALUE)
}

/// Read a component value and keep the number; see [`parse_value_with_unit`].
///
/// # Errors
/// As [`read`].
///
/// # Example
/// ```
/// use loopwright::notation::parse_value;
/// assert_eq!(parse_value("4k7").unwrap(), 4700.0);
/// assert_eq!(parse_value("R47").unwrap(), 0.47);
/// assert_eq!(parse_value("100nF").unwrap(), 1e-7);
/// assert_eq!(parse_value("4,7k").unwrap_err().code(), "syntax");
/// ```
pub fn parse_value(text: &str) -> Result<f64> {
    Ok(parse_value_with_unit(text)?.value)
}
