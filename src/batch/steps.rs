//! What the batch tool computes for one design row: the input columns it knows, the
//! steps (stage, impedance, inverse, spread, loop), and each step's result columns.
//! Every number comes from the feedback area of the core, or for the loop step from
//! the stage area; this file only routes values.

use crate::check;
use crate::error::{Error, Result};
use crate::feedback::{
    beta_for_gain, gain_spread, min_open_loop_gain, resistances_with_feedback, summarize, Topology,
};

/// The input columns the batch tool reads (header names, compared without case
/// and surrounding blanks); every one but `topology` holds a value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Column {
    /// Topology name (`series-shunt`, `voltage-series`, …); `series-shunt` when empty.
    Topology,
    /// Open-loop gain A.
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
    /// A stage document (JSON text, `docs/stage.md`) for the loop step.
    Stage,
    /// A field of a stage described in columns (`kind`, `a0`, `gbw_hz`, `rf`, …;
    /// [`crate::stage::document_pairs`]): the document field it stands for.
    StageField(&'static str),
}

/// The value columns, in the order of [`Values`].
const VALUE_COLUMNS: [Column; 8] = [
    Column::A,
    Column::Beta,
    Column::TargetGain,
    Column::GainError,
    Column::Zi,
    Column::Zo,
    Column::AMin,
    Column::AMax,
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
            Column::Stage => "stage",
            Column::StageField(f) => f,
        }
    }

    /// The column a header name means, if the tool knows it.
    pub fn from_header(name: &str) -> Option<Column> {
        let name = name.trim();
        core::iter::once(Column::Topology)
            .chain(VALUE_COLUMNS)
            .chain(core::iter::once(Column::Stage))
            .find(|c| c.name().eq_ignore_ascii_case(name))
            .or_else(|| crate::stage::document_pairs::field_of(name).map(Column::StageField))
    }

    fn value_index(self) -> Option<usize> {
        VALUE_COLUMNS.iter().position(|&c| c == self)
    }
}

/// One row's inputs: the topology and each value column that is present and
/// not empty.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Values {
    /// The topology (series-shunt when the column is missing or empty).
    pub topology: Option<Topology>,
    values: [Option<f64>; 8],
    /// The stage document of the row, as written.
    stage: Option<alloc::string::String>,
    /// The stage fields of the row, as written.
    stage_fields: alloc::vec::Vec<(&'static str, alloc::string::String)>,
}

impl Values {
    /// Read one field of `column`: the topology by name, values by
    /// [`crate::notation::parse_value`] (SI prefixes and IEC 60062 codes; nothing
    /// else is guessed, so `0x2710` is an error). An empty field leaves it unset.
    ///
    /// # Errors
    /// The reader's error, named after the column.
    pub fn read(&mut self, column: Column, text: &str) -> Result<()> {
        let text = text.trim();
        if text.is_empty() {
            return Ok(());
        }
        match column.value_index() {
            None if column == Column::Stage => self.stage = Some(text.into()),
            None => match column {
                Column::StageField(f) => self.stage_fields.push((f, text.into())),
                _ => self.topology = Some(text.parse()?),
            },
            Some(i) => {
                let x =
                    crate::notation::parse_value(text).map_err(|e| e.with_param(column.name()))?;
                self.values[i] = Some(x);
            }
        }
        Ok(())
    }

    fn get(&self, column: Column) -> Option<f64> {
        column.value_index().and_then(|i| self.values[i])
    }

    fn need(&self, column: Column) -> Result<f64> {
        self.get(column).ok_or(Error::OutOfDomain {
            param: column.name(),
            requirement: "is empty in this row, and a step chosen for it needs it",
        })
    }
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
    /// The loop of a stage (a `stage` document column, or a `kind` column with
    /// the amplifier figures and parts as columns): phase margin, crossover, gain
    /// margin, the closed-loop verdict and the DC closed-loop gain.
    Loop,
}

/// The steps' names, for messages.
pub const STEP_NAMES: &str = "stage, impedance, inverse, spread, loop";

impl Step {
    /// Every step, in output order.
    pub const ALL: [Step; 5] = [
        Step::Stage,
        Step::Impedance,
        Step::Inverse,
        Step::Spread,
        Step::Loop,
    ];

    /// The name used by `--compute`.
    pub const fn name(self) -> &'static str {
        match self {
            Step::Stage => "stage",
            Step::Impedance => "impedance",
            Step::Inverse => "inverse",
            Step::Spread => "spread",
            Step::Loop => "loop",
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

    /// The columns a file must have for this step.
    pub const fn needs(self) -> &'static [Column] {
        match self {
            Step::Stage => &[Column::A, Column::Beta],
            Step::Impedance => &[Column::A, Column::Beta, Column::Zi, Column::Zo],
            Step::Inverse => &[Column::A, Column::TargetGain],
            Step::Spread => &[Column::Beta, Column::AMin, Column::AMax],
            // A `stage` column or a `kind` column: checked by `has_inputs`.
            Step::Loop => &[],
        }
    }

    /// Whether a header with these columns gives the step its inputs.
    pub fn has_inputs(self, columns: &[Option<Column>]) -> bool {
        let has = |c: Column| columns.contains(&Some(c));
        match self {
            Step::Loop => has(Column::Stage) || has(Column::StageField("kind")),
            _ => self.needs().iter().all(|c| has(*c)),
        }
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
            Step::Loop => &[
                "phase_margin_deg",
                "crossover_hz",
                "gain_margin_db",
                "closed_loop_stable",
                "dc_gain",
            ],
        }
    }

    /// Compute the step for one row; `out` has one slot per column (`None`: left
    /// empty, as the least open-loop gain is without a gain error).
    ///
    /// # Errors
    /// An empty needed value, or the core function's error.
    pub fn run(self, v: &Values, out: &mut [Option<f64>]) -> Result<()> {
        let topology = v.topology.unwrap_or(Topology::SeriesShunt);
        let results: [Option<f64>; 5] = match self {
            Step::Stage => {
                let s = summarize(topology, v.need(Column::A)?, v.need(Column::Beta)?)?;
                [
                    Some(s.closed_loop_gain),
                    Some(s.loop_gain),
                    Some(s.feedback_amount),
                    Some(s.feedback_amount_db),
                    Some(s.sensitivity),
                ]
            }
            Step::Impedance => {
                let (a, beta) = (v.need(Column::A)?, v.need(Column::Beta)?);
                let (zi, zo) = (v.need(Column::Zi)?, v.need(Column::Zo)?);
                let (rif, rof) = resistances_with_feedback(topology, zi, zo, a, beta)?;
                [Some(rif), Some(rof), None, None, None]
            }
            Step::Inverse => {
                let target = v.need(Column::TargetGain)?;
                let beta = beta_for_gain(v.need(Column::A)?, target)?;
                let a_min = match v.get(Column::GainError) {
                    Some(e) => Some(min_open_loop_gain(ideal_beta(target)?, e)?),
                    None => None,
                };
                [Some(beta), a_min, None, None, None]
            }
            Step::Spread => {
                let (a_min, a_max) = (v.need(Column::AMin)?, v.need(Column::AMax)?);
                let a_typ = match v.get(Column::A) {
                    Some(a) => a,
                    None => geometric_mean(a_min, a_max)?,
                };
                let s = gain_spread(v.need(Column::Beta)?, a_min, a_typ, a_max)?;
                [Some(s.spread_percent), Some(s.spread_ppm), None, None, None]
            }
            Step::Loop => stage_loop(v)?,
        };
        for (slot, r) in out.iter_mut().zip(results) {
            *slot = r;
        }
        Ok(())
    }
}

/// The loop step of one row: the stage from its document or its fields, then
/// the margins of its loop ([`crate::stage::margins::circuit_margins`]), the
/// verdict from its poles (1 stable, 0 marginal or unstable) and its closed-loop
/// gain at 0 Hz (the real part: the gain with its sign).
fn stage_loop(v: &Values) -> Result<[Option<f64>; 5]> {
    use crate::stage::closed_loop::gain_sweep;
    use crate::stage::margins::circuit_margins;
    let stage = match (&v.stage, v.stage_fields.is_empty()) {
        (Some(doc), true) => crate::stage::read_stage(doc)?,
        (None, false) => crate::stage::document_pairs::stage_from_pairs(
            v.stage_fields
                .iter()
                .map(|(f, t)| (*f, crate::json::Json::from(t.as_str()))),
        )?,
        (Some(_), false) => {
            return Err(Error::OutOfDomain {
                param: "stage",
                requirement: "give the stage as a document or as columns, not both in one row",
            })
        }
        (None, true) => {
            return Err(Error::OutOfDomain {
                param: "stage",
                requirement: "is empty in this row: give a stage document or kind and the figures",
            })
        }
    };
    let sc = stage.circuit()?;
    let m = circuit_margins(&sc.circuit, sc.amplifier)?;
    let output = match sc.output_current {
        Some(e) => crate::circuit::blackman::Output::Current(e),
        None => crate::circuit::blackman::Output::Voltage(sc.output, "0"),
    };
    let dc = gain_sweep(&sc.circuit, sc.source, output, &[0.0])?;
    let stable = m.closed_loop == crate::freq::Verdict::Stable;
    Ok([
        m.phase_margin_deg,
        m.crossover_hz,
        m.gain_margin_db,
        Some(f64::from(u8::from(stable))),
        dc.re.first().copied(),
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

    #[test]
    fn steps_route_to_the_core() {
        // A = 10⁵, β = 0.01: D = 1001, Af = 10⁵/1001 (the feedback equation
        // Af = A/(1 + Aβ); Sedra & Smith, Microelectronic Circuits, 7th ed., section 10.1,
        // from memory).
        let v = row(&[(Column::A, "1e5"), (Column::Beta, "0.01")]);
        let mut out = [None; 5];
        Step::Stage.run(&v, &mut out).unwrap();
        assert!((out[0].unwrap() - 1e5 / 1001.0).abs() < 1e-12);
        assert_eq!(out[2], Some(1001.0));
        // Least A for 0.1 % error at gain 10: A ≥ (1 − ε)/(ε·β) with β = 1/10
        // = 0.999/(0.001·0.1) = 9990 (same source, the gain error 1/(1 + Aβ)).
        let v = row(&[
            (Column::A, "1e5"),
            (Column::TargetGain, "10"),
            (Column::GainError, "0.001"),
        ]);
        let mut out = [None; 2];
        Step::Inverse.run(&v, &mut out).unwrap();
        assert!((out[1].unwrap() - 9990.0).abs() < 1e-9);
        // The spread's typical gain is the geometric mean, with the gains' sign:
        // −10⁴ … −10⁶ gives −10⁵ (√(10⁴·10⁶) = 10⁵, common practice, no source).
        assert_eq!(geometric_mean(-1e4, -1e6).unwrap(), -1e5);
        // No overflow where the product would: √(10³⁰⁰·10³⁰⁰) = 10³⁰⁰, to a few
        // roundings of the two square roots and the product.
        let g = geometric_mean(1e300, 1e300).unwrap();
        assert!((g / 1e300 - 1.0).abs() < ROUNDING, "{g}");
        let v = row(&[(Column::Beta, "0.01")]);
        assert_eq!(
            Step::Spread.run(&v, &mut [None; 2]).unwrap_err().param(),
            "a_min"
        );
        assert_eq!(ideal_beta(0.0).unwrap_err().param(), "target_gain");
    }
}
