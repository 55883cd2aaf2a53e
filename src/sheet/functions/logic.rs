//! Logical functions: IF AND OR NOT (OpenFormula, ODF 1.2 part 2, §6.15
//! "Logical Functions", from memory). IF evaluates only the branch it takes; the
//! evaluator handles that, and the entry here chooses between evaluated branches.

use super::{req, tri, Args, Example, Expected, FunctionSpec, Param};
use crate::sheet::errors::ErrorKind;
use crate::sheet::value::Value;

const LOGICALS: &[Param] = &[Param {
    name: "conditions",
    summary: "truth values, numbers (non-zero is TRUE), cells or ranges",
    unit: "1",
    optional: false,
    default: None,
    range: "any",
}];

/// IF with both branches already evaluated.
fn if_(a: &Args<'_>) -> Value {
    if tri!(a.boolean(0)) {
        a.get(1).clone()
    } else if a.len() > 2 {
        a.get(2).clone()
    } else {
        Value::Bool(false)
    }
}

fn and(a: &Args<'_>) -> Value {
    let bs = tri!(a.booleans());
    if bs.is_empty() {
        return Value::error(ErrorKind::Value, "AND: no truth values among the arguments");
    }
    Value::Bool(bs.iter().all(|b| *b))
}

fn or(a: &Args<'_>) -> Value {
    let bs = tri!(a.booleans());
    if bs.is_empty() {
        return Value::error(ErrorKind::Value, "OR: no truth values among the arguments");
    }
    Value::Bool(bs.iter().any(|b| *b))
}

fn not(a: &Args<'_>) -> Value {
    Value::Bool(!tri!(a.boolean(0)))
}

/// The logic area's table.
pub static FUNCTIONS: &[FunctionSpec] = &[
    FunctionSpec {
        name: "IF",
        area: "logic",
        summary: "One value when a condition holds, another when it does not; only the chosen one is evaluated",
        params: &[
            req("condition", "the test", "1", "TRUE/FALSE or a number"),
            Param { name: "then", summary: "the value when TRUE", unit: "any", optional: false, default: None, range: "any" },
            Param {
                name: "else",
                summary: "the value when FALSE (FALSE when left out)",
                unit: "any",
                optional: true,
                default: None,
                range: "any",
            },
        ],
        repeats: false,
        result_unit: "as the chosen value",
        spill: &[],
        example: Example {
            formula: "=IF(2 > 1; 10; 1/0)",
            expected: Expected::Numbers(&[10.0]),
            source: "the condition holds, so the unused branch 1/0 is not evaluated (OpenFormula §6.15 IF, from memory)",
            tolerance: &[],
        },
        eval: if_,
    },
    FunctionSpec {
        name: "AND",
        area: "logic",
        summary: "TRUE when every condition is TRUE",
        params: LOGICALS,
        repeats: true,
        result_unit: "TRUE/FALSE",
        spill: &[],
        example: Example { formula: "=AND(TRUE; 1; 0)", expected: Expected::Bool(false), source: "0 is FALSE", tolerance: &[] },
        eval: and,
    },
    FunctionSpec {
        name: "OR",
        area: "logic",
        summary: "TRUE when any condition is TRUE",
        params: LOGICALS,
        repeats: true,
        result_unit: "TRUE/FALSE",
        spill: &[],
        example: Example { formula: "=OR(FALSE; 0; 2)", expected: Expected::Bool(true), source: "2 is TRUE", tolerance: &[] },
        eval: or,
    },
    FunctionSpec {
        name: "NOT",
        area: "logic",
        summary: "The opposite truth value",
        params: &[req("condition", "a truth value or number", "1", "TRUE/FALSE or a number")],
        repeats: false,
        result_unit: "TRUE/FALSE",
        spill: &[],
        example: Example { formula: "=NOT(1 > 2)", expected: Expected::Bool(true), source: "1 > 2 is FALSE", tolerance: &[] },
        eval: not,
    },
];
