//! Formula text to tokens.
//!
//! Token shapes follow OpenFormula (ODF 1.2 part 2, §5.2 "Basic Expression
//! Syntax", §5.3 numbers, §5.4 strings with `""` for a quote, §5.8 references,
//! §5.12 error literals; from memory), with two additions: engineering literals
//! ([`super::literal`]) and `,` accepted beside `;` as the argument separator.
//! Positions are 1-based character columns of the formula text.

// Every slice below is taken at an offset produced by stepping over whole
// characters (or ASCII bytes) of the source, so it cannot panic.

use super::address::CellRef;
use super::errors::ErrorKind;
use super::literal;
use super::value::Unit;
use alloc::string::String;
use alloc::vec::Vec;

/// Longest formula accepted, in bytes.
pub const MAX_FORMULA_BYTES: usize = 4096;

/// One token.
#[derive(Debug, Clone, PartialEq)]
pub enum Token {
    /// A number literal and its unit word.
    Number(f64, Option<Unit>),
    /// A string literal, quotes removed.
    Text(String),
    /// An error literal such as `#N/A`.
    Error(ErrorKind),
    /// A cell address (not followed by `(`).
    Cell(CellRef),
    /// A function name, cell name, `TRUE` or `FALSE`.
    Ident(String),
    /// `+ - * / ^ & % = < > ( ) ; , :` and the two-character `<= >= <>`.
    Op(&'static str),
}

/// A token and the 1-based character column where it starts.
#[derive(Debug, Clone, PartialEq)]
pub struct Spanned {
    /// The token.
    pub token: Token,
    /// Character column, from 1.
    pub pos: usize,
}

/// A lexical or syntax error and where it is.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ParseError {
    /// 1-based character column.
    pub pos: usize,
    /// What is wrong.
    pub message: &'static str,
}

impl core::fmt::Display for ParseError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        write!(f, "at column {}: {}", self.pos, self.message)
    }
}

const OPS: [&str; 18] = [
    "<=", ">=", "<>", "+", "-", "*", "/", "^", "&", "%", "=", "<", ">", "(", ")", ";", ",", ":",
];

fn ident_len(s: &str) -> usize {
    s.char_indices()
        .find(|&(i, c)| {
            !(c.is_ascii_alphabetic() || c == '_' || (i > 0 && (c.is_ascii_digit() || c == '.')))
        })
        .map_or(s.len(), |(i, _)| i)
}

/// Split formula text (without its leading `=`) into tokens.
///
/// # Errors
/// [`ParseError`] for text longer than [`MAX_FORMULA_BYTES`], an unterminated
/// string, an unknown error literal, a malformed number or a stray character.
pub fn tokenize(src: &str) -> Result<Vec<Spanned>, ParseError> {
    if src.len() > MAX_FORMULA_BYTES {
        return Err(ParseError {
            pos: 1,
            message: "the formula is longer than 4096 bytes",
        });
    }
    let mut out = Vec::new();
    let mut i = 0;
    let mut col = 1;
    while let Some(c) = src[i..].chars().next() {
        let rest = &src[i..];
        let start_col = col;
        let len;
        let token;
        if c.is_whitespace() {
            i += c.len_utf8();
            col += 1;
            continue;
        } else if c.is_ascii_digit()
            || (c == '.' && rest[1..].starts_with(|d: char| d.is_ascii_digit()))
        {
            let (q, used) = literal::scan(rest).map_err(|(at, message)| ParseError {
                pos: col + at as usize - 1,
                message,
            })?;
            len = used;
            token = Token::Number(q.value, q.unit);
        } else if c == '"' {
            let mut text = String::new();
            let mut j = 1;
            loop {
                let Some(ch) = rest[j..].chars().next() else {
                    return Err(ParseError {
                        pos: col,
                        message: "a string is not closed with \"",
                    });
                };
                j += ch.len_utf8();
                if ch == '"' {
                    if rest[j..].starts_with('"') {
                        text.push('"');
                        j += 1;
                    } else {
                        break;
                    }
                } else {
                    text.push(ch);
                }
            }
            len = j;
            token = Token::Text(text);
        } else if c == '#' {
            let kind = ErrorKind::ALL.iter().copied().find(|k| {
                rest.get(..k.code().len())
                    .is_some_and(|p| p.eq_ignore_ascii_case(k.code()))
            });
            let Some(kind) = kind else {
                return Err(ParseError {
                    pos: col,
                    message:
                        "unknown error literal (known: #DIV/0! #VALUE! #REF! #NAME? #NUM! #N/A)",
                });
            };
            len = kind.code().len();
            token = Token::Error(kind);
        } else if c == '$' || c.is_ascii_alphabetic() || c == '_' {
            let next_is_paren = |used: usize| rest[used..].trim_start().starts_with('(');
            match CellRef::parse_prefix(rest) {
                Some((cell, used)) if !next_is_paren(used) => {
                    len = used;
                    token = Token::Cell(cell);
                }
                _ => {
                    let n = ident_len(rest);
                    if n == 0 {
                        return Err(ParseError {
                            pos: col,
                            message: "a $ must start a cell address such as $B$3",
                        });
                    }
                    len = n;
                    token = Token::Ident(String::from(&rest[..n]));
                }
            }
        } else if let Some(op) = OPS.iter().find(|op| rest.starts_with(**op)) {
            len = op.len();
            token = Token::Op(op);
        } else {
            return Err(ParseError {
                pos: col,
                message: "a character that has no meaning in a formula",
            });
        }
        col += rest[..len].chars().count();
        i += len;
        out.push(Spanned {
            token,
            pos: start_col,
        });
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn kinds(s: &str) -> Vec<Token> {
        tokenize(s).unwrap().into_iter().map(|t| t.token).collect()
    }

    #[test]
    fn tokens_of_a_formula() {
        let t = kinds("SUM(A1:$B$2; 4k7Ω) & \"a\"\"b\" <> #N/A");
        assert_eq!(t[0], Token::Ident("SUM".into()));
        assert_eq!(t[1], Token::Op("("));
        assert_eq!(t[2], Token::Cell(CellRef::parse("A1").unwrap()));
        assert_eq!(t[3], Token::Op(":"));
        assert_eq!(t[6], Token::Number(4700.0, Some(Unit::Ohm)));
        assert_eq!(t[9], Token::Text("a\"b".into()));
        assert_eq!(t[10], Token::Op("<>"));
        assert_eq!(t[11], Token::Error(ErrorKind::NotAvailable));
    }

    #[test]
    fn function_names_that_look_like_cells() {
        assert_eq!(kinds("LOG10(2)")[0], Token::Ident("LOG10".into()));
        assert_eq!(
            kinds("LOG10")[0],
            Token::Cell(CellRef::parse("LOG10").unwrap())
        );
        assert_eq!(
            kinds("FEEDBACK.GAIN(1;2)")[0],
            Token::Ident("FEEDBACK.GAIN".into())
        );
    }

    #[test]
    fn errors_carry_positions() {
        assert_eq!(tokenize("1 + \"abc").unwrap_err().pos, 5);
        assert_eq!(tokenize("µ + 1 ? 2").unwrap_err().pos, 1);
        assert_eq!(tokenize("1 + 2 ? 2").unwrap_err().pos, 7);
        assert_eq!(tokenize("#BAD").unwrap_err().pos, 1);
        // The column of the first character that does not read: the x.
        assert_eq!(tokenize("1 + 3x").unwrap_err().pos, 6);
        let long = "1+".repeat(3000);
        assert!(tokenize(&long).is_err());
    }
}
