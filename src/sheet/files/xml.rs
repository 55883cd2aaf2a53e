//! The few things both readers need from `quick-xml`: attributes as text, text
//! content with the predefined and character references resolved, and errors
//! that name the part.

use super::model::{FileError, FileErrorKind};
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;
use quick_xml::events::{BytesRef, BytesStart};
use quick_xml::XmlVersion;

/// A part that is not well-formed XML.
pub(crate) fn malformed(part: &str, e: impl core::fmt::Display) -> FileError {
    FileError::new(
        FileErrorKind::Malformed,
        format!("the part {part} is not well-formed XML: {e}"),
    )
}

/// The attributes of `e` as (qualified name, value).
pub(crate) fn attributes(
    e: &BytesStart<'_>,
    part: &str,
) -> Result<Vec<(String, String)>, FileError> {
    let mut out = Vec::new();
    for a in e.attributes() {
        let a = a.map_err(|err| malformed(part, err))?;
        let key = String::from(a.key.as_ref());
        let value = a
            .normalized_value(XmlVersion::Implicit1_0)
            .map_err(|err| malformed(part, err))?;
        out.push((key, value.into_owned()));
    }
    Ok(out)
}

/// The value of attribute `key` in `attrs`.
pub(crate) fn attr<'a>(attrs: &'a [(String, String)], key: &str) -> Option<&'a str> {
    attrs
        .iter()
        .find(|(k, _)| k == key)
        .map(|(_, v)| v.as_str())
}

/// The text a reference such as `&amp;` or `&#10;` stands for.
pub(crate) fn reference(r: &BytesRef<'_>, part: &str) -> Result<String, FileError> {
    if let Some(c) = r.resolve_char_ref().map_err(|e| malformed(part, e))? {
        return Ok(String::from(c));
    }
    let name = r.xml10_content();
    let c = match name.as_ref() {
        "amp" => "&",
        "lt" => "<",
        "gt" => ">",
        "quot" => "\"",
        "apos" => "'",
        other => return Err(malformed(part, format!("unknown entity &{other};"))),
    };
    Ok(String::from(c))
}

/// The qualified name of an element as text.
pub(crate) fn name(e: &BytesStart<'_>) -> String {
    String::from(e.name().as_ref())
}
