//! Frequency response, bandwidth and stability of a feedback loop.
//!
//! Enter the open-loop amplifier A(s) you have (gain, poles, zeros, complex
//! pairs, integrators, low cuts, a delay) and the feedback network β(s); get the
//! loop-gain Bode data, every crossover with the margins, the closed-loop poles
//! with a stability verdict, the −3 dB bandwidth and peaking, the step response,
//! and how much compensation the loop needs.
//!
//! ```
//! use loopwright::freq::{closed_loop_poles, stability_margins, FeedbackLoop, TransferModel, Verdict};
//!
//! // A0 = 100 dB with poles at 10 Hz, 1 MHz and 20 MHz; β = 0.1 (gain of 10).
//! let a = TransferModel::constant(1e5).pole(10.0).pole(1e6).pole(2e7);
//! let l = FeedbackLoop::with_constant_beta(a, 0.1).unwrap();
//! let m = stability_margins(&l).unwrap();
//! assert!(m.phase_margin_deg.unwrap() > 0.0);
//! assert_eq!(closed_loop_poles(&l).unwrap().verdict, Verdict::Stable);
//! ```
//!
//! - [`model`]: the models and the validated loop;
//! - [`response`]: T(jω), Af(jω), sweeps, phase unwrapping;
//! - [`evaluated`]: any loop gain given by how to evaluate it (the engine's input);
//! - [`crossings`]: every unity-gain and −180° crossing;
//! - [`margins`]: phase and gain margin;
//! - [`nyquist`]: the Nyquist curve, least distance from −1, encirclements;
//! - [`poly`], [`roots`]: characteristic polynomial and its roots;
//! - [`poles`]: closed-loop poles, verdict, ζ and Q;
//! - [`bandwidth`]: −3 dB frequencies and peaking;
//! - [`step`]: step response and its metrics;
//! - [`closed_forms`]: one- and two-pole formulas;
//! - [`compensation`]: dominant pole and largest β for a target margin;
//! - [`summary`]: all of the above for one loop at once.

pub mod bandwidth;
pub mod closed_forms;
pub mod compensation;
pub mod crossings;
mod eval;
pub mod evaluated;
pub mod margins;
pub mod model;
pub mod nyquist;
pub mod poles;
pub mod poly;
pub mod response;
pub mod roots;
pub mod step;
pub mod summary;

pub use bandwidth::{closed_loop_bandwidth, Bandwidth};
pub use closed_forms::{
    gain_bandwidth, pole_for_gbw, single_pole_high_cutoff, single_pole_low_cutoff,
    two_pole_response, TwoPoleResponse,
};
pub use compensation::{dominant_pole_for_margin, max_beta_for_margin, Compensation};
pub use crossings::{gain_crossings_hz, phase_crossings_hz, CROSSING_REL_TOL};
pub use evaluated::{EvaluatedLoop, GridHints};
pub use margins::{
    margins_and_poles, margins_of, margins_with_density, stability_margins, Crossing,
    MarginValidity, Margins,
};
pub use model::{ComplexPair, FeedbackLoop, TransferModel};
pub use nyquist::{nyquist, nyquist_of, Encirclements, LeastDistance, Nyquist, NyquistCurve};
pub use poles::{closed_loop_poles, ClosedLoopPoles, Pole, Verdict};
pub use poly::{
    characteristic_polynomial, closed_loop_transfer, CharacteristicPolynomial, ClosedLoopTransfer,
};
pub use response::{
    closed_loop_gain_at, closed_loop_sweep, log_frequencies, loop_gain_at, loop_gain_sweep,
    unwrap_phase_deg, Sweep, MAX_SWEEP_POINTS,
};
pub use roots::roots as polynomial_roots;
pub use step::{step_response, step_waveform, StepResponse, StepWaveform};
pub use summary::{analyze_loop, LoopSummary};
