//! # loopwright
//!
//! The computations of negative-feedback amplifier design: the feedback relations of
//! all four topologies (closed-loop gain, loop gain, amount of feedback, impedances,
//! inverse design, gain stability), in a `no_std` core that the WebAssembly bindings,
//! the worksheet engine and the page all call.
//!
//! ```
//! use loopwright::feedback::{closed_loop_gain, Topology};
//!
//! // A voltage amplifier with A = 100 000 V/V and β = 0.01 V/V.
//! let af = closed_loop_gain(1e5, 0.01).unwrap();
//! assert!((af - 99.900_099_900_1).abs() < 1e-9);
//!
//! let t: Topology = "voltage-series".parse().unwrap();
//! assert_eq!(t, Topology::SeriesShunt);
//! assert_eq!(t.gain_unit(), "V/V");
//!
//! // Bad input is a typed error naming the parameter, never NaN.
//! assert_eq!(closed_loop_gain(f64::NAN, 0.01).unwrap_err().param(), "a");
//! ```
//!
//! Every result is a small-signal, linear model: check designs on the bench.
#![cfg_attr(not(feature = "std"), no_std)]
#![forbid(unsafe_code)]

extern crate alloc;

pub mod batch;
pub mod check;
pub mod circuit;
pub mod csv;
pub mod distortion;
pub mod error;
pub mod feedback;
mod float;
pub mod freq;
pub mod json;
pub mod network;
pub mod noise;
pub mod notation;
pub mod sheet;
mod sort;
pub mod stage;
pub mod tolerance;

#[cfg(feature = "wasm-lite")]
pub mod wasm;
// The spreadsheet-file module is a wasm module of its own (src/wasm/files.rs).
#[cfg(all(feature = "wasm-sheetfiles", not(feature = "wasm-lite")))]
#[path = "wasm/files.rs"]
pub mod wasm_files;

pub use error::{Error, Result};
