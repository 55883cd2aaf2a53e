//! Reads lines of hex-encoded JSON texts on stdin; for each writes, tab-separated,
//! the flat form of what `loopwright::json::parse` read (or `error`), and the hex
//! of the value written back by `JsonWriter` compact and pretty. Used by
//! `tests/reference/json_oracle.py --check`, which checks both against Python's
//! `json` module.

use loopwright::json::{parse, Json, JsonWriter};
use std::io::{BufRead, Write};

#[path = "../tests/support/json_flat.rs"]
mod json_flat;

fn unhex(s: &str) -> Option<String> {
    let bytes: Option<Vec<u8>> = (0..s.len())
        .step_by(2)
        .map(|i| s.get(i..i + 2).and_then(|h| u8::from_str_radix(h, 16).ok()))
        .collect();
    String::from_utf8(bytes?).ok()
}

fn hex(s: &str) -> String {
    s.bytes().map(|b| format!("{b:02x}")).collect()
}

fn write(w: &mut JsonWriter, v: &Json) {
    match v {
        Json::Null => w.null(),
        Json::Bool(b) => w.boolean(*b),
        Json::Number(n) => w.number(n.value),
        Json::String(s) => w.string(s),
        Json::Array(items) => {
            w.begin_array();
            items.iter().for_each(|x| write(w, x));
            w.end_array();
        }
        Json::Object(members) => {
            w.begin_object();
            for (k, x) in members {
                w.key(k);
                write(w, x);
            }
            w.end_object();
        }
    }
}

fn main() {
    let stdin = std::io::stdin();
    let mut out = std::io::BufWriter::new(std::io::stdout());
    for line in stdin.lock().lines() {
        let line = line.expect("stdin");
        let Some(text) = unhex(line.trim()) else {
            writeln!(out, "error\t\t").expect("stdout");
            continue;
        };
        let line = match parse(&text) {
            Ok(v) => {
                let (mut compact, mut pretty) = (JsonWriter::new(), JsonWriter::pretty());
                write(&mut compact, &v);
                write(&mut pretty, &v);
                format!(
                    "{}\t{}\t{}",
                    json_flat::flat(&v),
                    hex(&compact.finish()),
                    hex(&pretty.finish())
                )
            }
            Err(_) => "error\t\t".into(),
        };
        writeln!(out, "{line}").expect("stdout");
    }
}
