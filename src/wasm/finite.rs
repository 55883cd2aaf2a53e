//! The result check of the boundary done in the module: the path of the first number
//! of a result that is NaN or ±Infinity, found by walking its `serde::Serialize`
//! form (the same fields, in the same order, that serde-wasm-bindgen then writes),
//! and on the way every number in that order.
//!
//! The entry module (`facade/guard.js`, `finite`) walks every returned object in JS
//! for the same purpose; a result that crosses as [`finite_numbers`] (through
//! [`super::finite_numbers`]) is not walked again there: the JS walk of the
//! two-port result cost about 23 000 instructions a call (DEVELOPERS.md, "Worksheet
//! and two-port speed"), this one walks the Rust value with no call into JS. The
//! paths are those of the JS walk: `.af.exact.re`, `[2].re`, `""` for the value itself.

use alloc::string::String;
use alloc::vec::Vec;
use core::fmt::{self, Display, Write};
use serde::ser::{self, Serialize, Serializer};

/// The path of the first non-finite number of `value` in serialization order, or
/// `None` when every number is finite.
#[cfg(test)]
fn first_non_finite<T: Serialize + ?Sized>(value: &T) -> Option<String> {
    let mut walk = Walk {
        path: String::new(),
        numbers: None,
    };
    match value.serialize(&mut walk) {
        Ok(()) => None,
        Err(Found) => Some(walk.path),
    }
}

/// Every number of `value` in serialization order (the order in which
/// serde-wasm-bindgen writes them, text and names left out), or the path of the
/// first that is not finite, as [`first_non_finite`]. A result crosses as these
/// numbers in one `Float64Array` and the entry module builds the object around
/// them (`circuitTwoPortPacked`), instead of one call into JS per field.
pub(crate) fn finite_numbers<T: Serialize + ?Sized>(value: &T) -> Result<Vec<f64>, String> {
    let mut walk = Walk {
        path: String::new(),
        numbers: Some(Vec::new()),
    };
    match value.serialize(&mut walk) {
        Ok(()) => Ok(walk.numbers.unwrap_or_default()),
        Err(Found) => Err(walk.path),
    }
}

/// The walker: `path` is the place being serialized (kept, not unwound, once a
/// non-finite number is found); `numbers`, when kept, every number so far.
struct Walk {
    path: String,
    numbers: Option<Vec<f64>>,
}

/// "A non-finite number is at `Walk::path`": the error that stops the walk.
#[derive(Debug)]
struct Found;

impl Display for Found {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str("a number is not finite")
    }
}

impl ser::StdError for Found {}

impl ser::Error for Found {
    fn custom<M: Display>(_: M) -> Self {
        Found
    }
}

impl Walk {
    fn number(&mut self, x: f64) -> Result<(), Found> {
        if x.is_finite() {
            if let Some(n) = &mut self.numbers {
                n.push(x);
            }
            Ok(())
        } else {
            Err(Found)
        }
    }

    /// Serialize `value` at `self.path` + `segment`; the path is restored after.
    fn at<T: Serialize + ?Sized>(
        &mut self,
        segment: impl FnOnce(&mut String),
        value: &T,
    ) -> Result<(), Found> {
        let len = self.path.len();
        segment(&mut self.path);
        value.serialize(&mut *self)?;
        self.path.truncate(len);
        Ok(())
    }

    fn field<T: Serialize + ?Sized>(&mut self, key: &str, value: &T) -> Result<(), Found> {
        self.at(
            |p| {
                p.push('.');
                p.push_str(key);
            },
            value,
        )
    }

    fn index<T: Serialize + ?Sized>(&mut self, i: usize, value: &T) -> Result<(), Found> {
        // Writing to a String cannot fail.
        self.at(
            |p| {
                let _ = write!(p, "[{i}]");
            },
            value,
        )
    }
}

/// A list being walked: the index of the next element.
struct Seq<'a> {
    walk: &'a mut Walk,
    next: usize,
}

/// A map being walked: the text of the last key (maps cross as objects whose keys
/// are the keys' text; a key that is not text or a number has no path of its own).
struct Map<'a> {
    walk: &'a mut Walk,
    key: String,
}

/// The text of a map key (a string, a number or a bool); anything else is "".
struct KeyText<'a>(&'a mut String);

macro_rules! key_display {
    ($($f:ident: $t:ty),*) => {$(
        fn $f(self, v: $t) -> Result<(), Found> {
            let _ = write!(self.0, "{v}");
            Ok(())
        }
    )*};
}

macro_rules! ignore {
    ($($f:ident: $t:ty),*) => {$(
        fn $f(self, _: $t) -> Result<(), Found> {
            Ok(())
        }
    )*};
}

impl Serializer for KeyText<'_> {
    type Ok = ();
    type Error = Found;
    type SerializeSeq = ser::Impossible<(), Found>;
    type SerializeTuple = ser::Impossible<(), Found>;
    type SerializeTupleStruct = ser::Impossible<(), Found>;
    type SerializeTupleVariant = ser::Impossible<(), Found>;
    type SerializeMap = ser::Impossible<(), Found>;
    type SerializeStruct = ser::Impossible<(), Found>;
    type SerializeStructVariant = ser::Impossible<(), Found>;
    key_display!(serialize_bool: bool, serialize_i8: i8, serialize_i16: i16,
        serialize_i32: i32, serialize_i64: i64, serialize_u8: u8, serialize_u16: u16,
        serialize_u32: u32, serialize_u64: u64, serialize_f32: f32, serialize_f64: f64,
        serialize_char: char, serialize_str: &str);
    ignore!(serialize_bytes: &[u8]);
    fn serialize_none(self) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_some<T: Serialize + ?Sized>(self, v: &T) -> Result<(), Found> {
        v.serialize(self)
    }
    fn serialize_unit(self) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_unit_struct(self, _: &'static str) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_unit_variant(self, _: &'static str, _: u32, v: &'static str) -> Result<(), Found> {
        self.0.push_str(v);
        Ok(())
    }
    fn serialize_newtype_struct<T: Serialize + ?Sized>(
        self,
        _: &'static str,
        v: &T,
    ) -> Result<(), Found> {
        v.serialize(self)
    }
    fn serialize_newtype_variant<T: Serialize + ?Sized>(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        _: &T,
    ) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_seq(self, _: Option<usize>) -> Result<Self::SerializeSeq, Found> {
        Err(Found)
    }
    fn serialize_tuple(self, _: usize) -> Result<Self::SerializeTuple, Found> {
        Err(Found)
    }
    fn serialize_tuple_struct(
        self,
        _: &'static str,
        _: usize,
    ) -> Result<Self::SerializeTupleStruct, Found> {
        Err(Found)
    }
    fn serialize_tuple_variant(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        _: usize,
    ) -> Result<Self::SerializeTupleVariant, Found> {
        Err(Found)
    }
    fn serialize_map(self, _: Option<usize>) -> Result<Self::SerializeMap, Found> {
        Err(Found)
    }
    fn serialize_struct(self, _: &'static str, _: usize) -> Result<Self::SerializeStruct, Found> {
        Err(Found)
    }
    fn serialize_struct_variant(
        self,
        _: &'static str,
        _: u32,
        _: &'static str,
        _: usize,
    ) -> Result<Self::SerializeStructVariant, Found> {
        Err(Found)
    }
}

impl<'a> Serializer for &'a mut Walk {
    type Ok = ();
    type Error = Found;
    type SerializeSeq = Seq<'a>;
    type SerializeTuple = Seq<'a>;
    type SerializeTupleStruct = Seq<'a>;
    type SerializeTupleVariant = Seq<'a>;
    type SerializeMap = Map<'a>;
    type SerializeStruct = &'a mut Walk;
    type SerializeStructVariant = &'a mut Walk;
    ignore!(serialize_bool: bool, serialize_i8: i8, serialize_i16: i16,
        serialize_i32: i32, serialize_i64: i64, serialize_u8: u8, serialize_u16: u16,
        serialize_u32: u32, serialize_u64: u64, serialize_char: char,
        serialize_str: &str, serialize_bytes: &[u8]);
    fn serialize_f32(self, v: f32) -> Result<(), Found> {
        self.number(f64::from(v))
    }
    fn serialize_f64(self, v: f64) -> Result<(), Found> {
        self.number(v)
    }
    fn serialize_none(self) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_some<T: Serialize + ?Sized>(self, v: &T) -> Result<(), Found> {
        v.serialize(self)
    }
    fn serialize_unit(self) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_unit_struct(self, _: &'static str) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_unit_variant(self, _: &'static str, _: u32, _: &'static str) -> Result<(), Found> {
        Ok(())
    }
    fn serialize_newtype_struct<T: Serialize + ?Sized>(
        self,
        _: &'static str,
        v: &T,
    ) -> Result<(), Found> {
        v.serialize(self)
    }
    /// `{Variant: value}` in serde-wasm-bindgen's form.
    fn serialize_newtype_variant<T: Serialize + ?Sized>(
        self,
        _: &'static str,
        _: u32,
        variant: &'static str,
        v: &T,
    ) -> Result<(), Found> {
        self.field(variant, v)
    }
    fn serialize_seq(self, _: Option<usize>) -> Result<Seq<'a>, Found> {
        Ok(Seq {
            walk: self,
            next: 0,
        })
    }
    fn serialize_tuple(self, _: usize) -> Result<Seq<'a>, Found> {
        self.serialize_seq(None)
    }
    fn serialize_tuple_struct(self, _: &'static str, _: usize) -> Result<Seq<'a>, Found> {
        self.serialize_seq(None)
    }
    /// `{Variant: [values]}`: the variant's segment stays on the path until the end.
    fn serialize_tuple_variant(
        self,
        _: &'static str,
        _: u32,
        variant: &'static str,
        _: usize,
    ) -> Result<Seq<'a>, Found> {
        self.path.push('.');
        self.path.push_str(variant);
        self.serialize_seq(None)
    }
    fn serialize_map(self, _: Option<usize>) -> Result<Map<'a>, Found> {
        Ok(Map {
            walk: self,
            key: String::new(),
        })
    }
    fn serialize_struct(self, _: &'static str, _: usize) -> Result<&'a mut Walk, Found> {
        Ok(self)
    }
    fn serialize_struct_variant(
        self,
        _: &'static str,
        _: u32,
        variant: &'static str,
        _: usize,
    ) -> Result<&'a mut Walk, Found> {
        self.path.push('.');
        self.path.push_str(variant);
        Ok(self)
    }
}

impl ser::SerializeSeq for Seq<'_> {
    type Ok = ();
    type Error = Found;
    fn serialize_element<T: Serialize + ?Sized>(&mut self, v: &T) -> Result<(), Found> {
        let i = self.next;
        self.next += 1;
        self.walk.index(i, v)
    }
    fn end(self) -> Result<(), Found> {
        Ok(())
    }
}

impl ser::SerializeTuple for Seq<'_> {
    type Ok = ();
    type Error = Found;
    fn serialize_element<T: Serialize + ?Sized>(&mut self, v: &T) -> Result<(), Found> {
        ser::SerializeSeq::serialize_element(self, v)
    }
    fn end(self) -> Result<(), Found> {
        Ok(())
    }
}

impl ser::SerializeTupleStruct for Seq<'_> {
    type Ok = ();
    type Error = Found;
    fn serialize_field<T: Serialize + ?Sized>(&mut self, v: &T) -> Result<(), Found> {
        ser::SerializeSeq::serialize_element(self, v)
    }
    fn end(self) -> Result<(), Found> {
        Ok(())
    }
}

impl ser::SerializeTupleVariant for Seq<'_> {
    type Ok = ();
    type Error = Found;
    fn serialize_field<T: Serialize + ?Sized>(&mut self, v: &T) -> Result<(), Found> {
        ser::SerializeSeq::serialize_element(self, v)
    }
    /// Take the variant's segment off the path (see `serialize_tuple_variant`).
    fn end(self) -> Result<(), Found> {
        if let Some(dot) = self.walk.path.rfind('.') {
            self.walk.path.truncate(dot);
        }
        Ok(())
    }
}

impl ser::SerializeMap for Map<'_> {
    type Ok = ();
    type Error = Found;
    fn serialize_key<T: Serialize + ?Sized>(&mut self, key: &T) -> Result<(), Found> {
        self.key.clear();
        // A key of another kind keeps the text "" (it has no path of its own).
        let _ = key.serialize(KeyText(&mut self.key));
        Ok(())
    }
    fn serialize_value<T: Serialize + ?Sized>(&mut self, v: &T) -> Result<(), Found> {
        let key = core::mem::take(&mut self.key);
        let r = self.walk.field(&key, v);
        self.key = key;
        r
    }
    fn end(self) -> Result<(), Found> {
        Ok(())
    }
}

impl ser::SerializeStruct for &mut Walk {
    type Ok = ();
    type Error = Found;
    fn serialize_field<T: Serialize + ?Sized>(
        &mut self,
        key: &'static str,
        v: &T,
    ) -> Result<(), Found> {
        self.field(key, v)
    }
    fn end(self) -> Result<(), Found> {
        Ok(())
    }
}

impl ser::SerializeStructVariant for &mut Walk {
    type Ok = ();
    type Error = Found;
    fn serialize_field<T: Serialize + ?Sized>(
        &mut self,
        key: &'static str,
        v: &T,
    ) -> Result<(), Found> {
        self.field(key, v)
    }
    /// Take the variant's segment off the path (see `serialize_struct_variant`).
    fn end(self) -> Result<(), Found> {
        if let Some(dot) = self.path.rfind('.') {
            self.path.truncate(dot);
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use alloc::vec;
    use alloc::vec::Vec;

    #[derive(serde::Serialize)]
    #[serde(rename_all = "camelCase")]
    struct Pair {
        two_port: f64,
        exact: Vec<f64>,
        label: &'static str,
        note: Option<f64>,
    }

    /// The paths are those of facade/guard.js `findNonFinite` for the same JS object
    /// (`.twoPort`, `.exact[1]`, `[1].exact[0]`): written out by hand from that walk.
    #[test]
    fn the_first_non_finite_number_is_named_by_its_path() {
        let ok = Pair {
            two_port: 1.0,
            exact: vec![2.0, -3.5],
            label: "x",
            note: None,
        };
        assert_eq!(first_non_finite(&ok), None);
        let bad = Pair {
            two_port: f64::INFINITY,
            exact: vec![f64::NAN],
            label: "x",
            note: None,
        };
        assert_eq!(first_non_finite(&bad).as_deref(), Some(".twoPort"));
        let inner = Pair {
            two_port: 0.0,
            exact: vec![1.0, f64::NEG_INFINITY],
            label: "x",
            note: Some(f64::NAN),
        };
        assert_eq!(first_non_finite(&inner).as_deref(), Some(".exact[1]"));
        let list = vec![ok, inner];
        assert_eq!(first_non_finite(&list).as_deref(), Some("[1].exact[1]"));
        assert_eq!(first_non_finite(&f64::NAN).as_deref(), Some(""));
        let late = Pair {
            two_port: 0.0,
            exact: vec![],
            label: "x",
            note: Some(f64::INFINITY),
        };
        assert_eq!(first_non_finite(&late).as_deref(), Some(".note"));
    }

    /// Every number the two-port analysis returns is checked: a non-finite value put
    /// in any of its fields is found, at the path the JS walk gives it.
    #[test]
    fn every_number_of_the_two_port_result_is_walked() {
        use crate::circuit::templates::{AmplifierModel, FeedbackNetwork, StageSpec};
        use crate::feedback::Topology;
        let spec = StageSpec {
            topology: Topology::SeriesShunt,
            amplifier: AmplifierModel {
                ri: 1e5,
                ro: 1e3,
                gain: 1e4,
                ci: 0.0,
                co: 0.0,
            },
            network: FeedbackNetwork {
                rf: 1e6,
                rg: 1e3,
                cf: 0.0,
            },
            rs: 1e4,
            rl: 2e3,
        };
        let r = crate::circuit::twoport::analyze(&spec, 1e3).unwrap();
        assert_eq!(first_non_finite(&r), None);
        let mut bad = r;
        bad.rout.exact.im = f64::NAN;
        assert_eq!(first_non_finite(&bad).as_deref(), Some(".rout.exact.im"));
        let mut bad = r;
        bad.parameters.p21.re = f64::INFINITY;
        assert_eq!(
            first_non_finite(&bad).as_deref(),
            Some(".parameters.p21.re")
        );
        let mut bad = r;
        bad.ideal_af_error = f64::NAN;
        assert_eq!(first_non_finite(&bad).as_deref(), Some(".idealAfError"));
        assert_eq!(finite_numbers(&bad), Err(String::from(".idealAfError")));
        // Every number in the order of the fields (the order facade/loopwright.js
        // reads them back in, twoPortFromPacked): 49, frequency first.
        let n = finite_numbers(&r).unwrap();
        let cx = |z: num_complex::Complex64| [z.re, z.im];
        let both = |c: crate::circuit::twoport::Compared| {
            [
                c.two_port.re,
                c.two_port.im,
                c.exact.re,
                c.exact.im,
                c.relative_error,
            ]
        };
        let p = r.parameters;
        let mut want = alloc::vec![r.frequency_hz];
        for z in [
            p.p11,
            p.p12,
            p.p21,
            p.p22,
            r.a,
            r.beta,
            r.loop_gain,
            r.feedback_amount,
            r.ri,
            r.ro,
        ] {
            want.extend(cx(z));
        }
        for c in [r.af, r.rif, r.rof, r.rin, r.rout] {
            want.extend(both(c));
        }
        want.extend(cx(r.ideal_af));
        want.push(r.ideal_af_error);
        assert_eq!(want.len(), 49);
        assert_eq!(n, want);
    }
}
