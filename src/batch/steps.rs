//! What the batch tool computes for one design row: the input columns it knows, the
//! steps, and each step's result columns. Every number comes from the core's own
//! areas (feedback, frequency and stability, stage, noise, distortion, network);
//! this file only routes values.
//!
//! | step | needs | writes |
//! |---|---|---|
//! | `stage` | `a`, `beta` | closed-loop gain, loop gain, amount of feedback, sensitivity |
//! | `impedance` | `a`, `beta`, `zi`, `zo` | input and output resistance with feedback |
//! | `inverse` | `a`, `target_gain` (`gain_error`) | β for the target, least open-loop gain |
//! | `spread` | `beta`, `a_min`, `a_max` (`a`) | closed-loop gain spread |
//! | `freq` | `a`, `beta`, `a_poles_hz` | margins, verdict, bandwidth, peaking of a pole-list loop |
//! | `loop` | a stage | margins, verdict and DC gain of the stage's loop |
//! | `noise` | a stage, `noise_at_hz`, `f_low_hz`, `f_high_hz` (`signal_rms`, `temperature_k`) | density, band rms, SNR, largest contributor |
//! | `distortion` | `a`, `beta`, `hd2`, `hd3`, `amplitude` | HD2 and HD3 with feedback and their ratios |
//! | `eseries` | `series`, `resistor` | nearest standard value and its error |
//! | `pair` | `network`, `series`, `pair_target`, `total_min`, `total_max` | best resistor pair |
//! | `design` | a stage with `rf` or `cl`, `target_pm_deg` | Cf and Riso for the phase margin, whether each is at its range's end |
//! | `tolerance` | a stage with part tolerances `rf_tol` … (%, uniform), or a `circuit` with `input`, `output` or `output_element` (`output_minus`, `controlled`, `amplifier_spread`); limits `gain_min_db`/`gain_max_db` at `gain_at_hz` and/or `pm_min_deg` (`tol_trials`, `tol_seed`) | worst-case min and max of each limited figure, Monte Carlo yield overall and per limit |
//!
//! A stage is a `stage` column holding a stage document (`docs/stage.md`), or a
//! `kind` column with the amplifier figures and parts as columns; `tolerance`
//! also takes a `circuit` column holding a circuit document (`docs/circuit.md`)
//! whose elements carry their own tolerances.

use crate::check;
use crate::error::{Error, Result};
use crate::feedback::{
    beta_for_gain, gain_spread, min_open_loop_gain, resistances_with_feedback, summarize, Topology,
};
use alloc::string::String;
use alloc::vec::Vec;

/// The input columns the batch tool reads (header names, compared without case
/// and surrounding blanks).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Column {
    /// Topology name (`series-shunt`, `voltage-series`, …); `series-shunt` when empty.
    Topology,
    /// Open-loop gain A (for `distortion`, the small-signal gain a1; for `freq`,
    /// the gain at DC).
    A,
    /// Feedback factor β.
    Beta,
    /// Target closed-loop gain.
    TargetGain,
    /// Allowed gain error (a fraction: 0.001 for 0.1 %).
    GainError,
    /// Input resistance without feedback, Ω.
    Zi,
    /// Output resistance without feedback, Ω.
    Zo,
    /// Lowest open-loop gain.
    AMin,
    /// Highest open-loop gain.
    AMax,
    /// Open-loop second-harmonic distortion at `amplitude`, a fraction with the
    /// sign of a2/a1.
    Hd2,
    /// Open-loop third-harmonic distortion at `amplitude`, a fraction with the
    /// sign of a3/a1.
    Hd3,
    /// Peak output amplitude at which `hd2`, `hd3` are quoted and computed.
    Amplitude,
    /// Frequency of the noise density, Hz.
    NoiseAt,
    /// Lower edge of the noise band, Hz.
    FLow,
    /// Upper edge of the noise band, Hz.
    FHigh,
    /// rms signal at the output for the signal-to-noise ratio.
    SignalRms,
    /// Temperature of every resistor, K (300 when empty).
    Temperature,
    /// Phase margin asked of `design`, degrees.
    TargetPm,
    /// A resistance to round to its series, Ω.
    Resistor,
    /// Gain (non-inverting, inverting) or ratio (divider) asked of `pair`.
    PairTarget,
    /// Least R1 + R2 of a pair, Ω.
    TotalMin,
    /// Largest R1 + R2 of a pair, Ω.
    TotalMax,
    /// The pair's network: `non-inverting`, `inverting`, `divider`.
    Network,
    /// The E series (`E24`, `E96`, …).
    Series,
    /// The amplifier's poles for `freq`, Hz, separated by blanks.
    APoles,
    /// Frequency of the gain limit of `tolerance`, Hz.
    GainAt,
    /// Lowest gain at `gain_at_hz` the `tolerance` spec allows, dB.
    GainMinDb,
    /// Highest gain at `gain_at_hz` the `tolerance` spec allows, dB.
    GainMaxDb,
    /// Least phase margin the `tolerance` spec allows, degrees.
    PmMin,
    /// Monte Carlo trials of `tolerance` (1000 when empty).
    TolTrials,
    /// Monte Carlo seed of `tolerance` (1 when empty).
    TolSeed,
    /// The tolerance of a stage part, %, uniform (`rf_tol`, `rg_tol`, … for
    /// the parts of [`crate::tolerance::parts::PART_NAMES`]): the part's name.
    PartTol(&'static str),
    /// A stage document (JSON text, `docs/stage.md`).
    Stage,
    /// A circuit document (JSON text, `docs/circuit.md`, version 2) for
    /// `tolerance`, its elements carrying their own tolerance and tempco.
    Circuit,
    /// The circuit's independent source the gain is per unit of.
    Input,
    /// The circuit's output node.
    Output,
    /// The node the circuit's output is read against (ground when empty).
    OutputMinus,
    /// The circuit element whose current is the output, in place of `output`.
    OutputElement,
    /// The circuit's amplifier whose loop gives the phase margin (its only
    /// amplifier when empty).
    Controlled,
    /// Amplifier spreads of a circuit as JSON text, as `stageTolerance`'s
    /// `amplifierSpread`: `{"gbwHz": {"min": …, "typ": …, "max": …}, "ro": …}`
    /// for the controlled (or only) amplifier, or by element name
    /// `{"U1": {"gbwHz": …}, "U2": {…}}`.
    AmplifierSpread,
    /// A field of a stage described in columns (`kind`, `a0`, `gbw_hz`, `rf`, …;
    /// [`crate::stage::document_pairs`]): the document field it stands for.
    StageField(&'static str),
}

/// The value columns, in the order of [`Values`].
const VALUE_COLUMNS: [Column; 28] = [
    Column::A,
    Column::Beta,
    Column::TargetGain,
    Column::GainError,
    Column::Zi,
    Column::Zo,
    Column::AMin,
    Column::AMax,
    Column::Hd2,
    Column::Hd3,
    Column::Amplitude,
    Column::NoiseAt,
    Column::FLow,
    Column::FHigh,
    Column::SignalRms,
    Column::Temperature,
    Column::TargetPm,
    Column::Resistor,
    Column::PairTarget,
    Column::TotalMin,
    Column::TotalMax,
    Column::GainAt,
    Column::GainMinDb,
    Column::GainMaxDb,
    Column::PmMin,
    Column::TolTrials,
    Column::TolSeed,
    // Read as a list; kept here so that it has a name and a place.
    Column::APoles,
];

/// The stage parts that take a `<part>_tol` column.
const TOL_PARTS: [&str; 8] = ["rf", "rg", "cf", "rs", "cs", "rl", "cl", "riso"];

/// The columns that hold names or documents rather than one value.
const TEXT_COLUMNS: [Column; 11] = [
    Column::Topology,
    Column::Network,
    Column::Series,
    Column::Stage,
    Column::Circuit,
    Column::Input,
    Column::Output,
    Column::OutputMinus,
    Column::OutputElement,
    Column::Controlled,
    Column::AmplifierSpread,
];

/// The circuit-port columns, in the order of [`Values`]' `ports`.
const PORT_COLUMNS: [Column; 5] = [
    Column::Input,
    Column::Output,
    Column::OutputMinus,
    Column::OutputElement,
    Column::Controlled,
];

impl Column {
    /// The header name.
    pub const fn name(self) -> &'static str {
        match self {
            Column::Topology => "topology",
            Column::A => "a",
            Column::Beta => "beta",
            Column::TargetGain => "target_gain",
            Column::GainError => "gain_error",
            Column::Zi => "zi",
            Column::Zo => "zo",
            Column::AMin => "a_min",
            Column::AMax => "a_max",
            Column::Hd2 => "hd2",
            Column::Hd3 => "hd3",
            Column::Amplitude => "amplitude",
            Column::NoiseAt => "noise_at_hz",
            Column::FLow => "f_low_hz",
            Column::FHigh => "f_high_hz",
            Column::SignalRms => "signal_rms",
            Column::Temperature => "temperature_k",
            Column::TargetPm => "target_pm_deg",
            Column::Resistor => "resistor",
            Column::PairTarget => "pair_target",
            Column::TotalMin => "total_min",
            Column::TotalMax => "total_max",
            Column::Network => "network",
            Column::Series => "series",
            Column::APoles => "a_poles_hz",
            Column::GainAt => "gain_at_hz",
            Column::GainMinDb => "gain_min_db",
            Column::GainMaxDb => "gain_max_db",
            Column::PmMin => "pm_min_deg",
            Column::TolTrials => "tol_trials",
            Column::TolSeed => "tol_seed",
            Column::PartTol(p) => match p.as_bytes() {
                b"rf" => "rf_tol",
                b"rg" => "rg_tol",
                b"cf" => "cf_tol",
                b"rs" => "rs_tol",
                b"cs" => "cs_tol",
                b"rl" => "rl_tol",
                b"cl" => "cl_tol",
                _ => "riso_tol",
            },
            Column::Stage => "stage",
            Column::Circuit => "circuit",
            Column::Input => "input",
            Column::Output => "output",
            Column::OutputMinus => "output_minus",
            Column::OutputElement => "output_element",
            Column::Controlled => "controlled",
            Column::AmplifierSpread => "amplifier_spread",
            Column::StageField(f) => f,
        }
    }

    /// The column a header name means, if the tool knows it.
    pub fn from_header(name: &str) -> Option<Column> {
        let name = name.trim();
        TEXT_COLUMNS
            .into_iter()
            .chain(VALUE_COLUMNS)
            .chain(TOL_PARTS.into_iter().map(Column::PartTol))
            .find(|c| c.name().eq_ignore_ascii_case(name))
            .or_else(|| crate::stage::document_pairs::field_of(name).map(Column::StageField))
    }

    fn value_index(self) -> Option<usize> {
        if self == Column::APoles {
            return None;
        }
        VALUE_COLUMNS.iter().position(|&c| c == self)
    }
}

/// One row's inputs: the names, each value column that is present and not
/// empty, and the stage.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Values {
    /// The topology (series-shunt when the column is missing or empty).
    pub topology: Option<Topology>,
    values: [Option<f64>; 28],
    network: Option<crate::network::Network>,
    series: Option<crate::network::Series>,
    a_poles: Option<Vec<f64>>,
    /// The stage document of the row, as written.
    stage: Option<String>,
    /// The stage fields of the row, as written.
    stage_fields: Vec<(&'static str, String)>,
    /// The part tolerances of the row, %.
    part_tols: Vec<(&'static str, f64)>,
    /// The circuit document of the row, as written.
    circuit: Option<String>,
    /// The circuit's ports ([`PORT_COLUMNS`] order), as written.
    ports: [Option<String>; 5],
    /// The circuit's amplifier spreads (JSON text), as written.
    amplifier_spread: Option<String>,
}

impl Values {
    /// Read one field of `column`: names by their readers, values by
    /// [`crate::notation::parse_value`] (SI prefixes and IEC 60062 codes; nothing
    /// else is guessed, so `0x2710` is an error), `a_poles_hz` as values separated
    /// by blanks. An empty field leaves it unset.
    ///
    /// # Errors
    /// The reader's error, named after the column.
    pub fn read(&mut self, column: Column, text: &str) -> Result<()> {
        let text = text.trim();
        if text.is_empty() {
            return Ok(());
        }
        let value =
            |t: &str| crate::notation::parse_value(t).map_err(|e| e.with_param(column.name()));
        match column {
            Column::Stage => self.stage = Some(text.into()),
            Column::Circuit => self.circuit = Some(text.into()),
            Column::AmplifierSpread => self.amplifier_spread = Some(text.into()),
            c if PORT_COLUMNS.contains(&c) => {
                let k = PORT_COLUMNS.iter().position(|&p| p == c).unwrap_or(0);
                self.ports[k] = Some(text.into());
            }
            Column::StageField(f) => self.stage_fields.push((f, text.into())),
            Column::PartTol(p) => self.part_tols.push((p, value(text)?)),
            Column::Topology => self.topology = Some(text.parse()?),
            Column::Network => self.network = Some(text.parse()?),
            Column::Series => self.series = Some(text.parse()?),
            Column::APoles => {
                self.a_poles = Some(
                    text.split_whitespace()
                        .map(value)
                        .collect::<Result<Vec<f64>>>()?,
                )
            }
            _ => {
                if let Some(i) = column.value_index() {
                    self.values[i] = Some(value(text)?);
                }
            }
        }
        Ok(())
    }

    fn get(&self, column: Column) -> Option<f64> {
        column.value_index().and_then(|i| self.values[i])
    }

    fn need(&self, column: Column) -> Result<f64> {
        self.get(column).ok_or_else(|| empty(column))
    }
}

fn empty(column: Column) -> Error {
    Error::OutOfDomain {
        param: column.name(),
        requirement: "is empty in this row, and a step chosen for it needs it",
    }
}

/// One result cell: a number, or a name (the largest noise contributor).
#[derive(Debug, Clone, PartialEq)]
pub enum Cell {
    /// A computed number (finite: the core checks its results).
    Number(f64),
    /// A name the core gave.
    Text(String),
}

fn num(x: f64) -> Option<Cell> {
    Some(Cell::Number(x))
}

fn opt(x: Option<f64>) -> Option<Cell> {
    x.map(Cell::Number)
}

/// What the tool can compute.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Step {
    /// Closed-loop gain, loop gain, amount of feedback (ratio and dB), sensitivity.
    Stage,
    /// Input and output resistance with feedback.
    Impedance,
    /// β for the target gain, and the least open-loop gain for the gain error.
    Inverse,
    /// Closed-loop gain spread over the open-loop gain range.
    Spread,
    /// A loop given as a pole list (`a`, `a_poles_hz`) with a constant β: phase
    /// and gain margins, crossover, the verdict from the closed-loop poles, the
    /// closed-loop −3 dB bandwidth and peaking.
    Freq,
    /// The loop of a stage (a `stage` document column, or a `kind` column with
    /// the amplifier figures and parts as columns): phase margin, crossover, gain
    /// margin, the closed-loop verdict and the DC closed-loop gain.
    Loop,
    /// Noise of a stage through its whole circuit (every resistor and the
    /// amplifier's densities): output and input-referred density at
    /// `noise_at_hz`, rms over the band, SNR, and the largest contributor.
    Noise,
    /// Harmonic distortion with feedback from the open-loop HD2, HD3 at the same
    /// output amplitude (leading order of the power series).
    Distortion,
    /// The nearest standard value of a resistance in an E series.
    Eseries,
    /// The best resistor pair of a series for a gain or ratio.
    Pair,
    /// Feedback capacitor (with `rf`) and isolation resistor (with `cl`) for a
    /// phase margin.
    Design,
    /// Whole-stage tolerance of a stage with part tolerances against a gain
    /// and/or phase-margin spec: worst case and seeded Monte Carlo yield.
    Tolerance,
}

/// The steps' names, for messages.
pub const STEP_NAMES: &str =
    "stage, impedance, inverse, spread, freq, loop, noise, distortion, eseries, pair, design, tolerance";

impl Step {
    /// Every step, in output order.
    pub const ALL: [Step; 12] = [
        Step::Stage,
        Step::Impedance,
        Step::Inverse,
        Step::Spread,
        Step::Freq,
        Step::Loop,
        Step::Noise,
        Step::Distortion,
        Step::Eseries,
        Step::Pair,
        Step::Design,
        Step::Tolerance,
    ];

    /// The name used by `--compute`.
    pub const fn name(self) -> &'static str {
        match self {
            Step::Stage => "stage",
            Step::Impedance => "impedance",
            Step::Inverse => "inverse",
            Step::Spread => "spread",
            Step::Freq => "freq",
            Step::Loop => "loop",
            Step::Noise => "noise",
            Step::Distortion => "distortion",
            Step::Eseries => "eseries",
            Step::Pair => "pair",
            Step::Design => "design",
            Step::Tolerance => "tolerance",
        }
    }

    /// The step a name means.
    ///
    /// # Errors
    /// [`Error::UnknownName`] on `compute`.
    pub fn from_name(name: &str) -> Result<Step> {
        Step::ALL
            .into_iter()
            .find(|s| s.name() == name.trim())
            .ok_or(Error::UnknownName {
                param: "compute",
                expected: STEP_NAMES,
            })
    }

    /// The columns a file must have for this step (besides a stage, see
    /// [`Step::needs_stage`]).
    pub const fn needs(self) -> &'static [Column] {
        match self {
            Step::Stage => &[Column::A, Column::Beta],
            Step::Impedance => &[Column::A, Column::Beta, Column::Zi, Column::Zo],
            Step::Inverse => &[Column::A, Column::TargetGain],
            Step::Spread => &[Column::Beta, Column::AMin, Column::AMax],
            Step::Freq => &[Column::A, Column::Beta, Column::APoles],
            Step::Loop => &[],
            Step::Noise => &[Column::NoiseAt, Column::FLow, Column::FHigh],
            Step::Distortion => &[
                Column::A,
                Column::Beta,
                Column::Hd2,
                Column::Hd3,
                Column::Amplitude,
            ],
            Step::Eseries => &[Column::Series, Column::Resistor],
            Step::Pair => &[
                Column::Network,
                Column::Series,
                Column::PairTarget,
                Column::TotalMin,
                Column::TotalMax,
            ],
            Step::Design => &[Column::TargetPm],
            Step::Tolerance => &[],
        }
    }

    /// Whether the step works on a stage (a `stage` or a `kind` column).
    pub const fn needs_stage(self) -> bool {
        matches!(
            self,
            Step::Loop | Step::Noise | Step::Design | Step::Tolerance
        )
    }

    /// Whether a header with these columns gives the step its inputs.
    pub fn has_inputs(self, columns: &[Option<Column>]) -> bool {
        let has = |c: Column| columns.contains(&Some(c));
        let stage = has(Column::Stage)
            || has(Column::StageField("kind"))
            || (self == Step::Tolerance && has(Column::Circuit));
        let spec = has(Column::GainMinDb) || has(Column::GainMaxDb) || has(Column::PmMin);
        (stage || !self.needs_stage())
            && self.needs().iter().all(|c| has(*c))
            && (self != Step::Tolerance || spec)
    }

    /// The result columns it writes.
    pub const fn columns(self) -> &'static [&'static str] {
        match self {
            Step::Stage => &[
                "closed_loop_gain",
                "loop_gain",
                "feedback_amount",
                "feedback_amount_db",
                "sensitivity",
            ],
            Step::Impedance => &["input_impedance", "output_impedance"],
            Step::Inverse => &["beta_for_target", "min_open_loop_gain"],
            Step::Spread => &["spread_percent", "spread_ppm"],
            Step::Freq => &[
                "freq_phase_margin_deg",
                "freq_crossover_hz",
                "freq_gain_margin_db",
                "freq_stable",
                "freq_bandwidth_hz",
                "freq_peaking_db",
            ],
            Step::Loop => &[
                "phase_margin_deg",
                "crossover_hz",
                "gain_margin_db",
                "closed_loop_stable",
                "dc_gain",
            ],
            Step::Noise => &[
                "noise_density",
                "noise_input_density",
                "noise_rms",
                "noise_input_rms",
                "snr_db",
                "largest_source",
                "largest_share",
            ],
            Step::Distortion => &["hd2_closed", "hd3_closed", "hd2_ratio", "hd3_ratio"],
            Step::Eseries => &["standard_value", "standard_error"],
            Step::Pair => &["r1", "r2", "pair_achieved", "pair_error"],
            Step::Design => &[
                "design_cf",
                "design_cf_pm_deg",
                "design_cf_at_range_end",
                "design_riso",
                "design_riso_pm_deg",
                "design_riso_at_range_end",
            ],
            Step::Tolerance => &[
                "tol_gain_min_db",
                "tol_gain_max_db",
                "tol_pm_min_deg",
                "tol_pm_max_deg",
                "tol_yield",
                "tol_gain_yield",
                "tol_pm_yield",
            ],
        }
    }

    /// Compute the step for one row; `out` has one slot per column (`None`: left
    /// empty, as the least open-loop gain is without a gain error).
    ///
    /// # Errors
    /// An empty needed value, or the core function's error.
    pub fn run(self, v: &Values, out: &mut [Option<Cell>]) -> Result<()> {
        let topology = v.topology.unwrap_or(Topology::SeriesShunt);
        let results: Vec<Option<Cell>> = match self {
            Step::Stage => {
                let s = summarize(topology, v.need(Column::A)?, v.need(Column::Beta)?)?;
                alloc::vec![
                    num(s.closed_loop_gain),
                    num(s.loop_gain),
                    num(s.feedback_amount),
                    num(s.feedback_amount_db),
                    num(s.sensitivity),
                ]
            }
            Step::Impedance => {
                let (a, beta) = (v.need(Column::A)?, v.need(Column::Beta)?);
                let (zi, zo) = (v.need(Column::Zi)?, v.need(Column::Zo)?);
                let (rif, rof) = resistances_with_feedback(topology, zi, zo, a, beta)?;
                alloc::vec![num(rif), num(rof)]
            }
            Step::Inverse => {
                let target = v.need(Column::TargetGain)?;
                let beta = beta_for_gain(v.need(Column::A)?, target)?;
                let a_min = match v.get(Column::GainError) {
                    Some(e) => Some(min_open_loop_gain(ideal_beta(target)?, e)?),
                    None => None,
                };
                alloc::vec![num(beta), opt(a_min)]
            }
            Step::Spread => {
                let (a_min, a_max) = (v.need(Column::AMin)?, v.need(Column::AMax)?);
                let a_typ = match v.get(Column::A) {
                    Some(a) => a,
                    None => geometric_mean(a_min, a_max)?,
                };
                let s = gain_spread(v.need(Column::Beta)?, a_min, a_typ, a_max)?;
                alloc::vec![num(s.spread_percent), num(s.spread_ppm)]
            }
            Step::Freq => pole_list_loop(v)?,
            Step::Loop => stage_loop(v)?,
            Step::Noise => stage_noise(v)?,
            Step::Distortion => distortion(v)?,
            Step::Eseries => {
                let series = v.series.ok_or_else(|| empty(Column::Series))?;
                let r = v.need(Column::Resistor)?;
                let r = check::positive("resistor", r)?;
                let s =
                    crate::network::standard_value(series, r, crate::network::Rounding::Nearest)
                        .map_err(|e| e.with_param("resistor"))?;
                alloc::vec![num(s), num(check::result("standard_error", s / r - 1.0)?)]
            }
            Step::Pair => resistor_pair(v)?,
            Step::Design => design(v)?,
            Step::Tolerance => stage_tolerance(v)?,
        };
        for (slot, r) in out.iter_mut().zip(results) {
            *slot = r;
        }
        Ok(())
    }
}

/// The stage of a row: from its document or from its fields.
fn stage_of(v: &Values) -> Result<crate::stage::Stage> {
    match (&v.stage, v.stage_fields.is_empty()) {
        (Some(doc), true) => Ok(crate::stage::read_stage(doc)?),
        (None, false) => Ok(crate::stage::document_pairs::stage_from_pairs(
            v.stage_fields
                .iter()
                .map(|(f, t)| (*f, crate::json::Json::from(t.as_str()))),
        )?),
        (Some(_), false) => Err(Error::OutOfDomain {
            param: "stage",
            requirement: "give the stage as a document or as columns, not both in one row",
        }),
        (None, true) => Err(Error::OutOfDomain {
            param: "stage",
            requirement: "is empty in this row: give a stage document or kind and the figures",
        }),
    }
}

/// The `freq` step: A(s) = a / Π(1 + s/(2π·p)) over the `a_poles_hz`, β constant
/// ([`crate::freq::FeedbackLoop::with_constant_beta`]); the margins
/// ([`crate::freq::stability_margins`], signed by the closed-loop poles), the
/// verdict (1 stable, 0 not), and for a stable loop the closed-loop −3 dB
/// bandwidth and peaking ([`crate::freq::closed_loop_bandwidth`]).
fn pole_list_loop(v: &Values) -> Result<Vec<Option<Cell>>> {
    use crate::freq::{closed_loop_bandwidth, stability_margins, FeedbackLoop, TransferModel};
    let poles = v.a_poles.as_deref().ok_or_else(|| empty(Column::APoles))?;
    let mut a = TransferModel::constant(v.need(Column::A)?);
    for &p in poles {
        a = a.pole(p);
    }
    let l = FeedbackLoop::with_constant_beta(a, v.need(Column::Beta)?).map_err(|e| {
        match e.param() {
            "a.poles_hz" => e.with_param("a_poles_hz"),
            "a.gain" => e.with_param("a"),
            "beta.gain" => e.with_param("beta"),
            _ => e,
        }
    })?;
    let m = stability_margins(&l)?;
    let stable = m.closed_loop == crate::freq::Verdict::Stable;
    let (bandwidth, peaking) = if stable {
        let b = closed_loop_bandwidth(&l)?;
        (b.high_hz, Some(b.peaking_db))
    } else {
        (None, None)
    };
    Ok(alloc::vec![
        opt(m.phase_margin_deg),
        opt(m.crossover_hz),
        opt(m.gain_margin_db),
        num(f64::from(u8::from(stable))),
        opt(bandwidth),
        opt(peaking),
    ])
}

/// The `noise` step: the stage's circuit ([`crate::stage::Stage::circuit`]) with
/// its output (V(out), or the load current of a current-output stage), the
/// signal source named for the input-referred figures, at `temperature_k` (300 K
/// when empty). Density and input-referred density at `noise_at_hz`
/// ([`crate::noise::circuit::noise_densities`]), rms and input-referred rms over
/// [`f_low_hz`, `f_high_hz`] ([`crate::noise::circuit::band_noise`]), SNR =
/// 20·log10(signal_rms / rms) when `signal_rms` is given, and the source with the
/// largest rms over the band with its share of the total power.
fn stage_noise(v: &Values) -> Result<Vec<Option<Cell>>> {
    use crate::noise::circuit::{band_noise, noise_densities, NoiseOutput, NoiseSetup};
    let stage = stage_of(v)?;
    let sc = stage.circuit()?;
    let output = match sc.output_current {
        Some(e) => NoiseOutput::Current {
            element: String::from(e),
        },
        None => NoiseOutput::node(sc.output),
    };
    let setup = NoiseSetup {
        output,
        temperature_k: v.get(Column::Temperature).unwrap_or(300.0),
        input_source: Some(String::from(sc.source)),
        amplifier: Some(String::from(sc.amplifier)),
        current_noise: Vec::new(),
    };
    let named = |e: crate::circuit::CircuitError| -> Error {
        match e.error.param() {
            "temperature_k" => e.error.with_param("temperature_k"),
            "frequencies_hz" => e.error.with_param("noise_at_hz"),
            "band_hz" => e.error.with_param("f_low_hz"),
            _ => e.error,
        }
    };
    let f = v.need(Column::NoiseAt)?;
    let d = noise_densities(&sc.circuit, &setup, &[f]).map_err(named)?;
    let band = [v.need(Column::FLow)?, v.need(Column::FHigh)?];
    let b = band_noise(&sc.circuit, &setup, band).map_err(named)?;
    let snr = match v.get(Column::SignalRms) {
        Some(s) => Some(b.snr_db(s)?),
        None => None,
    };
    let largest = b.sources.iter().max_by(|x, y| x.rms.total_cmp(&y.rms));
    Ok(alloc::vec![
        opt(d.total.first().copied()),
        opt(d.input_referred.first().copied()),
        num(b.total_rms),
        opt(b.input_referred_rms),
        opt(snr),
        largest.map(|s| Cell::Text(s.name.clone())),
        largest.map(|s| Cell::Number(s.share)),
    ])
}

/// The `distortion` step: the open-loop power series whose leading-order HD2,
/// HD3 at the output amplitude are the row's
/// ([`crate::distortion::series_from_distortion`]), closed by β
/// ([`crate::distortion::feedback_distortion`]) and compared at the same output
/// amplitude: HD2 and HD3 closed (fractions) and closed/open.
fn distortion(v: &Values) -> Result<Vec<Option<Cell>>> {
    use crate::distortion::{feedback_distortion, series_from_distortion, AmplitudeAt};
    let amplitude = v.need(Column::Amplitude)?;
    let open = series_from_distortion(
        v.need(Column::A)?,
        v.need(Column::Hd2)?,
        v.need(Column::Hd3)?,
        amplitude,
        AmplitudeAt::Output,
    )
    .map_err(|e| {
        if e.param() == "a1" {
            e.with_param("a")
        } else {
            e
        }
    })?;
    let f = feedback_distortion(&open, v.need(Column::Beta)?, amplitude, AmplitudeAt::Output)?;
    Ok(alloc::vec![
        num(f.closed.hd2),
        num(f.closed.hd3),
        opt(f.hd2_ratio),
        opt(f.hd3_ratio),
    ])
}

/// The `pair` step: the first candidate of [`crate::network::best_pairs`] (single
/// resistors of the series, R1 + R2 within [`total_min`, `total_max`]): R1, R2,
/// the gain or ratio they give and its error (achieved/target − 1).
fn resistor_pair(v: &Values) -> Result<Vec<Option<Cell>>> {
    use crate::network::{best_pairs, PairSpec};
    let network = v.network.ok_or_else(|| empty(Column::Network))?;
    let series = v.series.ok_or_else(|| empty(Column::Series))?;
    let mut spec = PairSpec::new(
        network,
        v.need(Column::PairTarget)?,
        series,
        v.need(Column::TotalMin)?,
        v.need(Column::TotalMax)?,
    );
    spec.count = 1;
    let r = best_pairs(&spec).map_err(|e| match e.param() {
        "target" => e.with_param("pair_target"),
        _ => e,
    })?;
    let best = r.candidates.first().ok_or(Error::Unreachable {
        param: "total_min",
        reason: "no pair of the series fits between total_min and total_max",
    })?;
    Ok(alloc::vec![
        num(best.r1),
        num(best.r2.value),
        num(best.achieved),
        num(best.error),
    ])
}

/// The `design` step: the smallest Cf across Rf that gives `target_pm_deg`
/// ([`crate::stage::design::feedback_capacitor_for_margin`]) when the stage has
/// Rf, and the smallest Riso for its load capacitance
/// ([`crate::stage::design::isolation_resistor_for_margin`]) when it has Cl; each
/// with the phase margin it gives and 1 when the answer is an end of the searched
/// range (1 aF … 100 nF, 1 mΩ … 100 kΩ; at the lower end the part is not needed
/// for the margin), else 0.
fn design(v: &Values) -> Result<Vec<Option<Cell>>> {
    use crate::stage::design::{feedback_capacitor_for_margin, isolation_resistor_for_margin};
    let stage = stage_of(v)?;
    let pm = v.need(Column::TargetPm)?;
    let named = |e: crate::circuit::CircuitError| -> Error {
        match e.error.param() {
            "target_pm_deg" => e.error.with_param("target_pm_deg"),
            _ => e.error,
        }
    };
    if stage.parts.rf.is_none() && stage.parts.cl.is_none() {
        return Err(Error::OutOfDomain {
            param: "stage",
            requirement: "needs rf (for Cf across it) or cl (for Riso against it) to design",
        });
    }
    let cf = match stage.parts.rf {
        Some(_) => Some(feedback_capacitor_for_margin(&stage, pm).map_err(named)?),
        None => None,
    };
    let riso = match stage.parts.cl {
        Some(cl) => Some(isolation_resistor_for_margin(&stage, cl, pm).map_err(named)?),
        None => None,
    };
    let end = |d: &crate::stage::design::Design| Cell::Number(f64::from(u8::from(d.at_range_end)));
    Ok(alloc::vec![
        cf.as_ref().map(|d| Cell::Number(d.value)),
        cf.as_ref().map(|d| Cell::Number(d.phase_margin_deg)),
        cf.as_ref().map(end),
        riso.as_ref().map(|d| Cell::Number(d.value)),
        riso.as_ref().map(|d| Cell::Number(d.phase_margin_deg)),
        riso.as_ref().map(end),
    ])
}

/// The loop step of one row: the stage from its document or its fields, then
/// the margins of its loop ([`crate::stage::margins::circuit_margins`]), the
/// verdict from its poles (1 stable, 0 marginal or unstable) and its closed-loop
/// gain at 0 Hz (the real part: the gain with its sign).
fn stage_loop(v: &Values) -> Result<Vec<Option<Cell>>> {
    use crate::stage::closed_loop::gain_sweep;
    use crate::stage::margins::circuit_margins;
    let stage = stage_of(v)?;
    let sc = stage.circuit()?;
    let m = circuit_margins(&sc.circuit, sc.amplifier)?;
    let output = match sc.output_current {
        Some(e) => crate::circuit::blackman::Output::Current(e),
        None => crate::circuit::blackman::Output::Voltage(sc.output, "0"),
    };
    let dc = gain_sweep(&sc.circuit, sc.source, output, &[0.0])?;
    let stable = m.closed_loop == crate::freq::Verdict::Stable;
    Ok(alloc::vec![
        opt(m.phase_margin_deg),
        opt(m.crossover_hz),
        opt(m.gain_margin_db),
        num(f64::from(u8::from(stable))),
        opt(dc.re.first().copied()),
    ])
}

/// Monte Carlo trials of the `tolerance` step when `tol_trials` is empty.
pub const DEFAULT_TOL_TRIALS: usize = 1000;

/// The `tolerance` step: the row's stage with each `<part>_tol` column as a
/// uniform ±p % spread ([`crate::tolerance::TolStage`], at 25 °C, the
/// amplifier's A0 drawn from the stage's own min/typ/max), against a spec of
/// the gain 20·log10|H| at `gain_at_hz` within [`gain_min_db`, `gain_max_db`]
/// (either may be empty) and the phase margin at or above `pm_min_deg`.
/// Writes the worst case of each limited figure
/// ([`crate::tolerance::worst_case`], corners or sensitivity-guided, at most
/// [`crate::tolerance::DEFAULT_MAX_CORNERS`] corners) and the seeded Monte
/// Carlo yield ([`crate::tolerance::monte_carlo`], `tol_trials` trials, 1000
/// when empty; `tol_seed`, 1 when empty) overall and per limit: the numbers
/// `stageTolerance` gives for the same stage, spreads, spec, seed and trials.
fn stage_tolerance(v: &Values) -> Result<Vec<Option<Cell>>> {
    use crate::tolerance::{AmplifierSpread, PartSpread, TolStage};
    if v.circuit.is_some() {
        return tolerance_of(circuit_subject(v)?, v);
    }
    if v.amplifier_spread.is_some() || v.ports.iter().any(Option::is_some) {
        let column = match v.ports.iter().position(Option::is_some) {
            Some(k) => PORT_COLUMNS[k].name(),
            None => "amplifier_spread",
        };
        return Err(Error::OutOfDomain {
            param: column,
            requirement: "belongs to a circuit column; a stage's amplifier is U1",
        });
    }
    let stage = stage_of(v)?;
    let spreads: Vec<PartSpread> = v
        .part_tols
        .iter()
        .map(|&(part, percent)| PartSpread {
            part,
            tolerance: Some(crate::circuit::tolerance::Tolerance::Uniform { percent }),
            tempco_ppm: None,
        })
        .collect();
    // The core names a part's error after its element (Rf); the row's column is rf_tol.
    let column_of = |e: crate::circuit::CircuitError| -> Error {
        let element = e.name.as_str();
        match TOL_PARTS.iter().find(|p| p.eq_ignore_ascii_case(element)) {
            Some(p) => e.error.with_param(Column::PartTol(p).name()),
            None => e.error,
        }
    };
    let ts = TolStage::new(&stage, &spreads, AmplifierSpread::default(), [25.0, 25.0])
        .map_err(column_of)?;
    tolerance_of(ts, v)
}

/// The circuit document of a `tolerance` row with its ports and amplifier
/// spreads ([`crate::tolerance::TolStage::from_circuit`], at 25 °C); errors
/// named after the row's columns.
fn circuit_subject(v: &Values) -> Result<crate::tolerance::TolStage> {
    use crate::tolerance::{CircuitPorts, TolStage};
    if let Some((p, _)) = v.part_tols.first() {
        return Err(Error::OutOfDomain {
            param: Column::PartTol(p).name(),
            requirement: "belongs to a stage; a circuit's elements carry their own tolerance",
        });
    }
    if v.stage.is_some() || !v.stage_fields.is_empty() {
        return Err(Error::OutOfDomain {
            param: "circuit",
            requirement: "give a stage or a circuit in one row, not both",
        });
    }
    let text = v.circuit.as_deref().unwrap_or_default();
    let c = crate::circuit::json::read_circuit(text).map_err(|e| e.error.with_param("circuit"))?;
    let port = |k: usize| v.ports[k].clone();
    let output_element = port(3);
    let output = match (port(1), &output_element) {
        (Some(_), Some(_)) => {
            return Err(Error::OutOfDomain {
                param: "output_element",
                requirement: "give output (and output_minus) or output_element, not both",
            })
        }
        (Some(o), None) => o,
        (None, Some(_)) => String::new(),
        (None, None) => return Err(empty(Column::Output)),
    };
    let ports = CircuitPorts {
        input: port(0).ok_or_else(|| empty(Column::Input))?,
        output,
        output_minus: port(2),
        output_element,
        controlled: port(4),
    };
    let target = ports
        .controlled
        .clone()
        .or_else(|| crate::tolerance::parts::only_amplifier(&c));
    let amplifiers = match &v.amplifier_spread {
        Some(t) => amplifier_spreads(t, target)?,
        None => Vec::new(),
    };
    TolStage::from_circuit(&c, ports, &amplifiers, [25.0, 25.0]).map_err(|e| {
        let column = match e.error.param() {
            "tolerance" | "tempco" => "circuit",
            "outputMinus" => "output_minus",
            "outputElement" => "output_element",
            "amplifierSpread" | "gbwHz" | "ro" => "amplifier_spread",
            "temperature" => "circuit",
            p @ ("input" | "output" | "controlled") => Column::from_header(p)
                .map(Column::name)
                .unwrap_or("circuit"),
            _ => "circuit",
        };
        e.error.with_param(column)
    })
}

/// The `amplifier_spread` column (JSON text, as `stageTolerance`'s
/// `amplifierSpread`): `{gbwHz, ro}` for `target` (the controlled or only
/// amplifier), or one such by amplifier element name.
fn amplifier_spreads(
    text: &str,
    target: Option<String>,
) -> Result<Vec<(String, crate::tolerance::AmplifierSpread)>> {
    use crate::json::Json;
    use crate::stage::Spread;
    use crate::tolerance::AmplifierSpread;
    const COLUMN: &str = "amplifier_spread";
    let wrong = |expected: &'static str| Error::WrongType {
        param: COLUMN,
        expected,
    };
    let tree = crate::json::parse(text).map_err(|_| wrong("JSON text of an object"))?;
    let members = tree.as_object().ok_or(wrong("JSON text of an object"))?;
    let one = |m: &[(String, Json)]| -> Result<AmplifierSpread> {
        let mut out = AmplifierSpread::default();
        for (key, value) in m {
            let o = value
                .as_object()
                .ok_or(wrong("{min, typ, max} for gbwHz and ro"))?;
            let get = |name: &str| {
                o.iter()
                    .find(|(k, _)| k == name)
                    .and_then(|(_, x)| x.as_f64())
                    .ok_or(wrong("{min, typ, max} numbers for gbwHz and ro"))
            };
            let s = Spread {
                min: get("min")?,
                typ: get("typ")?,
                max: get("max")?,
            };
            match key.as_str() {
                "gbwHz" => out.gbw_hz = Some(s),
                "ro" => out.ro = Some(s),
                _ => {
                    return Err(Error::UnknownName {
                        param: COLUMN,
                        expected: "gbwHz, ro",
                    })
                }
            }
        }
        Ok(out)
    };
    if members.iter().any(|(k, _)| k == "gbwHz" || k == "ro") {
        let Some(name) = target else {
            return Err(Error::OutOfDomain {
                param: COLUMN,
                requirement: "applies to the controlled amplifier: name it in controlled, or give the spreads by amplifier",
            });
        };
        return Ok(alloc::vec![(name, one(members)?)]);
    }
    members
        .iter()
        .map(|(name, value)| {
            let m = value
                .as_object()
                .ok_or(wrong("an object of {gbwHz, ro} by amplifier name"))?;
            Ok((name.clone(), one(m)?))
        })
        .collect()
}

/// The worst case and Monte Carlo of a `tolerance` row's subject against
/// the row's spec columns.
fn tolerance_of(ts: crate::tolerance::TolStage, v: &Values) -> Result<Vec<Option<Cell>>> {
    use crate::tolerance::{
        monte_carlo, worst_case, Figure, Limit, MonteCarloOptions, DEFAULT_MAX_CORNERS,
    };
    let column_of = |e: crate::circuit::CircuitError| -> Error {
        let element = e.name.as_str();
        match TOL_PARTS.iter().find(|p| p.eq_ignore_ascii_case(element)) {
            Some(p) if ts.stage().is_some() => e.error.with_param(Column::PartTol(p).name()),
            _ => match e.error.param() {
                "controlled" => e.error.with_param("controlled"),
                _ => e.error,
            },
        }
    };
    let mut spec = Vec::new();
    let (lo, hi) = (v.get(Column::GainMinDb), v.get(Column::GainMaxDb));
    let gain = if lo.is_some() || hi.is_some() {
        let freq_hz = v.need(Column::GainAt)?;
        check::non_negative("gain_at_hz", freq_hz)?;
        spec.push(Limit {
            figure: Figure::GainDb { freq_hz },
            lower: lo,
            upper: hi,
        });
        Some(spec.len() - 1)
    } else {
        None
    };
    let pm = v.get(Column::PmMin).map(|lower| {
        spec.push(Limit {
            figure: Figure::PhaseMarginDeg,
            lower: Some(lower),
            upper: None,
        });
        spec.len() - 1
    });
    if spec.is_empty() {
        return Err(Error::OutOfDomain {
            param: "gain_min_db",
            requirement: "is empty in this row: the tolerance step needs gain_min_db, gain_max_db or pm_min_deg",
        });
    }
    let named = |e: crate::circuit::CircuitError| -> Error {
        match e.error.param() {
            // Only the gain limit has an upper end.
            "upper" => e.error.with_param("gain_max_db"),
            "lower" => e.error.with_param(if gain.is_some() {
                "gain_min_db"
            } else {
                "pm_min_deg"
            }),
            "trials" => e.error.with_param("tol_trials"),
            "freqHz" => e.error.with_param("gain_at_hz"),
            _ => column_of(e),
        }
    };
    let trials = match v.get(Column::TolTrials) {
        Some(t) if t >= 0.0 && libm::trunc(t) == t => t as usize,
        Some(_) => {
            return Err(Error::OutOfDomain {
                param: "tol_trials",
                requirement: "must be a whole number of trials",
            })
        }
        None => DEFAULT_TOL_TRIALS,
    };
    let seed = crate::network::seed_from_number(v.get(Column::TolSeed).unwrap_or(1.0))
        .map_err(|e| e.with_param("tol_seed"))?;
    let wc = worst_case(&ts, &spec, DEFAULT_MAX_CORNERS).map_err(named)?;
    let mc = monte_carlo(
        &ts,
        &spec,
        MonteCarloOptions {
            seed,
            trials,
            bins: 20,
            keep_failures: 0,
        },
    )
    .map_err(named)?;
    let extreme = |k: Option<usize>, max: bool| {
        k.map(|k| {
            let f = &wc.figures[k];
            Cell::Number(if max { f.max.value } else { f.min.value })
        })
    };
    let share = |k: Option<usize>| k.map(|k| Cell::Number(mc.limits[k].yield_fraction));
    Ok(alloc::vec![
        extreme(gain, false),
        extreme(gain, true),
        extreme(pm, false),
        extreme(pm, true),
        num(mc.yield_fraction),
        share(gain),
        share(pm),
    ])
}

/// β of an ideal loop (A → ∞) with closed-loop gain `target`: β = 1/target.
/// Source: the ideal closed-loop gain A_f → 1/β (Sedra & Smith, *Microelectronic
/// Circuits*, 7th ed., section 10.1, from memory).
fn ideal_beta(target: f64) -> Result<f64> {
    let target = check::nonzero("target_gain", target)?;
    check::result("target_gain", 1.0 / target)
}

/// The typical open-loop gain when a row gives only its range: the geometric mean
/// √(a_min·a_max), with their common sign, taken as √|a_min|·√|a_max| so the
/// product cannot overflow (common practice, no source: gains spread by ratios).
fn geometric_mean(a_min: f64, a_max: f64) -> Result<f64> {
    let a_min = check::nonzero("a_min", a_min)?;
    let a_max = check::nonzero("a_max", a_max)?;
    let magnitude = crate::float::sqrt(a_min.abs()) * crate::float::sqrt(a_max.abs());
    check::result("a_typ", magnitude.copysign(a_min))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Relative tolerance for a result of three roundings (two square roots, one
    /// product): a few units in the last place of a double.
    const ROUNDING: f64 = 8.0 * f64::EPSILON;

    fn row(pairs: &[(Column, &str)]) -> Values {
        let mut v = Values::default();
        for &(c, t) in pairs {
            v.read(c, t).unwrap();
        }
        v
    }

    #[test]
    fn values_are_read_by_the_core_reader_only() {
        let mut v = Values::default();
        v.read(Column::A, " 4k7 ").unwrap();
        assert_eq!(v.get(Column::A), Some(4700.0));
        v.read(Column::Beta, "10m").unwrap();
        assert_eq!(v.get(Column::Beta), Some(0.01));
        // No hexadecimal, no guessing: the error names the column.
        for bad in ["0x2710", "1,5", "ten", "1e5e5"] {
            let e = v.read(Column::A, bad).unwrap_err();
            assert_eq!(e.param(), "a", "{bad}");
        }
        assert_eq!(
            v.read(Column::Topology, "parallel").unwrap_err().param(),
            "topology"
        );
        assert_eq!(Column::from_header(" A_Min "), Some(Column::AMin));
        assert_eq!(Column::from_header("notes"), None);
    }

    fn number(c: &Option<Cell>) -> f64 {
        match c {
            Some(Cell::Number(x)) => *x,
            other => panic!("not a number: {other:?}"),
        }
    }

    #[test]
    fn steps_route_to_the_core() {
        // A = 10⁵, β = 0.01: D = 1001, Af = 10⁵/1001 (the feedback equation
        // Af = A/(1 + Aβ); Sedra & Smith, Microelectronic Circuits, 7th ed., section 10.1,
        // from memory).
        let v = row(&[(Column::A, "1e5"), (Column::Beta, "0.01")]);
        let mut out = alloc::vec![None; 5];
        Step::Stage.run(&v, &mut out).unwrap();
        assert!((number(&out[0]) - 1e5 / 1001.0).abs() < 1e-12);
        assert_eq!(out[2], Some(Cell::Number(1001.0)));
        // Least A for 0.1 % error at gain 10: A ≥ (1 − ε)/(ε·β) with β = 1/10
        // = 0.999/(0.001·0.1) = 9990 (same source, the gain error 1/(1 + Aβ)).
        let v = row(&[
            (Column::A, "1e5"),
            (Column::TargetGain, "10"),
            (Column::GainError, "0.001"),
        ]);
        let mut out = alloc::vec![None; 2];
        Step::Inverse.run(&v, &mut out).unwrap();
        assert!((number(&out[1]) - 9990.0).abs() < 1e-9);
        // The spread's typical gain is the geometric mean, with the gains' sign:
        // −10⁴ … −10⁶ gives −10⁵ (√(10⁴·10⁶) = 10⁵, common practice, no source).
        assert_eq!(geometric_mean(-1e4, -1e6).unwrap(), -1e5);
        // No overflow where the product would: √(10³⁰⁰·10³⁰⁰) = 10³⁰⁰, to a few
        // roundings of the two square roots and the product.
        let g = geometric_mean(1e300, 1e300).unwrap();
        assert!((g / 1e300 - 1.0).abs() < ROUNDING, "{g}");
        let v = row(&[(Column::Beta, "0.01")]);
        assert_eq!(
            Step::Spread
                .run(&v, &mut alloc::vec![None; 2])
                .unwrap_err()
                .param(),
            "a_min"
        );
        assert_eq!(ideal_beta(0.0).unwrap_err().param(), "target_gain");
    }

    #[test]
    fn the_other_areas_route_to_the_core() {
        // One pole at 10 Hz, A0 = 10⁵, β = 0.01: the closed loop's pole moves to
        // 10 Hz·(1 + A0β) = 10 010 Hz; |T| = 1 where f = 10 Hz·√(1000² − 1), the
        // phase margin there 180° − atan(f/10 Hz) (single-pole feedback amplifier;
        // Sedra & Smith, Microelectronic Circuits, 7th ed., section 10.9, from memory).
        let v = row(&[
            (Column::A, "1e5"),
            (Column::Beta, "10m"),
            (Column::APoles, " 10 "),
        ]);
        let mut out = alloc::vec![None; 6];
        Step::Freq.run(&v, &mut out).unwrap();
        let fc = 10.0 * (1e6f64 - 1.0).sqrt();
        assert!((number(&out[1]) / fc - 1.0).abs() < 1e-6, "{out:?}");
        let pm = 180.0 - (fc / 10.0).atan().to_degrees();
        assert!((number(&out[0]) - pm).abs() < 1e-4, "{out:?}");
        assert_eq!(out[2], None, "one pole never reaches −180°");
        assert_eq!(out[3], Some(Cell::Number(1.0)));
        assert!((number(&out[4]) / 10_010.0 - 1.0).abs() < 1e-6, "{out:?}");
        let bad = row(&[
            (Column::A, "1e5"),
            (Column::Beta, "10m"),
            (Column::APoles, "-5"),
        ]);
        assert_eq!(
            Step::Freq.run(&bad, &mut out).unwrap_err().param(),
            "a_poles_hz"
        );
        let mut v = Values::default();
        assert_eq!(
            v.read(Column::APoles, "10 1x").unwrap_err().param(),
            "a_poles_hz"
        );

        // a1 = 1000, a2 = 0, HD3 1 % at 1 V out, β = 0.099: D = 100; with a2 = 0 the
        // third harmonic falls by D at the same output (Sedra & Smith, 7th ed.,
        // section 10.1, "reduction of nonlinear distortion", from memory).
        let v = row(&[
            (Column::A, "1000"),
            (Column::Beta, "0.099"),
            (Column::Hd2, "0"),
            (Column::Hd3, "-0.01"),
            (Column::Amplitude, "1"),
        ]);
        let mut out = alloc::vec![None; 4];
        Step::Distortion.run(&v, &mut out).unwrap();
        assert!((number(&out[3]) - 0.01).abs() < 1e-12, "{out:?}");
        assert!((number(&out[1]) - 1e-4).abs() < 1e-15, "{out:?}");
        assert_eq!(out[2], None, "no open-loop HD2, no ratio");

        // 4.6 kΩ in E24 rounds to 4.7 kΩ (IEC 60063 E24 list: … 4.3, 4.7, 5.1 …).
        let v = row(&[(Column::Series, "e24"), (Column::Resistor, "4k6")]);
        let mut out = alloc::vec![None; 2];
        Step::Eseries.run(&v, &mut out).unwrap();
        assert_eq!(out[0], Some(Cell::Number(4700.0)));
        assert!((number(&out[1]) - (4.7 / 4.6 - 1.0)).abs() < 1e-15);
        let v = row(&[(Column::Series, "E24"), (Column::Resistor, "-1")]);
        assert_eq!(
            Step::Eseries.run(&v, &mut out).unwrap_err().param(),
            "resistor"
        );

        // Gain 11 non-inverting from E24: R2/R1 = 10 exactly (gain 1 + R2/R1; E24
        // holds every decade of 1.0, 1.1, …, 9.1 — IEC 60063).
        let v = row(&[
            (Column::Network, "non-inverting"),
            (Column::Series, "E24"),
            (Column::PairTarget, "11"),
            (Column::TotalMin, "10k"),
            (Column::TotalMax, "1M"),
        ]);
        let mut out = alloc::vec![None; 4];
        Step::Pair.run(&v, &mut out).unwrap();
        assert_eq!(number(&out[1]) / number(&out[0]), 10.0);
        assert_eq!((number(&out[2]), number(&out[3])), (11.0, 0.0));
        let total = number(&out[0]) + number(&out[1]);
        assert!((10e3..=1e6).contains(&total), "{total}");
    }
}
