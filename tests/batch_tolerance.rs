//! The batch tool's tolerance step: a stage in columns with `rf_tol`, `rg_tol`
//! (%, uniform) and a gain spec give the worst-case gain and the Monte Carlo
//! yield; a bad tolerance is reported naming its column. A circuit document
//! in a `circuit` column (tests/fixtures/tolerance_circuit.rs) with its ports
//! and amplifier spreads gives the same columns.
// The shared fixture file also holds the identity bits of other tests.
#![allow(dead_code)]

use loopwright::batch::BatchRun;
use serde_json::Value;

fn run(text: &str) -> (Vec<String>, (u64, u64, u64)) {
    let mut run = BatchRun::new(Some(&["tolerance"])).unwrap();
    let mut out = run.feed(text.as_bytes()).unwrap();
    out += &run.finish().unwrap();
    let c = run.counts();
    (
        out.lines().map(String::from).collect(),
        (c.rows_in, c.rows_written, c.rows_reported),
    )
}

#[test]
fn gain48_rows_give_the_corner_gains_and_the_closed_form_yield() {
    // The gain-48 stage with two uniform ±1 % resistors and A0 = 1e12 (the loop
    // moves the gain by 48/1e12, far below these tolerances); spec 48 ± 0.5 %.
    let (lo, hi) = (
        20.0 * (48.0f64 * 0.995).log10(),
        20.0 * (48.0f64 * 1.005).log10(),
    );
    let trials = 40_000;
    let csv = format!(
        "kind,a0,gbw_hz,rf,rg,rf_tol,rg_tol,gain_at_hz,gain_min_db,gain_max_db,tol_trials,tol_seed\n\
         non-inverting,1e12,10M,47k,1k,1,1,0,{lo},{hi},{trials},48\n\
         non-inverting,1e12,10M,47k,1k,150,1,0,{lo},{hi},{trials},48\n"
    );
    let (lines, counts) = run(&csv);
    assert_eq!(counts, (2, 1, 1), "{lines:?}");
    let header: Vec<&str> = lines[0].split(',').collect();
    let col = |name: &str| header.iter().position(|h| *h == name).unwrap();
    let field =
        |name: &str| -> f64 { lines[1].split(',').nth(col(name)).unwrap().parse().unwrap() };
    // Corners of the ideal non-inverting gain 1 + Rf/Rg (Sedra & Smith,
    // Microelectronic Circuits, 7th ed., section 2.3, from memory): lowest at
    // Rf low, Rg high; highest at Rf high, Rg low.
    let g_min = 20.0 * (1.0 + 47.0 * 0.99 / 1.01f64).log10();
    let g_max = 20.0 * (1.0 + 47.0 * 1.01 / 0.99f64).log10();
    assert!((field("tol_gain_min_db") - g_min).abs() < 1e-6, "{lines:?}");
    assert!((field("tol_gain_max_db") - g_max).abs() < 1e-6, "{lines:?}");
    // Yield: the exact rational integral of tests/reference/tolerance_stage.py
    // ("ideal48"), within 4 standard errors of a binomial proportion.
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/data/tolerance_stage.json"
    );
    let r: Value = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    let p = r["ideal48"]["yield"].as_f64().unwrap();
    let se = (p * (1.0 - p) / trials as f64).sqrt();
    let y = field("tol_yield");
    assert!((y - p).abs() <= 4.0 * se, "yield {y}, closed form {p}");
    assert_eq!(
        field("tol_gain_yield"),
        y,
        "one limit: its yield is the whole"
    );
    // No phase-margin limit: its columns stay empty.
    assert_eq!(lines[1].split(',').nth(col("tol_pm_min_deg")), Some(""));
    // The bad row is reported naming its column, not dropped.
    let report = &lines[2..];
    assert!(
        report.len() == 1 && report[0].contains("rf_tol"),
        "no report naming rf_tol: {lines:?}"
    );
}

include!("fixtures/tolerance_circuit.rs");

/// A CSV field holding `text` (RFC 4180: quoted, quotes doubled).
fn quoted(text: &str) -> String {
    format!("\"{}\"", text.replace('\n', "").replace('"', "\"\""))
}

#[test]
fn circuit_rows_give_corner_gains_and_the_numpy_yield() {
    // Expected: tests/reference/tolerance_stage.py "twoamp" (two cascaded
    // stages, GBW spreads on both amplifiers by name: the 128 brute-force
    // corners, numpy Monte Carlo yield of gain ≥ 33.55 dB at 200 kHz) and
    // "transcond" (the current in RL as the output: 16 corners).
    let reference: Value =
        serde_json::from_str(include_str!("reference/data/tolerance_stage.json")).unwrap();
    let spreads = quoted(
        r#"{"U1":{"gbwHz":{"min":7e6,"typ":1e7,"max":1.3e7}},"U2":{"gbwHz":{"min":3.5e6,"typ":5e6,"max":6.5e6}}}"#,
    );
    let one = quoted(r#"{"gbwHz":{"min":7e6,"typ":1e7,"max":1.3e7}}"#);
    let bad = quoted(r#"{"Rf1":{"gbwHz":{"min":7e6,"typ":1e7,"max":1.3e7}}}"#);
    let trials = 2000;
    let (two, tc) = (quoted(TWOAMP), quoted(TRANSCOND));
    let csv = format!(
        "circuit,input,output,output_element,amplifier_spread,gain_at_hz,gain_min_db,tol_trials,tol_seed\n\
         {two},Vs,out,,{spreads},200k,33.55,{trials},4\n\
         {tc},Vs,,RL,{one},100k,-60.01,{trials},4\n\
         {two},Vs,out,,{bad},200k,33.55,{trials},4\n\
         {tc},Vs,o,RL,{one},100k,-60.01,{trials},4\n"
    );
    let (lines, counts) = run(&csv);
    assert_eq!(counts, (4, 2, 2), "{lines:?}");
    let header: Vec<&str> = lines[0].split(',').collect();
    let col = |name: &str| header.iter().position(|h| *h == name).unwrap();
    // The last columns are the results (the input fields hold commas).
    let field = |row: usize, name: &str| -> f64 {
        let cells: Vec<&str> = lines[row].rsplit(',').collect();
        cells[header.len() - 1 - col(name)].parse().unwrap()
    };
    let corner =
        |key: &str, side: &str| reference[key]["corners"]["gainDb"][side].as_f64().unwrap();
    for (row, key) in [(1, "twoamp"), (2, "transcond")] {
        assert!(
            (field(row, "tol_gain_min_db") - corner(key, "min")).abs() < 1e-9,
            "{key}"
        );
        assert!(
            (field(row, "tol_gain_max_db") - corner(key, "max")).abs() < 1e-9,
            "{key}"
        );
    }
    // Yield within 4 standard errors of the difference of the two estimates.
    let p = reference["twoamp"]["gainDb"]["yield"].as_f64().unwrap();
    let nn = reference["twoamp"]["trials"].as_f64().unwrap();
    let se = (p * (1.0 - p) * (1.0 / trials as f64 + 1.0 / nn)).sqrt();
    let y = field(1, "tol_yield");
    assert!((y - p).abs() <= 4.0 * se, "yield {y}, numpy {p}");
    let report = &lines[3..];
    assert!(report[0].contains("amplifier_spread"), "{report:?}");
    assert!(report[1].contains("output_element"), "{report:?}");
}
