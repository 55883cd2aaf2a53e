//! The dependency graph: which cells each formula reads, who reads each cell,
//! and an evaluation order with circular references found.
//!
//! A formula's precedents are the cells and ranges it names (names resolved to
//! their cells). The reverse index maps a cell to the formulas naming it
//! directly; formulas reading ranges are kept apart and tested by containment,
//! so a large range costs no index entries. Ordering uses Tarjan's strongly
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

/// Precedents of every formula cell and the reverse index.
#[derive(Debug, Default, Clone)]
pub struct Graph {
    precedents: BTreeMap<CellRef, Vec<Dep>>,
    readers: BTreeMap<CellRef, BTreeSet<CellRef>>,
    range_readers: BTreeMap<CellRef, Vec<Range>>,
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
        if !ranges.is_empty() {
            self.range_readers.insert(cell, ranges);
        }
        self.precedents.insert(cell, deps);
    }

    /// Forget what `cell` reads.
    pub fn remove(&mut self, cell: CellRef) {
        let Some(deps) = self.precedents.remove(&cell) else { return };
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
        self.range_readers.remove(&cell);
    }

    /// Forget everything.
    pub fn clear(&mut self) {
        *self = Graph::default();
    }

    /// What `cell` reads.
    pub fn precedents(&self, cell: CellRef) -> &[Dep] {
        self.precedents.get(&cell).map_or(&[], Vec::as_slice)
    }

    /// Call `f` with every formula that reads `cell` directly or through a range.
    pub fn readers_of(&self, cell: CellRef, mut f: impl FnMut(CellRef)) {
        if let Some(set) = self.readers.get(&cell) {
            set.iter().copied().for_each(&mut f);
        }
        for (reader, ranges) in &self.range_readers {
            if ranges.iter().any(|r| r.contains(cell)) {
                f(*reader);
            }
        }
    }
}

/// Evaluation order of `nodes` given, for node `i`, the nodes it reads
/// (`edges(i)` as indices into `nodes`): every node comes after the nodes it
/// reads, except inside circular references. Returns the order (indices) and,
/// per node, whether it lies on a circular reference.
pub fn order(n: usize, edges: impl Fn(usize) -> Vec<usize>) -> (Vec<usize>, Vec<bool>) {
    const UNSEEN: usize = usize::MAX;
    let adj: Vec<Vec<usize>> = (0..n).map(&edges).collect();
    let mut index = alloc::vec![UNSEEN; n];
    let mut low = alloc::vec![0usize; n];
    let mut on_stack = alloc::vec![false; n];
    let mut cyclic = alloc::vec![false; n];
    let mut stack: Vec<usize> = Vec::new();
    let mut out = Vec::with_capacity(n);
    let mut counter = 0;
    let mut calls: Vec<(usize, usize)> = Vec::new();
    for root in 0..n {
        if index[root] != UNSEEN {
            continue;
        }
        index[root] = counter;
        low[root] = counter;
        counter += 1;
        stack.push(root);
        on_stack[root] = true;
        calls.push((root, 0));
        while let Some(&mut (v, ref mut next_edge)) = calls.last_mut() {
            let targets = adj.get(v).map_or(&[][..], Vec::as_slice);
            if let Some(&w) = targets.get(*next_edge) {
                *next_edge += 1;
                if w >= n {
                    continue;
                }
                if w == v {
                    cyclic[v] = true;
                }
                if index[w] == UNSEEN {
                    index[w] = counter;
                    low[w] = counter;
                    counter += 1;
                    stack.push(w);
                    on_stack[w] = true;
                    calls.push((w, 0));
                } else if on_stack[w] {
                    low[v] = low[v].min(index[w]);
                }
                continue;
            }
            calls.pop();
            if let Some(&(parent, _)) = calls.last() {
                low[parent] = low[parent].min(low[v]);
            }
            if low[v] == index[v] {
                let mut component = Vec::new();
                while let Some(w) = stack.pop() {
                    on_stack[w] = false;
                    component.push(w);
                    if w == v {
                        break;
                    }
                }
                if component.len() > 1 {
                    component.iter().for_each(|&w| cyclic[w] = true);
                }
                out.extend(component);
            }
        }
    }
    (out, cyclic)
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
        g.set(c("B1"), alloc::vec![Dep::Cell(c("A1")), Dep::Range(Range::parse("A1:A9").unwrap())]);
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
    fn order_puts_precedents_first_and_finds_cycles() {
        // 0 reads 1, 1 reads 2, 3 reads 4 and 4 reads 3, 5 reads itself, 6 reads 3.
        let reads = [alloc::vec![1], alloc::vec![2], alloc::vec![], alloc::vec![4], alloc::vec![3], alloc::vec![5], alloc::vec![3]];
        let (ord, cyc) = order(reads.len(), |i| reads[i].clone());
        let pos = |i: usize| ord.iter().position(|&x| x == i).unwrap();
        assert_eq!(ord.len(), 7);
        assert!(pos(2) < pos(1) && pos(1) < pos(0));
        assert!(pos(3) < pos(6) && pos(4) < pos(6));
        assert_eq!(cyc, [false, false, false, true, true, true, false]);
    }

    #[test]
    fn a_long_chain_does_not_recurse() {
        let n = 200_000;
        let (ord, cyc) = order(n, |i| if i + 1 < n { alloc::vec![i + 1] } else { alloc::vec![] });
        assert_eq!(ord[0], n - 1);
        assert!(!cyc.iter().any(|&b| b));
    }
}
