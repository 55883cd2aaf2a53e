//! The incremental recalculation (src/sheet/order.rs, graph.rs: ranges of at
//! most 16 cells read without a result cache, one walk per range read) gives
//! the values of a from-scratch evaluation: random small sheets over A1:E5,
//! edited one cell at a time, against a fresh sheet holding the same inputs and
//! evaluated whole (`recalculate_all`), and against the edited sheet's own full
//! re-evaluation.

use loopwright::sheet::{CellRef, Sheet, Value};
use proptest::prelude::*;
use proptest::test_runner::Config;

fn config(cases: u32) -> Config {
    Config {
        cases,
        failure_persistence: None,
        rng_seed: proptest::test_runner::RngSeed::Fixed(0x5EED_0018),
        ..Config::default()
    }
}

const ROWS: u32 = 5;
const COLS: u32 = 5;

fn name(r: u32, c: u32) -> String {
    CellRef::new(r, c).unwrap().to_string()
}

fn cell() -> impl Strategy<Value = String> {
    (0..ROWS, 0..COLS).prop_map(|(r, c)| name(r, c))
}

/// A range inside the grid of at most 16 cells (the size read without a cache).
fn small_range() -> impl Strategy<Value = String> {
    (0..ROWS, 0..COLS, 1..=4u32, 1..=4u32).prop_map(|(r, c, h, w)| {
        let (r2, c2) = ((r + h - 1).min(ROWS - 1), (c + w - 1).min(COLS - 1));
        format!("{}:{}", name(r, c), name(r2, c2))
    })
}

/// Inputs: numbers, text, empty, and formulas reading cells and small ranges
/// (sums, extremes, counts, means, conditionals, spills), some circular.
fn input() -> impl Strategy<Value = String> {
    prop_oneof![
        (-50i32..50).prop_map(|n| n.to_string()),
        Just(String::new()),
        Just("x".to_string()),
        (cell(), cell()).prop_map(|(a, b)| format!("={a}+{b}")),
        (cell(), -5i32..5).prop_map(|(a, k)| format!("={a}*2+{k}")),
        small_range().prop_map(|r| format!("=SUM({r})")),
        small_range().prop_map(|r| format!("=MAX({r})-MIN({r})")),
        small_range().prop_map(|r| format!("=COUNT({r})")),
        small_range().prop_map(|r| format!("=AVERAGE({r})")),
        (cell(), small_range(), small_range())
            .prop_map(|(a, r, s)| format!("=IF({a}>0; SUM({r}); COUNT({s}))")),
        (small_range(), cell()).prop_map(|(r, a)| format!("=SUM({r})/{a}")),
        small_range().prop_map(|r| format!("={r}+1")),
    ]
}

fn grid(s: &Sheet) -> Vec<(String, Value)> {
    let mut out = Vec::new();
    for r in 0..ROWS + 4 {
        for c in 0..COLS + 4 {
            let at = CellRef::new(r, c).unwrap();
            out.push((at.to_string(), s.shown(at)));
        }
    }
    out
}

/// A fresh sheet with `s`'s inputs (entered in reverse address order) and
/// evaluated from scratch.
fn from_scratch(s: &Sheet) -> Sheet {
    let mut inputs: Vec<(CellRef, String)> = s.inputs().map(|(c, i)| (c, i.to_string())).collect();
    inputs.reverse();
    let mut t = Sheet::new();
    for (c, i) in &inputs {
        t.set_cell(*c, i).unwrap();
    }
    t.recalculate_all();
    t
}

proptest! {
    #![proptest_config(config(300))]

    #[test]
    fn recalculation_equals_evaluation_from_scratch(
        edits in prop::collection::vec((cell(), input()), 1..24)
    ) {
        let mut s = Sheet::new();
        for (i, (at, text)) in edits.iter().enumerate() {
            s.set(at, text).unwrap();
            // After every edit: a fresh sheet evaluated whole shows the same.
            let want = grid(&from_scratch(&s));
            prop_assert_eq!(&grid(&s), &want, "after edit {} of {:?}", i, &edits[..=i]);
        }
        // And the sheet's own full re-evaluation changes nothing.
        let before = grid(&s);
        let changed = s.recalculate_all().to_vec();
        prop_assert!(changed.is_empty(), "recalculate_all changed {:?}", changed);
        prop_assert_eq!(grid(&s), before);
    }
}
