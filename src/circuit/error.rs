//! Names of nodes and elements, and the circuit area's error that carries one.
//!
//! The crate's [`Error`] is `Copy` and holds only `&'static str` texts, so it
//! cannot say *which* resistor is negative or *which* node floats. A
//! [`CircuitError`] pairs that error with a [`Name`]: a short name kept in a
//! fixed-size buffer (no allocation, still `Copy`). It converts into the crate
//! [`Error`] (dropping the name) for callers that only want the kind.

use crate::error::Error;
use core::fmt;

/// Longest node or element name, in bytes.
pub const MAX_NAME_LEN: usize = 24;

/// A node or element name: 1 to [`MAX_NAME_LEN`] bytes of ASCII letters, digits
/// and `_ . : + - /`. Ground is the node named `0` or `gnd`.
///
/// # Example
/// ```
/// use loopwright::circuit::Name;
/// assert_eq!(Name::new("out").unwrap().as_str(), "out");
/// assert_eq!(Name::new("bad name").unwrap_err().error.param(), "name");
/// ```
#[derive(Clone, Copy, PartialEq, Eq, Hash)]
pub struct Name {
    bytes: [u8; MAX_NAME_LEN],
    len: u8,
}

impl Name {
    /// The empty name, used when an error concerns no node or element.
    pub const EMPTY: Name = Name {
        bytes: [0; MAX_NAME_LEN],
        len: 0,
    };

    /// A validated name.
    ///
    /// # Errors
    /// `name`: empty, longer than [`MAX_NAME_LEN`] bytes ([`Error::TooLarge`]), or
    /// with a character outside the allowed set ([`Error::OutOfDomain`]); the
    /// error carries as much of the offending text as fits.
    pub fn new(text: &str) -> Result<Name, CircuitError> {
        let shown = Name::truncated(text);
        if text.is_empty() {
            return Err(CircuitError::new(
                Error::OutOfDomain {
                    param: "name",
                    requirement: "must not be empty",
                },
                shown,
            ));
        }
        if text.len() > MAX_NAME_LEN {
            return Err(CircuitError::new(
                Error::TooLarge {
                    param: "name",
                    limit: MAX_NAME_LEN as u64,
                },
                shown,
            ));
        }
        if !text
            .bytes()
            .all(|b| b.is_ascii_alphanumeric() || b"_.:+-/".contains(&b))
        {
            return Err(CircuitError::new(
                Error::OutOfDomain {
                    param: "name",
                    requirement: "must use only ASCII letters, digits and _ . : + - /",
                },
                shown,
            ));
        }
        Ok(shown)
    }

    /// An internal name that no user name can equal (it starts with `#`).
    pub(crate) fn internal(text: &str) -> Name {
        let mut n = Name::EMPTY;
        n.bytes[0] = b'#';
        let mut len = 1;
        for &b in text.as_bytes().iter().take(MAX_NAME_LEN - 1) {
            n.bytes[len] = b;
            len += 1;
        }
        n.len = len as u8;
        n
    }

    /// As much of `text` as fits, cut at a character boundary; for error reports.
    pub fn truncated(text: &str) -> Name {
        let mut end = text.len().min(MAX_NAME_LEN);
        while !text.is_char_boundary(end) {
            end -= 1;
        }
        let mut n = Name::EMPTY;
        n.bytes[..end].copy_from_slice(&text.as_bytes()[..end]);
        n.len = end as u8;
        n
    }

    /// The name as text.
    pub fn as_str(&self) -> &str {
        core::str::from_utf8(&self.bytes[..usize::from(self.len)]).unwrap_or("")
    }

    /// True for the empty name.
    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// True for the names of the ground node, `0` and `gnd` (any case).
    pub fn is_ground(&self) -> bool {
        let s = self.as_str();
        s == "0" || s.eq_ignore_ascii_case("gnd")
    }
}

impl fmt::Debug for Name {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{:?}", self.as_str())
    }
}

impl fmt::Display for Name {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

#[cfg(feature = "serde")]
impl serde::Serialize for Name {
    fn serialize<S: serde::Serializer>(&self, s: S) -> core::result::Result<S::Ok, S::Error> {
        s.serialize_str(self.as_str())
    }
}

/// An [`Error`] together with the node or element it concerns.
///
/// `name` is empty when the error concerns no single node or element (a bad
/// frequency, say). Display reads `R3: value: must be greater than zero`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct CircuitError {
    /// What went wrong, with the parameter (`value`, `node`, `element`, …).
    pub error: Error,
    /// The node or element at fault, or empty.
    pub name: Name,
}

impl CircuitError {
    /// Pair an error with a name.
    pub const fn new(error: Error, name: Name) -> CircuitError {
        CircuitError { error, name }
    }

    /// Pair an error with a name given as text (cut to [`MAX_NAME_LEN`]).
    pub fn named(error: Error, name: &str) -> CircuitError {
        CircuitError {
            error,
            name: Name::truncated(name),
        }
    }
}

impl From<Error> for CircuitError {
    fn from(error: Error) -> Self {
        CircuitError {
            error,
            name: Name::EMPTY,
        }
    }
}

impl From<CircuitError> for Error {
    fn from(e: CircuitError) -> Self {
        e.error
    }
}

impl fmt::Display for CircuitError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.name.is_empty() {
            write!(f, "{}", self.error)
        } else {
            write!(f, "{}: {}", self.name, self.error)
        }
    }
}

#[cfg(feature = "std")]
impl std::error::Error for CircuitError {}

/// Result of the circuit area.
pub type CircuitResult<T> = core::result::Result<T, CircuitError>;

/// Attach a name to a crate error result.
pub(crate) trait WithName<T> {
    fn named(self, name: Name) -> CircuitResult<T>;
}

impl<T> WithName<T> for crate::Result<T> {
    fn named(self, name: Name) -> CircuitResult<T> {
        self.map_err(|error| CircuitError { error, name })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use alloc::string::ToString;

    #[test]
    fn names_validate_and_report_the_text() {
        assert!(Name::new("R_load.2").is_ok());
        assert_eq!(Name::new("").unwrap_err().error.code(), "out_of_domain");
        let long = "abcdefghijklmnopqrstuvwxyz";
        let e = Name::new(long).unwrap_err();
        assert_eq!(e.error.code(), "too_large");
        assert_eq!(e.name.as_str(), &long[..MAX_NAME_LEN]);
        assert_eq!(Name::new("µ1").unwrap_err().name.as_str(), "µ1");
        assert!(Name::new("GND").unwrap().is_ground());
        assert!(!Name::internal("0").is_ground());
    }

    #[test]
    fn display_puts_the_name_first() {
        let e = CircuitError::named(
            Error::OutOfDomain {
                param: "value",
                requirement: "must be greater than zero",
            },
            "R3",
        );
        assert_eq!(e.to_string(), "R3: value: must be greater than zero");
        let plain: Error = e.into();
        assert_eq!(plain.param(), "value");
        assert_eq!(
            CircuitError::from(Error::NotFinite { param: "f" }).to_string(),
            "f: must be a finite number, not NaN or infinity"
        );
    }
}
