//! Loading-aware analysis of real feedback circuits (catalog area D).
//!
//! - [`error`]: node and element names, and the error that carries one;
//! - [`value`]: component values with SI prefixes and IEC 60062 codes;
//! - [`netlist`]: the small-signal circuit description and its size limits;
//! - [`json`]: the versioned JSON document (`docs/circuit-format.md`);
//! - [`lu`]: the dense complex LU with partial pivoting;
//! - [`mna`]: the exact modified nodal solution, transfers and port impedances;

pub mod error;
pub mod json;
pub mod lu;
pub mod mna;
pub mod netlist;
pub mod templates;
pub mod twoport;
pub mod value;

pub use error::{CircuitError, CircuitResult, Name, MAX_NAME_LEN};
pub use mna::{current_transfer, port_impedance, solve, voltage_transfer, NamedValue, Solution};
pub use netlist::{Circuit, Control, ControlSpec, Element, ElementKind, MAX_BRANCHES, MAX_ELEMENTS, MAX_NODES};
pub use value::parse_value;

/// Serialize a complex number as `{re, im}` (for the JS results).
#[cfg(feature = "serde")]
pub(crate) mod cx {
    use num_complex::Complex64;
    use serde::ser::SerializeStruct;

    pub fn serialize<S: serde::Serializer>(z: &Complex64, s: S) -> Result<S::Ok, S::Error> {
        let mut st = s.serialize_struct("Complex", 2)?;
        st.serialize_field("re", &z.re)?;
        st.serialize_field("im", &z.im)?;
        st.end()
    }
}
