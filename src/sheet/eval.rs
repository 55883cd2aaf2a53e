//! Evaluation of a syntax tree to a value.
//!
//! Rules (OpenFormula, ODF 1.2 part 2, from memory; sections named beside each):
//! - §6.3 standard operators: `+ - * /` and `^` convert their operands to
//!   numbers — an empty cell is 0, TRUE is 1 — and text gives `#VALUE!` (this
//!   engine never reads numbers out of text); `/` by zero gives `#DIV/0!`;
//!   a result outside the f64 range gives `#NUM!`.
//! - §6.3 `&` converts to text (numbers in shortest round-trip form).
//! - §6.3 comparisons: numbers by value, text without regard to case, and
//!   across types number < text < truth value.
//! - §5.12 errors propagate: an operator or function meeting an error value
//!   returns it (the left one when both operands are errors); IF evaluates only
//!   the branch it takes.
//! - Units: `+`, `-` and comparisons refuse operands written in different units
//!   (`1V + 1Ω` is `#VALUE!`); a unit survives `+ -`, prefix signs, and `*` or
//!   `/` by a plain number.
//! - Operators apply item by item to ranges and arrays (a single value is used
//!   against every item); the result spills.
//!
//! Recursion follows the tree, whose depth the parser bounds.

use super::address::{CellRef, Range};
use super::errors::{CellError, ErrorKind};
use super::functions::{unit_mismatch, Args, FunctionSpec};
use super::parser::{BinOp, Expr};
use super::value::{format_number, Array, Unit, Value};
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;
use core::cmp::Ordering;

/// Most cells one formula may read through ranges (all its ranges together),
/// which also bounds the size of any array it builds.
pub const MAX_RANGE_CELLS: u64 = 100_000;
/// Longest text a formula may build, in bytes.
pub const MAX_TEXT_BYTES: usize = 32_768;
/// Most text bytes one formula may build in all (an array of joined texts).
pub const MAX_TOTAL_TEXT_BYTES: usize = 1 << 20;

/// The sheet plus what this evaluation has used of its budgets.
struct Eval<'a> {
    ctx: &'a dyn Context,
    cells_read: core::cell::Cell<u64>,
    text_bytes: core::cell::Cell<usize>,
}

/// Functions whose result depends only on the non-empty items of a range
/// argument, in row-then-column order (they read ranges through
/// [`super::functions::Args::numbers`] or [`super::functions::Args::booleans`],
/// which skip empty cells). Their range arguments are read sparsely
/// ([`Context::occupied`]), and a call with one range argument is cached per
/// recalculation ([`Context::cached`]).
pub const SKIPS_EMPTY: &[&str] = &["SUM", "MIN", "MAX", "AVERAGE", "AND", "OR"];

/// What evaluation needs from the sheet.
pub trait Context {
    /// The single value shown in cell `c` (an empty cell is [`Value::Empty`]).
    fn cell(&self, c: CellRef) -> Value;
    /// The cell a name (upper case) refers to.
    fn name(&self, upper: &str) -> Option<CellRef>;
    /// Count `cells` of work against the recalculation's budget.
    fn charge(&self, _cells: u64) {}
    /// Push the values of `r` that are not empty onto `out`, in row-then-column
    /// order. The default reads every cell; a sheet reads only the cells it holds.
    fn occupied(&self, r: Range, out: &mut Vec<Value>) {
        self.charge(r.area());
        out.extend(
            r.cells()
                .map(|c| self.cell(c))
                .filter(|v| *v != Value::Empty),
        );
    }
    /// The result of `function` called on the range `r` alone, if this
    /// recalculation computed it already and nothing in `r` changed since.
    fn cached(&self, _function: &'static str, _r: Range) -> Option<Value> {
        None
    }
    /// Keep the result of `function` called on the range `r` alone.
    fn remember(&self, _function: &'static str, _r: Range, _v: &Value) {}
}

/// Evaluate a formula's tree: the value the cell holds. An empty result (a
/// reference to an empty cell) is 0.
pub fn evaluate(e: &Expr, ctx: &dyn Context) -> Value {
    let ev = Eval {
        ctx,
        cells_read: core::cell::Cell::new(0),
        text_bytes: core::cell::Cell::new(0),
    };
    match eval(e, &ev) {
        Value::Empty => Value::Number(0.0, None),
        Value::Array(a) if a.rows() == 1 && a.cols() == 1 => a.get(0, 0),
        v => v,
    }
}

fn eval(e: &Expr, ev: &Eval<'_>) -> Value {
    let ctx = ev.ctx;
    match e {
        Expr::Number(x, u) => Value::Number(*x, *u),
        Expr::Text(s) => Value::Text(s.clone()),
        Expr::Bool(b) => Value::Bool(*b),
        Expr::Error(k) => Value::Error(CellError::new(*k, "")),
        Expr::Cell(c) => ctx.cell(*c),
        Expr::Range(r) => range(*r, ev),
        Expr::Name(n) => match ctx.name(n) {
            Some(c) => ctx.cell(c),
            None => Value::error(ErrorKind::Name, format!("no cell is named {n}")),
        },
        Expr::Missing => Value::Empty,
        Expr::Plus(x) => eval(x, ev),
        Expr::Neg(x) => lift1(eval(x, ev), |x, u| Ok(Value::Number(-x, u))),
        Expr::Percent(x) => lift1(eval(x, ev), |x, _| Ok(Value::num(x / 100.0))),
        Expr::Binary(op, a, b) => {
            let (a, b) = (eval(a, ev), eval(b, ev));
            lift2(a, b, |a, b| binary(*op, a, b, ev))
        }
        Expr::Call(spec, args) => call(spec, args, ev),
        Expr::UnknownCall(name, _) => {
            Value::error(ErrorKind::Name, format!("no function is named {name}"))
        }
    }
}

/// Count `r` against the formula's range limit: the error value when the range,
/// or all the formula's ranges together, exceed [`MAX_RANGE_CELLS`].
fn count_range(r: Range, ev: &Eval<'_>) -> Option<Value> {
    if r.area() > MAX_RANGE_CELLS {
        return Some(Value::error(
            ErrorKind::Ref,
            format!("the range {r} has more than {MAX_RANGE_CELLS} cells"),
        ));
    }
    let used = ev.cells_read.get() + r.area();
    if used > MAX_RANGE_CELLS {
        return Some(Value::error(
            ErrorKind::Ref,
            format!("the formula reads more than {MAX_RANGE_CELLS} cells through ranges"),
        ));
    }
    ev.cells_read.set(used);
    None
}

fn range(r: Range, ev: &Eval<'_>) -> Value {
    if let Some(e) = count_range(r, ev) {
        return e;
    }
    ev.ctx.charge(r.area());
    let items: Vec<Value> = r.cells().map(|c| ev.ctx.cell(c)).collect();
    Array::new(r.rows(), r.cols(), items)
        .map_or_else(|| Value::error(ErrorKind::Ref, "empty range"), Value::Array)
}

/// A range argument of a [`SKIPS_EMPTY`] function: its non-empty values as one
/// row (or [`Value::Empty`] when there are none), which such a function reads
/// exactly as it reads the whole range.
fn occupied_range(r: Range, ev: &Eval<'_>) -> Value {
    if let Some(e) = count_range(r, ev) {
        return e;
    }
    let mut items = Vec::new();
    ev.ctx.occupied(r, &mut items);
    Array::row(items).map_or(Value::Empty, Value::Array)
}

/// A [`SKIPS_EMPTY`] function called on one range: cached per recalculation, so
/// many formulas over the same large range read it once.
fn aggregate(spec: &'static FunctionSpec, r: Range, ev: &Eval<'_>) -> Value {
    if let Some(e) = count_range(r, ev) {
        return e;
    }
    if let Some(v) = ev.ctx.cached(spec.name, r) {
        ev.ctx.charge(1);
        return v;
    }
    let mut items = Vec::new();
    ev.ctx.occupied(r, &mut items);
    let arg = [Array::row(items).map_or(Value::Empty, Value::Array)];
    let v = (spec.eval)(&Args { spec, values: &arg });
    ev.ctx.remember(spec.name, r, &v);
    v
}

fn number(v: &Value) -> Result<(f64, Option<Unit>), CellError> {
    match v {
        Value::Number(x, u) => Ok((*x, *u)),
        Value::Bool(b) => Ok((f64::from(u8::from(*b)), None)),
        Value::Empty => Ok((0.0, None)),
        Value::Error(e) => Err(e.clone()),
        Value::Text(t) => Err(CellError::new(
            ErrorKind::Value,
            format!(
                "text \"{}\" in arithmetic",
                t.chars().take(40).collect::<String>()
            ),
        )),
        Value::Array(_) => Err(CellError::new(
            ErrorKind::Value,
            "an array where a single value is expected",
        )),
    }
}

fn lift1(v: Value, f: impl Fn(f64, Option<Unit>) -> Result<Value, CellError>) -> Value {
    let g = |v: &Value| match number(v).and_then(|(x, u)| f(x, u)) {
        Ok(r) => r,
        Err(e) => Value::Error(e),
    };
    match v {
        Value::Array(a) => {
            let items = a.items().iter().map(g).collect();
            Array::new(a.rows(), a.cols(), items).map_or(Value::Empty, Value::Array)
        }
        v => g(&v),
    }
}

fn lift2(a: Value, b: Value, f: impl Fn(&Value, &Value) -> Value) -> Value {
    match (&a, &b) {
        (Value::Array(x), Value::Array(y)) => {
            if (x.rows(), x.cols()) != (y.rows(), y.cols()) {
                return Value::error(ErrorKind::Value, "the two arrays differ in size");
            }
            let items = x
                .items()
                .iter()
                .zip(y.items())
                .map(|(p, q)| f(p, q))
                .collect();
            Array::new(x.rows(), x.cols(), items).map_or(Value::Empty, Value::Array)
        }
        (Value::Array(x), s) => {
            let items = x.items().iter().map(|p| f(p, s)).collect();
            Array::new(x.rows(), x.cols(), items).map_or(Value::Empty, Value::Array)
        }
        (s, Value::Array(y)) => {
            let items = y.items().iter().map(|q| f(s, q)).collect();
            Array::new(y.rows(), y.cols(), items).map_or(Value::Empty, Value::Array)
        }
        _ => f(&a, &b),
    }
}

fn same_units(op: &str, a: Option<Unit>, b: Option<Unit>) -> Result<Option<Unit>, CellError> {
    match (a, b) {
        (Some(x), Some(y)) if x != y => Err(CellError::new(
            ErrorKind::Value,
            format!(
                "{op} of a value in {} and a value in {}",
                x.symbol(),
                y.symbol()
            ),
        )),
        _ => Ok(a.or(b)),
    }
}

fn text_of(v: &Value) -> Result<String, CellError> {
    match v {
        Value::Number(x, _) => Ok(format_number(*x)),
        Value::Error(e) => Err(e.clone()),
        Value::Array(_) => Err(CellError::new(
            ErrorKind::Value,
            "an array where a single value is expected",
        )),
        v => Ok(v.display()),
    }
}

fn type_rank(v: &Value) -> u8 {
    match v {
        Value::Text(_) => 1,
        Value::Bool(_) => 2,
        _ => 0,
    }
}

fn compare(a: &Value, b: &Value) -> Result<Ordering, CellError> {
    if let Value::Error(e) = a {
        return Err(e.clone());
    }
    if let Value::Error(e) = b {
        return Err(e.clone());
    }
    // An empty cell takes the other side's type: 0, "" or FALSE.
    let fill = |v: &Value, other: &Value| match (v, other) {
        (Value::Empty, Value::Text(_)) => Value::Text(String::new()),
        (Value::Empty, Value::Bool(_)) => Value::Bool(false),
        (Value::Empty, _) => Value::Number(0.0, None),
        (v, _) => v.clone(),
    };
    let (a, b) = (fill(a, b), fill(b, a));
    match (&a, &b) {
        (Value::Number(x, u), Value::Number(y, w)) => {
            same_units("comparison", *u, *w)?;
            Ok(x.partial_cmp(y).unwrap_or(Ordering::Equal))
        }
        (Value::Text(x), Value::Text(y)) => Ok(x
            .chars()
            .flat_map(char::to_lowercase)
            .cmp(y.chars().flat_map(char::to_lowercase))),
        (Value::Bool(x), Value::Bool(y)) => Ok(x.cmp(y)),
        _ => Ok(type_rank(&a).cmp(&type_rank(&b))),
    }
}

fn binary(op: BinOp, a: &Value, b: &Value, ev: &Eval<'_>) -> Value {
    match binary_inner(op, a, b, ev) {
        Ok(v) => v,
        Err(e) => Value::Error(e),
    }
}

fn binary_inner(op: BinOp, a: &Value, b: &Value, ev: &Eval<'_>) -> Result<Value, CellError> {
    let cmp = |pred: fn(Ordering) -> bool| compare(a, b).map(|o| Value::Bool(pred(o)));
    match op {
        BinOp::Eq => return cmp(|o| o == Ordering::Equal),
        BinOp::Ne => return cmp(|o| o != Ordering::Equal),
        BinOp::Lt => return cmp(|o| o == Ordering::Less),
        BinOp::Le => return cmp(|o| o != Ordering::Greater),
        BinOp::Gt => return cmp(|o| o == Ordering::Greater),
        BinOp::Ge => return cmp(|o| o != Ordering::Less),
        BinOp::Concat => {
            let (x, y) = (text_of(a)?, text_of(b)?);
            if x.len() + y.len() > MAX_TEXT_BYTES {
                return Err(CellError::new(
                    ErrorKind::Value,
                    "the text would be longer than 32768 bytes",
                ));
            }
            let total = ev.text_bytes.get() + x.len() + y.len();
            if total > MAX_TOTAL_TEXT_BYTES {
                return Err(CellError::new(
                    ErrorKind::Value,
                    "the formula builds more than 1 MiB of text",
                ));
            }
            ev.text_bytes.set(total);
            return Ok(Value::Text(x + &y));
        }
        _ => {}
    }
    let (x, u) = number(a)?;
    let (y, w) = number(b)?;
    let (r, unit) = match op {
        BinOp::Add => (x + y, same_units("sum", u, w)?),
        BinOp::Sub => (x - y, same_units("difference", u, w)?),
        BinOp::Mul => (
            x * y,
            if u.is_some() && w.is_some() {
                None
            } else {
                u.or(w)
            },
        ),
        BinOp::Div => {
            if y == 0.0 {
                return Err(CellError::new(ErrorKind::DivZero, "division by zero"));
            }
            (x / y, if w.is_none() { u } else { None })
        }
        _ => {
            if x == 0.0 && y < 0.0 {
                return Err(CellError::new(
                    ErrorKind::DivZero,
                    "zero raised to a negative power",
                ));
            }
            if x < 0.0 && crate::float::trunc(y) != y {
                return Err(CellError::new(
                    ErrorKind::Num,
                    "a negative number raised to a fractional power",
                ));
            }
            (libm::pow(x, y), None)
        }
    };
    match Value::num(r) {
        Value::Number(v, _) => Ok(Value::Number(v, unit)),
        other => Ok(other),
    }
}

fn call(spec: &'static FunctionSpec, args: &[Expr], ev: &Eval<'_>) -> Value {
    let n = args.len();
    if n < spec.required() || n > spec.max_args() {
        let count = if spec.repeats {
            format!("at least {}", spec.required())
        } else if spec.required() == spec.params.len() {
            format!("{}", spec.required())
        } else {
            format!("{} to {}", spec.required(), spec.params.len())
        };
        return Value::error(
            ErrorKind::Value,
            format!("{} takes {count} arguments, not {n}", spec.name),
        );
    }
    if spec.name == "IF" {
        return lazy_if(spec, args, ev);
    }
    let sparse = SKIPS_EMPTY.contains(&spec.name);
    if let (true, [Expr::Range(r)]) = (sparse, args) {
        return aggregate(spec, *r, ev);
    }
    let mut values = Vec::with_capacity(n.max(spec.params.len()));
    for (i, arg) in args.iter().enumerate() {
        let v = match (arg, spec.param(i).and_then(|p| p.default)) {
            (Expr::Missing, Some(d)) => Value::Number(d, None),
            (Expr::Range(r), _) if sparse => occupied_range(*r, ev),
            _ => eval(arg, ev),
        };
        if let Some(e) = unit_mismatch(spec, i, &v) {
            return Value::Error(e);
        }
        values.push(v);
    }
    for p in spec.params.iter().skip(n) {
        if let Some(d) = p.default {
            values.push(Value::Number(d, None));
        }
    }
    with_result_units(
        spec,
        (spec.eval)(&Args {
            spec,
            values: &values,
        }),
    )
}

/// Tag the numbers of a catalog function's result with the units its catalog entry
/// states (`result_unit`, one per spilled column, separated by `; `), where a
/// number has none and the stated unit is a unit word (`Hz`, `s`, `Ω`…), so that a
/// cell shows `6.88771 µs`, not a bare number; a result stated in `%` (already a
/// percentage) gets the display unit [`Unit::Percent`], so that it shows
/// `-0.0998004 %`, not `-99.8004 m`. The number itself is never changed. Units
/// the reader does not know (`V/V`, `as a`) leave the number as it is.
fn with_result_units(spec: &FunctionSpec, v: Value) -> Value {
    let unit_at = |col: usize| {
        let n = spec.result_unit.split("; ").count();
        spec.result_unit
            .split("; ")
            .nth(col % n.max(1))
            .and_then(Unit::from_result_word)
    };
    match v {
        Value::Number(x, None) => Value::Number(x, unit_at(0)),
        Value::Array(a) => {
            let cols = a.cols() as usize;
            let items = a
                .items()
                .iter()
                .enumerate()
                .map(|(i, item)| match item {
                    Value::Number(x, None) => Value::Number(*x, unit_at(i % cols.max(1))),
                    other => other.clone(),
                })
                .collect();
            Array::new(a.rows(), a.cols(), items).map_or(Value::Array(a), Value::Array)
        }
        v => v,
    }
}

fn lazy_if(spec: &'static FunctionSpec, args: &[Expr], ev: &Eval<'_>) -> Value {
    let cond = [eval(args.first().unwrap_or(&Expr::Missing), ev)];
    match (Args {
        spec,
        values: &cond,
    })
    .boolean(0)
    {
        Ok(true) => eval(args.get(1).unwrap_or(&Expr::Missing), ev),
        Ok(false) => match args.get(2) {
            Some(e) => eval(e, ev),
            None => Value::Bool(false),
        },
        Err(e) => Value::Error(e),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sheet::parser::parse;

    struct Empty;
    impl Context for Empty {
        fn cell(&self, _: CellRef) -> Value {
            Value::Empty
        }
        fn name(&self, _: &str) -> Option<CellRef> {
            None
        }
    }

    fn ev(s: &str) -> Value {
        evaluate(&parse(s).unwrap(), &Empty)
    }

    fn kind(s: &str) -> ErrorKind {
        match ev(s) {
            Value::Error(e) => e.kind,
            v => panic!("{s} gave {v:?}"),
        }
    }

    #[test]
    fn arithmetic_and_errors() {
        assert_eq!(ev("1+2*3"), Value::num(7.0));
        assert_eq!(kind("1/0"), ErrorKind::DivZero);
        assert_eq!(kind("\"a\"+1"), ErrorKind::Value);
        assert_eq!(kind("(-8)^(1/3)"), ErrorKind::Num);
        assert_eq!(kind("10^400"), ErrorKind::Num);
        assert_eq!(kind("NOSUCH(1)"), ErrorKind::Name);
        assert_eq!(kind("nobody"), ErrorKind::Name);
        assert_eq!(kind("SQRT(1;2)"), ErrorKind::Value);
    }

    #[test]
    fn units_follow_the_rules() {
        assert_eq!(ev("1kΩ + 500"), Value::Number(1500.0, Some(Unit::Ohm)));
        assert_eq!(ev("2*1kΩ"), Value::Number(2000.0, Some(Unit::Ohm)));
        assert_eq!(ev("1V/1A"), Value::num(1.0));
        assert_eq!(kind("1V + 1A"), ErrorKind::Value);
        assert_eq!(
            kind("FEEDBACK.ZIN(\"series-shunt\"; 1V; 10; 0.1)"),
            ErrorKind::Value
        );
        assert_eq!(kind("DB.VOLTAGERATIO(3 Hz)"), ErrorKind::Value);
    }

    #[test]
    fn percent_results_carry_the_percent_display_unit() {
        // NETWORK.WORSTCASE's deviations relative to nominal are percentages: the
        // catalog example's minimum is Af at the corner R1 + 1 %, R2 − 1 %,
        // A = 50k, i.e. 9.819853209032997 against 9.99900009999 nominal, or
        // −1.7916480564609882 % (the entry's closed form,
        // tests/reference/sheet_catalog.py). The number stays that, the unit is %.
        let Value::Array(a) = ev(
            "NETWORK.WORSTCASE(\"non-inverting\"; \"gain\"; 1k; 9k; 1%; 50k; 100k; 200k; 1M; 50; 10 Hz)",
        ) else {
            panic!("no array")
        };
        assert_eq!(a.get(0, 0), Value::Number(9.99900009999, None));
        assert_eq!(a.get(0, 1).display(), "9.819853209032997");
        let Value::Number(low, Some(Unit::Percent)) = a.get(0, 3) else {
            panic!("{:?}", a.get(0, 3))
        };
        assert!((low - -1.791_648_056_460_988_2).abs() < 1e-12, "{low}");
        assert_eq!(
            crate::notation::format_value(low, Unit::Percent.symbol(), 6).unwrap(),
            "-1.79165 %"
        );
        assert!(matches!(a.get(0, 4), Value::Number(_, Some(Unit::Percent))));
        // A small deviation reads as a percentage, not with the prefix m.
        assert_eq!(
            crate::notation::format_value(-0.099_800_4, "%", 6).unwrap(),
            "-0.0998004 %"
        );
        // Formulas see the same number: % × 2 stays %, the value doubles.
        let Value::Array(b) = ev(
            "2*NETWORK.WORSTCASE(\"non-inverting\"; \"gain\"; 1k; 9k; 1%; 50k; 100k; 200k; 1M; 50; 10 Hz)",
        ) else {
            panic!("no array")
        };
        let Value::Number(twice, Some(Unit::Percent)) = b.get(0, 3) else {
            panic!("{:?}", b.get(0, 3))
        };
        assert!((twice - 2.0 * low).abs() < 1e-12);
    }

    #[test]
    fn result_units_are_one_per_column() {
        // A catalog entry's units are tagged column by column (with_result_units):
        // a list of several units must name each spilled column, or a unit would
        // land on the wrong column.
        for f in super::super::functions::all() {
            let n = f.result_unit.split("; ").count();
            if n > 1 && !f.spill.is_empty() {
                assert_eq!(n, f.spill.len(), "{}: {}", f.name, f.result_unit);
            }
        }
    }

    #[test]
    fn text_growth_is_bounded() {
        let s = alloc::format!("\"{}\"", "x".repeat(3000));
        let f = alloc::format!("{s}&{s}&{s}&{s}&{s}&{s}&{s}&{s}&{s}&{s}&{s}&{s}");
        assert!(parse(&f).is_err() || kind(&f) == ErrorKind::Value);
    }

    #[test]
    fn budgets_bound_work_and_memory() {
        // Each range alone is within the limit; together they are not.
        assert_eq!(kind("SUM(A1:A60000; B1:B60000)"), ErrorKind::Ref);
        assert_eq!(ev("SUM(A1:A50000; B1:B50000)"), Value::num(0.0));
        // 100 joined texts of 20 000 bytes each would be 2 MB; the later items
        // become #VALUE! once the formula has built 1 MiB.
        struct Long;
        impl Context for Long {
            fn cell(&self, _: CellRef) -> Value {
                Value::Text("z".repeat(20_000))
            }
            fn name(&self, _: &str) -> Option<CellRef> {
                None
            }
        }
        let Value::Array(a) = evaluate(&parse("A1:A100&\"!\"").unwrap(), &Long) else {
            panic!()
        };
        assert!(matches!(a.get(0, 0), Value::Text(t) if t.len() == 20_001));
        assert!(matches!(a.get(99, 0), Value::Error(e) if e.kind == ErrorKind::Value));
    }

    #[test]
    fn arrays_apply_item_by_item() {
        let Value::Array(a) = evaluate(&parse("FEEDBACK.CEILING(100k; 100) * 2").unwrap(), &Empty)
        else {
            panic!()
        };
        assert_eq!(a.get(0, 0), Value::num(2000.0));
        assert_eq!(a.get(0, 1), Value::num(0.00198));
    }
}
