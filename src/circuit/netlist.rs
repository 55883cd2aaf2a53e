//! The small-signal circuit description: named nodes and elements.
//!
//! A [`Circuit`] holds nodes by name (ground is `0`, also spelled `gnd`) and
//! elements of ten kinds ([`ElementKind`]). Every element has two terminal nodes
//! `[a, b]`; the current of an element is the current flowing from `a` through
//! the element to `b`. The sign conventions, per kind:
//! - resistor (Ω), capacitor (F), inductor (H): values greater than zero;
//! - voltage source: V(a) − V(b) = value (V);
//! - current source: `value` amperes flow from `a` through the source to `b`
//!   (so they leave the source at `b`);
//! - VCVS: V(a) − V(b) = gain·(V(c+) − V(c−)), gain in V/V;
//! - VCCS: gain·(V(c+) − V(c−)) flows from `a` through the source to `b`, in A/V;
//! - CCVS: V(a) − V(b) = gain·I(control), in V/A (Ω);
//! - CCCS: gain·I(control) flows from `a` through the source to `b`, in A/A;
//! - admittance: a fixed complex admittance (S) with real part ≥ 0, used for the
//!   loading of a two-port; it does not vary with frequency.
//!
//! The controlling current of a CCVS or CCCS is the current of another element
//! that carries its own branch current: a voltage source (a 0 V source is an
//! ammeter), an inductor, a VCVS or a CCVS.
//!
//! Size limits (stated and enforced with [`Error::TooLarge`]): at most
//! [`MAX_NODES`] nodes besides ground, [`MAX_ELEMENTS`] elements, and
//! [`MAX_BRANCHES`] elements that carry a branch current (voltage sources,
//! inductors, VCVS, CCVS), which bounds the nodal matrix at 128 × 128.

use super::error::{CircuitError, CircuitResult, Name};
use super::tolerance::{validate_tempco, Tolerance};
use crate::error::Error;
use crate::stage::{Amplifier, SpreadPoint};
use alloc::boxed::Box;
use alloc::vec::Vec;

/// Most nodes besides ground.
pub const MAX_NODES: usize = 64;
/// Most elements.
pub const MAX_ELEMENTS: usize = 256;
/// Most elements with a branch current (V, L, VCVS, CCVS).
pub const MAX_BRANCHES: usize = 64;
/// Most internal unknowns of all amplifier elements together (their states:
/// one per real pole or zero, two per complex pair; plus one when Ro = 0),
/// which keeps the nodal matrix at most 256 × 256.
pub const MAX_AMPLIFIER_STATES: usize = 128;
/// Room kept above the limits for the test sources the analyses add.
const INTERNAL_SLACK: usize = 4;

/// The kind of a circuit element.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum ElementKind {
    /// Resistor, Ω.
    Resistor,
    /// Capacitor, F.
    Capacitor,
    /// Inductor, H.
    Inductor,
    /// Independent voltage source, V.
    VoltageSource,
    /// Independent current source, A.
    CurrentSource,
    /// Voltage-controlled voltage source, V/V.
    Vcvs,
    /// Voltage-controlled current source, A/V.
    Vccs,
    /// Current-controlled voltage source, V/A.
    Ccvs,
    /// Current-controlled current source, A/A.
    Cccs,
    /// Fixed complex admittance, S.
    Admittance,
    /// An amplifier from its datasheet model (document version 2): a voltage
    /// source of frequency-dependent gain A(jω) behind its output resistance,
    /// with its input parts between and from its control nodes.
    Amplifier,
}

/// The kind names of the JSON document.
pub const KIND_NAMES: &str = "resistor, capacitor, inductor, voltage-source, current-source, vcvs, vccs, ccvs, cccs, admittance, amplifier";

impl ElementKind {
    /// The name used in the JSON document, e.g. `"voltage-source"`.
    pub const fn name(self) -> &'static str {
        match self {
            ElementKind::Resistor => "resistor",
            ElementKind::Capacitor => "capacitor",
            ElementKind::Inductor => "inductor",
            ElementKind::VoltageSource => "voltage-source",
            ElementKind::CurrentSource => "current-source",
            ElementKind::Vcvs => "vcvs",
            ElementKind::Vccs => "vccs",
            ElementKind::Ccvs => "ccvs",
            ElementKind::Cccs => "cccs",
            ElementKind::Admittance => "admittance",
            ElementKind::Amplifier => "amplifier",
        }
    }

    /// The kind for a document name.
    ///
    /// # Errors
    /// [`Error::UnknownName`] with param `kind`.
    pub fn from_name(s: &str) -> crate::Result<ElementKind> {
        const ALL: [ElementKind; 11] = [
            ElementKind::Resistor,
            ElementKind::Capacitor,
            ElementKind::Inductor,
            ElementKind::VoltageSource,
            ElementKind::CurrentSource,
            ElementKind::Vcvs,
            ElementKind::Vccs,
            ElementKind::Ccvs,
            ElementKind::Cccs,
            ElementKind::Admittance,
            ElementKind::Amplifier,
        ];
        ALL.into_iter()
            .find(|k| k.name() == s)
            .ok_or(Error::UnknownName {
                param: "kind",
                expected: KIND_NAMES,
            })
    }

    /// True when the element adds its own current to the unknowns.
    pub const fn has_branch(self) -> bool {
        matches!(
            self,
            ElementKind::VoltageSource
                | ElementKind::Inductor
                | ElementKind::Vcvs
                | ElementKind::Ccvs
        )
    }

    /// True for the four controlled sources.
    pub const fn is_controlled(self) -> bool {
        matches!(
            self,
            ElementKind::Vcvs | ElementKind::Vccs | ElementKind::Ccvs | ElementKind::Cccs
        )
    }

    /// True for independent sources.
    pub const fn is_independent(self) -> bool {
        matches!(
            self,
            ElementKind::VoltageSource | ElementKind::CurrentSource
        )
    }
}

/// What controls a controlled source.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Control {
    /// Not a controlled source.
    None,
    /// The voltage between two nodes (indices into the node list), c+ first.
    Nodes([usize; 2]),
    /// The current of the named element (resolved when the circuit is solved).
    Element(Name),
}

/// An amplifier element's model and the point of its A0 spread in use.
#[derive(Debug, Clone, PartialEq)]
pub struct AmplifierPart {
    /// The datasheet model (validated when added).
    pub model: Amplifier,
    /// Which point of the A0 spread the circuit uses.
    pub point: SpreadPoint,
    /// When set, the controlled source is replaced by an independent source of
    /// this value, V (the return-ratio analyses); the input parts and the
    /// output resistance stay.
    pub(crate) test_value: Option<f64>,
}

/// One element: name, kind, terminal nodes, control, value, and (version 2)
/// an amplifier model, a tolerance and a temperature coefficient.
#[derive(Debug, Clone, PartialEq)]
pub struct Element {
    pub(crate) name: Name,
    pub(crate) kind: ElementKind,
    pub(crate) nodes: [usize; 2],
    pub(crate) control: Control,
    pub(crate) value: f64,
    pub(crate) value_im: f64,
    pub(crate) amplifier: Option<Box<AmplifierPart>>,
    pub(crate) tolerance: Option<Tolerance>,
    pub(crate) tempco_ppm: Option<f64>,
}

impl Element {
    /// The element's name.
    pub fn name(&self) -> Name {
        self.name
    }
    /// Its kind.
    pub fn kind(&self) -> ElementKind {
        self.kind
    }
    /// Terminal nodes `[a, b]` as indices into [`Circuit::nodes`] (0 is ground).
    pub fn nodes(&self) -> [usize; 2] {
        self.nodes
    }
    /// What controls it, for controlled sources.
    pub fn control(&self) -> Control {
        self.control
    }
    /// The value in the kind's unit (the real part for an admittance).
    pub fn value(&self) -> f64 {
        self.value
    }
    /// The imaginary part of an admittance's value (0 for every other kind).
    pub fn value_im(&self) -> f64 {
        self.value_im
    }
    /// The model of an amplifier element (`None` for every other kind).
    pub fn amplifier(&self) -> Option<&AmplifierPart> {
        self.amplifier.as_deref()
    }
    /// The value's tolerance, if one was given.
    pub fn tolerance(&self) -> Option<Tolerance> {
        self.tolerance
    }
    /// The temperature coefficient, ppm/K, if one was given.
    pub fn tempco_ppm(&self) -> Option<f64> {
        self.tempco_ppm
    }
}

/// A small-signal circuit.
///
/// # Example
/// ```
/// use loopwright::circuit::Circuit;
/// let mut c = Circuit::new();
/// c.voltage_source("V1", "in", "0", 1.0).unwrap();
/// c.resistor("R1", "in", "out", 1e3).unwrap();
/// c.resistor("R2", "out", "0", 1e3).unwrap();
/// assert_eq!(c.nodes().len(), 3); // ground, in, out
/// // A negative resistance is refused, naming the element.
/// let e = c.resistor("R3", "out", "0", -5.0).unwrap_err();
/// assert_eq!((e.name.as_str(), e.error.param()), ("R3", "value"));
/// ```
#[derive(Debug, Clone, PartialEq)]
pub struct Circuit {
    nodes: Vec<Name>,
    elements: Vec<Element>,
    strict_nodes: bool,
}

impl Default for Circuit {
    fn default() -> Self {
        Circuit::new()
    }
}

fn ground_name() -> Name {
    Name::truncated("0")
}

impl Circuit {
    /// An empty circuit: only the ground node.
    pub fn new() -> Circuit {
        Circuit {
            nodes: alloc::vec![ground_name()],
            elements: Vec::new(),
            strict_nodes: false,
        }
    }

    /// An empty circuit whose nodes are exactly `names` (plus ground): elements
    /// that name any other node are refused with [`Error::UnknownName`].
    ///
    /// # Errors
    /// A bad or duplicate node name, more than [`MAX_NODES`] nodes.
    pub fn with_nodes(names: &[&str]) -> CircuitResult<Circuit> {
        let mut c = Circuit::new();
        for &text in names {
            let name = Name::new(text)?;
            if name.is_ground() {
                continue;
            }
            if c.nodes.contains(&name) {
                return Err(CircuitError::new(
                    Error::OutOfDomain {
                        param: "node",
                        requirement: "is declared twice; node names must be unique",
                    },
                    name,
                ));
            }
            c.push_node(name, false)?;
        }
        c.strict_nodes = true;
        Ok(c)
    }

    /// True when the node list was declared up front ([`Circuit::with_nodes`]).
    pub fn declares_nodes(&self) -> bool {
        self.strict_nodes
    }

    /// Node names; index 0 is ground (`0`).
    pub fn nodes(&self) -> &[Name] {
        &self.nodes
    }

    /// The elements, in the order they were added.
    pub fn elements(&self) -> &[Element] {
        &self.elements
    }

    /// The elements, for changing values in place (same names, nodes and
    /// kinds: the caller keeps every value valid for its kind).
    pub(crate) fn elements_mut(&mut self) -> &mut [Element] {
        &mut self.elements
    }

    /// Index of a node by name (`0` and `gnd` give 0).
    ///
    /// # Errors
    /// [`Error::UnknownName`] with param `node`, naming it.
    pub fn node_index(&self, name: &str) -> CircuitResult<usize> {
        let n = Name::truncated(name);
        if n.is_ground() {
            return Ok(0);
        }
        self.nodes
            .iter()
            .position(|&x| x == n)
            .ok_or(CircuitError::new(
                Error::UnknownName {
                    param: "node",
                    expected: "the name of a node of the circuit",
                },
                n,
            ))
    }

    /// Index of an element by name.
    ///
    /// # Errors
    /// [`Error::UnknownName`] with param `element`, naming it.
    pub fn element_index(&self, name: &str) -> CircuitResult<usize> {
        let n = Name::truncated(name);
        self.elements
            .iter()
            .position(|e| e.name == n)
            .ok_or(CircuitError::new(
                Error::UnknownName {
                    param: "element",
                    expected: "the name of an element of the circuit",
                },
                n,
            ))
    }

    /// The element with this name.
    ///
    /// # Errors
    /// As [`Circuit::element_index`].
    pub fn element(&self, name: &str) -> CircuitResult<&Element> {
        let i = self.element_index(name)?;
        self.elements
            .get(i)
            .ok_or(CircuitError::from(Error::UnknownName {
                param: "element",
                expected: "",
            }))
    }

    fn push_node(&mut self, name: Name, internal: bool) -> CircuitResult<usize> {
        let limit = if internal {
            MAX_NODES + INTERNAL_SLACK
        } else {
            MAX_NODES
        };
        if self.nodes.len() > limit {
            return Err(CircuitError::new(
                Error::TooLarge {
                    param: "nodes",
                    limit: MAX_NODES as u64,
                },
                name,
            ));
        }
        self.nodes.push(name);
        Ok(self.nodes.len() - 1)
    }

    fn node_or_add(&mut self, name: Name, internal: bool) -> CircuitResult<usize> {
        if name.is_ground() {
            return Ok(0);
        }
        if let Some(i) = self.nodes.iter().position(|&x| x == name) {
            return Ok(i);
        }
        if self.strict_nodes && !internal {
            return Err(CircuitError::new(
                Error::UnknownName {
                    param: "node",
                    expected: "a node declared in the circuit's node list",
                },
                name,
            ));
        }
        self.push_node(name, internal)
    }

    /// Add an element after checking everything about it. `internal` elements
    /// (test sources of the analyses) may use the slack above the limits and
    /// names starting with `#`.
    #[allow(clippy::too_many_arguments)]
    pub(crate) fn add(
        &mut self,
        name: Name,
        kind: ElementKind,
        a: &str,
        b: &str,
        control: Option<ControlSpec<'_>>,
        value: f64,
        value_im: f64,
        internal: bool,
    ) -> CircuitResult<()> {
        let named = |error: Error| CircuitError::new(error, name);
        if self.elements.iter().any(|e| e.name == name) {
            return Err(named(Error::OutOfDomain {
                param: "name",
                requirement: "is used twice; element names must be unique",
            }));
        }
        let slack = if internal { INTERNAL_SLACK } else { 0 };
        if self.elements.len() >= MAX_ELEMENTS + slack {
            return Err(named(Error::TooLarge {
                param: "elements",
                limit: MAX_ELEMENTS as u64,
            }));
        }
        if kind.has_branch()
            && self.elements.iter().filter(|e| e.kind.has_branch()).count() >= MAX_BRANCHES + slack
        {
            return Err(named(Error::TooLarge {
                param: "branches",
                limit: MAX_BRANCHES as u64,
            }));
        }
        check_value(kind, value, value_im).map_err(named)?;
        let na = self.node_or_add(
            Name::new(a).or_else(|e| {
                if internal {
                    Ok(Name::truncated(a))
                } else {
                    Err(e)
                }
            })?,
            internal,
        )?;
        let nb = self.node_or_add(
            Name::new(b).or_else(|e| {
                if internal {
                    Ok(Name::truncated(b))
                } else {
                    Err(e)
                }
            })?,
            internal,
        )?;
        if na == nb {
            return Err(named(Error::OutOfDomain {
                param: "nodes",
                requirement: "must be two different nodes",
            }));
        }
        let control = match (kind, control) {
            (ElementKind::Vcvs | ElementKind::Vccs, Some(ControlSpec::Nodes(cp, cn))) => {
                let p = self.node_or_add(Name::new(cp)?, internal)?;
                let n = self.node_or_add(Name::new(cn)?, internal)?;
                if p == n {
                    return Err(named(Error::OutOfDomain {
                        param: "control",
                        requirement: "must be two different nodes",
                    }));
                }
                Control::Nodes([p, n])
            }
            (ElementKind::Ccvs | ElementKind::Cccs, Some(ControlSpec::Element(e))) => Control::Element(Name::new(e)?),
            (ElementKind::Vcvs | ElementKind::Vccs, _) => {
                return Err(named(Error::OutOfDomain {
                    param: "control",
                    requirement: "a voltage-controlled source needs two control nodes",
                }))
            }
            (ElementKind::Ccvs | ElementKind::Cccs, _) => {
                return Err(named(Error::OutOfDomain {
                    param: "controlElement",
                    requirement: "a current-controlled source needs the name of the element whose current controls it",
                }))
            }
            (ElementKind::Amplifier, Some(ControlSpec::Nodes(cp, cn))) => {
                let p = self.node_or_add(Name::new(cp)?, internal)?;
                let n = self.node_or_add(Name::new(cn)?, internal)?;
                if p == n {
                    return Err(named(Error::OutOfDomain {
                        param: "control",
                        requirement: "must be two different nodes",
                    }));
                }
                Control::Nodes([p, n])
            }
            (ElementKind::Amplifier, _) => {
                return Err(named(Error::OutOfDomain {
                    param: "control",
                    requirement: "an amplifier needs its two input nodes [+, −] as control",
                }))
            }
            (_, None) => Control::None,
            (_, Some(_)) => {
                return Err(named(Error::OutOfDomain {
                    param: "control",
                    requirement: "only controlled sources (vcvs, vccs, ccvs, cccs) take a control",
                }))
            }
        };
        self.elements.push(Element {
            name,
            kind,
            nodes: [na, nb],
            control,
            value,
            value_im,
            amplifier: None,
            tolerance: None,
            tempco_ppm: None,
        });
        Ok(())
    }

    fn add_user(
        &mut self,
        name: &str,
        kind: ElementKind,
        a: &str,
        b: &str,
        control: Option<ControlSpec<'_>>,
        value: f64,
    ) -> CircuitResult<()> {
        let name = Name::new(name)?;
        self.add(name, kind, a, b, control, value, 0.0, false)
    }

    /// Add a resistor of `ohms` (> 0) between `a` and `b`.
    ///
    /// # Errors
    /// Bad or duplicate name, a value not greater than zero (param `value`), the
    /// same node twice, an undeclared node, a size limit.
    pub fn resistor(&mut self, name: &str, a: &str, b: &str, ohms: f64) -> CircuitResult<()> {
        self.add_user(name, ElementKind::Resistor, a, b, None, ohms)
    }

    /// Add a capacitor of `farads` (> 0). Errors as [`Circuit::resistor`].
    pub fn capacitor(&mut self, name: &str, a: &str, b: &str, farads: f64) -> CircuitResult<()> {
        self.add_user(name, ElementKind::Capacitor, a, b, None, farads)
    }

    /// Add an inductor of `henries` (> 0). Errors as [`Circuit::resistor`].
    pub fn inductor(&mut self, name: &str, a: &str, b: &str, henries: f64) -> CircuitResult<()> {
        self.add_user(name, ElementKind::Inductor, a, b, None, henries)
    }

    /// Add a voltage source: V(plus) − V(minus) = `volts`. Errors as [`Circuit::resistor`]
    /// (any finite value).
    pub fn voltage_source(
        &mut self,
        name: &str,
        plus: &str,
        minus: &str,
        volts: f64,
    ) -> CircuitResult<()> {
        self.add_user(name, ElementKind::VoltageSource, plus, minus, None, volts)
    }

    /// Add a current source: `amps` flow from `from` through the source to `to`.
    pub fn current_source(
        &mut self,
        name: &str,
        from: &str,
        to: &str,
        amps: f64,
    ) -> CircuitResult<()> {
        self.add_user(name, ElementKind::CurrentSource, from, to, None, amps)
    }

    /// Add a VCVS: V(a) − V(b) = gain·(V(cp) − V(cn)).
    pub fn vcvs(
        &mut self,
        name: &str,
        a: &str,
        b: &str,
        cp: &str,
        cn: &str,
        gain: f64,
    ) -> CircuitResult<()> {
        self.add_user(
            name,
            ElementKind::Vcvs,
            a,
            b,
            Some(ControlSpec::Nodes(cp, cn)),
            gain,
        )
    }

    /// Add a VCCS: gm·(V(cp) − V(cn)) flows from `a` through the source to `b`.
    pub fn vccs(
        &mut self,
        name: &str,
        a: &str,
        b: &str,
        cp: &str,
        cn: &str,
        gm: f64,
    ) -> CircuitResult<()> {
        self.add_user(
            name,
            ElementKind::Vccs,
            a,
            b,
            Some(ControlSpec::Nodes(cp, cn)),
            gm,
        )
    }

    /// Add a CCVS: V(a) − V(b) = rm·I(`control`).
    pub fn ccvs(
        &mut self,
        name: &str,
        a: &str,
        b: &str,
        control: &str,
        rm: f64,
    ) -> CircuitResult<()> {
        self.add_user(
            name,
            ElementKind::Ccvs,
            a,
            b,
            Some(ControlSpec::Element(control)),
            rm,
        )
    }

    /// Add a CCCS: gain·I(`control`) flows from `a` through the source to `b`.
    pub fn cccs(
        &mut self,
        name: &str,
        a: &str,
        b: &str,
        control: &str,
        gain: f64,
    ) -> CircuitResult<()> {
        self.add_user(
            name,
            ElementKind::Cccs,
            a,
            b,
            Some(ControlSpec::Element(control)),
            gain,
        )
    }

    /// Add a fixed complex admittance `re + j·im` siemens (re ≥ 0).
    pub fn admittance(
        &mut self,
        name: &str,
        a: &str,
        b: &str,
        re: f64,
        im: f64,
    ) -> CircuitResult<()> {
        let name = Name::new(name)?;
        self.add(name, ElementKind::Admittance, a, b, None, re, im, false)
    }

    /// Add an element of any kind (the JSON reader's entry point).
    #[allow(clippy::too_many_arguments)]
    pub fn add_element(
        &mut self,
        name: &str,
        kind: ElementKind,
        a: &str,
        b: &str,
        control: Option<ControlSpec<'_>>,
        value: f64,
        value_im: f64,
    ) -> CircuitResult<()> {
        let name = Name::new(name)?;
        if kind == ElementKind::Amplifier {
            return Err(CircuitError::new(
                Error::OutOfDomain {
                    param: "kind",
                    requirement: "an amplifier is added with its model (Circuit::amplifier)",
                },
                name,
            ));
        }
        self.add(name, kind, a, b, control, value, value_im, false)
    }

    /// Add an amplifier: V(out) − V(reference) = A(jω)·(V(plus) − V(minus))
    /// behind the model's output resistance, with Rd and Cd between `plus` and
    /// `minus` and Rcm and Ccm from each of them to ground; `point` chooses the
    /// point of the A0 spread. Its current is the current flowing into its
    /// `out` terminal (through the output resistance to `reference`).
    ///
    /// # Errors
    /// The model's own errors ([`Amplifier::validate`], naming the field and
    /// this element); as [`Circuit::resistor`] for names and nodes.
    ///
    /// # Example
    /// ```
    /// use loopwright::circuit::{solve, Circuit};
    /// use loopwright::stage::{Amplifier, Spread, SpreadPoint};
    /// let opamp = Amplifier::from_gbw(Spread::fixed(1e5), 1e6).with_input(Some(1e6), 0.0, None, 0.0);
    /// let mut c = Circuit::new();
    /// c.voltage_source("Vs", "in", "0", 1.0).unwrap();
    /// c.amplifier("U1", "out", "0", "in", "out", opamp.clone(), SpreadPoint::Typ).unwrap();
    /// // A follower: V(out) = A/(1 + A) at low frequency.
    /// let v = solve(&c, 0.01).unwrap().voltage("out").unwrap();
    /// assert!((v.norm() - 1e5 / (1.0 + 1e5)).abs() < 1e-9);
    /// let e = c.amplifier("U2", "x", "0", "in", "out", opamp.with_ro(-1.0), SpreadPoint::Typ);
    /// assert_eq!(e.unwrap_err().error.param(), "ro");
    /// ```
    #[allow(clippy::too_many_arguments)]
    pub fn amplifier(
        &mut self,
        name: &str,
        out: &str,
        reference: &str,
        plus: &str,
        minus: &str,
        model: Amplifier,
        point: SpreadPoint,
    ) -> CircuitResult<()> {
        let n = Name::new(name)?;
        model.validate().map_err(|e| CircuitError::new(e, n))?;
        let part = AmplifierPart {
            model,
            point,
            test_value: None,
        };
        let states: usize = self
            .elements
            .iter()
            .filter_map(|e| e.amplifier())
            .map(super::amplifier_stamp::internal_unknowns)
            .sum::<usize>()
            + super::amplifier_stamp::internal_unknowns(&part);
        if states > MAX_AMPLIFIER_STATES {
            return Err(CircuitError::new(
                Error::TooLarge {
                    param: "model",
                    limit: MAX_AMPLIFIER_STATES as u64,
                },
                n,
            ));
        }
        let model = &part.model;
        let gain = model.a0.at(point);
        self.add(
            n,
            ElementKind::Amplifier,
            out,
            reference,
            Some(ControlSpec::Nodes(plus, minus)),
            gain,
            0.0,
            false,
        )?;
        if let Some(e) = self.elements.last_mut() {
            e.amplifier = Some(Box::new(part));
        }
        Ok(())
    }

    /// Give the named element a tolerance and a temperature coefficient
    /// (ppm/K); `None` leaves that one unset.
    ///
    /// # Errors
    /// Unknown element; a tolerance or tempco that does not validate (params
    /// `tolerance`, `tempco`, naming the element); a tolerance on an amplifier
    /// (its spread is in its model's A0 min/typ/max).
    pub fn set_spread(
        &mut self,
        name: &str,
        tolerance: Option<Tolerance>,
        tempco_ppm: Option<f64>,
    ) -> CircuitResult<()> {
        let i = self.element_index(name)?;
        if let Some(e) = self.elements.get_mut(i) {
            let named = |err: Error| CircuitError::new(err, e.name);
            if let Some(t) = tolerance {
                if e.kind == ElementKind::Amplifier {
                    return Err(named(Error::OutOfDomain {
                        param: "tolerance",
                        requirement:
                            "an amplifier's spread is its model's a0 min/typ/max, not a tolerance",
                    }));
                }
                t.validate(e.value).map_err(named)?;
            }
            if let Some(tc) = tempco_ppm {
                validate_tempco(tc).map_err(named)?;
            }
            e.tolerance = tolerance;
            e.tempco_ppm = tempco_ppm;
        }
        Ok(())
    }

    /// A copy without the named element; nodes that no remaining element uses
    /// are dropped too (so removing a source and its resistor leaves no floating node).
    ///
    /// # Errors
    /// Unknown element name.
    pub fn without(&self, name: &str) -> CircuitResult<Circuit> {
        self.without_each(&[name])
    }

    /// A copy without each of the named elements, as [`Circuit::without`] applied
    /// for each in turn (the same nodes, in the same order) with one copy.
    ///
    /// # Errors
    /// The first unknown element name.
    pub(crate) fn without_each(&self, names: &[&str]) -> CircuitResult<Circuit> {
        let mut gone = Vec::with_capacity(names.len());
        for name in names {
            gone.push(self.element_index(name)?);
        }
        let mut c = Circuit {
            nodes: self.nodes.clone(),
            elements: self
                .elements
                .iter()
                .enumerate()
                .filter(|(i, _)| !gone.contains(i))
                .map(|(_, e)| e.clone())
                .collect(),
            strict_nodes: self.strict_nodes,
        };
        let mut used = alloc::vec![false; c.nodes.len()];
        let mut mark = |k: usize| {
            if let Some(u) = used.get_mut(k) {
                *u = true;
            }
        };
        mark(0);
        for e in &c.elements {
            e.nodes.iter().for_each(|&k| mark(k));
            if let Control::Nodes(ns) = e.control {
                ns.iter().for_each(|&k| mark(k));
            }
        }
        let mut new_index = alloc::vec![0usize; c.nodes.len()];
        let mut kept = Vec::with_capacity(c.nodes.len());
        for (k, (&name, &u)) in c.nodes.iter().zip(used.iter()).enumerate() {
            if u {
                if let Some(slot) = new_index.get_mut(k) {
                    *slot = kept.len();
                }
                kept.push(name);
            }
        }
        let remap = |k: usize| new_index.get(k).copied().unwrap_or(0);
        for e in &mut c.elements {
            e.nodes = [remap(e.nodes[0]), remap(e.nodes[1])];
            if let Control::Nodes([p, n]) = e.control {
                e.control = Control::Nodes([remap(p), remap(n)]);
            }
        }
        c.nodes = kept;
        Ok(c)
    }

    /// A copy with the named element's value replaced (same checks as when adding).
    ///
    /// # Errors
    /// Unknown element name; a value its kind does not accept; an amplifier
    /// element (its gain is its model's).
    pub fn with_value(&self, name: &str, value: f64) -> CircuitResult<Circuit> {
        let i = self.element_index(name)?;
        let mut c = self.clone();
        if let Some(e) = c.elements.get_mut(i) {
            if e.kind == ElementKind::Amplifier {
                return Err(CircuitError::new(
                    Error::OutOfDomain {
                        param: "value",
                        requirement:
                            "an amplifier's gain is its model's a0; change the model instead",
                    },
                    e.name,
                ));
            }
            check_value(e.kind, value, e.value_im).map_err(|err| CircuitError::new(err, e.name))?;
            e.value = value;
        }
        Ok(c)
    }

    /// Replace element `i` by an independent source of the same output kind and
    /// value `value`, keeping name and nodes (used by the return-ratio analyses).
    pub(crate) fn replace_with_source(&mut self, i: usize, value: f64) {
        if let Some(e) = self.elements.get_mut(i) {
            if let Some(part) = e.amplifier.as_mut() {
                part.test_value = Some(value);
                return;
            }
            e.kind = match e.kind {
                ElementKind::Vcvs | ElementKind::Ccvs | ElementKind::VoltageSource => {
                    ElementKind::VoltageSource
                }
                _ => ElementKind::CurrentSource,
            };
            e.control = Control::None;
            e.value = value;
        }
    }

    /// Room for `elements` more elements and as many more nodes, so that the
    /// adds that follow do not grow the storage step by step.
    pub(crate) fn reserve(&mut self, elements: usize) {
        self.elements.reserve(elements);
        self.nodes.reserve(elements);
    }

    /// Set every independent source to zero (V sources become shorts, I sources opens).
    pub(crate) fn zero_sources(&mut self) {
        for e in &mut self.elements {
            if e.kind.is_independent() {
                e.value = 0.0;
            }
        }
    }

    /// Add an internal element whose name starts with `#` (never clashes).
    pub(crate) fn add_internal(
        &mut self,
        tag: &str,
        kind: ElementKind,
        a: &str,
        b: &str,
        value: f64,
    ) -> CircuitResult<Name> {
        let name = Name::internal(tag);
        self.add(name, kind, a, b, None, value, 0.0, true)?;
        Ok(name)
    }
}

/// The control of a controlled source, as given by the caller.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ControlSpec<'a> {
    /// Control voltage between two nodes (c+, c−).
    Nodes(&'a str, &'a str),
    /// Control current of the named element.
    Element(&'a str),
}

fn check_value(kind: ElementKind, value: f64, value_im: f64) -> crate::Result<()> {
    use crate::check;
    match kind {
        ElementKind::Resistor | ElementKind::Capacitor | ElementKind::Inductor => {
            check::positive("value", value)?;
        }
        ElementKind::Admittance => {
            check::non_negative("value", value)?;
            check::finite("valueIm", value_im)?;
        }
        ElementKind::Amplifier => {
            check::positive("value", value)?;
        }
        _ => {
            check::finite("value", value)?;
        }
    }
    if kind != ElementKind::Admittance && value_im != 0.0 {
        return Err(Error::OutOfDomain {
            param: "valueIm",
            requirement: "only an admittance has an imaginary part",
        });
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn builds_nodes_in_order_of_first_use() {
        let mut c = Circuit::new();
        c.resistor("R1", "a", "b", 1.0).unwrap();
        c.vcvs("E1", "c", "gnd", "a", "b", 10.0).unwrap();
        let names: Vec<&str> = c.nodes().iter().map(|n| n.as_str()).collect();
        assert_eq!(names, ["0", "a", "b", "c"]);
        assert_eq!(c.node_index("GND").unwrap(), 0);
        assert_eq!(c.element("E1").unwrap().control(), Control::Nodes([1, 2]));
    }

    #[test]
    fn refuses_bad_elements_naming_them() {
        let mut c = Circuit::new();
        c.resistor("R1", "a", "0", 1.0).unwrap();
        let e = c.resistor("R1", "a", "0", 2.0).unwrap_err();
        assert_eq!((e.name.as_str(), e.error.param()), ("R1", "name"));
        let e = c.resistor("R2", "a", "0", -1.0).unwrap_err();
        assert_eq!((e.name.as_str(), e.error.code()), ("R2", "out_of_domain"));
        assert_eq!(
            c.capacitor("C1", "a", "0", 0.0).unwrap_err().name.as_str(),
            "C1"
        );
        assert_eq!(
            c.resistor("R3", "a", "a", 1.0).unwrap_err().error.param(),
            "nodes"
        );
        assert_eq!(
            c.voltage_source("V1", "a", "0", f64::NAN)
                .unwrap_err()
                .error
                .code(),
            "not_finite"
        );
        assert_eq!(c.node_index("zz").unwrap_err().name.as_str(), "zz");
        assert_eq!(
            c.element_index("R9").unwrap_err().error.code(),
            "unknown_name"
        );
        assert_eq!(
            c.admittance("Y1", "a", "0", -1.0, 0.0)
                .unwrap_err()
                .error
                .param(),
            "value"
        );
    }

    #[test]
    fn removing_elements_drops_their_unused_nodes() {
        let mut c = Circuit::new();
        c.voltage_source("V1", "s", "0", 1.0).unwrap();
        c.resistor("R1", "s", "a", 1.0).unwrap();
        c.vcvs("E1", "b", "0", "a", "0", 2.0).unwrap();
        c.resistor("R2", "b", "0", 1.0).unwrap();
        let d = c.without("V1").unwrap().without("R1").unwrap();
        let names: Vec<&str> = d.nodes().iter().map(|n| n.as_str()).collect();
        assert_eq!(names, ["0", "a", "b"]);
        assert_eq!(d.element("E1").unwrap().control(), Control::Nodes([1, 0]));
        assert_eq!(d.element("E1").unwrap().nodes(), [2, 0]);
    }

    #[test]
    fn declared_nodes_are_enforced() {
        let mut c = Circuit::with_nodes(&["in", "out"]).unwrap();
        c.resistor("R1", "in", "out", 1.0).unwrap();
        let e = c.resistor("R2", "out", "typo", 1.0).unwrap_err();
        assert_eq!((e.name.as_str(), e.error.code()), ("typo", "unknown_name"));
        assert_eq!(
            Circuit::with_nodes(&["a", "a"]).unwrap_err().name.as_str(),
            "a"
        );
    }

    #[test]
    fn size_limits_hold() {
        let mut c = Circuit::new();
        let mut names = alloc::vec::Vec::new();
        for i in 0..=MAX_NODES {
            names.push(alloc::format!("n{i}"));
        }
        let mut err = None;
        for (i, pair) in names.windows(2).enumerate() {
            if let Err(e) = c.resistor(&alloc::format!("R{i}"), &pair[0], &pair[1], 1.0) {
                err = Some(e);
                break;
            }
        }
        assert_eq!(
            err.map(|e| e.error),
            Some(Error::TooLarge {
                param: "nodes",
                limit: MAX_NODES as u64
            })
        );
        let mut c = Circuit::new();
        for i in 0..MAX_BRANCHES {
            c.voltage_source(&alloc::format!("V{i}"), "a", "0", 0.0)
                .unwrap();
        }
        assert_eq!(
            c.voltage_source("Vx", "a", "0", 0.0)
                .unwrap_err()
                .error
                .param(),
            "branches"
        );
    }
}
