//! OpenFormula operator precedence, conversion and error propagation, each case
//! with the section of OASIS OpenDocument Formula (ODF 1.2 part 2) it follows.
//! Section numbers and rules are from memory; where the standard leaves a choice
//! to the implementation, the case says which choice this engine makes.

use loopwright::sheet::{ErrorKind, Sheet, Value};

fn eval(formula: &str) -> Value {
    let mut s = Sheet::new();
    s.set("Z100", formula).unwrap();
    s.value("Z100").unwrap()
}

fn num(formula: &str) -> f64 {
    match eval(formula) {
        Value::Number(x, _) => x,
        v => panic!("{formula} gave {v:?}"),
    }
}

fn err(formula: &str) -> ErrorKind {
    match eval(formula) {
        Value::Error(e) => e.kind,
        v => panic!("{formula} gave {v:?}"),
    }
}

#[test]
fn prefix_minus_binds_tighter_than_power() {
    // §5.2 operator precedence table (from memory): prefix "-" is above "^".
    assert_eq!(num("=-2^2"), 4.0);
    assert_eq!(num("=0-2^2"), -4.0);
    assert_eq!(num("=2^-1"), 0.5);
}

#[test]
fn power_groups_left_to_right() {
    // §5.2 (from memory): all binary operators, "^" included, are left-associative.
    assert_eq!(num("=2^3^2"), 64.0);
}

#[test]
fn multiplicative_before_additive_before_concat_before_comparison() {
    // §5.2 precedence table (from memory).
    assert_eq!(num("=1+2*3"), 7.0);
    assert_eq!(num("=(1+2)*3"), 9.0);
    assert_eq!(num("=10-4-3"), 3.0);
    assert_eq!(num("=2*3^2"), 18.0);
    assert_eq!(eval("=1+2&3"), Value::Text("33".into()));
    assert_eq!(eval("=1+2=3"), Value::Bool(true));
    assert_eq!(eval("=1&2=\"12\""), Value::Bool(true));
}

#[test]
fn postfix_percent() {
    // §6.3.x postfix "%" divides by 100 and binds tighter than "^" (§5.2, from memory).
    assert_eq!(num("=50%"), 0.5);
    assert_eq!(num("=10%%"), 0.001);
    assert_eq!(num("=200%*3"), 6.0);
    assert_eq!(num("=-50%"), -0.5);
    assert_eq!(num("=2^200%"), 4.0);
}

#[test]
fn division_by_zero() {
    // §6.3 infix "/" (from memory): a zero divisor gives #DIV/0!.
    assert_eq!(err("=1/0"), ErrorKind::DivZero);
    assert_eq!(err("=1/(2-2)"), ErrorKind::DivZero);
    // Zero to a negative power is a division by zero; 0^0 is left to the
    // implementation by §6.3 "^" (from memory): here 1, as IEEE 754 pow.
    assert_eq!(err("=0^-1"), ErrorKind::DivZero);
    assert_eq!(num("=0^0"), 1.0);
}

#[test]
fn errors_propagate_through_operators_and_functions() {
    // §5.12 error values and §6.3 (from memory): an operand that is an error makes
    // the result that error.
    assert_eq!(err("=1/0+1"), ErrorKind::DivZero);
    assert_eq!(err("=-(1/0)"), ErrorKind::DivZero);
    assert_eq!(err("=#N/A*0"), ErrorKind::NotAvailable);
    assert_eq!(err("=SQRT(#NUM!)"), ErrorKind::Num);
    assert_eq!(err("=SUM(1; #REF!; 2)"), ErrorKind::Ref);
    assert_eq!(err("=#VALUE!&\"x\""), ErrorKind::Value);
    assert_eq!(err("=#N/A<1"), ErrorKind::NotAvailable);
    // With two error operands the standard leaves the choice open; this engine
    // returns the left one.
    assert_eq!(err("=#N/A+1/0"), ErrorKind::NotAvailable);
}

#[test]
fn text_in_arithmetic_is_a_value_error() {
    // §6.3 and §6.2 implicit conversion (from memory): converting text to a
    // number is implementation-defined; this engine never does it.
    assert_eq!(err("=\"a\"+1"), ErrorKind::Value);
    assert_eq!(err("=\"1\"*2"), ErrorKind::Value);
    assert_eq!(err("=-\"x\""), ErrorKind::Value);
    assert_eq!(err("=SUM(\"a\")"), ErrorKind::Value);
}

#[test]
fn logical_and_empty_operands_convert() {
    // §6.2 implicit conversion (from memory): TRUE is 1, FALSE is 0, an empty cell
    // is 0 in arithmetic and "" in text.
    assert_eq!(num("=TRUE+1"), 2.0);
    assert_eq!(num("=FALSE*5"), 0.0);
    assert_eq!(num("=A1+1"), 1.0);
    assert_eq!(eval("=A1&\"x\""), Value::Text("x".into()));
    assert_eq!(num("=A1"), 0.0);
}

#[test]
fn concatenation_converts_to_text() {
    // §6.3 infix "&" (from memory).
    assert_eq!(eval("=\"R\"&1&\"=\"&4k7"), Value::Text("R1=4700".into()));
    assert_eq!(eval("=TRUE&\"\""), Value::Text("TRUE".into()));
    assert_eq!(
        eval("=0.1+0.2&\"\""),
        Value::Text("0.30000000000000004".into())
    );
}

#[test]
fn comparisons_by_type() {
    // §6.3 comparison operators (from memory): text compares without regard to
    // case; across types numbers < text < logical values; values of different
    // types are never equal.
    assert_eq!(eval("=\"abc\"=\"ABC\""), Value::Bool(true));
    assert_eq!(eval("=\"a\"<\"B\""), Value::Bool(true));
    assert_eq!(eval("=1<\"a\""), Value::Bool(true));
    assert_eq!(eval("=\"z\"<TRUE"), Value::Bool(true));
    assert_eq!(eval("=1=TRUE"), Value::Bool(false));
    assert_eq!(eval("=2<>2"), Value::Bool(false));
    assert_eq!(eval("=3>=3"), Value::Bool(true));
    assert_eq!(eval("=A1=0"), Value::Bool(true));
    assert_eq!(eval("=A1=\"\""), Value::Bool(true));
}

#[test]
fn domain_and_overflow_errors() {
    // §6.3 "^" and §6.16 (from memory): results outside the real numbers or the
    // representable range are #NUM!.
    assert_eq!(err("=(-8)^(1/3)"), ErrorKind::Num);
    assert_eq!(num("=(-2)^3"), -8.0);
    assert_eq!(err("=1e308*10"), ErrorKind::Num);
    assert_eq!(err("=SQRT(-1)"), ErrorKind::Num);
    assert_eq!(err("=LN(0)"), ErrorKind::Num);
    assert_eq!(err("=EXP(1000)"), ErrorKind::Num);
}

#[test]
fn if_evaluates_only_the_chosen_branch() {
    // §6.15 IF (from memory).
    assert_eq!(num("=IF(FALSE; 1/0; 2)"), 2.0);
    assert_eq!(eval("=IF(1>2; 5)"), Value::Bool(false));
    assert_eq!(err("=IF(1/0; 1; 2)"), ErrorKind::DivZero);
    assert_eq!(err("=IF(\"maybe\"; 1; 2)"), ErrorKind::Value);
}

#[test]
fn separators_names_and_syntax() {
    // §5.6 function parameters use ";" (from memory); "," is also accepted here.
    assert_eq!(num("=SUM(1;2,3)"), 6.0);
    assert_eq!(num("=sum(1; 2)"), 3.0);
    assert_eq!(num("=ROUND(2.5;)"), 3.0);
    // §5.12 (from memory): an unknown function is #NAME?.
    assert_eq!(err("=NOSUCHFN(1)"), ErrorKind::Name);
    assert_eq!(err("=undefined_name+1"), ErrorKind::Name);
    // A formula that does not parse is an error value of this engine's own, with
    // the column in its explanation.
    match eval("=1+(2*3") {
        Value::Error(e) => {
            assert_eq!(e.kind, ErrorKind::Syntax);
            assert!(e.detail.contains("column 8"), "{}", e.detail);
        }
        v => panic!("{v:?}"),
    }
    assert_eq!(err("=SQRT()"), ErrorKind::Value);
}

#[test]
fn references_absolute_and_mixed() {
    // §5.8 references (from memory): "$" marks absolute parts; the cell is the same.
    let mut s = Sheet::new();
    s.set("B3", "7").unwrap();
    s.set("A1", "=$B$3+B$3+$B3+B3").unwrap();
    assert_eq!(s.value("A1").unwrap(), Value::Number(28.0, None));
    s.set("A2", "=SUM(B2:B4)").unwrap();
    s.set("B2", "text").unwrap();
    s.set("B4", "TRUE").unwrap();
    // §6.18 SUM (from memory): text and logical values inside ranges are skipped.
    assert_eq!(s.value("A2").unwrap(), Value::Number(7.0, None));
}

#[test]
fn round_half_away_from_zero() {
    // §6.16 ROUND (from memory).
    assert_eq!(num("=ROUND(-2.5)"), -3.0);
    assert_eq!(num("=ROUND(1234.5678; -2)"), 1200.0);
    assert_eq!(num("=ROUND(0.125; 2)"), 0.13);
}
