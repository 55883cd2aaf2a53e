//! The loop of a stage's circuit against tests/reference/stage_loop.py
//! (python-control's crossings polished on sympy's exact loop gain, scipy's
//! closed-loop poles, a brute-force encirclement count on 400 000 points) →
//! tests/reference/data/stage_loop.json. Eleven stages: the nine of
//! stage_sympy.py and two unstable ones. Run with `--nocapture` for the
//! deviations reached and the table of the transimpedance and capacitive-load
//! stages.

use loopwright::freq::{Margins, Verdict};
use loopwright::stage::margins::circuit_margins;
use loopwright::stage::nyquist::circuit_nyquist;
use loopwright::stage::poles::circuit_poles;
use loopwright::stage::read_stage;
use serde::Deserialize;

/// Crossing frequencies: both sides refine on the same T to 1e-12 (Rust's
/// Brent) and 1e-15 (brentq on the 30-digit loop gain); the nodal solve's
/// rounding (1e-15 relative on T, measured in tests/stage_reference.rs) moves
/// a crossing by less than that over the slope of ln|T|. 1e-9 leaves room.
const FREQ_REL: f64 = 1e-9;
/// Margins, degrees or dB: the phase at a crossing moves by its slope times
/// the frequency error above, far below 1e-6.
const MARGIN_ABS: f64 = 1e-6;
/// Least distance |1 + T|: golden section in Rust to 1e-13 in ln f, bounded
/// minimisation in Python to 1e-12; at a minimum the value is flat to second
/// order, so both agree to about 1e-12 relative.
const DISTANCE_REL: f64 = 1e-9;
/// The frequency of the least distance: flat minimum, so only the square root
/// of the value's agreement (1e-12 → 1e-6) is meaningful; 1e-4 with room.
const DISTANCE_FREQ_REL: f64 = 1e-4;
/// Poles against scipy.linalg.eig of the descriptor form (double precision,
/// itself within 1e-6 of sympy's roots, checked by stage_sympy.py).
const POLE_REL: f64 = 1e-6;

#[derive(Deserialize)]
struct Case {
    label: String,
    stage: serde_json::Value,
    gain_crossings: Vec<(f64, f64, bool)>,
    phase_crossings: Vec<(f64, f64, bool)>,
    phase_margin_deg: Option<f64>,
    crossover_hz: Option<f64>,
    gain_margin_db: Option<f64>,
    least_distance: (f64, f64),
    clockwise: i64,
    open_loop_rhp_poles: u32,
    closed_loop_rhp_poles: i64,
    stable: bool,
    poles: Vec<(f64, f64)>,
}

#[derive(Deserialize)]
struct Reference {
    cases: Vec<Case>,
}

fn reference() -> Reference {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/data/stage_loop.json"
    );
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

fn rel(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs().max(f64::MIN_POSITIVE)
}

fn check_margins(c: &Case, m: &Margins) -> (f64, f64) {
    assert_eq!(
        m.gain_crossings.len(),
        c.gain_crossings.len(),
        "{}",
        c.label
    );
    assert_eq!(
        m.phase_crossings.len(),
        c.phase_crossings.len(),
        "{}",
        c.label
    );
    let (mut e_f, mut e_m): (f64, f64) = (0.0, 0.0);
    let pairs = m
        .gain_crossings
        .iter()
        .zip(&c.gain_crossings)
        .chain(m.phase_crossings.iter().zip(&c.phase_crossings));
    for (got, &(f, margin, rising)) in pairs {
        e_f = e_f.max(rel(got.freq_hz, f));
        e_m = e_m.max((got.margin - margin).abs());
        assert_eq!(got.rising, rising, "{}: {got:?}", c.label);
    }
    for (got, want) in [
        (m.phase_margin_deg, c.phase_margin_deg),
        (m.gain_margin_db, c.gain_margin_db),
    ] {
        match (got, want) {
            (Some(g), Some(w)) => e_m = e_m.max((g - w).abs()),
            (g, w) => assert_eq!(g, w, "{}", c.label),
        }
    }
    (e_f, e_m)
}

#[test]
fn eleven_stage_loops_match_the_reference() {
    let r = reference();
    assert_eq!(r.cases.len(), 11);
    let mut table = Vec::new();
    for c in &r.cases {
        let b = read_stage(&c.stage.to_string()).unwrap().circuit().unwrap();
        let m = circuit_margins(&b.circuit, "U1").unwrap();
        let (e_f, e_m) = check_margins(c, &m);
        let n = circuit_nyquist(&b.circuit, "U1").unwrap();
        let e = n.encirclements;
        assert_eq!(
            (e.clockwise, e.open_loop_rhp_poles, e.closed_loop_rhp_poles),
            (c.clockwise, c.open_loop_rhp_poles, c.closed_loop_rhp_poles),
            "{}",
            c.label
        );
        let want = if c.stable {
            Verdict::Stable
        } else {
            Verdict::Unstable
        };
        assert_eq!(e.verdict, want, "{}", c.label);
        assert_eq!(m.closed_loop, want, "{}", c.label);
        let e_d = rel(n.least_distance.distance, c.least_distance.0);
        let e_df = rel(n.least_distance.freq_hz, c.least_distance.1);
        let p = circuit_poles(&b.circuit).unwrap();
        assert_eq!(p.poles.len(), c.poles.len(), "{}", c.label);
        let e_p = p
            .poles
            .iter()
            .zip(&c.poles)
            .map(|(g, w)| (g.re - w.0).hypot(g.im - w.1) / w.0.hypot(w.1))
            .fold(0.0, f64::max);
        println!(
            "{}: crossings {e_f:.1e}, margins {e_m:.1e} deg/dB, |1+T| {e_d:.1e} at {e_df:.1e}, poles {e_p:.1e}",
            c.label
        );
        assert!(e_f < FREQ_REL, "{}: crossing frequency {e_f}", c.label);
        assert!(e_m < MARGIN_ABS, "{}: margin {e_m}", c.label);
        assert!(e_d < DISTANCE_REL, "{}: least distance {e_d}", c.label);
        assert!(
            e_df < DISTANCE_FREQ_REL,
            "{}: its frequency {e_df}",
            c.label
        );
        assert!(e_p < POLE_REL, "{}: poles {e_p}", c.label);
        if c.label.starts_with("transimpedance") || c.label.contains("capacitive load") {
            table.push((c, m, p));
        }
    }
    println!("\n| stage | PM deg (ref) | fc Hz (ref) | GM dB (ref) | dominant closed-loop poles rad/s (ref) |");
    println!("|---|---|---|---|---|");
    for (c, m, p) in table {
        let show = |x: Option<f64>| x.map_or("—".to_string(), |v| format!("{v:.4}"));
        let slow = p
            .poles
            .iter()
            .zip(&c.poles)
            .take(2)
            .map(|(g, w)| format!("{:.5e}{:+.5e}j ({:.5e}{:+.5e}j)", g.re, g.im, w.0, w.1))
            .collect::<Vec<_>>()
            .join("; ");
        println!(
            "| {} | {} ({}) | {} ({}) | {} ({}) | {} |",
            c.label,
            show(m.phase_margin_deg),
            show(c.phase_margin_deg),
            show(m.crossover_hz),
            show(c.crossover_hz),
            show(m.gain_margin_db),
            show(c.gain_margin_db),
            slow
        );
    }
}
