//! Whole-stage tolerance: every part's spread, the amplifier's min/typ/max and
//! the temperature range, on every figure a spec limits (`docs/tolerance.md`).
//!
//! - [`parts`]: the varied parts of a stage and the stage at one set of values
//!   and one temperature;
//! - [`figures`]: the figures (gain, phase, gain error, bandwidth, peaking,
//!   margins, impedances, noise, settling) on the stage's full circuit;
//! - [`spec`]: limits on figures;
//! - [`worstcase`]: extremes by corner enumeration or sensitivity-guided
//!   corners, with a search where a figure is not monotonic;
//! - [`montecarlo`]: seeded Monte Carlo, yield overall and per limit;
//! - [`sensitivity`]: normalised sensitivities, variance shares, the part to
//!   tighten first.

pub mod figures;
mod gain_trials;
pub mod montecarlo;
pub mod parts;
pub mod sensitivity;
pub mod spec;
pub mod worstcase;

pub use figures::{figure_value, Figure, FIGURE_NAMES};
pub use montecarlo::{monte_carlo, MonteCarlo, MonteCarloOptions, MAX_TRIALS};
pub use parts::{
    AmplifierSpread, CircuitPorts, CircuitSubject, PartSpread, Subject, TolStage, Varied,
};
pub use sensitivity::{sensitivity, Sensitivity};
pub use spec::{validate_spec, Limit};
pub use worstcase::{worst_case, WorstCase, WorstCaseMethod, DEFAULT_MAX_CORNERS, MAX_CORNERS};
