//! Fuzz the spreads reader (src/notation/spread.rs): any text given to
//! `read_spread` and `read_range` (as the TOLERANCE functions' spreads,
//! temperature and band arguments reach them) gives a value or a typed error;
//! nothing panics or hangs, and every number read is finite.
#![no_main]

use libfuzzer_sys::fuzz_target;
use loopwright::notation::{read_range, read_spread, ReadOptions, TypedTolerance};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    if let Ok(s) = read_spread(text) {
        if let Some(tc) = s.tempco_ppm {
            assert!(tc.is_finite());
        }
        let finite = match s.tolerance {
            None => true,
            Some(TypedTolerance::Uniform { percent }) => percent.is_finite(),
            Some(TypedTolerance::Normal { percent, sigmas }) => {
                percent.is_finite() && sigmas.is_finite()
            }
            Some(TypedTolerance::Range { min, max }) => min.is_finite() && max.is_finite(),
            Some(TypedTolerance::MinTypMax { min, typ, max }) => {
                min.is_finite() && typ.is_finite() && max.is_finite()
            }
        };
        assert!(finite);
    }
    if let Ok([a, b]) = read_range(text, &ReadOptions::default()) {
        assert!(a.is_finite() && b.is_finite());
    }
});
