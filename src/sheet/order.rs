//! The evaluation order of the cells a recalculation visits.
//!
//! The pending cells form a graph: each cell points at the pending cells it
//! reads. A range of more than [`SMALL_RANGE_CELLS`] cells is one node of its
//! own, shared by every formula reading it,
//! pointing at the pending cells inside it; a column block of
//! [`BLOCK_ROWS`] rows that the range covers whole is again one node, shared by
//! every range covering it. So a formula costs one edge per range it reads, and a
//! range costs one edge per block it covers plus one per pending cell in the
//! blocks it covers in part, instead of one edge per cell (20 000 formulas over
//! different 5 000-cell windows of one column: about 4 million edges instead of
//! 100 million). Both kinds of node point only at cells that lie inside the range,
//! so a circular reference through them is a circular reference of cells.

use super::address::{CellRef, Range};
use super::eval::MAX_RANGE_CELLS;
use super::graph::{order, Dep, BLOCK_ROWS};
use super::sheet::Sheet;
use alloc::collections::BTreeMap;
use alloc::vec::Vec;

/// Ranges of at most this many cells get an edge per cell instead of a node
/// (the ten-cell sums of the benchmark sheet, say), and a function's result
/// over one is computed again rather than cached (`recalc::Work`).
pub(super) const SMALL_RANGE_CELLS: u64 = 16;

/// What the nodes of the pending graph are built from.
struct Pending<'a> {
    sheet: &'a Sheet,
    /// The pending cells, sorted: node `i` is `nodes[i]`.
    nodes: &'a [CellRef],
    /// Whether a reader of a spilled cell also points at the formula spilling it.
    spills: bool,
}

/// The range and block nodes, numbered from `nodes.len()` on.
#[derive(Default)]
struct Shared {
    edges: Vec<Vec<usize>>,
    ranges: BTreeMap<Range, usize>,
    blocks: BTreeMap<(u32, u32), usize>,
    /// What the range nodes are made from, built with the first of them (a
    /// sheet whose ranges are all small needs neither).
    index: Option<Index>,
}

/// The pending cells by column, and the pending formulas that spill.
struct Index {
    /// Column → (row, node) of its pending cells, by row.
    columns: BTreeMap<u32, Vec<(u32, usize)>>,
    /// Pending formulas that spill, with the rectangle they spill into.
    anchors: Vec<(usize, Range)>,
}

impl Pending<'_> {
    fn new<'a>(sheet: &'a Sheet, nodes: &'a [CellRef], spills: bool) -> Pending<'a> {
        Pending {
            sheet,
            nodes,
            spills,
        }
    }

    fn index(&self) -> Index {
        let mut columns: BTreeMap<u32, Vec<(u32, usize)>> = BTreeMap::new();
        let mut anchors = Vec::new();
        for (i, c) in self.nodes.iter().enumerate() {
            // Nodes are in row-then-column order, so each column's list is by row.
            columns.entry(c.col).or_default().push((c.row, i));
            if self.spills {
                if let Some(r) = self.sheet.spills.get(c) {
                    anchors.push((i, *r));
                }
            }
        }
        Index { columns, anchors }
    }

    /// The pending cells `c` reads through the cell `x`: `x` itself and, when
    /// `x` is covered by a spill, the formula spilling into it.
    fn cell_edges(&self, c: CellRef, x: CellRef, out: &mut Vec<usize>) {
        if let Ok(i) = self.nodes.binary_search(&x) {
            out.push(i);
        }
        if !self.spills {
            return;
        }
        let anchor = self.sheet.owner.get(&x).filter(|a| **a != c);
        if let Some(i) = anchor.and_then(|a| self.nodes.binary_search(a).ok()) {
            out.push(i);
        }
    }

    /// The edges of the pending cell `c`, appended to `out`.
    fn cell_node(&self, c: CellRef, shared: &mut Shared, out: &mut Vec<usize>) {
        for d in self.sheet.graph.precedents(c) {
            match *d {
                Dep::Cell(x) => self.cell_edges(c, x, out),
                // A small range: an edge per cell costs less than a node.
                Dep::Range(r) if r.area() <= SMALL_RANGE_CELLS => {
                    r.cells().for_each(|x| self.cell_edges(c, x, out));
                }
                // A larger range is an error value, which reads nothing.
                Dep::Range(r) if r.area() <= MAX_RANGE_CELLS => {
                    out.push(self.range_node(r, shared))
                }
                Dep::Range(_) => {}
            }
        }
    }

    /// The node of range `r`, made on first use.
    fn range_node(&self, r: Range, shared: &mut Shared) -> usize {
        if let Some(&id) = shared.ranges.get(&r) {
            return id;
        }
        let index = shared.index.take().unwrap_or_else(|| self.index());
        let mut out = Vec::new();
        for (&col, list) in index.columns.range(r.start.col..=r.end.col) {
            self.column_edges(r, col, list, shared, &mut out);
        }
        for &(i, spill) in &index.anchors {
            if spill.intersects(&r) {
                out.push(i);
            }
        }
        shared.index = Some(index);
        let id = self.nodes.len() + shared.edges.len();
        shared.edges.push(out);
        shared.ranges.insert(r, id);
        id
    }

    /// The edges of range `r` into column `col` (pending cells `list`): a block
    /// node per block covered whole, a cell edge for the cells of the others.
    fn column_edges(
        &self,
        r: Range,
        col: u32,
        list: &[(u32, usize)],
        shared: &mut Shared,
        out: &mut Vec<usize>,
    ) {
        let mut k = list.partition_point(|&(row, _)| row < r.start.row);
        while let Some(&(row, i)) = list.get(k) {
            if row > r.end.row {
                break;
            }
            let block = row / BLOCK_ROWS;
            let first = block * BLOCK_ROWS;
            let last = first.saturating_add(BLOCK_ROWS - 1);
            if first >= r.start.row && last <= r.end.row {
                out.push(self.block_node(col, block, list, shared));
                let rest = list.get(k..).unwrap_or(&[]);
                k += rest.partition_point(|&(row, _)| row <= last).max(1);
            } else {
                out.push(i);
                k += 1;
            }
        }
    }

    /// The node of one column block, made on first use.
    fn block_node(
        &self,
        col: u32,
        block: u32,
        list: &[(u32, usize)],
        shared: &mut Shared,
    ) -> usize {
        if let Some(&id) = shared.blocks.get(&(col, block)) {
            return id;
        }
        let first = block * BLOCK_ROWS;
        let last = first.saturating_add(BLOCK_ROWS - 1);
        let lo = list.partition_point(|&(row, _)| row < first);
        let hi = list.partition_point(|&(row, _)| row <= last);
        let out = list
            .get(lo..hi)
            .unwrap_or(&[])
            .iter()
            .map(|&(_, i)| i)
            .collect();
        let id = self.nodes.len() + shared.edges.len();
        shared.edges.push(out);
        shared.blocks.insert((col, block), id);
        id
    }

    /// Order the pending cells: Tarjan's components over cells, ranges and
    /// blocks ([`order`]), with the range and block nodes left out of the result.
    /// Returns the order, per cell whether it is on a circular reference, and
    /// per cell its component.
    fn order(&self) -> (Vec<usize>, Vec<bool>, Vec<usize>) {
        let n = self.nodes.len();
        let mut shared = Shared::default();
        // The cells' edges in one flat buffer (cell i: targets[start[i]..start[i + 1]]),
        // not a list per cell: one allocation instead of one per pending cell.
        let mut start = Vec::with_capacity(n + 1);
        let mut targets = Vec::with_capacity(n.saturating_mul(2));
        for c in self.nodes {
            start.push(targets.len());
            self.cell_node(*c, &mut shared, &mut targets);
        }
        start.push(targets.len());
        let total = n + shared.edges.len();
        let (mut ord, mut cyclic, mut component) = order(total, |i| {
            let list = match i.checked_sub(n) {
                None => match (start.get(i), start.get(i + 1)) {
                    (Some(&a), Some(&b)) => targets.get(a..b),
                    _ => None,
                },
                Some(j) => shared.edges.get(j).map(Vec::as_slice),
            };
            list.unwrap_or(&[])
        });
        ord.retain(|&i| i < n);
        cyclic.truncate(n);
        component.truncate(n);
        (ord, cyclic, component)
    }
}

impl Sheet {
    /// The order in which to evaluate `nodes` (sorted pending cells), as
    /// indices, and per cell whether it lies on a circular reference.
    ///
    /// The order follows references and spills (a reader of a spilled cell after
    /// the formula spilling into it); circular references are those of
    /// references alone. A cycle through a spill is found when the spill is
    /// placed (see `spill_reads_itself`). Where spills and references together
    /// form a loop, the cells inside that loop go by references alone.
    pub(super) fn evaluation_order(&self, nodes: &[CellRef]) -> (Vec<usize>, Vec<bool>) {
        let (by_reference, cyclic, _) = Pending::new(self, nodes, false).order();
        if self.owner.is_empty() {
            return (by_reference, cyclic);
        }
        let (mut combined, _, component) = Pending::new(self, nodes, true).order();
        let mut rank = alloc::vec![0usize; nodes.len()];
        for (pos, &i) in by_reference.iter().enumerate() {
            if let Some(r) = rank.get_mut(i) {
                *r = pos;
            }
        }
        let key = |i: usize| {
            (
                component.get(i).copied().unwrap_or(0),
                rank.get(i).copied().unwrap_or(0),
            )
        };
        crate::sort::sort_by(&mut combined, |&i, &j| key(i).cmp(&key(j)));
        (combined, cyclic)
    }
}
