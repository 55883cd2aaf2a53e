//! The dependency graph: which cells each formula reads, who reads each cell,
//! and an evaluation order with circular references found.
//!
//! A formula's precedents are the cells and ranges it names (names resolved to
//! their cells). The reverse index maps a cell to the formulas naming it
//! directly, and each block of [`BLOCK_ROWS`] rows of one column to the formulas
//! reading a range that overlaps it; a range covering more than
//! [`MAX_BLOCKS_PER_RANGE`] blocks is listed under each of its columns instead
//! when it spans at most [`MAX_WIDE_COLUMNS`] (`J1:J100000`), and otherwise on a
//! short list tested by containment, so a huge range costs few index entries
//! and a cell in another column never looks at it. Ordering uses Tarjan's strongly
//! connected components (R. Tarjan, "Depth-first search and linear graph
//! algorithms", SIAM J. Computing 1(2), 1972), written without recursion so
//! that a long chain of cells cannot overflow the stack; a component of more
//! than one cell, or a cell reading itself, is a circular reference.

use super::address::{CellRef, Range};
use alloc::collections::{BTreeMap, BTreeSet};
use alloc::vec::Vec;

/// Something a formula reads.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Dep {
    /// One cell.
    Cell(CellRef),
    /// A rectangle of cells.
    Range(Range),
}

/// Rows per block of the range index.
pub const BLOCK_ROWS: u32 = 64;
/// Ranges covering more blocks than this are listed by column instead.
pub const MAX_BLOCKS_PER_RANGE: u64 = 256;
/// Ranges too large for the block index and spanning more columns than this
/// are tested one by one.
pub const MAX_WIDE_COLUMNS: u32 = 64;

/// Precedents of every formula cell and the reverse index.
#[derive(Debug, Default, Clone)]
pub struct Graph {
    precedents: BTreeMap<CellRef, Vec<Dep>>,
    readers: BTreeMap<CellRef, BTreeSet<CellRef>>,
    /// Reader → every range it reads.
    range_readers: BTreeMap<CellRef, Vec<Range>>,
    /// (column, row block) → readers of a range overlapping that block.
    blocks: BTreeMap<(u32, u32), Vec<CellRef>>,
    /// Column → readers of a range too large for the block index that spans at
    /// most [`MAX_WIDE_COLUMNS`] columns, this one among them.
    wide_columns: BTreeMap<u32, Vec<CellRef>>,
    /// Readers of a range too large for the block index and wider than that.
    wide_readers: BTreeSet<CellRef>,
}

fn block_count(r: &Range) -> u64 {
    u64::from(r.cols()) * u64::from(r.end.row / BLOCK_ROWS - r.start.row / BLOCK_ROWS + 1)
}

fn blocks_of(r: Range) -> impl Iterator<Item = (u32, u32)> {
    (r.start.col..=r.end.col).flat_map(move |col| {
        (r.start.row / BLOCK_ROWS..=r.end.row / BLOCK_ROWS).map(move |b| (col, b))
    })
}

impl Graph {
    /// Replace what `cell` reads (an empty list for a constant or empty cell).
    pub fn set(&mut self, cell: CellRef, deps: Vec<Dep>) {
        self.remove(cell);
        if deps.is_empty() {
            return;
        }
        let mut ranges = Vec::new();
        for d in &deps {
            match *d {
                Dep::Cell(c) => {
                    self.readers.entry(c).or_default().insert(cell);
                }
                Dep::Range(r) => ranges.push(r),
            }
        }
        for r in &ranges {
            if block_count(r) > MAX_BLOCKS_PER_RANGE {
                if r.cols() > MAX_WIDE_COLUMNS {
                    self.wide_readers.insert(cell);
                    continue;
                }
                for col in r.start.col..=r.end.col {
                    let list = self.wide_columns.entry(col).or_default();
                    if list.last() != Some(&cell) {
                        list.push(cell);
                    }
                }
                continue;
            }
            for key in blocks_of(*r) {
                let list = self.blocks.entry(key).or_default();
                if list.last() != Some(&cell) {
                    list.push(cell);
                }
            }
        }
        if !ranges.is_empty() {
            self.range_readers.insert(cell, ranges);
        }
        self.precedents.insert(cell, deps);
    }

    /// Forget what `cell` reads.
    pub fn remove(&mut self, cell: CellRef) {
        let Some(deps) = self.precedents.remove(&cell) else {
            return;
        };
        for d in deps {
            if let Dep::Cell(c) = d {
                if let Some(set) = self.readers.get_mut(&c) {
                    set.remove(&cell);
                    if set.is_empty() {
                        self.readers.remove(&c);
                    }
                }
            }
        }
        if let Some(ranges) = self.range_readers.remove(&cell) {
            for r in &ranges {
                if block_count(r) <= MAX_BLOCKS_PER_RANGE {
                    for key in blocks_of(*r) {
                        forget(&mut self.blocks, key, cell);
                    }
                } else if r.cols() <= MAX_WIDE_COLUMNS {
                    for col in r.start.col..=r.end.col {
                        forget(&mut self.wide_columns, col, cell);
                    }
                }
            }
            self.wide_readers.remove(&cell);
        }
    }

    /// Forget everything.
    pub fn clear(&mut self) {
        *self = Graph::default();
    }

    /// What `cell` reads.
    pub fn precedents(&self, cell: CellRef) -> &[Dep] {
        self.precedents.get(&cell).map_or(&[], Vec::as_slice)
    }

    /// Call `f` once with every formula that reads `cell` directly or through a
    /// range.
    pub fn readers_of(&self, cell: CellRef, mut f: impl FnMut(CellRef)) {
        let reads = |reader: &&CellRef| {
            self.range_readers
                .get(*reader)
                .is_some_and(|rs| rs.iter().any(|r| r.contains(cell)))
        };
        // A reader appears at most once per list (see `set`), but may be in
        // several lists through several ranges.
        let in_block = self
            .blocks
            .get(&(cell.col, cell.row / BLOCK_ROWS))
            .map_or(&[][..], Vec::as_slice);
        let in_column = self
            .wide_columns
            .get(&cell.col)
            .map_or(&[][..], Vec::as_slice);
        if in_block.is_empty() && in_column.is_empty() && self.wide_readers.is_empty() {
            // Direct readers only: a set, already sorted and without repeats.
            self.readers
                .get(&cell)
                .into_iter()
                .flatten()
                .for_each(|&r| f(r));
            return;
        }
        let mut found: Vec<CellRef> = in_block
            .iter()
            .chain(in_column)
            .chain(&self.wide_readers)
            .filter(reads)
            .chain(self.readers.get(&cell).into_iter().flatten())
            .copied()
            .collect();
        crate::sort::sort_by(&mut found, CellRef::cmp);
        found.dedup();
        found.into_iter().for_each(f);
    }
}

/// Remove `cell` from the list under `key`, and the list when it empties.
fn forget<K: Ord>(map: &mut BTreeMap<K, Vec<CellRef>>, key: K, cell: CellRef) {
    if let Some(list) = map.get_mut(&key) {
        list.retain(|x| *x != cell);
        if list.is_empty() {
            map.remove(&key);
        }
    }
}

const UNSEEN: usize = usize::MAX;

/// The state of Tarjan's search over `n` nodes. Every index used is a node
/// number below `n`: roots come from `0..n` and edge targets of `n` or more are
/// skipped, so the vectors of length `n` are never indexed out of bounds.
struct Tarjan {
    index: Vec<usize>,
    low: Vec<usize>,
    on_stack: Vec<bool>,
    cyclic: Vec<bool>,
    component_of: Vec<usize>,
    components: usize,
    stack: Vec<usize>,
    out: Vec<usize>,
    counter: usize,
}

impl Tarjan {
    fn new(n: usize) -> Tarjan {
        Tarjan {
            index: alloc::vec![UNSEEN; n],
            low: alloc::vec![0; n],
            on_stack: alloc::vec![false; n],
            cyclic: alloc::vec![false; n],
            component_of: alloc::vec![0; n],
            components: 0,
            stack: Vec::new(),
            out: Vec::with_capacity(n),
            counter: 0,
        }
    }

    /// Give `v` its index and put it on the stack.
    fn enter(&mut self, v: usize) {
        self.index[v] = self.counter;
        self.low[v] = self.counter;
        self.counter += 1;
        self.stack.push(v);
        self.on_stack[v] = true;
    }

    /// After `v`'s edges: if it roots a component, pop the component and emit it.
    fn leave(&mut self, v: usize) {
        if self.low[v] != self.index[v] {
            return;
        }
        // The component goes straight onto the order, as it is popped.
        let first = self.out.len();
        while let Some(w) = self.stack.pop() {
            self.on_stack[w] = false;
            self.out.push(w);
            if w == v {
                break;
            }
        }
        let component = self.out.get(first..).unwrap_or(&[]);
        if component.len() > 1 {
            component.iter().for_each(|&w| self.cyclic[w] = true);
        }
        component
            .iter()
            .for_each(|&w| self.component_of[w] = self.components);
        self.components += 1;
    }
}

/// Evaluation order of `n` nodes given, for node `i`, the nodes it reads
/// (`adj(i)`, their indices): every node comes after the nodes it reads, except
/// inside circular references. Returns the order (indices), per node whether it
/// lies on a circular reference, and per node the number of its strongly
/// connected component (components are numbered in the order they appear in
/// the returned order, which keeps each one together).
pub fn order<'a>(
    n: usize,
    adj: impl Fn(usize) -> &'a [usize],
) -> (Vec<usize>, Vec<bool>, Vec<usize>) {
    let mut t = Tarjan::new(n);
    // The explicit call stack: (node, next edge to follow).
    let mut calls: Vec<(usize, usize)> = Vec::new();
    for root in 0..n {
        if t.index[root] != UNSEEN {
            continue;
        }
        t.enter(root);
        calls.push((root, 0));
        while let Some(&mut (v, ref mut next_edge)) = calls.last_mut() {
            if let Some(&w) = adj(v).get(*next_edge) {
                *next_edge += 1;
                if w >= n {
                    continue;
                }
                if w == v {
                    t.cyclic[v] = true;
                }
                if t.index[w] == UNSEEN {
                    t.enter(w);
                    calls.push((w, 0));
                } else if t.on_stack[w] {
                    t.low[v] = t.low[v].min(t.index[w]);
                }
                continue;
            }
            calls.pop();
            if let Some(&(parent, _)) = calls.last() {
                t.low[parent] = t.low[parent].min(t.low[v]);
            }
            t.leave(v);
        }
    }
    (t.out, t.cyclic, t.component_of)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn c(s: &str) -> CellRef {
        CellRef::parse(s).unwrap()
    }

    #[test]
    fn readers_follow_set_and_remove() {
        let mut g = Graph::default();
        g.set(
            c("B1"),
            alloc::vec![
                Dep::Cell(c("A1")),
                Dep::Range(Range::parse("A1:A9").unwrap())
            ],
        );
        g.set(c("C1"), alloc::vec![Dep::Cell(c("B1"))]);
        let mut seen = Vec::new();
        g.readers_of(c("A5"), |r| seen.push(r));
        assert_eq!(seen, [c("B1")]);
        g.set(c("B1"), alloc::vec![]);
        seen.clear();
        g.readers_of(c("A1"), |r| seen.push(r));
        assert!(seen.is_empty());
        assert!(g.precedents(c("B1")).is_empty());
    }

    #[test]
    fn block_index_matches_a_scan() {
        // Reference: the readers found by testing every range of every reader.
        let mut g = Graph::default();
        let ranges = [
            "A1:A10",
            "A60:B70",
            "A1:A1048576",
            "C100:C100",
            "A1:XFD3",
            "B2:D200",
            "A63:A64",
            "C1:E100000",
            "D1:BZ90000",
        ];
        for (i, r) in ranges.iter().enumerate() {
            let reader = CellRef::new(i as u32, 20).unwrap();
            g.set(
                reader,
                alloc::vec![
                    Dep::Range(Range::parse(r).unwrap()),
                    Dep::Range(Range::parse("A5:A6").unwrap())
                ],
            );
        }
        g.set(CellRef::new(3, 20).unwrap(), alloc::vec![]);
        for probe in [
            "A1", "A5", "A64", "A65", "B70", "C100", "D150", "Q2", "A1000000", "E5", "XFD1",
            "E100000", "F100001", "BZ90000", "CA3",
        ] {
            let cell = c(probe);
            let mut fast = Vec::new();
            g.readers_of(cell, |r| fast.push(r));
            fast.sort_unstable();
            let mut slow: Vec<CellRef> = g
                .range_readers
                .iter()
                .filter(|(_, rs)| rs.iter().any(|r| r.contains(cell)))
                .map(|(k, _)| *k)
                .collect();
            slow.sort_unstable();
            assert_eq!(fast, slow, "{probe}");
        }
    }

    #[test]
    fn order_puts_precedents_first_and_finds_cycles() {
        // 0 reads 1, 1 reads 2, 3 reads 4 and 4 reads 3, 5 reads itself, 6 reads 3.
        let reads = [
            alloc::vec![1],
            alloc::vec![2],
            alloc::vec![],
            alloc::vec![4],
            alloc::vec![3],
            alloc::vec![5],
            alloc::vec![3],
        ];
        let (ord, cyc, comp) = order(reads.len(), |i| reads[i].as_slice());
        assert_eq!(comp[3], comp[4]);
        assert_ne!(comp[3], comp[6]);
        let pos = |i: usize| ord.iter().position(|&x| x == i).unwrap();
        assert_eq!(ord.len(), 7);
        assert!(pos(2) < pos(1) && pos(1) < pos(0));
        assert!(pos(3) < pos(6) && pos(4) < pos(6));
        assert_eq!(cyc, [false, false, false, true, true, true, false]);
    }

    #[test]
    fn a_long_chain_does_not_recurse() {
        let n = 200_000;
        let next: Vec<usize> = (1..n).collect();
        let (ord, cyc, _) = order(n, |i| next.get(i..i + 1).unwrap_or(&[]));
        assert_eq!(ord[0], n - 1);
        assert!(!cyc.iter().any(|&b| b));
    }
}
