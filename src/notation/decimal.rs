//! Decimal digits and a power of ten to the nearest double, ties to even: the one
//! decimal-to-binary conversion of the reader ([`super::read`]).
//!
//! IEEE 754-2019 §5.12.2 requires the conversion from a decimal character sequence
//! to binary64 to be correctly rounded, so the result is the same double as the
//! standard library's `str::parse::<f64>` (the tests compare the two bit for bit).
//! It is ours for size: the standard library's conversion (Eisel–Lemire with a
//! 128-bit power-of-five table, then a big-decimal fallback) is about 6 KB of the
//! lite wasm module, gzipped (docs/wasm-size.md).
//!
//! Method: the exact-product fast path of W. D. Clinger, "How to read floating
//! point numbers accurately", PLDI 1990 (at most 15 digits and |power| ≤ 22: one
//! correctly rounded IEEE multiplication or division of two exact doubles), else
//! exact integer arithmetic: the quotient digits × 10^e ÷ 1 (or digits ÷ 10^−e)
//! computed to 64–66 bits by long division, with a sticky bit for the remainder,
//! then rounded to the 53 bits of a normal double or the fewer of a subnormal one.

use alloc::vec::Vec;

/// Exact powers of ten as doubles, 10^0 … 10^22 (10^22 < 2^53 · 2^22 is the last
/// that is exact).
const POW10: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// The double nearest to ±(the decimal integer `digits`) × 10^`exp`, ties to even;
/// ±∞ beyond the double range, ±0 below half the smallest subnormal. `digits` holds
/// ASCII digits only (`None` otherwise); empty means zero. The work grows with the
/// square of the digit count: the reader passes at most 800 (`MAX_DIGITS` on each
/// side of the point).
pub(crate) fn to_f64(negative: bool, digits: &[u8], exp: i64) -> Option<f64> {
    if !digits.iter().all(u8::is_ascii_digit) {
        return None;
    }
    let magnitude = unsigned(digits, exp);
    Some(if negative { -magnitude } else { magnitude })
}

fn unsigned(digits: &[u8], exp: i64) -> f64 {
    let start = digits
        .iter()
        .position(|&d| d != b'0')
        .unwrap_or(digits.len());
    let digits = &digits[start..];
    let end = digits.iter().rposition(|&d| d != b'0').map_or(0, |i| i + 1);
    let (digits, exp) = (
        &digits[..end],
        exp.saturating_add((digits.len() - end) as i64),
    );
    if digits.is_empty() {
        return 0.0;
    }
    let n = digits.len() as i64;
    // The value lies in [10^(n+exp−1), 10^(n+exp)).
    let top = n.saturating_add(exp);
    if top > 310 {
        return f64::INFINITY;
    }
    if top < -324 {
        // Below 10^−324, under half the smallest subnormal (4.94e−324).
        return 0.0;
    }
    let exp = exp as i32;
    if n <= 15 && (-22..=22).contains(&exp) {
        let mut m = 0u64;
        for &d in digits {
            m = m * 10 + u64::from(d - b'0');
        }
        // m < 10^15 < 2^53 and 10^|exp| are exact: one rounding.
        let m = m as f64;
        return if exp >= 0 {
            m * POW10[exp as usize]
        } else {
            m / POW10[(-exp) as usize]
        };
    }
    let mut num = Big::from_digits(digits);
    let mut den = Big::one();
    if exp >= 0 {
        num.mul_pow10(exp as u32);
    } else {
        den.mul_pow10((-exp) as u32);
    }
    // Scale so that num / den lies in [2^63, 2^66): q = ⌊num · 2^s / den⌋.
    let s = den.bits() as i32 - num.bits() as i32 + 65;
    if s >= 0 {
        num.shl(s as u32);
    } else {
        den.shl((-s) as u32);
    }
    let mut q: u128 = 0;
    for i in (0..66u32).rev() {
        let mut d = den.clone();
        d.shl(i);
        if num.ge(&d) {
            num.sub(&d);
            q |= 1u128 << i;
        }
    }
    round(q, !num.is_zero(), s)
}

/// q · 2^−s (plus less than one unit of q when `sticky`) rounded to a double.
fn round(q: u128, sticky: bool, s: i32) -> f64 {
    let len = 128 - q.leading_zeros() as i32;
    // The binary exponent of the value: 2^e2 ≤ value < 2^(e2+1).
    let e2 = len - 1 - s;
    if e2 > 1023 {
        return f64::INFINITY;
    }
    let keep = if e2 >= -1022 { 53 } else { e2 + 1075 };
    let drop = len - keep;
    if drop > len {
        return 0.0;
    }
    let mut m = q >> drop;
    let rest = q & ((1u128 << drop) - 1);
    let half = 1u128 << (drop - 1);
    if rest > half || (rest == half && (sticky || m & 1 == 1)) {
        m += 1;
    }
    // m ≤ 2^53 is exact; the power of two 2^(drop − s) ≥ 2^−1074 is exact too.
    let k = drop - s;
    if k > 1023 {
        return f64::INFINITY;
    }
    let scale = if k >= -1022 {
        f64::from_bits(((k + 1023) as u64) << 52)
    } else {
        f64::from_bits(1u64 << (k + 1074))
    };
    (m as u64) as f64 * scale
}

/// A non-negative integer, 32-bit limbs, least significant first.
#[derive(Clone)]
struct Big(Vec<u32>);

impl Big {
    fn one() -> Self {
        Big(alloc::vec![1])
    }

    fn from_digits(digits: &[u8]) -> Self {
        let mut b = Big(Vec::with_capacity(digits.len() / 9 + 2));
        for chunk in digits.chunks(9) {
            let mut v = 0u32;
            for &d in chunk {
                v = v * 10 + u32::from(d - b'0');
            }
            b.mul_add(10u32.pow(chunk.len() as u32), v);
        }
        b
    }

    fn mul_add(&mut self, k: u32, add: u32) {
        let mut carry = u64::from(add);
        for limb in &mut self.0 {
            let t = u64::from(*limb) * u64::from(k) + carry;
            *limb = t as u32;
            carry = t >> 32;
        }
        if carry != 0 {
            self.0.push(carry as u32);
        }
    }

    fn mul_pow10(&mut self, mut e: u32) {
        while e > 0 {
            let step = e.min(9);
            self.mul_add(10u32.pow(step), 0);
            e -= step;
        }
    }

    fn bits(&self) -> u32 {
        self.0
            .iter()
            .rposition(|&l| l != 0)
            .map_or(0, |i| 32 * i as u32 + 32 - self.0[i].leading_zeros())
    }

    fn shl(&mut self, n: u32) {
        let (limbs, bits) = ((n / 32) as usize, n % 32);
        if bits != 0 {
            let mut carry = 0u32;
            for limb in &mut self.0 {
                let next = *limb >> (32 - bits);
                *limb = (*limb << bits) | carry;
                carry = next;
            }
            if carry != 0 {
                self.0.push(carry);
            }
        }
        if limbs != 0 {
            let mut shifted = alloc::vec![0; limbs + self.0.len()];
            shifted[limbs..].copy_from_slice(&self.0);
            self.0 = shifted;
        }
    }

    fn ge(&self, other: &Big) -> bool {
        let len = self.0.len().max(other.0.len());
        for i in (0..len).rev() {
            let (a, b) = (
                self.0.get(i).copied().unwrap_or(0),
                other.0.get(i).copied().unwrap_or(0),
            );
            if a != b {
                return a > b;
            }
        }
        true
    }

    /// self −= other, for self ≥ other.
    fn sub(&mut self, other: &Big) {
        let mut borrow = 0i64;
        for (i, limb) in self.0.iter_mut().enumerate() {
            let t = i64::from(*limb) - i64::from(other.0.get(i).copied().unwrap_or(0)) - borrow;
            *limb = t as u32;
            borrow = i64::from(t < 0);
        }
    }

    fn is_zero(&self) -> bool {
        self.0.iter().all(|&l| l == 0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use alloc::format;
    use alloc::string::String;

    /// `text` as sign, digits and exponent, converted, against the standard
    /// library's correctly rounded `str::parse::<f64>` (the oracle), bit for bit.
    fn check(text: &str) {
        let (negative, body) = match text.strip_prefix('-') {
            Some(b) => (true, b),
            None => (false, text),
        };
        let (mantissa, exp) = body.split_once('e').unwrap_or((body, "0"));
        let (int, frac) = mantissa.split_once('.').unwrap_or((mantissa, ""));
        let digits: String = [int, frac].concat();
        let exp: i64 = exp.parse::<i64>().unwrap() - frac.len() as i64;
        let ours = to_f64(negative, digits.as_bytes(), exp).unwrap();
        let std: f64 = text.parse().unwrap();
        assert_eq!(ours.to_bits(), std.to_bits(), "{text}: {ours:e} vs {std:e}");
    }

    #[test]
    fn hard_cases_match_the_standard_library() {
        for t in [
            "0", "0.000", "-0", "1", "4700", "4.7e3", "0.1", "0.3", "123456789012345678",
            "9007199254740992", "9007199254740993", "9007199254740995", "9007199254740994.5",
            "2.2250738585072011e-308", "2.2250738585072014e-308", "2.2250738585072012e-308",
            "4.9406564584124654e-324", "2.4703282292062327e-324", "2.4703282292062328e-324",
            "2.4703282292062327208828439643411068618252990130716238221279284125033775363510437593264991818081799618989828234772285886546332835517796989819938739800539093906315035659515570226392290858392449105184435931802849936536152500319370457678249219365623669863658480757001585769269903706311928279558551332927834338409351978015531246597263579574622766465272827220056374006485499977096599470454020828166226237857393450736339007967761930577506740176324673600968951340535537458516661134223766678604162159680461914467291840300530057530849048765391711386591646239524912623653881879636239373280423891018672348497668235089863388587925628302755995657524455507255189313690836254779186948667994968324049705821028513185451396213837722826145437693412532098591327667236328125e-324",
            "1.7976931348623157e308", "1.7976931348623158e308", "1.7976931348623159e308",
            "1e308", "1e309", "1e-324", "3e-324", "1e22", "1e23", "8.98846567431158e307",
            "0.500000000000000166533453693773481063544750213623046875",
            "3.518437208883201171875e13", "62.5364939768271845828", "8.10109172351e-10",
            "1.00000005960464477550", "7.3177701707893310e+15",
        ] {
            check(t);
        }
    }

    #[test]
    fn random_texts_match_the_standard_library() {
        let mut state = 0x2545_f491_4f6c_dd1d_u64;
        let mut next = move || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            state
        };
        for i in 0..40_000 {
            let r = next();
            let x = f64::from_bits(r >> 1);
            if !x.is_finite() {
                continue;
            }
            // Near a double: its shortest text, its 17- to 30-digit texts with
            // the last digit moved, and its exact expansion cut at any length.
            let digits = 17 + (next() % 14) as usize;
            let t = format!("{:.*e}", digits - 1, x);
            check(&t);
            let (m, e) = t.split_once('e').unwrap();
            let last = m.as_bytes()[m.len() - 1];
            let bumped = if last < b'9' { last + 1 } else { last - 1 };
            check(&format!("{}{}e{}", &m[..m.len() - 1], bumped as char, e));
            check(&format!("{x:e}"));
            if i % 20 == 0 {
                let exact = format!("{:.800e}", x);
                let (m, e) = exact.split_once('e').unwrap();
                let cut = 2 + (next() % 780) as usize;
                check(&format!("{}e{}", &m[..cut], e));
                check(&format!("{}1e{}", &m[..cut], e));
            }
            // Short random decimals over the whole exponent range.
            let n = 1 + (next() % 25) as u32;
            let mant = next() % 10u64.pow(n.min(19));
            let exp = (next() % 700) as i64 - 350;
            check(&format!("{mant}e{exp}"));
        }
    }

    #[test]
    fn extremes_and_bad_bytes() {
        assert_eq!(to_f64(false, b"1", 400), Some(f64::INFINITY));
        assert_eq!(to_f64(true, b"1", 400), Some(f64::NEG_INFINITY));
        assert_eq!(to_f64(false, b"1", -400), Some(0.0));
        assert_eq!(to_f64(false, b"", 5), Some(0.0));
        assert_eq!(to_f64(false, b"0000", i64::MAX), Some(0.0));
        assert_eq!(to_f64(false, b"1", i64::MIN), Some(0.0));
        assert_eq!(to_f64(false, b"1", i64::MAX), Some(f64::INFINITY));
        assert_eq!(to_f64(false, b"4a7", 0), None);
    }
}
