//! Small-signal noise of any circuit document: every resistor, every
//! amplifier's voltage and current noise and the noise given to current
//! sources, carried to the chosen output through the real network.
//!
//! - [`setup`]: the output, temperature, signal source and current-source noise;
//! - [`sources`]: each source's density and where it enters the nodal equations;
//! - [`output`]: the output as a combination of the nodal unknowns;
//! - [`adjoint`]: the transposed system, one solve per frequency for all sources;
//! - [`analysis`]: the transfers and output PSDs at one frequency;
//! - [`densities`]: densities, contributions, shares, input-referred density and
//!   noise gain over a list of frequencies;
//! - [`band`]: rms over a band by adaptive quadrature, and the SNR.
//!
//! The stage noise of [`crate::noise::stage`] (resistive non-inverting and
//! inverting stages over a GBW model) is the special case this analysis
//! reproduces on the equivalent circuit (`tests/noise_circuit_stage.rs`).
//!
//! ```
//! use loopwright::circuit::json::read_circuit;
//! use loopwright::noise::circuit::{noise_densities, NoiseSetup};
//! // A gain-of-10 non-inverting stage with an amplifier of 5 nV/√Hz.
//! let c = read_circuit(r#"{"format":"loopwright-circuit","version":2,"elements":[
//!   {"name":"Vs","kind":"voltage-source","nodes":["in","0"],"value":0},
//!   {"name":"U1","kind":"amplifier","nodes":["out","0"],"control":["in","fb"],
//!    "model":{"a0":1e6,"gbwHz":"10M","voltageNoise":{"density":5e-9,"cornerHz":0}}},
//!   {"name":"Rf","kind":"resistor","nodes":["out","fb"],"value":"9k"},
//!   {"name":"Rg","kind":"resistor","nodes":["fb","0"],"value":"1k"}]}"#).unwrap();
//! let mut setup = NoiseSetup::at_node("out", 300.0);
//! setup.input_source = Some("Vs".into());
//! let d = noise_densities(&c, &setup, &[1e3]).unwrap();
//! let en = d.sources.iter().find(|s| s.name == "U1.en").unwrap();
//! assert!((en.density[0] / 50e-9 - 1.0).abs() < 1e-4);   // 5 nV × NG 10
//! assert!((d.noise_gain[0] - 10.0).abs() < 1e-3);
//! ```

pub(crate) mod adjoint;
pub mod analysis;
pub mod band;
pub mod densities;
pub(crate) mod output;
pub mod setup;
pub mod sources;

pub use analysis::{CircuitNoise, NoisePoint};
pub use band::{band_noise, BandNoise, SourceRms};
pub use densities::{noise_densities, NoiseDensities, NoiseGainPeak, SourceDensity};
pub use setup::{CurrentSourceNoise, NoiseOutput, NoiseSetup, SourceNoiseKind};
pub use sources::{NoiseSource, SourceKind, ELEMENTARY_CHARGE};
