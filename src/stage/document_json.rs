//! The stage document: versioned JSON (`"format": "loopwright-stage"`),
//! described in `docs/stage.md`.
//!
//! ```json
//! { "format": "loopwright-stage", "version": 1, "kind": "transimpedance",
//!   "amplifier": { "a0": 1e6, "gbwHz": "20M", "cd": "4p", "ccm": "3p", "ro": 40 },
//!   "spreadPoint": "typ",
//!   "parts": { "rf": "100k", "cf": "1p5", "cs": "20p" } }
//! ```

use super::amplifier_json::{number, read_amplifier, reject_unknown, write_amplifier, Object};
use super::document::{Stage, StageKind, StageParts};
use super::spread::SpreadPoint;
use crate::circuit::{CircuitError, CircuitResult};
use crate::error::Error;
use crate::json::{self, Json, JsonWriter, Members, NumberText};
use alloc::string::String;
use alloc::vec::Vec;

/// The `format` field's value.
pub const STAGE_FORMAT: &str = "loopwright-stage";
/// The version this reader reads and writes.
pub const STAGE_VERSION: u64 = 1;
/// Longest document accepted, in bytes.
pub const MAX_STAGE_JSON_LEN: usize = 64 * 1024;

const TOP_KEYS: [&str; 6] = [
    "format",
    "version",
    "kind",
    "amplifier",
    "spreadPoint",
    "parts",
];
/// The names of the parts object's fields.
pub const PART_KEYS: [&str; 8] = ["rf", "rg", "cf", "rs", "cs", "rl", "cl", "riso"];

/// Read a stage document and validate it.
///
/// # Errors
/// Text that is not JSON (param `json`, the name gives line:column); a wrong
/// `format` or `version`; an unknown field (param `field`, naming it); a
/// missing `kind` or `amplifier`; every error of [`Stage::validate`], naming
/// the field.
///
/// # Example
/// ```
/// use loopwright::stage::document_json::{read_stage, write_stage};
/// let doc = r#"{"format":"loopwright-stage","version":1,"kind":"non-inverting",
///   "amplifier":{"a0":2e5,"gbwHz":"10M"},"parts":{"rf":"9k","rg":"1k","cl":"1n"}}"#;
/// let s = read_stage(doc).unwrap();
/// assert_eq!(s.parts.rf, Some(9e3));
/// assert_eq!(read_stage(&write_stage(&s)).unwrap(), s);
/// let bad = doc.replace("\"rg\":\"1k\"", "\"rg\":\"-1k\"");
/// assert_eq!(read_stage(&bad).unwrap_err().error.param(), "rg");
/// ```
pub fn read_stage(json: &str) -> CircuitResult<Stage> {
    if json.len() > MAX_STAGE_JSON_LEN {
        return Err(CircuitError::from(Error::TooLarge {
            param: "json",
            limit: MAX_STAGE_JSON_LEN as u64,
        }));
    }
    let doc = json::parse(json).map_err(|e| crate::circuit::json::syntax_error(&e))?;
    let o = doc.as_object().ok_or(Error::OutOfDomain {
        param: "json",
        requirement: "must be a JSON object",
    })?;
    reject_unknown(
        o,
        &TOP_KEYS,
        "format, version, kind, amplifier, spreadPoint, parts",
    )?;
    if o.field("format").and_then(Json::as_str) != Some(STAGE_FORMAT) {
        return Err(CircuitError::from(Error::UnknownName {
            param: "format",
            expected: STAGE_FORMAT,
        }));
    }
    if o.field("version").and_then(Json::as_u64) != Some(STAGE_VERSION) {
        return Err(CircuitError::from(Error::OutOfDomain {
            param: "version",
            requirement: "must be 1, the version of the loopwright-stage format this reader knows",
        }));
    }
    let kind = StageKind::from_name(o.field("kind").and_then(Json::as_str).unwrap_or(""))?;
    let amplifier = read_amplifier(o.field("amplifier").ok_or(Error::OutOfDomain {
        param: "amplifier",
        requirement: "the stage needs its amplifier's model",
    })?)?;
    let point = match o.field("spreadPoint") {
        None => SpreadPoint::Typ,
        Some(p) => SpreadPoint::from_name("spreadPoint", p.as_str().unwrap_or(""))?,
    };
    let parts = read_parts(o.field("parts"))?;
    let stage = Stage {
        kind,
        amplifier,
        point,
        parts,
    };
    stage.validate()?;
    Ok(stage)
}

fn read_parts(v: Option<&Json>) -> CircuitResult<StageParts> {
    let o: &Object = match v {
        None => &[],
        Some(v) => v.as_object().ok_or(Error::OutOfDomain {
            param: "parts",
            requirement: "must be an object of part values (rf, rg, cf, rs, cs, rl, cl, riso)",
        })?,
    };
    reject_unknown(o, &PART_KEYS, "rf, rg, cf, rs, cs, rl, cl, riso")?;
    let get = |k: &'static str| o.field(k).map(|x| number(x, k)).transpose();
    Ok(StageParts {
        rf: get("rf")?,
        rg: get("rg")?,
        cf: get("cf")?,
        rs: get("rs")?,
        cs: get("cs")?,
        rl: get("rl")?,
        cl: get("cl")?,
        riso: get("riso")?,
    })
}

/// Write a stage document (numbers; parts that are not there left out), so
/// that [`read_stage`] gives back an equal stage. Canonical as the circuit
/// document ([`crate::circuit::json::write_circuit`]): compact, members in
/// code-point order of their names, numbers as [`NumberText::WithFraction`].
pub fn write_stage(s: &Stage) -> String {
    let mut doc: Vec<(String, Json)> = alloc::vec![
        ("format".into(), Json::from(STAGE_FORMAT)),
        ("version".into(), Json::whole(STAGE_VERSION)),
        ("kind".into(), Json::from(s.kind.name())),
        ("amplifier".into(), write_amplifier(&s.amplifier)),
        ("spreadPoint".into(), Json::from(s.point.name())),
    ];
    let p = &s.parts;
    let parts = [
        ("rf", p.rf),
        ("rg", p.rg),
        ("cf", p.cf),
        ("rs", p.rs),
        ("cs", p.cs),
        ("rl", p.rl),
        ("cl", p.cl),
        ("riso", p.riso),
    ]
    .into_iter()
    .filter_map(|(k, v)| v.map(|v| (String::from(k), Json::from(v))))
    .collect();
    doc.push(("parts".into(), Json::sorted_object(parts)));
    let mut w = JsonWriter::new().with_numbers(NumberText::WithFraction);
    w.value(&Json::sorted_object(doc));
    w.finish()
}

#[cfg(test)]
mod tests {
    use super::*;

    const DOC: &str = r#"{"format":"loopwright-stage","version":1,"kind":"transimpedance",
      "amplifier":{"a0":{"min":3e5,"typ":1e6},"gbwHz":"20M","cd":"4p","ccm":"3p","ro":40},
      "spreadPoint":"min","parts":{"rf":"100k","cf":"1p5","cs":"20p","rs":"1G"}}"#;

    #[test]
    fn the_documented_example_reads_builds_and_round_trips() {
        let doc = include_str!("../../docs/stage.md");
        let start = doc.find("```json").map(|i| i + 7).unwrap();
        let end = start + doc[start..].find("```").unwrap();
        let s = read_stage(&doc[start..end]).unwrap();
        assert_eq!(read_stage(&write_stage(&s)).unwrap(), s);
        assert!(s.circuit().is_ok());
        let t = read_stage(DOC).unwrap();
        assert_eq!(
            (t.kind, t.point, t.parts.cs),
            (StageKind::Transimpedance, SpreadPoint::Min, Some(20e-12))
        );
        assert_eq!(read_stage(&write_stage(&t)).unwrap(), t);
    }

    #[test]
    fn bad_documents_name_the_field() {
        let e = |from: &str, to: &str| read_stage(&DOC.replace(from, to)).unwrap_err();
        assert_eq!(e("loopwright-stage", "x").error.param(), "format");
        assert_eq!(e("\"version\":1", "\"version\":2").error.param(), "version");
        assert_eq!(e("transimpedance", "follower").error.param(), "kind");
        assert_eq!(e("\"rf\":\"100k\",", "").error.param(), "rf");
        assert_eq!(e("\"cs\":\"20p\"", "\"cs\":0").error.param(), "cs");
        assert_eq!(
            e(
                "\"gbwHz\":\"20M\"",
                "\"gbwHz\":\"20M\",\"dominantPoleHz\":1e3"
            )
            .error
            .param(),
            "gbwHz"
        );
        let x = e("\"rs\":\"1G\"", "\"rq\":\"1G\"");
        assert_eq!((x.error.param(), x.name.as_str()), ("field", "rq"));
        assert_eq!(
            e("\"spreadPoint\":\"min\"", "\"spreadPoint\":\"worst\"")
                .error
                .param(),
            "spreadPoint"
        );
        assert_eq!(read_stage("{").unwrap_err().error.param(), "json");
    }
}
