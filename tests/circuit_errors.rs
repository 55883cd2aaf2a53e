//! Bad input to the circuit area: every fault is a typed error that names the node
//! or element, never a panic or a NaN.

use loopwright::circuit::blackman::{asymptotic_gain, Output};
use loopwright::circuit::json::read_circuit;
use loopwright::circuit::{port_impedance, solve, CircuitError, MAX_ELEMENTS, MAX_NODES};

fn doc(elements: &str) -> String {
    format!(r#"{{"format":"loopwright-circuit","version":1,"elements":[{elements}]}}"#)
}

fn fault(json: &str, f: f64) -> CircuitError {
    match read_circuit(json) {
        Err(e) => e,
        Ok(c) => solve(&c, f).expect_err("the circuit should not solve"),
    }
}

fn expect(e: CircuitError, code: &str, param: &str, name: &str) {
    assert_eq!(
        (e.error.code(), e.error.param(), e.name.as_str()),
        (code, param, name),
        "{e}"
    );
    // The message names the culprit first.
    if !name.is_empty() {
        assert!(e.to_string().starts_with(name), "{e}");
    }
}

const SRC: &str = r#"{"name":"V1","kind":"voltage-source","nodes":["a","0"],"value":1},
{"name":"R1","kind":"resistor","nodes":["a","b"],"value":"1k"}"#;

#[test]
fn floating_nodes_are_named() {
    // A node reached only through a current source.
    let e = fault(
        &doc(&format!(
            r#"{SRC},{{"name":"I1","kind":"current-source","nodes":["b","c"],"value":1}},
        {{"name":"R2","kind":"resistor","nodes":["b","0"],"value":1}}"#
        )),
        1e3,
    );
    expect(e, "singular", "node", "c");
    // A node reached only through a capacitor floats at 0 Hz but not above.
    let json = doc(&format!(
        r#"{SRC},{{"name":"C1","kind":"capacitor","nodes":["b","c"],"value":"1n"}},
        {{"name":"R2","kind":"resistor","nodes":["c","d"],"value":1}},{{"name":"R3","kind":"resistor","nodes":["b","0"],"value":1}}"#
    ));
    expect(fault(&json, 0.0), "singular", "node", "c");
    assert!(solve(&read_circuit(&json).unwrap(), 1.0).is_ok());
    // A node used only as a control input.
    let e = fault(
        &doc(&format!(
            r#"{SRC},{{"name":"E1","kind":"vcvs","nodes":["b","0"],"control":["q","0"],"value":2}}"#
        )),
        0.0,
    );
    expect(e, "singular", "node", "q");
}

#[test]
fn voltage_source_loops_are_named() {
    // Two sources in parallel, and a source shorted by an inductor at 0 Hz.
    let e = fault(
        &doc(&format!(
            r#"{SRC},{{"name":"V2","kind":"voltage-source","nodes":["0","a"],"value":0}}"#
        )),
        50.0,
    );
    expect(e, "singular", "element", "V2");
    let json = doc(&format!(
        r#"{SRC},{{"name":"L1","kind":"inductor","nodes":["a","0"],"value":"1m"}}"#
    ));
    expect(fault(&json, 0.0), "singular", "element", "L1");
    assert!(solve(&read_circuit(&json).unwrap(), 50.0).is_ok());
    // A source with both ends on one node is refused when read.
    let e = fault(
        &doc(r#"{"name":"V1","kind":"voltage-source","nodes":["a","a"],"value":1}"#),
        0.0,
    );
    expect(e, "out_of_domain", "nodes", "V1");
}

#[test]
fn singular_systems_are_named_by_their_unknown() {
    // A VCVS that copies its own output (gain 1 around a loop of itself): every
    // voltage at node a satisfies it. The structure is fine; the LU finds it.
    let e = fault(
        &doc(
            r#"{"name":"E1","kind":"vcvs","nodes":["a","0"],"control":["a","0"],"value":1},
        {"name":"R1","kind":"resistor","nodes":["a","0"],"value":1}"#,
        ),
        0.0,
    );
    assert_eq!(e.error.code(), "singular");
    assert!(["a", "E1"].contains(&e.name.as_str()), "{e}");
    // A loop at exactly D = 0 (T = −1): k = −2 around a divider of one half. The
    // circuit's own equations are singular there, and the error names the loop's source.
    let mut c = loopwright::circuit::Circuit::new();
    c.voltage_source("Vs", "p", "0", 1.0).unwrap();
    c.vcvs("E", "o", "0", "p", "n", -2.0).unwrap();
    c.resistor("R1", "o", "n", 1e3).unwrap();
    c.resistor("R2", "n", "0", 1e3).unwrap();
    let e = asymptotic_gain(&c, "E", "Vs", Output::Voltage("o", "0"), 0.0).unwrap_err();
    assert!(matches!(e.error.code(), "singular" | "oscillation"), "{e}");
    assert!(["E", "o", "n"].contains(&e.name.as_str()), "{e}");
}

#[test]
fn unknown_and_duplicate_names() {
    let c = read_circuit(&doc(SRC)).unwrap();
    expect(
        port_impedance(&c, "b", "nowhere", 0.0).unwrap_err(),
        "unknown_name",
        "node",
        "nowhere",
    );
    expect(
        solve(&c, 0.0).unwrap().current("R9").unwrap_err(),
        "unknown_name",
        "element",
        "R9",
    );
    expect(
        c.without("X1").unwrap_err(),
        "unknown_name",
        "element",
        "X1",
    );
    let e = fault(
        &doc(&format!(
            r#"{SRC},{{"name":"H1","kind":"ccvs","nodes":["b","0"],"controlElement":"Vx","value":1}}"#
        )),
        0.0,
    );
    expect(e, "unknown_name", "controlElement", "Vx");
    let e = fault(
        &doc(&format!(
            r#"{SRC},{{"name":"R1","kind":"resistor","nodes":["b","0"],"value":1}}"#
        )),
        0.0,
    );
    expect(e, "out_of_domain", "name", "R1");
    let strict =
        r#"{"format":"loopwright-circuit","version":1,"nodes":["a","b","b"],"elements":[]}"#;
    expect(fault(strict, 0.0), "out_of_domain", "node", "b");
    let strict = format!(
        r#"{{"format":"loopwright-circuit","version":1,"nodes":["a"],"elements":[{SRC}]}}"#
    );
    expect(fault(&strict, 0.0), "unknown_name", "node", "b");
    let e = fault(
        &doc(r#"{"name":"Q1","kind":"transistor","nodes":["a","0"],"value":1}"#),
        0.0,
    );
    expect(e, "unknown_name", "kind", "Q1");
}

#[test]
fn bad_values_are_named() {
    let e = fault(
        &doc(&format!(
            r#"{SRC},{{"name":"R2","kind":"resistor","nodes":["b","0"],"value":"-4k7"}}"#
        )),
        0.0,
    );
    expect(e, "out_of_domain", "value", "R2");
    let e = fault(
        &doc(&format!(
            r#"{SRC},{{"name":"R2","kind":"resistor","nodes":["b","0"],"value":"4k7x"}}"#
        )),
        0.0,
    );
    expect(e, "syntax", "value", "R2");
    let e = fault(
        &doc(&format!(
            r#"{SRC},{{"name":"C2","kind":"capacitor","nodes":["b","0"],"value":0}}"#
        )),
        0.0,
    );
    expect(e, "out_of_domain", "value", "C2");
    let e = fault(
        &doc(&format!(
            r#"{SRC},{{"name":"R2","kind":"resistor","nodes":["b","0"],"value":1e999}}"#
        )),
        0.0,
    );
    assert!(
        e.error.code() == "out_of_domain" || e.error.code() == "not_finite",
        "{e}"
    );
    let c = read_circuit(&doc(SRC)).unwrap();
    expect(
        solve(&c, f64::NAN).unwrap_err(),
        "not_finite",
        "frequency",
        "",
    );
    expect(
        solve(&c, -1.0).unwrap_err(),
        "out_of_domain",
        "frequency",
        "",
    );
}

#[test]
fn schema_version_and_format_are_checked() {
    // Versions 1 and 2 read; the next one does not exist yet.
    let v3 = doc(SRC).replace("\"version\":1", "\"version\":3");
    expect(
        read_circuit(&v3).unwrap_err(),
        "out_of_domain",
        "version",
        "",
    );
    let other = doc(SRC).replace("loopwright-circuit", "some-netlist");
    expect(
        read_circuit(&other).unwrap_err(),
        "unknown_name",
        "format",
        "",
    );
    let e = read_circuit("{\"format\": ").unwrap_err();
    assert_eq!(e.error.param(), "json");
    assert!(e.name.as_str().contains(':'), "line:column in {e}");
}

#[test]
fn size_limits_are_stated_and_enforced() {
    // One more node than the limit, each on its own resistor to ground.
    let many: Vec<String> = (0..=MAX_NODES)
        .map(|i| format!(r#"{{"name":"R{i}","kind":"resistor","nodes":["n{i}","0"],"value":1}}"#))
        .collect();
    let e = read_circuit(&doc(&many.join(","))).unwrap_err();
    assert_eq!((e.error.code(), e.error.param()), ("too_large", "nodes"));
    let many: Vec<String> = (0..=MAX_ELEMENTS)
        .map(|i| format!(r#"{{"name":"R{i}","kind":"resistor","nodes":["a","0"],"value":1}}"#))
        .collect();
    let e = read_circuit(&doc(&many.join(","))).unwrap_err();
    assert_eq!((e.error.code(), e.error.param()), ("too_large", "elements"));
    assert_eq!((MAX_NODES, MAX_ELEMENTS), (64, 256));
}
