//! The batch tool's loop step: rows that carry a stage (kind, amplifier figures
//! and parts as columns, or a stage document in a column) give the stage's
//! margins; bad rows are reported by line and none is dropped. Expected margins
//! from tests/reference/data/stage_loop.json (tests/reference/stage_loop.py:
//! python-control crossings polished on sympy's exact loop gain).

use loopwright::batch::BatchRun;
use serde_json::Value;

/// Margins to 1e-6° and crossovers to 1e-9 relative, as tests/stage_loop_reference.rs.
const MARGIN_ABS: f64 = 1e-6;
const CROSSOVER_REL: f64 = 1e-9;

fn reference(label: &str) -> Value {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/data/stage_loop.json"
    );
    let all: Value = serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap();
    all["cases"]
        .as_array()
        .unwrap()
        .iter()
        .find(|c| c["label"].as_str().unwrap().starts_with(label))
        .unwrap()
        .clone()
}

/// The CSV fields of one output line (no quoted commas in these outputs but
/// the echoed stage document, which is the last input column).
fn run(text: &str) -> (Vec<String>, (u64, u64, u64)) {
    let mut run = BatchRun::new(None).unwrap();
    let mut out = run.feed(text.as_bytes()).unwrap();
    out += &run.finish().unwrap();
    let c = run.counts();
    (
        out.lines().map(String::from).collect(),
        (c.rows_in, c.rows_written, c.rows_reported),
    )
}

#[test]
fn stage_rows_give_the_reference_margins_and_bad_rows_are_reported() {
    let load = reference("capacitive load with isolation");
    let unstable = reference("unstable follower");
    let csv = "kind,a0,gbw_hz,poles_hz,ro,rf,rg,rl,cl,riso\n\
               non-inverting,1e5,5M,,50,1k,1k,10k,10n,20\n\
               non-inverting,3e5,10M,2M 4M,30,,,,,\n\
               non-inverting,1e5,5M,,50,-1k,1k,10k,10n,20\n";
    let (lines, counts) = run(csv);
    assert_eq!(counts, (3, 2, 1), "every row in, one reported");
    let header: Vec<&str> = lines[0].split(',').collect();
    let col = |name: &str| header.iter().position(|h| *h == name).unwrap();
    let field = |line: &str, name: &str| -> f64 {
        line.split(',').nth(col(name)).unwrap().parse().unwrap()
    };
    // stage_loop.json, "capacitive load with isolation".
    let pm = load["phase_margin_deg"].as_f64().unwrap();
    let fc = load["crossover_hz"].as_f64().unwrap();
    assert!((field(&lines[1], "phase_margin_deg") - pm).abs() < MARGIN_ABS);
    assert!((field(&lines[1], "crossover_hz") / fc - 1.0).abs() < CROSSOVER_REL);
    assert_eq!(field(&lines[1], "closed_loop_stable"), 1.0);
    // At DC: the gain 2/(1 + 2/A0) at the amplifier's pin (Ro inside the loop),
    // then the divider Riso = 20 Ω into Rl = 10 kΩ outside it (loop algebra,
    // common practice, no source); Ro's residue through the finite loop gain
    // is below 1e-5 relative.
    let want = 2.0 / (1.0 + 2.0 / 1e5) * 10e3 / (10e3 + 20.0);
    assert!(
        (field(&lines[1], "dc_gain") / want - 1.0).abs() < 1e-5,
        "{}",
        lines[1]
    );
    // stage_loop.json, "unstable follower": negative margin, unstable.
    let pm = unstable["phase_margin_deg"].as_f64().unwrap();
    assert!((field(&lines[2], "phase_margin_deg") - pm).abs() < MARGIN_ABS);
    assert_eq!(field(&lines[2], "closed_loop_stable"), 0.0);
    // The bad row: reported with its line number and the field at fault.
    assert!(lines[3].starts_with("4,"), "{}", lines[3]);
    assert!(lines[3].contains("rf"), "{}", lines[3]);
}

#[test]
fn a_stage_document_column_gives_the_same_row() {
    let load = reference("capacitive load with isolation");
    let doc = load["stage"].to_string().replace('"', "\"\"");
    let csv = format!("stage\n\"{doc}\"\n\"{{not json\"\n");
    let (lines, counts) = run(&csv);
    assert_eq!(counts, (2, 1, 1));
    let pm = load["phase_margin_deg"].as_f64().unwrap();
    let header: Vec<&str> = lines[0].split(',').collect();
    assert_eq!(header[0], "line");
    let i = header
        .iter()
        .position(|h| *h == "phase_margin_deg")
        .unwrap();
    // The echoed document holds commas inside quotes: count fields from the end.
    let fields: Vec<&str> = lines[1].rsplitn(header.len() - i + 1, ',').collect();
    let got: f64 = fields[header.len() - i - 1].parse().unwrap();
    assert!((got - pm).abs() < MARGIN_ABS, "{got}");
    assert!(lines[2].starts_with("3,"), "{}", lines[2]);
}
