//! The amplifier element in the nodal equations: its frequency dependence
//! realised as internal state, so that the system stays (G + s·C)·x = b.
//!
//! Each factor of A(s) ([`crate::stage::amplifier`]) becomes one or two extra
//! unknowns with one equation each, fed by the signal before it (u):
//! - the dominant pole: (1 + s·τp)·x − A0·(V(+) − V(−)) = 0, τp = 1/ωp;
//! - a further real pole: (1 + s·τ)·x − u = 0;
//! - a complex pole pair: q − (s/ω0)·p = 0 and p + (s/(Q·ω0))·p + (s/ω0)·q − u = 0,
//!   so p = u / (1 + s/(Q·ω0) + s²/ω0²);
//! - a left-half-plane zero: z − u − s·τz·u = 0 (right-half-plane: + s·τz·u);
//! - a complex zero pair: w − (s/ω0)·u = 0 and z − u − (s/(Q·ω0))·u − (s/ω0)·w = 0.
//!
//! The last signal y = A(s)·(V(+) − V(−)) drives the output: with Ro > 0 as a
//! Norton source, the current (V(out) − V(ref) − y)/Ro flowing into `out`
//! and back out of `ref`; with Ro = 0 as a voltage source with its own branch
//! current. The input parts are plain admittances: Rd and s·Cd between the
//! inputs, 1/Rcm and s·Ccm from each input to ground.
//!
//! Every stamp is constant or proportional to s, so the fast sweep (one
//! assembly of G and C) and the generalized eigenvalues of the circuit's
//! poles see the amplifier's poles and zeros as the circuit's own. The
//! realisation is exact: the tests check it against the direct product.
//! Source: the state-variable (companion) realisation of a transfer function
//! as a cascade of first- and second-order sections, e.g. Vlach & Singhal,
//! *Computer Methods for Circuit Analysis and Design*, 2nd ed., ch. 4 (from memory).

use super::netlist::AmplifierPart;
use alloc::vec::Vec;
use core::f64::consts::TAU;
use num_complex::Complex64;

/// A stamp target: add `v` at (row, column); `None` is ground (no row or column).
pub(crate) type Add<'a> = &'a mut dyn FnMut(Option<usize>, Option<usize>, Complex64);

/// Internal unknowns of an amplifier: its states, plus a branch current when
/// its output resistance is zero.
pub(crate) fn internal_unknowns(part: &AmplifierPart) -> usize {
    state_count(part) + usize::from(part.model.ro == 0.0)
}

fn state_count(part: &AmplifierPart) -> usize {
    let m = &part.model;
    1 + m.poles_hz.len()
        + m.zeros_hz.len()
        + m.rhp_zeros_hz.len()
        + 2 * m.complex_poles.len()
        + 2 * m.complex_zeros.len()
}

/// Where the amplifier sits in the unknown vector (node rows: `None` = ground).
pub(crate) struct Terminals {
    /// Output node and its reference.
    pub out: [Option<usize>; 2],
    /// The + and − inputs.
    pub inputs: [Option<usize>; 2],
    /// First internal unknown.
    pub first: usize,
}

/// A linear combination of unknowns: the signal fed to the next section.
type Signal = Vec<(Option<usize>, f64)>;

/// Stamp the amplifier at s = jω; `rhs` gets the test value when it is opened.
pub(crate) fn stamp(
    part: &AmplifierPart,
    t: &Terminals,
    s: Complex64,
    add: Add<'_>,
    rhs: &mut [Complex64],
) {
    stamp_inputs(part, t, s, add);
    let y = stamp_chain(part, t, s, add);
    stamp_output(part, t, &y, add, rhs);
}

fn admittance(p: Option<usize>, n: Option<usize>, y: Complex64, add: Add<'_>) {
    add(p, p, y);
    add(n, n, y);
    add(p, n, -y);
    add(n, p, -y);
}

fn stamp_inputs(part: &AmplifierPart, t: &Terminals, s: Complex64, add: Add<'_>) {
    let m = &part.model;
    let [p, n] = t.inputs;
    let mut yd = s * m.cd;
    if let Some(rd) = m.rd {
        yd += 1.0 / rd;
    }
    if yd != Complex64::new(0.0, 0.0) {
        admittance(p, n, yd, add);
    }
    let mut ycm = s * m.ccm;
    if let Some(rcm) = m.rcm {
        ycm += 1.0 / rcm;
    }
    if ycm != Complex64::new(0.0, 0.0) {
        admittance(p, None, ycm, add);
        admittance(n, None, ycm, add);
    }
}

/// The cascade of sections; returns the output signal y.
fn stamp_chain(part: &AmplifierPart, t: &Terminals, s: Complex64, add: Add<'_>) -> Signal {
    let m = &part.model;
    let one = Complex64::new(1.0, 0.0);
    let mut next = t.first;
    let mut take = || {
        next += 1;
        Some(next - 1)
    };
    let feed = |row: Option<usize>, u: &Signal, k: Complex64, add: Add<'_>| {
        for &(col, c) in u {
            add(row, col, k * c);
        }
    };
    let [p, n] = t.inputs;
    let a0 = m.a0.at(part.point);
    // Validated with the element: the pole is finite and positive.
    let fp = m.dominant_pole_at(part.point).unwrap_or(1.0);
    let x = take();
    add(x, x, one + s / (TAU * fp));
    feed(
        x,
        &alloc::vec![(p, 1.0), (n, -1.0)],
        -Complex64::from(a0),
        add,
    );
    let mut u: Signal = alloc::vec![(x, 1.0)];
    for &fk in &m.poles_hz {
        let x = take();
        add(x, x, one + s / (TAU * fk));
        feed(x, &u, -one, add);
        u = alloc::vec![(x, 1.0)];
    }
    for pair in &m.complex_poles {
        let w0 = TAU * pair.freq_hz;
        // q first, so that p (the section's output) is the last unknown.
        let (q, pp) = (take(), take());
        add(q, q, one);
        add(q, pp, -s / w0);
        add(pp, pp, one + s / (pair.q * w0));
        add(pp, q, s / w0);
        feed(pp, &u, -one, add);
        u = alloc::vec![(pp, 1.0)];
    }
    for (list, sign) in [(&m.zeros_hz, -1.0), (&m.rhp_zeros_hz, 1.0)] {
        for &fz in list {
            let z = take();
            add(z, z, one);
            feed(z, &u, -one + sign * s / (TAU * fz), add);
            u = alloc::vec![(z, 1.0)];
        }
    }
    for pair in &m.complex_zeros {
        let w0 = TAU * pair.freq_hz;
        let (w, z) = (take(), take());
        add(w, w, one);
        feed(w, &u, -s / w0, add);
        add(z, z, one);
        feed(z, &u, -one - s / (pair.q * w0), add);
        add(z, w, -s / w0);
        u = alloc::vec![(z, 1.0)];
    }
    u
}

fn stamp_output(
    part: &AmplifierPart,
    t: &Terminals,
    y: &Signal,
    add: Add<'_>,
    rhs: &mut [Complex64],
) {
    let [a, b] = t.out;
    let mut to_rhs = |row: Option<usize>, v: f64| {
        if let Some(x) = row.and_then(|r| rhs.get_mut(r)) {
            *x += v;
        }
    };
    let ro = part.model.ro;
    if ro > 0.0 {
        let g = 1.0 / ro;
        admittance(a, b, Complex64::from(g), add);
        match part.test_value {
            Some(u) => {
                to_rhs(a, g * u);
                to_rhs(b, -g * u);
            }
            None => {
                for &(col, c) in y {
                    add(a, col, Complex64::from(-g * c));
                    add(b, col, Complex64::from(g * c));
                }
            }
        }
    } else {
        let br = Some(t.first + state_count(part));
        let one = Complex64::new(1.0, 0.0);
        add(a, br, one);
        add(b, br, -one);
        add(br, a, one);
        add(br, b, -one);
        match part.test_value {
            Some(u) => to_rhs(br, u),
            None => {
                for &(col, c) in y {
                    add(br, col, Complex64::from(-c));
                }
            }
        }
    }
}

/// The output signal y (V) from a solved unknown vector, for the element's current.
pub(crate) fn output_signal(part: &AmplifierPart, first: usize, x: &[Complex64]) -> Complex64 {
    match part.test_value {
        Some(u) => Complex64::from(u),
        None => x
            .get(first + state_count(part) - 1)
            .copied()
            .unwrap_or_default(),
    }
}

/// The unknown holding the output signal y = A(s)·(V(+) − V(−)).
pub(crate) fn output_unknown(part: &AmplifierPart, first: usize) -> usize {
    first + state_count(part) - 1
}

/// The branch current's unknown when Ro = 0.
pub(crate) fn branch_unknown(part: &AmplifierPart, first: usize) -> Option<usize> {
    (part.model.ro == 0.0).then(|| first + state_count(part))
}

#[cfg(test)]
mod tests {
    use crate::circuit::{port_impedance, solve, Circuit};
    use crate::freq::ComplexPair;
    use crate::stage::{Amplifier, Spread, SpreadPoint};
    use core::f64::consts::TAU;
    use num_complex::Complex64;

    /// Every kind of factor, with corners spread over three decades.
    fn model() -> Amplifier {
        let mut a = Amplifier::from_gbw(
            Spread {
                min: 3e4,
                typ: 1e5,
                max: 4e5,
            },
            5e6,
        )
        .with_pole(2e7)
        .with_complex_pole(4e7, 1.5);
        a.zeros_hz.push(6e7);
        a.rhp_zeros_hz.push(2e8);
        a.complex_zeros.push(ComplexPair {
            freq_hz: 9e7,
            q: 0.6,
        });
        a
    }

    #[test]
    fn the_state_realisation_equals_the_direct_product() {
        // Identity: the nodal solution with the states must equal A(jω)
        // evaluated as a product (Amplifier::open_loop_gain), to rounding.
        for point in SpreadPoint::ALL {
            for ro in [0.0, 50.0] {
                let mut c = Circuit::new();
                c.voltage_source("Vs", "p", "0", 1.0).unwrap();
                c.resistor("Rn", "n", "0", 1.0).unwrap();
                c.amplifier("U1", "o", "0", "p", "n", model().with_ro(ro), point)
                    .unwrap();
                c.resistor("Rl", "o", "0", 150.0).unwrap();
                for f in [0.0, 1.0, 3e3, 1e6, 4e7, 1.5e8, 1e9] {
                    let v = solve(&c, f).unwrap().voltage("o").unwrap();
                    let want = model().open_loop_gain(f, point).unwrap() * (150.0 / (150.0 + ro));
                    assert!(
                        (v - want).norm() <= 1e-11 * want.norm(),
                        "{point:?} ro={ro} f={f}: {v} vs {want}"
                    );
                }
            }
        }
    }

    #[test]
    fn input_parts_and_output_current_follow_the_definitions() {
        let (rd, cd, rcm, ccm) = (2e6, 3e-12, 1e9, 4e-12);
        let a = model()
            .with_input(Some(rd), cd, Some(rcm), ccm)
            .with_ro(75.0);
        let mut c = Circuit::new();
        c.amplifier("U1", "o", "0", "p", "0", a, SpreadPoint::Typ)
            .unwrap();
        c.resistor("Rl", "o", "0", 1e3).unwrap();
        // The − input is ground: the + input sees Rd‖Cd in parallel with Rcm‖Ccm.
        let f = 1e5;
        let w = TAU * f;
        let y = Complex64::new(1.0 / rd + 1.0 / rcm, w * (cd + ccm));
        let z = port_impedance(&c, "p", "0", f).unwrap();
        assert!((z - 1.0 / y).norm() <= 1e-12 * z.norm(), "{z}");
        // Output current: from out through the amplifier, (V(o) − y)/Ro; with
        // Rl the only other path, it is −V(o)/Rl.
        let mut c2 = c.clone();
        c2.voltage_source("Vs", "p", "0", 1e-4).unwrap();
        let s = solve(&c2, 1e3).unwrap();
        let i = s.current("U1").unwrap();
        let vo = s.voltage("o").unwrap();
        assert!((i + vo / 1e3).norm() <= 1e-12 * i.norm(), "{i} {vo}");
    }

    #[test]
    fn the_states_of_all_amplifiers_are_bounded() {
        // 1 + 2·32 + 2·32 = 129 states: one over MAX_AMPLIFIER_STATES.
        let mut a = Amplifier::from_gbw(Spread::fixed(1e5), 1e6);
        for k in 0..32 {
            let f = 1e7 * (1.0 + f64::from(k));
            a = a.with_complex_pole(f, 0.7);
            a.complex_zeros.push(ComplexPair { freq_hz: f, q: 3.0 });
        }
        let mut c = Circuit::new();
        let e = c
            .amplifier("U1", "o", "0", "p", "n", a, SpreadPoint::Typ)
            .unwrap_err();
        assert_eq!(
            (e.error.code(), e.error.param(), e.name.as_str()),
            ("too_large", "model", "U1")
        );
    }

    #[test]
    fn an_input_without_a_dc_path_is_named() {
        // No Rd or Rcm: the + input driven only through a capacitor floats at 0 Hz.
        let mut c = Circuit::new();
        c.voltage_source("Vs", "s", "0", 1.0).unwrap();
        c.capacitor("C1", "s", "p", 1e-9).unwrap();
        c.amplifier("U1", "o", "0", "p", "0", model(), SpreadPoint::Typ)
            .unwrap();
        let e = solve(&c, 0.0).unwrap_err();
        assert_eq!((e.error.code(), e.name.as_str()), ("singular", "p"));
    }
}
