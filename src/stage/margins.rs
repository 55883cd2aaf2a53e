//! Stability margins of a circuit's loop, through the same engine as the
//! pole-list loops ([`crate::freq::margins_of`]).
//!
//! The loop gain is the return ratio at the amplifier element or a named
//! controlled source ([`super::loop_gain`]), evaluated by one nodal solve per
//! frequency. The search grid gets its corners and resonances from the poles
//! and zeros of every amplifier model in the circuit, from the poles of the
//! opened circuit (the poles of T) and from the closed circuit's poles
//! ([`super::poles::circuit_poles`], where 1 + T comes near 0), so a narrow
//! resonance is not stepped over. The worst margins are signed by the closed
//! circuit's poles; the Bode validity flags a loop gain with right-half-plane
//! poles (the opened circuit's) or a negative real loop gain at the low end
//! of the search range.

use super::loop_gain::{control_in, open_at, reference_gain, Opened};
use super::poles::{circuit_poles, CircuitPoles, MARGINAL_REL};
use crate::circuit::mna::Sweeper;
use crate::circuit::{Circuit, CircuitError, CircuitResult, ElementKind};
use crate::freq::crossings::DEFAULT_POINTS_PER_DECADE;
use crate::freq::evaluated::nearest_branch;
use crate::freq::{
    margins_of, ComplexPair, EvaluatedLoop, GridHints, MarginValidity, Margins, Verdict,
};
use alloc::vec::Vec;
use core::cell::RefCell;
use num_complex::Complex64;

/// Highest Q given to the local grid of a pole pair found on (or across) the
/// jω axis: its resonance is then 1e-6 of f0 wide.
const MAX_HINT_Q: f64 = 1e6;

/// A circuit's return ratio as an evaluated loop gain.
pub(crate) struct CircuitLoop<'a> {
    original: &'a Circuit,
    index: usize,
    sweeper: RefCell<Sweeper<'a>>,
    error: RefCell<Option<CircuitError>>,
    hints: GridHints,
    /// A nearby loop sampled on the same grid ([`Profile`]), if any.
    profile: Option<&'a Profile>,
}

impl<'a> CircuitLoop<'a> {
    /// The loop of `original` opened in `s` ([`setup`]), with grid hints
    /// from both pole sets.
    pub(crate) fn new(original: &'a Circuit, s: &'a LoopSetup) -> CircuitResult<CircuitLoop<'a>> {
        Ok(CircuitLoop {
            original,
            index: s.opened.index,
            sweeper: RefCell::new(Sweeper::new(&s.opened.circuit)?),
            error: RefCell::new(None),
            hints: hints(original, &s.open, &s.closed),
            profile: None,
        })
    }

    /// The loop of `original` opened in `opened`, with grid hints found
    /// elsewhere (a nearby circuit's: [`LoopHints`]).
    fn with_hints(
        original: &'a Circuit,
        opened: &'a Opened,
        hints: GridHints,
        profile: Option<&'a Profile>,
    ) -> CircuitResult<CircuitLoop<'a>> {
        Ok(CircuitLoop {
            original,
            index: opened.index,
            sweeper: RefCell::new(Sweeper::new(&opened.circuit)?),
            error: RefCell::new(None),
            hints,
            profile,
        })
    }

    fn try_eval(&self, f_hz: f64) -> CircuitResult<Complex64> {
        let mut sw = self.sweeper.borrow_mut();
        let x = sw.solve_at(f_hz)?;
        let returned = control_in(self.original, self.index, &sw, &x)?;
        let k = reference_gain(self.original, self.index, f_hz)?;
        Ok(-(k * returned))
    }

    /// The first evaluation error, if any (the engine saw a NaN for it).
    pub(crate) fn take_error(&self) -> Option<CircuitError> {
        self.error.borrow_mut().take()
    }

    /// T at `f_hz` as a complex number (NaN after an error, kept).
    pub(crate) fn at(&self, f_hz: f64) -> Complex64 {
        match self.try_eval(f_hz) {
            Ok(t) => t,
            Err(e) => {
                self.error.borrow_mut().get_or_insert(e);
                Complex64::new(f64::NAN, f64::NAN)
            }
        }
    }

    /// The engine's result, or the circuit's own error when an evaluation failed.
    pub(crate) fn finish<T>(&self, r: crate::error::Result<T>) -> CircuitResult<T> {
        if let Some(e) = self.take_error() {
            return Err(e);
        }
        r.map_err(CircuitError::from)
    }
}

impl EvaluatedLoop for CircuitLoop<'_> {
    fn eval(&self, f_hz: f64) -> (f64, f64) {
        let t = self.at(f_hz);
        (libm::log(t.norm()), crate::float::atan2(t.im, t.re))
    }

    fn hints(&self) -> GridHints {
        self.hints.clone()
    }

    fn search_range(&self) -> (f64, f64) {
        match self.profile {
            Some(p) => p.range,
            None => crate::freq::evaluated::default_search_range(self),
        }
    }

    fn sweep(&self, f: &[f64], ln_mag: &mut Vec<f64>, phase: &mut Vec<f64>) {
        let warm = self
            .profile
            .filter(|p| p.f.len() == f.len() && p.f.iter().zip(f).all(|(a, b)| a == b));
        if let Some(p) = warm {
            if p.sweep(self, ln_mag, phase) {
                return;
            }
            ln_mag.clear();
            phase.clear();
        }
        let mut prev: Option<f64> = None;
        for &x in f {
            let (l, ph) = self.eval(x);
            let ph = prev.map_or(ph, |q| nearest_branch(ph, q));
            prev = Some(ph);
            ln_mag.push(l);
            phase.push(ph);
        }
    }
}

/// Distance from the nominal |T| = 1, in ln|T|, beyond which a grid point of
/// the nominal loop is quiet: 26 dB, the guard at half of it 13 dB (common
/// practice, no source: a part spread of a few per cent moves |T| by a
/// fraction of a dB, and an A0 spread of 12 dB only where |T| is far above 1).
pub(crate) const QUIET_LN: f64 = core::f64::consts::LN_10 * 1.3; // 26 dB
/// Distance of the nominal phase from every −180° + m·360°, degrees, beyond
/// which a grid point is quiet (common practice, no source).
pub(crate) const QUIET_DEG: f64 = 60.0;

/// A nominal loop sampled on its hinted grid: the warm start of the Monte
/// Carlo's trials. A point is **quiet** when the nominal |T| is more than
/// [`QUIET_LN`] from 1 and its phase more than [`QUIET_DEG`] from every
/// −180° level (or, when the gain margin is not wanted, |T| is more than
/// [`QUIET_LN`] below 1 whatever its phase): no crossing that matters can be
/// near it. A trial of the same topology is
/// evaluated on the same grid at every point that is not quiet and at both
/// ends of every run of quiet points; inside a run its ln|T| and phase are the
/// nominal's shifted by the trial's offset from the nominal, interpolated
/// between the run's ends, so no crossing is made or lost there. If at a run's
/// end the trial is half the quiet distance or more from the nominal (in
/// ln|T| or in phase), it is evaluated at every point instead (the guard), so
/// a trial far from the nominal takes the full grid.
#[derive(Debug, Clone)]
pub(crate) struct Profile {
    range: (f64, f64),
    f: Vec<f64>,
    ln: Vec<f64>,
    ph: Vec<f64>,
    quiet: Vec<bool>,
}

impl Profile {
    fn of(l: &CircuitLoop, gain_margin: bool) -> Option<Profile> {
        let range = l.search_range();
        let f = crate::freq::crossings::grid(l, HINTED_POINTS_PER_DECADE).ok()?;
        let (mut ln, mut ph) = (Vec::with_capacity(f.len()), Vec::with_capacity(f.len()));
        l.sweep(&f, &mut ln, &mut ph);
        if ln.iter().chain(&ph).any(|x| !x.is_finite()) {
            return None;
        }
        let quiet = ln
            .iter()
            .zip(&ph)
            .map(|(&g, &p)| {
                let x = p.to_degrees() + 180.0;
                let off = libm::fabs(x - 360.0 * crate::float::round(x / 360.0));
                // Without the gain margin, a phase crossing where |T| is far
                // below 1 matters to nothing (the phase margin is read at
                // |T| = 1, the verdict from crossings with |T| > 1).
                libm::fabs(g) > QUIET_LN && (off > QUIET_DEG || (!gain_margin && g < -QUIET_LN))
            })
            .collect();
        Some(Profile {
            range,
            f,
            ln,
            ph,
            quiet,
        })
    }

    /// The trial `l` on the profile's grid (module doc): `false` when the
    /// guard sends it to the full grid (the outputs then hold partial data).
    fn sweep(&self, l: &CircuitLoop, ln_mag: &mut Vec<f64>, phase: &mut Vec<f64>) -> bool {
        let n = self.f.len();
        ln_mag.clear();
        phase.clear();
        ln_mag.resize(n, 0.0);
        phase.resize(n, 0.0);
        let q = |i: usize| self.quiet.get(i).copied().unwrap_or(false);
        let kept = |i: usize| !q(i) || i == 0 || i + 1 == n || !q(i - 1) || !q(i + 1);
        let mut prev: Option<f64> = None;
        let mut last: Option<usize> = None;
        for i in (0..n).filter(|&i| kept(i)) {
            let (g, p) = l.eval(self.f[i]);
            // After a skipped run, the branch nearest the nominal's phase
            // there plus the trial's offset at the run's start.
            let reference = match last {
                Some(a) if i > a + 1 => Some(self.ph[i] + (phase[a] - self.ph[a])),
                _ => prev,
            };
            let p = reference.map_or(p, |r| nearest_branch(p, r));
            if !(g.is_finite() && p.is_finite()) {
                return false;
            }
            let (dg, dp) = (g - self.ln[i], p - self.ph[i]);
            if q(i)
                && (libm::fabs(dg) >= 0.5 * QUIET_LN
                    || libm::fabs(dp).to_degrees() >= 0.5 * QUIET_DEG)
            {
                return false;
            }
            if let Some(a) = last.filter(|&a| i > a + 1) {
                let (dga, dpa) = (ln_mag[a] - self.ln[a], phase[a] - self.ph[a]);
                for j in a + 1..i {
                    let t = (j - a) as f64 / (i - a) as f64;
                    ln_mag[j] = self.ln[j] + dga + (dg - dga) * t;
                    phase[j] = self.ph[j] + dpa + (dp - dpa) * t;
                }
            }
            ln_mag[i] = g;
            phase[i] = p;
            prev = Some(p);
            last = Some(i);
        }
        true
    }
}

/// Corners and pairs from every amplifier model, the poles of T (`open`:
/// the opened circuit's, each complex pair with its local grid) and the
/// closed circuit's poles (`closed`: corners only — T is smooth there, the
/// curve only passes near −1).
fn hints(c: &Circuit, open: &CircuitPoles, closed: &CircuitPoles) -> GridHints {
    let mut h = GridHints::default();
    for e in c
        .elements()
        .iter()
        .filter(|e| e.kind() == ElementKind::Amplifier)
    {
        let Some(part) = e.amplifier() else { continue };
        if let Ok(m) = part.model.transfer_model(part.point) {
            m.corners_hz(&mut h.corners_hz);
            h.pairs.extend(m.complex_poles.iter().map(|&p| (p, true)));
            h.pairs.extend(m.complex_zeros.iter().map(|&p| (p, false)));
        }
    }
    for p in open.poles.iter().filter(|p| p.natural_hz > 0.0) {
        h.corners_hz.push(p.natural_hz);
        if p.im > 0.0 {
            let zeta = libm::fabs(p.zeta);
            let q = if zeta > 0.5 / MAX_HINT_Q {
                0.5 / zeta
            } else {
                MAX_HINT_Q
            };
            let pair = ComplexPair {
                freq_hz: p.natural_hz,
                q,
            };
            h.pairs.push((pair, true));
        }
    }
    h.corners_hz.extend(
        closed
            .poles
            .iter()
            .filter(|p| p.natural_hz > 0.0 && p.im >= 0.0)
            .map(|p| p.natural_hz),
    );
    h
}

/// Poles of the opened circuit (those of T) in the right half plane.
pub(crate) fn rhp_count(p: &CircuitPoles) -> u32 {
    p.poles
        .iter()
        .filter(|q| q.re > MARGINAL_REL * libm::hypot(q.re, q.im))
        .count() as u32
}

/// Everything the circuit analyses of the loop share: the opened circuit,
/// the closed and opened poles.
pub(crate) struct LoopSetup {
    pub opened: Opened,
    pub closed: CircuitPoles,
    pub open: CircuitPoles,
}

/// Open the loop of `c` at `controlled` and find both pole sets.
pub(crate) fn setup(c: &Circuit, controlled: &str) -> CircuitResult<LoopSetup> {
    let mut quiet = c.clone();
    quiet.zero_sources();
    let opened = open_at(&quiet, controlled, 1.0)?;
    let closed = circuit_poles(c)?;
    let open = circuit_poles(&opened.circuit)?;
    Ok(LoopSetup {
        opened,
        closed,
        open,
    })
}

/// The grid hints of a circuit's loop and the count of its loop gain's
/// right-half-plane poles, found once (both pole sets) for the margins of
/// many circuits of the same topology with nearby values
/// ([`circuit_margins_hinted`]: a Monte Carlo over the parts' spreads).
#[derive(Debug, Clone)]
pub(crate) struct LoopHints {
    hints: GridHints,
    open_rhp: u32,
    /// The loop sampled on the hinted grid (`None` when it could not be).
    profile: Option<Profile>,
}

impl LoopHints {
    /// The hints of the loop of `c` broken at `controlled`, and its profile
    /// on the hinted grid ([`Profile`]; with `gain_margin` false, the trials'
    /// gain margins are not wanted and their phase crossings far below
    /// |T| = 1 are not searched: only their phase margins and verdicts hold).
    ///
    /// # Errors
    /// As [`circuit_margins`].
    pub(crate) fn of(c: &Circuit, controlled: &str, gain_margin: bool) -> CircuitResult<LoopHints> {
        let s = setup(c, controlled)?;
        let h = hints(c, &s.open, &s.closed);
        let open_rhp = rhp_count(&s.open);
        let mut quiet = c.clone();
        quiet.zero_sources();
        let opened = open_at(&quiet, controlled, 1.0)?;
        let l = CircuitLoop::with_hints(c, &opened, h.clone(), None)?;
        let profile = Profile::of(&l, gain_margin);
        Ok(LoopHints {
            hints: h,
            open_rhp,
            profile,
        })
    }
}

/// Relative step either side of a phase crossing at which the side of the
/// real axis that T is on is read.
const SIDE_STEP: f64 = 1e-6;

/// Points per decade of the hinted search grid. Every crossing found is
/// refined to [`crate::freq::crossings::CROSSING_REL_TOL`] whatever the grid;
/// the grid only has to bracket it, and the nominal circuit's corners and the
/// local grids of its resonances (from both pole sets) are on it besides
/// (common practice, no source: a bracket per crossing suffices).
pub(crate) const HINTED_POINTS_PER_DECADE: u32 = 12;

/// The margins of the loop of `c` at `controlled` without finding any pole:
/// the search grid takes its corners and resonances from `h` (a circuit of
/// the same topology with nearby values, [`LoopHints::of`]) at
/// [`HINTED_POINTS_PER_DECADE`], and the worst
/// margins are signed by Nyquist's criterion read off the crossings of the
/// negative real axis in place of the closed circuit's poles.
///
/// With P right-half-plane poles of T (from `h`), Z = P + N closed-loop poles
/// lie in the right half plane, N the clockwise encirclements of −1 over the
/// whole contour. T(jω) starts on the positive real axis (T(0) > 0, checked at
/// the low end of the search range: |∠T| < 45° there, else the full path is
/// taken) and ends at 0, so only its crossings of the negative real axis
/// left of −1 (the phase crossings with |T| > 1) wind around −1: each counts
/// +1 when T passes from below the axis to above it (clockwise) and −1 the
/// other way, read from Im T at f·(1 ∓ [`SIDE_STEP`]); the mirror image for
/// ω < 0 doubles the count. Only the sign of the margins depends on that
/// verdict (negative when unstable), so the margins are those of
/// [`circuit_margins`] to the crossing search's tolerance. A loop gain with
/// right-half-plane poles in `h` takes the full path.
///
/// Source: Nyquist's criterion, H. Nyquist, "Regeneration theory", *Bell
/// System Technical Journal* 11, 1932; the counting of real-axis crossings as
/// in Franklin, Powell & Emami-Naeini, *Feedback Control of Dynamic Systems*,
/// 7th ed., section 6.3 (from memory).
///
/// # Errors
/// As [`circuit_margins`].
pub(crate) fn circuit_margins_hinted(
    c: &Circuit,
    controlled: &str,
    h: &LoopHints,
) -> CircuitResult<Margins> {
    if h.open_rhp > 0 {
        return circuit_margins(c, controlled);
    }
    let mut quiet = c.clone();
    quiet.zero_sources();
    let opened = open_at(&quiet, controlled, 1.0)?;
    let l = CircuitLoop::with_hints(c, &opened, h.hints.clone(), h.profile.as_ref())?;
    let t0 = l.at(l.search_range().0);
    if let Some(e) = l.take_error() {
        return Err(e);
    }
    let from_positive_axis = t0.re > libm::fabs(t0.im);
    if !from_positive_axis {
        return circuit_margins(c, controlled);
    }
    let r = margins_of(
        &l,
        HINTED_POINTS_PER_DECADE,
        || Ok(Verdict::Stable),
        MarginValidity::Meaningful,
    );
    let mut m = l.finish(r)?;
    let mut half_turns = 0i64;
    for x in m.phase_crossings.iter().filter(|x| x.rising) {
        let below = l.at(x.freq_hz * (1.0 - SIDE_STEP)).im;
        let above = l.at(x.freq_hz * (1.0 + SIDE_STEP)).im;
        if below < 0.0 && above > 0.0 {
            half_turns += 1;
        } else if below > 0.0 && above < 0.0 {
            half_turns -= 1;
        }
    }
    if let Some(e) = l.take_error() {
        return Err(e);
    }
    if 2 * half_turns > 0 {
        m.closed_loop = Verdict::Unstable;
        m.phase_margin_deg = m.phase_margin_deg.map(|x| -x);
        m.gain_margin_db = m.gain_margin_db.map(|x| -x);
    }
    Ok(m)
}

/// The stability margins of the loop of `c` broken at `controlled` (the
/// amplifier element or a controlled source), on the default grid density.
///
/// # Errors
/// As [`circuit_margins_with_density`].
///
/// # Example
/// ```
/// use loopwright::stage::margins::circuit_margins;
/// use loopwright::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
/// use loopwright::freq::Verdict;
/// // A follower of a 1 MHz amplifier with a second pole at 1 MHz: T = A(jω),
/// // PM = 180° − 90° − atan(fc/1 MHz) with fc = 786 kHz (closed form of |T| = 1).
/// let s = Stage {
///     kind: StageKind::NonInverting,
///     amplifier: Amplifier::from_gbw(Spread::fixed(1e5), 1e6).with_pole(1e6),
///     point: SpreadPoint::Typ,
///     parts: StageParts::default(),
/// }.circuit().unwrap();
/// let m = circuit_margins(&s.circuit, "U1").unwrap();
/// let fc = 1e6 * ((5f64.sqrt() - 1.0) / 2.0).sqrt();
/// assert!((m.crossover_hz.unwrap() / fc - 1.0).abs() < 1e-5);
/// assert!((m.phase_margin_deg.unwrap() - (90.0 - (fc / 1e6).atan().to_degrees())).abs() < 1e-3);
/// assert_eq!(m.closed_loop, Verdict::Stable);
/// ```
pub fn circuit_margins(c: &Circuit, controlled: &str) -> CircuitResult<Margins> {
    circuit_margins_with_density(c, controlled, DEFAULT_POINTS_PER_DECADE)
}

/// [`circuit_margins`] with a chosen search-grid density, points per decade.
///
/// # Errors
/// `controlled` unknown or not an amplifier or controlled source; a circuit
/// that is singular (at DC, at some frequency, or for the pole analysis),
/// named; `points_per_decade` outside 4…2000; too many phase crossings.
pub fn circuit_margins_with_density(
    c: &Circuit,
    controlled: &str,
    points_per_decade: u32,
) -> CircuitResult<Margins> {
    let s = setup(c, controlled)?;
    let l = CircuitLoop::new(c, &s)?;
    let validity = if rhp_count(&s.open) > 0 {
        MarginValidity::OpenLoopUnstable
    } else if l.at(l.search_range().0).re < 0.0 {
        MarginValidity::PositiveFeedback
    } else {
        MarginValidity::Meaningful
    };
    let verdict: Verdict = s.closed.verdict;
    let r = margins_of(&l, points_per_decade, || Ok(verdict), validity);
    l.finish(r)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};

    fn stage(rf: f64, cl: f64, gbw: f64) -> Circuit {
        Stage {
            kind: StageKind::NonInverting,
            amplifier: Amplifier::from_gbw(
                Spread {
                    min: 5e4,
                    typ: 2e5,
                    max: 1e6,
                },
                gbw,
            )
            .with_pole(5e7)
            .with_ro(50.0),
            point: SpreadPoint::Typ,
            parts: StageParts {
                rf: Some(rf),
                rg: Some(1e3),
                rl: Some(2e3),
                cl: Some(cl),
                ..StageParts::default()
            },
        }
        .circuit()
        .unwrap()
        .circuit
    }

    /// The warm start gives the margins of the same hinted search on the full
    /// grid, bit for bit, for trials near the nominal and far from it (the
    /// guard), with and without the gain margin; and it skips grid points.
    #[test]
    fn warm_start_gives_the_full_grids_margins() {
        let nominal = stage(9e3, 1e-9, 1e7);
        for gain_margin in [false, true] {
            let warm = LoopHints::of(&nominal, "U1", gain_margin).unwrap();
            let p = warm.profile.as_ref().expect("a profile");
            assert!(p.quiet.iter().filter(|&&q| q).count() > p.f.len() / 4);
            let cold = LoopHints {
                profile: None,
                ..warm.clone()
            };
            for (rf, cl, gbw) in [
                (9e3, 1e-9, 1e7),
                (9.09e3, 0.95e-9, 1.3e7),
                (8.91e3, 1.05e-9, 0.7e7),
                // Far from the nominal: the guard sends it to the full grid.
                (1e3, 20e-9, 3e7),
            ] {
                let c = stage(rf, cl, gbw);
                let a = circuit_margins_hinted(&c, "U1", &warm).unwrap();
                let b = circuit_margins_hinted(&c, "U1", &cold).unwrap();
                let bits = |x: Option<f64>| x.map(f64::to_bits);
                assert_eq!(bits(a.phase_margin_deg), bits(b.phase_margin_deg));
                assert_eq!(bits(a.crossover_hz), bits(b.crossover_hz));
                assert_eq!(a.closed_loop, b.closed_loop);
                if gain_margin {
                    assert_eq!(bits(a.gain_margin_db), bits(b.gain_margin_db));
                }
            }
        }
    }
    /// Warm-started margins equal the full hinted grid's, bit for bit, for
    /// random nominal stages (feedback resistor, load capacitance, GBW and Ro
    /// over decades) and random trials around them (within ±20 %, the spreads
    /// of a Monte Carlo run, and far off, where the guard takes the full grid).
    #[test]
    fn warm_start_equals_the_full_grid_on_random_stages() {
        use proptest::prelude::*;
        use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};
        let mut runner = TestRunner::new_with_rng(
            Config {
                cases: 64,
                failure_persistence: None,
                ..Config::default()
            },
            TestRng::from_seed(RngAlgorithm::ChaCha, &[18; 32]),
        );
        let nominal = (3.0..5.5f64, -12.0..-7.5f64, 6.0..8.0f64, any::<bool>());
        let trial = prop::collection::vec((-0.2..0.2f64, -0.2..0.2f64, -0.2..0.2f64), 4);
        runner
            .run(
                &(nominal, trial, -1.0..1.0f64),
                |((rf, cl, gbw, gain_margin), trials, far)| {
                    let (rf, cl, gbw) = (10f64.powf(rf), 10f64.powf(cl), 10f64.powf(gbw));
                    let warm = LoopHints::of(&stage(rf, cl, gbw), "U1", gain_margin)
                        .map_err(|e| TestCaseError::fail(alloc::format!("{e:?}")))?;
                    // The warm start is in play (a nominal profile with quiet points).
                    prop_assert!(warm.profile.is_some());
                    let cold = LoopHints {
                        profile: None,
                        ..warm.clone()
                    };
                    let mut cases: alloc::vec::Vec<(f64, f64, f64)> = trials
                        .iter()
                        .map(|&(a, b, c)| (rf * (1.0 + a), cl * (1.0 + b), gbw * (1.0 + c)))
                        .collect();
                    // One far from the nominal (a decade off in the load).
                    cases.push((rf, cl * 10f64.powf(far.signum()), gbw));
                    for (rf, cl, gbw) in cases {
                        let c = stage(rf, cl, gbw);
                        let a = circuit_margins_hinted(&c, "U1", &warm);
                        let b = circuit_margins_hinted(&c, "U1", &cold);
                        let (a, b) = match (a, b) {
                            (Ok(a), Ok(b)) => (a, b),
                            (Err(x), Err(y)) => {
                                prop_assert_eq!(x, y);
                                continue;
                            }
                            (a, b) => {
                                return Err(TestCaseError::fail(alloc::format!(
                                    "rf {rf} cl {cl} gbw {gbw}: {a:?} vs {b:?}"
                                )))
                            }
                        };
                        let bits = |x: Option<f64>| x.map(f64::to_bits);
                        let what = alloc::format!("rf {rf} cl {cl} gbw {gbw}: {a:?} vs {b:?}");
                        prop_assert_eq!(
                            bits(a.phase_margin_deg),
                            bits(b.phase_margin_deg),
                            "{}",
                            what
                        );
                        prop_assert_eq!(bits(a.crossover_hz), bits(b.crossover_hz), "{}", what);
                        prop_assert_eq!(a.closed_loop, b.closed_loop, "{}", what);
                        if gain_margin {
                            prop_assert_eq!(
                                bits(a.gain_margin_db),
                                bits(b.gain_margin_db),
                                "{}",
                                what
                            );
                        }
                    }
                    Ok(())
                },
            )
            .unwrap();
    }
}
