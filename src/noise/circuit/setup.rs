//! What a circuit noise analysis is asked: the output, the temperature, the
//! signal source, the amplifier whose noise gain is reported, and the noise
//! given to current sources.

use crate::stage::NoiseDensity;
use alloc::string::String;
use alloc::vec::Vec;

/// The quantity whose noise is computed.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum NoiseOutput {
    /// The voltage V(plus) − V(minus), V.
    Voltage {
        /// Node name.
        plus: String,
        /// Node name (`0` for ground).
        minus: String,
    },
    /// The current of an element (from its node a through it to its node b), A.
    Current {
        /// Element name.
        element: String,
    },
}

impl NoiseOutput {
    /// The voltage of `node` against ground.
    pub fn node(node: &str) -> NoiseOutput {
        NoiseOutput::Voltage {
            plus: String::from(node),
            minus: String::from("0"),
        }
    }
}

/// How a current source's noise is given.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum SourceNoiseKind {
    /// A density (A/√Hz) with its 1/f corner.
    Density(NoiseDensity),
    /// Shot noise of the source's own current I: √(2·q·|I|) A/√Hz, white.
    Shot,
}

/// Noise carried by an independent current source of the circuit (a
/// photodiode's shot noise, a sensor's current noise).
#[derive(Debug, Clone, PartialEq)]
pub struct CurrentSourceNoise {
    /// The current source's element name.
    pub element: String,
    /// Its density or shot noise.
    pub kind: SourceNoiseKind,
}

/// The analysis's settings.
#[derive(Debug, Clone, PartialEq)]
pub struct NoiseSetup {
    /// Where the noise is observed.
    pub output: NoiseOutput,
    /// Temperature of every resistor, K (> 0).
    pub temperature_k: f64,
    /// The independent source carrying the signal, for the signal gain and the
    /// input-referred density (`None`: not computed).
    pub input_source: Option<String>,
    /// The amplifier whose voltage-noise transfer is reported as the noise gain
    /// (`None`: the first amplifier element, if any).
    pub amplifier: Option<String>,
    /// Noise given to current sources.
    pub current_noise: Vec<CurrentSourceNoise>,
}

impl NoiseSetup {
    /// The voltage of `node` at `temperature_k`, nothing else set.
    pub fn at_node(node: &str, temperature_k: f64) -> NoiseSetup {
        NoiseSetup {
            output: NoiseOutput::node(node),
            temperature_k,
            input_source: None,
            amplifier: None,
            current_noise: Vec::new(),
        }
    }
}
