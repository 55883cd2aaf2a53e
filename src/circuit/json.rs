//! The circuit JSON document, version 1: read and write.
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
//!
//! Parsing uses `serde_json` with default features off and `alloc` on (no_std).

use super::error::{CircuitError, CircuitResult, Name, WithName};
use super::netlist::{Circuit, Control, ControlSpec, ElementKind, MAX_ELEMENTS, MAX_NODES};
use super::value::parse_value;
use crate::error::Error;
use alloc::string::String;
use alloc::vec::Vec;
use serde_json::{Map, Value};

/// The `format` field's value.
pub const FORMAT: &str = "loopwright-circuit";
/// The one version this reader reads and writes.
pub const VERSION: u64 = 1;
/// Longest document accepted, in bytes.
pub const MAX_JSON_LEN: usize = 256 * 1024;

const ELEMENT_FIELDS: &str = "name, kind, nodes, value, valueIm, control, controlElement";
const DOCUMENT_FIELDS: &str = "format, version, nodes, elements";

fn err(error: Error) -> CircuitError {
    CircuitError::from(error)
}

fn text<'a>(v: Option<&'a Value>, param: &'static str, name: Name) -> CircuitResult<&'a str> {
    v.and_then(Value::as_str).ok_or(CircuitError::new(
        Error::OutOfDomain {
            param,
            requirement: "must be a text",
        },
        name,
    ))
}

fn pair<'a>(
    v: Option<&'a Value>,
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
    match v.and_then(Value::as_array).map(Vec::as_slice) {
        Some([a, b]) => Ok((a.as_str().ok_or(bad)?, b.as_str().ok_or(bad)?)),
        _ => Err(bad),
    }
}

fn number(v: Option<&Value>, param: &'static str, name: Name) -> CircuitResult<f64> {
    match v {
        Some(Value::Number(n)) => n
            .as_f64()
            .ok_or(CircuitError::new(Error::NotFinite { param }, name)),
        Some(Value::String(s)) => parse_value(param, s).named(name),
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
/// let v2 = doc.replace("\"version\":1", "\"version\":2");
/// assert_eq!(read_circuit(&v2).unwrap_err().error.param(), "version");
/// ```
pub fn read_circuit(json: &str) -> CircuitResult<Circuit> {
    if json.len() > MAX_JSON_LEN {
        return Err(err(Error::TooLarge {
            param: "json",
            limit: MAX_JSON_LEN as u64,
        }));
    }
    let doc: Value = serde_json::from_str(json).map_err(|e| {
        CircuitError::named(
            Error::OutOfDomain {
                param: "json",
                requirement: "must be valid JSON text (the name gives line:column)",
            },
            &alloc::format!("{}:{}", e.line(), e.column()),
        )
    })?;
    let obj = doc.as_object().ok_or(err(Error::OutOfDomain {
        param: "json",
        requirement: "must be a JSON object",
    }))?;
    reject_unknown(
        obj,
        &["format", "version", "nodes", "elements"],
        DOCUMENT_FIELDS,
    )?;
    if obj.get("format").and_then(Value::as_str) != Some(FORMAT) {
        return Err(err(Error::UnknownName {
            param: "format",
            expected: FORMAT,
        }));
    }
    match obj.get("version").and_then(Value::as_u64) {
        Some(VERSION) => {}
        _ => {
            return Err(err(Error::OutOfDomain {
                param: "version",
                requirement:
                    "must be 1, the version of the loopwright-circuit format this reader knows",
            }))
        }
    }
    let mut circuit = match obj.get("nodes") {
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
        obj.get("elements")
            .and_then(Value::as_array)
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
        read_element(&mut circuit, e, i)?;
    }
    Ok(circuit)
}

fn reject_unknown(
    obj: &Map<String, Value>,
    known: &[&str],
    expected: &'static str,
) -> CircuitResult<()> {
    for key in obj.keys() {
        if !known.contains(&key.as_str()) {
            return Err(CircuitError::named(
                Error::UnknownName {
                    param: "field",
                    expected,
                },
                key,
            ));
        }
    }
    Ok(())
}

fn read_element(circuit: &mut Circuit, e: &Value, index: usize) -> CircuitResult<()> {
    let place = Name::truncated(&alloc::format!("elements[{index}]"));
    let obj = e.as_object().ok_or(CircuitError::new(
        Error::OutOfDomain {
            param: "element",
            requirement: "must be a JSON object",
        },
        place,
    ))?;
    let name_text = text(obj.get("name"), "name", place)?;
    let name = Name::new(name_text)?;
    reject_unknown(
        obj,
        &[
            "name",
            "kind",
            "nodes",
            "value",
            "valueIm",
            "control",
            "controlElement",
        ],
        ELEMENT_FIELDS,
    )?;
    let kind = ElementKind::from_name(text(obj.get("kind"), "kind", name)?).named(name)?;
    let (a, b) = pair(obj.get("nodes"), "nodes", name)?;
    let value = number(obj.get("value"), "value", name)?;
    let value_im = match obj.get("valueIm") {
        None => 0.0,
        v => number(v, "valueIm", name)?,
    };
    let control = match (obj.get("control"), obj.get("controlElement")) {
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
    circuit.add_element(name_text, kind, a, b, control, value, value_im)
}

/// Write a circuit as a version-1 document (compact JSON, elements in order).
///
/// `nodes` is written only when the circuit declared its nodes
/// ([`Circuit::declares_nodes`]), so reading the text gives back an equal circuit.
pub fn write_circuit(c: &Circuit) -> String {
    let node_name = |i: usize| Value::from(c.nodes().get(i).map(|n| n.as_str()).unwrap_or("0"));
    let mut doc = Map::new();
    doc.insert("format".into(), Value::from(FORMAT));
    doc.insert("version".into(), Value::from(VERSION));
    if c.declares_nodes() {
        doc.insert(
            "nodes".into(),
            Value::Array(
                c.nodes()
                    .iter()
                    .skip(1)
                    .map(|n| Value::from(n.as_str()))
                    .collect(),
            ),
        );
    }
    let mut list = Vec::with_capacity(c.elements().len());
    for e in c.elements() {
        let mut m = Map::new();
        m.insert("name".into(), Value::from(e.name().as_str()));
        m.insert("kind".into(), Value::from(e.kind().name()));
        let [a, b] = e.nodes();
        m.insert(
            "nodes".into(),
            Value::Array(alloc::vec![node_name(a), node_name(b)]),
        );
        match e.control() {
            Control::Nodes([p, n]) => {
                m.insert(
                    "control".into(),
                    Value::Array(alloc::vec![node_name(p), node_name(n)]),
                );
            }
            Control::Element(n) => {
                m.insert("controlElement".into(), Value::from(n.as_str()));
            }
            Control::None => {}
        }
        m.insert("value".into(), Value::from(e.value()));
        if e.kind() == ElementKind::Admittance {
            m.insert("valueIm".into(), Value::from(e.value_im()));
        }
        list.push(Value::Object(m));
    }
    doc.insert("elements".into(), Value::Array(list));
    // A Value built from strings and finite numbers always serializes.
    serde_json::to_string(&Value::Object(doc)).unwrap_or_default()
}

#[cfg(test)]
mod tests {
    use super::*;

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
