//! The worksheet functions of the frequency (FREQ.), network (NETWORK.), circuit
//! (CIRCUIT.), distortion (DISTORTION.) and noise (NOISE.) areas used the way a sheet uses
//! them: arguments from other cells and ranges, errors in cells, several results
//! spilling into neighbouring cells, and recalculation after an edit.

use loopwright::sheet::{CellRef, ErrorKind, Sheet, Value};

fn cell(a: &str) -> CellRef {
    CellRef::parse(a).unwrap()
}

fn num(s: &Sheet, a: &str) -> f64 {
    match s.value(a).unwrap() {
        Value::Number(x, _) => x,
        v => panic!("{a}: {v:?}"),
    }
}

/// The error kind and explanation shown at `a`.
fn error(s: &Sheet, a: &str) -> (ErrorKind, String) {
    match s.value(a).unwrap() {
        Value::Error(e) => (e.kind, e.detail),
        v => panic!("{a}: not an error value: {v:?}"),
    }
}

fn close(got: f64, want: f64, rtol: f64) -> bool {
    (got - want).abs() <= rtol * want.abs()
}

#[test]
fn a_negative_resistance_in_a_cell_is_an_error_value_naming_the_parameter() {
    let mut s = Sheet::new();
    s.set("A1", "-4k7").unwrap();
    s.set("B1", "=NOISE.THERMAL(A1; 300)").unwrap();
    let (kind, detail) = error(&s, "B1");
    assert_eq!(kind, ErrorKind::Num);
    assert!(detail.starts_with("NOISE.THERMAL: r: "), "{detail}");

    // The same negative value as the load of a circuit stage, and as R2 of a stage
    // under tolerance: each explanation names the parameter the cell fills.
    s.set(
        "B2",
        "=CIRCUIT.RIN(\"series-shunt\"; 10k; 100k; 1k; 1M; 1k; 10k; A1)",
    )
    .unwrap();
    let (kind, detail) = error(&s, "B2");
    assert_eq!(kind, ErrorKind::Num);
    assert!(detail.starts_with("CIRCUIT.RIN: rl: "), "{detail}");
    s.set(
        "B3",
        "=NETWORK.WORSTCASE(\"inverting\"; \"gain\"; 1k; A1; 1%; 50k; 100k; 200k; 1M; 50; 10)",
    )
    .unwrap();
    assert!(error(&s, "B3").1.starts_with("NETWORK.WORSTCASE: r2: "));
    s.set(
        "B4",
        "=NOISE.STAGE(\"non-inverting\"; 9k; 1k; A1; 4n; 0; 0; 0; 300; 1k)",
    )
    .unwrap();
    assert!(error(&s, "B4").1.starts_with("NOISE.STAGE: rp: "));

    // Fixing the cell fixes every formula that read it: 4.7 kΩ at 300 K is
    // √(4kTR) = 8.824 nV/√Hz (Johnson–Nyquist, k = 1.380649e-23 J/K).
    s.set("A1", "4k7").unwrap();
    assert!(close(
        num(&s, "B1"),
        (4.0 * 1.380_649e-23 * 300.0 * 4700.0f64).sqrt(),
        1e-15
    ));
    assert!(matches!(s.value("B2").unwrap(), Value::Number(..)));
}

#[test]
fn errors_name_the_worksheet_parameter_not_the_core_field() {
    let mut s = Sheet::new();
    // A negative pole frequency in the pole list (the core calls it a.poles_hz).
    s.set("A1", "=FREQ.PM(1000; 0.1; 1k; -100k)").unwrap();
    assert_eq!(
        error(&s, "A1"),
        (
            ErrorKind::Num,
            "FREQ.PM: poles: must be greater than zero".into()
        )
    );
    // A target phase margin out of range (the core calls it target_pm_deg).
    s.set("A2", "=FREQ.DOMINANT(100k; 1; 200; 1 MHz)").unwrap();
    assert!(error(&s, "A2").1.starts_with("FREQ.DOMINANT: target_pm: "));
    // An unknown word is #VALUE! and lists the accepted ones.
    s.set("A3", "=DISTORTION.HD(1000; 200; -50; 0.099; 1; \"middle\")")
        .unwrap();
    let (kind, detail) = error(&s, "A3");
    assert_eq!(kind, ErrorKind::Value);
    assert!(
        detail.contains("at:") && detail.contains("input, output"),
        "{detail}"
    );
    s.set("A4", "=NETWORK.NEAREST(5k; \"E13\")").unwrap();
    assert_eq!(error(&s, "A4").0, ErrorKind::Value);
    // A value written in the wrong unit: a frequency given in volts.
    s.set("A5", "=FREQ.EXTEND(10 V; 100k; 0.01)").unwrap();
    assert_eq!(
        error(&s, "A5"),
        (
            ErrorKind::Value,
            "FREQ.EXTEND: f_h: given in V but the parameter is in Hz".into()
        )
    );
    // An error value in an argument passes through unchanged.
    s.set("B1", "=1/0").unwrap();
    s.set("A6", "=DISTORTION.FPBW(B1; 10)").unwrap();
    assert_eq!(error(&s, "A6").0, ErrorKind::DivZero);
    // Text among the poles of a range.
    s.set("C1", "'ten").unwrap();
    s.set("A7", "=FREQ.BANDWIDTH(1000; 0.1; C1:C2)").unwrap();
    assert_eq!(error(&s, "A7").0, ErrorKind::Value);
}

#[test]
fn closed_loop_poles_spill_one_row_per_pole_into_neighbouring_cells() {
    let mut s = Sheet::new();
    // Poles in a column with an empty cell between them (skipped).
    s.set("A1", "1 kHz").unwrap();
    s.set("A3", "100 kHz").unwrap();
    s.set("C1", "=FREQ.POLES(1000; 0.1; A1:A3)").unwrap();
    let r = s.spill_range(cell("C1")).expect("the poles spill");
    assert_eq!((r.rows(), r.cols()), (2, 4));
    // s² + (f1 + f2)s + (1 + T0)f1f2 = 0 in Hz: σ = −(f1 + f2)/2 = −50.5 kHz for
    // both, ω = ±√(101·10⁸ − 50500²), |s| = √(101·10⁸) (closed form).
    let (sigma, f0) = (-50_500.0, (101.0e8f64).sqrt());
    let omega = (f0 * f0 - sigma * sigma).sqrt();
    for row in ["1", "2"] {
        assert!(close(num(&s, &format!("C{row}")), sigma, 1e-12));
        assert!(close(num(&s, &format!("E{row}")), f0, 1e-12));
        // ζ = −σ/|s|.
        assert!(close(num(&s, &format!("F{row}")), -sigma / f0, 1e-12));
    }
    assert!(close(num(&s, "D1"), -omega, 1e-12) && close(num(&s, "D2"), omega, 1e-12));
    assert_eq!(s.spill_anchor(cell("F2")), Some(cell("C1")));

    // Other formulas read spilled cells, and follow an edit of a pole.
    s.set("H1", "=E1*2").unwrap();
    let before = num(&s, "H1");
    let changed = s.set("A3", "400 kHz").unwrap().to_vec();
    assert!(changed.contains(&cell("H1")), "{changed:?}");
    // |s| = √(101·1 kHz·400 kHz) now.
    assert!(close(
        num(&s, "H1"),
        2.0 * (101.0 * 1e3 * 4e5f64).sqrt(),
        1e-12
    ));
    assert!(num(&s, "H1") > before);

    // A pole with Q below 1/2 splits into two real poles: ζ = 1 for both.
    s.set("A1", "1 kHz").unwrap();
    s.set("C4", "=FREQ.POLES(1; 1; 1k; 100k)").unwrap();
    assert_eq!(num(&s, "F4"), 1.0);
    assert_eq!(num(&s, "F5"), 1.0);
}

#[test]
fn ranked_pairs_spill_and_a_filled_cell_in_the_way_blocks_them() {
    let mut s = Sheet::new();
    s.set(
        "A1",
        "=NETWORK.PAIR(\"non-inverting\"; 10; \"E24\"; 10k; 100k; 4)",
    )
    .unwrap();
    let r = s.spill_range(cell("A1")).unwrap();
    // R1, R2, achieved, error, and R2's two parts (R2 itself and 0 when single).
    assert_eq!((r.rows(), r.cols()), (4, 6));
    assert_eq!((num(&s, "E1"), num(&s, "F1")), (18_000.0, 0.0));
    // Gain 10 needs R2/R1 = 9: exact with E24 values 2.0 k/18 k and 3.0 k/27 k
    // (IEC 60063 E24 has 2.0, 3.0, 18 and 27), the smaller total first.
    assert_eq!(
        (num(&s, "A1"), num(&s, "B1"), num(&s, "C1"), num(&s, "D1")),
        (2000.0, 18_000.0, 10.0, 0.0)
    );
    assert_eq!(
        (num(&s, "A2"), num(&s, "B2"), num(&s, "D2")),
        (3000.0, 27_000.0, 0.0)
    );
    // The rest are misses, ranked by |error|.
    assert!(num(&s, "D3").abs() > 0.0 && num(&s, "D3").abs() <= num(&s, "D4").abs());

    s.set("C3", "in the way").unwrap();
    let (kind, detail) = error(&s, "A1");
    assert_eq!(kind, ErrorKind::Blocked);
    assert!(detail.contains("C3"), "{detail}");
    // Cleared, the candidates spill again; each row's gain is 1 + R2/R1.
    s.set("C3", "").unwrap();
    assert_eq!(num(&s, "C3"), 1.0 + num(&s, "B3") / num(&s, "A3"));
    // Gain 48 from E96 with two-part legs asked for (issue 15, item 7): the first
    // row's R2 is two parts that sum to it (exact: brute force in
    // tests/network_pairs.rs), and a 1 % maximum error puts a single pair first.
    s.set(
        "H1",
        "=NETWORK.PAIR(\"non-inverting\"; 48; \"E96\"; 10k; 100k; 3; ; \"series\")",
    )
    .unwrap();
    assert_eq!(num(&s, "K1"), 0.0);
    assert_eq!(num(&s, "L1") + num(&s, "M1"), num(&s, "I1"));
    s.set(
        "H5",
        "=NETWORK.PAIR(\"non-inverting\"; 48; \"E96\"; 10k; 100k; 3; 1%; \"either\")",
    )
    .unwrap();
    assert_eq!(num(&s, "M5"), 0.0);
    assert!(num(&s, "K5").abs() <= 0.01);
}

#[test]
fn several_results_of_each_area_land_in_order() {
    let mut s = Sheet::new();
    // Margins, two poles, T0 = 100 (closed form in tests/reference/sheet_catalog.py):
    // the crossover cell holds Hz and the phase cell degrees; reading them back.
    s.set("A1", "=FREQ.PM(1000; 0.1; 1k; 100k)").unwrap();
    let fc = num(&s, "B1");
    // |T(fc)| = 1 at the crossover, by definition.
    let t = 100.0 / ((1.0 + (fc / 1e3).powi(2)) * (1.0 + (fc / 1e5).powi(2))).sqrt();
    assert!(close(t, 1.0, 1e-10));
    // 180° − atan(fc/f1) − atan(fc/f2).
    let pm = 180.0 - (fc / 1e3).atan().to_degrees() - (fc / 1e5).atan().to_degrees();
    assert!(close(num(&s, "A1"), pm, 1e-10));

    // Without a −180° crossing (one pole) there is no gain margin: #N/A, not a number.
    s.set("A2", "=FREQ.GM(100k; 0.01; 10 Hz)").unwrap();
    assert_eq!(error(&s, "A2").0, ErrorKind::NotAvailable);
    // A loop gain below 1 everywhere has no crossover: no phase margin.
    s.set("A3", "=FREQ.PM(0.5; 1; 1k)").unwrap();
    assert_eq!(error(&s, "A3").0, ErrorKind::NotAvailable);

    // The closed-loop series: b1 = a1/D, b2 = a2/D³, b3 = (a3·D − 2·a2²·β)/D⁵, D = 100.
    s.set("A4", "=DISTORTION.SERIES(1000; 200; -50; 0.099)")
        .unwrap();
    assert!(close(num(&s, "A4"), 10.0, 1e-15));
    assert!(close(num(&s, "B4"), 200.0 / 1e6, 1e-15));
    assert!(close(
        num(&s, "C4"),
        (-50.0 * 100.0 - 2.0 * 200.0 * 200.0 * 0.099) / 1e10,
        1e-14
    ));

    // The circuit: exact, two-port and their relative error, in that order.
    s.set(
        "A5",
        "=CIRCUIT.GAIN(\"series-shunt\"; 10k; 100k; 1k; 1M; 1k; 10k; 2k)",
    )
    .unwrap();
    let (exact, two_port, err) = (num(&s, "A5"), num(&s, "B5"), num(&s, "C5"));
    // The error is a difference of two values that agree to 1e-10, so recomputing it
    // from the rounded cells agrees only to about 1e-6.
    assert!(close(err, (two_port - exact).abs() / exact, 1e-5));
    // 857.9196015344847 from tests/reference/data/circuit_sympy.json (sympy, worked case).
    assert!(close(exact, 857.919_601_534_484_7, 1e-10));
}

#[test]
fn monte_carlo_is_reproducible_from_its_seed() {
    let stage = "\"inverting\"; \"gain\"; 1k; 10k; 1%; 50k; 100k; 200k; 1M; 50; 10 Hz; 20000";
    let mut s = Sheet::new();
    s.set(
        "A1",
        &format!("=NETWORK.MONTECARLO({stage}; 7; \"normal\")"),
    )
    .unwrap();
    s.set(
        "A2",
        &format!("=NETWORK.MONTECARLO({stage}; 7; \"normal\")"),
    )
    .unwrap();
    s.set(
        "A3",
        &format!("=NETWORK.MONTECARLO({stage}; 8; \"normal\")"),
    )
    .unwrap();
    let row = |r: u32| -> Vec<f64> {
        (0..9)
            .map(
                |c| match s.shown(CellRef::parse("A1").unwrap().offset(r, c).unwrap()) {
                    Value::Number(x, _) => x,
                    v => panic!("{v:?}"),
                },
            )
            .collect()
    };
    let (a, b, c) = (row(0), row(1), row(2));
    // Same seed, same numbers bit for bit; another seed, other numbers.
    assert_eq!(a, b);
    assert_ne!(a, c);
    // Percentiles ascend, and the mean of an inverting gain of −10 is near −10
    // (the 1 % parts move it by well under 1 %) (common practice, no source).
    assert!(a[2..].windows(2).all(|w| w[0] <= w[1]), "{a:?}");
    assert!((a[0] + 10.0).abs() < 0.1, "{}", a[0]);
    // The yield of a window around the median is a fraction in (0, 1).
    s.set(
        "B10",
        &format!("=NETWORK.YIELD({stage}; 7; \"normal\"; -10.05; -9.95)"),
    )
    .unwrap();
    let y = num(&s, "B10");
    assert!(y > 0.0 && y < 1.0, "{y}");
}

#[test]
fn the_worksheet_gives_the_core_results_unchanged() {
    use loopwright::freq::{stability_margins, FeedbackLoop, TransferModel};
    use loopwright::network::{standard_value, Rounding, Series};
    use loopwright::noise::{
        integrated_output_noise, AmplifierNoise, ClosedLoopResponse, Stage, StageKind,
    };
    let mut s = Sheet::new();
    s.set("A1", "=FREQ.PM(2e5; 0.05; 5; 200k; 3 MHz)").unwrap();
    let l = FeedbackLoop::with_constant_beta(
        TransferModel::constant(2e5).pole(5.0).pole(2e5).pole(3e6),
        0.05,
    )
    .unwrap();
    let m = stability_margins(&l).unwrap();
    assert_eq!(num(&s, "A1"), m.phase_margin_deg.unwrap());
    assert_eq!(num(&s, "B1"), m.crossover_hz.unwrap());

    s.set("A2", "=NETWORK.UP(4.99k; \"E24\")").unwrap();
    assert_eq!(
        num(&s, "A2"),
        standard_value(Series::E24, 4990.0, Rounding::Up).unwrap()
    );

    s.set(
        "A3",
        "=NOISE.TOTAL(\"inverting\"; 10k; 1k; 909; 8n; 5; 1p; 100; 310; 10 MHz; 10; 20k)",
    )
    .unwrap();
    let st = Stage::new(StageKind::Inverting, 1e4, 1e3, 909.0, 310.0).unwrap();
    let amp = AmplifierNoise::new(8e-9, 5.0, 1e-12, 100.0).unwrap();
    let h = ClosedLoopResponse::new(st.noise_gain(), 1e7, &[]).unwrap();
    let n = integrated_output_noise(&st, &amp, &h, 10.0, 2e4).unwrap();
    assert_eq!(num(&s, "A3"), n.output_rms);
    assert_eq!(num(&s, "B3"), n.input_referred_rms);
    // Left out, f_high is the whole band, which holds more noise than 10 Hz … 20 kHz.
    s.set(
        "A4",
        "=NOISE.TOTAL(\"inverting\"; 10k; 1k; 909; 8n; 5; 1p; 100; 310; 10 MHz; 10)",
    )
    .unwrap();
    assert!(num(&s, "A4") > num(&s, "A3"));
    // The noise bandwidth is that of the band integrated (issue 15, item 10):
    // f_c = 10 MHz/11 ≈ 909 kHz, so 10 Hz … 20 kHz is about 20 kHz wide, and
    // fc·(atan(20k/fc) − atan(10/fc)) exactly (the Lorentzian's integral).
    let fc: f64 = 1e7 / 11.0;
    let lorentz = fc * ((2e4 / fc).atan() - (10.0 / fc).atan());
    assert!(close(num(&s, "C3"), lorentz, 1e-9), "{}", num(&s, "C3"));
    assert_eq!(num(&s, "C3"), n.noise_bandwidth_hz);
    assert!(num(&s, "C4") > 1e6);

    // DISTORTION.HD at a signal frequency: the loop gain used is |T(1 kHz)| ≈ 50 for a
    // DC loop gain of 4167 and a 12 Hz pole (4167/√(1 + (1000/12)²), closed form).
    s.set(
        "A6",
        "=DISTORTION.HD(416.7k; 1e8; -2e12; 0.01; 1 V; \"output\"; 12; 1 kHz)",
    )
    .unwrap();
    let t = 4167.0 / (1.0 + (1000.0f64 / 12.0).powi(2)).sqrt();
    assert!(close(num(&s, "E6"), t, 1e-9), "{}", num(&s, "E6"));
    assert!(close(
        num(&s, "F6"),
        -(1000.0f64 / 12.0).atan().to_degrees(),
        1e-9
    ));
    // Loop gain −10: the shared classification calls it latching (issue 15, item 8).
    s.set("A7", "=FEEDBACK.SENSE(100k; -1e-4)").unwrap();
    assert_eq!(
        s.value("A7").unwrap(),
        Value::Text("latching".into()),
        "D = 1 + A·β = −9 < 0"
    );
}

#[test]
fn network_choose_takes_a_range_of_grades_and_names_bad_fields() {
    // Gain 48 ± 0.5 %, E96 only, grades 1 % and 0.1 % from cells, one-resistor legs:
    // no E96 pair is within 0.5 % of 48 (tests/reference/network_choose.py, brute
    // force), so no row meets the minimum yield and the best miss is first.
    let mut s = Sheet::new();
    s.set("Z1", "1%").unwrap();
    s.set("Z2", "0.1%").unwrap();
    s.set(
        "A1",
        "=NETWORK.CHOOSE(\"non-inverting\"; 48; 0.5%; \"E96\"; Z1:Z2; \"none\"; 0.99; 10k; 1M)",
    )
    .unwrap();
    let at = |r: u32, c: u32| s.shown(CellRef::parse("A1").unwrap().offset(r, c).unwrap());
    for r in 0..2 {
        assert_eq!(at(r, 0), Value::Number(96.0, None));
        assert_eq!(at(r, 12), Value::Bool(false));
    }
    // Ranked by yield: 1 % (33.4 %) above 0.1 % (0.5 %).
    let (y0, y1) = match (at(0, 7), at(1, 7)) {
        (Value::Number(a, _), Value::Number(b, _)) => (a, b),
        v => panic!("{v:?}"),
    };
    assert!(y0 > y1, "{y0} {y1}");
    for (formula, field) in [
        (
            "=NETWORK.CHOOSE(\"non-inverting\"; 48; 0.5%; \"E97\"; 1%)",
            "series",
        ),
        (
            "=NETWORK.CHOOSE(\"non-inverting\"; 48; 0.5%; \"E96\"; -1%)",
            "grades",
        ),
        (
            "=NETWORK.CHOOSE(\"non-inverting\"; 48; 150%; \"E96\"; 1%)",
            "tolerance",
        ),
        (
            "=NETWORK.CHOOSE(\"non-inverting\"; 48; 0.5%; \"E96\"; 1%; \"none\"; 2)",
            "min_yield",
        ),
        (
            "=NETWORK.CHOOSE(\"non-inverting\"; 48; 0.5%; \"E96\"; 1%; \"none\"; 0.9; 10k; 1M; 40)",
            "open_loop_gain",
        ),
    ] {
        s.set("A20", formula).unwrap();
        match s.shown(CellRef::parse("A20").unwrap()) {
            Value::Error(e) => assert!(e.detail.contains(field), "{formula}: {}", e.detail),
            v => panic!("{formula}: {v:?}"),
        }
    }
}
