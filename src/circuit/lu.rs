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

/// max(a, b) for a not NaN, as `f64::max` (a NaN b leaves a) but by one
/// comparison: `f64::max` is a call to libm's `fmax` in wasm, and the sweep's
/// equilibration takes two per stored entry.
#[inline]
fn larger(a: f64, b: f64) -> f64 {
    if b > a {
        b
    } else {
        a
    }
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
    /// Where the matrices factored by [`Lu::factor_pattern`] may be nonzero.
    pattern: Option<Pattern>,
    /// The last full elimination on that pattern, replayed while it applies.
    plan: Option<Plan>,
    /// The last factorization was a replay: its L and U lists are the plan's.
    replayed: bool,
    /// The equilibrated pattern entries, kept while a replay may be undone.
    saved: Vec<Complex64>,
    /// The current position of each stored row during a replay.
    position: Vec<usize>,
    /// Factorizations by replay and by full elimination (tests only).
    #[cfg(test)]
    counts: (usize, usize),
}

/// Where a matrix may be nonzero: the columns of each row, row after row.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
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

    /// True when this is `Pattern::from_fn(n, nonzero)`, found without
    /// building it.
    pub fn matches(&self, n: usize, nonzero: impl Fn(usize) -> bool) -> bool {
        self.start.len() == n + 1
            && (0..n).all(|r| {
                let mut cols = self.row(r).iter();
                (0..n)
                    .filter(|&c| nonzero(r * n + c))
                    .all(|c| cols.next() == Some(&c))
                    && cols.next().is_none()
            })
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
        let mut lu = Lu::with_storage(n, a);
        lu.factor_in_place(None)?;
        Ok(lu)
    }

    /// Storage for factoring n × n matrices again and again with [`Lu::refactor`]
    /// (a sweep over frequency), allocated once.
    pub fn with_size(n: usize) -> Lu {
        Lu::with_storage(n, alloc::vec![Complex64::new(0.0, 0.0); n * n])
    }

    /// The storage of [`Lu::with_size`] around the matrix `a` (n², row-major).
    fn with_storage(n: usize, a: Vec<Complex64>) -> Lu {
        Lu {
            n,
            a,
            perm: alloc::vec![0; n],
            row_scale: alloc::vec![1.0; n],
            col_scale: alloc::vec![1.0; n],
            col_max: alloc::vec![0.0; n],
            lower: Vec::with_capacity(n * n / 2),
            lower_start: alloc::vec![0; n + 1],
            upper: Vec::with_capacity(n * n / 2),
            upper_start: alloc::vec![0; n + 1],
            pattern: None,
            plan: None,
            replayed: false,
            saved: Vec::new(),
            // Sized by the first replay: a one-shot factorization never needs it.
            position: Vec::new(),
            #[cfg(test)]
            counts: (0, 0),
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

    /// Storage for factoring, again and again, n × n matrices whose nonzero
    /// entries all lie in `pattern` (n: its rows): [`Lu::matrix_for_pattern`],
    /// then [`Lu::factor_pattern`].
    pub fn with_pattern(pattern: Pattern) -> Lu {
        let mut lu = Lu::with_size(pattern.start.len().saturating_sub(1));
        lu.pattern = Some(pattern);
        lu
    }

    /// The storage the next factorization reads: n × n, row-major, as the
    /// last one left it.
    pub fn matrix_mut(&mut self) -> &mut [Complex64] {
        &mut self.a
    }

    /// [`Lu::matrix_mut`] with every entry off the pattern of
    /// [`Lu::with_pattern`] set to zero, for the caller to write the entries on
    /// it. After a factorization only the entries its fill made nonzero are
    /// cleared, not all n².
    pub fn matrix_for_pattern(&mut self) -> &mut [Complex64] {
        match &self.plan {
            Some(plan) => {
                for &i in &plan.fill {
                    if let Some(z) = self.a.get_mut(i) {
                        *z = Complex64::new(0.0, 0.0);
                    }
                }
            }
            None => self.a.fill(Complex64::new(0.0, 0.0)),
        }
        &mut self.a
    }

    /// Factor the matrix written into [`Lu::matrix_for_pattern`] (or
    /// [`Lu::matrix_mut`], zero off the pattern): the same factorization as
    /// [`Lu::factor`], bit for bit, without allocating once the pivots settle.
    /// The equilibration visits only the pattern's entries, and the
    /// elimination of the last full factorization is replayed while partial
    /// pivoting picks the same rows (a recorded plan). Without a pattern, as
    /// [`Lu::refactor`] of the stored matrix.
    ///
    /// # Errors
    /// As [`Lu::factor`].
    pub fn factor_pattern(&mut self) -> Result<(), NoPivot> {
        let pattern = self.pattern.take();
        let r = self.factor_in_place(pattern.as_ref());
        self.pattern = pattern;
        r
    }

    /// Equilibrate `self.a` by powers of two (each row, then each column, over
    /// the entries `pattern` says may be nonzero, or all), then eliminate with
    /// partial pivoting. Zero entries change no maximum and no product, so the
    /// pattern changes nothing but the work.
    ///
    /// With a pattern, the elimination of the last full factorization is
    /// replayed when it applies ([`Plan`]); otherwise, or when the replay finds
    /// that partial pivoting picks another row, the full elimination runs.
    fn factor_in_place(&mut self, pattern: Option<&Pattern>) -> Result<(), NoPivot> {
        self.replayed = false;
        self.equilibrate(pattern);
        let Some(p) = pattern else {
            self.plan = None;
            return self.eliminate();
        };
        if let Some(plan) = self.plan.take() {
            self.save_scaled(p);
            let outcome = self.replay(&plan);
            self.plan = Some(plan);
            match outcome {
                Ok(true) => {
                    self.replayed = true;
                    #[cfg(test)]
                    {
                        self.counts.0 += 1;
                    }
                    return Ok(());
                }
                Err(e) => return Err(e),
                Ok(false) => self.restore_scaled(p),
            }
        }
        if let Err(e) = self.eliminate() {
            // The entries it left are not those of the plan's structure.
            self.plan = None;
            return Err(e);
        }
        // The storage of the plan it replaces is reused (a sweep whose pivots
        // change, or the pole refinement moving between poles, records often).
        let mut plan = self.plan.take().unwrap_or_default();
        plan.record(p, &self.perm, self.n);
        self.plan = Some(plan);
        #[cfg(test)]
        {
            self.counts.1 += 1;
        }
        Ok(())
    }

    /// Scale each row, then each column, by a power of two near the inverse of
    /// its largest |entry| (over `pattern`, or every entry), and note each
    /// column's largest scaled |entry| for the pivot test.
    fn equilibrate(&mut self, pattern: Option<&Pattern>) {
        let n = self.n;
        let a = &mut self.a;
        self.col_max.iter_mut().for_each(|m| *m = 0.0);
        // Each row scaled, and each column's largest scaled entry noted, in one pass.
        let col_max = &mut self.col_max;
        for (r, (row, rs)) in a
            .chunks_exact_mut(n)
            .zip(self.row_scale.iter_mut())
            .enumerate()
        {
            match pattern {
                None => {
                    *rs = inverse_power_of_two(row.iter().map(|&z| abs1(z)).fold(0.0, f64::max));
                    for (z, m) in row.iter_mut().zip(col_max.iter_mut()) {
                        *z *= *rs;
                        *m = m.max(abs1(*z));
                    }
                }
                Some(p) => {
                    let cols = p.row(r);
                    let mut big = 0.0f64;
                    for &j in cols {
                        big = larger(big, abs1(row[j]));
                    }
                    *rs = inverse_power_of_two(big);
                    for &j in cols {
                        row[j] *= *rs;
                        col_max[j] = larger(col_max[j], abs1(row[j]));
                    }
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
            match pattern {
                None => {
                    for (z, &c) in row.iter_mut().zip(&self.col_scale) {
                        *z *= c;
                    }
                }
                Some(p) => {
                    for &j in p.row(r) {
                        row[j] *= self.col_scale[j];
                    }
                }
            }
        }
    }

    /// Gaussian elimination with partial pivoting on the equilibrated matrix.
    /// Rows are not moved: `perm[k]` is the stored row at position k, and the
    /// factors of position r are in stored row `perm[r]`.
    fn eliminate(&mut self) -> Result<(), NoPivot> {
        let n = self.n;
        let zero = Complex64::new(0.0, 0.0);
        let a = &mut self.a;
        for (i, p) in self.perm.iter_mut().enumerate() {
            *p = i;
        }
        for k in 0..n {
            let mut best = k;
            let mut best_mag = abs1(a[self.perm[k] * n + k]);
            for r in k + 1..n {
                let m = abs1(a[self.perm[r] * n + k]);
                if m > best_mag {
                    best = r;
                    best_mag = m;
                }
            }
            if best_mag <= PIVOT_TOL * self.col_max[k] || !best_mag.is_finite() {
                return Err(NoPivot { column: k });
            }
            self.perm.swap(k, best);
            let pr = self.perm[k] * n;
            let inv_pivot = Complex64::new(1.0, 0.0) / a[pr + k];
            // The pivot row's nonzero columns right of the diagonal: a zero u
            // changes no entry (x − f·0 = x), so only these are updated.
            self.upper.clear();
            self.upper.extend((k + 1..n).filter(|&j| a[pr + j] != zero));
            for &row in &self.perm[k + 1..] {
                let rr = row * n;
                if a[rr + k] == zero {
                    continue;
                }
                let f = a[rr + k] * inv_pivot;
                if f == zero {
                    continue;
                }
                a[rr + k] = f;
                for &j in &self.upper {
                    let u = a[pr + j];
                    a[rr + j] -= f * u;
                }
            }
        }
        self.index_nonzeros();
        Ok(())
    }

    /// Keep the equilibrated entries of `pattern` (before a replay that may
    /// have to be undone).
    fn save_scaled(&mut self, pattern: &Pattern) {
        let n = self.n;
        self.saved.clear();
        for r in 0..n {
            let row = &self.a[r * n..(r + 1) * n];
            self.saved.extend(pattern.row(r).iter().map(|&j| row[j]));
        }
    }

    /// Put back what [`Lu::save_scaled`] kept, every other entry zero.
    fn restore_scaled(&mut self, pattern: &Pattern) {
        let n = self.n;
        self.a.fill(Complex64::new(0.0, 0.0));
        let mut saved = self.saved.iter();
        for r in 0..n {
            for &j in pattern.row(r) {
                if let Some(&z) = saved.next() {
                    self.a[r * n + j] = z;
                }
            }
        }
    }

    /// The elimination of `plan` on the equilibrated matrix: at each step the
    /// pivot is chosen among the plan's candidate rows by the rule of
    /// [`Lu::eliminate`] (largest |·|₁, ties to the row earliest in the current
    /// order), so the factors are those of the full elimination, bit for bit.
    /// `Ok(false)` when a step picks another row than the plan's (the caller
    /// then runs the full elimination on the restored matrix).
    fn replay(&mut self, plan: &Plan) -> Result<bool, NoPivot> {
        let n = self.n;
        let zero = Complex64::new(0.0, 0.0);
        self.position.resize(n, 0);
        let a = &mut self.a;
        let (row_at, pos_of) = (&mut self.perm, &mut self.position);
        for (i, (r, p)) in row_at.iter_mut().zip(pos_of.iter_mut()).enumerate() {
            *r = i;
            *p = i;
        }
        for k in 0..n {
            let cands = plan.candidates(k);
            let first = row_at[k];
            let (mut best, mut best_pos) = (first, k);
            let mut best_mag = abs1(a[first * n + k]);
            for &r in cands {
                let m = abs1(a[r * n + k]);
                let pos = pos_of[r];
                if m > best_mag || (m == best_mag && pos < best_pos) {
                    best = r;
                    best_pos = pos;
                    best_mag = m;
                }
            }
            if best_mag <= PIVOT_TOL * self.col_max[k] || !best_mag.is_finite() {
                return Err(NoPivot { column: k });
            }
            if plan.perm.get(k) != Some(&best) {
                return Ok(false);
            }
            row_at.swap(k, best_pos);
            pos_of[first] = best_pos;
            pos_of[best] = k;
            let pr = best * n;
            let inv_pivot = Complex64::new(1.0, 0.0) / a[pr + k];
            let upper = plan.upper(k);
            for &row in cands {
                let rr = row * n;
                if row == best || a[rr + k] == zero {
                    continue;
                }
                let f = a[rr + k] * inv_pivot;
                if f == zero {
                    continue;
                }
                a[rr + k] = f;
                for &j in upper {
                    let u = a[pr + j];
                    if u != zero {
                        a[rr + j] -= f * u;
                    }
                }
            }
        }
        Ok(true)
    }

    /// Record the nonzero columns of each row of L and U for the solves.
    fn index_nonzeros(&mut self) {
        let n = self.n;
        let zero = Complex64::new(0.0, 0.0);
        self.lower.clear();
        self.upper.clear();
        self.lower_start[0] = 0;
        self.upper_start[0] = 0;
        for (r, &p) in self.perm.iter().enumerate() {
            let row = &self.a[p * n..(p + 1) * n];
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
        let zero = Complex64::new(0.0, 0.0);
        // Solve (R·A·C)·y = R·b, then x = C·y.
        for (xi, &p) in x.iter_mut().zip(&self.perm) {
            *xi = b.get(p).copied().unwrap_or_default()
                * self.row_scale.get(p).copied().unwrap_or(1.0);
        }
        // Only the entries of L and U that may be nonzero are visited, and a
        // zero among them is skipped: a zero term adds nothing to the sums.
        let row = |r: usize| {
            let p = self.perm.get(r).copied().unwrap_or(0) * n;
            self.a.get(p..p + n).unwrap_or(&[])
        };
        let (lower, lower_start, upper, upper_start) = match (&self.plan, self.replayed) {
            (Some(p), true) => (&p.lower, &p.lower_start, &p.upper, &p.upper_start),
            _ => (
                &self.lower,
                &self.lower_start,
                &self.upper,
                &self.upper_start,
            ),
        };
        for r in 0..n {
            let (row, cols) = (row(r), list(lower, lower_start, r));
            let mut s = zero;
            for &j in cols {
                let l = row[j];
                if l != zero {
                    s += l * x[j];
                }
            }
            x[r] -= s;
        }
        for r in (0..n).rev() {
            let (row, cols) = (row(r), list(upper, upper_start, r));
            let mut s = zero;
            for &j in cols {
                let u = row[j];
                if u != zero {
                    s += u * x[j];
                }
            }
            x[r] = (x[r] - s) / row[r];
        }
        for (xi, &c) in x.iter_mut().zip(&self.col_scale) {
            *xi *= c;
        }
    }
}

/// Entries `start[r]..start[r + 1]` of `items` (empty when out of range).
fn list<'a>(items: &'a [usize], start: &[usize], r: usize) -> &'a [usize] {
    match (start.get(r), start.get(r + 1)) {
        (Some(&a), Some(&b)) => items.get(a..b).unwrap_or(&[]),
        _ => &[],
    }
}

/// The elimination order of one full factorization, and where its factors may
/// be nonzero, for a pattern: the steps to replay when the next matrix of the
/// same pattern (a sweep's next frequency) pivots on the same rows, without
/// the full elimination's scans of every row and column. The structure is
/// symbolic — every entry the pattern and the fill of this order may make
/// nonzero — so it holds for any values on the pattern.
#[derive(Debug, Clone, Default)]
struct Plan {
    /// Stored row pivoted at each step.
    perm: Vec<usize>,
    /// Per step k: the rows not yet pivoted that may be nonzero in column k.
    cand: Vec<usize>,
    cand_start: Vec<usize>,
    /// Per position: the columns of L (left of the diagonal) and of U (right
    /// of it; for step k also the pivot row's columns to eliminate with).
    lower: Vec<usize>,
    lower_start: Vec<usize>,
    upper: Vec<usize>,
    upper_start: Vec<usize>,
    /// The entries (r·n + c) off the pattern that the elimination may fill.
    fill: Vec<usize>,
    /// Scratch of [`Plan::record`]: the entries that may be nonzero, the rows pivoted.
    nz: Vec<bool>,
    done: Vec<bool>,
}

impl Plan {
    /// The symbolic elimination of `pattern` (n × n) in the order `perm`,
    /// in this plan's storage.
    fn record(&mut self, pattern: &Pattern, perm: &[usize], n: usize) {
        let nz = &mut self.nz;
        nz.clear();
        nz.resize(n * n, false);
        for r in 0..n {
            for &j in pattern.row(r) {
                if let Some(z) = nz.get_mut(r * n + j) {
                    *z = true;
                }
            }
        }
        let done = &mut self.done;
        done.clear();
        done.resize(n, false);
        self.perm.clear();
        self.perm.extend_from_slice(perm);
        for v in [
            &mut self.cand,
            &mut self.lower,
            &mut self.upper,
            &mut self.fill,
        ] {
            v.clear();
        }
        for v in [
            &mut self.cand_start,
            &mut self.lower_start,
            &mut self.upper_start,
        ] {
            v.clear();
            v.push(0);
        }
        for (k, &p) in perm.iter().enumerate() {
            let first = self.cand.len();
            self.cand
                .extend((0..n).filter(|&r| !done[r] && (r == p || nz[r * n + k])));
            self.cand_start.push(self.cand.len());
            let u0 = self.upper.len();
            self.upper.extend((k + 1..n).filter(|&j| nz[p * n + j]));
            self.upper_start.push(self.upper.len());
            for &r in &self.cand[first..] {
                if r != p {
                    for &j in &self.upper[u0..] {
                        let i = r * n + j;
                        if !nz[i] {
                            nz[i] = true;
                            self.fill.push(i);
                        }
                    }
                }
            }
            done[p] = true;
        }
        for (r, &p) in perm.iter().enumerate() {
            self.lower.extend((0..r).filter(|&j| nz[p * n + j]));
            self.lower_start.push(self.lower.len());
        }
    }

    fn candidates(&self, k: usize) -> &[usize] {
        list(&self.cand, &self.cand_start, k)
    }

    fn upper(&self, k: usize) -> &[usize] {
        list(&self.upper, &self.upper_start, k)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn pattern_matches_exactly_the_pattern_from_fn() {
        // Each candidate against each pattern: `matches` must agree with
        // building the candidate and comparing.
        let shapes: [fn(usize) -> bool; 4] = [|i| i % 4 == 0, |i| i % 3 != 1, |_| true, |i| i == 5];
        for n in [1, 3, 4] {
            for a in shapes {
                let p = Pattern::from_fn(n, a);
                for b in shapes {
                    assert_eq!(p.matches(n, b), p == Pattern::from_fn(n, b), "n {n}");
                }
                assert!(!p.matches(n + 1, a));
            }
        }
    }

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
    fn replayed_eliminations_give_the_bits_of_the_full_one() {
        // M(w) = G + j·w·C of a 5-unknown system whose partial pivoting changes
        // rows as w grows (row 0's entry in column 0 falls behind row 2's), with
        // ties (±1 entries of a branch column): factored on one pattern at each
        // w, mostly by replaying the previous elimination, against a fresh dense
        // factorization (the full elimination) — identical bits required.
        let n = 5;
        let m = |w: f64| {
            let g = [
                [2e-3, -1e-3, 0.0, 0.0, 1.0],
                [-1e-3, 3e-3, -1e-3, 0.0, 0.0],
                [0.0, -1e-3, 1e-3, -1e-6, -1.0],
                [0.0, 0.0, -1e-6, 2e-6, 0.0],
                [1.0, 0.0, -1.0, 1e5, 0.0],
            ];
            let cap = [
                [1e-9, 0.0, 0.0, 0.0, 0.0],
                [0.0, 2e-9, -1e-9, 0.0, 0.0],
                [0.0, -1e-9, 4e-6, 0.0, 0.0],
                [0.0, 0.0, 0.0, 1e-12, 0.0],
                [0.0, 0.0, 0.0, 0.0, 0.0],
            ];
            let mut a = alloc::vec![c(0.0, 0.0); n * n];
            for r in 0..n {
                for k in 0..n {
                    a[r * n + k] = c(g[r][k], w * cap[r][k]);
                }
            }
            a
        };
        let pattern = Pattern::from_fn(n, |i| m(1.0)[i] != c(0.0, 0.0));
        let b = [
            c(1.0, 0.0),
            c(0.0, 0.0),
            c(0.0, -1.0),
            c(0.5, 0.0),
            c(0.0, 0.0),
        ];
        let mut lu = Lu::with_pattern(pattern);
        let mut x = [c(0.0, 0.0); 5];
        let mut perms = Vec::new();
        for i in 0..400 {
            let w = libm::pow(10.0, -2.0 + 12.0 * i as f64 / 399.0);
            let a = m(w);
            let slot = lu.matrix_for_pattern();
            slot.copy_from_slice(&a);
            lu.factor_pattern().unwrap();
            lu.solve_into(&b, &mut x);
            let fresh = Lu::factor(n, a).unwrap();
            assert_eq!(x.to_vec(), fresh.solve(&b), "w = {w}");
            assert_eq!(lu.perm, fresh.perm, "w = {w}");
            if perms.last() != Some(&lu.perm) {
                perms.push(lu.perm.clone());
            }
        }
        // The pivots changed along the way, and most factorizations were replays.
        assert!(perms.len() >= 2, "{perms:?}");
        assert_eq!(lu.counts.1, perms.len(), "{:?}", lu.counts);
        assert_eq!(lu.counts.0 + lu.counts.1, 400);
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
