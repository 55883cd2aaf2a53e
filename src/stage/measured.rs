//! A loop gain measured on the bench, read from CSV and analysed by the same
//! engine as the pole-list loops and the circuits: margins at every crossing,
//! the least distance from −1 and the Nyquist count.
//!
//! **Input.** Comma-separated rows (RFC 4180, [`crate::csv`]) of frequency,
//! magnitude and phase, each read by the one value reader
//! ([`crate::notation`]): frequency in Hz (`1k`, `1 kHz`, `1e3`), magnitude in
//! dB (`-20`, `-20 dB`) or as a ratio (`0.1`), as the caller says, phase in
//! degrees. Blanks around a field are ignored; blank lines are skipped; a
//! first row that does not read as three numbers is a header. Every other row
//! must have exactly three fields that read as finite values, frequencies
//! positive and rising from row to row, a ratio positive. A file with bad rows
//! is refused whole, every bad row reported by its line number (the first
//! [`MAX_REPORTED_ROWS`]): nothing is dropped silently.
//!
//! **Phase.** Unwrapped from row to row (a step of more than 180° between
//! neighbouring rows is read as the smaller step the other way round, so rows
//! must be dense enough that the true phase moves by less than 180° between
//! them).
//!
//! **Interpolation.** Between measured points, ln|T| (so dB) and the unwrapped
//! phase are each linear in ln f; nothing is extrapolated: crossings are
//! searched over the measured band only, and the Nyquist count assumes that
//! |T| < 1 beyond the last row and that below the first row T keeps away
//! from −1 on its way to DC; k integrators are taken when the first two rows
//! agree on them, a slope of −k·20 dB/decade and a phase of −k·90° (each
//! within a quarter step), and the half circle around s = 0 then turns T by
//! k half turns (see [`crate::freq::nyquist`]); otherwise the curve is closed
//! at the low end by the shorter turn from conj T(f₀) to T(f₀). P, the open-loop poles in
//! the right half plane, cannot be measured: the caller states it (0 for an
//! open-loop stable loop). The worst margins are signed by the Nyquist verdict.

use crate::csv::{read_all, BlankLines, Record};
use crate::error::{Error, Result};
use crate::freq::crossings::DEFAULT_POINTS_PER_DECADE;
use crate::freq::evaluated::{nearest_branch, EvaluatedLoop, GridHints};
use crate::freq::{margins_of, nyquist_of, MarginValidity, Margins, Nyquist, Verdict};
use crate::notation::{read, ReadOptions, Unit};
use alloc::vec::Vec;
use core::f64::consts::LN_10;

/// Most rows of one measured loop.
pub const MAX_ROWS: usize = 100_000;
/// Most bad rows listed in one error.
pub const MAX_REPORTED_ROWS: usize = 100;

/// How the magnitude column is written.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum MagnitudeScale {
    /// 20·log10|T|, dB.
    Decibels,
    /// |T|, a ratio.
    Ratio,
}

/// One refused row: its line in the text (from 1), the column at fault
/// (`frequency`, `magnitude`, `phase`, or `row` for the row as a whole) and why.
#[derive(Debug, Clone, PartialEq)]
pub struct RowProblem {
    /// Line number in the text, from 1.
    pub line: u64,
    /// The error; its param is the column (`frequency`, `magnitude`, `phase`)
    /// or `row`.
    pub error: Error,
}

/// Why a measured loop was refused: every bad row (the first
/// [`MAX_REPORTED_ROWS`]), or one error about the whole text (`rows` empty).
#[derive(Debug, Clone, PartialEq)]
pub struct MeasuredError {
    /// The bad rows.
    pub rows: Vec<RowProblem>,
    /// The first error (of the first bad row, or about the whole text).
    pub error: Error,
}

impl From<Error> for MeasuredError {
    fn from(error: Error) -> MeasuredError {
        MeasuredError {
            rows: Vec::new(),
            error,
        }
    }
}

/// A measured loop gain: rising frequencies, ln|T| and the unwrapped phase.
#[derive(Debug, Clone, PartialEq)]
pub struct MeasuredLoop {
    freq_hz: Vec<f64>,
    ln_mag: Vec<f64>,
    phase_rad: Vec<f64>,
}

const FREQUENCY: ReadOptions = ReadOptions {
    decibels: false,
    percent: false,
    unit: Some(Unit::Hertz),
};
const LEVEL: ReadOptions = ReadOptions {
    decibels: true,
    percent: false,
    unit: Some(Unit::Decibel),
};
const PLAIN: ReadOptions = ReadOptions {
    decibels: false,
    percent: false,
    unit: None,
};

fn field(text: &str, param: &'static str, options: &ReadOptions) -> Result<f64> {
    let v = read(text.trim(), options)
        .map_err(|e| e.with_param(param))?
        .value;
    if v.is_finite() {
        Ok(v)
    } else {
        Err(Error::NotFinite { param })
    }
}

/// One row as (f, ln|T|, phase in degrees).
fn row(r: &Record, scale: MagnitudeScale) -> Result<(f64, f64, f64)> {
    if r.problem.is_some() {
        return Err(Error::Syntax {
            param: "row",
            column: 0,
            reason: "the row breaks the CSV quoting rules",
        });
    }
    let [f, m, p] = r.fields.as_slice() else {
        return Err(Error::OutOfDomain {
            param: "row",
            requirement: "must have three fields: frequency, magnitude, phase",
        });
    };
    let f = field(f, "frequency", &FREQUENCY)?;
    if f <= 0.0 {
        return Err(Error::OutOfDomain {
            param: "frequency",
            requirement: "must be greater than zero",
        });
    }
    let ln = match scale {
        MagnitudeScale::Decibels => field(m, "magnitude", &LEVEL)? * (LN_10 / 20.0),
        MagnitudeScale::Ratio => {
            let r = field(m, "magnitude", &PLAIN)?;
            if r <= 0.0 {
                return Err(Error::OutOfDomain {
                    param: "magnitude",
                    requirement: "a ratio must be greater than zero",
                });
            }
            libm::log(r)
        }
    };
    Ok((f, ln, field(p, "phase", &PLAIN)?))
}

impl MeasuredLoop {
    /// Read a CSV text of frequency, magnitude and phase (module doc).
    ///
    /// # Errors
    /// [`MeasuredError`] with every bad row by line number; fewer than two
    /// rows (param `rows`, [`Error::OutOfDomain`]); more than [`MAX_ROWS`]
    /// (param `rows`, [`Error::TooLarge`]).
    ///
    /// # Example
    /// ```
    /// use loopwright::stage::measured::{MagnitudeScale, MeasuredLoop};
    /// let ok = MeasuredLoop::from_csv("f,mag,phase\n1k,40,-90\n10k,20,-95\n100k,0,-120\n", MagnitudeScale::Decibels).unwrap();
    /// assert_eq!(ok.len(), 3);
    /// let bad = MeasuredLoop::from_csv("1k,40,-90\n10k,x,-95\n500,0,-120\n", MagnitudeScale::Decibels).unwrap_err();
    /// assert_eq!(bad.rows.iter().map(|r| (r.line, r.error.param())).collect::<Vec<_>>(),
    ///            [(2, "magnitude"), (3, "frequency")]);
    /// ```
    pub fn from_csv(
        text: &str,
        scale: MagnitudeScale,
    ) -> core::result::Result<MeasuredLoop, MeasuredError> {
        let records = read_all(text, b',', BlankLines::Skip);
        if records.len() > MAX_ROWS + 1 {
            return Err(Error::TooLarge {
                param: "rows",
                limit: MAX_ROWS as u64,
            }
            .into());
        }
        let mut rows = Vec::with_capacity(records.len());
        let mut bad = Vec::new();
        let mut last_f: Option<f64> = None;
        for (i, r) in records.iter().enumerate() {
            match row(r, scale) {
                Ok((f, ln, p)) => {
                    if last_f.is_some_and(|g| f <= g) {
                        bad.push(RowProblem {
                            line: r.line,
                            error: Error::OutOfDomain {
                                param: "frequency",
                                requirement: "must rise from row to row",
                            },
                        });
                    } else {
                        rows.push((f, ln, p));
                    }
                    last_f = Some(last_f.map_or(f, |g: f64| g.max(f)));
                }
                // A first row that is not three numbers is a header.
                Err(_) if i == 0 && !is_numeric(r) => {}
                Err(error) => bad.push(RowProblem {
                    line: r.line,
                    error,
                }),
            }
        }
        if let Some(first) = bad.first() {
            let error = first.error;
            bad.truncate(MAX_REPORTED_ROWS);
            return Err(MeasuredError { rows: bad, error });
        }
        Self::from_rows(rows).map_err(MeasuredError::from)
    }

    /// A measured loop from rising frequencies (Hz), magnitudes and phases
    /// (degrees, unwrapped here), the magnitude in `scale`.
    ///
    /// # Errors
    /// Arrays of different lengths or fewer than two points (param `rows`);
    /// a value that is not finite, a frequency not positive or not rising, a
    /// ratio not positive (param `frequency`, `magnitude`, `phase`).
    pub fn from_points(
        freq_hz: &[f64],
        magnitude: &[f64],
        phase_deg: &[f64],
        scale: MagnitudeScale,
    ) -> Result<MeasuredLoop> {
        if freq_hz.len() != magnitude.len() || freq_hz.len() != phase_deg.len() {
            return Err(Error::OutOfDomain {
                param: "rows",
                requirement: "frequency, magnitude and phase must have the same length",
            });
        }
        let mut rows = Vec::with_capacity(freq_hz.len());
        for ((&f, &m), &p) in freq_hz.iter().zip(magnitude).zip(phase_deg) {
            crate::check::positive("frequency", f)?;
            crate::check::finite("phase", p)?;
            let ln = match scale {
                MagnitudeScale::Decibels => crate::check::finite("magnitude", m)? * (LN_10 / 20.0),
                MagnitudeScale::Ratio => libm::log(crate::check::positive("magnitude", m)?),
            };
            if rows.last().is_some_and(|&(g, _, _)| f <= g) {
                return Err(Error::OutOfDomain {
                    param: "frequency",
                    requirement: "must rise from point to point",
                });
            }
            rows.push((f, ln, p));
        }
        Self::from_rows(rows)
    }

    fn from_rows(rows: Vec<(f64, f64, f64)>) -> Result<MeasuredLoop> {
        if rows.len() < 2 {
            return Err(Error::OutOfDomain {
                param: "rows",
                requirement: "a measured loop needs at least two rows",
            });
        }
        if rows.len() > MAX_ROWS {
            return Err(Error::TooLarge {
                param: "rows",
                limit: MAX_ROWS as u64,
            });
        }
        let mut m = MeasuredLoop {
            freq_hz: Vec::with_capacity(rows.len()),
            ln_mag: Vec::with_capacity(rows.len()),
            phase_rad: Vec::with_capacity(rows.len()),
        };
        let mut prev: Option<f64> = None;
        for (f, ln, p) in rows {
            let p = p.to_radians();
            let p = prev.map_or(p, |q| nearest_branch(p, q));
            prev = Some(p);
            m.freq_hz.push(f);
            m.ln_mag.push(ln);
            m.phase_rad.push(p);
        }
        Ok(m)
    }

    /// Number of measured points.
    pub fn len(&self) -> usize {
        self.freq_hz.len()
    }

    /// Never true (at least two points are required).
    pub fn is_empty(&self) -> bool {
        self.freq_hz.is_empty()
    }

    /// The measured frequencies, Hz.
    pub fn freq_hz(&self) -> &[f64] {
        &self.freq_hz
    }
}

fn is_numeric(r: &Record) -> bool {
    r.fields.iter().all(|f| read(f.trim(), &LEVEL).is_ok())
}

impl EvaluatedLoop for MeasuredLoop {
    /// Linear in ln f between the measured points, the end values outside.
    fn eval(&self, f_hz: f64) -> (f64, f64) {
        let f = &self.freq_hz;
        let n = f.len();
        let i = f
            .partition_point(|&x| x <= f_hz)
            .clamp(1, n.saturating_sub(1));
        let (fa, fb) = (f[i - 1], f[i]);
        let t = (libm::log(f_hz / fa) / libm::log(fb / fa)).clamp(0.0, 1.0);
        let lerp = |v: &[f64]| v[i - 1] + t * (v[i] - v[i - 1]);
        (lerp(&self.ln_mag), lerp(&self.phase_rad))
    }

    fn continuous_phase(&self) -> bool {
        true
    }

    /// k integrators when the first two rows show both their slope (−k·20
    /// dB/decade) and their phase (−k·90°) within a quarter of a step; else 0.
    fn origin_poles(&self) -> Option<u32> {
        let (f, ln, ph) = (&self.freq_hz, &self.ln_mag, &self.phase_rad);
        let slope = -(ln[1] - ln[0]) / libm::log(f[1] / f[0]);
        let quarter = -ph[0] / core::f64::consts::FRAC_PI_2;
        let (ks, kp) = (crate::float::round(slope), crate::float::round(quarter));
        let agree = ks == kp && ks >= 1.0;
        let close = libm::fabs(slope - ks) < 0.25 && libm::fabs(quarter - kp) < 0.25;
        Some(if agree && close { ks as u32 } else { 0 })
    }

    fn hints(&self) -> GridHints {
        GridHints {
            corners_hz: self.freq_hz.clone(),
            pairs: Vec::new(),
        }
    }

    fn search_range(&self) -> (f64, f64) {
        let n = self.freq_hz.len();
        (self.freq_hz[0], self.freq_hz[n - 1])
    }
}

/// Margins of a measured loop, signed by its Nyquist verdict with
/// `open_loop_rhp_poles` (P) poles of T in the right half plane.
///
/// # Errors
/// As [`crate::freq::margins_of`] and [`crate::freq::nyquist_of`].
pub fn measured_margins(l: &MeasuredLoop, open_loop_rhp_poles: u32) -> Result<Margins> {
    let n = measured_nyquist(l, open_loop_rhp_poles)?;
    let validity = if open_loop_rhp_poles > 0 {
        MarginValidity::OpenLoopUnstable
    } else if crate::float::cos(l.phase_rad[0]) < 0.0 {
        MarginValidity::PositiveFeedback
    } else {
        MarginValidity::Meaningful
    };
    let verdict: Verdict = n.encirclements.verdict;
    margins_of(l, DEFAULT_POINTS_PER_DECADE, || Ok(verdict), validity)
}

/// Curve, least distance and encirclements of a measured loop (P as the
/// caller states).
///
/// # Errors
/// As [`crate::freq::nyquist_of`].
pub fn measured_nyquist(l: &MeasuredLoop, open_loop_rhp_poles: u32) -> Result<Nyquist> {
    nyquist_of(l, DEFAULT_POINTS_PER_DECADE, open_loop_rhp_poles)
}
