//! Noise of op-amp feedback stages.
//!
//! - [`thermal`]: 4kTR thermal noise, Boltzmann constant per the 2019 SI;
//! - [`amplifier`]: op-amp voltage and current noise with 1/f corners;
//! - [`stage`]: non-inverting and inverting stages, noise gain, every source's
//!   output density, input-referred density;
//! - [`response`]: the closed-loop response that shapes the output noise (GBW,
//!   noise gain, up to two extra poles; unstable loops refused);
//! - [`quadrature`]: adaptive Gauss–Kronrod integration;
//! - [`integrated`]: output density versus frequency and rms noise over a band.
//! - [`circuit`]: noise of any circuit document through its real network.
//!
//! ```
//! use loopwright::noise::{integrated_output_noise, AmplifierNoise, ClosedLoopResponse, Stage, StageKind};
//!
//! // A gain-of-101 microphone preamp: 10 kΩ/100 Ω, 200 Ω source, at 300 K, an op-amp
//! // with 1.1 nV/√Hz (10 Hz corner), 1.5 pA/√Hz (100 Hz corner), 50 MHz GBW.
//! let stage = Stage::new(StageKind::NonInverting, 10e3, 100.0, 200.0, 300.0).unwrap();
//! let amp = AmplifierNoise::new(1.1e-9, 10.0, 1.5e-12, 100.0).unwrap();
//! let loop_response = ClosedLoopResponse::new(stage.noise_gain(), 50e6, &[]).unwrap();
//! let n = integrated_output_noise(&stage, &amp, &loop_response, 20.0, 20e3).unwrap();
//! assert!(n.input_referred_rms > 0.2e-6 && n.input_referred_rms < 0.4e-6);
//! ```

pub mod amplifier;
pub mod circuit;
pub mod integrated;
pub mod quadrature;
pub mod response;
pub mod stage;
pub mod thermal;

pub use amplifier::AmplifierNoise;
pub use integrated::{
    integrated_output_noise, output_noise_density, output_noise_sweep, IntegratedNoise, NoiseSweep,
};
pub use response::{ClosedLoopResponse, MAX_EXTRA_POLES};
pub use stage::{noise_contributions, NoiseContributions, Stage, StageKind};
pub use thermal::{thermal_noise_current_density, thermal_noise_density, BOLTZMANN};
