//! One stable sort for the whole crate, compiled once.
//!
//! `slice::sort_by` is generic over the element type and the comparison, so each call
//! site with its own closure compiles its own copy of the standard library's driftsort:
//! about 7.5 KB of wasm per copy: the release wasm held eight copies, 62 KB (one is
//! left, inside `collect()` into the worksheet's `BTreeSet<CellRef>`).
//! [`sort_by`] instead sorts a permutation of positions with a `dyn` comparison, in one
//! non-generic merge sort ([`order`]); only the short loop that moves the elements into
//! place ([`permute`]) is generic.
//!
//! The result is exactly that of `slice::sort_by`: a stable sort has only one possible
//! output for a given comparison (equal elements keep their order), which the tests
//! check against the standard library on random inputs with many ties.
//!
//! Algorithm: bottom-up merge sort (Knuth, *The Art of Computer Programming*, vol. 3,
//! 2nd ed., §5.2.4, from memory) over runs first sorted by straight insertion (§5.2.1),
//! skipping the merge of two runs that are already in order. Time O(n log n)
//! comparisons, O(n) for input that is already sorted; two `usize` buffers of length n
//! on the heap, none for n ≤ 16.

use alloc::vec::Vec;
use core::cmp::Ordering;

/// Runs this long are sorted by straight insertion before the merge passes.
const RUN: usize = 16;

/// Sort `v` stably by `cmp`, like `v.sort_by(cmp)` (same result, one shared copy of the
/// sorting code for every call site).
pub(crate) fn sort_by<T>(v: &mut [T], mut cmp: impl FnMut(&T, &T) -> Ordering) {
    if v.len() < 2 {
        return;
    }
    let n = v.len();
    let items: &[T] = v;
    let mut by = |i: usize, j: usize| match (items.get(i), items.get(j)) {
        (Some(a), Some(b)) => cmp(a, b),
        _ => Ordering::Equal,
    };
    if n <= RUN {
        // Short lists (most of them) need no heap: one run, sorted by insertion.
        let mut small = [0usize; RUN];
        let Some(perm) = small.get_mut(..n) else {
            return;
        };
        for (k, p) in perm.iter_mut().enumerate() {
            *p = k;
        }
        insertion(perm, &mut by);
        permute(v, perm);
    } else {
        let mut perm = order(n, &mut by);
        permute(v, &mut perm);
    }
}

/// The positions `0..n` in stably sorted order of `cmp(i, j)`: entry k of the result
/// is the position of the element that belongs at k.
fn order(n: usize, cmp: &mut dyn FnMut(usize, usize) -> Ordering) -> Vec<usize> {
    let mut from: Vec<usize> = (0..n).collect();
    for run in from.chunks_mut(RUN) {
        insertion(run, cmp);
    }
    let mut to = alloc::vec![0usize; n];
    let mut width = RUN;
    while width < n {
        for (src, dst) in from.chunks(2 * width).zip(to.chunks_mut(2 * width)) {
            let (left, right) = src.split_at(width.min(src.len()));
            merge(left, right, dst, cmp);
        }
        core::mem::swap(&mut from, &mut to);
        width = width.saturating_mul(2);
    }
    from
}

/// Sort the positions in `run` stably by straight insertion.
fn insertion(run: &mut [usize], cmp: &mut dyn FnMut(usize, usize) -> Ordering) {
    for k in 1..run.len() {
        let mut j = k;
        while j > 0 {
            let (Some(&prev), Some(&cur)) = (run.get(j - 1), run.get(j)) else {
                break;
            };
            if cmp(prev, cur) != Ordering::Greater {
                break;
            }
            run.swap(j - 1, j);
            j -= 1;
        }
    }
}

/// Merge the sorted `left` and `right` into `out` (of their combined length), taking
/// from `left` on ties so that equal elements keep their order.
fn merge(
    left: &[usize],
    right: &[usize],
    out: &mut [usize],
    cmp: &mut dyn FnMut(usize, usize) -> Ordering,
) {
    let in_order = match (left.last(), right.first()) {
        (Some(&l), Some(&r)) => cmp(l, r) != Ordering::Greater,
        _ => true,
    };
    if in_order {
        for (slot, &x) in out.iter_mut().zip(left.iter().chain(right)) {
            *slot = x;
        }
        return;
    }
    let (mut i, mut j) = (0, 0);
    for slot in out.iter_mut() {
        let take_left = match (left.get(i), right.get(j)) {
            (Some(&l), Some(&r)) => cmp(l, r) != Ordering::Greater,
            (Some(_), None) => true,
            _ => false,
        };
        let next = if take_left {
            i += 1;
            left.get(i - 1)
        } else {
            j += 1;
            right.get(j - 1)
        };
        if let Some(&x) = next {
            *slot = x;
        }
    }
}

/// Move the elements of `v` so that position k holds the element that was at
/// `perm[k]`, following each cycle of the permutation with swaps.
fn permute<T>(v: &mut [T], perm: &mut [usize]) {
    for k in 0..perm.len() {
        let mut cur = k;
        while let Some(slot) = perm.get_mut(cur) {
            // Mark the position done; a done position maps to itself.
            let src = core::mem::replace(slot, cur);
            if src == k || src >= v.len() {
                break;
            }
            v.swap(cur, src);
            cur = src;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use alloc::vec::Vec;

    /// Reference for every test: the standard library's stable `slice::sort_by`.
    fn std_sorted<T: Clone>(v: &[T], cmp: impl FnMut(&T, &T) -> Ordering) -> Vec<T> {
        let mut w = v.to_vec();
        w.sort_by(cmp);
        w
    }

    /// Keys 0..keys with a tag recording the original position, so that a wrong order
    /// among equal keys shows.
    fn tagged(seed: u64, n: usize, keys: u64) -> Vec<(u64, usize)> {
        // xorshift64 (Marsaglia 2003), a fixed-seed stream of test inputs.
        let mut s = seed | 1;
        (0..n)
            .map(|i| {
                s ^= s << 13;
                s ^= s >> 7;
                s ^= s << 17;
                (s % keys, i)
            })
            .collect()
    }

    #[test]
    fn matches_the_standard_stable_sort_around_every_run_and_merge_boundary() {
        let by_key = |a: &(u64, usize), b: &(u64, usize)| a.0.cmp(&b.0);
        for n in [
            0, 1, 2, 3, 15, 16, 17, 31, 32, 33, 47, 64, 65, 100, 255, 256, 257, 1000, 4099,
        ] {
            for (seed, keys) in [(1, 2), (7, 5), (42, 1000), (99, u64::MAX)] {
                let v = tagged(seed, n, keys);
                let mut ours = v.clone();
                sort_by(&mut ours, by_key);
                assert_eq!(
                    ours,
                    std_sorted(&v, by_key),
                    "n = {n}, seed = {seed}, keys = {keys}"
                );
            }
        }
    }

    #[test]
    fn sorted_reversed_and_constant_inputs() {
        let by_key = |a: &(u64, usize), b: &(u64, usize)| a.0.cmp(&b.0);
        for n in [5, 16, 40, 333] {
            let up: Vec<(u64, usize)> = (0..n).map(|i| (i as u64, i)).collect();
            let down: Vec<(u64, usize)> = (0..n).map(|i| ((n - i) as u64, i)).collect();
            let flat: Vec<(u64, usize)> = (0..n).map(|i| (3, i)).collect();
            for v in [up, down, flat] {
                let mut ours = v.clone();
                sort_by(&mut ours, by_key);
                assert_eq!(ours, std_sorted(&v, by_key), "n = {n}, input {v:?}");
            }
        }
    }

    #[test]
    fn floats_by_total_order_including_signed_zeros_and_nan() {
        let v = [
            3.5,
            -0.0,
            f64::NAN,
            0.0,
            f64::NEG_INFINITY,
            -2.0,
            f64::INFINITY,
            0.0,
            -0.0,
            1e-300,
        ];
        let mut ours = v.to_vec();
        sort_by(&mut ours, f64::total_cmp);
        let want = std_sorted(&v, f64::total_cmp);
        let bits = |w: &[f64]| w.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
        assert_eq!(bits(&ours), bits(&want));
    }

    #[test]
    fn moves_elements_that_are_not_copy() {
        let v: Vec<alloc::string::String> =
            ["pole", "zero", "gain", "loop", "beta", "gain", "band"]
                .iter()
                .map(|s| (*s).into())
                .collect();
        let mut ours = v.clone();
        sort_by(&mut ours, |a, b| a.len().cmp(&b.len()).then(a.cmp(b)));
        assert_eq!(
            ours,
            std_sorted(&v, |a, b| a.len().cmp(&b.len()).then(a.cmp(b)))
        );
    }

    #[cfg(not(target_arch = "wasm32"))]
    mod properties {
        use super::*;
        use proptest::prelude::*;

        proptest! {
            #![proptest_config(ProptestConfig::with_cases(200))]
            #[test]
            fn equals_the_standard_stable_sort(keys in proptest::collection::vec(0u8..8, 0..600)) {
                let v: Vec<(u8, usize)> = keys.into_iter().enumerate().map(|(i, k)| (k, i)).collect();
                let mut ours = v.clone();
                sort_by(&mut ours, |a, b| a.0.cmp(&b.0));
                prop_assert_eq!(ours, std_sorted(&v, |a, b| a.0.cmp(&b.0)));
            }
        }
    }
}
