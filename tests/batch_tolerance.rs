//! The batch tool's tolerance step: a stage in columns with `rf_tol`, `rg_tol`
//! (%, uniform) and a gain spec give the worst-case gain and the Monte Carlo
//! yield; a bad tolerance is reported naming its column.

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
