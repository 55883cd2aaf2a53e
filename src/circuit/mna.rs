//! Exact complex modified nodal analysis (MNA) at one frequency.
//!
//! Unknowns: the voltage of every node but ground, then the branch current of
//! every element that carries one (voltage sources, inductors, VCVS, CCVS). Rows:
//! Kirchhoff's current law at each node (sum of currents leaving = 0), then one
//! constitutive equation per branch element. With s = j·2π·f:
//! - resistor G = 1/R, capacitor Y = s·C, admittance Y (fixed): stamped as admittances;
//! - inductor: V(a) − V(b) − s·L·I = 0 (a short at 0 Hz);
//! - voltage source: V(a) − V(b) = value; VCVS: V(a) − V(b) − k·(V(c+) − V(c−)) = 0;
//! - CCVS: V(a) − V(b) − r·I(control) = 0;
//! - current source, VCCS, CCCS: their current leaves node a and enters node b.
//!
//! Source: Ho, Ruehli & Brennan, "The modified nodal approach to network
//! analysis", IEEE Trans. Circuits and Systems, vol. 22, no. 6, 1975 (from memory);
//! the stamps as in Vlach & Singhal, *Computer Methods for Circuit Analysis and
//! Design*, 2nd ed., ch. 4 (from memory).
//!
//! Before the solve the structure is checked, so that the error names the fault:
//! a node with no conducting path to ground (capacitors do not conduct at 0 Hz,
//! current sources never) and a loop made only of voltage-defining elements
//! (voltage sources, VCVS, CCVS, and inductors at 0 Hz). Whatever is still
//! singular is found by the LU ([`super::lu`]) and named by its unknown.

use super::amplifier_stamp::{self, Terminals};
use super::error::{CircuitError, CircuitResult, Name, WithName};
use super::lu::{Lu, NoPivot, Pattern};
use super::netlist::{Circuit, Control, Element, ElementKind, MAX_ELEMENTS};
use crate::check;
use crate::error::Error;
use alloc::vec::Vec;
use core::f64::consts::PI;
use num_complex::Complex64;

/// A named complex value (a node voltage or an element current).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub struct NamedValue {
    /// Node or element name.
    pub name: Name,
    /// Real part.
    pub re: f64,
    /// Imaginary part.
    pub im: f64,
}

impl NamedValue {
    /// The value as a complex number.
    pub fn value(&self) -> Complex64 {
        Complex64::new(self.re, self.im)
    }
}

/// The exact solution of a circuit at one frequency.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Solution {
    /// Frequency, Hz.
    pub frequency_hz: f64,
    /// Voltage of every node against ground, V (ground first, at 0).
    pub node_voltages: Vec<NamedValue>,
    /// Current of every element, from its node a through it to its node b, A.
    pub element_currents: Vec<NamedValue>,
}

impl Solution {
    /// Voltage of a node against ground.
    ///
    /// # Errors
    /// Unknown node name.
    pub fn voltage(&self, node: &str) -> CircuitResult<Complex64> {
        let n = Name::truncated(node);
        if n.is_ground() {
            return Ok(Complex64::new(0.0, 0.0));
        }
        self.node_voltages
            .iter()
            .find(|v| v.name == n)
            .map(NamedValue::value)
            .ok_or(CircuitError::new(
                Error::UnknownName {
                    param: "node",
                    expected: "the name of a node of the circuit",
                },
                n,
            ))
    }

    /// Voltage V(plus) − V(minus).
    ///
    /// # Errors
    /// Unknown node name.
    pub fn voltage_between(&self, plus: &str, minus: &str) -> CircuitResult<Complex64> {
        Ok(self.voltage(plus)? - self.voltage(minus)?)
    }

    /// Current of an element (from its node a through it to its node b).
    ///
    /// # Errors
    /// Unknown element name.
    pub fn current(&self, element: &str) -> CircuitResult<Complex64> {
        let n = Name::truncated(element);
        self.element_currents
            .iter()
            .find(|v| v.name == n)
            .map(NamedValue::value)
            .ok_or(CircuitError::new(
                Error::UnknownName {
                    param: "element",
                    expected: "the name of an element of the circuit",
                },
                n,
            ))
    }
}

/// Angular frequency for a frequency in Hz (finite, ≥ 0).
pub(crate) fn omega(frequency_hz: f64) -> CircuitResult<f64> {
    check::non_negative("frequency", frequency_hz)?;
    Ok(check::result("frequency", 2.0 * PI * frequency_hz)?)
}

/// Small union-find over node indices.
#[derive(Default)]
struct Sets(Vec<usize>);

impl Sets {
    fn new(n: usize) -> Sets {
        Sets((0..n).collect())
    }
    /// As [`Sets::new`], in this storage.
    fn reset(&mut self, n: usize) {
        self.0.clear();
        self.0.extend(0..n);
    }
    fn root(&mut self, mut i: usize) -> usize {
        while let Some(&p) = self.0.get(i) {
            if p == i {
                break;
            }
            let gp = self.0.get(p).copied().unwrap_or(p);
            if let Some(slot) = self.0.get_mut(i) {
                *slot = gp;
            }
            i = p;
        }
        i
    }
    /// Join; false when they were already joined.
    fn join(&mut self, a: usize, b: usize) -> bool {
        let (ra, rb) = (self.root(a), self.root(b));
        if ra == rb {
            return false;
        }
        if let Some(slot) = self.0.get_mut(ra) {
            *slot = rb;
        }
        true
    }
}

/// Index of the element controlling element `i`'s current, checked.
fn control_element(c: &Circuit, name: Name, control: Name) -> CircuitResult<usize> {
    let j = c.element_index(control.as_str()).map_err(|e| {
        CircuitError::new(
            Error::UnknownName {
                param: "controlElement",
                expected: "the name of an element of the circuit that carries a branch current",
            },
            e.name,
        )
    })?;
    let kind = c
        .elements()
        .get(j)
        .map(|e| e.kind())
        .unwrap_or(ElementKind::Resistor);
    if !kind.has_branch() {
        return Err(CircuitError::new(
            Error::OutOfDomain {
                param: "controlElement",
                requirement: "must name a voltage source, inductor, VCVS or CCVS (an element with its own branch current)",
            },
            name,
        ));
    }
    Ok(j)
}

/// The structure of the MNA system of a circuit.
#[derive(Debug, Default, PartialEq, Eq)]
pub(crate) struct Layout {
    /// Node unknowns (nodes but ground).
    pub nodes: usize,
    /// Branch unknown index (absolute row/column) per element, for branch elements.
    pub branch: Vec<Option<usize>>,
    /// Controlling element per element, for CCVS and CCCS.
    pub control: Vec<Option<usize>>,
    /// First internal unknown per element, for amplifiers (their states).
    pub internal: Vec<Option<usize>>,
    /// Total unknowns.
    pub size: usize,
}

pub(crate) fn layout(c: &Circuit) -> CircuitResult<Layout> {
    let mut lay = Layout {
        nodes: 0,
        branch: Vec::with_capacity(c.elements().len()),
        control: Vec::with_capacity(c.elements().len()),
        internal: Vec::with_capacity(c.elements().len()),
        size: 0,
    };
    layout_into(c, &mut lay)?;
    Ok(lay)
}

/// [`layout`] into the storage of `lay`.
fn layout_into(c: &Circuit, lay: &mut Layout) -> CircuitResult<()> {
    let nodes = c.nodes().len().saturating_sub(1);
    let mut next = nodes;
    let (branch, control, internal) = (&mut lay.branch, &mut lay.control, &mut lay.internal);
    branch.clear();
    control.clear();
    internal.clear();
    for e in c.elements() {
        branch.push(if e.kind().has_branch() {
            next += 1;
            Some(next - 1)
        } else {
            None
        });
        control.push(match e.control() {
            Control::Element(n) => Some(control_element(c, e.name(), n)?),
            _ => None,
        });
    }
    for e in c.elements() {
        internal.push(e.amplifier().map(|part| {
            next += amplifier_stamp::internal_unknowns(part);
            next - amplifier_stamp::internal_unknowns(part)
        }));
    }
    lay.nodes = nodes;
    lay.size = next;
    Ok(())
}

/// Check for floating nodes and loops of voltage-defining elements.
fn check_structure(c: &Circuit, w: f64) -> CircuitResult<()> {
    let n = c.nodes().len();
    check_structure_in(c, w, &mut Sets::new(n), &mut Sets::new(n))
}

/// [`check_structure`] with the union-find storage given (reset here).
fn check_structure_in(
    c: &Circuit,
    w: f64,
    conducting: &mut Sets,
    voltage: &mut Sets,
) -> CircuitResult<()> {
    let n = c.nodes().len();
    conducting.reset(n);
    voltage.reset(n);
    for e in c.elements() {
        let [a, b] = e.nodes();
        if let (Some(part), Control::Nodes([p, n])) = (e.amplifier(), e.control()) {
            let m = &part.model;
            if m.rd.is_some() || (m.cd > 0.0 && w > 0.0) {
                conducting.join(p, n);
            }
            if m.rcm.is_some() || (m.ccm > 0.0 && w > 0.0) {
                conducting.join(p, 0);
                conducting.join(n, 0);
            }
        }
        let conducts = match e.kind() {
            ElementKind::CurrentSource => false,
            ElementKind::Capacitor => w > 0.0,
            ElementKind::Admittance => e.value() != 0.0 || e.value_im() != 0.0,
            _ => true,
        };
        if conducts {
            conducting.join(a, b);
        }
        let defines_voltage = match e.kind() {
            ElementKind::VoltageSource | ElementKind::Vcvs | ElementKind::Ccvs => true,
            ElementKind::Amplifier => e.amplifier().is_some_and(|p| p.model.ro == 0.0),
            ElementKind::Inductor => w == 0.0,
            _ => false,
        };
        if defines_voltage && !voltage.join(a, b) {
            return Err(CircuitError::new(
                Error::Singular {
                    param: "element",
                    reason: "closes a loop of voltage sources (or inductors at 0 Hz), so the loop current is undetermined",
                },
                e.name(),
            ));
        }
    }
    let ground = conducting.root(0);
    for (i, name) in c.nodes().iter().enumerate().skip(1) {
        if conducting.root(i) != ground {
            return Err(CircuitError::new(
                Error::Singular {
                    param: "node",
                    reason: "floating: no conducting path to ground at this frequency (capacitors are open at 0 Hz, current sources always)",
                },
                *name,
            ));
        }
    }
    Ok(())
}

/// Assemble the MNA matrix and right-hand side at angular frequency `w`.
pub(crate) fn assemble(c: &Circuit, lay: &Layout, w: f64) -> (Vec<Complex64>, Vec<Complex64>) {
    let (mut m, mut rhs) = (Vec::new(), Vec::new());
    assemble_into(c, lay, w, &mut m, &mut rhs);
    (m, rhs)
}

/// [`assemble`] into `m` and `rhs` (cleared and resized), reusing their storage.
fn assemble_into(
    c: &Circuit,
    lay: &Layout,
    w: f64,
    m: &mut Vec<Complex64>,
    rhs: &mut Vec<Complex64>,
) {
    assemble_with(c, lay, w, m, rhs, true);
}

/// [`assemble_into`]; with `sources` false, every independent source is taken
/// at value 0 (as `Circuit::zero_sources` would set it).
fn assemble_with(
    c: &Circuit,
    lay: &Layout,
    w: f64,
    m: &mut Vec<Complex64>,
    rhs: &mut Vec<Complex64>,
    sources: bool,
) {
    let size = lay.size;
    m.clear();
    m.resize(size * size, Complex64::new(0.0, 0.0));
    rhs.clear();
    rhs.resize(size, Complex64::new(0.0, 0.0));
    // Node k (k ≥ 1) is unknown k − 1; ground has no row or column.
    let idx = |node: usize| node.checked_sub(1);
    let mut add = |r: Option<usize>, col: Option<usize>, v: Complex64| {
        if let (Some(r), Some(col)) = (r, col) {
            if let Some(x) = m.get_mut(r * size + col) {
                *x += v;
            }
        }
    };
    let s = Complex64::new(0.0, w);
    let one = Complex64::new(1.0, 0.0);
    for (i, e) in c.elements().iter().enumerate() {
        let [a, b] = e.nodes();
        let (ra, rb) = (idx(a), idx(b));
        let br = lay.branch.get(i).copied().flatten();
        let admittance =
            |y: Complex64, add: &mut dyn FnMut(Option<usize>, Option<usize>, Complex64)| {
                add(ra, ra, y);
                add(rb, rb, y);
                add(ra, rb, -y);
                add(rb, ra, -y);
            };
        let k = Complex64::new(source_value(e, sources), 0.0);
        match e.kind() {
            ElementKind::Amplifier => {
                if let (Some(part), Control::Nodes([p, n]), Some(first)) = (
                    e.amplifier(),
                    e.control(),
                    lay.internal.get(i).copied().flatten(),
                ) {
                    let t = Terminals {
                        out: [ra, rb],
                        inputs: [idx(p), idx(n)],
                        first,
                    };
                    amplifier_stamp::stamp(part, &t, s, &mut add, rhs);
                }
            }
            ElementKind::Resistor => admittance(one / k, &mut add),
            ElementKind::Capacitor => admittance(s * k, &mut add),
            ElementKind::Admittance => {
                admittance(Complex64::new(e.value(), e.value_im()), &mut add)
            }
            ElementKind::CurrentSource => {
                // Current leaves a: −value on a's right side, +value on b's.
                if let Some(r) = ra {
                    if let Some(x) = rhs.get_mut(r) {
                        *x -= k;
                    }
                }
                if let Some(r) = rb {
                    if let Some(x) = rhs.get_mut(r) {
                        *x += k;
                    }
                }
            }
            ElementKind::Vccs | ElementKind::Cccs => {
                let (cp, cn) = match (e.control(), lay.control.get(i).copied().flatten()) {
                    (Control::Nodes([p, n]), _) => (idx(p), idx(n)),
                    (_, Some(j)) => (lay.branch.get(j).copied().flatten(), None),
                    _ => (None, None),
                };
                add(ra, cp, k);
                add(ra, cn, -k);
                add(rb, cp, -k);
                add(rb, cn, k);
            }
            ElementKind::VoltageSource
            | ElementKind::Inductor
            | ElementKind::Vcvs
            | ElementKind::Ccvs => {
                // KCL: the branch current leaves a and enters b.
                add(ra, br, one);
                add(rb, br, -one);
                // Branch equation: V(a) − V(b) − (…) = rhs.
                add(br, ra, one);
                add(br, rb, -one);
                match e.kind() {
                    ElementKind::VoltageSource => {
                        if let Some(x) = br.and_then(|r| rhs.get_mut(r)) {
                            *x += k;
                        }
                    }
                    ElementKind::Inductor => add(br, br, -(s * k)),
                    ElementKind::Vcvs => {
                        if let Control::Nodes([p, n]) = e.control() {
                            add(br, idx(p), -k);
                            add(br, idx(n), k);
                        }
                    }
                    _ => {
                        let cb = lay
                            .control
                            .get(i)
                            .copied()
                            .flatten()
                            .and_then(|j| lay.branch.get(j).copied().flatten());
                        add(br, cb, -k);
                    }
                }
            }
        }
    }
}

/// Solve the circuit exactly at `frequency_hz`.
///
/// # Errors
/// `frequency` negative or not finite; a floating node (param `node`, named); a
/// loop of voltage sources (param `element`, named); an unknown or unsuitable
/// control element (param `controlElement`); any other singular system
/// ([`Error::Singular`] naming the node or branch element whose unknown has no
/// pivot); results that overflow ([`Error::Overflow`]).
///
/// # Example
/// ```
/// use loopwright::circuit::{solve, Circuit};
/// let mut c = Circuit::new();
/// c.voltage_source("V1", "in", "0", 10.0).unwrap();
/// c.resistor("R1", "in", "out", 3e3).unwrap();
/// c.resistor("R2", "out", "0", 1e3).unwrap();
/// let s = solve(&c, 0.0).unwrap();
/// assert!((s.voltage("out").unwrap().re - 2.5).abs() < 1e-12);
/// // A node reached only through a capacitor floats at 0 Hz.
/// c.capacitor("C1", "out", "x", 1e-9).unwrap();
/// assert_eq!(solve(&c, 0.0).unwrap_err().name.as_str(), "x");
/// ```
pub fn solve(c: &Circuit, frequency_hz: f64) -> CircuitResult<Solution> {
    solve_in(c, frequency_hz, &mut Solves::default())
}

/// [`solve`] in the storage of `solves`, whose factorization is reused when
/// this circuit's matrix is the one it factored last, bit for bit.
pub(crate) fn solve_in(
    c: &Circuit,
    frequency_hz: f64,
    solves: &mut Solves,
) -> CircuitResult<Solution> {
    let w = omega(frequency_hz)?;
    let x = solves.solve(c, w, Drive::Sources)?;
    let lay = solves.layout();
    let v = |node: usize| {
        node.checked_sub(1)
            .and_then(|i| x.get(i).copied())
            .unwrap_or_default()
    };
    let node_voltages = c
        .nodes()
        .iter()
        .enumerate()
        .map(|(i, &name)| {
            let z = v(i);
            NamedValue {
                name,
                re: z.re,
                im: z.im,
            }
        })
        .collect();
    let s = Complex64::new(0.0, w);
    let mut element_currents = Vec::with_capacity(c.elements().len());
    for (i, e) in c.elements().iter().enumerate() {
        let current = element_current(e, i, lay, &x, s, true);
        let current = check::result_complex("current", current).named(e.name())?;
        element_currents.push(NamedValue {
            name: e.name(),
            re: current.re,
            im: current.im,
        });
    }
    Ok(Solution {
        frequency_hz,
        node_voltages,
        element_currents,
    })
}

/// An element's value, or 0 for an independent source when `sources` is false.
fn source_value(e: &Element, sources: bool) -> f64 {
    if !sources && e.kind().is_independent() {
        0.0
    } else {
        e.value()
    }
}

/// The current of element `i` (`e`) from its node a through it to its node b,
/// in the unknowns `x` at s = jω (independent sources at 0 when `sources` is
/// false).
fn element_current(
    e: &Element,
    i: usize,
    lay: &Layout,
    x: &[Complex64],
    s: Complex64,
    sources: bool,
) -> Complex64 {
    let v = |node: usize| {
        node.checked_sub(1)
            .and_then(|i| x.get(i).copied())
            .unwrap_or_default()
    };
    let [a, b] = e.nodes();
    let vab = v(a) - v(b);
    let k = Complex64::new(source_value(e, sources), 0.0);
    let branch_current = |j: Option<usize>| j.and_then(|r| x.get(r).copied()).unwrap_or_default();
    match e.kind() {
        ElementKind::Amplifier => match (e.amplifier(), lay.internal.get(i).copied().flatten()) {
            (Some(part), Some(first)) => match amplifier_stamp::branch_unknown(part, first) {
                Some(br) => branch_current(Some(br)),
                None => (vab - amplifier_stamp::output_signal(part, first, x)) / part.model.ro,
            },
            _ => Complex64::default(),
        },
        ElementKind::Resistor => vab / k,
        ElementKind::Capacitor => vab * s * k,
        ElementKind::Admittance => vab * Complex64::new(e.value(), e.value_im()),
        ElementKind::CurrentSource => k,
        ElementKind::Vccs => match e.control() {
            Control::Nodes([p, n]) => k * (v(p) - v(n)),
            _ => Complex64::default(),
        },
        ElementKind::Cccs => {
            let j = lay
                .control
                .get(i)
                .copied()
                .flatten()
                .and_then(|j| lay.branch.get(j).copied().flatten());
            k * branch_current(j)
        }
        _ => branch_current(lay.branch.get(i).copied().flatten()),
    }
}

/// Factor, solve, refine once and check the unknowns of an assembled system.
///
/// One factorization of one matrix: [`Lu::factor`] directly, without the
/// pattern, the recorded elimination plan and the fill list of a [`Workspace`],
/// which pay off only when the same structure is factored again (a sweep). The
/// arithmetic is that of [`Workspace::solve`], bit for bit: the equilibration
/// and the elimination give the same factors with or without a pattern (zero
/// entries change no maximum and no product), and the residual sums the nonzero
/// entries of each row in column order, as the pattern lists them.
fn solve_matrix(
    c: &Circuit,
    lay: &Layout,
    mut m: Vec<Complex64>,
    rhs: &[Complex64],
) -> CircuitResult<Vec<Complex64>> {
    let n = lay.size;
    positive_zeros(&mut m);
    let lu = Lu::factor(n, m.clone()).map_err(|p| no_pivot(c, lay, p))?;
    let zero = Complex64::new(0.0, 0.0);
    let (mut residual, mut correction) = (alloc::vec![zero; n], alloc::vec![zero; n]);
    let x = substitute(&lu, &m, rhs, &mut residual, &mut correction);
    check_unknowns(c, &x)?;
    Ok(x)
}

/// −0 entries as +0, as the pattern's fill of a [`Workspace`] writes them.
fn positive_zeros(m: &mut [Complex64]) {
    let zero = Complex64::new(0.0, 0.0);
    for z in m.iter_mut() {
        if *z == zero {
            *z = zero;
        }
    }
}

/// x with M·x = rhs from the factorization `lu` of `m` (n × n, row-major),
/// refined once: r = rhs − M·x, x += M⁻¹·r (as in `Workspace::solve_refined`),
/// the correction kept only when finite, and skipped when the first solution's
/// componentwise backward error is already at rounding level (the test of
/// [`Workspace::sweeping`]: |r_i| ≤ γ_{n+1}·(|M|·|x| + |b|)_i in every row).
/// `residual` and `correction` (length n) are scratch.
fn substitute(
    lu: &Lu,
    m: &[Complex64],
    rhs: &[Complex64],
    residual: &mut [Complex64],
    correction: &mut [Complex64],
) -> Vec<Complex64> {
    let zero = Complex64::new(0.0, 0.0);
    let n = residual.len();
    let mut x = alloc::vec![zero; n];
    lu.solve_into(rhs, &mut x);
    let n1 = (n + 1) as f64 * UNIT_ROUNDOFF;
    let mut stable = true;
    for (r, out) in residual.iter_mut().enumerate() {
        let row = m.get(r * n..(r + 1) * n).unwrap_or(&[]);
        let mut s = zero;
        let mut size = 0.0;
        for (&v, &xj) in row.iter().zip(&x) {
            if v != zero {
                s += v * xj;
                size += abs1(v) * abs1(xj);
            }
        }
        let b = rhs.get(r).copied().unwrap_or_default();
        *out = b - s;
        // |r_i| ≤ γ_{n+1}·(|M|·|x| + |b|)_i, false for NaN.
        stable &= abs1(*out) * (1.0 - n1) <= n1 * (size + abs1(b));
    }
    if stable {
        return x;
    }
    lu.solve_into(residual, correction);
    if correction
        .iter()
        .all(|z| z.re.is_finite() && z.im.is_finite())
    {
        for (xi, d) in x.iter_mut().zip(correction.iter()) {
            *xi += d;
        }
    }
    x
}

/// The storage of single-frequency solves that follow one another, and the
/// factorizations of the last few matrices factored, each reused while a later
/// matrix is the same bit for bit. Circuits that differ only in their sources'
/// values, or by a current source (which writes only the right-hand side),
/// have the same matrix: the two-port analysis solves one network with several
/// test sources, and a port impedance is a circuit solved before with its
/// sources at zero and a test current source. The same bits factored again
/// would give the same factors, so each result is that of a solve on its own,
/// bit for bit; only the elimination is skipped.
#[derive(Default)]
pub(crate) struct Solves {
    /// The factorizations kept, oldest first (at most [`Solves::KEPT`]).
    kept: Vec<Factored>,
    /// The layout, matrix and right-hand side of the solve in progress.
    lay: Layout,
    m: Vec<Complex64>,
    rhs: Vec<Complex64>,
    residual: Vec<Complex64>,
    correction: Vec<Complex64>,
    /// The structure check's union-find storage.
    sets: (Sets, Sets),
}

/// The right-hand side of a solve: the circuit's own sources, or its sources at
/// zero and a 1 A test current into node `plus`, out of node `minus` (node
/// indices, 0 for ground).
#[derive(Clone, Copy)]
enum Drive {
    Sources,
    Test { plus: usize, minus: usize },
}

/// A matrix (−0 entries as +0) and its factorization.
struct Factored {
    m: Vec<Complex64>,
    lu: Lu,
}

/// Equal bit for bit (not as numbers: +0 and −0 differ, as a NaN and itself agree).
fn same_bits(a: &[Complex64], b: &[Complex64]) -> bool {
    a.len() == b.len()
        && a.iter()
            .zip(b)
            .all(|(x, y)| x.re.to_bits() == y.re.to_bits() && x.im.to_bits() == y.im.to_bits())
}

impl Solves {
    /// Most factorizations kept: enough for the two-port analysis, whose
    /// matching solves are at most three factorizations apart.
    const KEPT: usize = 4;

    /// The raw unknown vector of `c` (node voltages, then branch currents)
    /// at angular frequency `w`: laid out (into [`Solves::layout`]), checked
    /// for its structure, factored (or a kept factorization of the same matrix
    /// reused), solved, refined once and checked.
    fn solve(&mut self, c: &Circuit, w: f64, drive: Drive) -> CircuitResult<Vec<Complex64>> {
        layout_into(c, &mut self.lay)?;
        check_structure_in(c, w, &mut self.sets.0, &mut self.sets.1)?;
        let lay = &self.lay;
        match drive {
            Drive::Sources => assemble_with(c, lay, w, &mut self.m, &mut self.rhs, true),
            Drive::Test { plus, minus } => {
                assemble_with(c, lay, w, &mut self.m, &mut self.rhs, false);
                // As the stamp of a 1 A current source from `minus` to `plus`
                // placed last: it leaves `minus` and enters `plus`.
                let one = Complex64::new(1.0, 0.0);
                if let Some(x) = minus.checked_sub(1).and_then(|r| self.rhs.get_mut(r)) {
                    *x -= one;
                }
                if let Some(x) = plus.checked_sub(1).and_then(|r| self.rhs.get_mut(r)) {
                    *x += one;
                }
            }
        }
        positive_zeros(&mut self.m);
        let n = lay.size;
        let at = match self.kept.iter().position(|f| same_bits(&f.m, &self.m)) {
            Some(i) => i,
            None => self.factor(n).map_err(|p| no_pivot(c, &self.lay, p))?,
        };
        let lay = &self.lay;
        let zero = Complex64::new(0.0, 0.0);
        self.residual.clear();
        self.residual.resize(n, zero);
        self.correction.clear();
        self.correction.resize(n, zero);
        let Some(f) = self.kept.get(at) else {
            return Err(no_pivot(c, lay, NoPivot { column: 0 }));
        };
        let x = substitute(
            &f.lu,
            &f.m,
            &self.rhs,
            &mut self.residual,
            &mut self.correction,
        );
        check_unknowns(c, &x)?;
        Ok(x)
    }

    /// The layout of the last circuit solved.
    fn layout(&self) -> &Layout {
        &self.lay
    }

    /// Factor the matrix in progress (n × n) and keep it, in the place of the
    /// oldest when [`Solves::KEPT`] are kept (in its storage when the sizes
    /// agree); its index among those kept.
    fn factor(&mut self, n: usize) -> Result<usize, NoPivot> {
        let reuse = self.kept.len() >= Self::KEPT;
        let mut f = if reuse {
            self.kept.remove(0)
        } else {
            Factored {
                m: Vec::new(),
                lu: Lu::with_size(0),
            }
        };
        if f.lu.matrix_mut().len() == self.m.len() && !self.m.is_empty() {
            f.lu.refactor(&self.m)?;
        } else {
            f.lu = Lu::factor(n, self.m.clone())?;
        }
        core::mem::swap(&mut f.m, &mut self.m);
        self.kept.push(f);
        Ok(self.kept.len() - 1)
    }
}

/// An unknown that is not finite: the overflow error, named by the node of
/// its row.
fn check_unknowns(c: &Circuit, x: &[Complex64]) -> CircuitResult<()> {
    for (i, z) in x.iter().enumerate() {
        if !(z.re.is_finite() && z.im.is_finite()) {
            let name = c.nodes().get(i + 1).copied().unwrap_or(Name::EMPTY);
            return Err(CircuitError::new(
                Error::Overflow { param: "solution" },
                name,
            ));
        }
    }
    Ok(())
}

/// The storage of one solve — the factorization, the residual and the
/// correction — allocated once, so that a sweep factors and solves at each
/// frequency without allocating.
pub(crate) struct Workspace {
    lu: Lu,
    residual: Vec<Complex64>,
    correction: Vec<Complex64>,
    /// Where M may be nonzero (the stamped pattern of G and C, the same at
    /// every frequency): the fill, the equilibration and the residual visit
    /// only these entries.
    pattern: Pattern,
    /// The entries on the pattern, row after row: where (r·n + c) and, for
    /// the current matrix, what (read once for the fill and the residual).
    at: Vec<usize>,
    values: Vec<Complex64>,
    /// Skip the refinement's correction solve when the first solution is
    /// already backward stable ([`Workspace::sweeping`]).
    when_needed: bool,
}

impl Workspace {
    pub fn new(n: usize, pattern: Pattern) -> Workspace {
        Workspace {
            when_needed: false,
            lu: Lu::with_pattern(pattern.clone()),
            residual: alloc::vec![Complex64::new(0.0, 0.0); n],
            correction: alloc::vec![Complex64::new(0.0, 0.0); n],
            at: (0..n)
                .flat_map(|r| pattern.row(r).iter().map(move |&j| r * n + j))
                .collect(),
            values: Vec::new(),
            pattern,
        }
    }

    /// [`Workspace::new`] for a sweep: the refinement of
    /// [`Workspace::solve_refined`] skips its correction solve when the
    /// componentwise backward error of the first solution is already within
    /// what one step of refinement in working precision guarantees:
    /// |r_i| ≤ γ_{n+1}·(|M|·|x| + |b|)_i in every row i, with r = b − M·x,
    /// |z| = |re| + |im| (LAPACK's CABS1), n the unknowns and
    /// γ_m = m·u/(1 − m·u), u = 2^−53 (N. J. Higham, Accuracy and Stability of
    /// Numerical Algorithms, 2nd ed., section 12.2, after R. D. Skeel,
    /// "Iterative refinement implies numerical stability for Gaussian
    /// elimination", Mathematics of Computation 35, 1980; from memory; LAPACK's
    /// zgerfs likewise stops on a backward error at rounding level). Otherwise
    /// the correction runs as before.
    pub fn sweeping(n: usize, pattern: Pattern) -> Workspace {
        Workspace {
            when_needed: true,
            ..Workspace::new(n, pattern)
        }
    }

    /// Factor M (entry i = r·n + c given by `entry`, zero off the pattern),
    /// solve M·x = rhs into `x`, refine once and check the unknowns.
    fn solve(
        &mut self,
        c: &Circuit,
        lay: &Layout,
        entry: impl Fn(usize) -> Complex64,
        rhs: &[Complex64],
        x: &mut [Complex64],
    ) -> CircuitResult<()> {
        self.solve_refined(entry, rhs, x)
            .map_err(|p| no_pivot(c, lay, p))?;
        check_unknowns(c, x)
    }

    /// Factor M (as [`Workspace::solve`]), solve M·x = rhs into `x` and refine
    /// once; the unknowns are not checked.
    ///
    /// # Errors
    /// The column without a pivot.
    pub fn solve_refined(
        &mut self,
        entry: impl Fn(usize) -> Complex64,
        rhs: &[Complex64],
        x: &mut [Complex64],
    ) -> Result<(), NoPivot> {
        self.values.clear();
        self.values.extend(self.at.iter().map(|&i| entry(i)));
        let a = self.lu.matrix_for_pattern();
        for (&i, &v) in self.at.iter().zip(&self.values) {
            if let Some(z) = a.get_mut(i) {
                *z = v;
            }
        }
        self.lu.factor_pattern()?;
        self.lu.solve_into(rhs, x);
        // One step of iterative refinement: r = b − M·x, x += M⁻¹·r. It recovers the
        // digits the elimination lost on badly scaled systems (Golub & Van Loan,
        // Matrix Computations, 4th ed., section 3.5.3, from memory).
        let mut values = self.values.iter();
        let mut stable = self.when_needed;
        let n1 = (self.residual.len() + 1) as f64 * UNIT_ROUNDOFF;
        for (r, out) in self.residual.iter_mut().enumerate() {
            let mut s = Complex64::new(0.0, 0.0);
            let mut size = 0.0;
            for (&j, &v) in self.pattern.row(r).iter().zip(&mut values) {
                let xj = x.get(j).copied().unwrap_or_default();
                s += v * xj;
                if self.when_needed {
                    size += abs1(v) * abs1(xj);
                }
            }
            let b = rhs.get(r).copied().unwrap_or_default();
            *out = b - s;
            // |r_i| ≤ γ_{n+1}·(|M|·|x| + |b|)_i, false for NaN.
            stable &= abs1(*out) * (1.0 - n1) <= n1 * (size + abs1(b));
        }
        if stable {
            return Ok(());
        }
        self.lu.solve_into(&self.residual, &mut self.correction);
        if self
            .correction
            .iter()
            .all(|z| z.re.is_finite() && z.im.is_finite())
        {
            for (xi, d) in x.iter_mut().zip(&self.correction) {
                *xi += d;
            }
        }
        Ok(())
    }
}

/// The unit roundoff u of f64, 2^−53.
const UNIT_ROUNDOFF: f64 = 1.0 / 9_007_199_254_740_992.0;

/// |re| + |im|, the magnitude of LAPACK's complex refinement (CABS1).
fn abs1(z: Complex64) -> f64 {
    libm::fabs(z.re) + libm::fabs(z.im)
}

/// The error of a factorization without a pivot: the node or element whose
/// unknown the circuit equations leave undetermined.
fn no_pivot(c: &Circuit, lay: &Layout, p: NoPivot) -> CircuitError {
    if p.column < lay.nodes {
        let name = c.nodes().get(p.column + 1).copied().unwrap_or(Name::EMPTY);
        CircuitError::new(
            Error::Singular {
                param: "node",
                reason: "the circuit equations leave this node's voltage undetermined",
            },
            name,
        )
    } else {
        let name = lay
            .branch
            .iter()
            .position(|&b| b == Some(p.column))
            .and_then(|i| c.elements().get(i))
            .map(|e| e.name())
            .unwrap_or(Name::EMPTY);
        CircuitError::new(
            Error::Singular {
                param: "element",
                reason: "the circuit equations leave this element's current undetermined",
            },
            name,
        )
    }
}

/// The voltage transfer V(plus) − V(minus) per unit of the named independent
/// source, with every other independent source set to zero.
///
/// # Errors
/// As [`solve`]; unknown names; `source` not an independent source or of value 0
/// is fine (it is set to 1 for the solve).
pub fn voltage_transfer(
    c: &Circuit,
    source: &str,
    plus: &str,
    minus: &str,
    frequency_hz: f64,
) -> CircuitResult<Complex64> {
    let (c1, _) = unit_source(c, source)?;
    solve(&c1, frequency_hz)?.voltage_between(plus, minus)
}

/// The current of `element` per unit of the named independent source, other
/// independent sources set to zero.
///
/// # Errors
/// As [`voltage_transfer`].
pub fn current_transfer(
    c: &Circuit,
    source: &str,
    element: &str,
    frequency_hz: f64,
) -> CircuitResult<Complex64> {
    let (c1, _) = unit_source(c, source)?;
    solve(&c1, frequency_hz)?.current(element)
}

/// Most frequencies in one sweep.
pub const MAX_SWEEP: usize = 100_000;

/// The voltage transfer of [`voltage_transfer`] at each of `frequencies_hz`.
///
/// The circuit is checked and laid out once; each frequency is one assembly and
/// one LU solve.
///
/// # Errors
/// More than [`MAX_SWEEP`] frequencies (param `frequencies`); otherwise as
/// [`voltage_transfer`] at the first frequency that fails.
///
/// # Example
/// ```
/// use loopwright::circuit::{voltage_transfer_sweep, Circuit};
/// let mut c = Circuit::new();
/// c.voltage_source("V1", "in", "0", 1.0).unwrap();
/// c.resistor("R1", "in", "out", 1e3).unwrap();
/// c.capacitor("C1", "out", "0", 1e-6).unwrap();
/// let h = voltage_transfer_sweep(&c, "V1", "out", "0", &[0.0, 1e6]).unwrap();
/// assert!((h[0].re - 1.0).abs() < 1e-15 && h[1].norm() < 1e-3);
/// assert!(voltage_transfer_sweep(&c, "V1", "out", "0", &[-5.0]).is_err());
/// ```
pub fn voltage_transfer_sweep(
    c: &Circuit,
    source: &str,
    plus: &str,
    minus: &str,
    frequencies_hz: &[f64],
) -> CircuitResult<Vec<Complex64>> {
    if frequencies_hz.len() > MAX_SWEEP {
        return Err(CircuitError::from(Error::TooLarge {
            param: "frequencies",
            limit: MAX_SWEEP as u64,
        }));
    }
    let (c1, _) = unit_source(c, source)?;
    let (p, m) = (c1.node_index(plus)?, c1.node_index(minus)?);
    let mut sweeper = Sweeper::new(&c1)?;
    let mut x = alloc::vec![Complex64::new(0.0, 0.0); sweeper.unknowns()];
    let mut out = Vec::with_capacity(frequencies_hz.len());
    for &f in frequencies_hz {
        sweeper.solve_into(f, &mut x)?;
        out.push(node_voltage(&x, p) - node_voltage(&x, m));
    }
    Ok(out)
}

/// The voltage of node `k` (0 = ground) in an unknown vector.
pub(crate) fn node_voltage(x: &[Complex64], k: usize) -> Complex64 {
    k.checked_sub(1)
        .and_then(|i| x.get(i).copied())
        .unwrap_or_default()
}

/// G, C and the right-hand side of M(ω) = G + jω·C: assembled at ω = 0 and
/// ω = 1, C the difference of the imaginary parts.
fn split(c: &Circuit, lay: &Layout) -> (Vec<Complex64>, Vec<f64>, Vec<Complex64>) {
    let (g, rhs) = assemble(c, lay, 0.0);
    let (unit, _) = assemble(c, lay, 1.0);
    let cap: Vec<f64> = unit.iter().zip(&g).map(|(u, z)| u.im - z.im).collect();
    (g, cap, rhs)
}

/// Entry i of M(ω) = G + jω·C is made nonzero by a stamp.
fn nonzero(g: &[Complex64], cap: &[f64], i: usize) -> bool {
    g.get(i).is_some_and(|z| *z != Complex64::new(0.0, 0.0))
        || cap.get(i).is_some_and(|c| *c != 0.0)
}

/// The entries of M(ω) = G + jω·C a stamp makes nonzero.
fn stamped(n: usize, g: &[Complex64], cap: &[f64]) -> Pattern {
    Pattern::from_fn(n, |i| nonzero(g, cap, i))
}

/// One topology solved again and again with new element values (the trials
/// of a Monte Carlo): the layout, the stamped pattern and the factor storage
/// are kept from the first circuit, so each solve replays the recorded pivot
/// order of [`Lu::factor_pattern`] (which eliminates in full again when
/// partial pivoting picks another row). Each solve assembles the new values,
/// checks the structure and refines as [`Sweeper::solve_into`] of a fresh
/// sweeper does: the same unknowns, bit for bit.
pub(crate) struct Refill {
    lay: Layout,
    pattern: Pattern,
    work: Workspace,
    /// G, M at ω = 1, C and the right-hand side, assembled in place.
    g: Vec<Complex64>,
    unit: Vec<Complex64>,
    cap: Vec<f64>,
    rhs: Vec<Complex64>,
    unit_rhs: Vec<Complex64>,
}

impl Refill {
    /// Lay out `c` and keep its pattern.
    ///
    /// # Errors
    /// As [`layout`].
    pub fn new(c: &Circuit) -> CircuitResult<Refill> {
        let lay = layout(c)?;
        let (g, cap, _) = split(c, &lay);
        let pattern = stamped(lay.size, &g, &cap);
        Ok(Refill {
            work: Workspace::sweeping(lay.size, pattern.clone()),
            pattern,
            lay,
            g: Vec::new(),
            unit: Vec::new(),
            cap: Vec::new(),
            rhs: Vec::new(),
            unit_rhs: Vec::new(),
        })
    }

    /// The unknowns of `c` at `frequency_hz` into `x` (resized to the
    /// unknowns): `Ok(true)`; `Ok(false)`, with nothing solved, when the layout
    /// or the stamped pattern of `c` is not the one this storage was made for
    /// (the caller solves it in full).
    ///
    /// # Errors
    /// As [`Sweeper::new`] and [`Sweeper::solve_into`].
    pub fn solve_into(
        &mut self,
        c: &Circuit,
        frequency_hz: f64,
        x: &mut Vec<Complex64>,
    ) -> CircuitResult<bool> {
        let lay = layout(c)?;
        if lay != self.lay {
            return Ok(false);
        }
        // As `split`, in the kept storage.
        assemble_into(c, &lay, 0.0, &mut self.g, &mut self.rhs);
        assemble_into(c, &lay, 1.0, &mut self.unit, &mut self.unit_rhs);
        let (g, cap, rhs) = (&self.g, &mut self.cap, &self.rhs);
        cap.clear();
        cap.extend(self.unit.iter().zip(g).map(|(u, z)| u.im - z.im));
        let cap = &*cap;
        if !self.pattern.matches(lay.size, |i| nonzero(g, cap, i)) {
            return Ok(false);
        }
        let w = omega(frequency_hz)?;
        check_structure(c, w)?;
        x.clear();
        x.resize(lay.size, Complex64::new(0.0, 0.0));
        let entry = |i: usize| match (g.get(i), cap.get(i)) {
            (Some(z), Some(b)) => Complex64::new(z.re, z.im + w * b),
            _ => Complex64::new(0.0, 0.0),
        };
        self.work.solve(c, &lay, entry, rhs, x)?;
        Ok(true)
    }
}

/// One circuit solved at many frequencies. Every stamp is constant or
/// proportional to s = jω, so M(ω) = G + jω·C: both are assembled once, and
/// the structure is checked once per kind of frequency (0 Hz, where capacitors
/// are open and inductors short, or above).
pub(crate) struct Sweeper<'a> {
    pub circuit: &'a Circuit,
    pub lay: Layout,
    /// G (the real part may be complex for a fixed admittance).
    pub g: Vec<Complex64>,
    /// C: the coefficient of s.
    pub cap: Vec<f64>,
    pub rhs: Vec<Complex64>,
    work: Workspace,
    /// The storage of the transposed solves, made at the first.
    transposed: Option<Workspace>,
    dc_checked: bool,
    ac_checked: bool,
}

impl<'a> Sweeper<'a> {
    /// Lay out and assemble.
    pub fn new(circuit: &'a Circuit) -> CircuitResult<Sweeper<'a>> {
        let lay = layout(circuit)?;
        let (g, cap, rhs) = split(circuit, &lay);
        let work = Workspace::sweeping(lay.size, stamped(lay.size, &g, &cap));
        Ok(Sweeper {
            circuit,
            lay,
            g,
            cap,
            rhs,
            work,
            transposed: None,
            dc_checked: false,
            ac_checked: false,
        })
    }

    /// The unknown vector at `frequency_hz` (a fresh vector; see
    /// [`Sweeper::solve_into`] for the sweep without allocation).
    pub fn solve_at(&mut self, frequency_hz: f64) -> CircuitResult<Vec<Complex64>> {
        let mut x = alloc::vec![Complex64::new(0.0, 0.0); self.lay.size];
        self.solve_into(frequency_hz, &mut x)?;
        Ok(x)
    }

    /// The unknown vector at `frequency_hz` into `x` (length: the unknowns),
    /// without allocating: M = G + jω·C refilled, factored and solved in the
    /// sweeper's own storage.
    pub fn solve_into(&mut self, frequency_hz: f64, x: &mut [Complex64]) -> CircuitResult<()> {
        let w = omega(frequency_hz)?;
        let checked = if w == 0.0 {
            &mut self.dc_checked
        } else {
            &mut self.ac_checked
        };
        if !*checked {
            check_structure(self.circuit, w)?;
            *checked = true;
        }
        let (g, cap) = (&self.g, &self.cap);
        let entry = |i: usize| match (g.get(i), cap.get(i)) {
            (Some(z), Some(b)) => Complex64::new(z.re, z.im + w * b),
            _ => Complex64::new(0.0, 0.0),
        };
        self.work
            .solve(self.circuit, &self.lay, entry, &self.rhs, x)
    }

    /// z with M(ω)ᵀ·z = `rhs` at angular frequency `w`, into `z` (length: the
    /// unknowns), refined once as the forward solve, in storage of its own
    /// (allocated at the first call): the adjoint solve of the noise analysis.
    /// No structure check and no check of z.
    ///
    /// # Errors
    /// The column of Mᵀ without a pivot.
    pub fn solve_transposed_into(
        &mut self,
        w: f64,
        rhs: &[Complex64],
        z: &mut [Complex64],
    ) -> Result<(), NoPivot> {
        let n = self.lay.size;
        let (g, cap) = (&self.g, &self.cap);
        // Entry (r, c) of Mᵀ is entry (c, r) of M.
        let at = move |i: usize| (i % n) * n + i / n;
        let work = self.transposed.get_or_insert_with(|| {
            let zero = Complex64::new(0.0, 0.0);
            let pattern = Pattern::from_fn(n, |i| {
                g.get(at(i)).is_some_and(|z| *z != zero)
                    || cap.get(at(i)).is_some_and(|c| *c != 0.0)
            });
            Workspace::new(n, pattern)
        });
        let entry = |i: usize| match (g.get(at(i)), cap.get(at(i))) {
            (Some(z), Some(b)) => Complex64::new(z.re, z.im + w * b),
            _ => Complex64::new(0.0, 0.0),
        };
        work.solve_refined(entry, rhs, z)
    }

    /// The number of unknowns (the length of the vectors `solve_into` fills).
    pub fn unknowns(&self) -> usize {
        self.lay.size
    }

    /// The unknown vector at a complex frequency s (rad/s): (G + s·C)·x = b,
    /// for residues of a transfer at its poles (`stage::step`). The structure
    /// check of [`Sweeper::solve_at`] is not repeated; a singular matrix is
    /// reported as there.
    pub fn solve_at_s(&mut self, s: Complex64) -> CircuitResult<Vec<Complex64>> {
        let m: Vec<Complex64> = self
            .g
            .iter()
            .zip(&self.cap)
            .map(|(z, b)| z + s * b)
            .collect();
        solve_matrix(self.circuit, &self.lay, m, &self.rhs)
    }
}

/// A copy with every independent source at zero except `source`, which is set to 1.
pub(crate) fn unit_source(c: &Circuit, source: &str) -> CircuitResult<(Circuit, usize)> {
    let i = c.element_index(source)?;
    let kind = c
        .elements()
        .get(i)
        .map(|e| e.kind())
        .unwrap_or(ElementKind::Resistor);
    if !kind.is_independent() {
        return Err(CircuitError::named(
            Error::OutOfDomain {
                param: "source",
                requirement: "must name an independent voltage or current source",
            },
            source,
        ));
    }
    let mut c1 = c.clone();
    c1.zero_sources();
    c1.replace_with_source(i, 1.0);
    Ok((c1, i))
}

/// Impedance between `plus` and `minus` seen by a test current source, with every
/// independent source set to zero (voltage sources shorted, current sources open).
///
/// Z = (V(plus) − V(minus)) / I_test, Ω.
///
/// # Errors
/// As [`solve`]; a port across which nothing conducts is a floating node.
///
/// # Example
/// ```
/// use loopwright::circuit::{port_impedance, Circuit};
/// let mut c = Circuit::new();
/// c.resistor("R1", "a", "0", 1e3).unwrap();
/// c.resistor("R2", "a", "0", 1e3).unwrap();
/// assert!((port_impedance(&c, "a", "0", 0.0).unwrap().re - 500.0).abs() < 1e-9);
/// assert_eq!(port_impedance(&c, "a", "b", 0.0).unwrap_err().error.code(), "unknown_name");
/// ```
pub fn port_impedance(
    c: &Circuit,
    plus: &str,
    minus: &str,
    frequency_hz: f64,
) -> CircuitResult<Complex64> {
    port_impedance_in(c, plus, minus, frequency_hz, &mut Solves::default())
}

/// [`port_impedance`] in the storage of `solves` (see [`solve_in`]): the
/// matrix is that of `c`, so a solve of `c` just before shares its
/// factorization.
pub(crate) fn port_impedance_in(
    c: &Circuit,
    plus: &str,
    minus: &str,
    frequency_hz: f64,
    solves: &mut Solves,
) -> CircuitResult<Complex64> {
    let p = c.node_index(plus)?;
    let m = c.node_index(minus)?;
    let test = Name::internal("test");
    if p != m && c.elements().len() < MAX_ELEMENTS && c.elements().iter().all(|e| e.name() != test)
    {
        // The solve of the copy below without making it: the same matrix, the
        // same right-hand side, the same checks in the same order, so the same
        // result or error (a copy with a test source could not be made where
        // this is not taken).
        let w = omega(frequency_hz)?;
        let x = solves.solve(c, w, Drive::Test { plus: p, minus: m })?;
        let (lay, s) = (solves.layout(), Complex64::new(0.0, w));
        for (i, e) in c.elements().iter().enumerate() {
            let current = element_current(e, i, lay, &x, s, false);
            check::result_complex("current", current).named(e.name())?;
        }
        let v = |node: usize| match node.checked_sub(1) {
            None => Complex64::new(0.0, 0.0),
            Some(i) => x.get(i).copied().unwrap_or_default(),
        };
        return Ok(check::result_complex("impedance", v(p) - v(m))?);
    }
    let mut c1 = c.clone();
    c1.zero_sources();
    // 1 A from minus through the test source to plus: it enters the circuit at plus.
    c1.add_internal("test", ElementKind::CurrentSource, minus, plus, 1.0)?;
    let s = solve_in(&c1, frequency_hz, solves)?;
    Ok(check::result_complex(
        "impedance",
        s.voltage_between(plus, minus)?,
    )?)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn close(a: Complex64, b: Complex64, tol: f64) -> bool {
        (a - b).norm() <= tol * b.norm().max(1e-300)
    }

    #[test]
    fn rc_divider_matches_the_hand_formula() {
        // Vout/Vin = 1/(1 + jωRC): the first-order low-pass (any circuits text).
        let mut c = Circuit::new();
        c.voltage_source("V1", "in", "0", 1.0).unwrap();
        c.resistor("R1", "in", "out", 1e3).unwrap();
        c.capacitor("C1", "out", "0", 1e-6).unwrap();
        let f = 159.154_943_091_895_35; // 1/(2π·RC)
        let h = solve(&c, f).unwrap().voltage("out").unwrap();
        assert!(close(h, Complex64::new(0.5, -0.5), 1e-12), "{h}");
        // The source current leaves its + terminal into R1: I(V1) = −I(R1).
        let s = solve(&c, f).unwrap();
        assert!(close(
            s.current("V1").unwrap(),
            -s.current("R1").unwrap(),
            1e-12
        ));
    }

    #[test]
    fn inductor_is_a_short_at_dc_and_jwl_above() {
        let mut c = Circuit::new();
        c.current_source("I1", "0", "a", 1.0).unwrap();
        c.inductor("L1", "a", "b", 1e-3).unwrap();
        c.resistor("R1", "b", "0", 10.0).unwrap();
        assert!(close(
            port_impedance(&c, "a", "0", 0.0).unwrap(),
            Complex64::new(10.0, 0.0),
            1e-12
        ));
        let f = 1e3;
        let want = Complex64::new(10.0, 2.0 * PI * f * 1e-3);
        assert!(close(port_impedance(&c, "a", "0", f).unwrap(), want, 1e-12));
        // I1 enters node a: V(a) = 10 V at DC.
        assert!(close(
            solve(&c, 0.0).unwrap().voltage("a").unwrap(),
            Complex64::new(10.0, 0.0),
            1e-12
        ));
    }

    #[test]
    fn controlled_sources_follow_their_definitions() {
        // Each output is a chain of the definitions in the netlist module doc.
        let mut c = Circuit::new();
        c.voltage_source("V1", "in", "0", 2.0).unwrap();
        c.resistor("R1", "in", "0", 1e3).unwrap();
        c.vcvs("E1", "e", "0", "in", "0", 3.0).unwrap(); // V(e) = 6
        c.resistor("Re", "e", "m", 2.0).unwrap();
        c.voltage_source("Vm", "m", "0", 0.0).unwrap(); // ammeter: I = 3 A
        c.ccvs("H1", "h", "0", "Vm", 5.0).unwrap(); // V(h) = 15
        c.resistor("Rh", "h", "0", 1.0).unwrap();
        c.vccs("G1", "0", "g", "in", "0", 0.5).unwrap(); // 1 A into g
        c.resistor("Rg", "g", "0", 4.0).unwrap(); // V(g) = 4
        c.cccs("F1", "0", "f", "Vm", 2.0).unwrap(); // 6 A into f
        c.resistor("Rf", "f", "0", 0.5).unwrap(); // V(f) = 3
        let s = solve(&c, 0.0).unwrap();
        for (node, want) in [("e", 6.0), ("h", 15.0), ("g", 4.0), ("f", 3.0)] {
            assert!(
                close(s.voltage(node).unwrap(), Complex64::new(want, 0.0), 1e-12),
                "{node}"
            );
        }
        assert!(close(
            s.current("Vm").unwrap(),
            Complex64::new(3.0, 0.0),
            1e-12
        ));
        assert!(close(
            s.current("F1").unwrap(),
            Complex64::new(6.0, 0.0),
            1e-12
        ));
    }

    fn bits(z: Complex64) -> (u64, u64) {
        (z.re.to_bits(), z.im.to_bits())
    }

    /// Every element kind but the amplifier, with pivoting, for the bit checks.
    fn mixed_circuit() -> Circuit {
        let mut c = Circuit::new();
        c.voltage_source("V1", "in", "0", 2.0).unwrap();
        c.resistor("R1", "in", "a", 1e3).unwrap();
        c.capacitor("C1", "a", "0", 1e-8).unwrap();
        c.inductor("L1", "a", "b", 1e-3).unwrap();
        c.admittance("Y1", "b", "0", 1e-3, 2e-4).unwrap();
        c.current_source("I1", "0", "b", 1e-3).unwrap();
        c.vcvs("E1", "e", "0", "b", "0", 3e5).unwrap();
        c.resistor("Re", "e", "m", 2.0).unwrap();
        c.voltage_source("Vm", "m", "0", 0.0).unwrap();
        c.ccvs("H1", "h", "0", "Vm", 5.0).unwrap();
        c.resistor("Rh", "h", "0", 1e-3).unwrap();
        c.cccs("F1", "0", "f", "Vm", 2.0).unwrap();
        c.resistor("Rf", "f", "0", 1e6).unwrap();
        c.vccs("G1", "0", "g", "a", "0", 1e-2).unwrap();
        c.resistor("Rg", "g", "0", 1e2).unwrap();
        c
    }

    #[test]
    fn a_kept_factorization_gives_the_bits_of_a_solve_of_its_own() {
        // Solves sharing one `Solves` (the circuit, then the same circuit with
        // other source values, then its port impedances, then another circuit
        // and the first again) against each solved with fresh storage.
        let c = mixed_circuit();
        let mut other = c.clone();
        other.zero_sources();
        let mut smaller = c.without("Rh").unwrap();
        smaller.zero_sources();
        for f in [0.0, 1e3, 1e6] {
            let shared = &mut Solves::default();
            for circuit in [&c, &other, &smaller, &c] {
                let kept = solve_in(circuit, f, shared).unwrap();
                let own = solve(circuit, f).unwrap();
                for (a, b) in kept.node_voltages.iter().zip(&own.node_voltages) {
                    assert_eq!(bits(a.value()), bits(b.value()), "{f} Hz, {}", a.name);
                }
                for (a, b) in kept.element_currents.iter().zip(&own.element_currents) {
                    assert_eq!(bits(a.value()), bits(b.value()), "{f} Hz, {}", a.name);
                }
                for (p, m) in [("a", "0"), ("b", "g"), ("0", "h")] {
                    let z = port_impedance_in(circuit, p, m, f, shared);
                    let alone = port_impedance(circuit, p, m, f);
                    assert_eq!(z.map(bits), alone.map(bits), "{f} Hz, {p}–{m}");
                }
            }
        }
    }

    #[test]
    fn a_port_impedance_is_the_solve_of_the_circuit_with_a_test_source() {
        // The impedance without a copy of the circuit against the solve of the
        // copy it stands for: sources at zero, a 1 A test source added last.
        let c = mixed_circuit();
        for f in [0.0, 1e3, 1e6] {
            for (p, m) in [("a", "0"), ("0", "a"), ("b", "g"), ("e", "f"), ("in", "0")] {
                let mut c1 = c.clone();
                c1.zero_sources();
                c1.add_internal("test", ElementKind::CurrentSource, m, p, 1.0)
                    .unwrap();
                let want = solve(&c1, f)
                    .and_then(|s| s.voltage_between(p, m))
                    .and_then(|z| Ok(check::result_complex("impedance", z)?));
                let got = port_impedance(&c, p, m, f);
                assert_eq!(got.map(bits), want.map(bits), "{f} Hz, {p}–{m}");
            }
        }
        // The same node twice and an unknown node: the copy's errors.
        assert_eq!(
            port_impedance(&c, "a", "a", 0.0).unwrap_err().error.code(),
            "out_of_domain"
        );
        assert_eq!(
            port_impedance(&c, "a", "zz", 0.0).unwrap_err().error.code(),
            "unknown_name"
        );
    }

    #[test]
    fn one_shot_solve_gives_the_bits_of_the_workspace() {
        // `solve_matrix` factors without a pattern; a `Workspace` over the
        // matrix's nonzero pattern with the same refinement rule (the
        // correction skipped when the backward error is at rounding level,
        // `Workspace::sweeping`) gives the same bits, with pivoting (the
        // controlled sources and the 0 V ammeter), −0 entries and every
        // element kind but the amplifier present (`mixed_circuit`).
        let c = mixed_circuit();
        let lay = layout(&c).unwrap();
        for f in [0.0, 1.0, 1e3, 5e4, 1e6] {
            let w = omega(f).unwrap();
            let (mut m, rhs) = assemble(&c, &lay, w);
            if let Some(z) = m.iter_mut().find(|z| **z == Complex64::new(0.0, 0.0)) {
                *z = Complex64::new(-0.0, -0.0);
            }
            let one = solve_matrix(&c, &lay, m.clone(), &rhs).unwrap();
            let zero = Complex64::new(0.0, 0.0);
            let pattern = Pattern::from_fn(lay.size, |i| m[i] != zero);
            let mut work = Workspace::sweeping(lay.size, pattern);
            let mut x = alloc::vec![zero; lay.size];
            work.solve(&c, &lay, |i| m[i], &rhs, &mut x).unwrap();
            for (a, b) in one.iter().zip(&x) {
                assert_eq!(
                    (a.re.to_bits(), a.im.to_bits()),
                    (b.re.to_bits(), b.im.to_bits()),
                    "{f} Hz: {a} vs {b}"
                );
            }
        }
    }

    #[test]
    fn sweep_equals_one_solve_per_frequency() {
        // The fast path (M0 + jω·M1 assembled once) against the direct solve at
        // each frequency, with every reactive kind and an admittance present.
        let mut c = Circuit::new();
        c.voltage_source("V1", "in", "0", 1.0).unwrap();
        c.resistor("R1", "in", "a", 1e3).unwrap();
        c.capacitor("C1", "a", "0", 1e-8).unwrap();
        c.inductor("L1", "a", "b", 1e-3).unwrap();
        c.admittance("Y1", "b", "0", 1e-3, 2e-4).unwrap();
        c.vcvs("E1", "o", "0", "b", "0", 5.0).unwrap();
        c.resistor("R2", "o", "0", 50.0).unwrap();
        let freqs = [0.0, 1.0, 1e3, 5e4, 1e6];
        let h = voltage_transfer_sweep(&c, "V1", "o", "0", &freqs).unwrap();
        for (f, hf) in freqs.iter().zip(h) {
            let direct = voltage_transfer(&c, "V1", "o", "0", *f).unwrap();
            assert!(close(hf, direct, 1e-14), "{f} Hz: {hf} vs {direct}");
        }
        let too_many = alloc::vec![1.0; MAX_SWEEP + 1];
        assert_eq!(
            voltage_transfer_sweep(&c, "V1", "o", "0", &too_many)
                .unwrap_err()
                .error
                .param(),
            "frequencies"
        );
    }

    #[test]
    fn faults_are_named() {
        let mut c = Circuit::new();
        c.voltage_source("V1", "a", "0", 1.0).unwrap();
        c.voltage_source("V2", "a", "0", 2.0).unwrap();
        let e = solve(&c, 1.0).unwrap_err();
        assert_eq!(
            (e.name.as_str(), e.error.param(), e.error.code()),
            ("V2", "element", "singular")
        );

        let mut c = Circuit::new();
        c.current_source("I1", "0", "a", 1.0).unwrap();
        c.resistor("R1", "a", "0", 1.0).unwrap();
        c.current_source("I2", "a", "b", 1.0).unwrap();
        assert_eq!(solve(&c, 1.0).unwrap_err().name.as_str(), "b");

        let mut c = Circuit::new();
        c.resistor("R1", "a", "0", 1.0).unwrap();
        c.cccs("F1", "a", "0", "R1", 1.0).unwrap();
        let e = solve(&c, 0.0).unwrap_err();
        assert_eq!((e.name.as_str(), e.error.param()), ("F1", "controlElement"));
        let mut c = Circuit::new();
        c.resistor("R1", "a", "0", 1.0).unwrap();
        c.ccvs("H1", "b", "0", "Vnone", 1.0).unwrap();
        let e = solve(&c, 0.0).unwrap_err();
        assert_eq!((e.name.as_str(), e.error.code()), ("Vnone", "unknown_name"));

        // A VCVS whose output node drives its own control with gain 1 around a
        // loop: V(a) = 1·V(a) leaves V(a) undetermined; the LU names it.
        let mut c = Circuit::new();
        c.vcvs("E1", "a", "0", "a", "0", 1.0).unwrap();
        c.resistor("R1", "a", "0", 1.0).unwrap();
        let e = solve(&c, 0.0).unwrap_err();
        assert_eq!(e.error.code(), "singular");
        assert!(["a", "E1"].contains(&e.name.as_str()), "{}", e.name);
        assert_eq!(solve(&c, -1.0).unwrap_err().error.param(), "frequency");
    }
}
