//! Editing the sheet: cell inputs, names, a whole new content; each edit
//! recalculates what it reaches ([`super::recalc`]).

use super::address::CellRef;
use super::graph::Dep;
use super::input::{cell_ref, read_input, valid_name};
use super::parser::Expr;
use super::recalc::Recalc;
use super::sheet::{Cell, Content, Sheet, MAX_CELLS, MAX_INPUT_BYTES, MAX_NAMES};
use crate::error::{Error, Result};
use alloc::collections::BTreeSet;
use alloc::string::String;
use alloc::vec::Vec;

impl Sheet {
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
        self.check_edits(edits)?;
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
        seeds.extend(self.unsettled.iter().copied());
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
        let mut fresh = Sheet {
            budget: self.budget,
            ..Sheet::default()
        };
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
        fresh.run(everything, &mut Recalc::untracked());
        let mut changed: BTreeSet<CellRef> = self.cells.keys().copied().collect();
        changed.extend(self.owner.keys().copied());
        changed.extend(fresh.cells.keys().copied());
        changed.extend(fresh.owner.keys().copied());
        *self = fresh;
        self.changed = changed.into_iter().collect();
        Ok(())
    }

    /// Refuse edits with an over-long input or that would exceed [`MAX_CELLS`].
    fn check_edits(&self, edits: &[(CellRef, &str)]) -> Result<()> {
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
        Ok(())
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
}
