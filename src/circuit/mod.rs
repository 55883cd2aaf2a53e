//! Loading-aware analysis of real feedback circuits.
//!
//! - [`error`]: node and element names, and the error that carries one;
//! - [`value`]: component values with SI prefixes and IEC 60062 codes;
//! - [`netlist`]: the small-signal circuit description and its size limits;
//! - [`json`]: the versioned JSON document (`docs/circuit.md`);
//! - [`lu`]: the dense complex LU with partial pivoting;
//! - [`mna`]: the exact modified nodal solution, transfers and port impedances;
//! - [`templates`]: the circuit of each topology from an amplifier model,
//!   a feedback network, a source and a load;
//! - [`twoport`]: the systematic two-port method beside the exact solution;
//! - [`blackman`]: return ratio, Blackman's impedance formula, asymptotic gain.
//!
//! Errors are [`CircuitError`]: the crate [`crate::Error`] plus the name of the
//! node or element at fault (kept in a fixed-size [`Name`], so the error stays
//! `Copy` and allocation-free). Every result is a small-signal, linear model.
//!
//! ```
//! use loopwright::circuit::templates::{AmplifierModel, FeedbackNetwork, StageSpec};
//! use loopwright::circuit::twoport::analyze;
//! use loopwright::feedback::Topology;
//! // An inverting transresistance stage: rm = −10 MΩ open-circuit, Rf = 100 kΩ.
//! let spec = StageSpec {
//!     topology: Topology::ShuntShunt,
//!     amplifier: AmplifierModel { ri: 1e3, ro: 100.0, gain: -1e7, ci: 0.0, co: 0.0 },
//!     network: FeedbackNetwork { rf: 1e5, rg: 0.0, cf: 0.0 },
//!     rs: 1e4,
//!     rl: 1e4,
//! };
//! let r = analyze(&spec, 0.0).unwrap();
//! assert!((r.ideal_af.re + 1e5).abs() < 1e-6);      // 1/β = −Rf
//! assert!(r.af.relative_error < 1e-3);              // two-port vs exact
//! assert!(r.ideal_af_error > r.af.relative_error);  // the ideal answer is worse
//! ```

pub(crate) mod amplifier_stamp;
pub mod blackman;
pub mod error;
pub mod json;
pub mod lu;
pub mod mna;
pub mod netlist;
pub mod templates;
pub mod tolerance;
pub mod twoport;
pub mod value;

pub use error::{CircuitError, CircuitResult, Name, MAX_NAME_LEN};
pub use mna::{
    current_transfer, port_impedance, solve, voltage_transfer, voltage_transfer_sweep, NamedValue,
    Solution, MAX_SWEEP,
};
pub use netlist::{
    AmplifierPart, Circuit, Control, ControlSpec, Element, ElementKind, MAX_BRANCHES, MAX_ELEMENTS,
    MAX_NODES,
};
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
