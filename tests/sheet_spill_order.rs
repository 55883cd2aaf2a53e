//! The shown values and error details of a sheet do not depend on the order in
//! which its cells were entered, nor on whether it was built cell by cell or
//! loaded from its document (spills that compete and formulas that read a
//! blocked spill's error are where the order of evaluation could leak through).

use loopwright::sheet::{CellRef, Sheet, Value};
use proptest::prelude::*;
use proptest::test_runner::Config;

/// A fixed seed, as every random test of the project has, so a run is
/// reproducible; set PROPTEST_RNG_SEED to explore others.
fn config(cases: u32) -> Config {
    Config {
        cases,
        failure_persistence: None,
        rng_seed: proptest::test_runner::RngSeed::Fixed(0x0DE2_5EED),
        ..Config::default()
    }
}

/// The cells a test may look at: a block wider and taller than every spill of
/// the inputs below, placed in the top-left 3 × 3 cells.
fn grid() -> Vec<CellRef> {
    (0..8u32)
        .flat_map(|r| (0..8u32).map(move |c| CellRef::new(r, c).unwrap()))
        .collect()
}

fn shown(s: &Sheet) -> Vec<(CellRef, Value)> {
    grid().into_iter().map(|c| (c, s.shown(c))).collect()
}

fn built(inputs: &[(&str, &str)]) -> Sheet {
    let mut s = Sheet::new();
    for (a, i) in inputs {
        s.set(a, i).unwrap();
    }
    s
}

fn reloaded(s: &Sheet) -> Sheet {
    let mut t = Sheet::new();
    t.load_document(&s.save_document()).unwrap();
    t
}

/// The case the formula fuzz run found: B1 spills `A2:A3+1` and so copies A2's
/// `#BLOCKED!` error. Built cell by cell, A2's error names B2 (B1's spill is in
/// its way); loaded, A2 was first evaluated before B1 spilled and named C2, was
/// tried again once B1 spilled, but B1 kept the copy of the first error.
#[test]
fn a_copied_blocked_error_names_the_same_cell_built_or_loaded() {
    let inputs = [
        ("A2", "=FEEDBACK.SUMMARY(\"series-shunt\"; 1000; B3)"),
        ("C2", "=A1"),
        ("B1", "=A2:A3+1"),
        ("B3", "0"),
    ];
    let s = built(&inputs);
    let b1 = CellRef::parse("B1").unwrap();
    let Value::Error(e) = s.shown(b1) else {
        panic!("B1 shows {:?}", s.shown(b1))
    };
    // B2 is covered by B1's own spill, which comes first in row-then-column order.
    assert_eq!(
        e.message(),
        "the results would fan out into B2, which is not empty"
    );
    assert_eq!(shown(&reloaded(&s)), shown(&s));
    let mut reversed = inputs;
    reversed.reverse();
    assert_eq!(shown(&built(&reversed)), shown(&s));
}

const CELLS: [&str; 9] = ["A1", "A2", "A3", "B1", "B2", "B3", "C1", "C2", "C3"];

/// Inputs that spill, are blocked, read spills or blocked errors, or are plain.
const INPUTS: &[&str] = &[
    "=FEEDBACK.SUMMARY(\"series-shunt\"; 1000; B3)",
    "=FEEDBACK.CEILING(A2*1000+1000; 100)",
    "=A2:A3+1",
    "=B2:C3*2",
    "=A1",
    "=B1+C1",
    "=SUM(A1:C3)",
    "=FREQ.POLES(A2*1000+1000; 0.1; 1k; B3+1)",
    "=NETWORK.PAIR(\"non-inverting\"; B3+2; \"E12\"; 1k; 100k; 2)",
    "=1/B3",
    "0",
    "7",
    "x",
];

/// A sheet of distinct cells (up to nine) and two orders to enter them in.
fn sheet_and_orders() -> impl Strategy<Value = (Vec<(usize, usize)>, Vec<usize>, Vec<usize>)> {
    prop::collection::btree_map(0usize..9, 0usize..INPUTS.len(), 1..9).prop_flat_map(|m| {
        let cells: Vec<(usize, usize)> = m.into_iter().collect();
        let n = cells.len();
        let order: Vec<usize> = (0..n).collect();
        (
            Just(cells),
            Just(order.clone()).prop_shuffle(),
            Just(order).prop_shuffle(),
        )
    })
}

proptest! {
    #![proptest_config(config(1000))]

    /// Entered in two random orders and loaded from either's document: the same
    /// value, error kind and error detail in every cell.
    #[test]
    fn entry_order_and_reload_give_identical_sheets((cells, first, second) in sheet_and_orders()) {
        let enter = |order: &[usize]| {
            let list: Vec<(&str, &str)> = order.iter().map(|&i| (CELLS[cells[i].0], INPUTS[cells[i].1])).collect();
            built(&list)
        };
        let (a, b) = (enter(&first), enter(&second));
        let want = shown(&a);
        prop_assert_eq!(&shown(&b), &want, "orders {:?} and {:?} of {:?}", first, second, cells);
        prop_assert_eq!(&shown(&reloaded(&a)), &want, "reload of {:?}", cells);
        prop_assert_eq!(&shown(&reloaded(&b)), &want, "reload of {:?}", cells);
    }
}
