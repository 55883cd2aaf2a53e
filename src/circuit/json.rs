//! The circuit JSON document, versions 1 and 2: read and write.
//!
//! ```json
//! {
//!   "format": "loopwright-circuit",
//!   "version": 1,
//!   "nodes": ["in", "out"],
//!   "elements": [
//!     { "name": "V1", "kind": "voltage-source", "nodes": ["in", "0"], "value": 1 },
//!     { "name": "R1", "kind": "resistor", "nodes": ["in", "out"], "value": "4k7" },
//!     { "name": "E1", "kind": "vcvs", "nodes": ["x", "0"], "control": ["out", "0"], "value": 1e5 },
//!     { "name": "H1", "kind": "ccvs", "nodes": ["y", "0"], "controlElement": "V1", "value": "1k" }
//!   ]
//! }
//! ```
//! The full description, with every kind and its sign convention, is in
//! `docs/circuit.md`. `nodes` is optional: when present, it is the complete
//! list of nodes besides ground and an element naming any other node is an
//! error; when absent, nodes are created as elements name them. Values are
//! numbers or texts read by [`super::parse_value`]. Unknown fields are refused
//! so that a typo does not pass silently. The writer emits numbers with the
//! shortest text that reads back to the same f64, so `read(write(c)) == c`.
//! Version 2 adds the `amplifier` element (its `model` read by
//! [`crate::stage::amplifier_json`]) and `tolerance` and `tempco` on any
//! element; a circuit without them is written as version 1.
//!
//! Reading and writing go through the crate's one JSON reader and writer
//! ([`crate::json`]); the writer keeps the bytes these documents have always
//! had (members in code-point order of their names, `4700.0`).

use super::error::{CircuitError, CircuitResult, Name, WithName};
use super::netlist::{Circuit, Control, ControlSpec, ElementKind, MAX_ELEMENTS, MAX_NODES};
use super::tolerance::{Tolerance, DISTRIBUTION_NAMES};
use super::value::parse_value_in;
use crate::error::Error;
use crate::json::{self, Json, JsonError, JsonWriter, Members, NumberText};
use crate::notation::Unit;
use crate::stage::amplifier_json::{
    at_element, number as amp_number, read_amplifier, reject_unknown, write_amplifier, Object,
};
use crate::stage::SpreadPoint;
use alloc::string::String;
use alloc::vec::Vec;

/// The `format` field's value.
pub const FORMAT: &str = "loopwright-circuit";
/// The newest version this reader reads and its writer writes (version 1
/// documents still read, and a circuit without version-2 features is written as 1).
pub const VERSION: u64 = 2;
/// Longest document accepted, in bytes.
pub const MAX_JSON_LEN: usize = 256 * 1024;

const ELEMENT_FIELDS: &str = "name, kind, nodes, value, valueIm, control, controlElement, and in version 2 model, spreadPoint, tolerance, tempco";
const ELEMENT_KEYS: [&str; 11] = [
    "name",
    "kind",
    "nodes",
    "value",
    "valueIm",
    "control",
    "controlElement",
    "model",
    "spreadPoint",
    "tolerance",
    "tempco",
];
/// Element fields that need version 2.
const V2_KEYS: [&str; 4] = ["model", "spreadPoint", "tolerance", "tempco"];
const DOCUMENT_FIELDS: &str = "format, version, nodes, elements";

fn err(error: Error) -> CircuitError {
    CircuitError::from(error)
}

/// The error of a text that is not JSON: param `json`, the name gives
/// line:column of the first character that is wrong.
pub(crate) fn syntax_error(e: &JsonError) -> CircuitError {
    CircuitError::named(
        Error::OutOfDomain {
            param: "json",
            requirement: "must be valid JSON text (the name gives line:column)",
        },
        &alloc::format!("{}:{}", e.line, e.col),
    )
}

fn text<'a>(v: Option<&'a Json>, param: &'static str, name: Name) -> CircuitResult<&'a str> {
    v.and_then(Json::as_str).ok_or(CircuitError::new(
        Error::OutOfDomain {
            param,
            requirement: "must be a text",
        },
        name,
    ))
}

fn pair<'a>(
    v: Option<&'a Json>,
    param: &'static str,
    name: Name,
) -> CircuitResult<(&'a str, &'a str)> {
    let bad = CircuitError::new(
        Error::OutOfDomain {
            param,
            requirement: "must be a list of two node names",
        },
        name,
    );
    match v.and_then(Json::as_array) {
        Some([a, b]) => Ok((a.as_str().ok_or(bad)?, b.as_str().ok_or(bad)?)),
        _ => Err(bad),
    }
}

/// The unit an element's value is declared in, for the reader's check.
fn declared_unit(kind: ElementKind) -> Option<Unit> {
    match kind {
        ElementKind::Resistor => Some(Unit::Ohm),
        ElementKind::Capacitor => Some(Unit::Farad),
        ElementKind::Inductor => Some(Unit::Henry),
        ElementKind::VoltageSource => Some(Unit::Volt),
        ElementKind::CurrentSource => Some(Unit::Ampere),
        ElementKind::Admittance => Some(Unit::Siemens),
        _ => None,
    }
}

fn number(
    v: Option<&Json>,
    param: &'static str,
    name: Name,
    unit: Option<Unit>,
) -> CircuitResult<f64> {
    match v {
        Some(Json::Number(n)) => Ok(n.value),
        Some(Json::String(s)) => parse_value_in(param, s, unit).named(name),
        _ => Err(CircuitError::new(
            Error::OutOfDomain {
                param,
                requirement: "must be a number or a value text such as 4k7 or 100n",
            },
            name,
        )),
    }
}

/// Read a circuit document.
///
/// # Errors
/// Text that is not JSON (param `json`, the name field says where); a document
/// that is too long ([`MAX_JSON_LEN`]), of another `format`, or of a `version`
/// other than 1; a missing or malformed field (param is the field, name the
/// element); any error of building the circuit (duplicate names, negative
/// resistance, undeclared nodes, limits), naming the element or node.
///
/// # Example
/// ```
/// use loopwright::circuit::json::{read_circuit, write_circuit};
/// let doc = r#"{"format":"loopwright-circuit","version":1,"elements":[
///   {"name":"R1","kind":"resistor","nodes":["a","0"],"value":"4k7"}]}"#;
/// let c = read_circuit(doc).unwrap();
/// assert_eq!(c.element("R1").unwrap().value(), 4700.0);
/// assert_eq!(read_circuit(&write_circuit(&c)).unwrap(), c);
/// let v3 = doc.replace("\"version\":1", "\"version\":3");
/// assert_eq!(read_circuit(&v3).unwrap_err().error.param(), "version");
/// ```
pub fn read_circuit(json: &str) -> CircuitResult<Circuit> {
    if json.len() > MAX_JSON_LEN {
        return Err(err(Error::TooLarge {
            param: "json",
            limit: MAX_JSON_LEN as u64,
        }));
    }
    let doc = json::parse(json).map_err(|e| syntax_error(&e))?;
    let obj = doc.as_object().ok_or(err(Error::OutOfDomain {
        param: "json",
        requirement: "must be a JSON object",
    }))?;
    reject_unknown(
        obj,
        &["format", "version", "nodes", "elements"],
        DOCUMENT_FIELDS,
    )?;
    if obj.field("format").and_then(Json::as_str) != Some(FORMAT) {
        return Err(err(Error::UnknownName {
            param: "format",
            expected: FORMAT,
        }));
    }
    let version = match obj.field("version").and_then(Json::as_u64) {
        Some(v @ 1..=VERSION) => v,
        _ => return Err(err(Error::OutOfDomain {
            param: "version",
            requirement:
                "must be 1 or 2, the versions of the loopwright-circuit format this reader knows",
        })),
    };
    let mut circuit = match obj.field("nodes") {
        None => Circuit::new(),
        Some(list) => {
            let list = list.as_array().ok_or(err(Error::OutOfDomain {
                param: "nodes",
                requirement: "must be a list of node names",
            }))?;
            if list.len() > MAX_NODES + 1 {
                return Err(err(Error::TooLarge {
                    param: "nodes",
                    limit: MAX_NODES as u64,
                }));
            }
            let mut names: Vec<&str> = Vec::with_capacity(list.len());
            for v in list {
                names.push(v.as_str().ok_or(err(Error::OutOfDomain {
                    param: "nodes",
                    requirement: "must be a list of node names",
                }))?);
            }
            Circuit::with_nodes(&names)?
        }
    };
    let elements =
        obj.field("elements")
            .and_then(Json::as_array)
            .ok_or(err(Error::OutOfDomain {
                param: "elements",
                requirement: "must be a list of elements",
            }))?;
    if elements.len() > MAX_ELEMENTS {
        return Err(err(Error::TooLarge {
            param: "elements",
            limit: MAX_ELEMENTS as u64,
        }));
    }
    for (i, e) in elements.iter().enumerate() {
        read_element(&mut circuit, e, i, version)?;
    }
    Ok(circuit)
}

fn read_element(circuit: &mut Circuit, e: &Json, index: usize, version: u64) -> CircuitResult<()> {
    let place = Name::truncated(&alloc::format!("elements[{index}]"));
    let obj = e.as_object().ok_or(CircuitError::new(
        Error::OutOfDomain {
            param: "element",
            requirement: "must be a JSON object",
        },
        place,
    ))?;
    let name_text = text(obj.field("name"), "name", place)?;
    let name = Name::new(name_text)?;
    reject_unknown(obj, &ELEMENT_KEYS, ELEMENT_FIELDS)?;
    let kind = ElementKind::from_name(text(obj.field("kind"), "kind", name)?).named(name)?;
    if version < 2 && (kind == ElementKind::Amplifier || V2_KEYS.iter().any(|k| obj.has(k))) {
        return Err(CircuitError::new(
            Error::OutOfDomain {
                param: "version",
                requirement:
                    "amplifier elements, model, spreadPoint, tolerance and tempco need version 2",
            },
            name,
        ));
    }
    let (a, b) = pair(obj.field("nodes"), "nodes", name)?;
    if kind == ElementKind::Amplifier {
        read_amplifier_element(circuit, obj, name, (a, b))?;
        return read_spread(circuit, obj, name);
    }
    for key in ["model", "spreadPoint"] {
        if obj.has(key) {
            return Err(CircuitError::new(
                Error::OutOfDomain {
                    param: "model",
                    requirement: "model and spreadPoint belong to amplifier elements only",
                },
                name,
            ));
        }
    }
    let value = number(obj.field("value"), "value", name, declared_unit(kind))?;
    let value_im = match obj.field("valueIm") {
        None => 0.0,
        v => number(v, "valueIm", name, declared_unit(kind))?,
    };
    let control = match (obj.field("control"), obj.field("controlElement")) {
        (Some(_), Some(_)) => {
            return Err(CircuitError::new(
                Error::OutOfDomain {
                    param: "control",
                    requirement: "give either control or controlElement, not both",
                },
                name,
            ))
        }
        (Some(c), None) => {
            let (p, n) = pair(Some(c), "control", name)?;
            Some(ControlSpec::Nodes(p, n))
        }
        (None, Some(c)) => Some(ControlSpec::Element(c.as_str().ok_or(
            CircuitError::new(
                Error::OutOfDomain {
                    param: "controlElement",
                    requirement: "must be an element name",
                },
                name,
            ),
        )?)),
        (None, None) => None,
    };
    circuit.add_element(name_text, kind, a, b, control, value, value_im)?;
    read_spread(circuit, obj, name)
}

fn read_amplifier_element(
    circuit: &mut Circuit,
    obj: &Object,
    name: Name,
    (out, reference): (&str, &str),
) -> CircuitResult<()> {
    for key in ["value", "valueIm", "controlElement"] {
        if obj.has(key) {
            return Err(CircuitError::new(
                Error::OutOfDomain {
                    param: "value",
                    requirement: "an amplifier takes its gain from model.a0; give no value, valueIm or controlElement",
                },
                name,
            ));
        }
    }
    let (plus, minus) = pair(obj.field("control"), "control", name)?;
    let model = obj.field("model").ok_or(CircuitError::new(
        Error::OutOfDomain {
            param: "model",
            requirement: "an amplifier needs its model",
        },
        name,
    ))?;
    let model = read_amplifier(model).map_err(|e| at_element(e, name))?;
    let point = match obj.field("spreadPoint") {
        None => SpreadPoint::Typ,
        Some(p) => SpreadPoint::from_name("spreadPoint", p.as_str().unwrap_or("")).named(name)?,
    };
    circuit.amplifier(name.as_str(), out, reference, plus, minus, model, point)
}

fn read_spread(circuit: &mut Circuit, obj: &Object, name: Name) -> CircuitResult<()> {
    let tolerance = obj
        .field("tolerance")
        .map(|t| {
            let value = circuit.element(name.as_str())?.value();
            read_tolerance(t, value).map_err(|e| at_element(e, name))
        })
        .transpose()?;
    let tempco = obj
        .field("tempco")
        .map(|t| amp_number(t, "tempco").named(name))
        .transpose()?;
    if tolerance.is_some() || tempco.is_some() {
        circuit.set_spread(name.as_str(), tolerance, tempco)?;
    }
    Ok(())
}

/// `{"distribution": "uniform", "percent": p}`, `{"distribution": "normal",
/// "percent": p, "sigmas": k}` or `{"distribution": "limits", "min", "typ"?, "max"}`.
fn read_tolerance(v: &Json, value: f64) -> CircuitResult<Tolerance> {
    const P: &str = "tolerance";
    let o = v.as_object().ok_or(Error::OutOfDomain {
        param: P,
        requirement: "must be an object with a distribution",
    })?;
    let field = |k: &str| -> CircuitResult<f64> {
        Ok(o.field(k)
            .map(|x| amp_number(x, P))
            .transpose()?
            .ok_or(Error::OutOfDomain {
                param: P,
                requirement:
                    "is missing a field its distribution needs (percent; sigmas; min and max)",
            })?)
    };
    let dist = o.field("distribution").and_then(Json::as_str).unwrap_or("");
    let (t, keys): (Tolerance, &[&str]) = match dist {
        "uniform" => (
            Tolerance::Uniform {
                percent: field("percent")?,
            },
            &["distribution", "percent"],
        ),
        "normal" => (
            Tolerance::Normal {
                percent: field("percent")?,
                sigmas: field("sigmas")?,
            },
            &["distribution", "percent", "sigmas"],
        ),
        "limits" => {
            let (min, max) = (field("min")?, field("max")?);
            let typ = if o.has("typ") { field("typ")? } else { value };
            (
                Tolerance::Limits { min, typ, max },
                &["distribution", "min", "typ", "max"],
            )
        }
        _ => {
            return Err(CircuitError::from(Error::UnknownName {
                param: P,
                expected: DISTRIBUTION_NAMES,
            }))
        }
    };
    reject_unknown(o, keys, "distribution, percent, sigmas, min, typ, max")?;
    Ok(t)
}

/// Write a circuit document: version 1, or 2 when an element needs it (an
/// amplifier, a tolerance or a tempco). Canonical: compact JSON, elements in
/// order, the members of each object in code-point order of their names,
/// numbers as [`NumberText::WithFraction`] (`4700.0`, `1e-7`): the bytes these
/// documents have always been written in.
///
/// `nodes` is written only when the circuit declared its nodes
/// ([`Circuit::declares_nodes`]), so reading the text gives back an equal circuit.
pub fn write_circuit(c: &Circuit) -> String {
    let node_name = |i: usize| Json::from(c.nodes().get(i).map_or("0", |n| n.as_str()));
    let v2 = c
        .elements()
        .iter()
        .any(|e| e.amplifier().is_some() || e.tolerance().is_some() || e.tempco_ppm().is_some());
    let mut doc: Vec<(String, Json)> = alloc::vec![
        ("format".into(), Json::from(FORMAT)),
        ("version".into(), Json::whole(if v2 { VERSION } else { 1 })),
    ];
    if c.declares_nodes() {
        let names = c.nodes().iter().skip(1).map(|n| Json::from(n.as_str()));
        doc.push(("nodes".into(), Json::Array(names.collect())));
    }
    let mut list = Vec::with_capacity(c.elements().len());
    for e in c.elements() {
        let [a, b] = e.nodes();
        let mut m: Vec<(String, Json)> = alloc::vec![
            ("name".into(), Json::from(e.name().as_str())),
            ("kind".into(), Json::from(e.kind().name())),
            (
                "nodes".into(),
                Json::Array(alloc::vec![node_name(a), node_name(b)]),
            ),
        ];
        match e.control() {
            Control::Nodes([p, n]) => m.push((
                "control".into(),
                Json::Array(alloc::vec![node_name(p), node_name(n)]),
            )),
            Control::Element(n) => m.push(("controlElement".into(), Json::from(n.as_str()))),
            Control::None => {}
        }
        if let Some(part) = e.amplifier() {
            m.push(("model".into(), write_amplifier(&part.model)));
            m.push(("spreadPoint".into(), Json::from(part.point.name())));
        } else {
            m.push(("value".into(), Json::from(e.value())));
        }
        if e.kind() == ElementKind::Admittance {
            m.push(("valueIm".into(), Json::from(e.value_im())));
        }
        if let Some(t) = e.tolerance() {
            m.push(("tolerance".into(), write_tolerance(t)));
        }
        if let Some(tc) = e.tempco_ppm() {
            m.push(("tempco".into(), Json::from(tc)));
        }
        list.push(Json::sorted_object(m));
    }
    doc.push(("elements".into(), Json::Array(list)));
    let mut w = JsonWriter::new().with_numbers(NumberText::WithFraction);
    w.value(&Json::sorted_object(doc));
    w.finish()
}

fn write_tolerance(t: Tolerance) -> Json {
    let mut o: Vec<(String, Json)> = alloc::vec![("distribution".into(), Json::from(t.name()))];
    let numbers: &[(&str, f64)] = match t {
        Tolerance::Uniform { percent } => &[("percent", percent)],
        Tolerance::Normal { percent, sigmas } => &[("percent", percent), ("sigmas", sigmas)],
        Tolerance::Limits { min, typ, max } => &[("min", min), ("typ", typ), ("max", max)],
    };
    o.extend(numbers.iter().map(|(k, v)| ((*k).into(), Json::from(*v))));
    Json::sorted_object(o)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::circuit::tolerance::Tolerance;

    const DOC: &str = r#"{"format":"loopwright-circuit","version":1,"elements":[
        {"name":"V1","kind":"voltage-source","nodes":["in","0"],"value":1},
        {"name":"R1","kind":"resistor","nodes":["in","out"],"value":"4k7"},
        {"name":"C1","kind":"capacitor","nodes":["out","0"],"value":"100n"},
        {"name":"L1","kind":"inductor","nodes":["out","x"],"value":"2.2mH"},
        {"name":"E1","kind":"vcvs","nodes":["x","0"],"control":["out","0"],"value":1e5},
        {"name":"G1","kind":"vccs","nodes":["x","0"],"control":["in","out"],"value":"10m"},
        {"name":"H1","kind":"ccvs","nodes":["y","0"],"controlElement":"V1","value":"1k"},
        {"name":"F1","kind":"cccs","nodes":["y","0"],"controlElement":"L1","value":-3},
        {"name":"Y1","kind":"admittance","nodes":["y","0"],"value":0.001,"valueIm":-0.002},
        {"name":"I1","kind":"current-source","nodes":["0","y"],"value":"1mA"}
    ]}"#;

    #[test]
    fn round_trips_every_kind() {
        let c = read_circuit(DOC).unwrap();
        assert_eq!(c.elements().len(), 10);
        // 4k7 and 2.2mH by the value rules; -3 kept as given.
        assert_eq!(c.element("R1").unwrap().value(), 4700.0);
        assert_eq!(c.element("L1").unwrap().value(), 2.2e-3);
        let text = write_circuit(&c);
        let back = read_circuit(&text).unwrap();
        assert_eq!(back, c);
        assert_eq!(write_circuit(&back), text);
        // Declared nodes survive the round trip too.
        let strict = DOC.replacen(
            "\"version\":1,",
            "\"version\":1,\"nodes\":[\"in\",\"out\",\"x\",\"y\"],",
            1,
        );
        let c = read_circuit(&strict).unwrap();
        assert!(c.declares_nodes());
        assert_eq!(read_circuit(&write_circuit(&c)).unwrap(), c);
    }

    #[test]
    fn the_writer_is_canonical_in_the_documented_order() {
        // Member order and number text as docs/circuit.md states them.
        let doc = r#"{"version":2,"elements":[{"value":"4k7","nodes":["a","0"],"kind":"resistor","name":"R1","tempco":-0.5,
            "tolerance":{"percent":1,"distribution":"uniform"}},
            {"controlElement":"R1","value":1e-7,"kind":"cccs","nodes":["a","0"],"name":"F1"}],"format":"loopwright-circuit"}"#;
        let want = concat!(
            r#"{"elements":["#,
            r#"{"kind":"resistor","name":"R1","nodes":["a","0"],"tempco":-0.5,"#,
            r#""tolerance":{"distribution":"uniform","percent":1.0},"value":4700.0},"#,
            r#"{"controlElement":"R1","kind":"cccs","name":"F1","nodes":["a","0"],"value":1e-7}],"#,
            r#""format":"loopwright-circuit","version":2}"#
        );
        let c = read_circuit(doc).unwrap();
        assert_eq!(write_circuit(&c), want);
        assert_eq!(write_circuit(&read_circuit(want).unwrap()), want);
    }

    #[test]
    fn a_field_given_twice_is_refused_by_name() {
        let x =
            read_circuit(&DOC.replace("\"value\":1e5", "\"value\":1e5,\"value\":2")).unwrap_err();
        assert_eq!((x.name.as_str(), x.error.param()), ("value", "field"));
        // `version` must be written as a whole number.
        let x = read_circuit(&DOC.replace("\"version\":1", "\"version\":1.0")).unwrap_err();
        assert_eq!(x.error.param(), "version");
    }

    #[test]
    fn the_documented_example_reads_and_solves() {
        let doc = include_str!("../../docs/circuit.md");
        let start = doc.find("```json").map(|i| i + 7).unwrap();
        let end = start + doc[start..].find("```").unwrap();
        let c = read_circuit(&doc[start..end]).unwrap();
        assert!(c.declares_nodes());
        assert_eq!(c.element("Rg").unwrap().value(), 4700.0);
        assert_eq!(c.element("Rs").unwrap().value(), 600.0);
        // A non-inverting stage of gain near 1 + 47k/4k7 = 11 at low frequency.
        let v = crate::circuit::solve(&c, 10.0)
            .unwrap()
            .voltage("out")
            .unwrap();
        assert!((v.norm() - 11.0).abs() < 0.01, "{v}");
    }

    const V2: &str = r#"{"format":"loopwright-circuit","version":2,"elements":[
        {"name":"Vs","kind":"voltage-source","nodes":["in","0"],"value":1,
         "tolerance":{"distribution":"normal","percent":0.1,"sigmas":3}},
        {"name":"U1","kind":"amplifier","nodes":["out","0"],"control":["in","fb"],
         "model":{"a0":{"min":5e4,"typ":2e5},"gbwHz":"10M","polesHz":["30M"],"rd":"1M","ro":60},
         "spreadPoint":"min"},
        {"name":"Rf","kind":"resistor","nodes":["out","fb"],"value":"9k",
         "tolerance":{"distribution":"uniform","percent":1},"tempco":25},
        {"name":"Rg","kind":"resistor","nodes":["fb","0"],"value":"1k",
         "tolerance":{"distribution":"limits","min":990,"max":1010},"tempco":-50}
    ]}"#;

    #[test]
    fn version_2_reads_amplifiers_and_spreads_and_writes_them_back() {
        let c = read_circuit(V2).unwrap();
        let u1 = c.element("U1").unwrap();
        let part = u1.amplifier().unwrap();
        assert_eq!((part.point, part.model.a0.max), (SpreadPoint::Min, 2e5));
        assert_eq!(u1.value(), 5e4); // the gain at the chosen point
        assert_eq!(
            c.element("Rg").unwrap().tolerance(),
            Some(Tolerance::Limits {
                min: 990.0,
                typ: 1000.0,
                max: 1010.0
            })
        );
        assert_eq!(c.element("Rf").unwrap().tempco_ppm(), Some(25.0));
        let text = write_circuit(&c);
        assert!(text.contains("\"version\":2"));
        assert_eq!(read_circuit(&text).unwrap(), c);
        // A non-inverting gain of 10 at low frequency (1 + 9k/1k, A0 = 5e4).
        let v = crate::circuit::solve(&c, 1.0)
            .unwrap()
            .voltage("out")
            .unwrap();
        assert!((v.norm() - 10.0).abs() < 10.0 * 11.0 / 5e4, "{v}");
        // A circuit without version-2 features is still written as version 1.
        let plain = read_circuit(DOC).unwrap();
        assert!(write_circuit(&plain).contains("\"version\":1"));
    }

    #[test]
    fn the_documented_version_2_example_reads_and_solves() {
        let doc = include_str!("../../docs/circuit.md");
        let v2 = &doc[doc.find("# Version 2").unwrap()..];
        let start = v2.find("```json").map(|i| i + 7).unwrap();
        let end = start + v2[start..].find("```").unwrap();
        let c = read_circuit(&v2[start..end]).unwrap();
        assert_eq!(c.element("U1").unwrap().amplifier().unwrap().model.ro, 60.0);
        // Non-inverting, 1 + 9.09k/1k = 10.09 at low frequency (A0 = 2e5).
        let v = crate::circuit::solve(&c, 1.0)
            .unwrap()
            .voltage("out")
            .unwrap();
        assert!((v.norm() - 10.09).abs() < 10.09 * 1e-3, "{v}");
        assert_eq!(read_circuit(&write_circuit(&c)).unwrap(), c);
    }

    #[test]
    fn version_2_faults_name_the_element_and_field() {
        let e = |from: &str, to: &str| read_circuit(&V2.replace(from, to)).unwrap_err();
        let x = e("\"version\":2", "\"version\":1");
        assert_eq!((x.name.as_str(), x.error.param()), ("Vs", "version"));
        let x = e("\"percent\":1}", "\"percent\":-1}");
        assert_eq!((x.name.as_str(), x.error.param()), ("Rf", "tolerance"));
        let x = e("\"tempco\":25", "\"tempco\":\"x\"");
        assert_eq!((x.name.as_str(), x.error.param()), ("Rf", "tempco"));
        let x = e("\"gbwHz\":\"10M\"", "\"gbwHz\":\"-10M\"");
        assert_eq!((x.name.as_str(), x.error.param()), ("U1", "gbwHz"));
        let x = e("\"spreadPoint\":\"min\"", "\"spreadPoint\":\"low\"");
        assert_eq!((x.name.as_str(), x.error.param()), ("U1", "spreadPoint"));
        let x = e("\"control\":[\"in\",\"fb\"],", "");
        assert_eq!((x.name.as_str(), x.error.param()), ("U1", "control"));
        let x = e(
            "\"spreadPoint\":\"min\"",
            "\"spreadPoint\":\"min\",\"value\":3",
        );
        assert_eq!((x.name.as_str(), x.error.param()), ("U1", "value"));
        let x = e("\"distribution\":\"uniform\"", "\"distribution\":\"flat\"");
        assert_eq!((x.name.as_str(), x.error.param()), ("Rf", "tolerance"));
        let x = e("\"min\":990", "\"min\":1001");
        assert_eq!((x.name.as_str(), x.error.param()), ("Rg", "tolerance"));
        let x = e(",\"tempco\":25", ",\"model\":{}");
        assert_eq!((x.name.as_str(), x.error.param()), ("Rf", "model"));
    }

    #[test]
    fn bad_documents_name_the_fault() {
        let e = |doc: &str| read_circuit(doc).unwrap_err();
        assert_eq!(e("{").error.param(), "json");
        assert_eq!(e("[]").error.param(), "json");
        assert_eq!(
            e(&DOC.replace("loopwright-circuit", "other")).error.param(),
            "format"
        );
        assert_eq!(
            e(&DOC.replace("\"version\":1", "\"version\":7"))
                .error
                .param(),
            "version"
        );
        let x = e(&DOC.replace("\"value\":\"4k7\"", "\"value\":\"-4k7\""));
        assert_eq!((x.name.as_str(), x.error.param()), ("R1", "value"));
        let x = e(&DOC.replace("\"name\":\"C1\"", "\"name\":\"R1\""));
        assert_eq!((x.name.as_str(), x.error.param()), ("R1", "name"));
        // Unknown control elements are found when the circuit is solved (the
        // control may be listed after the source that uses it).
        let c =
            read_circuit(&DOC.replace("\"controlElement\":\"V1\"", "\"controlElement\":\"V9\""))
                .unwrap();
        let x = crate::circuit::solve(&c, 1.0).unwrap_err();
        assert_eq!((x.name.as_str(), x.error.param()), ("V9", "controlElement"));
        let x = e(&DOC.replace("\"kind\":\"inductor\"", "\"kind\":\"coil\""));
        assert_eq!((x.name.as_str(), x.error.param()), ("L1", "kind"));
        let x = e(&DOC.replace("\"value\":1e5", "\"value\":1e5,\"gain\":2"));
        assert_eq!((x.name.as_str(), x.error.param()), ("gain", "field"));
        let strict = DOC.replacen(
            "\"version\":1,",
            "\"version\":1,\"nodes\":[\"in\",\"out\",\"x\"],",
            1,
        );
        let x = e(&strict);
        assert_eq!((x.name.as_str(), x.error.code()), ("y", "unknown_name"));
        let x = e(&DOC.replace("\"nodes\":[\"in\",\"out\"]", "\"nodes\":[\"in\"]"));
        assert_eq!((x.name.as_str(), x.error.param()), ("R1", "nodes"));
        assert_eq!(e(&" ".repeat(MAX_JSON_LEN + 1)).error.code(), "too_large");
    }
}
