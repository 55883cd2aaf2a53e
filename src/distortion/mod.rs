//! Distortion under feedback and slew-rate limits.
//!
//! - [`series`]: the amplifier y = a1·x + a2·x² + a3·x³ and its closed-loop
//!   coefficients b1, b2, b3 by series reversion;
//! - [`leading_order`]: leading-order HD2 and HD3 at an input or output amplitude,
//!   open and closed loop, and their ratio; coefficients from measured HD2/HD3;
//! - [`frequency`]: the same at a signal frequency, with the loop gain of a
//!   dominant-pole amplifier taken at the fundamental and at each harmonic;
//! - [`newton`]: the loop y = A(x − β·y) solved point by point (guarded Newton);
//! - [`harmonics`]: the output spectrum from those solutions by a short DFT;
//! - [`validity`]: series against numeric, and where the series stops holding;
//! - [`slew`]: full-power bandwidth and the largest undistorted amplitude.
//!
//! ```
//! use loopwright::distortion::{feedback_distortion, series_check, AmplitudeAt, PowerSeries};
//!
//! // An amplifier with a gain of 2000, 1 % HD2 and 0.2 % HD3 at 1 mV in.
//! let amp = loopwright::distortion::series_from_distortion(2000.0, 0.01, -0.002, 1e-3, AmplitudeAt::Input).unwrap();
//! // In a loop for a gain of about 20 (D ≈ 100), at 1 V out.
//! let f = feedback_distortion(&amp, 0.0495, 1.0, AmplitudeAt::Output).unwrap();
//! assert!((f.hd2_ratio.unwrap() - 0.01).abs() < 1e-12);
//! // The numeric solve agrees with the leading-order series to about 1 % here,
//! // and 100 times better at a tenth of the amplitude.
//! let c = series_check(&amp, 0.0495, f.closed.input_amplitude, 64).unwrap();
//! assert!(c.hd2_difference < 0.02 && c.hd3_difference < 0.02);
//! let c = series_check(&amp, 0.0495, 0.1 * f.closed.input_amplitude, 64).unwrap();
//! assert!(c.hd2_difference < 2e-4 && c.hd3_difference < 2e-4);
//! ```

pub mod frequency;
pub mod harmonics;
pub mod leading_order;
pub mod newton;
pub mod series;
pub mod slew;
pub mod validity;

pub use frequency::{feedback_distortion_at, FrequencyDistortion, LoopGainAt};
pub use harmonics::{
    closed_loop_spectrum, short_dft, Spectrum, DEFAULT_SAMPLES, HARMONICS, MAX_SAMPLES, MIN_SAMPLES,
};
pub use leading_order::{
    feedback_distortion, harmonic_distortion, series_from_distortion, AmplitudeAt, Distortion,
    FeedbackDistortion,
};
pub use newton::LoopSolver;
pub use series::{closed_loop_series, return_difference, PowerSeries};
pub use slew::{full_power_bandwidth, max_undistorted_amplitude, required_slew_rate};
pub use validity::{
    relative_difference, series_check, series_validity_sweep, SeriesCheck, ValiditySweep,
    MAX_SWEEP_POINTS, NUMERIC_HD_FLOOR,
};
