//! Formulas read from a file, in the format's own syntax, turned into worksheet
//! formulas: references lose ODF's brackets and dots and any qualifier of the data
//! sheet itself; `,` (OOXML) becomes `;`; ODF's `TRUE()`/`FALSE()` become `TRUE`/`FALSE`;
//! OOXML's `_xlfn.` prefix of newer functions is dropped. The result is then parsed
//! by the worksheet's own parser ([`checked`]), so anything it cannot read is
//! reported with the cell, never guessed.

use super::super::parser::parse;
use alloc::format;
use alloc::string::String;

use super::formula_out::Dialect;

/// Translate `formula` (without `of:=` or `=`) from `dialect` to worksheet syntax
/// (without `=`), where `sheet` is the name of the table it was read from.
///
/// # Errors
/// A sentence naming what could not be translated (a reference to another sheet,
/// an array constant, an unclosed string or bracket).
pub(crate) fn translate(formula: &str, d: Dialect, sheet: &str) -> Result<String, String> {
    let mut out = String::with_capacity(formula.len());
    let chars: alloc::vec::Vec<char> = formula.chars().collect();
    let mut i = 0;
    while i < chars.len() {
        let c = chars[i];
        match c {
            '"' => i = string(&chars, i, &mut out)?,
            '[' if d == Dialect::Odf => i = odf_reference(&chars, i, sheet, &mut out)?,
            '{' => return Err(String::from("array constants {…} are not read")),
            ',' if d == Dialect::Ooxml => {
                out.push(';');
                i += 1;
            }
            '\'' if d == Dialect::Ooxml => i = ooxml_quoted_sheet(&chars, i, sheet)?,
            c if c.is_alphabetic() || c == '_' || c == '$' => {
                i = word(&chars, i, d, sheet, &mut out)?;
            }
            c => {
                out.push(c);
                i += 1;
            }
        }
    }
    Ok(out)
}

/// A string literal starting at `i`, copied as is (both syntaxes double `"`).
fn string(chars: &[char], mut i: usize, out: &mut String) -> Result<usize, String> {
    out.push('"');
    i += 1;
    loop {
        match chars.get(i) {
            None => return Err(String::from("a text in quotes is not closed")),
            Some('"') if chars.get(i + 1) == Some(&'"') => {
                out.push_str("\"\"");
                i += 2;
            }
            Some('"') => {
                out.push('"');
                return Ok(i + 1);
            }
            Some(&c) => {
                out.push(c);
                i += 1;
            }
        }
    }
}

/// Whether a sheet qualifier (without `$` and quotes) names the sheet being read.
fn same_sheet(qualifier: &str, sheet: &str) -> bool {
    let q = qualifier.trim_start_matches('$');
    let q = q
        .strip_prefix('\'')
        .and_then(|q| q.strip_suffix('\''))
        .map_or_else(|| String::from(q), |q| q.replace("''", "'"));
    q.is_empty() || q == sheet
}

/// `[.A1]`, `[.A1:.B3]`, `[$Design.$A$1]`: the reference without brackets and dots.
fn odf_reference(chars: &[char], i: usize, sheet: &str, out: &mut String) -> Result<usize, String> {
    let close = chars[i..]
        .iter()
        .position(|&c| c == ']')
        .ok_or_else(|| String::from("a reference in [brackets] is not closed"))?;
    let inner: String = chars[i + 1..i + close].iter().collect();
    for (k, part) in inner.split(':').enumerate() {
        let Some(dot) = part.rfind('.') else {
            return Err(format!("the reference [{inner}] has no cell part"));
        };
        if !same_sheet(&part[..dot], sheet) {
            return Err(format!(
                "the reference [{inner}] reads another sheet; the worksheet has one"
            ));
        }
        if k > 0 {
            out.push(':');
        }
        out.push_str(&part[dot + 1..]);
    }
    Ok(i + close + 1)
}

/// `'My sheet'!` before an OOXML reference: skipped when it names this sheet.
fn ooxml_quoted_sheet(chars: &[char], mut i: usize, sheet: &str) -> Result<usize, String> {
    let start = i;
    i += 1;
    loop {
        match chars.get(i) {
            None => return Err(String::from("a quoted sheet name is not closed")),
            Some('\'') if chars.get(i + 1) == Some(&'\'') => i += 2,
            Some('\'') => break,
            Some(_) => i += 1,
        }
    }
    let quoted: String = chars[start..=i].iter().collect();
    if chars.get(i + 1) != Some(&'!') || !same_sheet(&quoted, sheet) {
        return Err(format!(
            "the reference {quoted}… reads another sheet; the worksheet has one"
        ));
    }
    Ok(i + 2)
}

/// A name, function name, cell reference or `TRUE()`: copied, with the
/// adjustments of the module doc.
fn word(
    chars: &[char],
    mut i: usize,
    d: Dialect,
    sheet: &str,
    out: &mut String,
) -> Result<usize, String> {
    let start = i;
    while chars
        .get(i)
        .is_some_and(|c| c.is_alphanumeric() || matches!(c, '_' | '.' | '$'))
    {
        i += 1;
    }
    let mut w: String = chars[start..i].iter().collect();
    if d == Dialect::Ooxml && chars.get(i) == Some(&'!') {
        if !same_sheet(&w, sheet) {
            return Err(format!(
                "the reference {w}!… reads another sheet; the worksheet has one"
            ));
        }
        return Ok(i + 1);
    }
    if let Some(rest) = w.strip_prefix("_xlfn.") {
        w = String::from(rest);
    }
    let is_truth = w.eq_ignore_ascii_case("TRUE") || w.eq_ignore_ascii_case("FALSE");
    if is_truth && chars.get(i) == Some(&'(') && chars.get(i + 1) == Some(&')') {
        out.push_str(&w);
        return Ok(i + 2);
    }
    out.push_str(&w);
    Ok(i)
}

/// [`translate`], then parsed by the worksheet's parser: the input text `=…`.
///
/// # Errors
/// The sentence of [`translate`], or the parser's message with its column.
pub(crate) fn checked(formula: &str, d: Dialect, sheet: &str) -> Result<String, String> {
    let text = translate(formula, d, sheet)?;
    match parse(&text) {
        Ok(_) => Ok(format!("={text}")),
        Err(e) => Err(format!(
            "the formula \"{formula}\" does not read: {} (column {})",
            e.message,
            e.pos + 1
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn both_syntaxes_come_back_to_the_worksheet_s() {
        // The inverse of formula_out's examples (ODF 1.2 part 2 §5.8, ECMA-376
        // §18.17, from memory).
        let odf = translate("SUM([.A1:.B3];[$Design.$C$4])*2", Dialect::Odf, "Design");
        assert_eq!(odf.unwrap(), "SUM(A1:B3;$C$4)*2");
        let x = translate("IF(TRUE(),1,\"a,b\")", Dialect::Ooxml, "Design");
        assert_eq!(x.unwrap(), "IF(TRUE;1;\"a,b\")");
        assert_eq!(
            translate("IF(TRUE();1;2)", Dialect::Odf, "Design").unwrap(),
            "IF(TRUE;1;2)"
        );
        assert_eq!(
            translate(
                "'Design'!A1+Design!B2+_xlfn.ABS(-1)",
                Dialect::Ooxml,
                "Design"
            )
            .unwrap(),
            "A1+B2+ABS(-1)"
        );
    }

    #[test]
    fn other_sheets_and_broken_formulas_are_reported() {
        assert!(translate("[$Other.A1]", Dialect::Odf, "Design")
            .unwrap_err()
            .contains("another sheet"));
        assert!(translate("Other!A1", Dialect::Ooxml, "Design")
            .unwrap_err()
            .contains("another sheet"));
        assert!(translate("\"abc", Dialect::Odf, "D")
            .unwrap_err()
            .contains("not closed"));
        assert!(checked("1+*", Dialect::Ooxml, "D")
            .unwrap_err()
            .contains("column"));
    }
}
