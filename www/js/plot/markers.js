// Markers drawn over a line chart (chart.js), in the page's own look:
//  - a reference level ({y, label}): a thin solid rule with its label above it;
//  - a frequency or amplitude ({x, label, align?}): a thin rule with its label
//    inside the plot, turned to whichever side has room, staggered down so that
//    neighbouring labels do not overlap;
//  - a margin ({kind: 'margin', x, y0, y1, label}): a shaded band from the
//    reference level y0 to the curve's value y1 at x, closed by a bracket with end
//    caps and an annotation box — the value and where it is read, without a bar;
//  - an end value ({kind: 'level', y, label}): a small tab on the right edge of
//    the plot pointing at the level, its label inside beside it (no line across);
//  - a point ({x, y, label}): a ring.
// Colours and strokes live in the stylesheet (plot-marker-*).

import { svg } from './svg.js';

/** Approximate width of `text` at the 11 px tick font, px (for placing labels). */
export const textWidth = (text) => 6.2 * String(text).length;

const fixed = (v) => Number(v).toFixed(1);

function labelBox(g, { x, y, text, anchor }) {
  const w = textWidth(text) + 8;
  const left = anchor === 'end' ? x - w : x;
  g.append(svg('rect', { x: fixed(left), y: fixed(y - 11), width: fixed(w), height: 15, rx: 3 }));
  g.append(svg('text', { x: fixed(left + 4), y: fixed(y), class: 'plot-marker-text' }, text));
}

function marginMarker(m, sx, sy, inner) {
  const g = svg('g', { class: 'plot-marker plot-marker-margin' });
  const px = sx(m.x);
  const [ya, yb] = [sy(m.y0), sy(m.y1)];
  const [top, bottom] = [Math.min(ya, yb), Math.max(ya, yb)];
  const half = 7;
  g.append(
    svg('rect', {
      x: fixed(px - half),
      y: fixed(top),
      width: 2 * half,
      height: fixed(Math.max(1, bottom - top)),
      class: 'plot-band',
    }),
  );
  // The bracket on the band's right: a spine and two caps.
  const bx = px + half + 3;
  g.append(
    svg('path', {
      d: `M${fixed(bx - 4)},${fixed(top)}H${fixed(bx)}V${fixed(bottom)}H${fixed(bx - 4)}`,
      class: 'plot-bracket',
    }),
  );
  if (m.label) {
    const room = inner.x1 - bx > textWidth(m.label) + 14;
    labelBox(g, {
      x: room ? bx + 5 : px - half - 5,
      y: (top + bottom) / 2 + 4,
      text: m.label,
      anchor: room ? 'start' : 'end',
    });
  }
  return g;
}

function levelMarker(m, sy, inner) {
  const g = svg('g', { class: 'plot-marker plot-marker-level' });
  const py = sy(m.y);
  const x = inner.x1;
  g.append(
    svg('path', {
      d: `M${fixed(x)},${fixed(py - 5)}L${fixed(x - 8)},${fixed(py)}L${fixed(x)},${fixed(py + 5)}Z`,
      class: 'plot-tab',
    }),
  );
  if (m.label) {
    const below = py - inner.y1 < 18;
    labelBox(g, { x: x - 12, y: below ? py + 16 : py - 7, text: m.label, anchor: 'end' });
  }
  return g;
}

function xMarker(m, sx, inner, slot) {
  const g = svg('g', { class: 'plot-marker' });
  const px = sx(m.x);
  g.append(svg('line', { x1: fixed(px), x2: fixed(px), y1: inner.y1, y2: inner.y0 }));
  if (m.label) {
    const w = textWidth(m.label);
    const fitsRight = px + 4 + w <= inner.x1 - 2;
    const fitsLeft = px - 4 - w >= inner.x0 + 2;
    const left = (m.align === 'left' && fitsLeft) || !fitsRight;
    g.append(
      svg(
        'text',
        {
          x: fixed(left ? Math.max(px - 4, inner.x0 + 2 + w) : px + 4),
          y: inner.y1 + 12 + 13 * slot,
          'text-anchor': left ? 'end' : 'start',
        },
        m.label,
      ),
    );
  }
  return g;
}

function yMarker(m, sy, inner) {
  const g = svg('g', { class: 'plot-marker plot-marker-reference' });
  const py = sy(m.y);
  g.append(svg('line', { x1: inner.x0, x2: inner.x1, y1: fixed(py), y2: fixed(py) }));
  if (m.label) {
    const above = py - inner.y1 > 14;
    g.append(svg('text', { x: inner.x0 + 4, y: fixed(above ? py - 4 : py + 12) }, m.label));
  }
  return g;
}

function pointMarker(m, sx, sy) {
  const g = svg('g', { class: 'plot-marker' });
  const [px, py] = [sx(m.x), sy(m.y)];
  g.append(svg('circle', { cx: fixed(px), cy: fixed(py), r: 4 }));
  if (m.label) g.append(svg('text', { x: fixed(px + 6), y: fixed(py - 6) }, m.label));
  return g;
}

/** The SVG group of each marker, over the scales `sx`, `sy` and the plot box `inner`. */
export function drawMarkers(markers, sx, sy, inner) {
  let slot = 0;
  return markers.map((m) => {
    if (m.kind === 'margin') return marginMarker(m, sx, sy, inner);
    if (m.kind === 'level') return levelMarker(m, sy, inner);
    if (m.x !== undefined && m.y === undefined) return xMarker(m, sx, inner, slot++);
    if (m.y !== undefined && m.x === undefined) return yMarker(m, sy, inner);
    return pointMarker(m, sx, sy);
  });
}
