//! Feedback-network synthesis and tolerance.
//!
//! - [`eseries`]: the IEC 60063 series E3 … E192, nearest / next-up / next-down
//!   standard values in any decade;
//! - [`notation`]: parse and print values with SI prefixes and IEC 60062 letter
//!   codes (4k7, 2R2, R47, 1M5);
//! - [`pairs`]: ranked standard-value resistor pairs for a gain or divider ratio,
//!   single resistors for a transresistance or current sense, with optional
//!   two-resistor legs;
//! - [`choose`]: series, tolerance grade and leg build ranked by yield against
//!   a gain or ratio with a tolerance, and by cost;
//! - [`worstcase`]: extremes of gain, impedances and bandwidth of an op-amp stage
//!   over resistor tolerance corners and the open-loop gain range;
//! - [`montecarlo`]: seeded, reproducible Monte Carlo of the same quantities.

pub mod choose;
pub mod eseries;
pub mod montecarlo;
pub mod pairs;
pub mod worstcase;

pub use crate::notation::{format_si, letter_code, parse_value, parse_value_with_unit, Reading};
pub use choose::{
    choose_parts, pair_yield, Choice, ChooseResult, ChooseSpec, PairYieldSpec, YieldMethod,
    CANDIDATES_PER_BUILD, DEFAULT_GRADES, DEFAULT_SERIES, MAX_GRADES,
};
pub use eseries::{
    neighbours, series_values, standard_value, Neighbours, Rounding, Series, SERIES_NAMES,
};
pub use montecarlo::{
    monte_carlo, monte_carlo_samples, sample_stats, seed_from_number, Distribution,
    GainDistribution, Histogram, MonteCarloResult, MonteCarloSpec, Percentile, SampleStats,
    GAIN_DISTRIBUTION_NAMES, MAX_BINS, MAX_TRIALS, PERCENTILES,
};
pub use pairs::{
    best_pairs, single_resistor, Combine, Joint, Leg, Network, PairCandidate, PairResult, PairSpec,
    SingleCandidate, MAX_CANDIDATES,
};
pub use worstcase::{
    stage_values, worst_case, Corner, End, Extremes, Hold, Metric, Stage, StageSpec, StageValues,
    WorstCase, CORNERS, HOLD_NAMES,
};
