//! Feedback relations for all four topologies.
//!
//! - [`topology`]: the four topologies, their names and units;
//! - [`gain`]: closed-loop gain, loop gain, amount of feedback, phasor forms;
//! - [`impedance`]: input and output impedance with feedback;
//! - [`inverse`]: β for a target gain, least open-loop gain, gain ceiling;
//! - [`spread`]: sensitivity and closed-loop gain over an open-loop gain range;
//! - [`summary`]: all of the above for one stage at once.

pub mod gain;
pub mod impedance;
pub mod inverse;
pub mod spread;
pub mod summary;
pub mod topology;

pub use gain::{
    closed_loop_gain, feedback_amount, feedback_amount_db, feedback_sense, loop_gain, loop_phasors,
    FeedbackSense, LoopPhasors,
};
pub use impedance::{impedances_with_feedback, resistances_with_feedback, FeedbackImpedances};
pub use inverse::{beta_for_gain, max_closed_loop_gain, min_open_loop_gain, GainCeiling};
pub use spread::{gain_sensitivity, gain_spread, GainSpread};
pub use summary::{summarize, FeedbackSummary};
pub use topology::{Mixing, Sampling, Topology, TOPOLOGY_NAMES};
