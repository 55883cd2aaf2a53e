//! Feedback-network synthesis and tolerance.
//!
//! - [`eseries`]: the IEC 60063 series E3 … E192, nearest / next-up / next-down
//!   standard values in any decade;
//! - [`notation`]: parse and print values with SI prefixes and IEC 60062 letter
//!   codes (4k7, 2R2, R47, 1M5);
//! - [`pairs`]: ranked standard-value resistor pairs for a gain or divider ratio,
//!   single resistors for a transresistance or current sense, with optional
//!   two-resistor legs;
//! - [`worstcase`]: extremes of gain, impedances and bandwidth of an op-amp stage
//!   over resistor tolerance corners and the open-loop gain range;
//! - [`montecarlo`]: seeded, reproducible Monte Carlo of the same quantities.

pub mod eseries;
pub mod montecarlo;
pub mod pairs;
pub mod worstcase;

pub use crate::notation::{format_si, letter_code, parse_value, parse_value_with_unit, Reading};
pub use eseries::{
    neighbours, series_values, standard_value, Neighbours, Rounding, Series, SERIES_NAMES,
};
pub use montecarlo::{
    monte_carlo, monte_carlo_samples, sample_stats, seed_from_number, Distribution, Histogram,
    MonteCarloResult, MonteCarloSpec, Percentile, SampleStats, MAX_BINS, MAX_TRIALS, PERCENTILES,
};
pub use pairs::{
    best_pairs, single_resistor, Combine, Joint, Leg, Network, PairCandidate, PairResult, PairSpec,
    SingleCandidate, MAX_CANDIDATES,
};
pub use worstcase::{
    stage_values, worst_case, Corner, End, Extremes, Metric, Stage, StageSpec, StageValues,
    WorstCase, CORNERS,
};
