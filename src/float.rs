//! The IEEE-754 operations that are one instruction on every target — square root and
//! rounding to an integer — through `std` when the crate has it.
//!
//! `libm` computes these in software on wasm32 (its hardware path needs a nightly
//! feature); the instruction made the 1e6-trial Monte Carlo 10 % faster (bench/).
//! IEEE 754 requires `sqrt` to be correctly rounded and `floor`, `ceil`, `trunc`,
//! `round` are exact, so `std`'s instruction and `libm`'s software give the
//! same bits: native and wasm results stay identical, with or without `std`.
//!
//! sin, cos and atan2 are here for size, not speed: on wasm32 the standard
//! library's are the musl ports that `libm` also compiles (the runtime's
//! `compiler_builtins` carries them for `num-complex`), so calling them through `std`
//! there leaves one copy in the module. Native builds keep `libm`'s.
//! The frequency sweep's per-point phase (`freq::eval`) keeps `libm::atan2`, which
//! the optimiser can inline there: through `std` the 10 000-point sweep was 3–4 %
//! slower (bench/lite.mjs), for about 450 bytes gzipped.

/// √x, correctly rounded.
#[inline]
pub(crate) fn sqrt(x: f64) -> f64 {
    #[cfg(feature = "std")]
    return x.sqrt();
    #[cfg(not(feature = "std"))]
    return libm::sqrt(x);
}

/// The largest integer ≤ x.
#[inline]
pub(crate) fn floor(x: f64) -> f64 {
    #[cfg(feature = "std")]
    return x.floor();
    #[cfg(not(feature = "std"))]
    return libm::floor(x);
}

/// The smallest integer ≥ x.
#[inline]
pub(crate) fn ceil(x: f64) -> f64 {
    #[cfg(feature = "std")]
    return x.ceil();
    #[cfg(not(feature = "std"))]
    return libm::ceil(x);
}

/// x with its fraction dropped (towards zero).
#[inline]
pub(crate) fn trunc(x: f64) -> f64 {
    #[cfg(feature = "std")]
    return x.trunc();
    #[cfg(not(feature = "std"))]
    return libm::trunc(x);
}

/// The nearest integer, halves away from zero.
#[inline]
pub(crate) fn round(x: f64) -> f64 {
    #[cfg(feature = "std")]
    return x.round();
    #[cfg(not(feature = "std"))]
    return libm::round(x);
}

/// sin x (x in radians): on wasm32 with `std`, the standard library's, which is the
/// same musl port as `libm::sin` compiled into the runtime (`compiler_builtins`); the
/// complex arithmetic of `num-complex` calls it anyway, so the module carries one copy
/// of sin, cos, atan2 and their argument reduction instead of two (about 6 KB of wasm).
/// Elsewhere `libm::sin`, so native results do not depend on the C library.
#[inline]
pub(crate) fn sin(x: f64) -> f64 {
    #[cfg(all(feature = "std", target_arch = "wasm32"))]
    return x.sin();
    #[cfg(not(all(feature = "std", target_arch = "wasm32")))]
    return libm::sin(x);
}

/// cos x (x in radians); one copy on wasm32, as [`sin`].
#[inline]
pub(crate) fn cos(x: f64) -> f64 {
    #[cfg(all(feature = "std", target_arch = "wasm32"))]
    return x.cos();
    #[cfg(not(all(feature = "std", target_arch = "wasm32")))]
    return libm::cos(x);
}

/// The angle of the point (x, y) in radians, −π … π; one copy on wasm32, as [`sin`].
#[inline]
pub(crate) fn atan2(y: f64, x: f64) -> f64 {
    #[cfg(all(feature = "std", target_arch = "wasm32"))]
    return y.atan2(x);
    #[cfg(not(all(feature = "std", target_arch = "wasm32")))]
    return libm::atan2(y, x);
}

/// |z| = √(re² + im²) of a complex number: the square root of the sum of squares
/// (two multiplications, an addition and the sqrt instruction) when that sum is a
/// normal number, else `libm::hypot`, which scales to avoid the overflow or
/// underflow of the squares. Within an ulp or so of `hypot` (the sum and the sqrt
/// round once each, IEEE 754), at a fraction of its cost: the root finder takes
/// several moduli per iteration per root.
#[inline]
pub(crate) fn modulus(z: num_complex::Complex64) -> f64 {
    let s = z.re * z.re + z.im * z.im;
    if s.is_normal() {
        sqrt(s)
    } else {
        libm::hypot(z.re, z.im)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Reference: libm's software versions, on a spread of values including halves,
    /// negatives, signed zeros, subnormals and the extremes.
    #[test]
    fn same_bits_as_libm() {
        let mut xs = alloc::vec![
            0.0,
            -0.0,
            0.5,
            -0.5,
            1.5,
            -2.5,
            2.5,
            1e-310,
            -1e-310,
            f64::MAX,
            f64::MIN_POSITIVE,
            4503599627370495.5
        ];
        let mut state = 0x9e37_79b9_7f4a_7c15_u64;
        for _ in 0..20_000 {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            let x = f64::from_bits(state);
            if x.is_finite() {
                xs.push(x);
                xs.push(x.abs() * 1e-300);
            }
        }
        for &x in &xs {
            assert_eq!(
                sqrt(x.abs()).to_bits(),
                libm::sqrt(x.abs()).to_bits(),
                "sqrt {x:e}"
            );
            assert_eq!(floor(x).to_bits(), libm::floor(x).to_bits(), "floor {x:e}");
            assert_eq!(ceil(x).to_bits(), libm::ceil(x).to_bits(), "ceil {x:e}");
            assert_eq!(trunc(x).to_bits(), libm::trunc(x).to_bits(), "trunc {x:e}");
            assert_eq!(round(x).to_bits(), libm::round(x).to_bits(), "round {x:e}");
        }
    }

    /// Reference: `libm::hypot` (which scales to avoid overflow); within 2 ulps
    /// of it wherever the squares stay normal, and the same where they do not.
    #[test]
    fn modulus_agrees_with_hypot() {
        let mut state = 0x2545_f491_4f6c_dd1d_u64;
        let mut next = || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            state
        };
        for _ in 0..20_000 {
            // Exponents across the whole range, both signs.
            let e = (next() % 1200) as i32 - 600;
            let re = (next() as f64 / u64::MAX as f64 - 0.5) * libm::pow(2.0, f64::from(e));
            let im = (next() as f64 / u64::MAX as f64 - 0.5) * libm::pow(2.0, f64::from(e));
            let z = num_complex::Complex64::new(re, im);
            let (got, want) = (modulus(z), libm::hypot(re, im));
            assert!(
                (got - want).abs() <= 2.0 * f64::EPSILON * want,
                "|{re:e} + j{im:e}|: {got:e} vs {want:e}"
            );
        }
        for (re, im) in [
            (0.0, 0.0),
            (3.0, -4.0),
            (1e300, 1e300),
            (1e-300, -1e-300),
            (5e-324, 0.0),
        ] {
            let want = libm::hypot(re, im);
            let got = modulus(num_complex::Complex64::new(re, im));
            assert!(
                (got - want).abs() <= 2.0 * f64::EPSILON * want,
                "{re:e}, {im:e}"
            );
        }
    }
}
