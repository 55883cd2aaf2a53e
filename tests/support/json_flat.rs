//! A JSON value as a flat line of tokens, the form `tests/reference/json_oracle.py`
//! writes for Python's reading of the same text: `n` null, `t`/`f`, `d:` and the
//! 16 hex digits of the f64's bits, `s:` and the hex of the UTF-8 bytes, `[N` and
//! `{N` for an array or object of N items, `k:` and hex for a member name; in
//! document order, separated by spaces.

use loopwright::json::Json;

fn hex(s: &str) -> String {
    s.bytes().map(|b| format!("{b:02x}")).collect()
}

/// The tokens of `v`, appended to `out`.
pub fn flatten(v: &Json, out: &mut Vec<String>) {
    match v {
        Json::Null => out.push("n".into()),
        Json::Bool(b) => out.push(if *b { "t" } else { "f" }.into()),
        Json::Number(n) => out.push(format!("d:{:016x}", n.value.to_bits())),
        Json::String(s) => out.push(format!("s:{}", hex(s))),
        Json::Array(items) => {
            out.push(format!("[{}", items.len()));
            items.iter().for_each(|x| flatten(x, out));
        }
        Json::Object(members) => {
            out.push(format!("{{{}", members.len()));
            for (k, x) in members {
                out.push(format!("k:{}", hex(k)));
                flatten(x, out);
            }
        }
    }
}

/// The flat line of `v`.
pub fn flat(v: &Json) -> String {
    let mut out = Vec::new();
    flatten(v, &mut out);
    out.join(" ")
}
