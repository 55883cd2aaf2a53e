//! One stage described once: the amplifier from its datasheet figures, the
//! stage document that writes the full circuit, and the circuit's loop gain
//! and closed-loop behaviour across frequency.
//!
//! - [`spread`]: a min/typ/max figure and the point an analysis uses;
//! - [`density`]: a noise density with its 1/f corner;
//! - [`amplifier`]: the amplifier model and its open-loop gain A(jω);
//! - [`amplifier_json`]: the model as a JSON object (circuit and stage documents);
//! - [`document`]: the common stages from their parts, and the circuit each writes;
//! - [`document_json`]: the stage document (`docs/stage.md`);
//! - [`document_pairs`]: a stage from name/value pairs (worksheet ranges, batch rows);
//! - [`open_loop`]: the amplifier's open-loop gain A(jω) swept;
//! - [`loop_gain`]: the return ratio at an amplifier or controlled source, swept;
//! - [`design`]: the part value for a target phase margin (Cf, Riso, Cl, dominant pole, β);
//! - [`measured`]: a loop gain measured on the bench (CSV), through the same engine;
//! - [`margins`]: margins of a circuit's loop, through the freq engine;
//! - [`nyquist`]: its Nyquist curve, least distance from −1, encirclements;
//! - [`injection`]: the loop gain broken at a node by double injection;
//! - [`asymptotic`]: Af = G∞·T/(1 + T) + G0/(1 + T) with the amplifier's A(jω);
//! - [`closed_loop`]: gain to any node or element and port impedance, swept;
//! - [`poles`]: the circuit's poles from its nodal matrices, and the verdict;
//! - [`step`]: the step response of a circuit (residues at its poles) and its metrics;
//! - [`eigen`]: eigenvalues of a real matrix (balance, Hessenberg, QR).

pub mod amplifier;
pub mod amplifier_json;
pub mod asymptotic;
pub mod closed_loop;
pub mod density;
pub mod design;
pub mod distortion;
pub mod document;
pub mod document_json;
pub mod document_pairs;
pub mod eigen;
pub mod injection;
pub mod loop_gain;
pub mod margins;
pub mod measured;
pub mod nyquist;
pub mod open_loop;
pub mod poles;
pub mod spread;
pub mod step;

pub use amplifier::{Amplifier, BandwidthRule, OutputSwing, GBW_MATCH_REL};
pub use density::NoiseDensity;
pub use document::{Stage, StageCircuit, StageKind, StageParts};
pub use document_json::{read_stage, write_stage};
pub use spread::{Spread, SpreadPoint};
