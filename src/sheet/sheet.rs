//! The sheet's state and what each cell shows. Editing is in [`super::edit`],
//! reading an input in [`super::input`], recalculation in [`super::recalc`] and
//! [`super::order`], spilling in [`super::spill`].
//!
//! A cell input is either a formula (text starting with `=`) or a constant:
//! empty text clears the cell; `'` starts literal text; `TRUE`/`FALSE`, an error
//! code, or a number in engineering notation ([`super::literal`]) is taken as
//! such; anything else is text.
//!
//! After each edit the sheet re-evaluates the edited cell and everything that
//! reads it, directly, through ranges, names or spilled results, in
//! dependency order ([`super::graph`]), and reports which cells now show a
//! different value ([`Sheet::changed`]).
//!
//! Spilling: a formula whose value is several values (a range, an array result)
//! shows them in the rectangle whose top-left corner is its own cell. If any
//! other cell of that rectangle has an input, or is covered by another spill,
//! the formula's cell shows `#BLOCKED!` instead; if the formula depends on a
//! cell of the rectangle it shows `#CYCLE!`. Cells reading a covered cell see
//! the spilled item. Cells are ordered by references and spills together; where
//! both form a loop, by references alone; after a spill moves, the readers of
//! the cells it left or covered are evaluated again in a further pass. When
//! spills still change what they read after [`MAX_SPILL_PASSES`] passes, the
//! cells involved get `#CYCLE!`. Two spills competing for the same cells: the
//! formula earlier in row-then-column order wins, whatever the order of edits.
//!
//! Work bound: one recalculation may do at most [`MAX_RECALC_WORK`] units of work
//! (one unit per cell read through a range or spilled into, per formula evaluated,
//! per cached range result reused). Formulas reached after the budget is spent
//! show `#BUDGET!` instead of being evaluated, so no edit or load can hang.

use super::address::{CellRef, Range};
use super::graph::Graph;
use super::input::cell_ref;
// Where the document reader finds it.
pub use super::input::valid_name;
use super::lexer::ParseError;
use super::parser::Expr;
use super::value::Value;
use crate::error::Result;
use alloc::collections::{BTreeMap, BTreeSet};
use alloc::string::String;
use alloc::vec::Vec;

/// Most cells with an input.
pub const MAX_CELLS: usize = 100_000;
/// Longest cell input, in bytes (formulas are further limited to
/// [`super::lexer::MAX_FORMULA_BYTES`]).
pub const MAX_INPUT_BYTES: usize = 32_768;
/// Most named cells.
pub const MAX_NAMES: usize = 10_000;
/// Longest cell name.
pub const MAX_NAME_CHARS: usize = 64;
/// Recalculation passes allowed for spills that change what other formulas read.
pub const MAX_SPILL_PASSES: usize = 32;
/// Work one recalculation may do (see the module documentation): two million
/// cell reads. 20 000 sums over different 5 000-cell windows, which meet it,
/// took 8–15 s per edit in wasm at ten million on the loaded shared machine,
/// so two million is about 2–3 s there. The 10 000-cell benchmark sheet needs
/// 30 000; a formula reads at most
/// [`super::eval::MAX_RANGE_CELLS`], so a recalculation stops within that much
/// past the budget.
pub const MAX_RECALC_WORK: u64 = 2_000_000;

/// Held cells a range read walks per cell of the range before it reads the
/// range's cells one by one instead ([`Sheet::occupied`]). A lookup in the
/// cell map costs about as much as this many steps of a walk through it
/// (instruction counts of the benchmark sheet's recalculation, natively; common
/// practice, no source, beyond that measurement).
const WALK_PER_CELL: u64 = 8;

#[derive(Debug, Clone)]
pub(super) enum Content {
    Constant(Value),
    Formula(core::result::Result<Expr, ParseError>),
}

#[derive(Debug, Clone)]
pub(super) struct Cell {
    pub(super) input: String,
    pub(super) content: Content,
}

/// A worksheet.
#[derive(Debug, Clone, Default)]
pub struct Sheet {
    pub(super) cells: BTreeMap<CellRef, Cell>,
    pub(super) values: BTreeMap<CellRef, Value>,
    /// Anchor → the rectangle it spills into (anchor included).
    pub(super) spills: BTreeMap<CellRef, Range>,
    /// Covered cell (not the anchor) → anchor.
    pub(super) owner: BTreeMap<CellRef, CellRef>,
    /// Anchor → the rectangle it would spill into but cannot.
    pub(super) blocked: BTreeMap<CellRef, Range>,
    /// Formulas that gave up with `#CYCLE!` because spills kept moving
    /// ([`MAX_SPILL_PASSES`]): every edit tries them again, since what they gave
    /// up on may be settled now (a sheet loaded with the same inputs would be).
    pub(super) unsettled: BTreeSet<CellRef>,
    pub(super) graph: Graph,
    /// Upper-case name → (name as written, cell).
    pub(super) names: BTreeMap<String, (String, CellRef)>,
    pub(super) changed: Vec<CellRef>,
    /// The work budget of one recalculation; `None` for [`MAX_RECALC_WORK`].
    pub(super) budget: Option<u64>,
}

impl Sheet {
    /// An empty sheet.
    pub fn new() -> Sheet {
        Sheet::default()
    }

    /// The single value cell `c` shows: its own value (the top-left item when it
    /// spills), the item spilled into it, or [`Value::Empty`].
    pub fn shown(&self, c: CellRef) -> Value {
        if let Some(v) = self.values.get(&c) {
            return match v {
                Value::Array(a) => a.get(0, 0),
                v => v.clone(),
            };
        }
        if let Some(anchor) = self.owner.get(&c) {
            if let Some(Value::Array(a)) = self.values.get(anchor) {
                return a.get(c.row - anchor.row, c.col - anchor.col);
            }
        }
        Value::Empty
    }

    /// Push the shown values of `r` that are not empty onto `out`, in
    /// row-then-column order; returns the work it counts for: the cells the
    /// sheet holds in the rows of `r` between its corners, or when they
    /// outnumber the cells of `r`, 2·area + 1 (as many held cells as `r` has
    /// cells and one more, then every cell of `r`).
    ///
    /// The held cells are walked in key order and those inside `r` kept: a step
    /// of the walk costs far less than looking a cell up, so the walk goes on
    /// past `area` held cells (a ten-row sum in a five-column sheet passes about
    /// fifty) and gives up only past [`WALK_PER_CELL`] held cells per cell of
    /// `r`, which are then read one by one. Either way the same values come out.
    pub(super) fn occupied(&self, r: Range, out: &mut Vec<Value>) -> u64 {
        let area = r.area();
        let limit = area.saturating_mul(WALK_PER_CELL);
        let kept = out.len();
        out.reserve(usize::try_from(area.min(64)).unwrap_or(64));
        let mut looked = 0u64;
        self.each_held(r, |c, held| {
            looked += 1;
            if looked > limit {
                return false;
            }
            if r.contains(c) {
                // The value held at `c` is at hand: `shown` without a second lookup.
                let v = match held {
                    Some(Value::Array(a)) => a.get(0, 0),
                    Some(v) => v.clone(),
                    None => self.shown(c),
                };
                if v != Value::Empty {
                    out.push(v);
                }
            }
            true
        });
        if looked <= area {
            return looked;
        }
        if looked > limit {
            out.truncate(kept);
            let dense = r.cells().map(|c| self.shown(c));
            out.extend(dense.filter(|v| *v != Value::Empty));
        }
        area.saturating_add(1).saturating_add(area)
    }

    /// Each cell in the rows of `r` between its corners that holds a value or is
    /// covered by a spill, in row-then-column order, with the value it holds;
    /// until `f` returns false. The two sorted key sequences are merged: a cell
    /// is in both only for a moment, when it got an input and the spill
    /// covering it is not yet redone; it is taken once, with its value.
    fn each_held(&self, r: Range, mut f: impl FnMut(CellRef, Option<&Value>) -> bool) {
        let mut inputs = self.values.range(r.start..=r.end).peekable();
        let mut covered = self
            .owner
            .range(r.start..=r.end)
            .map(|(c, _)| *c)
            .peekable();
        loop {
            let next = match (inputs.peek(), covered.peek()) {
                (Some((a, _)), Some(b)) if b < *a => covered.next().map(|c| (c, None)),
                (Some((a, _)), Some(b)) if *a == b => {
                    covered.next();
                    inputs.next().map(|(c, v)| (*c, Some(v)))
                }
                (Some(_), _) => inputs.next().map(|(c, v)| (*c, Some(v))),
                (None, _) => covered.next().map(|c| (c, None)),
            };
            let Some((c, held)) = next else { break };
            if !f(c, held) {
                break;
            }
        }
    }

    /// The work one recalculation may do from now on, in the units of
    /// [`MAX_RECALC_WORK`] (the default); cells already computed keep their
    /// values until a recalculation reaches them.
    pub fn set_recalc_budget(&mut self, units: u64) {
        self.budget = Some(units);
    }

    /// The work one recalculation may do.
    pub fn recalc_budget(&self) -> u64 {
        self.budget.unwrap_or(MAX_RECALC_WORK)
    }

    /// The value shown at `address`.
    ///
    /// # Errors
    /// [`Error::OutOfDomain`] for a malformed address.
    pub fn value(&self, address: &str) -> Result<Value> {
        Ok(self.shown(cell_ref(address)?))
    }

    /// The input of cell `c`, if it has one.
    pub fn input(&self, c: CellRef) -> Option<&str> {
        self.cells.get(&c).map(|cell| cell.input.as_str())
    }

    /// Every cell with an input, in row-then-column order, with its input.
    pub fn inputs(&self) -> impl Iterator<Item = (CellRef, &str)> {
        self.cells.iter().map(|(c, cell)| (*c, cell.input.as_str()))
    }

    /// Named cells as (name as written, cell), ordered by upper-case name.
    pub fn names(&self) -> impl Iterator<Item = (&str, CellRef)> {
        self.names.values().map(|(n, c)| (n.as_str(), *c))
    }

    /// The rectangle cell `c` spills into, if it spills.
    pub fn spill_range(&self, c: CellRef) -> Option<Range> {
        self.spills.get(&c).copied()
    }

    /// The formula cell whose results spill into `c`, when `c` is covered by a
    /// spill (not for the formula's own cell).
    pub fn spill_anchor(&self, c: CellRef) -> Option<CellRef> {
        self.owner.get(&c).copied()
    }

    /// The cells whose shown value changed in the last edit, in row order.
    pub fn changed(&self) -> &[CellRef] {
        &self.changed
    }

    /// The smallest rectangle from A1 holding every input and spilled value, if any.
    pub fn used_range(&self) -> Option<Range> {
        let mut end: Option<CellRef> = None;
        let mut grow = |c: CellRef| {
            end = Some(match end {
                None => c,
                Some(e) => CellRef {
                    row: e.row.max(c.row),
                    col: e.col.max(c.col),
                },
            });
        };
        self.cells.keys().copied().for_each(&mut grow);
        self.spills.values().for_each(|r| grow(r.end));
        let top_left = CellRef { row: 0, col: 0 };
        end.map(|e| Range::new(top_left, e))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sheet::errors::ErrorKind;

    fn c(s: &str) -> CellRef {
        CellRef::parse(s).unwrap()
    }

    #[test]
    fn inputs_are_read_by_kind() {
        let mut s = Sheet::new();
        s.set("A1", "4k7").unwrap();
        s.set("A2", "'4k7").unwrap();
        s.set("A3", "true").unwrap();
        s.set("A4", "#N/A").unwrap();
        s.set("A5", "hello").unwrap();
        assert_eq!(s.value("A1").unwrap(), Value::Number(4700.0, None));
        assert_eq!(s.value("A2").unwrap(), Value::Text("4k7".into()));
        assert_eq!(s.value("A3").unwrap(), Value::Bool(true));
        assert!(
            matches!(s.value("A4").unwrap(), Value::Error(e) if e.kind == ErrorKind::NotAvailable)
        );
        assert_eq!(s.value("A5").unwrap(), Value::Text("hello".into()));
        assert!(s.set("A0", "1").is_err());
    }

    #[test]
    fn edits_recalculate_what_they_reach() {
        let mut s = Sheet::new();
        s.set("A1", "2").unwrap();
        s.set("B1", "=A1*10").unwrap();
        s.set("C1", "=B1+1").unwrap();
        s.set("D1", "=5").unwrap();
        let changed = s.set("A1", "3").unwrap().to_vec();
        assert_eq!(changed, [c("A1"), c("B1"), c("C1")]);
        assert_eq!(s.value("C1").unwrap(), Value::num(31.0));
        // An edit that leaves values unchanged reports only what changed.
        assert_eq!(s.set("D1", "=2+3").unwrap().len(), 0);
    }

    #[test]
    fn cycles_mark_every_cell_and_recover() {
        let mut s = Sheet::new();
        s.set("A1", "=B1").unwrap();
        s.set("B1", "=C1").unwrap();
        s.set("C1", "=A1").unwrap();
        s.set("D1", "=A1+1").unwrap();
        for a in ["A1", "B1", "C1"] {
            assert!(
                matches!(s.value(a).unwrap(), Value::Error(e) if e.kind == ErrorKind::Cycle),
                "{a}"
            );
        }
        assert!(matches!(s.value("D1").unwrap(), Value::Error(e) if e.kind == ErrorKind::Cycle));
        s.set("C1", "7").unwrap();
        assert_eq!(s.value("D1").unwrap(), Value::num(8.0));
        s.set("E1", "=E1").unwrap();
        assert!(matches!(s.value("E1").unwrap(), Value::Error(e) if e.kind == ErrorKind::Cycle));
    }

    #[test]
    fn spills_block_and_unblock() {
        let mut s = Sheet::new();
        s.set("A1", "=FEEDBACK.CEILING(100k; 100)").unwrap();
        assert_eq!(s.value("B1").unwrap(), Value::num(0.00099));
        assert_eq!(
            (s.spill_anchor(c("B1")), s.spill_anchor(c("A1"))),
            (Some(c("A1")), None)
        );
        s.set("C1", "=B1*2").unwrap();
        assert_eq!(s.value("C1").unwrap(), Value::num(0.00198));
        let changed = s.set("B1", "x").unwrap().to_vec();
        assert!(
            changed.contains(&c("A1")) && changed.contains(&c("B1")) && changed.contains(&c("C1"))
        );
        assert!(matches!(s.value("A1").unwrap(), Value::Error(e) if e.kind == ErrorKind::Blocked));
        s.set("B1", "").unwrap();
        assert_eq!(s.value("A1").unwrap(), Value::num(1000.0));
        assert_eq!(s.value("C1").unwrap(), Value::num(0.00198));
        // Clearing the formula frees the cells it spilled into.
        let changed = s.set("A1", "").unwrap().to_vec();
        assert_eq!(changed, [c("A1"), c("B1"), c("C1")]);
        assert_eq!(s.spill_range(c("A1")), None);
        s.set("B0", "").unwrap_err();
        // B1 is free for another spill: A2 spills [A/D, (D − 1)/A] = [10⁴, 9·10⁻⁵]
        // into A2:B2, and A1 copies that row into A1:B1.
        s.set("A2", "=FEEDBACK.CEILING(100k; 10)").unwrap();
        s.set("A1", "=A2:B2").unwrap();
        assert_eq!(s.value("B1").unwrap(), Value::num(9e-5));
        assert_eq!(s.value("C1").unwrap(), Value::num(9e-5 * 2.0));
    }

    #[test]
    fn a_spill_over_what_it_reads_is_circular() {
        let mut s = Sheet::new();
        // B2:C3 doubled would spill into A1:B2, over B2 which it reads.
        s.set("A1", "=B2:C3*2").unwrap();
        assert!(
            matches!(s.value("A1").unwrap(), Value::Error(e) if e.kind == ErrorKind::Cycle && e.detail.contains("B2"))
        );
        // Through another formula: A1 spills into B1, which C5 reads, which A1 reads.
        s.set("A1", "=FEEDBACK.CEILING(1000 + C5; 100)").unwrap();
        // β = (D − 1)/A = 99/1000.
        assert_eq!(s.value("B1").unwrap(), Value::num(0.099));
        s.set("C5", "=B1*0").unwrap();
        assert!(matches!(s.value("A1").unwrap(), Value::Error(e) if e.kind == ErrorKind::Cycle));
        assert_eq!(s.value("C5").unwrap(), Value::num(0.0));
        s.set("C5", "1").unwrap();
        assert_eq!(s.value("A1").unwrap(), Value::num(1001.0 / 100.0));
    }

    #[test]
    fn competing_spills_go_to_the_earlier_formula_whatever_the_edit_order() {
        let blocked = |s: &Sheet, a: &str| matches!(s.value(a).unwrap(), Value::Error(e) if e.kind == ErrorKind::Blocked);
        let mut s = Sheet::new();
        for (a, v) in [
            ("A4", "1"),
            ("B4", "2"),
            ("A5", "3"),
            ("B5", "4"),
            ("C4", "5"),
            ("C5", "6"),
            ("C6", "7"),
        ] {
            s.set(a, v).unwrap();
        }
        // A2 spills into A2:B3; then B1 (earlier in row order) wants B1:B3.
        s.set("A2", "=A4:B5").unwrap();
        assert_eq!(s.value("B3").unwrap(), Value::num(4.0));
        let changed = s.set("B1", "=C4:C6").unwrap().to_vec();
        assert!(changed.contains(&c("A2")) && changed.contains(&c("B3")));
        assert!(blocked(&s, "A2"));
        assert_eq!(s.value("B3").unwrap(), Value::num(7.0));
        let mut fresh = Sheet::new();
        fresh.load_document(&s.save_document()).unwrap();
        assert!(blocked(&fresh, "A2"));
        assert_eq!(fresh.value("B3").unwrap(), Value::num(7.0));
        // When B1 stops spilling, A2 takes its cells again.
        s.set("B1", "0").unwrap();
        assert_eq!(s.value("A2").unwrap(), Value::num(1.0));
        assert_eq!(s.value("B3").unwrap(), Value::num(4.0));
    }

    #[test]
    fn names_resolve_and_follow_changes() {
        let mut s = Sheet::new();
        s.set("A1", "100k").unwrap();
        s.set("A2", "0.01").unwrap();
        s.set_name("gain", c("A1")).unwrap();
        s.set_name("Beta", c("A2")).unwrap();
        s.set("B1", "=FEEDBACK.GAIN(gain; beta)").unwrap();
        assert_eq!(s.value("B1").unwrap(), Value::num(1e5 / 1001.0));
        s.set("A2", "0.1").unwrap();
        assert_eq!(s.value("B1").unwrap(), Value::num(1e5 / 10001.0));
        s.remove_name("BETA");
        assert!(matches!(s.value("B1").unwrap(), Value::Error(e) if e.kind == ErrorKind::Name));
        for bad in ["A1", "true", "1x", "", "SUM", "a b"] {
            assert!(s.set_name(bad, c("A1")).is_err(), "{bad}");
        }
    }
}
