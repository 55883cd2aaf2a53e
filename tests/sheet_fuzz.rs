//! Bounded random tests of the formula engine (the unbounded one is the
//! cargo-fuzz target in fuzz/): random text and random token soups never panic
//! or hang and every failure is an error value; incremental recalculation gives
//! the same values as recalculating a freshly loaded copy.

use loopwright::sheet::{CellRef, ErrorKind, Sheet, Value};
use proptest::prelude::*;
use proptest::test_runner::Config;

/// A fixed seed, as every random test of the project has (DEVELOPERS.md), so a run is
/// reproducible; set PROPTEST_RNG_SEED to explore others.
fn config(cases: u32) -> Config {
    Config {
        cases,
        failure_persistence: None,
        rng_seed: proptest::test_runner::RngSeed::Fixed(0x5EED_5EE7),
        ..Config::default()
    }
}

const CELLS: [&str; 9] = ["A1", "A2", "A3", "B1", "B2", "B3", "C1", "C2", "C3"];

const TOKENS: &[&str] = &[
    "1",
    "0",
    "4k7",
    "2R2",
    "1e308",
    "-",
    "+",
    "*",
    "/",
    "^",
    "&",
    "%",
    "=",
    "<>",
    "<=",
    ">",
    "(",
    ")",
    ";",
    ",",
    ":",
    "A1",
    "B2",
    "$C$3",
    "A1:C3",
    "B1:B3",
    "XFD1048576",
    "A1:XFD1048576",
    "\"x\"",
    "\"\"",
    "#N/A",
    "#DIV/0!",
    "TRUE",
    "gain",
    "nosuch",
    "SUM(",
    "IF(",
    "ROUND(",
    "AND(",
    "FEEDBACK.GAIN(",
    "FEEDBACK.SPREAD(",
    "FEEDBACK.SUMMARY(",
    "DB.VOLTAGE(",
    "FEEDBACK.CEILING(",
    "SQRT(",
    "10 kHz",
    "1MΩ",
    " ",
    "NOSUCHFN(",
    "\"series-shunt\"",
    "PI()",
    "2^1024",
    // The other areas' functions (a spill of several rows, ranked candidates, words).
    "FREQ.PM(",
    "FREQ.POLES(",
    "FREQ.TWOPOLE(",
    "NETWORK.NEAREST(",
    "NETWORK.PAIR(",
    "CIRCUIT.GAIN(",
    "DISTORTION.HD(",
    "NOISE.STAGE(",
    "\"E24\"",
    "\"non-inverting\"",
    "\"output\"",
];

fn check_values(s: &Sheet) {
    for a in CELLS {
        match s.shown(CellRef::parse(a).unwrap()) {
            Value::Number(x, _) => assert!(x.is_finite(), "{a} holds {x}"),
            Value::Error(e) => assert!(!e.message().is_empty()),
            Value::Array(_) => panic!("{a} shows an array"),
            _ => {}
        }
    }
}

proptest! {
    #![proptest_config(config(300))]

    #[test]
    fn random_text_never_panics(text in "[-+*/^&%=<>();,:A-Ca-c0-9 .$#!?\"µΩkKMRe]{0,80}") {
        let mut s = Sheet::new();
        s.set("B2", &format!("={text}")).unwrap();
        s.set("A1", &text).unwrap();
        check_values(&s);
        if let Value::Error(e) = s.shown(CellRef::parse("B2").unwrap()) {
            prop_assert!(!e.kind.code().is_empty());
        }
    }

    #[test]
    fn token_soups_never_panic(
        soups in prop::collection::vec((0usize..9, prop::collection::vec(0usize..TOKENS.len(), 0..24)), 1..8),
        named in 0usize..9,
    ) {
        let mut s = Sheet::new();
        s.set_name("gain", CellRef::parse(CELLS[named]).unwrap()).unwrap();
        for (cell, toks) in &soups {
            let body: String = toks.iter().map(|&t| TOKENS[t]).collect();
            s.set(CELLS[*cell], &format!("={body}")).unwrap();
            check_values(&s);
        }
        // The document of whatever came out loads back to the same bytes.
        let doc = s.save_document();
        let mut t = Sheet::new();
        t.load_document(&doc).unwrap();
        prop_assert_eq!(t.save_document(), doc);
    }
}

/// A random formula over the 3×3 block without spilling results.
fn formula() -> impl Strategy<Value = String> {
    let leaf = prop_oneof![
        (0usize..9).prop_map(|i| CELLS[i].to_string()),
        (-5i32..20).prop_map(|n| n.to_string()),
        Just("SUM(A1:C3)".to_string()),
        Just("SUM(B1:B3)".to_string()),
        Just("\"t\"".to_string()),
    ];
    leaf.prop_recursive(3, 12, 2, |inner| {
        (
            inner.clone(),
            prop::sample::select(vec!["+", "-", "*", "/", "&", ">"]),
            inner,
        )
            .prop_map(|(a, op, b)| format!("({a}{op}{b})"))
    })
}

proptest! {
    #![proptest_config(config(200))]

    #[test]
    fn incremental_recalculation_matches_a_fresh_load(
        edits in prop::collection::vec((0usize..9, prop_oneof![
            formula().prop_map(|f| format!("={f}")),
            (-9i32..9).prop_map(|n| n.to_string()),
            Just(String::new()),
        ]), 1..25),
    ) {
        let mut s = Sheet::new();
        for (cell, input) in &edits {
            s.set(CELLS[*cell], input).unwrap();
        }
        let mut fresh = Sheet::new();
        fresh.load_document(&s.save_document()).unwrap();
        for a in CELLS {
            let c = CellRef::parse(a).unwrap();
            prop_assert_eq!(s.shown(c), fresh.shown(c), "cell {} after {:?}", a, edits);
        }
    }
}

#[test]
fn deep_nesting_and_long_chains_are_bounded() {
    let mut s = Sheet::new();
    s.set("A1", &format!("={}1{}", "(".repeat(3000), ")".repeat(3000)))
        .unwrap();
    assert!(
        matches!(s.shown(CellRef::parse("A1").unwrap()), Value::Error(e) if e.kind == ErrorKind::Syntax)
    );
    s.set("A2", &format!("={}", "-".repeat(4000))).unwrap();
    s.set("A3", &"=1".repeat(3000)).unwrap();
    // A chain of 20 000 cells, each reading the one above: ordering is iterative.
    let n = 20_000u32;
    let edits: Vec<(CellRef, String)> = (1..n)
        .map(|r| {
            (
                CellRef::new(r, 1).unwrap(),
                format!("={}+1", CellRef::new(r - 1, 1).unwrap()),
            )
        })
        .collect();
    let borrowed: Vec<(CellRef, &str)> = edits.iter().map(|(c, f)| (*c, f.as_str())).collect();
    s.set_many(&borrowed).unwrap();
    s.set("B1", "1").unwrap();
    assert_eq!(s.changed().len(), n as usize);
    assert_eq!(
        s.shown(CellRef::new(n - 1, 1).unwrap()),
        Value::Number(f64::from(n), None)
    );
    // A cycle through the whole chain marks every cell.
    s.set("B1", &format!("={}", CellRef::new(n - 1, 1).unwrap()))
        .unwrap();
    assert!(
        matches!(s.shown(CellRef::new(n / 2, 1).unwrap()), Value::Error(e) if e.kind == ErrorKind::Cycle)
    );
}

#[test]
fn huge_ranges_and_spills_are_refused_not_computed() {
    let mut s = Sheet::new();
    s.set("A1", "=SUM(B1:XFD1048576)").unwrap();
    assert!(
        matches!(s.shown(CellRef::parse("A1").unwrap()), Value::Error(e) if e.kind == ErrorKind::Ref)
    );
    s.set("A2", "=B1:XFD1048576").unwrap();
    assert!(s.shown(CellRef::parse("A2").unwrap()).is_error());
    // A spill that would pass the sheet's edge.
    s.set("XFD5", "=FEEDBACK.CEILING(10; 2)").unwrap();
    assert!(
        matches!(s.shown(CellRef::parse("XFD5").unwrap()), Value::Error(e) if e.kind == ErrorKind::Blocked)
    );
}

/// Inputs that spill over neighbours in the 3×3 block (or are blocked by them, or
/// read what they cover). Placed in A1, A2, B1 or B2, so spills also compete.
const SPILLERS: &[&str] = &[
    "=FEEDBACK.CEILING(A2*1000+1000; 100)",
    "=B2:C3*2",
    "=A2:A3+1",
    "=FEEDBACK.SUMMARY(\"series-shunt\"; 1000; B3)",
    "=FEEDBACK.PHASOR(100; B2; 0.01; 0)",
    "=FREQ.POLES(A2*1000+1000; 0.1; 1k; B3+1)",
    "=NETWORK.PAIR(\"non-inverting\"; B3+2; \"E12\"; 1k; 100k; 2)",
    "7",
    "",
];

proptest! {
    #![proptest_config(config(150))]

    #[test]
    fn incremental_recalculation_with_spills_matches_a_fresh_load(
        edits in prop::collection::vec(prop_oneof![
            (1usize..9, formula().prop_map(|f| format!("={f}"))),
            (1usize..9, (-9i32..9).prop_map(|n| n.to_string())),
            (1usize..9, Just(String::new())),
            (prop::sample::select(vec![0usize, 1, 3, 4]), prop::sample::select(SPILLERS).prop_map(String::from)),
        ], 1..25),
    ) {
        let grid: Vec<CellRef> = (0..6u32).flat_map(|r| (0..8u32).map(move |c| CellRef::new(r, c).unwrap())).collect();
        let mut s = Sheet::new();
        for (cell, input) in &edits {
            // The reported changes are exactly the cells whose shown value changed.
            let before: Vec<Value> = grid.iter().map(|c| s.shown(*c)).collect();
            let changed = s.set(CELLS[*cell], input).unwrap().to_vec();
            let differ: Vec<CellRef> =
                grid.iter().zip(&before).filter(|(c, b)| s.shown(**c) != **b).map(|(c, _)| *c).collect();
            prop_assert_eq!(&changed, &differ, "after {:?}", edits);
        }
        let mut fresh = Sheet::new();
        fresh.load_document(&s.save_document()).unwrap();
        for a in ["A1", "A2", "B1", "B2"] {
            let c = CellRef::parse(a).unwrap();
            prop_assert_eq!(s.spill_range(c), fresh.spill_range(c), "spill of {}", a);
        }
        for row in 0..6u32 {
            for col in 0..8u32 {
                let c = CellRef::new(row, col).unwrap();
                prop_assert_eq!(s.shown(c), fresh.shown(c), "cell {} after {:?}", c, edits);
            }
        }
    }
}
