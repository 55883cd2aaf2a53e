#!/usr/bin/env python3
"""Expected displays of numbers with significant digits and SI prefixes, computed
with Python's `decimal` module (exact value of each double, rounded to d
significant digits, ties to even) and the SI Brochure's rules (BIPM, 9th ed.,
2019: table 7 prefixes f ... T, §5.4.3 a space between number and unit, the prefix
written on the unit). Python's own `format(x, '.{d-1}e')` is checked to agree with
`decimal` for every case, so two independent roundings back each expectation.

Cases: every prefix boundary just below and at the rounding point (999.95 k at
4 digits -> 1 M, 999.949 k -> 999.9 k), subnormals (5e-324, 2.225e-308), 0,
+-max, and 400 seeded log-uniform doubles from 1e-324 to 1e308, each at 1 ... 15
digits in turn.

Writes tests/reference/data/notation_format.json: for each case the double as
its shortest repr, the digits, `display` (format_value with unit "Ohm" symbol),
`si` (format_si: trailing zeros kept, no unit), which tests/notation_format.rs
compares exactly. With --check, recompute and compare (exit 1 on a mismatch).

    ~/.cache/loopwright/venv/bin/python tests/reference/notation_format.py [--check]
"""
import decimal
import json
import random
import sys
from pathlib import Path

OUT = Path(__file__).parent / "data" / "notation_format.json"
SEED = 20190520  # the day the 2019 SI took effect
PREFIX = {-15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G", 12: "T"}


def rounded(x, d):
    """(digit string of d digits, exponent of the first digit) of |x| rounded."""
    ctx = decimal.Context(prec=d, rounding=decimal.ROUND_HALF_EVEN, Emin=-9999, Emax=9999)
    q = ctx.plus(decimal.Decimal(abs(x)))
    sign, digits, exp = q.as_tuple()
    ds = "".join(map(str, digits)).ljust(d, "0")[:d]
    first = exp + len(digits) - 1
    # Cross-check with Python's float formatting (a second, independent rounding).
    mant, e = format(abs(x), f".{d - 1}e").split("e")
    assert mant.replace(".", "") == ds and int(e) == first, (x, d, mant, e, ds, first)
    return ds, first


def place(ds, int_len):
    if len(ds) <= int_len:
        return ds + "0" * (int_len - len(ds))
    return ds[:int_len] + "." + ds[int_len:]


def trim(s):
    if "." in s:
        s = s.rstrip("0").rstrip(".")
    return s


def si_parts(x, d):
    ds, e = rounded(x, d)
    e3 = (e // 3) * 3
    return place(ds, e - e3 + 1), e3, ds, e


def display(x, d, unit="Ω"):
    if x == 0:
        return f"0 {unit}"
    sign = "-" if x < 0 else ""
    m, e3, ds, e = si_parts(x, d)
    if e3 in PREFIX:
        return f"{sign}{trim(m)} {PREFIX[e3]}{unit}"
    return f"{sign}{trim(place(ds, 1))}e{e} {unit}"


def si(x, d):
    if x == 0:
        return "0"
    sign = "-" if x < 0 else ""
    m, e3, _, _ = si_parts(x, d)
    if e3 in PREFIX:
        p = PREFIX[e3]
        return f"{sign}{m} {p}" if p else f"{sign}{m}"
    return f"{sign}{m}e{e3}"


def values():
    xs = [0.0, 5e-324, -5e-324, 2.225e-308, 1.7976931348623157e308, -1.7976931348623157e308]
    for k in range(-15, 15, 3):
        for base in (999.95, 999.949, 999.5, 99.995, 9.9995, 1.0, 0.9995):
            xs.append(float(f"{base}e{k}"))
    rng = random.Random(SEED)
    for _ in range(400):
        xs.append(rng.choice((1, -1)) * 10 ** rng.uniform(-323.5, 308))
    return xs


def build():
    cases = []
    for i, x in enumerate(values()):
        for d in ((i % 15) + 1, 3, 4):
            cases.append({"x": repr(x), "digits": d, "display": display(x, d), "si": si(x, d)})
    return {"about": __doc__.split("\n\n")[0], "cases": cases}


def main():
    data = build()
    if "--check" in sys.argv[1:]:
        old = json.loads(OUT.read_text())
        bad = [f"{a['x']} @ {a['digits']}: {a} vs {b}" for a, b in zip(data["cases"], old["cases"]) if a != b]
        if len(data["cases"]) != len(old["cases"]):
            bad.append("case counts differ")
        for line in bad[:20]:
            print("differs:", line)
        if bad:
            sys.exit(1)
        print(f"notation_format: {len(data['cases'])} cases match")
        return
    rows = ",\n".join("  " + json.dumps(c, ensure_ascii=False) for c in data["cases"])
    OUT.write_text(f'{{"about": {json.dumps(data["about"])},\n "cases": [\n{rows}\n]}}\n')
    print("wrote", OUT)


if __name__ == "__main__":
    main()
