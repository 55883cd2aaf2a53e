#!/usr/bin/env python3
"""Python's `json` module (RFC 8259) as the oracle of the crate's one JSON reader
and writer (`src/json/`).

Cases, from a fixed seed: 400 random documents (objects, arrays, strings with
escapes, control characters, quotes, non-ASCII and astral characters, numbers
from random bit patterns, whole numbers up to 10^30, subnormals, +-0, +-max)
written by `json.dumps` with random indentation, separators and `ensure_ascii`;
150 number texts written by hand in every form RFC 8259 section 6 allows
(exponent letters, signs, long mantissas, under- and overflow); 250 copies of
valid texts with one character deleted, inserted or replaced (most are then
invalid).

Python reads each text with `object_pairs_hook` (members kept in order, with
duplicates) and `float()` for every number (correctly rounded; `-0` stays
negative zero). Expected: the flat token line of that value (see
`tests/support/json_flat.rs`), or `error` when Python refuses the text, when a
number overflows to infinity, or when a string holds a lone surrogate (RFC 8259
section 8.2; the crate refuses these).

Writes tests/reference/data/json_oracle.txt (hex of the text, tab, expected),
which tests/json_reference.rs compares with what the crate reads. With --check,
recomputes and compares the file, then runs `cargo run --example json_echo` over
the texts and checks that (1) the crate reads the same values as Python and
(2) Python reads the crate's written text (compact and pretty) back to the same
values, bit for bit.

    ~/.cache/loopwright/venv/bin/python tests/reference/json_oracle.py [--check]
"""
import json
import math
import random
import struct
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
OUT = Path(__file__).parent / "data" / "json_oracle.txt"
SEED = 8259  # the RFC's number


class Refused(Exception):
    pass


def bits(x):
    return struct.unpack("<Q", struct.pack("<d", x))[0]


def flat(v, out):
    kind = v[0] if isinstance(v, tuple) else None
    if v is None:
        out.append("n")
    elif v is True:
        out.append("t")
    elif v is False:
        out.append("f")
    elif isinstance(v, float):
        if math.isinf(v) or math.isnan(v):
            raise Refused("number out of range")
        out.append(f"d:{bits(v):016x}")
    elif isinstance(v, str):
        if any(0xD800 <= ord(c) <= 0xDFFF for c in v):
            raise Refused("lone surrogate")
        out.append("s:" + v.encode("utf-8").hex())
    elif isinstance(v, list):
        out.append(f"[{len(v)}")
        for x in v:
            flat(x, out)
    elif kind == "obj":
        pairs = v[1]
        out.append("{" + str(len(pairs)))
        for k, x in pairs:
            if any(0xD800 <= ord(c) <= 0xDFFF for c in k):
                raise Refused("lone surrogate")
            out.append("k:" + k.encode("utf-8").hex())
            flat(x, out)
    else:
        raise AssertionError(v)
    return out


def python_reads(text):
    """The flat line of Python's reading of `text`, or "error"."""
    try:
        v = json.loads(
            text,
            object_pairs_hook=lambda pairs: ("obj", pairs),
            parse_float=float,
            parse_int=float,
            parse_constant=lambda name: (_ for _ in ()).throw(Refused(name)),
        )
        return " ".join(flat(v, []))
    except (ValueError, Refused, OverflowError, RecursionError):
        return "error"


def random_string(rng):
    pools = [
        lambda: chr(rng.randrange(0x20, 0x7F)),
        lambda: chr(rng.randrange(0, 0x20)),
        lambda: rng.choice('"\\/'),
        lambda: chr(rng.randrange(0xA0, 0xD800)),
        lambda: chr(rng.randrange(0xE000, 0x10000)),
        lambda: chr(rng.randrange(0x10000, 0x110000)),
        lambda: rng.choice("\u2028\u2029\u00b5\u03a9\u2126"),
    ]
    return "".join(rng.choice(pools)() for _ in range(rng.randrange(0, 12)))


def random_number(rng):
    pick = rng.randrange(8)
    if pick == 0:
        return rng.randrange(-(10**30), 10**30)
    if pick == 1:
        return rng.randrange(-1000, 1000)
    if pick == 2:
        return rng.choice([0.0, -0.0, 5e-324, -5e-324, 2.2250738585072014e-308,
                           1.7976931348623157e308, -1.7976931348623157e308, 0.1, 1e15, 1e-6])
    while True:
        x = struct.unpack("<d", struct.pack("<Q", rng.getrandbits(64)))[0]
        if math.isfinite(x):
            return x


def random_value(rng, depth):
    pick = rng.randrange(10 if depth < 5 else 6)
    if pick == 0:
        return None
    if pick == 1:
        return rng.random() < 0.5
    if pick in (2, 3):
        return random_number(rng)
    if pick in (4, 5):
        return random_string(rng)
    if pick in (6, 7):
        return [random_value(rng, depth + 1) for _ in range(rng.randrange(0, 5))]
    keys = list(dict.fromkeys(random_string(rng) for _ in range(rng.randrange(0, 5))))
    return {k: random_value(rng, depth + 1) for k in keys}


def number_text(rng):
    sign = rng.choice(["", "", "-"])
    first = rng.choice(["0"] + [str(d) for d in range(1, 10)])
    more = "" if first == "0" else "".join(rng.choice("0123456789") for _ in range(rng.randrange(0, 25)))
    frac = rng.choice(["", "." + "".join(rng.choice("0123456789") for _ in range(rng.randrange(1, 30)))])
    exp = rng.choice(["", "e", "E"])
    if exp:
        exp += rng.choice(["", "+", "-"]) + str(rng.randrange(0, 400))
    return sign + first + more + frac + exp


def mutate(rng, text):
    i = rng.randrange(0, len(text) + 1)
    c = rng.choice(list('{}[]:,"\\ 0-.eE+tfnu') + [chr(rng.randrange(0, 0x80))])
    op = rng.randrange(3)
    if op == 0 and text:
        return text[:i] + text[i + 1:]
    if op == 1:
        return text[:i] + c + text[i:]
    return text[:i] + c + text[i + 1:]


def cases():
    rng = random.Random(SEED)
    texts = []
    for _ in range(400):
        v = random_value(rng, 0)
        texts.append(json.dumps(
            v,
            ensure_ascii=rng.random() < 0.5,
            indent=rng.choice([None, None, 0, 2, "\t"]),
            separators=rng.choice([None, (",", ":"), (" , ", " : ")]),
        ))
    texts += [number_text(rng) for _ in range(150)]
    for _ in range(250):
        texts.append(mutate(rng, rng.choice(texts[:400])))
    return [(t, python_reads(t)) for t in texts]


def write(rows):
    return "".join(f"{t.encode('utf-8').hex()}\t{want}\n" for t, want in rows)


def check_echo(rows):
    """Run the crate over the texts; compare what it reads and what it writes."""
    stdin = "".join(t.encode("utf-8").hex() + "\n" for t, _ in rows)
    run = subprocess.run(
        ["cargo", "run", "--quiet", "--example", "json_echo"],
        cwd=ROOT, input=stdin, capture_output=True, text=True, check=True,
    )
    lines = run.stdout.splitlines()
    assert len(lines) == len(rows), (len(lines), len(rows))
    bad = 0
    for (text, want), line in zip(rows, lines):
        got, compact, pretty = line.split("\t")
        if got != want:
            bad += 1
            print(f"read {text!r}: crate {got[:80]}, python {want[:80]}")
            continue
        if want == "error":
            continue
        for written in (compact, pretty):
            back = python_reads(bytes.fromhex(written).decode("utf-8"))
            if back != want:
                bad += 1
                at = next((i for i, (a, b) in enumerate(zip(back, want)) if a != b), min(len(back), len(want)))
                print(f"written {bytes.fromhex(written)!r} reads back as ...{back[at - 40:at + 40]}, want ...{want[at - 40:at + 40]}")
    return bad


def main():
    rows = cases()
    text = write(rows)
    errors = sum(1 for _, w in rows if w == "error")
    if "--check" in sys.argv:
        if OUT.read_text(encoding="utf-8") != text:
            print(f"{OUT.name}: differs from the committed data")
            sys.exit(1)
        bad = check_echo(rows)
        print(f"json_oracle: {len(rows)} texts ({errors} refused by Python), {bad} mismatches")
        sys.exit(1 if bad else 0)
    OUT.write_text(text, encoding="utf-8")
    print(f"wrote {OUT} ({len(rows)} texts, {errors} refused)")


if __name__ == "__main__":
    main()
