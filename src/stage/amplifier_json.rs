//! The amplifier model as a JSON object: the `model` of a circuit document's
//! `amplifier` element (version 2) and the `amplifier` of a stage document.
//!
//! ```json
//! { "a0": { "min": 5e4, "typ": 2e5, "max": 1e6 }, "gbwHz": "10M", "hold": "hold-gbw",
//!   "polesHz": ["40M"], "complexPoles": [{ "freqHz": "120M", "q": 0.7 }],
//!   "rd": "2M", "cd": "3p", "rcm": "1G", "ccm": "4p", "ro": 60,
//!   "slewRate": "10M", "swing": { "lowV": -13, "highV": 13 },
//!   "voltageNoise": { "density": "8n", "cornerHz": 20 },
//!   "currentNoise": { "density": "0.5p", "cornerHz": 100 } }
//! ```
//! `a0` is a number (no spread) or an object with `typ` and optional `min` and
//! `max` (each defaulting to `typ`). Values are numbers or value texts
//! ([`crate::circuit::parse_value`]). Unknown fields are refused, naming them.

use super::amplifier::{Amplifier, BandwidthRule, OutputSwing};
use super::density::NoiseDensity;
use super::spread::Spread;
use crate::circuit::error::{CircuitError, CircuitResult, Name};
use crate::circuit::value::parse_value;
use crate::error::Error;
use crate::freq::ComplexPair;
use crate::json::{Json, Members};
use alloc::vec::Vec;

/// The fields of the model object.
pub const MODEL_FIELDS: &str = "a0, gbwHz, dominantPoleHz, hold, polesHz, zerosHz, rhpZerosHz, complexPoles, complexZeros, rd, cd, rcm, ccm, ro, slewRate, swing, voltageNoise, currentNoise";
/// The names of the model object's fields.
pub const MODEL_KEYS: [&str; 18] = [
    "a0",
    "gbwHz",
    "dominantPoleHz",
    "hold",
    "polesHz",
    "zerosHz",
    "rhpZerosHz",
    "complexPoles",
    "complexZeros",
    "rd",
    "cd",
    "rcm",
    "ccm",
    "ro",
    "slewRate",
    "swing",
    "voltageNoise",
    "currentNoise",
];

/// The members of a JSON object.
pub(crate) type Object = [(alloc::string::String, Json)];

/// Refuse any key not in `known`, naming it (param `field`), and any key given
/// twice (a second value would otherwise pass unseen).
pub(crate) fn reject_unknown(
    obj: &Object,
    known: &[&str],
    expected: &'static str,
) -> CircuitResult<()> {
    if let Some((key, _)) = obj.iter().find(|(k, _)| !known.contains(&k.as_str())) {
        return Err(CircuitError::named(
            Error::UnknownName {
                param: "field",
                expected,
            },
            key,
        ));
    }
    match obj.repeated() {
        Some(key) => Err(CircuitError::named(
            Error::OutOfDomain {
                param: "field",
                requirement: "must be given once",
            },
            key,
        )),
        None => Ok(()),
    }
}

/// A number or a value text.
pub(crate) fn number(v: &Json, param: &'static str) -> crate::Result<f64> {
    match v {
        Json::Number(n) => Ok(n.value),
        Json::String(s) => parse_value(param, s),
        _ => Err(Error::OutOfDomain {
            param,
            requirement: "must be a number or a value text such as 4k7 or 10M",
        }),
    }
}

fn opt_number(obj: &Object, key: &'static str) -> crate::Result<Option<f64>> {
    obj.field(key).map(|v| number(v, key)).transpose()
}

fn object<'a>(v: &'a Json, param: &'static str) -> crate::Result<&'a Object> {
    v.as_object().ok_or(Error::OutOfDomain {
        param,
        requirement: "must be a JSON object",
    })
}

fn list<'a>(v: Option<&'a Json>, param: &'static str) -> crate::Result<&'a [Json]> {
    match v {
        None => Ok(&[]),
        Some(v) => v.as_array().ok_or(Error::OutOfDomain {
            param,
            requirement: "must be a list",
        }),
    }
}

fn spread(v: &Json) -> CircuitResult<Spread> {
    if let Json::Object(o) = v {
        reject_unknown(o, &["min", "typ", "max"], "min, typ, max")?;
        let typ =
            o.field("typ")
                .map(|t| number(t, "a0"))
                .transpose()?
                .ok_or(Error::OutOfDomain {
                    param: "a0",
                    requirement: "needs typ (min and max default to typ)",
                })?;
        Ok(Spread {
            min: opt_number(o, "min")
                .map_err(|e| e.with_param("a0"))?
                .unwrap_or(typ),
            typ,
            max: opt_number(o, "max")
                .map_err(|e| e.with_param("a0"))?
                .unwrap_or(typ),
        })
    } else {
        Ok(Spread::fixed(number(v, "a0")?))
    }
}

fn pairs(v: Option<&Json>, param: &'static str) -> CircuitResult<Vec<ComplexPair>> {
    let mut out = Vec::new();
    for p in list(v, param)? {
        let o = object(p, param)?;
        reject_unknown(o, &["freqHz", "q"], "freqHz, q")?;
        let get = |k: &str| {
            o.field(k)
                .map(|x| number(x, param))
                .transpose()?
                .ok_or(Error::OutOfDomain {
                    param,
                    requirement: "each pair needs freqHz and q",
                })
        };
        out.push(ComplexPair {
            freq_hz: get("freqHz")?,
            q: get("q")?,
        });
    }
    Ok(out)
}

fn density(v: Option<&Json>, param: &'static str) -> CircuitResult<Option<NoiseDensity>> {
    let Some(v) = v else { return Ok(None) };
    let o = object(v, param)?;
    reject_unknown(o, &["density", "cornerHz"], "density, cornerHz")?;
    let d = o
        .field("density")
        .map(|x| number(x, param))
        .transpose()?
        .ok_or(Error::OutOfDomain {
            param,
            requirement: "needs density",
        })?;
    let fc = opt_number(o, "cornerHz")
        .map_err(|e| e.with_param(param))?
        .unwrap_or(0.0);
    Ok(Some(NoiseDensity {
        density: d,
        corner_hz: fc,
    }))
}

fn swing(v: Option<&Json>) -> CircuitResult<Option<OutputSwing>> {
    let Some(v) = v else { return Ok(None) };
    let o = object(v, "swing")?;
    reject_unknown(o, &["lowV", "highV"], "lowV, highV")?;
    let get = |k: &str| {
        o.field(k)
            .map(|x| number(x, "swing"))
            .transpose()?
            .ok_or(Error::OutOfDomain {
                param: "swing",
                requirement: "needs lowV and highV",
            })
    };
    Ok(Some(OutputSwing {
        low_v: get("lowV")?,
        high_v: get("highV")?,
    }))
}

fn numbers(v: Option<&Json>, param: &'static str) -> crate::Result<Vec<f64>> {
    list(v, param)?.iter().map(|x| number(x, param)).collect()
}

/// Read and validate an amplifier model object.
///
/// # Errors
/// A field that is not of its type or does not read (param: the field); an
/// unknown field (param `field`, the name is the field); every error of
/// [`Amplifier::validate`].
pub fn read_amplifier(v: &Json) -> CircuitResult<Amplifier> {
    let o = object(v, "model")?;
    reject_unknown(o, &MODEL_KEYS, MODEL_FIELDS)?;
    let a0 = spread(o.field("a0").ok_or(Error::OutOfDomain {
        param: "a0",
        requirement: "the open-loop gain a0 is required",
    })?)?;
    let hold = match o.field("hold") {
        None => BandwidthRule::HoldGbw,
        Some(h) => BandwidthRule::from_name(h.as_str().unwrap_or(""))?,
    };
    let a = Amplifier {
        a0,
        gbw_hz: opt_number(o, "gbwHz")?,
        dominant_pole_hz: opt_number(o, "dominantPoleHz")?,
        hold,
        poles_hz: numbers(o.field("polesHz"), "polesHz")?,
        zeros_hz: numbers(o.field("zerosHz"), "zerosHz")?,
        rhp_zeros_hz: numbers(o.field("rhpZerosHz"), "rhpZerosHz")?,
        complex_poles: pairs(o.field("complexPoles"), "complexPoles")?,
        complex_zeros: pairs(o.field("complexZeros"), "complexZeros")?,
        rd: opt_number(o, "rd")?,
        cd: opt_number(o, "cd")?.unwrap_or(0.0),
        rcm: opt_number(o, "rcm")?,
        ccm: opt_number(o, "ccm")?.unwrap_or(0.0),
        ro: opt_number(o, "ro")?.unwrap_or(0.0),
        slew_rate: opt_number(o, "slewRate")?,
        swing: swing(o.field("swing"))?,
        voltage_noise: density(o.field("voltageNoise"), "voltageNoise")?,
        current_noise: density(o.field("currentNoise"), "currentNoise")?,
    };
    a.validate()?;
    Ok(a)
}

/// An amplifier model object (numbers; empty lists and unset figures left out;
/// members in code-point order of their names), so that [`read_amplifier`]
/// gives back an equal model.
pub fn write_amplifier(a: &Amplifier) -> Json {
    let mut m = Vec::new();
    let mut put = |k: &str, v: Json| {
        m.push((k.into(), v));
    };
    let s = a.a0;
    put(
        "a0",
        number_object(&[("min", s.min), ("typ", s.typ), ("max", s.max)]),
    );
    let opt = |v: Option<f64>| v.map(Json::from);
    if let Some(v) = opt(a.gbw_hz) {
        put("gbwHz", v);
    }
    if let Some(v) = opt(a.dominant_pole_hz) {
        put("dominantPoleHz", v);
    }
    put("hold", Json::from(a.hold.name()));
    for (k, l) in [
        ("polesHz", &a.poles_hz),
        ("zerosHz", &a.zeros_hz),
        ("rhpZerosHz", &a.rhp_zeros_hz),
    ] {
        if !l.is_empty() {
            put(k, Json::Array(l.iter().map(|&x| Json::from(x)).collect()));
        }
    }
    for (k, l) in [
        ("complexPoles", &a.complex_poles),
        ("complexZeros", &a.complex_zeros),
    ] {
        if !l.is_empty() {
            let items = l
                .iter()
                .map(|p| number_object(&[("freqHz", p.freq_hz), ("q", p.q)]))
                .collect();
            put(k, Json::Array(items));
        }
    }
    for (k, v) in [("rd", a.rd), ("rcm", a.rcm), ("slewRate", a.slew_rate)] {
        if let Some(v) = v {
            put(k, Json::from(v));
        }
    }
    for (k, v) in [("cd", a.cd), ("ccm", a.ccm), ("ro", a.ro)] {
        put(k, Json::from(v));
    }
    if let Some(s) = a.swing {
        put(
            "swing",
            number_object(&[("lowV", s.low_v), ("highV", s.high_v)]),
        );
    }
    for (k, d) in [
        ("voltageNoise", a.voltage_noise),
        ("currentNoise", a.current_noise),
    ] {
        if let Some(d) = d {
            put(
                k,
                number_object(&[("density", d.density), ("cornerHz", d.corner_hz)]),
            );
        }
    }
    Json::sorted_object(m)
}

/// An object of numbers, members in code-point order of their names.
pub(crate) fn number_object(members: &[(&str, f64)]) -> Json {
    let members = members.iter().map(|(k, v)| ((*k).into(), Json::from(*v)));
    Json::sorted_object(members.collect())
}

/// The name-less error of a model field, attached to the element `name`.
pub(crate) fn at_element(e: CircuitError, name: Name) -> CircuitError {
    if e.name.is_empty() {
        CircuitError::new(e.error, name)
    } else {
        e
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const MODEL: &str = r#"{ "a0": { "min": 5e4, "typ": 2e5, "max": 1e6 }, "gbwHz": "10M",
      "polesHz": ["40M"], "zerosHz": [3e8], "rhpZerosHz": ["1G"],
      "complexPoles": [{ "freqHz": "120M", "q": 0.7 }],
      "complexZeros": [{ "freqHz": "500M", "q": 3 }],
      "rd": "2M", "cd": "3p", "rcm": "1G", "ccm": "4p", "ro": 60,
      "slewRate": "10M", "swing": { "lowV": -13, "highV": 13 },
      "voltageNoise": { "density": "8n", "cornerHz": 20 },
      "currentNoise": { "density": "0.5p" } }"#;

    #[test]
    fn reads_and_writes_back_every_field() {
        let v = crate::json::parse(MODEL).unwrap();
        let a = read_amplifier(&v).unwrap();
        assert_eq!(a.gbw_hz, Some(10e6));
        assert_eq!(a.cd, 3e-12);
        assert_eq!(a.current_noise.unwrap().corner_hz, 0.0);
        assert_eq!(a.complex_poles[0].q, 0.7);
        assert_eq!(read_amplifier(&write_amplifier(&a)).unwrap(), a);
    }

    #[test]
    fn bad_models_name_the_field() {
        let bad = |from: &str, to: &str| {
            let v = crate::json::parse(&MODEL.replace(from, to)).unwrap();
            read_amplifier(&v).unwrap_err()
        };
        assert_eq!(bad("\"q\": 0.7", "\"q\": 0").error.param(), "complexPoles");
        assert_eq!(bad("\"ro\": 60", "\"ro\": \"x\"").error.param(), "ro");
        let e = bad("\"ro\": 60", "\"roo\": 60");
        assert_eq!((e.error.param(), e.name.as_str()), ("field", "roo"));
        assert_eq!(bad("\"typ\": 2e5", "\"typ\": 2e4").error.param(), "a0");
        assert_eq!(bad("\"gbwHz\": \"10M\",", "").error.param(), "gbwHz");
        assert_eq!(
            bad(
                "\"gbwHz\": \"10M\"",
                "\"gbwHz\": \"10M\", \"dominantPoleHz\": 5"
            )
            .error
            .param(),
            "dominantPoleHz"
        );
        assert_eq!(bad("\"lowV\": -13", "\"lowV\": 14").error.param(), "swing");
    }
}
