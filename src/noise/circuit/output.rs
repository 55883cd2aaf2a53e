//! The output as a linear combination of the nodal unknowns: y = cᵀ·x with
//! c = c0 + s·c1 (s = j·2π·f), the vector the adjoint system is solved for.
//!
//! A voltage V(plus) − V(minus) selects two node unknowns. An element's current
//! follows the element rules of `docs/circuit.md`: (V(a) − V(b))/R for a
//! resistor, s·C·(V(a) − V(b)) for a capacitor, Y·(V(a) − V(b)) for an
//! admittance, the branch unknown of a source, inductor, VCVS or CCVS,
//! gm·(V(c+) − V(c−)) for a VCCS, k·I(control) for a CCCS, and for an
//! amplifier the current into its output, (V(out) − V(ref) − y)/Ro (its branch
//! unknown when Ro = 0).

use super::setup::NoiseOutput;
use crate::circuit::amplifier_stamp;
use crate::circuit::mna::Layout;
use crate::circuit::{Circuit, CircuitError, CircuitResult, Control, ElementKind};
use crate::error::Error;
use alloc::vec::Vec;
use num_complex::Complex64;

/// c = c0 + s·c1.
pub(crate) struct Selector {
    pub c0: Vec<Complex64>,
    pub c1: Vec<f64>,
}

impl Selector {
    /// c at s = j·ω.
    pub fn at(&self, w: f64) -> Vec<Complex64> {
        self.c0
            .iter()
            .zip(&self.c1)
            .map(|(a, b)| Complex64::new(a.re, a.im + w * b))
            .collect()
    }
}

fn unknown_output(error: CircuitError, expected: &'static str) -> CircuitError {
    CircuitError::new(
        Error::UnknownName {
            param: "output",
            expected,
        },
        error.name,
    )
}

/// The selector of `output` in the circuit's layout.
///
/// # Errors
/// A node or element that does not exist (`unknown_name`, param `output`); the
/// current of a current source (its value: no noise reaches it).
pub(crate) fn selector(c: &Circuit, lay: &Layout, output: &NoiseOutput) -> CircuitResult<Selector> {
    let mut s = Selector {
        c0: alloc::vec![Complex64::default(); lay.size],
        c1: alloc::vec![0.0; lay.size],
    };
    let mut put = |k: Option<usize>, v: Complex64, dv: f64| {
        if let Some(k) = k {
            if let Some(x) = s.c0.get_mut(k) {
                *x += v;
            }
            if let Some(x) = s.c1.get_mut(k) {
                *x += dv;
            }
        }
    };
    let row = |n: usize| n.checked_sub(1);
    match output {
        NoiseOutput::Voltage { plus, minus } => {
            let nodes = "the name of a node of the circuit";
            let p = c.node_index(plus).map_err(|e| unknown_output(e, nodes))?;
            let m = c.node_index(minus).map_err(|e| unknown_output(e, nodes))?;
            put(row(p), Complex64::new(1.0, 0.0), 0.0);
            put(row(m), Complex64::new(-1.0, 0.0), 0.0);
        }
        NoiseOutput::Current { element } => {
            let i = c
                .element_index(element)
                .map_err(|e| unknown_output(e, "the name of an element of the circuit"))?;
            let e = c.elements().get(i).ok_or(CircuitError::named(
                Error::Missing { param: "output" },
                element,
            ))?;
            let [a, b] = e.nodes();
            let (ra, rb) = (row(a), row(b));
            let mut across = |y: Complex64, dy: f64| {
                put(ra, y, dy);
                put(rb, -y, -dy);
            };
            let k = e.value();
            let branch_of = |j: Option<usize>| j.and_then(|j| lay.branch.get(j).copied().flatten());
            match e.kind() {
                ElementKind::Resistor => across(Complex64::new(1.0 / k, 0.0), 0.0),
                ElementKind::Capacitor => across(Complex64::default(), k),
                ElementKind::Admittance => across(Complex64::new(k, e.value_im()), 0.0),
                ElementKind::CurrentSource => {
                    return Err(CircuitError::named(
                        Error::OutOfDomain {
                            param: "output",
                            requirement: "the current of a current source is its own value: no noise of the circuit reaches it; choose a node or another element",
                        },
                        element,
                    ))
                }
                ElementKind::Vccs => {
                    if let Control::Nodes([p, n]) = e.control() {
                        put(row(p), Complex64::new(k, 0.0), 0.0);
                        put(row(n), Complex64::new(-k, 0.0), 0.0);
                    }
                }
                ElementKind::Cccs => put(
                    branch_of(lay.control.get(i).copied().flatten()),
                    Complex64::new(k, 0.0),
                    0.0,
                ),
                ElementKind::Amplifier => {
                    if let (Some(part), Some(first)) =
                        (e.amplifier(), lay.internal.get(i).copied().flatten())
                    {
                        match amplifier_stamp::branch_unknown(part, first) {
                            Some(br) => put(Some(br), Complex64::new(1.0, 0.0), 0.0),
                            None => {
                                let g = 1.0 / part.model.ro;
                                across(Complex64::new(g, 0.0), 0.0);
                                let y = amplifier_stamp::output_unknown(part, first);
                                put(Some(y), Complex64::new(-g, 0.0), 0.0);
                            }
                        }
                    }
                }
                _ => put(branch_of(Some(i)), Complex64::new(1.0, 0.0), 0.0),
            }
        }
    }
    Ok(s)
}
