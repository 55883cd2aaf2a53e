#!/usr/bin/env python3
"""Draws docs/figures/two-crossings.svg: the loop gain T = 0.1/(1 + s/(Q w0) + s^2/w0^2),
f0 = 1 MHz, Q = 20, which crosses |T| = 1 twice, with both crossings and the phase
margin read at each (180 - |angle T|). Standard library only; re-run to redraw:

    python3 docs/figures/two_crossings.py
"""
import cmath
import math
from pathlib import Path

OUT = Path(__file__).with_name("two-crossings.svg")
GAIN, F0, Q = 0.1, 1e6, 20.0
F_LO, F_HI = 3e5, 3e6
W, H = 640, 430
LEFT, RIGHT = 70, 20
MAG_TOP, MAG_H = 40, 150
PH_TOP, PH_H = 240, 140
DB_RANGE = (-40.0, 40.0)
DEG_RANGE = (-180.0, 0.0)


def loop(f):
    x = f / F0
    return GAIN / complex(1 - x * x, x / Q)


def crossing(lo, hi):
    """Bisection on ln|T| in ln f between two frequencies that bracket |T| = 1."""
    g = lambda f: math.log(abs(loop(f)))
    for _ in range(200):
        mid = math.sqrt(lo * hi)
        if (g(mid) > 0) == (g(lo) > 0):
            lo = mid
        else:
            hi = mid
    return math.sqrt(lo * hi)


def xpix(f):
    return LEFT + (W - LEFT - RIGHT) * math.log(f / F_LO) / math.log(F_HI / F_LO)


def ypix(v, rng, top, height):
    return top + height * (rng[1] - v) / (rng[1] - rng[0])


def polyline(points, cls):
    pts = " ".join(f"{x:.1f},{y:.1f}" for x, y in points)
    return f'<polyline class="{cls}" points="{pts}"/>'


def main():
    n = 600
    fs = [F_LO * (F_HI / F_LO) ** (i / n) for i in range(n + 1)]
    mag = [(xpix(f), ypix(max(DB_RANGE[0], 20 * math.log10(abs(loop(f)))), DB_RANGE, MAG_TOP, MAG_H)) for f in fs]
    ph = [(xpix(f), ypix(math.degrees(cmath.phase(loop(f))), DEG_RANGE, PH_TOP, PH_H)) for f in fs]
    peak = F0 * math.sqrt(1 - 1 / (2 * Q * Q))
    rising, falling = crossing(F_LO, peak), crossing(peak, F_HI)
    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {W} {H}" width="{W}" height="{H}" '
        'font-family="sans-serif" font-size="12">',
        "<style>.frame{fill:none;stroke:#9aa4ae}.unity{stroke:#6b7785;stroke-dasharray:4 3}"
        ".mag{fill:none;stroke:#1f6f8b;stroke-width:2}.ph{fill:none;stroke:#b8572a;stroke-width:2}"
        ".cross{stroke:#4c9a2a;stroke-dasharray:2 3}.bar{stroke:#4c9a2a;stroke-width:5;opacity:.6}"
        ".note{fill:#23303d}.axis{fill:#56616c}</style>",
        f'<rect width="{W}" height="{H}" fill="#fbfaf7"/>',
        f'<text class="note" x="{LEFT}" y="22">Loop gain 0.1/(1 + s/(Q·ω0) + s²/ω0²), f0 = 1 MHz, Q = 20: '
        "|T| crosses 1 twice</text>",
    ]
    for top, height, rng, unit in ((MAG_TOP, MAG_H, DB_RANGE, "dB"), (PH_TOP, PH_H, DEG_RANGE, "°")):
        out.append(f'<rect class="frame" x="{LEFT}" y="{top}" width="{W - LEFT - RIGHT}" height="{height}"/>')
        for v in (rng[0], (rng[0] + rng[1]) / 2, rng[1]):
            out.append(f'<text class="axis" x="{LEFT - 6}" y="{ypix(v, rng, top, height) + 4:.1f}" '
                       f'text-anchor="end">{v:g}{unit}</text>')
    for f, label in ((3e5, "300 kHz"), (1e6, "1 MHz"), (3e6, "3 MHz")):
        out.append(f'<text class="axis" x="{xpix(f):.1f}" y="{PH_TOP + PH_H + 16}" text-anchor="middle">{label}</text>')
    y0 = ypix(0, DB_RANGE, MAG_TOP, MAG_H)
    out.append(f'<line class="unity" x1="{LEFT}" y1="{y0:.1f}" x2="{W - RIGHT}" y2="{y0:.1f}"/>')
    out.append(f'<text class="axis" x="{W - RIGHT - 4}" y="{y0 - 4:.1f}" text-anchor="end">|T| = 1</text>')
    y180 = ypix(-180, DEG_RANGE, PH_TOP, PH_H)
    out.append(polyline(mag, "mag"))
    out.append(polyline(ph, "ph"))
    worst = None
    for f, side in ((rising, "rising"), (falling, "falling")):
        angle = math.degrees(cmath.phase(loop(f)))
        pm = 180 - abs(angle)
        worst = pm if worst is None else min(worst, pm)
        x = xpix(f)
        out.append(f'<line class="cross" x1="{x:.1f}" y1="{MAG_TOP}" x2="{x:.1f}" y2="{PH_TOP + PH_H}"/>')
        ya = ypix(angle, DEG_RANGE, PH_TOP, PH_H)
        out.append(f'<line class="bar" x1="{x:.1f}" y1="{ya:.1f}" x2="{x:.1f}" y2="{y180:.1f}"/>')
        anchor, dx = ("end", -8) if side == "rising" else ("start", 10)
        out.append(f'<text class="note" x="{x + dx:.1f}" y="{MAG_TOP + MAG_H + 18}" text-anchor="{anchor}">'
                   f"{side}, {f / 1e3:.1f} kHz</text>")
        out.append(f'<text class="note" x="{x + dx:.1f}" y="{(ya + y180) / 2 + 4:.1f}" text-anchor="{anchor}">'
                   f"∠T = {angle:.1f}°, margin {pm:.1f}°</text>")
    out.append(f'<text class="note" x="{LEFT}" y="{H - 8}">Margin at each crossing: 180° − |∠T|, '
               f"the smaller of lag and lead to −1. Reported: the smaller, {worst:.1f}°.</text>")
    out.append("</svg>")
    OUT.write_text("\n".join(out) + "\n")
    print(f"wrote {OUT}")


if __name__ == "__main__":
    main()
