//! Tokens to a syntax tree, with OpenFormula's operator precedence.
//!
//! Precedence, loosest first (OpenFormula, ODF 1.2 part 2, §5.2 operator table,
//! from memory): comparisons `= <> < <= > >=`; `&`; `+ -`; `* /`; `^`; postfix
//! `%`; prefix `+ -`; the range operator `:`. All binary operators group left to
//! right, so `2^3^2` is 64 and `-2^2` is 4.
//!
//! Bounds: formula text at most [`super::lexer::MAX_FORMULA_BYTES`]; the tree at
//! most [`MAX_DEPTH`] levels deep (this also bounds parentheses, prefix signs and
//! nested calls); at most [`MAX_ARGS`] arguments per call. Evaluation recurses
//! over the tree, so these bounds are what keep any input from exhausting the stack.

use super::address::{CellRef, Range};
use super::errors::ErrorKind;
use super::functions::{self, FunctionSpec};
use super::lexer::{tokenize, ParseError, Spanned, Token};
use super::value::Unit;
use alloc::boxed::Box;
use alloc::string::String;
use alloc::vec::Vec;

/// Deepest syntax tree accepted.
pub const MAX_DEPTH: u32 = 128;
/// Most arguments in one function call.
pub const MAX_ARGS: usize = 255;

/// A binary operator.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BinOp {
    /// `+`
    Add,
    /// `-`
    Sub,
    /// `*`
    Mul,
    /// `/`
    Div,
    /// `^`
    Pow,
    /// `&`
    Concat,
    /// `=`
    Eq,
    /// `<>`
    Ne,
    /// `<`
    Lt,
    /// `<=`
    Le,
    /// `>`
    Gt,
    /// `>=`
    Ge,
}

/// A syntax tree node.
#[derive(Debug, Clone, PartialEq)]
pub enum Expr {
    /// A number literal.
    Number(f64, Option<Unit>),
    /// A string literal.
    Text(String),
    /// `TRUE` or `FALSE`.
    Bool(bool),
    /// An error literal.
    Error(ErrorKind),
    /// A cell reference.
    Cell(CellRef),
    /// A range reference.
    Range(Range),
    /// A cell name, upper-cased.
    Name(String),
    /// An argument left empty, as in `ROUND(2.5;)`.
    Missing,
    /// Prefix minus.
    Neg(Box<Expr>),
    /// Prefix plus (no effect on numbers).
    Plus(Box<Expr>),
    /// Postfix percent.
    Percent(Box<Expr>),
    /// A binary operation.
    Binary(BinOp, Box<Expr>, Box<Expr>),
    /// A call of a known function.
    Call(&'static FunctionSpec, Vec<Expr>),
    /// A call of a name that is no function; evaluates to `#NAME?`.
    UnknownCall(String, Vec<Expr>),
}

impl Expr {
    /// Every cell, range and name this expression reads, in order of appearance.
    pub fn visit_refs(&self, f: &mut impl FnMut(&Expr)) {
        match self {
            Expr::Cell(_) | Expr::Range(_) | Expr::Name(_) => f(self),
            Expr::Neg(e) | Expr::Plus(e) | Expr::Percent(e) => e.visit_refs(f),
            Expr::Binary(_, a, b) => {
                a.visit_refs(f);
                b.visit_refs(f);
            }
            Expr::Call(_, args) | Expr::UnknownCall(_, args) => {
                args.iter().for_each(|a| a.visit_refs(f))
            }
            _ => {}
        }
    }
}

struct Parser {
    tokens: Vec<Spanned>,
    next: usize,
    end_pos: usize,
}

type Node = (Expr, u32);

fn deeper(depth: u32, pos: usize) -> Result<u32, ParseError> {
    if depth >= MAX_DEPTH {
        Err(ParseError {
            pos,
            message: "the formula is nested deeper than 128 levels",
        })
    } else {
        Ok(depth + 1)
    }
}

impl Parser {
    fn peek(&self) -> Option<&Token> {
        self.tokens.get(self.next).map(|t| &t.token)
    }

    fn pos(&self) -> usize {
        self.tokens.get(self.next).map_or(self.end_pos, |t| t.pos)
    }

    fn peek_op(&self) -> Option<&'static str> {
        match self.peek() {
            Some(Token::Op(op)) => Some(op),
            _ => None,
        }
    }

    fn err<T>(&self, message: &'static str) -> Result<T, ParseError> {
        Err(ParseError {
            pos: self.pos(),
            message,
        })
    }

    fn binary_level(
        &mut self,
        nesting: u32,
        ops: &[(&str, BinOp)],
        sub: fn(&mut Parser, u32) -> Result<Node, ParseError>,
    ) -> Result<Node, ParseError> {
        let (mut left, mut depth) = sub(self, nesting)?;
        while let Some(op) = self
            .peek_op()
            .and_then(|o| ops.iter().find(|(s, _)| *s == o))
            .map(|(_, op)| *op)
        {
            let pos = self.pos();
            self.next += 1;
            let (right, rd) = sub(self, nesting)?;
            depth = deeper(depth.max(rd), pos)?;
            left = Expr::Binary(op, Box::new(left), Box::new(right));
        }
        Ok((left, depth))
    }

    fn comparison(&mut self, n: u32) -> Result<Node, ParseError> {
        const OPS: [(&str, BinOp); 6] = [
            ("=", BinOp::Eq),
            ("<>", BinOp::Ne),
            ("<", BinOp::Lt),
            ("<=", BinOp::Le),
            (">", BinOp::Gt),
            (">=", BinOp::Ge),
        ];
        self.binary_level(n, &OPS, Parser::concat)
    }

    fn concat(&mut self, n: u32) -> Result<Node, ParseError> {
        self.binary_level(n, &[("&", BinOp::Concat)], Parser::additive)
    }

    fn additive(&mut self, n: u32) -> Result<Node, ParseError> {
        self.binary_level(
            n,
            &[("+", BinOp::Add), ("-", BinOp::Sub)],
            Parser::multiplicative,
        )
    }

    fn multiplicative(&mut self, n: u32) -> Result<Node, ParseError> {
        self.binary_level(n, &[("*", BinOp::Mul), ("/", BinOp::Div)], Parser::power)
    }

    fn power(&mut self, n: u32) -> Result<Node, ParseError> {
        self.binary_level(n, &[("^", BinOp::Pow)], Parser::postfix)
    }

    fn postfix(&mut self, n: u32) -> Result<Node, ParseError> {
        let (mut e, mut depth) = self.prefix(n)?;
        while self.peek_op() == Some("%") {
            depth = deeper(depth, self.pos())?;
            self.next += 1;
            e = Expr::Percent(Box::new(e));
        }
        Ok((e, depth))
    }

    fn prefix(&mut self, n: u32) -> Result<Node, ParseError> {
        match self.peek_op() {
            Some(op @ ("-" | "+")) => {
                let pos = self.pos();
                let n = deeper(n, pos)?;
                self.next += 1;
                let (e, d) = self.prefix(n)?;
                let e = if op == "-" {
                    Expr::Neg(Box::new(e))
                } else {
                    Expr::Plus(Box::new(e))
                };
                Ok((e, deeper(d, pos)?))
            }
            _ => self.range(n),
        }
    }

    fn range(&mut self, n: u32) -> Result<Node, ParseError> {
        let (first, depth) = self.primary(n)?;
        if self.peek_op() != Some(":") {
            return Ok((first, depth));
        }
        let Expr::Cell(a) = first else {
            return self.err("a range needs a cell address on each side of :");
        };
        self.next += 1;
        match self.peek() {
            Some(Token::Cell(b)) => {
                let b = *b;
                self.next += 1;
                Ok((Expr::Range(Range::new(a, b)), depth))
            }
            _ => self.err("a range needs a cell address on each side of :"),
        }
    }

    fn primary(&mut self, n: u32) -> Result<Node, ParseError> {
        let Some(t) = self.tokens.get(self.next) else {
            return self.err("the formula ends where a value was expected");
        };
        let pos = t.pos;
        let token = t.token.clone();
        self.next += 1;
        let e = match token {
            Token::Number(x, u) => Expr::Number(x, u),
            Token::Text(s) => Expr::Text(s),
            Token::Error(k) => Expr::Error(k),
            Token::Cell(c) => Expr::Cell(c),
            Token::Op("(") => {
                let n = deeper(n, pos)?;
                let (e, d) = self.comparison(n)?;
                if self.peek_op() != Some(")") {
                    return self.err("expected ) to close the parenthesis");
                }
                self.next += 1;
                return Ok((e, d));
            }
            Token::Ident(name) => {
                if self.peek_op() == Some("(") {
                    self.next += 1;
                    return self.call(name, n, pos);
                }
                let upper = name.to_ascii_uppercase();
                match upper.as_str() {
                    "TRUE" => Expr::Bool(true),
                    "FALSE" => Expr::Bool(false),
                    _ => Expr::Name(upper),
                }
            }
            Token::Op(_) => {
                self.next -= 1;
                return self.err("an operator where a value was expected");
            }
        };
        Ok((e, 1))
    }

    fn call(&mut self, name: String, n: u32, pos: usize) -> Result<Node, ParseError> {
        let n = deeper(n, pos)?;
        let mut args = Vec::new();
        let mut depth = 1;
        if self.peek_op() == Some(")") {
            self.next += 1;
        } else {
            loop {
                if args.len() >= MAX_ARGS {
                    return self.err("more than 255 arguments in one call");
                }
                if matches!(self.peek_op(), Some(";" | "," | ")")) {
                    args.push(Expr::Missing);
                } else {
                    let (e, d) = self.comparison(n)?;
                    depth = depth.max(d);
                    args.push(e);
                }
                match self.peek_op() {
                    Some(";" | ",") => self.next += 1,
                    Some(")") => {
                        self.next += 1;
                        break;
                    }
                    _ => return self.err("expected ; or ) in the argument list"),
                }
            }
        }
        let depth = deeper(depth, pos)?;
        let e = match functions::lookup(&name) {
            Some(spec) => Expr::Call(spec, args),
            None => Expr::UnknownCall(name.to_ascii_uppercase(), args),
        };
        Ok((e, depth))
    }
}

/// Parse formula text without its leading `=`.
///
/// # Errors
/// [`ParseError`] with the column of the first problem.
///
/// (Examples: the test `parse_example` below; the module is internal.)
pub fn parse(src: &str) -> Result<Expr, ParseError> {
    let tokens = tokenize(src)?;
    let end_pos = src.chars().count() + 1;
    if tokens.is_empty() {
        return Err(ParseError {
            pos: 1,
            message: "the formula is empty",
        });
    }
    let mut p = Parser {
        tokens,
        next: 0,
        end_pos,
    };
    let (e, _) = p.comparison(0)?;
    if p.next < p.tokens.len() {
        return p.err("unexpected text after the end of the expression");
    }
    Ok(e)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parse_example() {
        assert!(matches!(
            parse("-2^2").unwrap(),
            Expr::Binary(BinOp::Pow, _, _)
        ));
        let e = parse("SUM(1;").unwrap_err();
        assert_eq!(
            (e.pos, e.message),
            (7, "the formula ends where a value was expected")
        );
    }

    fn bin(op: BinOp, a: Expr, b: Expr) -> Expr {
        Expr::Binary(op, Box::new(a), Box::new(b))
    }

    fn n(x: f64) -> Expr {
        Expr::Number(x, None)
    }

    #[test]
    fn precedence_shapes() {
        // OpenFormula §5.2 operator table (from memory): prefix minus binds tighter than ^.
        assert_eq!(
            parse("-2^2").unwrap(),
            bin(BinOp::Pow, Expr::Neg(Box::new(n(2.0))), n(2.0))
        );
        assert_eq!(
            parse("1+2*3").unwrap(),
            bin(BinOp::Add, n(1.0), bin(BinOp::Mul, n(2.0), n(3.0)))
        );
        assert_eq!(
            parse("2^3^2").unwrap(),
            bin(BinOp::Pow, bin(BinOp::Pow, n(2.0), n(3.0)), n(2.0))
        );
        assert_eq!(
            parse("1&2=3").unwrap(),
            bin(BinOp::Eq, bin(BinOp::Concat, n(1.0), n(2.0)), n(3.0))
        );
    }

    #[test]
    fn calls_ranges_names() {
        match parse("sum(A1:B2, , x)").unwrap() {
            Expr::Call(spec, args) => {
                assert_eq!(spec.name, "SUM");
                assert_eq!(args[1], Expr::Missing);
                assert_eq!(args[2], Expr::Name("X".into()));
            }
            other => panic!("{other:?}"),
        }
        assert!(matches!(parse("NOSUCH(1)").unwrap(), Expr::UnknownCall(..)));
        assert_eq!(parse("true").unwrap(), Expr::Bool(true));
    }

    #[test]
    fn errors_with_positions() {
        assert_eq!(parse("(1+2").unwrap_err().pos, 5);
        assert_eq!(parse("1+*2").unwrap_err().pos, 3);
        assert_eq!(parse("1 2").unwrap_err().pos, 3);
        assert_eq!(parse("SUM(1 2)").unwrap_err().pos, 7);
        assert_eq!(parse("A1:3").unwrap_err().pos, 4);
        assert_eq!(parse("").unwrap_err().pos, 1);
    }

    #[test]
    fn depth_is_bounded() {
        let deep = alloc::format!("{}1{}", "(".repeat(200), ")".repeat(200));
        assert!(parse(&deep).unwrap_err().message.contains("nested"));
        let ok = alloc::format!("{}1{}", "(".repeat(100), ")".repeat(100));
        assert_eq!(parse(&ok).unwrap(), n(1.0));
        assert!(parse(&"-".repeat(300)).is_err());
        assert!(parse(&alloc::format!("1{}", "+1".repeat(200))).is_err());
        assert!(parse(&alloc::format!("1{}", "+1".repeat(100))).is_ok());
    }
}
