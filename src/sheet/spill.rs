//! Spilling: storing a formula's value, and placing a result of several values
//! in the rectangle below and right of its cell.
//!
//! If any other cell of that rectangle has an input, or is covered by an
//! earlier formula's spill, the formula's cell shows `#BLOCKED!`; if the formula
//! depends on a cell of the rectangle it shows `#CYCLE!`. Where two spills would
//! overlap, the formula earlier in row-then-column order keeps the cells and the
//! later one shows `#BLOCKED!`, whatever the order of evaluation, so the outcome
//! does not depend on the order of edits.

use super::address::{CellRef, Range, MAX_COLS, MAX_ROWS};
use super::errors::ErrorKind;
use super::graph::Dep;
use super::recalc::Recalc;
use super::sheet::Sheet;
use super::value::{Array, Value};
use alloc::collections::BTreeSet;
use alloc::format;
use alloc::vec::Vec;

/// The cells of `a` and `b` in common, if any.
fn overlap(a: &Range, b: &Range) -> Option<Range> {
    a.intersects(b).then(|| {
        Range::new(
            CellRef {
                row: a.start.row.max(b.start.row),
                col: a.start.col.max(b.start.col),
            },
            CellRef {
                row: a.end.row.min(b.end.row),
                col: a.end.col.min(b.end.col),
            },
        )
    })
}

impl Sheet {
    /// The cells of `r` with an input or covered by a spill.
    fn held_in(&self, r: Range) -> Vec<CellRef> {
        let inputs = self.cells.range(r.start..=r.end).map(|(k, _)| *k);
        let covered = self.owner.range(r.start..=r.end).map(|(k, _)| *k);
        inputs.chain(covered).filter(|k| r.contains(*k)).collect()
    }

    /// A cell of `region` (other than `anchor`) that the formula in `anchor`
    /// depends on, through references, ranges, names or other spills: spilling
    /// there would make the formula read its own results.
    fn spill_reads_itself(&self, anchor: CellRef, region: Range) -> Option<CellRef> {
        let mut seen = BTreeSet::new();
        let mut todo = alloc::vec![anchor];
        seen.insert(anchor);
        while let Some(cell) = todo.pop() {
            for d in self.graph.precedents(cell) {
                let (hit, more) = match *d {
                    Dep::Cell(x) => {
                        let hit = (x != anchor && region.contains(x)).then_some(x);
                        (hit, alloc::vec![x])
                    }
                    Dep::Range(r) => {
                        let hit =
                            overlap(&r, &region).and_then(|o| o.cells().find(|x| *x != anchor));
                        (hit, self.held_in(r))
                    }
                };
                if hit.is_some() {
                    return hit;
                }
                for x in more {
                    // Follow the cell's own formula and, if it is covered by a
                    // spill, the formula spilling into it.
                    for next in [Some(x), self.owner.get(&x).copied()].into_iter().flatten() {
                        if next != anchor && seen.insert(next) {
                            todo.push(next);
                        }
                    }
                }
            }
        }
        None
    }

    /// Forget the spill of `c`, if any, recording the cells it covered.
    fn lift_spill(&mut self, c: CellRef, rc: &mut Recalc) -> Option<Range> {
        let old = self.spills.remove(&c);
        if let Some(r) = old {
            for x in r.cells().filter(|x| *x != c) {
                self.record(rc, x);
                self.owner.remove(&x);
            }
        }
        old
    }

    /// Store `v` as the value of `c`, spilling arrays. Returns the rectangles whose
    /// cells changed hands (the old and new spill of `c`, and the spills of later
    /// formulas that `c` displaced) and the displaced formulas.
    pub(super) fn place(
        &mut self,
        c: CellRef,
        v: Value,
        rc: &mut Recalc,
    ) -> (Vec<Range>, Vec<CellRef>) {
        self.record(rc, c);
        let old_spill = self.lift_spill(c, rc);
        self.blocked.remove(&c);
        let mut displaced: Vec<(CellRef, Range)> = Vec::new();
        let v = match v {
            Value::Array(a) if a.rows() > 1 || a.cols() > 1 => self.spill(c, a, rc, &mut displaced),
            v => v.into_scalar(),
        };
        let new_spill = self.spills.get(&c).copied();
        if self.cells.contains_key(&c) {
            self.values.insert(c, v);
        } else {
            self.values.remove(&c);
        }
        let mut regions: Vec<Range> = Vec::new();
        if old_spill != new_spill {
            regions.extend(old_spill);
            regions.extend(new_spill);
        }
        regions.extend(displaced.iter().map(|(_, r)| *r));
        (regions, displaced.into_iter().map(|(a, _)| a).collect())
    }

    /// Spill the array `a` from `c` if its rectangle is free, displacing later
    /// formulas (pushed onto `displaced`); the value `c` then holds.
    fn spill(
        &mut self,
        c: CellRef,
        a: Array,
        rc: &mut Recalc,
        displaced: &mut Vec<(CellRef, Range)>,
    ) -> Value {
        let Some(end) = c.offset(a.rows() - 1, a.cols() - 1) else {
            return Value::error(ErrorKind::Blocked, format!("{c}: the results would fan out past the edge of the sheet ({MAX_ROWS} rows, {MAX_COLS} columns)"));
        };
        let r = Range::new(c, end);
        let blocker = r.cells().find(|x| {
            *x != c && (self.cells.contains_key(x) || self.owner.get(x).is_some_and(|a| *a < c))
        });
        if let Some(b) = blocker {
            self.blocked.insert(c, r);
            return Value::error(
                ErrorKind::Blocked,
                format!("the results would fan out into {b}, which is not empty"),
            );
        }
        if let Some(x) = self.spill_reads_itself(c, r) {
            self.blocked.insert(c, r);
            return Value::error(
                ErrorKind::Cycle,
                format!("the results would fan out into {x}, which this formula depends on"),
            );
        }
        self.displace_later(c, r, rc, displaced);
        for x in r.cells().filter(|x| *x != c) {
            self.record(rc, x);
            self.owner.insert(x, c);
        }
        self.spills.insert(c, r);
        Value::Array(a)
    }

    /// Later formulas spilling into `r` give way to `c`: they show `#BLOCKED!`.
    fn displace_later(
        &mut self,
        c: CellRef,
        r: Range,
        rc: &mut Recalc,
        displaced: &mut Vec<(CellRef, Range)>,
    ) {
        let later: BTreeSet<CellRef> = r
            .cells()
            .filter_map(|x| self.owner.get(&x).copied())
            .collect();
        for a in later {
            self.record(rc, a);
            if let Some(ar) = self.lift_spill(a, rc) {
                self.blocked.insert(a, ar);
                self.values.insert(
                    a,
                    Value::error(
                        ErrorKind::Blocked,
                        format!("the results would fan out into cells that {c} fills"),
                    ),
                );
                displaced.push((a, ar));
            }
        }
    }
}
