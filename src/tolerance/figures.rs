//! The figures of a stage that a spec limits, each computed on the stage's
//! full circuit by the engines of `crate::stage` and `crate::noise::circuit`.
//!
//! - gain `H(f)` = output / source (V/V, V/A, A/V or A/A, as the stage);
//!   magnitude in dB 20·log10|H| and phase ∠H in degrees (−180 … 180);
//! - gain error at f against a target G, %: (|H(f)| − |G|)/|G|·100;
//! - −3 dB bandwidth, Hz: the lowest f with |H(f)| = |H(0)|/√2, found on a
//!   grid of [`GRID_PER_DECADE`] points per decade from [`GRID_LOW_HZ`] to
//!   10⁴ × the amplifier's gain-bandwidth product, then by bisection on log f
//!   to [`BISECTION_STEPS`] halvings;
//! - peaking, dB: 20·log10(max |H(f)| / |H(0)|) below the bandwidth, ≥ 0
//!   (the grid's largest sample refined by golden-section search);
//! - phase margin (°) and gain margin (dB) of the loop at the amplifier `U1`
//!   (`crate::stage::margins`);
//! - input and output impedance |Z| at f, Ω: the input port without the
//!   source (and the series source resistance); the output at `out` without
//!   the load `Rl`, `Cl` (voltage-output stages only);
//! - output noise over a band, V rms (A rms for a current output), and the
//!   same referred to the input through |H(f)| at each frequency
//!   (`crate::noise::circuit::band_noise`), resistors at the analysis temperature;
//! - settling time of the step response to a band, s (`crate::stage::step`).

use crate::circuit::blackman::Output;
use crate::circuit::Circuit;
use crate::circuit::{CircuitError, CircuitResult};
use crate::error::Error;
use crate::freq::Margins;
use crate::noise::circuit::{band_noise, NoiseOutput, NoiseSetup};
use crate::stage::closed_loop::{gain_sweep, impedance_sweep};
use crate::stage::margins::{circuit_margins, circuit_margins_hinted, LoopHints};
use crate::stage::step::{circuit_step, StepOutput};
use crate::stage::{SpreadPoint, Stage, StageCircuit};
use alloc::string::String;
use alloc::vec::Vec;
use num_complex::Complex64;

/// The top of the bandwidth grid per the amplifier's gain-bandwidth product
/// (a circuit: its amplifiers' largest).
pub const GRID_TOP_PER_GBW: f64 = 1e4;
/// The top of the bandwidth grid of a circuit without an amplifier model, Hz
/// (common practice, no source: above any audio or video band of interest).
pub const GRID_TOP_NO_AMPLIFIER_HZ: f64 = 1e10;
/// Lowest frequency of the bandwidth grid, Hz.
pub const GRID_LOW_HZ: f64 = 1.0;
/// Points per decade of the bandwidth grid.
pub const GRID_PER_DECADE: usize = 10;
/// Bisection steps on log f for the −3 dB point (2⁻⁴⁰ of a grid step).
pub const BISECTION_STEPS: usize = 40;
/// Kelvin at 0 °C.
pub const ZERO_C_K: f64 = 273.15;

/// A figure of the stage.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(
    feature = "serde",
    serde(
        tag = "figure",
        rename_all = "camelCase",
        rename_all_fields = "camelCase"
    )
)]
pub enum Figure {
    /// 20·log10|H(f)|, dB.
    GainDb {
        /// Frequency, Hz (≥ 0).
        freq_hz: f64,
    },
    /// ∠H(f), degrees.
    PhaseDeg {
        /// Frequency, Hz (≥ 0).
        freq_hz: f64,
    },
    /// (|H(f)| − |target|)/|target|·100, %.
    GainErrorPercent {
        /// Frequency (the top of the band), Hz.
        freq_hz: f64,
        /// The target gain (≠ 0).
        target: f64,
    },
    /// −3 dB bandwidth, Hz.
    BandwidthHz,
    /// Peaking, dB (≥ 0).
    PeakingDb,
    /// Phase margin, degrees.
    PhaseMarginDeg,
    /// Gain margin, dB.
    GainMarginDb,
    /// |Zin(f)|, Ω.
    InputImpedanceOhm {
        /// Frequency, Hz.
        freq_hz: f64,
    },
    /// |Zout(f)|, Ω.
    OutputImpedanceOhm {
        /// Frequency, Hz.
        freq_hz: f64,
    },
    /// Output noise over a band, rms.
    OutputNoiseRms {
        /// Band, Hz, low < high.
        band_hz: [f64; 2],
    },
    /// Input-referred noise over a band, rms.
    InputNoiseRms {
        /// Band, Hz, low < high.
        band_hz: [f64; 2],
    },
    /// Settling time of the step response to ± `band` of the final value, s.
    SettlingTimeS {
        /// Settling band as a fraction (0 … 0.5), e.g. 0.001.
        band: f64,
    },
}

/// The figure names of the spec.
pub const FIGURE_NAMES: &str = "gainDb, phaseDeg, gainErrorPercent, bandwidthHz, peakingDb, phaseMarginDeg, gainMarginDb, inputImpedanceOhm, outputImpedanceOhm, outputNoiseRms, inputNoiseRms, settlingTimeS";

impl Figure {
    /// The figure's name (as in [`FIGURE_NAMES`]).
    pub const fn name(&self) -> &'static str {
        match self {
            Figure::GainDb { .. } => "gainDb",
            Figure::PhaseDeg { .. } => "phaseDeg",
            Figure::GainErrorPercent { .. } => "gainErrorPercent",
            Figure::BandwidthHz => "bandwidthHz",
            Figure::PeakingDb => "peakingDb",
            Figure::PhaseMarginDeg => "phaseMarginDeg",
            Figure::GainMarginDb => "gainMarginDb",
            Figure::InputImpedanceOhm { .. } => "inputImpedanceOhm",
            Figure::OutputImpedanceOhm { .. } => "outputImpedanceOhm",
            Figure::OutputNoiseRms { .. } => "outputNoiseRms",
            Figure::InputNoiseRms { .. } => "inputNoiseRms",
            Figure::SettlingTimeS { .. } => "settlingTimeS",
        }
    }

    /// Check the figure's own settings.
    ///
    /// # Errors
    /// A frequency not finite or negative (param `freqHz`); a target zero or
    /// not finite (`target`); a band not 0 ≤ low < high (`bandHz`); a settling
    /// band outside (0, 0.5) (`band`).
    pub fn validate(&self) -> crate::Result<()> {
        match *self {
            Figure::GainDb { freq_hz }
            | Figure::PhaseDeg { freq_hz }
            | Figure::InputImpedanceOhm { freq_hz }
            | Figure::OutputImpedanceOhm { freq_hz } => {
                crate::check::non_negative("freqHz", freq_hz)?;
            }
            Figure::GainErrorPercent { freq_hz, target } => {
                crate::check::non_negative("freqHz", freq_hz)?;
                crate::check::nonzero("target", target)?;
            }
            Figure::OutputNoiseRms { band_hz } | Figure::InputNoiseRms { band_hz } => {
                let lo = crate::check::non_negative("bandHz", band_hz[0])?;
                if crate::check::finite("bandHz", band_hz[1])? <= lo {
                    return Err(Error::OutOfDomain {
                        param: "bandHz",
                        requirement: "must be low ≥ 0 below high",
                    });
                }
            }
            Figure::SettlingTimeS { band } if crate::check::positive("band", band)? >= 0.5 => {
                return Err(Error::OutOfDomain {
                    param: "band",
                    requirement: "must be between 0 and 0.5",
                });
            }
            _ => {}
        }
        Ok(())
    }
}

/// What a figure is read on: a built circuit and the names of its ports.
pub(crate) struct Probe<'a> {
    /// The circuit.
    pub circuit: &'a Circuit,
    /// The source the gain is per unit of.
    pub source: &'a str,
    /// The output.
    pub output: Output<'a>,
    /// The loop's amplifier for the margins, if any.
    pub amplifier: Option<&'a str>,
    /// The top of the bandwidth grid, Hz.
    pub top_hz: f64,
    /// The stage's circuit, when the subject is a stage (its own input and
    /// output impedance ports).
    pub stage: Option<&'a StageCircuit>,
}

impl<'a> Probe<'a> {
    /// The probe of a stage's circuit, the grid top from its amplifier.
    pub fn of_stage(b: &'a StageCircuit, top_hz: f64) -> Probe<'a> {
        Probe {
            circuit: &b.circuit,
            source: b.source,
            output: match b.output_current {
                Some(e) => Output::Current(e),
                None => Output::Voltage(b.output, "0"),
            },
            amplifier: Some(b.amplifier),
            top_hz,
            stage: Some(b),
        }
    }
}

/// The top of the bandwidth grid of a circuit: [`GRID_TOP_PER_GBW`] × its
/// amplifiers' largest gain-bandwidth product, or [`GRID_TOP_NO_AMPLIFIER_HZ`].
pub(crate) fn circuit_grid_top(c: &Circuit) -> f64 {
    let gbw = c
        .elements()
        .iter()
        .filter_map(|e| e.amplifier())
        .filter_map(|p| p.model.gbw_at(p.point).ok())
        .fold(0.0, f64::max);
    if gbw > 0.0 {
        gbw * GRID_TOP_PER_GBW
    } else {
        GRID_TOP_NO_AMPLIFIER_HZ
    }
}

fn gain_at(p: &Probe, freqs: &[f64]) -> CircuitResult<Vec<f64>> {
    let h = gain_sweep(p.circuit, p.source, p.output, freqs)?;
    Ok(h.complex().iter().map(|z| z.norm()).collect())
}

fn unreachable(param: &'static str, reason: &'static str) -> CircuitError {
    Error::Unreachable { param, reason }.into()
}

/// −3 dB bandwidth and peaking (dB) of the gain.
fn bandwidth_and_peaking(b: &Probe) -> CircuitResult<(f64, f64)> {
    let g0 = gain_at(b, &[0.0])?[0];
    let top = b.top_hz;
    let decades = libm::log10(top / GRID_LOW_HZ).max(1.0);
    let n = (decades * GRID_PER_DECADE as f64) as usize + 1;
    let grid: Vec<f64> = (0..=n)
        .map(|i| GRID_LOW_HZ * libm::pow(10.0, decades * i as f64 / n as f64))
        .collect();
    let g = gain_at(b, &grid)?;
    let limit = g0 / core::f64::consts::SQRT_2;
    let Some(k) = g.iter().position(|&x| x < limit) else {
        return Err(unreachable(
            "bandwidthHz",
            "the gain does not fall 3 dB below its DC value within 10^4 × the gain-bandwidth product",
        ));
    };
    let (mut lo, mut hi) = if k == 0 {
        (0.0, grid[0])
    } else {
        (libm::log10(grid[k - 1]), libm::log10(grid[k]))
    };
    if k == 0 {
        // Below the grid's first point: bisect on f itself.
        let (mut a, mut z) = (lo, hi);
        for _ in 0..BISECTION_STEPS {
            let m = 0.5 * (a + z);
            if gain_at(b, &[m])?[0] < limit {
                z = m;
            } else {
                a = m;
            }
        }
        return Ok((0.5 * (a + z), 0.0));
    }
    for _ in 0..BISECTION_STEPS {
        let m = 0.5 * (lo + hi);
        if gain_at(b, &[libm::pow(10.0, m)])?[0] < limit {
            hi = m;
        } else {
            lo = m;
        }
    }
    let bw = libm::pow(10.0, 0.5 * (lo + hi));
    // Peaking: the largest sample below the bandwidth, refined by golden section.
    let (j, &gmax) = g[..k]
        .iter()
        .enumerate()
        .fold((0, &g[0]), |a, x| if x.1 > a.1 { x } else { a });
    let mut peak = gmax.max(g0);
    if gmax > g0 && j > 0 && j + 1 < g.len() {
        let (mut a, mut z) = (libm::log10(grid[j - 1]), libm::log10(grid[j + 1]));
        let r = 0.5 * (libm::sqrt(5.0) - 1.0);
        for _ in 0..40 {
            let (x1, x2) = (z - r * (z - a), a + r * (z - a));
            let v = gain_at(b, &[libm::pow(10.0, x1), libm::pow(10.0, x2)])?;
            peak = peak.max(v[0]).max(v[1]);
            if v[0] > v[1] {
                z = x2;
            } else {
                a = x1;
            }
        }
    }
    Ok((bw, 20.0 * libm::log10(peak / g0)))
}

/// The value of `figure` for `stage` at `temperature_c`.
///
/// # Errors
/// The figure's settings ([`Figure::validate`]); the stage's own errors; a
/// figure that does not exist for this stage ([`Error::Unreachable`] naming
/// it: no −3 dB point, no phase or gain crossover, an output impedance of a
/// current-output stage, input-referred noise without a signal path).
pub fn figure_value(stage: &Stage, figure: &Figure, temperature_c: f64) -> CircuitResult<f64> {
    figure.validate()?;
    let b = stage.circuit()?;
    let top = stage.amplifier.gbw_at(SpreadPoint::Typ)? * GRID_TOP_PER_GBW;
    figure_hinted(&Probe::of_stage(&b, top), figure, temperature_c, None)
}

/// True for the figures read from the loop's margins.
pub(crate) const fn is_margin(figure: &Figure) -> bool {
    matches!(figure, Figure::PhaseMarginDeg | Figure::GainMarginDb)
}

/// The loop's margins: with `hints` of a nearby stage, without the pole
/// analysis where it can ([`circuit_margins_hinted`]), otherwise in full.
fn margins(b: &Probe, hints: Option<&LoopHints>) -> CircuitResult<Margins> {
    let Some(amplifier) = b.amplifier else {
        return Err(no_loop());
    };
    match hints {
        Some(h) => circuit_margins_hinted(b.circuit, amplifier, h),
        None => circuit_margins(b.circuit, amplifier),
    }
}

/// The error of a margin figure on a circuit with no loop named.
pub(crate) fn no_loop() -> CircuitError {
    Error::OutOfDomain {
        param: "controlled",
        requirement: "must name the amplifier whose loop the margins are read at (the circuit has none or several)",
    }
    .into()
}

/// The frequency of a figure read from the gain H(f) alone (gain in dB,
/// phase, gain error); `None` for the others.
pub(crate) const fn gain_frequency(figure: &Figure) -> Option<f64> {
    match *figure {
        Figure::GainDb { freq_hz }
        | Figure::PhaseDeg { freq_hz }
        | Figure::GainErrorPercent { freq_hz, .. } => Some(freq_hz),
        _ => None,
    }
}

/// A gain figure from H at its frequency, `z` (as a gain sweep gives it):
/// 20·log10|H| dB, ∠H degrees, or (|H| − |target|)/|target|·100 %.
///
/// # Errors
/// A figure not read from the gain ([`Error::Unreachable`]); a result not
/// finite (param: the figure).
pub(crate) fn gain_figure(figure: &Figure, z: Complex64) -> CircuitResult<f64> {
    let v = match *figure {
        Figure::GainDb { .. } => 20.0 * libm::log10(z.norm()),
        Figure::PhaseDeg { .. } => crate::float::atan2(z.im, z.re).to_degrees(),
        Figure::GainErrorPercent { target, .. } => {
            (z.norm() - libm::fabs(target)) / libm::fabs(target) * 100.0
        }
        _ => return Err(unreachable(figure.name(), "not a figure of the gain alone")),
    };
    Ok(crate::check::result(figure.name(), v)?)
}

/// [`figure_of`], the margins found with the grid hints of a nearby stage of
/// the same topology (the Monte Carlo's nominal stage) when given.
pub(crate) fn figure_hinted(
    b: &Probe,
    figure: &Figure,
    temperature_c: f64,
    hints: Option<&LoopHints>,
) -> CircuitResult<f64> {
    let v = match *figure {
        Figure::GainDb { freq_hz }
        | Figure::PhaseDeg { freq_hz }
        | Figure::GainErrorPercent { freq_hz, .. } => {
            let h = gain_sweep(b.circuit, b.source, b.output, &[freq_hz])?;
            return gain_figure(figure, h.complex().first().copied().unwrap_or_default());
        }
        Figure::BandwidthHz => bandwidth_and_peaking(b)?.0,
        Figure::PeakingDb => bandwidth_and_peaking(b)?.1,
        Figure::PhaseMarginDeg => margins(b, hints)?
            .phase_margin_deg
            .ok_or_else(|| unreachable("phaseMarginDeg", "the loop gain never crosses 0 dB"))?,
        Figure::GainMarginDb => margins(b, hints)?
            .gain_margin_db
            .ok_or_else(|| unreachable("gainMarginDb", "the loop phase never crosses −180°"))?,
        Figure::InputImpedanceOhm { freq_hz } => match b.stage {
            Some(sc) => {
                let c = sc.input_impedance_circuit()?;
                impedance_sweep(&c, sc.input, "0", &[freq_hz])?.magnitude_ohm[0]
            }
            None => {
                // A circuit: what the source sees, the source taken out.
                let [p, m] = b.circuit.element(b.source)?.nodes();
                let names = b.circuit.nodes();
                let (p, m) = (names[p], names[m]);
                let c = b.circuit.without(b.source)?;
                impedance_sweep(&c, p.as_str(), m.as_str(), &[freq_hz])?.magnitude_ohm[0]
            }
        },
        Figure::OutputImpedanceOhm { freq_hz } => match (b.stage, b.output) {
            (Some(sc), _) if sc.output_current.is_some() => {
                return Err(unreachable(
                    "outputImpedanceOhm",
                    "a current-output stage's load is inside its loop",
                ));
            }
            (Some(sc), _) => {
                let mut c = sc.circuit.clone();
                for load in ["Rl", "Cl"] {
                    if c.element_index(load).is_ok() {
                        c = c.without(load)?;
                    }
                }
                impedance_sweep(&c, sc.output, "0", &[freq_hz])?.magnitude_ohm[0]
            }
            // A circuit: between its output nodes, every element in place.
            (None, Output::Voltage(p, m)) => {
                impedance_sweep(b.circuit, p, m, &[freq_hz])?.magnitude_ohm[0]
            }
            (None, Output::Current(_)) => {
                return Err(unreachable("outputImpedanceOhm", "the output is a current"));
            }
        },
        Figure::OutputNoiseRms { band_hz } | Figure::InputNoiseRms { band_hz } => {
            let setup = NoiseSetup {
                output: match b.output {
                    Output::Current(e) => NoiseOutput::Current {
                        element: String::from(e),
                    },
                    Output::Voltage(p, m) => NoiseOutput::Voltage {
                        plus: String::from(p),
                        minus: String::from(m),
                    },
                },
                temperature_k: temperature_c + ZERO_C_K,
                input_source: Some(String::from(b.source)),
                amplifier: b.amplifier.map(String::from),
                current_noise: Vec::new(),
            };
            let n = band_noise(b.circuit, &setup, band_hz)?;
            if matches!(figure, Figure::OutputNoiseRms { .. }) {
                n.total_rms
            } else {
                n.input_referred_rms.ok_or_else(|| {
                    unreachable("inputNoiseRms", "the stage has no signal path to refer to")
                })?
            }
        }
        Figure::SettlingTimeS { band } => {
            let out = match b.output {
                Output::Current(e) => StepOutput::ResistorCurrent(e),
                Output::Voltage(p, m) => StepOutput::Voltage(p, m),
            };
            circuit_step(b.circuit, b.source, out, band, 2)?.settling_time_s
        }
    };
    Ok(crate::check::result(figure.name(), v)?)
}
