//! The function catalog: one table entry per worksheet function.
//!
//! Every entry ([`FunctionSpec`]) carries the function's name, a one-line
//! summary, its parameters (name, unit, default, valid range), what it returns
//! and in which unit, how a several-valued result spills, a worked example with
//! its stated value, and the Rust function that evaluates it. The page's help,
//! the JS docs and the catalog JSON ([`catalog_json`]) are generated from these
//! entries; a test evaluates every example, and `tests/reference/sheet_catalog.py`
//! recomputes every numeric one with mpmath so the stated values have a source.
//!
//! Names: plain words in upper case; functions of an area carry the area's
//! prefix and a dot (`FEEDBACK.GAIN`, `DB.VOLTAGE`); the common spreadsheet functions
//! (`SUM`, `IF`, …) keep their usual names.
//!
//! To add a function: write its evaluation function beside its area's others and
//! add one [`FunctionSpec`] to that area's `FUNCTIONS` table. To add an area: a
//! new file with a `FUNCTIONS` table and one line in [`AREAS`].

pub mod circuit;
pub mod decibel;
pub mod distortion;
pub mod feedback;
pub mod freq;
pub mod logic;
pub mod math;
pub mod network;
pub mod noise;
pub mod stage;
pub mod tolerance;
mod words;

use super::errors::{CellError, ErrorKind};
use super::value::{Unit, Value};
use crate::json::JsonWriter;
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

/// One parameter of a function.
#[derive(Debug)]
pub struct Param {
    /// Name as the docs and error messages spell it.
    pub name: &'static str,
    /// What it is, in a few words.
    pub summary: &'static str,
    /// Its unit: a unit word (`Ω`, `V`, `A`, `S`, `Hz`, `F`, `H`, `dB`) is checked
    /// against the unit an argument is written with; anything else (`V/V`, `1`,
    /// `text`) is documentation only.
    pub unit: &'static str,
    /// Whether the argument may be left out.
    pub optional: bool,
    /// Value used when it is left out, for numeric parameters.
    pub default: Option<f64>,
    /// The valid range, in words (`> 0`, `0 < x < 1`, `any`).
    pub range: &'static str,
}

/// The value a worked example states.
#[derive(Debug)]
pub enum Expected {
    /// Numbers, row by row (one for a single-valued function).
    Numbers(&'static [f64]),
    /// A truth value.
    Bool(bool),
    /// Text.
    Text(&'static str),
}

/// A worked example.
#[derive(Debug)]
pub struct Example {
    /// The formula, with its `=`.
    pub formula: &'static str,
    /// What it evaluates to.
    pub expected: Expected,
    /// Where the stated value comes from (the arithmetic, or a source).
    pub source: &'static str,
    /// Relative tolerance of the evaluated value against the stated one: empty
    /// when they agree to rounding; one number for every item, or one per item,
    /// when the core finds the value by a search, an integration or sampling
    /// (the source says which). Stated values are the exact ones.
    pub tolerance: &'static [f64],
}

/// A catalog entry.
pub struct FunctionSpec {
    /// Upper-case name.
    pub name: &'static str,
    /// Area (`math`, `logic`, `decibel`, `feedback`, …).
    pub area: &'static str,
    /// One-line summary.
    pub summary: &'static str,
    /// Parameters in order.
    pub params: &'static [Param],
    /// Whether the last parameter repeats (`SUM(a; b; c; …)`).
    pub repeats: bool,
    /// Result unit (`V/V`, `dB`, `Ω`, `1`, `text`, …).
    pub result_unit: &'static str,
    /// For several-valued results: what each spilled cell holds, left to right;
    /// empty for a single value.
    pub spill: &'static [&'static str],
    /// The worked example.
    pub example: Example,
    /// The evaluation.
    pub eval: fn(&Args<'_>) -> Value,
}

impl core::fmt::Debug for FunctionSpec {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        write!(f, "FunctionSpec({})", self.name)
    }
}

impl PartialEq for FunctionSpec {
    fn eq(&self, other: &Self) -> bool {
        self.name == other.name
    }
}

impl FunctionSpec {
    /// Number of arguments that must be given.
    pub fn required(&self) -> usize {
        self.params.iter().filter(|p| !p.optional).count()
    }

    /// Most arguments accepted (`usize::MAX` when the last parameter repeats).
    pub fn max_args(&self) -> usize {
        if self.repeats {
            usize::MAX
        } else {
            self.params.len()
        }
    }

    /// The parameter that argument `i` fills.
    pub fn param(&self, i: usize) -> Option<&'static Param> {
        self.params.get(i).or(if self.repeats {
            self.params.last()
        } else {
            None
        })
    }
}

/// Every area's table. Add one line per new area.
pub static AREAS: &[&[FunctionSpec]] = &[
    math::FUNCTIONS,
    logic::FUNCTIONS,
    decibel::FUNCTIONS,
    feedback::FUNCTIONS,
    freq::FUNCTIONS,
    network::FUNCTIONS,
    circuit::FUNCTIONS,
    distortion::FUNCTIONS,
    noise::FUNCTIONS,
    stage::FUNCTIONS,
    tolerance::FUNCTIONS,
];

/// Every function, area by area.
pub fn all() -> impl Iterator<Item = &'static FunctionSpec> {
    AREAS.iter().flat_map(|a| a.iter())
}

/// The function called `name` (any case), also under the prefix its area had before
/// the areas were given one name each ([`OLD_PREFIXES`]).
pub fn lookup(name: &str) -> Option<&'static FunctionSpec> {
    AREAS
        .iter()
        .find_map(|area| lookup_in(area, name))
        .or_else(|| lookup_old_spelling(name))
}

/// Prefixes the area functions carried in worksheets written before package version
/// 0.2, with the area names that replaced them. A formula written with an old prefix
/// still evaluates (the cell keeps the text as typed); the catalog, the help and the
/// docs list the new names only.
pub const OLD_PREFIXES: &[(&str, &str)] = &[
    ("FB.", "FEEDBACK."),
    ("LOOP.", "FREQ."),
    ("RES.", "NETWORK."),
    ("CKT.", "CIRCUIT."),
    ("DIST.", "DISTORTION."),
];

/// The function `name` names under an old prefix, if any.
fn lookup_old_spelling(name: &str) -> Option<&'static FunctionSpec> {
    let (old, new) = OLD_PREFIXES.iter().find(|(old, _)| {
        name.len() > old.len()
            && name.is_char_boundary(old.len())
            && name[..old.len()].eq_ignore_ascii_case(old)
    })?;
    let rest = &name[old.len()..];
    all().find(|f| {
        f.name.len() == new.len() + rest.len()
            && f.name.starts_with(new)
            && f.name[new.len()..].eq_ignore_ascii_case(rest)
    })
}

/// [`lookup`] within one area's table. Kept out of line: inlined, the search was
/// unrolled over every area into 15 KB of wasm (it runs when a formula is parsed,
/// not when it is evaluated).
#[inline(never)]
fn lookup_in(area: &'static [FunctionSpec], name: &str) -> Option<&'static FunctionSpec> {
    area.iter().find(|f| f.name.eq_ignore_ascii_case(name))
}

/// The evaluated arguments of one call.
pub struct Args<'a> {
    /// The function being called.
    pub spec: &'static FunctionSpec,
    /// Argument values; ranges arrive as [`Value::Array`].
    pub values: &'a [Value],
}

impl Args<'_> {
    fn param_name(&self, i: usize) -> &'static str {
        self.spec.param(i).map_or("argument", |p| p.name)
    }

    fn fail(&self, kind: ErrorKind, i: usize, what: &str) -> CellError {
        CellError::new(
            kind,
            format!("{}: {}: {}", self.spec.name, self.param_name(i), what),
        )
    }

    /// Argument `i`, or [`Value::Empty`] when absent.
    pub fn get(&self, i: usize) -> &Value {
        self.values.get(i).unwrap_or(&Value::Empty)
    }

    /// Number of arguments given.
    pub fn len(&self) -> usize {
        self.values.len()
    }

    /// Whether no argument was given.
    pub fn is_empty(&self) -> bool {
        self.values.is_empty()
    }

    /// Argument `i` as a number: an empty cell is 0, TRUE is 1; text or a range
    /// is `#VALUE!`; an error value passes through.
    ///
    /// # Errors
    /// The error value to put in the cell.
    pub fn number(&self, i: usize) -> Result<f64, CellError> {
        match self.get(i) {
            Value::Number(x, _) => Ok(*x),
            Value::Bool(b) => Ok(f64::from(u8::from(*b))),
            Value::Empty => Ok(0.0),
            Value::Error(e) => Err(e.clone()),
            Value::Text(_) => {
                Err(self.fail(ErrorKind::Value, i, "text where a number is expected"))
            }
            Value::Array(_) => Err(self.fail(
                ErrorKind::Value,
                i,
                "a range where a single number is expected",
            )),
        }
    }

    /// Argument `i` as text (numbers in shortest form).
    ///
    /// # Errors
    /// The error value to put in the cell.
    pub fn text(&self, i: usize) -> Result<String, CellError> {
        match self.get(i) {
            Value::Error(e) => Err(e.clone()),
            Value::Array(_) => Err(self.fail(
                ErrorKind::Value,
                i,
                "a range where a single value is expected",
            )),
            v => Ok(v.display()),
        }
    }

    /// Argument `i` as a truth value: numbers are TRUE when not zero; the texts
    /// TRUE and FALSE (any case) are accepted.
    ///
    /// # Errors
    /// The error value to put in the cell.
    pub fn boolean(&self, i: usize) -> Result<bool, CellError> {
        match self.get(i) {
            Value::Bool(b) => Ok(*b),
            Value::Number(x, _) => Ok(*x != 0.0),
            Value::Empty => Ok(false),
            Value::Error(e) => Err(e.clone()),
            Value::Text(t) if t.eq_ignore_ascii_case("TRUE") => Ok(true),
            Value::Text(t) if t.eq_ignore_ascii_case("FALSE") => Ok(false),
            Value::Text(_) => {
                Err(self.fail(ErrorKind::Value, i, "text where TRUE or FALSE is expected"))
            }
            Value::Array(_) => Err(self.fail(
                ErrorKind::Value,
                i,
                "a range where a single value is expected",
            )),
        }
    }

    /// Every number in the arguments, for SUM-like functions: numbers and truth
    /// values given directly count; inside ranges only numbers count (text, truth
    /// values and empty cells are skipped); direct text is `#VALUE!`; the first
    /// error value met is returned.
    ///
    /// # Errors
    /// The error value to put in the cell.
    pub fn numbers(&self) -> Result<Vec<f64>, CellError> {
        let mut out = Vec::new();
        for (i, v) in self.values.iter().enumerate() {
            match v {
                Value::Array(a) => {
                    out.reserve(a.items().len());
                    for item in a.items() {
                        match item {
                            Value::Number(x, _) => out.push(*x),
                            Value::Error(e) => return Err(e.clone()),
                            _ => {}
                        }
                    }
                }
                Value::Empty => {}
                _ => out.push(self.number(i)?),
            }
        }
        Ok(out)
    }

    /// Every truth value in the arguments, for AND/OR: as [`Args::numbers`] but
    /// numbers count as TRUE when not zero and truth values inside ranges count.
    ///
    /// # Errors
    /// The error value to put in the cell.
    pub fn booleans(&self) -> Result<Vec<bool>, CellError> {
        let mut out = Vec::new();
        for (i, v) in self.values.iter().enumerate() {
            match v {
                Value::Array(a) => {
                    out.reserve(a.items().len());
                    for item in a.items() {
                        match item {
                            Value::Number(x, _) => out.push(*x != 0.0),
                            Value::Bool(b) => out.push(*b),
                            Value::Error(e) => return Err(e.clone()),
                            _ => {}
                        }
                    }
                }
                Value::Empty => {}
                _ => out.push(self.boolean(i)?),
            }
        }
        Ok(out)
    }

    /// A core result as a cell value.
    pub fn core(&self, r: crate::Result<f64>) -> Value {
        match r {
            Ok(x) => Value::num(x),
            Err(e) => Value::Error(CellError::from_core(self.spec.name, e)),
        }
    }
}

/// A core error as an error value, with the core's parameter name replaced by the
/// worksheet parameter's where they differ (`names` pairs core name → sheet name;
/// `a.poles_hz` → `poles`, say), so the explanation names what the user typed.
pub(crate) fn core_error(function: &str, e: crate::Error, names: &[(&str, &str)]) -> CellError {
    let mut c = CellError::from_core(function, e);
    if let Some((core, sheet)) = names.iter().find(|(core, _)| *core == e.param()) {
        let prefix = format!("{function}: {core}: ");
        if let Some(rest) = c.detail.strip_prefix(prefix.as_str()) {
            c.detail = format!("{function}: {sheet}: {rest}");
        }
    }
    c
}

/// Check an argument written with a unit against the parameter's declared unit.
pub(crate) fn unit_mismatch(spec: &FunctionSpec, i: usize, v: &Value) -> Option<CellError> {
    let Value::Number(_, Some(given)) = v else {
        return None;
    };
    let p = spec.param(i)?;
    let declared = Unit::from_word(p.unit)?;
    (declared != *given).then(|| {
        CellError::new(
            ErrorKind::Value,
            format!(
                "{}: {}: given in {} but the parameter is in {}",
                spec.name,
                p.name,
                given.symbol(),
                declared.symbol()
            ),
        )
    })
}

/// Shorthand for a required numeric parameter.
pub(crate) const fn req(
    name: &'static str,
    summary: &'static str,
    unit: &'static str,
    range: &'static str,
) -> Param {
    Param {
        name,
        summary,
        unit,
        optional: false,
        default: None,
        range,
    }
}

/// Unwrap a helper's result into the cell value.
macro_rules! tri {
    ($e:expr) => {
        match $e {
            Ok(v) => v,
            Err(e) => return $crate::sheet::value::Value::Error(e),
        }
    };
}
pub(crate) use tri;

/// What a function gives, in words: the result unit, and for several values what
/// each spilled cell holds (`"Ω"`, `"row of 2: closed-loop gain A/D; beta (D − 1)/A"`).
pub fn result_text(f: &FunctionSpec) -> String {
    if f.spill.is_empty() {
        return String::from(f.result_unit);
    }
    let mut s = format!("row of {}: ", f.spill.len());
    for (i, item) in f.spill.iter().enumerate() {
        if i > 0 {
            s.push_str("; ");
        }
        s.push_str(item);
    }
    s.push_str(" (");
    s.push_str(f.result_unit);
    s.push(')');
    s
}

/// The whole catalog as JSON: `{"format": "loopwright-functions", "version": 1,
/// "functions": [{name, area, summary, params: [{name, summary, unit, optional,
/// default, range}], repeats, result, resultUnit, spill, words, examples: [{formula,
/// expected, source, tolerance}]}]}`.
pub fn catalog_json() -> String {
    let mut w = JsonWriter::new();
    w.begin_object();
    w.key("format");
    w.string("loopwright-functions");
    w.key("version");
    w.number(1.0);
    w.key("functions");
    w.begin_array();
    for f in all() {
        write_function(&mut w, f);
    }
    w.end_array();
    w.end_object();
    w.finish()
}

/// One function's entry of [`catalog_json`]. Kept out of line: inlined, it was
/// unrolled over every area's table.
#[inline(never)]
fn write_function(w: &mut JsonWriter, f: &FunctionSpec) {
    w.begin_object();
    w.key("name");
    w.string(f.name);
    w.key("area");
    w.string(f.area);
    w.key("summary");
    w.string(f.summary);
    w.key("params");
    w.begin_array();
    for p in f.params {
        w.begin_object();
        w.key("name");
        w.string(p.name);
        w.key("summary");
        w.string(p.summary);
        w.key("unit");
        w.string(p.unit);
        w.key("optional");
        w.boolean(p.optional);
        w.key("default");
        match p.default {
            Some(d) => w.number(d),
            None => w.null(),
        }
        w.key("range");
        w.string(p.range);
        w.end_object();
    }
    w.end_array();
    w.key("repeats");
    w.boolean(f.repeats);
    w.key("result");
    w.string(&result_text(f));
    w.key("resultUnit");
    w.string(f.result_unit);
    w.key("spill");
    w.begin_array();
    for s in f.spill {
        w.string(s);
    }
    w.end_array();
    w.key("words");
    w.string(words::search_words(f.name));
    w.key("examples");
    w.begin_array();
    w.begin_object();
    w.key("formula");
    w.string(f.example.formula);
    w.key("expected");
    match f.example.expected {
        Expected::Numbers(xs) => {
            w.begin_array();
            for x in xs {
                w.number(*x);
            }
            w.end_array();
        }
        Expected::Bool(b) => w.boolean(b),
        Expected::Text(t) => w.string(t),
    }
    w.key("source");
    w.string(f.example.source);
    w.key("tolerance");
    w.begin_array();
    for t in f.example.tolerance {
        w.number(*t);
    }
    w.end_array();
    w.end_object();
    w.end_array();
    w.end_object();
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_are_unique_upper_case_and_well_formed() {
        let mut names: Vec<&str> = all().map(|f| f.name).collect();
        for n in &names {
            assert!(
                n.chars()
                    .all(|c| c.is_ascii_uppercase() || c.is_ascii_digit() || c == '.'),
                "{n}"
            );
            assert!(
                super::super::address::CellRef::parse(n).is_none() || *n == "LOG10",
                "{n}"
            );
        }
        let count = names.len();
        names.sort_unstable();
        names.dedup();
        assert_eq!(names.len(), count);
    }

    #[test]
    fn core_errors_take_the_worksheet_parameter_name() {
        let names = [("a.poles_hz", "poles")];
        let e = crate::Error::OutOfDomain {
            param: "a.poles_hz",
            requirement: "must be greater than zero",
        };
        assert_eq!(
            core_error("FREQ.PM", e, &names).detail,
            "FREQ.PM: poles: must be greater than zero"
        );
        // A parameter not in the table keeps the core's name, and the kind follows from_core.
        let e = crate::Error::UnknownName {
            param: "series",
            expected: "E3",
        };
        let c = core_error("NETWORK.UP", e, &names);
        assert_eq!(
            (c.kind, c.detail.as_str()),
            (
                ErrorKind::Value,
                "NETWORK.UP: series: unknown name; expected one of E3"
            )
        );
    }

    #[test]
    fn entries_are_complete() {
        for f in all() {
            assert!(
                !f.summary.is_empty() && !f.result_unit.is_empty() && !f.example.source.is_empty(),
                "{}",
                f.name
            );
            assert!(f.example.formula.starts_with('='), "{}", f.name);
            let after_first_optional = f
                .params
                .iter()
                .skip_while(|p| !p.optional)
                .all(|p| p.optional);
            assert!(
                after_first_optional,
                "{}: optional parameters come last",
                f.name
            );
            for p in f.params {
                assert!(
                    !p.name.is_empty() && !p.unit.is_empty() && !p.range.is_empty(),
                    "{}",
                    f.name
                );
            }
        }
        assert!(lookup("feedback.gain").is_some());
        assert!(lookup("nosuch").is_none());
    }

    #[test]
    fn old_prefixes_still_find_their_function() {
        assert_eq!(lookup("fb.gain").map(|f| f.name), Some("FEEDBACK.GAIN"));
        assert_eq!(lookup("LOOP.PM").map(|f| f.name), Some("FREQ.PM"));
        assert_eq!(
            lookup("Res.Nearest").map(|f| f.name),
            Some("NETWORK.NEAREST")
        );
        assert_eq!(lookup("CKT.GAIN").map(|f| f.name), Some("CIRCUIT.GAIN"));
        assert_eq!(lookup("DIST.HD").map(|f| f.name), Some("DISTORTION.HD"));
        assert!(lookup("FB.").is_none());
        assert!(lookup("FB.NOSUCH").is_none());
    }
}
