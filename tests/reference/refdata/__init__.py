"""What the reference scripts share: writing their committed data, and `--check`,
which recomputes it and compares it with the committed file.

`python tests/reference/NAME.py` writes `tests/reference/data/NAME.json`;
`python tests/reference/NAME.py --check` recomputes and compares, number by number
within the script's stated tolerance, and exits 1 naming the places that differ.
"""

import json
import math
import sys


def _is_number(x):
    return isinstance(x, (int, float)) and not isinstance(x, bool)


def compare(new, old, rel_tol, abs_tol=0.0, path="$"):
    """The places where `new` and `old` differ, as JSON paths with both values:
    the same keys and lengths, floats within `rel_tol` (or `abs_tol`, for values
    near 0), everything else equal."""
    if isinstance(new, dict) and isinstance(old, dict):
        if new.keys() != old.keys():
            return [f"{path}: keys differ ({sorted(new.keys() ^ old.keys())})"]
        bad = []
        for k in new:
            bad += compare(new[k], old[k], rel_tol, abs_tol, f"{path}.{k}")
        return bad
    if isinstance(new, list) and isinstance(old, list):
        if len(new) != len(old):
            return [f"{path}: lengths differ ({len(new)} recomputed, {len(old)} committed)"]
        bad = []
        for i, (a, b) in enumerate(zip(new, old)):
            bad += compare(a, b, rel_tol, abs_tol, f"{path}[{i}]")
        return bad
    if (isinstance(new, float) or isinstance(old, float)) and _is_number(new) and _is_number(old):
        same = math.isclose(new, old, rel_tol=rel_tol, abs_tol=abs_tol)
    else:
        same = new == old
    return [] if same else [f"{path}: recomputed {new!r}, committed {old!r}"]


def write_or_check(data, out, rel_tol, abs_tol=0.0, summary="committed data matches"):
    """With `--check` on the command line: compare `data` with the committed `out`
    (print `ok: summary`, or the first 20 differences and exit 1); otherwise
    write `data` to `out`."""
    if "--check" in sys.argv[1:]:
        bad = compare(data, json.loads(out.read_text()), rel_tol, abs_tol)
        for line in bad[:20]:
            print("differs:", line)
        if bad:
            print(f"{len(bad)} differences from {out}")
            sys.exit(1)
        print("ok:", summary)
        return
    out.write_text(json.dumps(data, indent=1) + "\n")
    print("wrote", out)
