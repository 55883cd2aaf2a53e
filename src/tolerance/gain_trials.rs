//! Monte Carlo trials of the gain figures (gain in dB, phase, gain error at
//! one frequency) without a circuit rebuild per trial.
//!
//! The stage circuit of the nominal parts, with its source set to 1, is built
//! once per temperature; each trial writes the trial's part values and
//! amplifier model (from [`TolStage::stage_at`], the one place a trial's
//! values are made) into its elements and solves it again in the storage of
//! [`Refill`], which keeps the layout, the stamped pattern and the pivot order
//! of the last factorization. The topology of a stage does not depend on its
//! part values, so the fast path gives the unknowns of the rebuild, bit for
//! bit; when the layout or pattern does not hold (or a value could not be
//! written), the trial is computed by the full path instead.

use super::figures::{gain_figure, gain_frequency};
use super::parts::{slot_value, TolStage, NAMES};
use super::spec::Limit;
use crate::circuit::mna::{node_voltage, unit_source, Refill};
use crate::circuit::{Circuit, CircuitResult};
use crate::stage::loop_gain::checked_sample;
use crate::stage::StageCircuit;
use alloc::vec::Vec;
use num_complex::Complex64;

/// The built circuit of one temperature and its solver storage.
pub(crate) struct GainTrials {
    /// The stage circuit with its source set to 1 (as `gain_sweep` solves it).
    circuit: Circuit,
    /// The element of each part slot ([`NAMES`] order), where the stage has it.
    parts: [Option<usize>; 8],
    /// The amplifier element.
    amplifier: usize,
    /// The output node's index.
    output: usize,
    solver: Refill,
    x: Vec<Complex64>,
}

/// What one trial at one temperature gave.
pub(crate) enum Trial {
    /// The output holds every limit's figure (`None` where undefined), in
    /// spec order.
    Done,
    /// The fast path does not apply: compute the trial by the full path.
    Rebuild,
}

impl GainTrials {
    /// The evaluator of `spec` on the nominal stage circuit `b`, or `None`
    /// when a limit is not a gain figure or the output is a current (the full
    /// path serves those).
    pub fn new(b: &StageCircuit, spec: &[Limit]) -> Option<GainTrials> {
        if b.output_current.is_some() || spec.iter().any(|l| gain_frequency(&l.figure).is_none()) {
            return None;
        }
        let (circuit, _) = unit_source(&b.circuit, b.source).ok()?;
        let mut parts = [None; 8];
        for (slot, (_, element)) in parts.iter_mut().zip(NAMES) {
            *slot = circuit.element_index(element).ok();
        }
        let amplifier = circuit.element_index(b.amplifier).ok()?;
        let output = circuit.node_index(b.output).ok()?;
        let solver = Refill::new(&circuit).ok()?;
        Some(GainTrials {
            circuit,
            parts,
            amplifier,
            output,
            solver,
            x: Vec::new(),
        })
    }

    /// The figures of one trial's `values` at `temperature_c` into `out`
    /// (`out[k]` for limit k, `None` where the rebuild path finds no value).
    pub fn figures(
        &mut self,
        ts: &TolStage,
        values: &[f64],
        temperature_c: f64,
        spec: &[Limit],
        out: &mut Vec<Option<f64>>,
    ) -> Trial {
        out.clear();
        // The rebuild path's stage errors (a value its kind refuses) leave
        // every figure undefined.
        let stage = match ts.stage_at(values, temperature_c) {
            Ok(s) if s.validate().is_ok() => s,
            _ => {
                out.resize(spec.len(), None);
                return Trial::Done;
            }
        };
        let elements = self.circuit.elements_mut();
        for (k, slot) in self.parts.iter().enumerate() {
            match (slot_value(&stage.parts, k), slot) {
                (Some(v), Some(i)) => match elements.get_mut(*i) {
                    Some(e) => e.value = v,
                    None => return Trial::Rebuild,
                },
                (None, None) => {}
                _ => return Trial::Rebuild,
            }
        }
        match elements
            .get_mut(self.amplifier)
            .and_then(|e| e.amplifier.as_deref_mut())
        {
            Some(part) => {
                part.model = stage.amplifier;
                part.point = stage.point;
            }
            None => return Trial::Rebuild,
        }
        for l in spec {
            let f = gain_frequency(&l.figure).unwrap_or_default();
            match self.gain(f) {
                Some(z) => out.push(z.and_then(|z| gain_figure(&l.figure, z)).ok()),
                None => return Trial::Rebuild,
            }
        }
        Trial::Done
    }

    /// H(f) as `gain_sweep` gives it (its sample checked as there), or `None`
    /// when the stored pattern does not hold.
    fn gain(&mut self, f: f64) -> Option<CircuitResult<Complex64>> {
        match self.solver.solve_into(&self.circuit, f, &mut self.x) {
            Ok(true) => {
                let h = node_voltage(&self.x, self.output) - node_voltage(&self.x, 0);
                Some(checked_sample("gain", f, h).map(|(z, _)| z))
            }
            Ok(false) => None,
            Err(e) => Some(Err(e)),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::tolerance::Tolerance;
    use crate::network::montecarlo::Draws;
    use crate::stage::{Amplifier, Spread, SpreadPoint, Stage, StageKind, StageParts};
    use crate::tolerance::figures::Figure;
    use crate::tolerance::montecarlo::{draw, rebuilt_figures};
    use crate::tolerance::parts::{AmplifierSpread, PartSpread};

    fn tol(stage: &Stage, parts: &[&'static str]) -> TolStage {
        let spreads: Vec<PartSpread> = parts
            .iter()
            .enumerate()
            .map(|(i, &part)| PartSpread {
                part,
                // Alternate the draws so both the uniform and the screened
                // normal paths feed the trials.
                tolerance: Some(if i % 2 == 0 {
                    Tolerance::Uniform { percent: 5.0 }
                } else {
                    Tolerance::Normal {
                        percent: 10.0,
                        sigmas: 3.0,
                    }
                }),
                tempco_ppm: Some(100.0 * (i as f64 + 1.0)),
            })
            .collect();
        let amp = AmplifierSpread {
            gbw_hz: Some(Spread {
                min: 0.5e7,
                typ: 1e7,
                max: 1.5e7,
            }),
            ro: Some(Spread {
                min: 20.0,
                typ: 50.0,
                max: 100.0,
            }),
        };
        TolStage::new(stage, &spreads, amp, [-40.0, 85.0]).unwrap()
    }

    fn amplifier() -> Amplifier {
        Amplifier::from_gbw(
            Spread {
                min: 5e4,
                typ: 2e5,
                max: 1e6,
            },
            1e7,
        )
        .with_ro(50.0)
    }

    fn spec() -> Vec<Limit> {
        let l = |figure| Limit {
            figure,
            lower: None,
            upper: None,
        };
        alloc::vec![
            l(Figure::GainDb { freq_hz: 0.0 }),
            l(Figure::GainDb { freq_hz: 1e5 }),
            l(Figure::PhaseDeg { freq_hz: 3e5 }),
            l(Figure::GainErrorPercent {
                freq_hz: 2e4,
                target: -48.0
            }),
        ]
    }

    /// The fast path gives the rebuild path's figures, bit for bit, on every
    /// trial (the rebuild path is the reference: the stage and circuit built
    /// from the trial's values, solved by a fresh sweeper).
    #[test]
    fn fast_path_equals_the_rebuild_on_every_trial() {
        let stages = [
            (
                Stage {
                    kind: StageKind::NonInverting,
                    amplifier: amplifier(),
                    point: SpreadPoint::Typ,
                    parts: StageParts {
                        rf: Some(47e3),
                        rg: Some(1e3),
                        cf: Some(10e-12),
                        rs: Some(50.0),
                        rl: Some(2e3),
                        cl: Some(100e-12),
                        riso: Some(20.0),
                        ..StageParts::default()
                    },
                },
                ["rf", "rg", "cf", "rs", "rl", "cl", "riso"].as_slice(),
            ),
            (
                Stage {
                    kind: StageKind::Inverting,
                    amplifier: amplifier(),
                    point: SpreadPoint::Typ,
                    parts: StageParts {
                        rf: Some(48e3),
                        rg: Some(1e3),
                        cs: Some(1e-9),
                        rs: Some(600.0),
                        rl: Some(10e3),
                        ..StageParts::default()
                    },
                },
                ["rf", "rg", "cs", "rs"].as_slice(),
            ),
            (
                Stage {
                    kind: StageKind::Transimpedance,
                    amplifier: amplifier(),
                    point: SpreadPoint::Typ,
                    parts: StageParts {
                        rf: Some(100e3),
                        cf: Some(2e-12),
                        cs: Some(20e-12),
                        ..StageParts::default()
                    },
                },
                ["rf", "cf", "cs"].as_slice(),
            ),
        ];
        let spec = spec();
        for (stage, parts) in &stages {
            let ts = tol(stage, parts);
            let temps = ts.temperatures();
            let mut fast: Vec<GainTrials> = temps
                .iter()
                .map(|&t| {
                    let b = ts.stage_at(&ts.nominal(), t).unwrap().circuit().unwrap();
                    GainTrials::new(&b, &spec).expect("a voltage-output stage, gain figures")
                })
                .collect();
            let mut d = Draws::new(7);
            let (mut values, mut a, mut b) = (Vec::new(), Vec::new(), Vec::new());
            for trial in 0..300 {
                draw(&ts, &mut d, &mut values);
                for (&t, g) in temps.iter().zip(&mut fast) {
                    assert!(matches!(
                        g.figures(&ts, &values, t, &spec, &mut a),
                        Trial::Done
                    ));
                    rebuilt_figures(&ts, &values, t, &spec, None, &mut b);
                    let bits = |v: &[Option<f64>]| -> Vec<Option<u64>> {
                        v.iter().map(|y| y.map(f64::to_bits)).collect()
                    };
                    assert_eq!(
                        bits(&a),
                        bits(&b),
                        "{:?} trial {trial} at {t} °C",
                        stage.kind
                    );
                    assert!(a.iter().all(Option::is_some));
                }
            }
        }
    }

    /// A spec with a figure that is not read from the gain alone, and a
    /// current-output stage, take the full path.
    #[test]
    fn other_figures_and_current_outputs_take_the_full_path() {
        let stage = Stage {
            kind: StageKind::NonInverting,
            amplifier: amplifier(),
            point: SpreadPoint::Typ,
            parts: StageParts {
                rf: Some(47e3),
                rg: Some(1e3),
                ..StageParts::default()
            },
        };
        let b = stage.circuit().unwrap();
        let mut s = spec();
        assert!(GainTrials::new(&b, &s).is_some());
        s.push(Limit {
            figure: Figure::BandwidthHz,
            lower: None,
            upper: None,
        });
        assert!(GainTrials::new(&b, &s).is_none());
        let gm = Stage {
            kind: StageKind::Transconductance,
            parts: StageParts {
                rg: Some(100.0),
                rl: Some(1e3),
                ..StageParts::default()
            },
            ..stage
        };
        assert!(GainTrials::new(&gm.circuit().unwrap(), &spec()).is_none());
    }
}
