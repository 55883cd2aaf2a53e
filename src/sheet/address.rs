//! Cell addresses (`B3`, `$B$3`) and rectangular ranges (`A1:C4`).
//!
//! Columns are letters `A`…`XFD` (1 to 16 384), rows are numbers 1 to 1 048 576;
//! the `$` markers of absolute references are accepted and have no further meaning
//! here because cells are never copied with relative adjustment.

use core::fmt;

/// Number of columns, `A` to `XFD`.
pub const MAX_COLS: u32 = 16_384;
/// Number of rows.
pub const MAX_ROWS: u32 = 1_048_576;

/// A cell, by zero-based row and column. Ordered row by row, then by column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct CellRef {
    /// Zero-based row (`1` in `B1` is row 0).
    pub row: u32,
    /// Zero-based column (`A` is 0).
    pub col: u32,
}

impl CellRef {
    /// The cell at zero-based `row` and `col`, if inside the sheet.
    pub const fn new(row: u32, col: u32) -> Option<CellRef> {
        if row < MAX_ROWS && col < MAX_COLS {
            Some(CellRef { row, col })
        } else {
            None
        }
    }

    /// The cell `dr` rows below and `dc` columns right of this one, if inside the sheet.
    pub fn offset(self, dr: u32, dc: u32) -> Option<CellRef> {
        CellRef::new(self.row.checked_add(dr)?, self.col.checked_add(dc)?)
    }

    /// Parse `B3`, `$B$3`, `b$3`; the whole string must be the address.
    ///
    /// ```
    /// use loopwright::sheet::CellRef;
    /// assert_eq!(CellRef::parse("$B$3"), CellRef::new(2, 1));
    /// assert_eq!(CellRef::parse("B0"), None);
    /// ```
    pub fn parse(s: &str) -> Option<CellRef> {
        let (cell, used) = CellRef::parse_prefix(s)?;
        (used == s.len()).then_some(cell)
    }

    /// Parse an address at the start of `s`; returns it and the bytes used. The
    /// address must not be followed directly by a letter, digit, `_` or `.`.
    pub fn parse_prefix(s: &str) -> Option<(CellRef, usize)> {
        let b = s.as_bytes();
        let mut i = 0;
        if b.first() == Some(&b'$') {
            i += 1;
        }
        let mut col: u32 = 0;
        let col_start = i;
        while let Some(c) = b.get(i).filter(|c| c.is_ascii_alphabetic()) {
            if i - col_start >= 3 {
                return None;
            }
            col = col * 26 + u32::from(c.to_ascii_uppercase() - b'A') + 1;
            i += 1;
        }
        if i == col_start || col > MAX_COLS {
            return None;
        }
        if b.get(i) == Some(&b'$') {
            i += 1;
        }
        let row_start = i;
        let mut row: u32 = 0;
        while let Some(c) = b.get(i).filter(|c| c.is_ascii_digit()) {
            if i - row_start >= 7 {
                return None;
            }
            row = row * 10 + u32::from(c - b'0');
            i += 1;
        }
        if i == row_start || b.get(row_start) == Some(&b'0') || row == 0 || row > MAX_ROWS {
            return None;
        }
        if b.get(i)
            .is_some_and(|c| c.is_ascii_alphanumeric() || *c == b'_' || *c == b'.')
        {
            return None;
        }
        Some((
            CellRef {
                row: row - 1,
                col: col - 1,
            },
            i,
        ))
    }
}

impl fmt::Display for CellRef {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mut letters = [0u8; 3];
        let mut n = self.col + 1;
        let mut len = 0;
        while n > 0 && len < 3 {
            let rem = (n - 1) % 26;
            letters[2 - len] = b'A' + rem as u8;
            n = (n - 1) / 26;
            len += 1;
        }
        for &c in letters.iter().skip(3 - len) {
            write!(f, "{}", c as char)?;
        }
        write!(f, "{}", self.row + 1)
    }
}

impl core::str::FromStr for CellRef {
    type Err = crate::error::Error;

    fn from_str(s: &str) -> crate::error::Result<CellRef> {
        CellRef::parse(s.trim()).ok_or(crate::error::Error::OutOfDomain {
            param: "cell",
            requirement: "must be a cell address from A1 to XFD1048576, such as B3",
        })
    }
}

/// A rectangle of cells, corners included; `start` is the top-left corner.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Range {
    /// Top-left cell.
    pub start: CellRef,
    /// Bottom-right cell.
    pub end: CellRef,
}

impl Range {
    /// The rectangle spanned by two corners given in any order.
    pub fn new(a: CellRef, b: CellRef) -> Range {
        Range {
            start: CellRef {
                row: a.row.min(b.row),
                col: a.col.min(b.col),
            },
            end: CellRef {
                row: a.row.max(b.row),
                col: a.col.max(b.col),
            },
        }
    }

    /// Parse `A1:C4` or a single address (a one-cell range).
    pub fn parse(s: &str) -> Option<Range> {
        match s.split_once(':') {
            Some((a, b)) => Some(Range::new(
                CellRef::parse(a.trim())?,
                CellRef::parse(b.trim())?,
            )),
            None => CellRef::parse(s.trim()).map(|c| Range::new(c, c)),
        }
    }

    /// Number of rows.
    pub const fn rows(&self) -> u32 {
        self.end.row - self.start.row + 1
    }

    /// Number of columns.
    pub const fn cols(&self) -> u32 {
        self.end.col - self.start.col + 1
    }

    /// Number of cells (at most 2³⁴, so it fits u64).
    pub const fn area(&self) -> u64 {
        self.rows() as u64 * self.cols() as u64
    }

    /// Whether `c` lies inside.
    pub const fn contains(&self, c: CellRef) -> bool {
        c.row >= self.start.row
            && c.row <= self.end.row
            && c.col >= self.start.col
            && c.col <= self.end.col
    }

    /// Whether the two rectangles share a cell.
    pub const fn intersects(&self, other: &Range) -> bool {
        self.start.row <= other.end.row
            && other.start.row <= self.end.row
            && self.start.col <= other.end.col
            && other.start.col <= self.end.col
    }

    /// The cells row by row.
    pub fn cells(self) -> impl Iterator<Item = CellRef> {
        let r = self;
        (r.start.row..=r.end.row)
            .flat_map(move |row| (r.start.col..=r.end.col).map(move |col| CellRef { row, col }))
    }
}

impl fmt::Display for Range {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}:{}", self.start, self.end)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use alloc::string::ToString;

    #[test]
    fn addresses_round_trip() {
        for (s, row, col) in [
            ("A1", 0, 0),
            ("Z9", 8, 25),
            ("AA10", 9, 26),
            ("XFD1048576", 1_048_575, 16_383),
            ("AZ3", 2, 51),
        ] {
            let c = CellRef::parse(s).unwrap();
            assert_eq!((c.row, c.col), (row, col), "{s}");
            assert_eq!(c.to_string(), s);
        }
        assert_eq!(CellRef::parse("$b$3"), CellRef::parse("B3"));
    }

    #[test]
    fn bad_addresses() {
        for s in [
            "", "A", "1", "A0", "A01", "XFE1", "A1048577", "AAAA1", "A1B", "A1.", "$", "A$", "1A",
        ] {
            assert_eq!(CellRef::parse(s), None, "{s}");
        }
    }

    #[test]
    fn ranges() {
        let r = Range::parse("C4:A1").unwrap();
        assert_eq!(r.to_string(), "A1:C4");
        assert_eq!((r.rows(), r.cols(), r.area()), (4, 3, 12));
        assert_eq!(r.cells().count(), 12);
        assert!(r.contains(CellRef::parse("B2").unwrap()));
        assert!(!r.contains(CellRef::parse("D2").unwrap()));
        assert!(r.intersects(&Range::parse("C4:D9").unwrap()));
        assert!(!r.intersects(&Range::parse("D1:D9").unwrap()));
    }
}
