//! The error values a cell can hold.
//!
//! The six of OpenFormula (OASIS OpenDocument Formula, ODF 1.2 part 2, §5.12
//! "Errors", from memory) plus four of our own for situations the standard leaves
//! to the implementation: a circular reference, a spill that is blocked, a
//! formula that does not parse, and a recalculation that spent its work budget. Each kind has a one-line explanation; each
//! occurrence also carries a detail sentence saying what exactly went wrong.

use crate::error::Error;
use alloc::string::{String, ToString};
use core::fmt;

/// The kind of an error value, spelled in a cell as [`ErrorKind::code`].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum ErrorKind {
    /// `#DIV/0!`: division by zero.
    DivZero,
    /// `#VALUE!`: an argument or operand of the wrong type or unit.
    Value,
    /// `#REF!`: a reference outside the sheet or a range too large.
    Ref,
    /// `#NAME?`: an unknown function or cell name.
    Name,
    /// `#NUM!`: a number outside a function's domain, or an overflow.
    Num,
    /// `#N/A`: a value that is not available.
    NotAvailable,
    /// `#CYCLE!`: the cell is part of a circular reference.
    Cycle,
    /// `#BLOCKED!`: the cell's several results cannot spill because a neighbouring
    /// cell is not empty.
    Blocked,
    /// `#SYNTAX!`: the formula does not parse.
    Syntax,
    /// `#BUDGET!`: the recalculation spent its work budget before reaching this
    /// formula, which was therefore not computed.
    Budget,
}

impl ErrorKind {
    /// Every kind, in a fixed order.
    pub const ALL: [ErrorKind; 10] = [
        ErrorKind::DivZero,
        ErrorKind::Value,
        ErrorKind::Ref,
        ErrorKind::Name,
        ErrorKind::Num,
        ErrorKind::NotAvailable,
        ErrorKind::Cycle,
        ErrorKind::Blocked,
        ErrorKind::Syntax,
        ErrorKind::Budget,
    ];

    /// How the error value is written in a cell and in formulas.
    pub const fn code(self) -> &'static str {
        match self {
            ErrorKind::DivZero => "#DIV/0!",
            ErrorKind::Value => "#VALUE!",
            ErrorKind::Ref => "#REF!",
            ErrorKind::Name => "#NAME?",
            ErrorKind::Num => "#NUM!",
            ErrorKind::NotAvailable => "#N/A",
            ErrorKind::Cycle => "#CYCLE!",
            ErrorKind::Blocked => "#BLOCKED!",
            ErrorKind::Syntax => "#SYNTAX!",
            ErrorKind::Budget => "#BUDGET!",
        }
    }

    /// One line saying what the error value means.
    pub const fn explanation(self) -> &'static str {
        match self {
            ErrorKind::DivZero => "a division by zero",
            ErrorKind::Value => {
                "an operand or argument of the wrong type or unit, such as text in arithmetic"
            }
            ErrorKind::Ref => {
                "a reference outside the sheet, or a range larger than the stated limit"
            }
            ErrorKind::Name => "a function or cell name that is not defined",
            ErrorKind::Num => "a number outside the function's domain, or a result that overflows",
            ErrorKind::NotAvailable => "a value that is not available",
            ErrorKind::Cycle => "the cell is part of a circular reference, so it has no value",
            ErrorKind::Blocked => {
                "the formula gives several values but a cell they would fan out into is not empty"
            }
            ErrorKind::Syntax => "the formula does not parse",
            ErrorKind::Budget => {
                "the recalculation spent its work budget before reaching this formula, so it was not computed"
            }
        }
    }

    /// The kind written as `code` (exact spelling, upper case), if any.
    pub fn from_code(code: &str) -> Option<ErrorKind> {
        ErrorKind::ALL
            .iter()
            .copied()
            .find(|k| k.code().eq_ignore_ascii_case(code))
    }
}

impl fmt::Display for ErrorKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.code())
    }
}

/// An error value: its kind and a sentence about this occurrence.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CellError {
    /// The kind, shown in the cell.
    pub kind: ErrorKind,
    /// What went wrong here, e.g. `"FEEDBACK.GAIN: beta: must be a finite number"`;
    /// empty when an error literal was typed.
    pub detail: String,
}

impl CellError {
    /// An error value with a detail sentence.
    pub fn new(kind: ErrorKind, detail: impl Into<String>) -> CellError {
        CellError {
            kind,
            detail: detail.into(),
        }
    }

    /// The one-line explanation: the detail when there is one, else the kind's.
    pub fn message(&self) -> &str {
        if self.detail.is_empty() {
            self.kind.explanation()
        } else {
            &self.detail
        }
    }

    /// A core [`Error`] raised by function `function`, as an error value: domain,
    /// overflow and oscillation problems are `#NUM!`, unknown names `#VALUE!`.
    pub fn from_core(function: &str, e: Error) -> CellError {
        let kind = match e {
            Error::UnknownName { .. } => ErrorKind::Value,
            _ => ErrorKind::Num,
        };
        let mut detail = String::from(function);
        detail.push_str(": ");
        detail.push_str(&e.to_string());
        CellError { kind, detail }
    }
}

impl fmt::Display for CellError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} ({})", self.kind.code(), self.message())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn codes_are_distinct_and_round_trip() {
        for k in ErrorKind::ALL {
            assert_eq!(ErrorKind::from_code(k.code()), Some(k));
            assert!(k.code().starts_with('#'));
            assert!(!k.explanation().is_empty() && !k.explanation().contains('\n'));
        }
        let mut codes: alloc::vec::Vec<&str> = ErrorKind::ALL.iter().map(|k| k.code()).collect();
        codes.sort_unstable();
        codes.dedup();
        assert_eq!(codes.len(), ErrorKind::ALL.len());
        assert_eq!(ErrorKind::from_code("#n/a"), Some(ErrorKind::NotAvailable));
        assert_eq!(ErrorKind::from_code("#NOPE!"), None);
    }

    #[test]
    fn core_errors_keep_their_sentence() {
        let e = CellError::from_core("FEEDBACK.GAIN", Error::NotFinite { param: "beta" });
        assert_eq!(e.kind, ErrorKind::Num);
        assert!(e.message().starts_with("FEEDBACK.GAIN: beta: "));
        let u = CellError::from_core(
            "FEEDBACK.ZIN",
            Error::UnknownName {
                param: "topology",
                expected: "x",
            },
        );
        assert_eq!(u.kind, ErrorKind::Value);
        assert_eq!(
            CellError::new(ErrorKind::Ref, "").message(),
            ErrorKind::Ref.explanation()
        );
    }
}
