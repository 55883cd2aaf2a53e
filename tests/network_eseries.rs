//! E-series tables and standard-value lookups against the PyPI `eseries` package
//! (IEC 60063 tables), through tests/reference/data/network_eseries.json written by
//! tests/reference/network_eseries.py.
#![cfg(not(target_arch = "wasm32"))]

use loopwright::network::{neighbours, series_values, standard_value, Rounding, Series};
use serde::Deserialize;
use std::collections::BTreeMap;

/// Values are integer × 10^k formed the same way on both sides (Python's round()
/// and an exact power of ten here), so they agree to the last bit in practice; the
/// stated tolerance allows one rounding step.
const REL_TOL: f64 = 1e-15;

#[derive(Deserialize)]
struct Case {
    x: f64,
    nearest: f64,
    up: f64,
    down: f64,
    above: f64,
    below: f64,
}

#[derive(Deserialize)]
struct SeriesData {
    table: Vec<u16>,
    tolerance: f64,
    cases: Vec<Case>,
}

#[derive(Deserialize)]
struct Reference {
    series: BTreeMap<String, SeriesData>,
}

fn reference() -> Reference {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/data/network_eseries.json"
    ))
    .expect("run tests/reference/network_eseries.py to write the reference data");
    serde_json::from_str(&text).expect("reference JSON")
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= REL_TOL * b.abs()
}

#[test]
fn tables_and_tolerances_match_the_reference() {
    let r = reference();
    assert_eq!(r.series.len(), Series::ALL.len());
    for s in Series::ALL {
        let d = &r.series[s.name()];
        assert_eq!(s.mantissas(), &d.table[..], "{s} table");
        assert_eq!(s.tolerance(), d.tolerance, "{s} tolerance");
    }
}

#[test]
fn lookups_match_the_reference() {
    let r = reference();
    let mut checked = 0;
    for s in Series::ALL {
        for c in &r.series[s.name()].cases {
            let got = |mode| standard_value(s, c.x, mode).unwrap();
            for (mode, want) in [
                (Rounding::Nearest, c.nearest),
                (Rounding::Up, c.up),
                (Rounding::Down, c.down),
                (Rounding::Above, c.above),
                (Rounding::Below, c.below),
            ] {
                let v = got(mode);
                assert!(
                    close(v, want),
                    "{s} x = {:e} {mode:?}: got {v:e}, eseries {want:e}",
                    c.x
                );
                checked += 1;
            }
            let n = neighbours(s, c.x).unwrap();
            assert!(
                close(n.nearest, c.nearest) && close(n.down, c.down) && close(n.up, c.up),
                "{s} x = {:e}",
                c.x
            );
        }
    }
    assert!(checked > 10_000, "only {checked} lookups checked");
}

#[test]
fn listed_values_are_the_lookups_stepped_through() {
    // Identity: stepping with Above from the first value walks the list.
    for s in Series::ALL {
        let list = series_values(s, 0.995, 1005.0).unwrap();
        assert_eq!(list.len(), 3 * s.len() + 1, "{s}");
        let mut v = standard_value(s, 0.995, Rounding::Up).unwrap();
        for &w in &list {
            assert_eq!(v, w, "{s}");
            v = standard_value(s, v, Rounding::Above).unwrap();
        }
    }
}
