//! The reader of a part's spread as an engineer types it: a tolerance and a
//! temperature coefficient in the trade's words, each number read by
//! [`super::read`].
//!
//! A spread text is one or more words separated by blanks, in any order:
//! - `±1 %`, `1%`, `+/-0.1 %`: a tolerance of ±p % of the value (uniform
//!   unless `normal` or a number of sigmas is given); a bare number (`1`) is
//!   read as a percent too, as worksheets written before kept it;
//! - `normal` (or `uniform`): the distribution of a ± % tolerance; `normal` alone
//!   means the limit is at 3 σ (common practice, no source: a part sold as
//!   ±1 % is taken to be screened at 3 σ);
//! - `3σ`, `3 sigma`, `at 3σ`: the number of standard deviations the ± %
//!   limit stands for (normal);
//! - `46.5k…47.5k` (or `46.5k..47.5k`): limits min … max, the typical value
//!   being the part's own;
//! - `45k/47k/49k`: min/typ/max;
//! - `+25 ppm/K`, `-50ppm/K` (also `ppm/°C`, the same size): the linear
//!   temperature coefficient, one signed value (IEC 60115-1).
//!
//! `1% normal 3σ 25ppm/K` is a ±1 % part at 3 σ drifting +25 ppm/K. A percent,
//! a number of sigmas and a tempco are plain decimal numbers (no prefix or
//! letter code); limits are values as [`super::read`] reads them (`4k7`,
//! `10 nF`). The ranges (0 … 100 %, sigmas in (0, 10], min ≤ typ ≤ max) are
//! checked by the analysis that takes the spread, which knows the part.

use super::read::{read, ReadOptions};
use crate::error::{Error, Result};

/// The tolerance part of a spread text.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum TypedTolerance {
    /// ±`percent` %, uniformly distributed.
    Uniform {
        /// Half-width, % of the value.
        percent: f64,
    },
    /// ±`percent` % at `sigmas` standard deviations, normally distributed.
    Normal {
        /// The stated limit, % of the value.
        percent: f64,
        /// How many σ the limit is.
        sigmas: f64,
    },
    /// Between `min` and `max`; the typical value is the part's own.
    Range {
        /// Lowest value.
        min: f64,
        /// Highest value.
        max: f64,
    },
    /// min/typ/max.
    MinTypMax {
        /// Lowest value.
        min: f64,
        /// Typical value.
        typ: f64,
        /// Highest value.
        max: f64,
    },
}

/// A spread text as read: its tolerance and its temperature coefficient.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct TypedSpread {
    /// The tolerance, if one was written.
    pub tolerance: Option<TypedTolerance>,
    /// The temperature coefficient in ppm/K, if one was written.
    pub tempco_ppm: Option<f64>,
}

/// The number of sigmas of `normal` written without one (common practice, no source).
pub const DEFAULT_SIGMAS: f64 = 3.0;

const R_EMPTY: &str =
    "expected a spread: ±1 %, 1 % normal 3σ, 46.5k…47.5k, 45k/47k/49k or 25 ppm/K";
const R_WORD: &str =
    "not a spread word: write ±1 %, normal, 3σ, 46.5k…47.5k, 45k/47k/49k or 25 ppm/K";
const R_PLAIN: &str =
    "a percent, sigmas or ppm/K is a plain number: no prefix, letter code or unit";
const R_TWICE_TOL: &str = "a second tolerance: give one of ± %, min…max or min/typ/max";
const R_TWICE_TC: &str = "a second temperature coefficient";
const R_TWICE_SIGMA: &str = "a second number of sigmas";
const R_TWICE_DIST: &str = "a second distribution word";
const R_NORMAL_PERCENT: &str = "normal and sigmas go with a ± % tolerance (1 % normal 3σ)";
const R_UNIFORM_SIGMA: &str = "a uniform tolerance has no sigmas: write normal, or leave out the σ";
const R_TEMPCO_PM: &str =
    "a temperature coefficient is one signed value (+25 ppm/K or -25 ppm/K), not ±";
const R_THREE: &str = "min/typ/max takes three values";

/// Words that belong to the word before them when written after a blank.
const TRAILING: [&str; 6] = ["%", "σ", "sigma", "ppm/K", "ppm/°C", "ppm/\u{2103}"];
/// Signs that belong to the word after them when written before a blank.
const LEADING: [&str; 3] = ["±", "+/-", "+-"];
const TEMPCO_UNITS: [&str; 3] = ["ppm/K", "ppm/°C", "ppm/\u{2103}"];

/// A syntax error at the 1-based character `column` of the whole text.
fn at(column: u32, reason: &'static str) -> Error {
    Error::Syntax {
        param: "text",
        column,
        reason,
    }
}

/// `e` from reading a piece that starts at `column` of the whole text.
fn shifted(e: Error, column: u32) -> Error {
    match e {
        Error::Syntax {
            param,
            column: c,
            reason,
        } => Error::Syntax {
            param,
            column: column + c - 1,
            reason,
        },
        other => other,
    }
}

/// Whether `s` is written as a plain decimal: sign, digits, point, exponent.
fn is_plain(s: &str) -> bool {
    s.starts_with(|c: char| c.is_ascii_digit() || matches!(c, '.' | '+' | '-' | '\u{2212}'))
        && s.chars()
            .all(|c| c.is_ascii_digit() || matches!(c, '.' | '+' | '-' | 'e' | 'E' | '\u{2212}'))
}

/// A plain decimal number (sign, digits, point, exponent) read by [`read`].
fn plain(s: &str, column: u32) -> Result<f64> {
    if !is_plain(s) {
        return Err(at(column, R_PLAIN));
    }
    read(s, &ReadOptions::VALUE)
        .map(|r| r.value)
        .map_err(|e| shifted(e, column))
}

/// A value with prefix, letter code or unit, read by [`read`].
fn value(s: &str, column: u32) -> Result<f64> {
    read(s, &ReadOptions::VALUE)
        .map(|r| r.value)
        .map_err(|e| shifted(e, column))
}

fn chars(s: &str) -> u32 {
    u32::try_from(s.chars().count()).unwrap_or(u32::MAX)
}

/// The words of `text` with their 1-based columns, a trailing `%`, `σ`,
/// `sigma` or `ppm/K` joined to the word before and a leading `±` to the word
/// after.
fn words(text: &str) -> alloc::vec::Vec<(alloc::string::String, u32)> {
    use alloc::string::String;
    let mut raw: alloc::vec::Vec<(&str, u32)> = alloc::vec::Vec::new();
    let mut col = 1u32;
    let mut start: Option<(usize, u32)> = None;
    for (i, c) in text.char_indices() {
        if c.is_whitespace() {
            if let Some((s, sc)) = start.take() {
                raw.push((&text[s..i], sc));
            }
        } else if start.is_none() {
            start = Some((i, col));
        }
        col = col.saturating_add(1);
    }
    if let Some((s, sc)) = start {
        raw.push((&text[s..], sc));
    }
    let mut out: alloc::vec::Vec<(String, u32)> = alloc::vec::Vec::new();
    let mut pending: Option<(String, u32)> = None;
    for (w, c) in raw {
        if let Some((mut p, pc)) = pending.take() {
            p.push_str(w);
            out.push((p, pc));
            continue;
        }
        if LEADING.contains(&w) {
            pending = Some((String::from(w), c));
            continue;
        }
        if TRAILING.contains(&w) {
            if let Some(last) = out.last_mut() {
                last.0.push_str(w);
                continue;
            }
        }
        out.push((String::from(w), c));
    }
    out.extend(pending);
    out
}

/// Read a spread text (see the module doc).
///
/// # Errors
/// [`Error::Syntax`] on `text` with the 1-based column of the word at fault
/// and why: an empty text, a word that is not a spread word, a number that
/// does not read, a percent, sigmas or ppm/K with a prefix or unit, a second
/// tolerance, tempco, sigmas or distribution, `normal` or sigmas without a
/// ± % tolerance, `uniform` with sigmas, a ± on a tempco, a min/typ/max
/// without three values; [`Error::Overflow`] for a number beyond the double range.
///
/// # Example
/// ```
/// use loopwright::notation::{read_spread, TypedTolerance};
/// let s = read_spread("±1 % normal 3σ +25 ppm/K").unwrap();
/// assert_eq!(s.tolerance, Some(TypedTolerance::Normal { percent: 1.0, sigmas: 3.0 }));
/// assert_eq!(s.tempco_ppm, Some(25.0));
/// assert_eq!(read_spread("1k%").unwrap_err().column(), Some(1));
/// ```
pub fn read_spread(text: &str) -> Result<TypedSpread> {
    let mut tol: Option<(TypedTolerance, u32)> = None;
    let mut tempco = None;
    let mut sigmas: Option<(f64, u32)> = None;
    let mut dist: Option<(bool, u32)> = None; // (normal, column)
    let ws = words(text);
    if ws.is_empty() {
        return Err(at(1, R_EMPTY));
    }
    for (w, col) in &ws {
        let (w, col) = (w.as_str(), *col);
        let mut set_tol = |t: TypedTolerance| {
            if tol.is_some() {
                return Err(at(col, R_TWICE_TOL));
            }
            tol = Some((t, col));
            Ok(())
        };
        if w.eq_ignore_ascii_case("at") {
            continue;
        }
        if w.eq_ignore_ascii_case("normal") || w.eq_ignore_ascii_case("uniform") {
            if dist.is_some() {
                return Err(at(col, R_TWICE_DIST));
            }
            dist = Some((w.eq_ignore_ascii_case("normal"), col));
            continue;
        }
        if let Some(unit) = TEMPCO_UNITS.iter().find(|u| w.ends_with(**u)) {
            if tempco.is_some() {
                return Err(at(col, R_TWICE_TC));
            }
            if LEADING.iter().any(|l| w.starts_with(l)) {
                return Err(at(col, R_TEMPCO_PM));
            }
            tempco = Some(plain(&w[..w.len() - unit.len()], col)?);
            continue;
        }
        if let Some(n) = w.strip_suffix("σ").or_else(|| w.strip_suffix("sigma")) {
            if sigmas.is_some() {
                return Err(at(col, R_TWICE_SIGMA));
            }
            sigmas = Some((plain(n, col)?, col));
            continue;
        }
        if let Some(n) = w.strip_suffix('%') {
            let (n, c) = match LEADING.iter().find(|l| n.starts_with(**l)) {
                Some(l) => (&n[l.len()..], col + chars(l)),
                None => (n, col),
            };
            set_tol(TypedTolerance::Uniform {
                percent: plain(n, c)?,
            })?;
            continue;
        }
        let range = w
            .split_once('…')
            .map(|(a, b)| (a, b, '…'.len_utf8()))
            .or_else(|| w.split_once("..").map(|(a, b)| (a, b, 2)));
        if let Some((a, b, sep)) = range {
            let col_b = col + chars(a) + if sep == 2 { 2 } else { 1 };
            set_tol(TypedTolerance::Range {
                min: value(a, col)?,
                max: value(b, col_b)?,
            })?;
            continue;
        }
        if w.contains('/') {
            let mut v = [0.0; 3];
            let mut n = 0;
            let mut c = col;
            for piece in w.split('/') {
                if n == 3 {
                    return Err(at(col, R_THREE));
                }
                v[n] = value(piece, c)?;
                c += chars(piece) + 1;
                n += 1;
            }
            if n != 3 {
                return Err(at(col, R_THREE));
            }
            set_tol(TypedTolerance::MinTypMax {
                min: v[0],
                typ: v[1],
                max: v[2],
            })?;
            continue;
        }
        if is_plain(w) {
            // A bare number is a percent: the spreads text of worksheets
            // written before the distributions were read (`rf=1`).
            set_tol(TypedTolerance::Uniform {
                percent: plain(w, col)?,
            })?;
            continue;
        }
        return Err(at(col, R_WORD));
    }
    let tolerance = match (tol, dist, sigmas) {
        (Some((TypedTolerance::Uniform { percent }, _)), d, s) => match (d, s) {
            (Some((false, _)), Some((_, c))) => return Err(at(c, R_UNIFORM_SIGMA)),
            (Some((false, _)) | None, None) => Some(TypedTolerance::Uniform { percent }),
            (_, s) => Some(TypedTolerance::Normal {
                percent,
                sigmas: s.map_or(DEFAULT_SIGMAS, |(k, _)| k),
            }),
        },
        (t, None, None) => t.map(|(t, _)| t),
        (_, Some((_, c)), _) | (_, None, Some((_, c))) => return Err(at(c, R_NORMAL_PERCENT)),
    };
    Ok(TypedSpread {
        tolerance,
        tempco_ppm: tempco,
    })
}

/// Read a range `low…high` (or `low..high`, blanks allowed around the
/// separator) or one value (low = high), each value as [`read`] reads it
/// under `options`: a temperature range `"0…70"`, a band `"10…20k"`.
///
/// # Errors
/// As [`read`], with the column counted in the whole text.
///
/// # Example
/// ```
/// use loopwright::notation::{read_range, ReadOptions};
/// assert_eq!(read_range("-40 … 85", &ReadOptions::VALUE).unwrap(), [-40.0, 85.0]);
/// assert_eq!(read_range("10..20k", &ReadOptions::VALUE).unwrap(), [10.0, 2e4]);
/// assert_eq!(read_range("25", &ReadOptions::VALUE).unwrap(), [25.0, 25.0]);
/// assert_eq!(read_range("0…hot", &ReadOptions::VALUE).unwrap_err().column(), Some(3));
/// ```
pub fn read_range(text: &str, options: &ReadOptions) -> Result<[f64; 2]> {
    let split = text
        .split_once('…')
        .map(|(a, b)| (a, b, 1))
        .or_else(|| text.split_once("..").map(|(a, b)| (a, b, 2)));
    let one = |s: &str, column: u32| {
        read(s, options)
            .map(|r| r.value)
            .map_err(|e| shifted(e, column))
    };
    match split {
        Some((a, b, sep)) => Ok([one(a, 1)?, one(b, 1 + chars(a) + sep)?]),
        None => {
            let v = one(text, 1)?;
            Ok([v, v])
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn tol(s: &str) -> Option<TypedTolerance> {
        read_spread(s).unwrap().tolerance
    }

    fn col(s: &str) -> Option<u32> {
        read_spread(s).unwrap_err().column()
    }

    #[test]
    fn every_form_reads() {
        // The values are the decimals as written (common practice, no source).
        let u = |percent| Some(TypedTolerance::Uniform { percent });
        assert_eq!(tol("1%"), u(1.0));
        assert_eq!(tol("±1 %"), u(1.0));
        assert_eq!(tol("± 0.1%"), u(0.1));
        assert_eq!(tol("+/-7%"), u(7.0)); // exactly 7, not 0.07·100
        assert_eq!(tol("uniform 5%"), u(5.0));
        assert_eq!(tol("2"), u(2.0)); // the spreads text before the distributions
        assert_eq!(
            tol("0.5 normal"),
            Some(TypedTolerance::Normal {
                percent: 0.5,
                sigmas: 3.0
            })
        );
        let n = |percent, sigmas| Some(TypedTolerance::Normal { percent, sigmas });
        assert_eq!(tol("1% normal"), n(1.0, 3.0));
        assert_eq!(tol("1% normal at 2σ"), n(1.0, 2.0));
        assert_eq!(tol("1 % 4 sigma"), n(1.0, 4.0));
        assert_eq!(tol("1% 6sigma normal"), n(1.0, 6.0));
        assert_eq!(
            tol("46.5k…47.5k"),
            Some(TypedTolerance::Range {
                min: 46500.0,
                max: 47500.0
            })
        );
        assert_eq!(
            tol("9n..11n"),
            Some(TypedTolerance::Range {
                min: 9e-9,
                max: 11e-9
            })
        );
        assert_eq!(
            tol("8M/10M/13MHz"),
            Some(TypedTolerance::MinTypMax {
                min: 8e6,
                typ: 1e7,
                max: 1.3e7
            })
        );
        let s = read_spread("25 ppm/K").unwrap();
        assert_eq!((s.tolerance, s.tempco_ppm), (None, Some(25.0)));
        let s = read_spread("0.1% -50ppm/°C").unwrap();
        assert_eq!((s.tolerance, s.tempco_ppm), (u(0.1), Some(-50.0)));
    }

    #[test]
    fn no_text_of_three_pieces_panics() {
        // Every text of three pieces from the words and characters the reader
        // looks at: an answer or a syntax/overflow error, never a panic.
        let pieces = [
            "", " ", "1", "-", "±", "+/-", "%", "σ", "sigma", "ppm/K", "ppm/°C", "…", "..", "/",
            "k", "normal", "uniform", "at", "4k7", "1e999", "é", ".", "e",
        ];
        for a in pieces {
            for b in pieces {
                for c in pieces {
                    let text = alloc::format!("{a}{b}{c}");
                    match read_spread(&text) {
                        Ok(_) => {}
                        Err(e) => assert!(matches!(e.code(), "syntax" | "overflow"), "{text}"),
                    }
                    let _ = read_range(&text, &ReadOptions::VALUE);
                }
            }
        }
    }

    #[test]
    fn refusals_say_where() {
        assert_eq!(col(""), Some(1));
        assert_eq!(col("   "), Some(1));
        assert_eq!(col("1% tight"), Some(4));
        assert_eq!(col("1k%"), Some(1));
        assert_eq!(col("1% 2%"), Some(4));
        assert_eq!(col("1% 2"), Some(4));
        assert_eq!(col("47k"), Some(1));
        assert_eq!(col("1% 5..6"), Some(4));
        assert_eq!(col("normal"), Some(1));
        assert_eq!(col("1k..2k normal"), Some(8));
        assert_eq!(col("3σ"), Some(1));
        assert_eq!(col("1% uniform 3σ"), Some(12));
        assert_eq!(col("±25ppm/K"), Some(1));
        assert_eq!(col("1ppm/K 2ppm/K"), Some(8));
        assert_eq!(col("1/2"), Some(1));
        assert_eq!(col("1/2/3/4"), Some(1));
        assert_eq!(col("1% normal uniform"), Some(11));
        assert_eq!(col("4k7k..5k"), Some(4));
        assert_eq!(col("1k..5kk"), Some(6));
        assert_eq!(col("1%  2σ 3σ"), Some(8));
        assert_eq!(read_spread("1e999%").unwrap_err().code(), "overflow");
    }
}
