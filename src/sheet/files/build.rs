//! A worksheet as a [`Workbook`]: the cover table, the data table with every shown
//! value (live formulas where portable), and the hidden table of inputs as typed.

use super::super::parser::parse;
use super::formula_out::{portable, write, Dialect};
use super::model::{FileCell, FileValue, Table, Workbook};
use crate::sheet::{CellRef, Sheet, Value};
use alloc::collections::BTreeMap;
use alloc::format;
use alloc::string::{String, ToString};
use alloc::vec::Vec;

/// The table that holds the worksheet's cells.
pub const DATA_TABLE: &str = "Design";
/// The first table: what produced the file and the cautions.
pub const COVER_TABLE: &str = "About";
/// The hidden table of inputs as typed, which the import reads back.
pub const INPUTS_TABLE: &str = "loopwright-inputs";
/// The header row of [`INPUTS_TABLE`].
pub const INPUTS_HEADER: [&str; 4] = ["cell", "input as typed", "formula written", "value written"];

/// The cautions of the README, written on the cover table.
const CAUTIONS: [&str; 3] = [
    "Results are small-signal, linear (or weakly nonlinear) models: check every design on the bench.",
    "Amplifiers can oscillate, overheat and damage loads; mains-powered and high-voltage designs need isolation and protection that no calculation replaces.",
    "Follow local codes and licensed practice for anything connected to the mains or to people.",
];

/// What an export writes besides the sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ExportOptions {
    /// The date (and time) written on the cover, as the caller gives it
    /// (ISO 8601, e.g. `2026-12-03T12:00:00Z`): the core has no clock.
    pub date: String,
    /// Whether live formulas carry their computed result (true for every real
    /// file). Off, a reading program must compute each one itself: the engine test
    /// uses this to prove that the standard formulas recompute there.
    pub cache_formula_results: bool,
}

impl Default for ExportOptions {
    fn default() -> ExportOptions {
        ExportOptions {
            date: String::new(),
            cache_formula_results: true,
        }
    }
}

fn text(at: CellRef, t: &str) -> FileCell {
    FileCell {
        at,
        value: FileValue::Text(String::from(t)),
        formula: None,
        unit: None,
    }
}

fn at(row: u32, col: u32) -> CellRef {
    CellRef { row, col }
}

fn cover(options: &ExportOptions) -> Table {
    let version = env!("CARGO_PKG_VERSION");
    let rows: [(&str, String); 5] = [
        ("Produced by", format!("loopwright {version}, worksheet document version {}", crate::sheet::VERSION)),
        ("Date", options.date.clone()),
        ("The worksheet", format!("on the sheet {DATA_TABLE}: values with their units in the number format; formulas of the open formula standard live, loopwright's own formulas as their computed values")),
        ("Inputs as typed", format!("on the hidden sheet {INPUTS_TABLE}, which loopwright reads back on import")),
        ("Cautions", String::from(CAUTIONS[0])),
    ];
    let mut cells = Vec::new();
    cells.push(text(at(0, 0), "loopwright worksheet"));
    for (i, (label, value)) in rows.iter().enumerate() {
        let row = 2 + i as u32;
        cells.push(text(at(row, 0), label));
        cells.push(text(at(row, 1), value));
    }
    for (i, caution) in CAUTIONS.iter().enumerate().skip(1) {
        cells.push(text(at(6 + i as u32, 1), caution));
    }
    Table {
        name: String::from(COVER_TABLE),
        hidden: false,
        cells,
    }
}

/// A shown value as a file value and its unit symbol.
fn file_value(v: &Value) -> (FileValue, Option<String>) {
    match v {
        Value::Number(x, unit) => (FileValue::Number(*x), unit.map(|u| u.symbol().to_string())),
        Value::Bool(b) => (FileValue::Bool(*b), None),
        Value::Error(e) => (FileValue::Error(String::from(e.kind.code())), None),
        Value::Text(t) => (FileValue::Text(t.clone()), None),
        Value::Array(a) => file_value(&a.get(0, 0)),
        Value::Empty => (FileValue::Text(String::new()), None),
    }
}

/// The live formula of an input, if it has one in `d`.
fn live_formula(
    sheet: &Sheet,
    c: CellRef,
    input: &str,
    shown: &Value,
    d: Dialect,
) -> Option<String> {
    let expr = parse(input.strip_prefix('=')?).ok()?;
    let computed_plain = matches!(shown, Value::Number(..) | Value::Bool(_) | Value::Text(_));
    if !portable(&expr) || sheet.spill_range(c).is_some() || !computed_plain {
        return None;
    }
    let mut out = String::new();
    write(&mut out, &expr, d);
    Some(out)
}

/// The data and inputs tables of `sheet`.
fn data_and_inputs(sheet: &Sheet, d: Dialect, options: &ExportOptions) -> (Table, Table) {
    let mut data: BTreeMap<CellRef, (FileCell, &str)> = BTreeMap::new();
    for (c, input) in sheet.inputs() {
        let shown = sheet.shown(c);
        let (value, unit) = file_value(&shown);
        let formula = live_formula(sheet, c, input, &shown, d);
        data.insert(
            c,
            (
                FileCell {
                    at: c,
                    value,
                    formula,
                    unit,
                },
                input,
            ),
        );
        if let Some(r) = sheet.spill_range(c) {
            for s in r.cells().filter(|s| *s != c) {
                let (value, unit) = file_value(&sheet.shown(s));
                data.insert(
                    s,
                    (
                        FileCell {
                            at: s,
                            value,
                            formula: None,
                            unit,
                        },
                        "",
                    ),
                );
            }
        }
    }
    let mut inputs = Table {
        name: String::from(INPUTS_TABLE),
        hidden: true,
        cells: INPUTS_HEADER
            .iter()
            .enumerate()
            .map(|(k, h)| text(at(0, k as u32), h))
            .collect(),
    };
    for (i, (cell, input)) in data.values().enumerate() {
        let row = 1 + i as u32;
        inputs.cells.push(text(at(row, 0), &format!("{}", cell.at)));
        inputs.cells.push(text(at(row, 1), input));
        inputs
            .cells
            .push(text(at(row, 2), cell.formula.as_deref().unwrap_or("")));
        inputs.cells.push(
            FileCell {
                at: at(row, 3),
                ..cell.clone()
            }
            .without_formula(),
        );
    }
    let cells = data
        .into_values()
        .map(|(mut cell, _)| {
            if cell.formula.is_some() && !options.cache_formula_results {
                cell.value = FileValue::Text(String::new());
            }
            cell
        })
        .collect();
    let data = Table {
        name: String::from(DATA_TABLE),
        hidden: false,
        cells,
    };
    (data, inputs)
}

impl FileCell {
    fn without_formula(mut self) -> FileCell {
        self.formula = None;
        self
    }
}

/// The workbook of `sheet` for the formula syntax `d`.
pub(crate) fn workbook(sheet: &Sheet, d: Dialect, options: &ExportOptions) -> Workbook {
    let (data, inputs) = data_and_inputs(sheet, d, options);
    let names = sheet
        .names()
        .map(|(n, c)| (String::from(n), String::from(DATA_TABLE), c))
        .collect();
    Workbook {
        tables: alloc::vec![cover(options), data, inputs],
        names,
        notes: Vec::new(),
    }
}
