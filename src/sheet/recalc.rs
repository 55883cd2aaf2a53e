//! Recalculation: the cells an edit reaches, evaluated in dependency order
//! ([`super::order`]) within a work budget, and which shown values changed.

use super::address::{CellRef, Range};
use super::errors::ErrorKind;
use super::eval::{evaluate, Context};
use super::graph::BLOCK_ROWS;
use super::order::SMALL_RANGE_CELLS;
use super::sheet::{Content, Sheet, MAX_SPILL_PASSES};
use super::value::Value;
use alloc::collections::{BTreeMap, BTreeSet};
use alloc::format;
use alloc::string::ToString;
use alloc::vec::Vec;
use core::cell::{Cell, RefCell};

/// Shown values before a recalculation, to report what changed; `None` when
/// nothing needs reporting (a freshly loaded sheet).
pub(super) struct Recalc {
    old: Option<BTreeMap<CellRef, Value>>,
}

impl Recalc {
    /// Report what changed.
    pub(super) fn tracking() -> Recalc {
        Recalc {
            old: Some(BTreeMap::new()),
        }
    }

    /// Report nothing.
    pub(super) fn untracked() -> Recalc {
        Recalc { old: None }
    }
}

/// (range, function) → (the clock when computed, the result). The range comes
/// first in the key: ranges mostly differ, so a lookup compares the function
/// names only between equal ranges.
type RangeResults = BTreeMap<(Range, &'static str), (u64, Value)>;

/// What one recalculation has spent of its budget, and the results of
/// functions over one range it may reuse.
pub(super) struct Work {
    budget: u64,
    used: Cell<u64>,
    /// Counts the changes of cell values in this recalculation.
    clock: u64,
    /// (column, row block) → the clock when a cell in it last changed.
    changed_at: BTreeMap<(u32, u32), u64>,
    cache: RefCell<RangeResults>,
}

impl Work {
    pub(super) fn new(budget: u64) -> Work {
        Work {
            budget,
            used: Cell::new(0),
            clock: 0,
            changed_at: BTreeMap::new(),
            cache: RefCell::new(BTreeMap::new()),
        }
    }

    fn charge(&self, units: u64) {
        self.used.set(self.used.get().saturating_add(units));
    }

    /// Whether the budget is spent.
    fn spent(&self) -> bool {
        self.used.get() > self.budget
    }

    /// Cell values in `r` changed: results cached over them are stale. (While
    /// nothing is cached there is nothing to mark: only changes after a result
    /// was kept make it stale.)
    fn touch(&mut self, r: Range) {
        if self.cache.borrow().is_empty() {
            return;
        }
        self.clock += 1;
        for col in r.start.col..=r.end.col {
            for block in r.start.row / BLOCK_ROWS..=r.end.row / BLOCK_ROWS {
                self.changed_at.insert((col, block), self.clock);
            }
        }
    }

    /// Whether results over `r` are kept: not over a range of at most
    /// [`SMALL_RANGE_CELLS`] cells, which is read again for less than keeping
    /// and finding its result costs (most small ranges have one reader, the
    /// ten-cell sums of the benchmark sheet say).
    fn keeps(r: Range) -> bool {
        r.area() > SMALL_RANGE_CELLS
    }

    fn cached(&self, function: &'static str, r: Range) -> Option<Value> {
        if !Work::keeps(r) {
            return None;
        }
        let cache = self.cache.borrow();
        let (when, v) = cache.get(&(r, function))?;
        let (b0, b1) = (r.start.row / BLOCK_ROWS, r.end.row / BLOCK_ROWS);
        let stale = self
            .changed_at
            .range((r.start.col, b0)..=(r.end.col, b1))
            .any(|(&(_, b), &t)| (b0..=b1).contains(&b) && t > *when);
        (!stale).then(|| v.clone())
    }

    fn remember(&self, function: &'static str, r: Range, v: &Value) {
        if !Work::keeps(r) {
            return;
        }
        self.cache
            .borrow_mut()
            .insert((r, function), (self.clock, v.clone()));
    }
}

/// The sheet as a formula sees it during a recalculation.
struct Reader<'a> {
    sheet: &'a Sheet,
    work: &'a Work,
}

impl Context for Reader<'_> {
    fn cell(&self, c: CellRef) -> Value {
        self.sheet.shown(c)
    }

    fn name(&self, upper: &str) -> Option<CellRef> {
        self.sheet.names.get(upper).map(|(_, c)| *c)
    }

    fn charge(&self, cells: u64) {
        self.work.charge(cells);
    }

    fn occupied(&self, r: Range, out: &mut Vec<Value>) {
        self.work.charge(self.sheet.occupied(r, out));
    }

    fn cached(&self, function: &'static str, r: Range) -> Option<Value> {
        self.work.cached(function, r)
    }

    fn remember(&self, function: &'static str, r: Range, v: &Value) {
        self.work.remember(function, r, v);
    }
}

impl Sheet {
    pub(super) fn record(&self, rc: &mut Recalc, c: CellRef) {
        if let Some(old) = rc.old.as_mut() {
            old.entry(c).or_insert_with(|| self.shown(c));
        }
    }

    pub(super) fn finish(&mut self, rc: Recalc) {
        let old = rc.old.unwrap_or_default();
        self.changed = old
            .into_iter()
            .filter(|(c, old)| *old != self.shown(*c))
            .map(|(c, _)| c)
            .collect();
    }

    /// Formulas reading `c`, including through the cells `c` spills into.
    fn readers(&self, c: CellRef, out: &mut impl FnMut(CellRef)) {
        self.graph.readers_of(c, &mut *out);
        if let Some(r) = self.spills.get(&c) {
            for x in r.cells().filter(|x| *x != c) {
                self.graph.readers_of(x, &mut *out);
            }
        }
    }

    /// `seeds` and every formula reaching them.
    pub(super) fn closure(&self, seeds: BTreeSet<CellRef>) -> BTreeSet<CellRef> {
        let mut seen = seeds.clone();
        let mut todo: Vec<CellRef> = seeds.into_iter().collect();
        while let Some(c) = todo.pop() {
            self.readers(c, &mut |r| {
                if seen.insert(r) {
                    todo.push(r);
                }
            });
        }
        seen
    }

    /// Evaluate `pending` and whatever spills then move, in passes, within one
    /// work budget ([`Sheet::recalc_budget`]).
    pub(super) fn run(&mut self, mut pending: BTreeSet<CellRef>, rc: &mut Recalc) {
        let mut work = Work::new(self.recalc_budget());
        for pass in 0..=MAX_SPILL_PASSES {
            let again = self.pass(&pending, pass == MAX_SPILL_PASSES, rc, &mut work);
            if again.is_empty() {
                return;
            }
            pending = again;
        }
    }

    /// One pass over `pending` (in the last allowed pass every formula gives up
    /// with `#CYCLE!`); returns the cells to evaluate again because spills moved.
    fn pass(
        &mut self,
        pending: &BTreeSet<CellRef>,
        last: bool,
        rc: &mut Recalc,
        work: &mut Work,
    ) -> BTreeSet<CellRef> {
        // Sorted, since it comes from a set: indices are found by binary search.
        let nodes: Vec<CellRef> = pending.iter().copied().collect();
        let (ord, cyclic) = self.evaluation_order(&nodes);
        let mut again = BTreeSet::new();
        for i in ord {
            let Some(&c) = nodes.get(i) else { continue };
            let on_cycle = cyclic.get(i).copied().unwrap_or(false);
            if last {
                self.unsettled.insert(c);
            } else {
                self.unsettled.remove(&c);
            }
            let v = if last {
                Some(Value::error(
                    ErrorKind::Cycle,
                    "results that fan out keep changing the cells they are computed from",
                ))
            } else {
                self.compute(c, on_cycle, work)
            };
            // A cell without input still gives up the cells it spilled into.
            let (regions, displaced) = self.place(c, v.unwrap_or(Value::Empty), rc);
            work.touch(Range::new(c, c));
            regions.iter().for_each(|r| work.touch(*r));
            if let Some(r) = self.spills.get(&c) {
                work.charge(r.area());
            }
            if !regions.is_empty() {
                self.after_spill_moved(c, &regions, displaced, &mut again);
            }
        }
        again
    }

    /// Whoever reads a cell that changed hands reads anew; displaced formulas and
    /// formulas waiting for those cells try again, and so does every formula
    /// reading them: a formula tried again may show another value (a blocked
    /// spill names the cell now in its way), and a reader evaluated before it
    /// would otherwise keep the old one, so the shown values and error details
    /// would depend on the order of evaluation (a sheet built cell by cell and
    /// the same sheet loaded from its document differed).
    fn after_spill_moved(
        &self,
        c: CellRef,
        regions: &[Range],
        displaced: Vec<CellRef>,
        again: &mut BTreeSet<CellRef>,
    ) {
        let mut retried: BTreeSet<CellRef> = regions
            .iter()
            .flat_map(|r| r.cells())
            .filter(|x| *x != c)
            .collect();
        for (a, want) in &self.blocked {
            if *a != c && regions.iter().any(|r| r.intersects(want)) {
                retried.insert(*a);
            }
        }
        retried.extend(displaced);
        if !retried.is_empty() {
            again.extend(self.closure(retried));
        }
    }

    /// The value of cell `c` now, or `None` for a cell without input. A formula
    /// reached after the budget is spent shows `#BUDGET!`.
    fn compute(&self, c: CellRef, on_cycle: bool, work: &Work) -> Option<Value> {
        let cell = self.cells.get(&c)?;
        Some(match &cell.content {
            Content::Constant(v) => v.clone(),
            Content::Formula(Err(e)) => Value::error(ErrorKind::Syntax, e.to_string()),
            Content::Formula(Ok(_)) if on_cycle => Value::error(
                ErrorKind::Cycle,
                format!("{c} is part of a circular reference"),
            ),
            Content::Formula(Ok(_)) if work.spent() => Value::error(
                ErrorKind::Budget,
                format!(
                    "not computed: this recalculation had spent its budget of {} cell reads before reaching {c}; use smaller ranges or fewer formulas over them",
                    self.recalc_budget()
                ),
            ),
            Content::Formula(Ok(e)) => {
                work.charge(1);
                evaluate(e, &Reader { sheet: self, work })
            }
        })
    }
}
