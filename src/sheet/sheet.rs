//! The sheet: cell inputs, named cells, computed values, and recalculation of
//! exactly the cells an edit reaches.
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

use super::address::{CellRef, Range, MAX_COLS, MAX_ROWS};
use super::errors::{CellError, ErrorKind};
use super::eval::{evaluate, Context, MAX_RANGE_CELLS};
use super::graph::{order, Dep, Graph};
use super::lexer::ParseError;
use super::literal::{read_cell, CellReading};
use super::parser::{parse, Expr};
use super::value::Value;
use crate::error::{Error, Result};
use alloc::collections::{BTreeMap, BTreeSet};
use alloc::format;
use alloc::string::{String, ToString};
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

#[derive(Debug, Clone)]
enum Content {
    Constant(Value),
    Formula(core::result::Result<Expr, ParseError>),
}

#[derive(Debug, Clone)]
struct Cell {
    input: String,
    content: Content,
}

/// A worksheet.
#[derive(Debug, Clone, Default)]
pub struct Sheet {
    cells: BTreeMap<CellRef, Cell>,
    values: BTreeMap<CellRef, Value>,
    /// Anchor → the rectangle it spills into (anchor included).
    spills: BTreeMap<CellRef, Range>,
    /// Covered cell (not the anchor) → anchor.
    owner: BTreeMap<CellRef, CellRef>,
    /// Anchor → the rectangle it would spill into but cannot.
    blocked: BTreeMap<CellRef, Range>,
    graph: Graph,
    /// Upper-case name → (name as written, cell).
    names: BTreeMap<String, (String, CellRef)>,
    changed: Vec<CellRef>,
}

/// Read one cell input into its content.
fn read_input(input: &str) -> Content {
    if let Some(formula) = input.strip_prefix('=') {
        // Columns count from the `=` the user typed.
        return Content::Formula(parse(formula).map_err(|e| ParseError {
            pos: e.pos + 1,
            ..e
        }));
    }
    if let Some(text) = input.strip_prefix('\'') {
        return Content::Constant(Value::Text(String::from(text)));
    }
    let t = input.trim();
    if t.eq_ignore_ascii_case("TRUE") {
        return Content::Constant(Value::Bool(true));
    }
    if t.eq_ignore_ascii_case("FALSE") {
        return Content::Constant(Value::Bool(false));
    }
    if let Some(k) = ErrorKind::from_code(t) {
        return Content::Constant(Value::Error(CellError::new(k, "")));
    }
    match read_cell(input) {
        CellReading::Number(q) => Content::Constant(Value::Number(q.value, q.unit)),
        CellReading::Error(detail) => Content::Constant(Value::error(ErrorKind::Syntax, detail)),
        CellReading::Text => Content::Constant(Value::Text(String::from(input))),
    }
}

/// Whether `name` may name a cell: a letter or `_` first, then letters, digits,
/// `_` or `.`; at most [`MAX_NAME_CHARS`]; not a cell address, `TRUE`, `FALSE`
/// or a function name.
pub fn valid_name(name: &str) -> bool {
    let mut chars = name.chars();
    let first_ok = chars
        .next()
        .is_some_and(|c| c.is_ascii_alphabetic() || c == '_');
    first_ok
        && name.len() <= MAX_NAME_CHARS
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_' || c == '.')
        && CellRef::parse(name).is_none()
        && !name.eq_ignore_ascii_case("TRUE")
        && !name.eq_ignore_ascii_case("FALSE")
        && super::functions::lookup(name).is_none()
}

fn bad_cell() -> Error {
    Error::OutOfDomain {
        param: "cell",
        requirement: "must be a cell address from A1 to XFD1048576, such as B3",
    }
}

/// Parse a cell address for the API.
///
/// # Errors
/// [`Error::OutOfDomain`] on `cell` for anything but an address.
pub fn cell_ref(address: &str) -> Result<CellRef> {
    CellRef::parse(address.trim()).ok_or_else(bad_cell)
}

/// Shown values before a recalculation, to report what changed; `None` when
/// nothing needs reporting (a freshly loaded sheet).
struct Recalc {
    old: Option<BTreeMap<CellRef, Value>>,
}

impl Recalc {
    fn tracking() -> Recalc {
        Recalc {
            old: Some(BTreeMap::new()),
        }
    }
}

impl Context for Sheet {
    fn cell(&self, c: CellRef) -> Value {
        self.shown(c)
    }

    fn name(&self, upper: &str) -> Option<CellRef> {
        self.names.get(upper).map(|(_, c)| *c)
    }
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

    /// Set the input of the cell at `address` and recalculate; returns the cells
    /// whose shown value changed.
    ///
    /// # Errors
    /// [`Error::OutOfDomain`] for a malformed address; [`Error::TooLarge`] for an
    /// input longer than [`MAX_INPUT_BYTES`] or a sheet of more than
    /// [`MAX_CELLS`] inputs. The sheet is unchanged on error.
    ///
    /// # Example
    /// ```
    /// use loopwright::sheet::{Sheet, Value};
    ///
    /// let mut s = Sheet::new();
    /// s.set("B1", "4k7").unwrap();
    /// let changed = s.set("B2", "=B1*2").unwrap();
    /// assert_eq!(changed.len(), 1);
    /// assert_eq!(s.value("B2").unwrap(), Value::Number(9400.0, None));
    /// // A bad formula is an error value in the cell; a bad address is refused.
    /// s.set("B3", "=B1+").unwrap();
    /// assert_eq!(s.value("B3").unwrap().display(), "#SYNTAX!");
    /// assert_eq!(s.set("B0", "1").unwrap_err().param(), "cell");
    /// ```
    pub fn set(&mut self, address: &str, input: &str) -> Result<&[CellRef]> {
        let c = cell_ref(address)?;
        self.set_cell(c, input)
    }

    /// [`Sheet::set`] by cell.
    ///
    /// # Errors
    /// As [`Sheet::set`].
    pub fn set_cell(&mut self, c: CellRef, input: &str) -> Result<&[CellRef]> {
        self.set_many(&[(c, input)])
    }

    /// Set several inputs, then recalculate once.
    ///
    /// # Errors
    /// As [`Sheet::set`]; nothing is set when any input is refused.
    pub fn set_many(&mut self, edits: &[(CellRef, &str)]) -> Result<&[CellRef]> {
        let mut added = 0usize;
        for (c, input) in edits {
            if input.len() > MAX_INPUT_BYTES {
                return Err(Error::TooLarge {
                    param: "input",
                    limit: MAX_INPUT_BYTES as u64,
                });
            }
            if !input.trim().is_empty() && !self.cells.contains_key(c) {
                added += 1;
            }
        }
        if self.cells.len() + added > MAX_CELLS {
            return Err(Error::TooLarge {
                param: "cells",
                limit: MAX_CELLS as u64,
            });
        }
        let mut rc = Recalc::tracking();
        let mut seeds = BTreeSet::new();
        for &(c, input) in edits {
            self.record(&mut rc, c);
            if let Some(r) = self.spills.get(&c).copied() {
                r.cells().for_each(|x| self.record(&mut rc, x));
            }
            self.put_input(c, input);
            seeds.insert(c);
            // A spill covering c, or blocked by c, must be redone.
            if let Some(a) = self.owner.get(&c) {
                seeds.insert(*a);
            }
            for (a, r) in &self.blocked {
                if r.contains(c) {
                    seeds.insert(*a);
                }
            }
        }
        let pending = self.closure(seeds);
        self.run(pending, &mut rc);
        self.finish(rc);
        Ok(&self.changed)
    }

    /// Give cell `c` the name `name` (replacing what the name referred to), then
    /// recalculate everything.
    ///
    /// # Errors
    /// [`Error::OutOfDomain`] on `name` when it is not a valid name (see
    /// [`valid_name`]); [`Error::TooLarge`] beyond [`MAX_NAMES`].
    pub fn set_name(&mut self, name: &str, c: CellRef) -> Result<&[CellRef]> {
        if !valid_name(name) {
            return Err(Error::OutOfDomain {
                param: "name",
                requirement: "must start with a letter or _, hold only letters, digits, _ and ., have at most 64 characters, and not be a cell address, TRUE, FALSE or a function name",
            });
        }
        let key = name.to_ascii_uppercase();
        if !self.names.contains_key(&key) && self.names.len() >= MAX_NAMES {
            return Err(Error::TooLarge {
                param: "names",
                limit: MAX_NAMES as u64,
            });
        }
        self.names.insert(key, (String::from(name), c));
        self.rebuild_all();
        Ok(&self.changed)
    }

    /// Remove a name (any case); formulas using it show `#NAME?`.
    pub fn remove_name(&mut self, name: &str) -> &[CellRef] {
        if self.names.remove(&name.to_ascii_uppercase()).is_some() {
            self.rebuild_all();
        } else {
            self.changed.clear();
        }
        &self.changed
    }

    /// Replace the whole content by `inputs` and `names` (already validated by
    /// the caller) and recalculate everything.
    ///
    /// # Errors
    /// As [`Sheet::set_many`] and [`Sheet::set_name`]; the sheet is unchanged on error.
    pub fn replace_all(
        &mut self,
        inputs: &[(CellRef, String)],
        names: &[(String, CellRef)],
    ) -> Result<()> {
        let mut fresh = Sheet::new();
        if inputs.len() > MAX_CELLS {
            return Err(Error::TooLarge {
                param: "cells",
                limit: MAX_CELLS as u64,
            });
        }
        if names.len() > MAX_NAMES {
            return Err(Error::TooLarge {
                param: "names",
                limit: MAX_NAMES as u64,
            });
        }
        for (name, c) in names {
            if !valid_name(name) {
                return Err(Error::OutOfDomain {
                    param: "name",
                    requirement: "must be a valid cell name",
                });
            }
            fresh
                .names
                .insert(name.to_ascii_uppercase(), (name.clone(), *c));
        }
        for (c, input) in inputs {
            if input.len() > MAX_INPUT_BYTES {
                return Err(Error::TooLarge {
                    param: "input",
                    limit: MAX_INPUT_BYTES as u64,
                });
            }
            fresh.put_input(*c, input);
        }
        // Names were set first, so the graph built by put_input is complete.
        let everything: BTreeSet<CellRef> = fresh.cells.keys().copied().collect();
        fresh.run(everything, &mut Recalc { old: None });
        let mut changed: BTreeSet<CellRef> = self.cells.keys().copied().collect();
        changed.extend(self.owner.keys().copied());
        changed.extend(fresh.cells.keys().copied());
        changed.extend(fresh.owner.keys().copied());
        *self = fresh;
        self.changed = changed.into_iter().collect();
        Ok(())
    }

    fn record(&self, rc: &mut Recalc, c: CellRef) {
        if let Some(old) = rc.old.as_mut() {
            old.entry(c).or_insert_with(|| self.shown(c));
        }
    }

    /// Re-evaluate every cell (without re-reading inputs); returns the cells
    /// whose shown value changed, which is none unless a previous edit was
    /// interrupted by a limit.
    pub fn recalculate_all(&mut self) -> &[CellRef] {
        let mut rc = Recalc::tracking();
        let everything: BTreeSet<CellRef> = self.cells.keys().copied().collect();
        self.run(everything, &mut rc);
        self.finish(rc);
        &self.changed
    }

    fn deps_of(&self, e: &Expr) -> Vec<Dep> {
        let mut deps = Vec::new();
        e.visit_refs(&mut |r| match r {
            Expr::Cell(c) => deps.push(Dep::Cell(*c)),
            Expr::Range(r) => deps.push(Dep::Range(*r)),
            Expr::Name(n) => {
                if let Some((_, c)) = self.names.get(n) {
                    deps.push(Dep::Cell(*c));
                }
            }
            _ => {}
        });
        crate::sort::sort_by(&mut deps, Dep::cmp);
        deps.dedup();
        deps
    }

    /// Store an input without recalculating.
    fn put_input(&mut self, c: CellRef, input: &str) {
        if input.trim().is_empty() {
            self.cells.remove(&c);
            self.values.remove(&c);
            self.graph.remove(c);
            return;
        }
        let content = read_input(input);
        let deps = match &content {
            Content::Formula(Ok(e)) => self.deps_of(e),
            _ => Vec::new(),
        };
        self.graph.set(c, deps);
        self.cells.insert(
            c,
            Cell {
                input: String::from(input),
                content,
            },
        );
    }

    fn rebuild_all(&mut self) {
        let mut rc = Recalc::tracking();
        self.graph.clear();
        let cells: Vec<CellRef> = self.cells.keys().copied().collect();
        for c in &cells {
            let deps = match self.cells.get(c).map(|cell| &cell.content) {
                Some(Content::Formula(Ok(e))) => self.deps_of(e),
                _ => Vec::new(),
            };
            self.graph.set(*c, deps);
        }
        let pending: BTreeSet<CellRef> = cells.into_iter().collect();
        self.run(pending, &mut rc);
        self.finish(rc);
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
    fn closure(&self, seeds: BTreeSet<CellRef>) -> BTreeSet<CellRef> {
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

    /// The pending cells that `c` reads (directly, or as the anchor of a spill
    /// covering what it reads), as indices into `nodes`.
    fn pending_precedents(
        &self,
        c: CellRef,
        nodes: &[CellRef],
        out: &mut Vec<usize>,
        spills: bool,
    ) {
        let from = out.len();
        let see = |x: CellRef, out: &mut Vec<usize>| {
            if let Ok(i) = nodes.binary_search(&x) {
                out.push(i);
            }
            if let Some(a) = self.owner.get(&x).filter(|a| spills && **a != c) {
                if let Ok(i) = nodes.binary_search(a) {
                    out.push(i);
                }
            }
        };
        for d in self.graph.precedents(c) {
            match *d {
                Dep::Cell(x) => see(x, out),
                Dep::Range(r) if r.area() <= MAX_RANGE_CELLS && r.area() <= nodes.len() as u64 => {
                    r.cells().for_each(|x| see(x, out));
                }
                Dep::Range(r) if r.area() <= MAX_RANGE_CELLS => {
                    // Fewer pending cells than range cells: test each pending cell, and
                    // each pending anchor whose spill overlaps the range.
                    for (i, x) in nodes.iter().enumerate() {
                        let covers = spills
                            && *x != c
                            && self.spills.get(x).is_some_and(|s| s.intersects(&r));
                        if r.contains(*x) || covers {
                            out.push(i);
                        }
                    }
                }
                Dep::Range(_) => {}
            }
        }
        if let Some(mine) = out.get_mut(from..) {
            crate::sort::sort_by(mine, usize::cmp);
        }
        // Duplicates only repeat an edge; the ordering does not mind them.
    }

    fn run(&mut self, mut pending: BTreeSet<CellRef>, rc: &mut Recalc) {
        for pass in 0..=MAX_SPILL_PASSES {
            // Sorted, since it comes from a set: indices are found by binary search.
            let nodes: Vec<CellRef> = pending.iter().copied().collect();
            // The order follows references and spills (a reader of a spilled cell
            // after the formula spilling into it); circular references are those
            // of references alone. A cycle through a spill is found when the spill
            // is placed (see `spill_reads_itself`).
            let (by_reference, cyclic, _) = order(nodes.len(), |i, out| {
                if let Some(c) = nodes.get(i) {
                    self.pending_precedents(*c, &nodes, out, false);
                }
            });
            let ord = if self.owner.is_empty() {
                by_reference
            } else {
                let (combined, _, component) = order(nodes.len(), |i, out| {
                    if let Some(c) = nodes.get(i) {
                        self.pending_precedents(*c, &nodes, out, true);
                    }
                });
                // Where spills and references together form a loop, go by
                // references alone inside that loop.
                let mut rank = alloc::vec![0usize; nodes.len()];
                for (pos, &i) in by_reference.iter().enumerate() {
                    if let Some(r) = rank.get_mut(i) {
                        *r = pos;
                    }
                }
                let mut ord = combined;
                let key = |i: usize| {
                    (
                        component.get(i).copied().unwrap_or(0),
                        rank.get(i).copied().unwrap_or(0),
                    )
                };
                crate::sort::sort_by(&mut ord, |&i, &j| key(i).cmp(&key(j)));
                ord
            };
            let mut again = BTreeSet::new();
            for i in ord {
                let Some(&c) = nodes.get(i) else { continue };
                let on_cycle = cyclic.get(i).copied().unwrap_or(false);
                let v = if pass == MAX_SPILL_PASSES {
                    Some(Value::error(
                        ErrorKind::Cycle,
                        "spilled results keep changing the cells they are computed from",
                    ))
                } else {
                    self.compute(c, on_cycle)
                };
                // A cell without input still gives up the cells it spilled into.
                let v = v.unwrap_or(Value::Empty);
                let (regions, displaced) = self.place(c, v, rc);
                if !regions.is_empty() {
                    // Whoever reads a cell that changed hands reads anew; displaced
                    // formulas and formulas waiting for those cells try again.
                    let touched: BTreeSet<CellRef> = regions
                        .iter()
                        .flat_map(|r| r.cells())
                        .filter(|x| *x != c)
                        .collect();
                    for (a, want) in &self.blocked {
                        if *a != c && regions.iter().any(|r| r.intersects(want)) {
                            again.insert(*a);
                        }
                    }
                    again.extend(displaced);
                    if !touched.is_empty() {
                        again.extend(self.closure(touched));
                    }
                }
            }
            if again.is_empty() {
                return;
            }
            pending = again;
        }
    }

    /// The value of cell `c` now, or `None` for a cell without input.
    fn compute(&self, c: CellRef, on_cycle: bool) -> Option<Value> {
        let cell = self.cells.get(&c)?;
        Some(match &cell.content {
            Content::Constant(v) => v.clone(),
            Content::Formula(Err(e)) => Value::error(ErrorKind::Syntax, e.to_string()),
            Content::Formula(Ok(_)) if on_cycle => Value::error(
                ErrorKind::Cycle,
                format!("{c} is part of a circular reference"),
            ),
            Content::Formula(Ok(e)) => evaluate(e, self),
        })
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
                let (hit, more): (Option<CellRef>, Vec<CellRef>) = match *d {
                    Dep::Cell(x) => {
                        let hit = (x != anchor && region.contains(x)).then_some(x);
                        (hit, alloc::vec![x])
                    }
                    Dep::Range(r) => {
                        let hit = if r.intersects(&region) {
                            let overlap = Range::new(
                                CellRef {
                                    row: r.start.row.max(region.start.row),
                                    col: r.start.col.max(region.start.col),
                                },
                                CellRef {
                                    row: r.end.row.min(region.end.row),
                                    col: r.end.col.min(region.end.col),
                                },
                            );
                            overlap.cells().find(|x| *x != anchor)
                        } else {
                            None
                        };
                        let inputs = self
                            .cells
                            .range(r.start..=r.end)
                            .map(|(k, _)| *k)
                            .filter(|k| r.contains(*k));
                        let covered = self
                            .owner
                            .range(r.start..=r.end)
                            .map(|(k, _)| *k)
                            .filter(|k| r.contains(*k));
                        (hit, inputs.chain(covered).collect())
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

    /// Store `v` as the value of `c`, spilling arrays. Returns the rectangles whose
    /// cells changed hands (the old and new spill of `c`, and the spills of later
    /// formulas that `c` displaced) and the displaced formulas.
    ///
    /// Where two spills would overlap, the formula earlier in row-then-column order
    /// keeps the cells and the later one shows `#BLOCKED!`, whatever the order of
    /// evaluation, so the outcome does not depend on the order of edits.
    fn place(&mut self, c: CellRef, v: Value, rc: &mut Recalc) -> (Vec<Range>, Vec<CellRef>) {
        self.record(rc, c);
        let old_spill = self.spills.remove(&c);
        self.blocked.remove(&c);
        if let Some(r) = old_spill {
            for x in r.cells().filter(|x| *x != c) {
                self.record(rc, x);
                self.owner.remove(&x);
            }
        }
        let mut new_spill = None;
        let mut displaced: Vec<(CellRef, Range)> = Vec::new();
        let v = match v {
            Value::Array(a) if a.rows() > 1 || a.cols() > 1 => {
                let end = c.offset(a.rows() - 1, a.cols() - 1);
                match end {
                    None => Value::error(ErrorKind::Blocked, format!("{c}: the results would spill past the edge of the sheet ({MAX_ROWS} rows, {MAX_COLS} columns)")),
                    Some(end) => {
                        let r = Range::new(c, end);
                        let blocker = r.cells().find(|x| {
                            *x != c && (self.cells.contains_key(x) || self.owner.get(x).is_some_and(|a| *a < c))
                        });
                        match (blocker, self.spill_reads_itself(c, r)) {
                            (Some(b), _) => {
                                self.blocked.insert(c, r);
                                Value::error(ErrorKind::Blocked, format!("the results would spill into {b}, which is not empty"))
                            }
                            (None, Some(x)) => {
                                self.blocked.insert(c, r);
                                Value::error(
                                    ErrorKind::Cycle,
                                    format!("the results would spill into {x}, which this formula depends on"),
                                )
                            }
                            (None, None) => {
                                // Later formulas spilling here give way.
                                let later: BTreeSet<CellRef> = r.cells().filter_map(|x| self.owner.get(&x).copied()).collect();
                                for a in later {
                                    if let Some(ar) = self.spills.remove(&a) {
                                        self.record(rc, a);
                                        for x in ar.cells().filter(|x| *x != a) {
                                            self.record(rc, x);
                                            self.owner.remove(&x);
                                        }
                                        self.blocked.insert(a, ar);
                                        self.values.insert(
                                            a,
                                            Value::error(ErrorKind::Blocked, format!("the results would spill into cells that {c} fills")),
                                        );
                                        displaced.push((a, ar));
                                    }
                                }
                                for x in r.cells().filter(|x| *x != c) {
                                    self.record(rc, x);
                                    self.owner.insert(x, c);
                                }
                                self.spills.insert(c, r);
                                new_spill = Some(r);
                                Value::Array(a)
                            }
                        }
                    }
                }
            }
            v => v.into_scalar(),
        };
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

    fn finish(&mut self, rc: Recalc) {
        let old = rc.old.unwrap_or_default();
        self.changed = old
            .into_iter()
            .filter(|(c, old)| *old != self.shown(*c))
            .map(|(c, _)| c)
            .collect();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

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
