//! Worksheet formulas written in each file format's own formula syntax, from the
//! worksheet's syntax tree (never by rewriting the text).
//!
//! - OpenDocument (ODF 1.2 part 2, OpenFormula): `of:=` then the expression;
//!   references in brackets with a dot before the column (`[.A1]`, `[.A1:.B3]`);
//!   arguments separated by `;`; truth values as `TRUE()` and `FALSE()`.
//! - Office Open XML (ECMA-376 part 1, §18.17): the expression without `=`; A1
//!   references; arguments separated by `,`; `TRUE` and `FALSE`.
//!
//! Only a *portable* formula is written live: one that calls only the open formula
//! standard's functions of the catalog (areas `math` and `logic`), has no number
//! literal with a unit (the files have no units to check), no `&` (programs turn
//! numbers into text differently), no call of an unknown name and no error literal
//! of this engine's own. Operator precedence is the same in the three syntaxes
//! (prefix sign, `%`, `^`, `* /`, `+ -`, `&`, comparisons; all left-associative),
//! so parentheses are written exactly where the tree needs them.

use super::super::errors::ErrorKind;
use super::super::parser::{BinOp, Expr};
use crate::sheet::{write_number, CellRef, Range};
use alloc::string::String;

/// Which formula syntax to write.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Dialect {
    /// OpenDocument's OpenFormula.
    Odf,
    /// Office Open XML.
    Ooxml,
}

/// The catalog areas whose functions are the open formula standard's.
const OPEN_AREAS: [&str; 2] = ["math", "logic"];

/// Whether `kind` is one of OpenFormula's six error values.
fn standard_error(kind: ErrorKind) -> bool {
    matches!(
        kind,
        ErrorKind::DivZero
            | ErrorKind::Value
            | ErrorKind::Ref
            | ErrorKind::Name
            | ErrorKind::Num
            | ErrorKind::NotAvailable
    )
}

/// Whether every part of `e` means the same in the file formats (see the module doc).
pub(crate) fn portable(e: &Expr) -> bool {
    match e {
        Expr::Number(_, unit) => unit.is_none(),
        Expr::Text(_) | Expr::Bool(_) | Expr::Cell(_) | Expr::Range(_) => true,
        Expr::Name(_) | Expr::Missing => true,
        Expr::Error(kind) => standard_error(*kind),
        Expr::Neg(a) | Expr::Plus(a) | Expr::Percent(a) => portable(a),
        Expr::Binary(BinOp::Concat, _, _) => false,
        Expr::Binary(_, a, b) => portable(a) && portable(b),
        Expr::Call(spec, args) => OPEN_AREAS.contains(&spec.area) && args.iter().all(portable),
        Expr::UnknownCall(_, _) => false,
    }
}

/// Binding strength: higher binds tighter.
fn strength(e: &Expr) -> u8 {
    match e {
        Expr::Binary(op, _, _) => match op {
            BinOp::Eq | BinOp::Ne | BinOp::Lt | BinOp::Le | BinOp::Gt | BinOp::Ge => 1,
            BinOp::Concat => 2,
            BinOp::Add | BinOp::Sub => 3,
            BinOp::Mul | BinOp::Div => 4,
            BinOp::Pow => 5,
        },
        Expr::Percent(_) => 6,
        Expr::Neg(_) | Expr::Plus(_) => 7,
        _ => 9,
    }
}

fn op_text(op: BinOp) -> &'static str {
    match op {
        BinOp::Add => "+",
        BinOp::Sub => "-",
        BinOp::Mul => "*",
        BinOp::Div => "/",
        BinOp::Pow => "^",
        BinOp::Concat => "&",
        BinOp::Eq => "=",
        BinOp::Ne => "<>",
        BinOp::Lt => "<",
        BinOp::Le => "<=",
        BinOp::Gt => ">",
        BinOp::Ge => ">=",
    }
}

/// Write `e` in `dialect`; `e` must be [`portable`]. ODF's `of:=` and OOXML's `=`
/// are not written.
pub(crate) fn write(out: &mut String, e: &Expr, d: Dialect) {
    match e {
        Expr::Number(x, _) => {
            let from = out.len();
            write_number(out, *x);
            // `1e-7` → `1E-7`: both syntaxes read either, programs write upper case.
            out[from..].make_ascii_uppercase();
        }
        Expr::Text(t) => {
            out.push('"');
            out.push_str(&t.replace('"', "\"\""));
            out.push('"');
        }
        Expr::Bool(b) => {
            out.push_str(if *b { "TRUE" } else { "FALSE" });
            if d == Dialect::Odf {
                out.push_str("()");
            }
        }
        Expr::Error(kind) => out.push_str(kind.code()),
        Expr::Cell(c) => cell(out, *c, d),
        Expr::Range(r) => range(out, *r, d),
        Expr::Name(n) => out.push_str(n),
        Expr::Missing => {}
        Expr::Neg(a) => prefix(out, "-", a, d),
        Expr::Plus(a) => prefix(out, "+", a, d),
        Expr::Percent(a) => {
            operand(out, a, strength(a) < 6, d);
            out.push('%');
        }
        Expr::Binary(op, a, b) => {
            let p = strength(e);
            operand(out, a, strength(a) < p, d);
            out.push_str(op_text(*op));
            operand(out, b, strength(b) <= p, d);
        }
        Expr::Call(spec, args) => {
            out.push_str(spec.name);
            out.push('(');
            for (i, a) in args.iter().enumerate() {
                if i > 0 {
                    out.push(if d == Dialect::Odf { ';' } else { ',' });
                }
                write(out, a, d);
            }
            out.push(')');
        }
        // Not portable: never asked for (`portable` is checked first).
        Expr::UnknownCall(name, _) => out.push_str(name),
    }
}

fn prefix(out: &mut String, sign: &str, a: &Expr, d: Dialect) {
    out.push_str(sign);
    operand(out, a, strength(a) < 7, d);
}

fn operand(out: &mut String, e: &Expr, parens: bool, d: Dialect) {
    if parens {
        out.push('(');
    }
    write(out, e, d);
    if parens {
        out.push(')');
    }
}

fn cell(out: &mut String, c: CellRef, d: Dialect) {
    match d {
        Dialect::Odf => {
            out.push_str("[.");
            out.push_str(&alloc::format!("{c}"));
            out.push(']');
        }
        Dialect::Ooxml => out.push_str(&alloc::format!("{c}")),
    }
}

fn range(out: &mut String, r: Range, d: Dialect) {
    match d {
        Dialect::Odf => out.push_str(&alloc::format!("[.{}:.{}]", r.start, r.end)),
        Dialect::Ooxml => out.push_str(&alloc::format!("{}:{}", r.start, r.end)),
    }
}

#[cfg(test)]
mod tests {
    use super::super::super::parser::parse;
    use super::*;

    fn both(src: &str) -> (String, String) {
        let e = parse(src).unwrap();
        assert!(portable(&e), "{src}");
        let (mut a, mut b) = (String::new(), String::new());
        write(&mut a, &e, Dialect::Odf);
        write(&mut b, &e, Dialect::Ooxml);
        (a, b)
    }

    #[test]
    fn references_separators_and_truth_values_follow_each_syntax() {
        // ODF 1.2 part 2 §5.8 (references in brackets) and ECMA-376 §18.17.2 (A1
        // references), from memory.
        assert_eq!(
            both("SUM(A1:B3; C4) * 2"),
            ("SUM([.A1:.B3];[.C4])*2".into(), "SUM(A1:B3,C4)*2".into())
        );
        assert_eq!(
            both("IF(TRUE; 1; \"a\"\"b\")"),
            (
                "IF(TRUE();1;\"a\"\"b\")".into(),
                "IF(TRUE,1,\"a\"\"b\")".into()
            )
        );
    }

    #[test]
    fn parentheses_only_where_the_tree_needs_them() {
        // The worksheet's precedence (docs/worksheet.md): (1+2)*3 needs them, 1+2*3
        // does not; 2-(3-4) keeps them because operators group left to right.
        assert_eq!(both("(1+2)*3").1, "(1+2)*3");
        assert_eq!(both("1+2*3").1, "1+2*3");
        assert_eq!(both("2-(3-4)").1, "2-(3-4)");
        assert_eq!(both("(2-3)-4").1, "2-3-4");
        assert_eq!(both("-(A1+1)^2").1, "-(A1+1)^2");
        assert_eq!(both("1e-7*A1").1, "1E-7*A1");
    }

    #[test]
    fn loopwright_functions_units_and_joins_are_not_portable() {
        for src in [
            "FEEDBACK.GAIN(1e5; 0.01)",
            "A1 + 1 V",
            "A1 & \"x\"",
            "NOPE(1)",
        ] {
            assert!(!portable(&parse(src).unwrap()), "{src}");
        }
    }
}
