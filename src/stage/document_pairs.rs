//! A stage from name/value pairs, as a worksheet range or a batch row holds it:
//! the pairs become the stage document (`docs/stage.md`) read by
//! [`super::document_json::read_stage`], so every check and every error is the
//! document's.
//!
//! Names are the document's fields compared without case and without `_`
//! (`gbwHz`, `gbw_hz` and `GBWHZ` are one name): `kind`, `spreadPoint`; the
//! amplifier's `a0` (with `a0Min`, `a0Max` for its spread), `gbwHz` (or `gbw`),
//! `dominantPoleHz`, `hold`, `polesHz` (or `poles`), `zerosHz`, `rhpZerosHz`
//! (lists: values separated by blanks), `rd`, `cd`, `rcm`, `ccm`, `ro`,
//! `slewRate`, `voltageNoise` (or `en`) and `currentNoise` (or `in`), the white
//! noise densities, with `voltageNoiseCornerHz` and `currentNoiseCornerHz`
//! (their 1/f corners; the document's `{density, cornerHz}` objects); the parts
//! `rf`, `rg`, `cf`, `rs`, `cs`, `rl`, `cl`, `riso`.

use super::document::Stage;
use super::document_json::read_stage;
use crate::circuit::{CircuitError, CircuitResult};
use crate::error::Error;
use crate::json::{Json, Members};
use alloc::string::String;
use alloc::vec;
use alloc::vec::Vec;

/// The members of one object of the document, in the order given.
type Section = Vec<(String, Json)>;

/// Adds a member; false when the name is there already.
fn insert(section: &mut Section, key: &str, v: Json) -> bool {
    if section.has(key) {
        return false;
    }
    section.push((key.into(), v));
    true
}

/// Removes the member named `key` and gives its value.
fn take(section: &mut Section, key: &str) -> Option<Json> {
    let i = section.iter().position(|(k, _)| k == key)?;
    Some(section.remove(i).1)
}

const AMPLIFIER: [&str; 13] = [
    "a0",
    "gbwHz",
    "dominantPoleHz",
    "hold",
    "polesHz",
    "zerosHz",
    "rhpZerosHz",
    "rd",
    "cd",
    "rcm",
    "ccm",
    "ro",
    "slewRate",
];
const LISTS: [&str; 3] = ["polesHz", "zerosHz", "rhpZerosHz"];
const PARTS: [&str; 8] = super::document_json::PART_KEYS;
const TOP: [&str; 2] = ["kind", "spreadPoint"];
const SPREAD: [&str; 2] = ["a0Min", "a0Max"];
/// The noise densities and their corners: each density with its corner becomes
/// the amplifier's `{density, cornerHz}` object.
const NOISE: [(&str, &str); 2] = [
    ("voltageNoise", "voltageNoiseCornerHz"),
    ("currentNoise", "currentNoiseCornerHz"),
];
const NOISE_FIELDS: [&str; 4] = [
    "voltageNoise",
    "voltageNoiseCornerHz",
    "currentNoise",
    "currentNoiseCornerHz",
];
/// Other spellings an engineer types, and the field each stands for.
const ALIASES: [(&str, &str); 4] = [
    ("gbw", "gbwHz"),
    ("poles", "polesHz"),
    ("en", "voltageNoise"),
    ("in", "currentNoise"),
];
/// Every name the pairs may use.
pub const PAIR_NAMES: &str = "kind, spreadPoint, a0, a0Min, a0Max, gbwHz, dominantPoleHz, hold, polesHz, zerosHz, rhpZerosHz, rd, cd, rcm, ccm, ro, slewRate, voltageNoise, voltageNoiseCornerHz, currentNoise, currentNoiseCornerHz, rf, rg, cf, rs, cs, rl, cl, riso";

/// `a` and `b` are the same name, ignoring case and `_`.
fn same(a: &str, b: &str) -> bool {
    let mut x = a.chars().filter(|&c| c != '_');
    let mut y = b.chars().filter(|&c| c != '_');
    loop {
        match (x.next(), y.next()) {
            (None, None) => return true,
            (Some(p), Some(q)) if p.eq_ignore_ascii_case(&q) => {}
            _ => return false,
        }
    }
}

/// The stage document field a typed name stands for.
pub fn field_of(name: &str) -> Option<&'static str> {
    let all = TOP
        .iter()
        .chain(&AMPLIFIER)
        .chain(&PARTS)
        .chain(&SPREAD)
        .chain(&NOISE_FIELDS);
    all.copied().find(|f| same(f, name)).or_else(|| {
        ALIASES
            .iter()
            .find(|(alias, _)| same(alias, name))
            .map(|(_, f)| *f)
    })
}

/// The stage document the pairs describe (values: JSON numbers or texts).
///
/// # Errors
/// An unknown name (`unknown_name`, param `field`, naming it); a field given
/// twice (`out_of_domain`, naming it).
pub fn document_from_pairs<'a>(
    pairs: impl IntoIterator<Item = (&'a str, Json)>,
) -> CircuitResult<Json> {
    let (mut top, mut amp, mut parts, mut spread, mut noise) = (
        Section::new(),
        Section::new(),
        Section::new(),
        Section::new(),
        Section::new(),
    );
    for (name, mut v) in pairs {
        let field = field_of(name.trim()).ok_or_else(|| {
            CircuitError::named(
                Error::UnknownName {
                    param: "field",
                    expected: PAIR_NAMES,
                },
                name.trim(),
            )
        })?;
        if LISTS.contains(&field) {
            v = match v {
                Json::String(t) => Json::Array(t.split_whitespace().map(Json::from).collect()),
                other => Json::Array(vec![other]),
            };
        }
        let section = if TOP.contains(&field) {
            &mut top
        } else if PARTS.contains(&field) {
            &mut parts
        } else if SPREAD.contains(&field) {
            &mut spread
        } else if NOISE_FIELDS.contains(&field) {
            &mut noise
        } else {
            &mut amp
        };
        if !insert(section, field, v) {
            return Err(CircuitError::named(
                Error::OutOfDomain {
                    param: "field",
                    requirement: "is given twice",
                },
                field,
            ));
        }
    }
    if !spread.is_empty() {
        let mut a0 = Section::new();
        if let Some(typ) = take(&mut amp, "a0") {
            a0.push(("typ".into(), typ));
        }
        for (k, key) in [("min", "a0Min"), ("max", "a0Max")] {
            if let Some(v) = take(&mut spread, key) {
                a0.push((k.into(), v));
            }
        }
        amp.push(("a0".into(), Json::Object(a0)));
    }
    for (density, corner) in NOISE {
        let d = take(&mut noise, density);
        let c = take(&mut noise, corner);
        let mut o = Section::new();
        if let Some(d) = d {
            o.push(("density".into(), d));
        }
        if let Some(c) = c {
            o.push(("cornerHz".into(), c));
        }
        // A corner without its density is refused by the document's reader
        // ("needs density"), naming the density's field.
        if !o.is_empty() {
            amp.push((density.into(), Json::Object(o)));
        }
    }
    top.push(("format".into(), Json::from("loopwright-stage")));
    top.push(("version".into(), Json::whole(1)));
    top.push(("amplifier".into(), Json::Object(amp)));
    top.push(("parts".into(), Json::Object(parts)));
    Ok(Json::Object(top))
}

/// The stage the pairs describe, read and validated as a stage document.
///
/// # Errors
/// As [`document_from_pairs`] and [`read_stage`] (naming the field).
///
/// # Example
/// ```
/// use loopwright::stage::document_pairs::stage_from_pairs;
/// use loopwright::json::Json as Value;
/// let pairs = [("kind", "inverting"), ("a0", "1e5"), ("gbw_hz", "1M"), ("rf", "10k"), ("rg", "1k")];
/// let s = stage_from_pairs(pairs.iter().map(|(n, v)| (*n, Value::from(*v)))).unwrap();
/// assert_eq!(s.parts.rf, Some(1e4));
/// let bad = [("kind", "inverting"), ("a0", "1e5"), ("gbw", "1M"), ("rf", "-10k"), ("rg", "1k")];
/// let e = stage_from_pairs(bad.iter().map(|(n, v)| (*n, Value::from(*v)))).unwrap_err();
/// assert_eq!(e.error.param(), "rf");
/// ```
pub fn stage_from_pairs<'a>(
    pairs: impl IntoIterator<Item = (&'a str, Json)>,
) -> CircuitResult<Stage> {
    let doc = document_from_pairs(pairs)?;
    read_stage(&doc.to_text())
}

#[cfg(test)]
mod noise_pairs_tests {
    use super::*;

    #[test]
    fn noise_densities_and_corners_become_the_documents_objects() {
        let pairs = [
            ("kind", "non-inverting"),
            ("a0", "1e5"),
            ("gbw", "10M"),
            ("rf", "9k"),
            ("rg", "1k"),
            ("en", "8n"),
            ("voltage_noise_corner_hz", "20"),
            ("in", "0.5p"),
        ];
        let s = stage_from_pairs(pairs.iter().map(|(n, v)| (*n, Json::from(*v)))).unwrap();
        let v = s.amplifier.voltage_noise.unwrap();
        assert_eq!((v.density, v.corner_hz), (8e-9, 20.0));
        let i = s.amplifier.current_noise.unwrap();
        assert_eq!((i.density, i.corner_hz), (0.5e-12, 0.0));
        let bad = [
            ("kind", "non-inverting"),
            ("a0", "1e5"),
            ("gbw", "10M"),
            ("current_noise_corner_hz", "100"),
        ];
        let e = stage_from_pairs(bad.iter().map(|(n, v)| (*n, Json::from(*v)))).unwrap_err();
        assert_eq!(e.error.param(), "currentNoise");
    }
}
