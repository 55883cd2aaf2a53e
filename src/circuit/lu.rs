//! Dense complex LU factorization with partial (row) pivoting, and the solve.
//!
//! Doolittle elimination P·A = L·U, choosing at each step the row with the
//! largest |a_ik| in the column (Golub & Van Loan, *Matrix Computations*, 4th ed.,
//! algorithm 3.4.1, from memory). Written here rather than taken from a crate: the
//! matrices are at most 128 × 128, the code is about sixty lines, works in
//! `no_std` with `alloc`, and reports *which* unknown has no pivot so the caller
//! can name the node or element — the general crates (nalgebra, faer) are far
//! larger in wasm and only say "singular".

use alloc::vec::Vec;
use num_complex::Complex64;

/// |re| + |im|: the magnitude used for pivoting and scaling, as LAPACK's
/// complex routines do (within √2 of |z|, and no square root or hypot call).
fn abs1(z: Complex64) -> f64 {
    libm::fabs(z.re) + libm::fabs(z.im)
}

/// A power of two within a factor 2 of 1/m (so scaling by it is exact), read
/// from the exponent bits; 1 for zero, subnormal or non-finite m.
fn inverse_power_of_two(m: f64) -> f64 {
    let biased = ((m.to_bits() >> 52) & 0x7ff) as i64;
    if biased == 0 || biased == 0x7ff {
        return 1.0;
    }
    // m = 1.f × 2^(biased − 1023); 1/m ≈ 2^(1023 − biased), clamped to normal range.
    let e = (2046 - biased).clamp(1, 2046) as u64;
    f64::from_bits(e << 52)
}

/// A pivot counts as zero when |pivot| ≤ PIVOT_TOL × (largest |entry| the
/// column had before elimination): the column was cancelled to rounding level.
const PIVOT_TOL: f64 = 1e-13;

/// An LU factorization of a square matrix, row-major.
#[derive(Debug, Clone)]
pub struct Lu {
    n: usize,
    a: Vec<Complex64>,
    perm: Vec<usize>,
    row_scale: Vec<f64>,
    col_scale: Vec<f64>,
    /// Each column's largest |entry| after scaling (the pivot test's yardstick).
    col_max: Vec<f64>,
    /// The nonzero columns of each row of the factors, row after row: of L
    /// (left of the diagonal) at `lower[lower_start[r]..lower_start[r + 1]]`, of U
    /// (right of it) likewise in `upper`. Nodal matrices are sparse and stay
    /// fairly sparse under elimination; the solves visit only these entries.
    lower: Vec<usize>,
    lower_start: Vec<usize>,
    upper: Vec<usize>,
    upper_start: Vec<usize>,
}

/// Where a matrix may be nonzero: the columns of each row, row after row.
#[derive(Debug, Clone, Default)]
pub struct Pattern {
    cols: Vec<usize>,
    start: Vec<usize>,
}

impl Pattern {
    /// Every entry of an n × n matrix.
    pub fn dense(n: usize) -> Pattern {
        Pattern::from_fn(n, |_| true)
    }

    /// The entries i = r·n + c of an n × n matrix for which `nonzero(i)`.
    pub fn from_fn(n: usize, nonzero: impl Fn(usize) -> bool) -> Pattern {
        let mut p = Pattern {
            cols: Vec::new(),
            start: alloc::vec![0],
        };
        for r in 0..n {
            p.cols.extend((0..n).filter(|&c| nonzero(r * n + c)));
            p.start.push(p.cols.len());
        }
        p
    }

    /// The columns of row `r` (empty beyond the last row).
    pub fn row(&self, r: usize) -> &[usize] {
        match (self.start.get(r), self.start.get(r + 1)) {
            (Some(&a), Some(&b)) => self.cols.get(a..b).unwrap_or(&[]),
            _ => &[],
        }
    }
}

/// The factorization failed at this column: no usable pivot.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct NoPivot {
    /// The unknown (column) without a pivot.
    pub column: usize,
}

impl Lu {
    /// Factor the n × n row-major matrix `a` (length n², checked by the caller).
    ///
    /// The matrix is first equilibrated by powers of two — each row, then each
    /// column, scaled to a largest entry near 1 — because nodal matrices mix
    /// conductances of 1e-9 S with gains of 1e6 and more; the scaling is exact and
    /// undone in [`Lu::solve`].
    ///
    /// # Errors
    /// [`NoPivot`] naming the first column whose pivot is zero to rounding.
    pub fn factor(n: usize, a: Vec<Complex64>) -> Result<Lu, NoPivot> {
        if a.len() != n * n {
            return Err(NoPivot { column: 0 });
        }
        let mut lu = Lu::with_size(n);
        lu.a = a;
        lu.factor_in_place(None)?;
        Ok(lu)
    }

    /// Storage for factoring n × n matrices again and again with [`Lu::refactor`]
    /// (a sweep over frequency), allocated once.
    pub fn with_size(n: usize) -> Lu {
        Lu {
            n,
            a: alloc::vec![Complex64::new(0.0, 0.0); n * n],
            perm: alloc::vec![0; n],
            row_scale: alloc::vec![1.0; n],
            col_scale: alloc::vec![1.0; n],
            col_max: alloc::vec![0.0; n],
            lower: Vec::with_capacity(n * n / 2),
            lower_start: alloc::vec![0; n + 1],
            upper: Vec::with_capacity(n * n / 2),
            upper_start: alloc::vec![0; n + 1],
        }
    }

    /// Factor `m` (n × n row-major, n of [`Lu::with_size`]) into this storage,
    /// without allocating: the same factorization as [`Lu::factor`], bit for bit.
    ///
    /// # Errors
    /// As [`Lu::factor`]; a length other than n² is `NoPivot { column: 0 }`.
    pub fn refactor(&mut self, m: &[Complex64]) -> Result<(), NoPivot> {
        if m.len() != self.a.len() {
            return Err(NoPivot { column: 0 });
        }
        self.a.copy_from_slice(m);
        self.factor_in_place(None)
    }

    /// The storage the next [`Lu::factor_filled`] factors: n × n, row-major.
    pub fn matrix_mut(&mut self) -> &mut [Complex64] {
        &mut self.a
    }

    /// Factor the matrix written into [`Lu::matrix_mut`], whose nonzero entries
    /// all lie in `pattern` (the equilibration then visits only those): the same
    /// factorization as [`Lu::factor`], bit for bit, without allocating.
    ///
    /// # Errors
    /// As [`Lu::factor`].
    pub fn factor_filled(&mut self, pattern: &Pattern) -> Result<(), NoPivot> {
        self.factor_in_place(Some(pattern))
    }

    /// Equilibrate `self.a` by powers of two (each row, then each column, over
    /// the entries `pattern` says may be nonzero, or all), then eliminate with
    /// partial pivoting. Zero entries change no maximum and no product, so the
    /// pattern changes nothing but the work.
    fn factor_in_place(&mut self, pattern: Option<&Pattern>) -> Result<(), NoPivot> {
        let n = self.n;
        let dense = Pattern::dense(0);
        let all = pattern.is_none();
        let p = pattern.unwrap_or(&dense);
        let a = &mut self.a;
        self.col_max.iter_mut().for_each(|m| *m = 0.0);
        for (r, (row, rs)) in a
            .chunks_exact_mut(n)
            .zip(self.row_scale.iter_mut())
            .enumerate()
        {
            if all {
                *rs = inverse_power_of_two(row.iter().map(|&z| abs1(z)).fold(0.0, f64::max));
                row.iter_mut().for_each(|z| *z *= *rs);
            } else {
                let cols = p.row(r);
                *rs = inverse_power_of_two(cols.iter().map(|&j| abs1(row[j])).fold(0.0, f64::max));
                cols.iter().for_each(|&j| row[j] *= *rs);
            }
        }
        for (r, row) in a.chunks_exact(n).enumerate() {
            if all {
                for (m, &z) in self.col_max.iter_mut().zip(row) {
                    *m = m.max(abs1(z));
                }
            } else {
                for &j in p.row(r) {
                    self.col_max[j] = self.col_max[j].max(abs1(row[j]));
                }
            }
        }
        for (c, &m) in self.col_scale.iter_mut().zip(&self.col_max) {
            *c = inverse_power_of_two(m);
        }
        // After column scaling each column's largest entry is col_max·col_scale.
        for (m, &c) in self.col_max.iter_mut().zip(&self.col_scale) {
            *m *= c;
        }
        for (r, row) in a.chunks_exact_mut(n).enumerate() {
            if all {
                for (z, &c) in row.iter_mut().zip(&self.col_scale) {
                    *z *= c;
                }
            } else {
                for &j in p.row(r) {
                    row[j] *= self.col_scale[j];
                }
            }
        }
        for (i, p) in self.perm.iter_mut().enumerate() {
            *p = i;
        }
        for k in 0..n {
            let mut best = k;
            let mut best_mag = abs1(a[k * n + k]);
            for r in k + 1..n {
                let m = abs1(a[r * n + k]);
                if m > best_mag {
                    best = r;
                    best_mag = m;
                }
            }
            if best_mag <= PIVOT_TOL * self.col_max[k] || !best_mag.is_finite() {
                return Err(NoPivot { column: k });
            }
            if best != k {
                for c in 0..n {
                    a.swap(k * n + c, best * n + c);
                }
                self.perm.swap(k, best);
            }
            let inv_pivot = Complex64::new(1.0, 0.0) / a[k * n + k];
            // The pivot row's nonzero columns right of the diagonal: a zero u
            // changes no entry (x − f·0 = x), so only these are updated.
            self.upper.clear();
            let pivot_row = &a[k * n..(k + 1) * n];
            self.upper
                .extend((k + 1..n).filter(|&j| pivot_row[j] != Complex64::new(0.0, 0.0)));
            // Rows k and below, split so row k can be read while the others change.
            let (above, below) = a.split_at_mut((k + 1) * n);
            let pivot_row = &above[k * n..(k + 1) * n];
            for row in below.chunks_exact_mut(n) {
                if row[k] == Complex64::new(0.0, 0.0) {
                    continue;
                }
                let f = row[k] * inv_pivot;
                if f == Complex64::new(0.0, 0.0) {
                    continue;
                }
                row[k] = f;
                for &j in &self.upper {
                    row[j] -= f * pivot_row[j];
                }
            }
        }
        self.index_nonzeros();
        Ok(())
    }

    /// Record the nonzero columns of each row of L and U for the solves.
    fn index_nonzeros(&mut self) {
        let n = self.n;
        let zero = Complex64::new(0.0, 0.0);
        self.lower.clear();
        self.upper.clear();
        self.lower_start[0] = 0;
        self.upper_start[0] = 0;
        for (r, row) in self.a.chunks_exact(n).enumerate() {
            self.lower.extend((0..r).filter(|&j| row[j] != zero));
            self.upper.extend((r + 1..n).filter(|&j| row[j] != zero));
            self.lower_start[r + 1] = self.lower.len();
            self.upper_start[r + 1] = self.upper.len();
        }
    }

    /// Solve A·x = b with the factorization (b of length n).
    pub fn solve(&self, b: &[Complex64]) -> Vec<Complex64> {
        let mut x = alloc::vec![Complex64::new(0.0, 0.0); self.n];
        self.solve_into(b, &mut x);
        x
    }

    /// [`Lu::solve`] into `x` (length n), without allocating.
    pub fn solve_into(&self, b: &[Complex64], x: &mut [Complex64]) {
        let n = self.n;
        // Solve (R·A·C)·y = R·b, then x = C·y.
        for (xi, &p) in x.iter_mut().zip(&self.perm) {
            *xi = b.get(p).copied().unwrap_or_default()
                * self.row_scale.get(p).copied().unwrap_or(1.0);
        }
        // Only the nonzero entries of L and U are visited: a zero term adds
        // nothing to the sums.
        let rows = self.a.chunks_exact(n);
        let lower = self.lower_start.windows(2).map(|w| &self.lower[w[0]..w[1]]);
        for (r, (row, cols)) in rows.clone().zip(lower).enumerate() {
            let mut s = Complex64::new(0.0, 0.0);
            for &j in cols {
                s += row[j] * x[j];
            }
            x[r] -= s;
        }
        let upper = self.upper_start.windows(2).map(|w| &self.upper[w[0]..w[1]]);
        for (r, (row, cols)) in rows.zip(upper).enumerate().rev() {
            let mut s = Complex64::new(0.0, 0.0);
            for &j in cols {
                s += row[j] * x[j];
            }
            x[r] = (x[r] - s) / row[r];
        }
        for (xi, &c) in x.iter_mut().zip(&self.col_scale) {
            *xi *= c;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn c(re: f64, im: f64) -> Complex64 {
        Complex64::new(re, im)
    }

    #[test]
    fn solves_a_system_that_needs_pivoting() {
        // A has a zero in the (0,0) place, so elimination without row exchange fails.
        let a = alloc::vec![
            c(0.0, 0.0),
            c(2.0, 1.0),
            c(1.0, 0.0),
            c(3.0, -1.0),
            c(1.0, 0.0),
            c(0.0, 2.0),
            c(1.0, 1.0),
            c(0.0, 0.0),
            c(4.0, 0.0)
        ];
        let x_true = [c(1.0, -1.0), c(0.5, 2.0), c(-3.0, 0.25)];
        let b: Vec<Complex64> = (0..3)
            .map(|r| (0..3).map(|k| a[r * 3 + k] * x_true[k]).sum())
            .collect();
        let lu = Lu::factor(3, a).unwrap();
        let x = lu.solve(&b);
        for k in 0..3 {
            // Identity: A·x = b recovers the x that built b, to rounding.
            assert!((x[k] - x_true[k]).norm() < 1e-14, "x[{k}]");
        }
    }

    #[test]
    fn refactoring_in_place_gives_the_same_bits_as_a_fresh_factorization() {
        // The sweep's storage is reused across frequencies: after factoring one
        // matrix, factoring another must give exactly what a fresh Lu gives
        // (same operations in the same order; no tolerance needed).
        let a = |w: f64| {
            alloc::vec![
                c(1e-3, w * 1e-9),
                c(-1e-3, 0.0),
                c(0.0, 0.0),
                c(-1e-3, 0.0),
                c(2e-3, w * 2e-9),
                c(1e5, 0.0),
                c(0.0, 0.0),
                c(1.0, 0.0),
                c(1e-6, w * 1e-12)
            ]
        };
        let b = [c(1.0, 0.0), c(0.0, 0.0), c(0.0, -1.0)];
        let mut reused = Lu::with_size(3);
        let mut x = [c(0.0, 0.0); 3];
        for w in [0.0, 1e3, 1e9, 5.0] {
            reused.refactor(&a(w)).unwrap();
            reused.solve_into(&b, &mut x);
            let fresh = Lu::factor(3, a(w)).unwrap().solve(&b);
            assert_eq!(x.to_vec(), fresh, "w = {w}");
        }
        assert_eq!(reused.refactor(&[c(1.0, 0.0)]), Err(NoPivot { column: 0 }));
    }

    #[test]
    fn names_the_column_without_a_pivot() {
        // Second column is twice the first: no pivot for column 1.
        let a = alloc::vec![c(1.0, 0.0), c(2.0, 0.0), c(3.0, 0.0), c(6.0, 0.0)];
        assert_eq!(Lu::factor(2, a).unwrap_err(), NoPivot { column: 1 });
        assert_eq!(
            Lu::factor(2, alloc::vec![c(1.0, 0.0)]).unwrap_err(),
            NoPivot { column: 0 }
        );
    }
}
