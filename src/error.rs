//! The one error type of loopwright.
//!
//! Every fallible function returns [`Result<T>`]. An [`Error`] names the parameter
//! (or the computed quantity) at fault and says why, in one sentence, without
//! allocating, so it works the same with and without `std`. The wasm boundary turns
//! it into a JS `Error` whose `code` is [`Error::code`] and whose `param` is
//! [`Error::param`].

use core::fmt;

/// Result with loopwright's [`Error`].
pub type Result<T> = core::result::Result<T, Error>;

/// What went wrong, and with which parameter.
///
/// `param` is the parameter's name as the documentation spells it (`a`, `beta`,
/// `target_gain`, …). Reasons are static sentences ending without a full stop.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum Error {
    /// The value is NaN or infinite.
    NotFinite { param: &'static str },
    /// The value is finite but outside the range the formula is defined on;
    /// `requirement` states the range ("must be greater than zero").
    OutOfDomain {
        param: &'static str,
        requirement: &'static str,
    },
    /// A design target that the given parts cannot reach; `reason` says why.
    Unreachable {
        param: &'static str,
        reason: &'static str,
    },
    /// The return difference D = 1 + Aβ is zero: the loop oscillates and the
    /// closed-loop quantity does not exist.
    Oscillation { param: &'static str },
    /// A name (topology, series, distribution…) that is not known; `expected`
    /// lists what is accepted.
    UnknownName {
        param: &'static str,
        expected: &'static str,
    },
    /// A count or size above the stated limit.
    TooLarge { param: &'static str, limit: u64 },
    /// The inputs are valid but the computed quantity overflows f64.
    Overflow { param: &'static str },
    /// An iteration did not converge; `reason` says which.
    NoConvergence {
        param: &'static str,
        reason: &'static str,
    },
    /// A linear system or model is singular; `reason` says where.
    Singular {
        param: &'static str,
        reason: &'static str,
    },
    /// Typed text that does not read exactly as a value (see [`crate::notation`]);
    /// `column` is the 1-based character position where reading stopped.
    Syntax {
        param: &'static str,
        column: u32,
        reason: &'static str,
    },
    /// A value of the wrong kind (a string where a number is expected, a number
    /// where a list is expected, …); `expected` says what is ("a number").
    WrongType {
        param: &'static str,
        expected: &'static str,
    },
    /// A required field of an options object is left out.
    Missing { param: &'static str },
    /// A field that the options object of this function does not have (a
    /// misspelling would otherwise be skipped silently); `expected` lists the fields.
    UnknownField {
        param: &'static str,
        expected: &'static str,
    },
}

impl Error {
    /// A stable, machine-readable code: `not_finite`, `out_of_domain`,
    /// `unreachable`, `oscillation`, `unknown_name`, `too_large`, `overflow`,
    /// `no_convergence`, `singular`, `syntax`, `wrong_type`, `missing`, `unknown_field`
    /// (all of them, in this order, in [`Error::CODES`]).
    pub const fn code(&self) -> &'static str {
        match self {
            Error::NotFinite { .. } => "not_finite",
            Error::OutOfDomain { .. } => "out_of_domain",
            Error::Unreachable { .. } => "unreachable",
            Error::Oscillation { .. } => "oscillation",
            Error::UnknownName { .. } => "unknown_name",
            Error::TooLarge { .. } => "too_large",
            Error::Overflow { .. } => "overflow",
            Error::NoConvergence { .. } => "no_convergence",
            Error::Singular { .. } => "singular",
            Error::Syntax { .. } => "syntax",
            Error::WrongType { .. } => "wrong_type",
            Error::Missing { .. } => "missing",
            Error::UnknownField { .. } => "unknown_field",
        }
    }

    /// Every code [`Error::code`] can give, for bindings that list them (the
    /// TypeScript `ErrorCode` type is checked against this list).
    pub const CODES: [&'static str; 13] = [
        "not_finite",
        "out_of_domain",
        "unreachable",
        "oscillation",
        "unknown_name",
        "too_large",
        "overflow",
        "no_convergence",
        "singular",
        "syntax",
        "wrong_type",
        "missing",
        "unknown_field",
    ];

    /// The same error about another parameter: a helper that validates a value for
    /// a caller reports it under the caller's parameter name.
    pub const fn with_param(self, name: &'static str) -> Error {
        match self {
            Error::NotFinite { .. } => Error::NotFinite { param: name },
            Error::OutOfDomain { requirement, .. } => Error::OutOfDomain {
                param: name,
                requirement,
            },
            Error::Unreachable { reason, .. } => Error::Unreachable {
                param: name,
                reason,
            },
            Error::Oscillation { .. } => Error::Oscillation { param: name },
            Error::UnknownName { expected, .. } => Error::UnknownName {
                param: name,
                expected,
            },
            Error::TooLarge { limit, .. } => Error::TooLarge { param: name, limit },
            Error::Overflow { .. } => Error::Overflow { param: name },
            Error::NoConvergence { reason, .. } => Error::NoConvergence {
                param: name,
                reason,
            },
            Error::Singular { reason, .. } => Error::Singular {
                param: name,
                reason,
            },
            Error::Syntax { column, reason, .. } => Error::Syntax {
                param: name,
                column,
                reason,
            },
            Error::WrongType { expected, .. } => Error::WrongType {
                param: name,
                expected,
            },
            Error::Missing { .. } => Error::Missing { param: name },
            Error::UnknownField { expected, .. } => Error::UnknownField {
                param: name,
                expected,
            },
        }
    }

    /// The 1-based character column of a [`Error::Syntax`] error, `None` for the
    /// other kinds.
    pub const fn column(&self) -> Option<u32> {
        match *self {
            Error::Syntax { column, .. } => Some(column),
            _ => None,
        }
    }

    /// The name of the parameter or quantity at fault.
    pub const fn param(&self) -> &'static str {
        match *self {
            Error::NotFinite { param }
            | Error::OutOfDomain { param, .. }
            | Error::Unreachable { param, .. }
            | Error::Oscillation { param }
            | Error::UnknownName { param, .. }
            | Error::TooLarge { param, .. }
            | Error::Overflow { param }
            | Error::NoConvergence { param, .. }
            | Error::Singular { param, .. }
            | Error::Syntax { param, .. }
            | Error::WrongType { param, .. }
            | Error::Missing { param }
            | Error::UnknownField { param, .. } => param,
        }
    }

    /// The sentence without the parameter's name: what [`Display`](fmt::Display)
    /// writes after `"{param}: "`. Bindings that name the parameter otherwise (a
    /// field path such as `amplifier.polesHz[2]`) put their own name before it.
    pub const fn reason(&self) -> Reason<'_> {
        Reason(self)
    }
}

/// The sentence of an [`Error`] without its parameter name (see [`Error::reason`]).
#[derive(Debug, Clone, Copy)]
pub struct Reason<'a>(&'a Error);

impl fmt::Display for Reason<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self.0 {
            Error::NotFinite { .. } => f.write_str("must be a finite number, not NaN or infinity"),
            Error::OutOfDomain { requirement, .. } => f.write_str(requirement),
            Error::Unreachable { reason, .. } => write!(f, "cannot be reached: {reason}"),
            Error::Oscillation { .. } => f.write_str(
                "the return difference 1 + A·β is zero, so the loop oscillates and no closed-loop value exists",
            ),
            Error::UnknownName { expected, .. } => write!(f, "unknown name; expected one of {expected}"),
            Error::TooLarge { limit, .. } => write!(f, "too large; the limit is {limit}"),
            Error::Overflow { .. } => f.write_str("the result overflows the floating-point range"),
            Error::NoConvergence { reason, .. } => write!(f, "did not converge: {reason}"),
            Error::Singular { reason, .. } => write!(f, "singular: {reason}"),
            Error::Syntax { column, reason, .. } => write!(f, "column {column}: {reason}"),
            Error::WrongType { expected, .. } => write!(f, "must be {expected}"),
            Error::Missing { .. } => f.write_str("is required but missing"),
            Error::UnknownField { expected, .. } => write!(f, "unknown field; expected one of {expected}"),
        }
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}: {}", self.param(), self.reason())
    }
}

#[cfg(feature = "std")]
impl std::error::Error for Error {}

#[cfg(test)]
mod tests {
    use super::*;
    use alloc::string::ToString;

    #[test]
    fn display_names_the_parameter_first() {
        let e = Error::OutOfDomain {
            param: "beta",
            requirement: "must not be zero",
        };
        assert_eq!(e.to_string(), "beta: must not be zero");
        assert_eq!(e.code(), "out_of_domain");
        assert_eq!(e.param(), "beta");
    }

    #[test]
    fn every_variant_has_code_and_param() {
        let all = [
            Error::NotFinite { param: "p" },
            Error::OutOfDomain {
                param: "p",
                requirement: "r",
            },
            Error::Unreachable {
                param: "p",
                reason: "r",
            },
            Error::Oscillation { param: "p" },
            Error::UnknownName {
                param: "p",
                expected: "x",
            },
            Error::TooLarge {
                param: "p",
                limit: 3,
            },
            Error::Overflow { param: "p" },
            Error::NoConvergence {
                param: "p",
                reason: "r",
            },
            Error::Singular {
                param: "p",
                reason: "r",
            },
            Error::Syntax {
                param: "p",
                column: 1,
                reason: "r",
            },
            Error::WrongType {
                param: "p",
                expected: "a number",
            },
            Error::Missing { param: "p" },
            Error::UnknownField {
                param: "p",
                expected: "x",
            },
        ];
        let mut codes: alloc::vec::Vec<&str> = all.iter().map(|e| e.code()).collect();
        codes.sort_unstable();
        codes.dedup();
        assert_eq!(codes.len(), all.len());
        let mut listed = Error::CODES.to_vec();
        listed.sort_unstable();
        assert_eq!(codes, listed, "Error::CODES lists every code once");
        for e in all {
            assert_eq!(e.param(), "p");
            assert!(e.to_string().starts_with("p: "));
        }
    }
}
