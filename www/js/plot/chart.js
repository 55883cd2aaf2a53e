// Line charts as hand-drawn SVG (no chart library: a few hundred lines cover the
// Bode, response and step plots, add nothing to download, and need no inline
// styles, so they work under the page's strict content security policy).
//
// lineChart({title, width, height, x: {label, log, ticks?, tickText?}, y: {label, log?, domain?},
//            series: [{label, x, y, kind, floor?}], markers: [...], note?})
// returns an <svg> element. Series and markers are styled by CSS classes
// (plot-series-<kind>, plot-marker-<kind>), so the look stays in the stylesheet.
// A series' `floor` leaves out the points below it (a numerical floor: what is
// under it is not a result); `note` is a line of small text inside the plot
// saying so. An axis may bring its own `ticks` (with its `domain`) and `tickText`
// (a display mapping's axis labels its ticks with the values they stand for). The width follows the window (at most 640), so that the tick labels
// keep their size on a phone; the left margin follows the longest tick label;
// the legend moves under the title when both do not fit on one line.

import {
  makeScale,
  extent,
  linearTicks,
  niceDomain,
  decadeTicks,
  tickLabel,
  plainAxis,
} from './scale.js';
import { NS, svg } from './svg.js';
import { drawMarkers, textWidth } from './markers.js';

export { svg } from './svg.js';

const MARGIN = { top: 26, right: 16, bottom: 40, left: 56 };

/** Narrowest and widest drawing, px (viewBox units, shown about 1:1). */
const WIDTH = { min: 300, max: 640 };

/** The chart width for this window: the card's width on a phone, 640 elsewhere. */
export function chartWidth() {
  const w = globalThis.innerWidth;
  if (!Number.isFinite(w)) return WIDTH.max;
  return Math.round(Math.min(WIDTH.max, Math.max(WIDTH.min, w - 70)));
}

function axisTicks(axis, domainFrom, count) {
  if (axis.ticks) return { ticks: axis.ticks, domain: axis.domain };
  if (axis.log) return decadeTicks(...(axis.domain ?? domainFrom(true)));
  const domain = axis.domain ?? niceDomain(...domainFrom(false));
  return { ticks: linearTicks(...domain, count).ticks, domain };
}

/** A tick's label: the axis' own `tickText` (a mapped axis names the value shown), else the number. */
const labelOf = (t, axis) => (axis.tickText ? axis.tickText(t) : tickLabel(t, plainAxis(axis)));

/** Every k-th tick label, k as small as keeps neighbouring labels apart. */
function thinned(labels, span) {
  const widest = Math.max(...labels.map(textWidth), 1);
  const room = span / Math.max(1, labels.length - 1);
  const k = Math.max(1, Math.ceil((widest + 8) / room));
  return labels.map((l, i) => (i % k === 0 ? l : ''));
}

function gridAndTicks(x, y, { sx, sy, xTicks, yTicks, inner }) {
  const grid = svg('g', { class: 'plot-grid' });
  const xLabels = thinned(
    xTicks.map((t) => labelOf(t, x)),
    inner.x1 - inner.x0,
  );
  xTicks.forEach((t, i) => {
    const px = sx(t);
    grid.append(svg('line', { x1: px.toFixed(1), x2: px.toFixed(1), y1: inner.y1, y2: inner.y0 }));
    // The end labels stay inside the drawing.
    const w = textWidth(xLabels[i]) / 2;
    const cx = Math.min(Math.max(px, w + 2), inner.x1 + MARGIN.right - w - 2);
    grid.append(
      svg(
        'text',
        { x: cx.toFixed(1), y: inner.y0 + 16, 'text-anchor': 'middle', class: 'plot-tick' },
        xLabels[i],
      ),
    );
  });
  for (const t of yTicks) {
    const py = sy(t);
    grid.append(svg('line', { x1: inner.x0, x2: inner.x1, y1: py.toFixed(1), y2: py.toFixed(1) }));
    // The top label sits below the frame's top edge, clear of the title.
    const ty = Math.max(py + 4, inner.y1 + 9);
    grid.append(
      svg(
        'text',
        { x: inner.x0 - 6, y: ty.toFixed(1), 'text-anchor': 'end', class: 'plot-tick' },
        labelOf(t, y),
      ),
    );
  }
  return grid;
}

/** Approximate width of the 12 px bold title font, px per character. */
const TITLE_CHAR_PX = 7.2;

/** `text` broken at spaces into lines of at most `width` px (`charPx` per character). */
function wrapped(text, width, charPx) {
  const lines = [];
  let line = '';
  for (const word of String(text).split(' ')) {
    const next = line ? `${line} ${word}` : word;
    if (line && next.length * charPx > width) {
      lines.push(line);
      line = word;
    } else line = next;
  }
  if (line) lines.push(line);
  return lines;
}

/** A text element of several lines (tspans), `step` px apart. */
function multiline(attrs, lines, step) {
  const t = svg('text', attrs);
  lines.forEach((line, i) => {
    // A space kept at each break, so that the element's text reads as written.
    const text = i < lines.length - 1 ? `${line} ` : line;
    t.append(svg('tspan', { x: attrs.x, dy: i === 0 ? 0 : step }, text));
  });
  return t;
}

function frameAndLabels(root, { x, y, titleLines, inner, height }) {
  root.append(
    svg('rect', {
      x: inner.x0,
      y: inner.y1,
      width: inner.x1 - inner.x0,
      height: inner.y0 - inner.y1,
      class: 'plot-frame',
    }),
  );
  const mid = (inner.y0 + inner.y1) / 2;
  root.append(
    svg(
      'text',
      {
        x: (inner.x0 + inner.x1) / 2,
        y: height - 6,
        'text-anchor': 'middle',
        class: 'plot-axis-label',
      },
      x.label,
    ),
    svg(
      'text',
      {
        x: 12,
        y: mid,
        'text-anchor': 'middle',
        class: 'plot-axis-label',
        transform: `rotate(-90 12 ${mid})`,
      },
      y.label,
    ),
    multiline({ x: 8, y: 16, class: 'plot-title' }, titleLines, 14),
  );
}

function legendOf(series, { x1, y }) {
  const legend = svg('g', { class: 'plot-legend' });
  let lx = x1;
  for (const s of [...series].reverse()) {
    if (!s.label) continue;
    legend.append(
      svg(
        'text',
        { x: lx, y, 'text-anchor': 'end', class: `plot-legend-${s.kind ?? 'a'}` },
        `— ${s.label}`,
      ),
    );
    lx -= 10 + 7 * (s.label.length + 2);
  }
  return legend;
}

const legendWidth = (series) =>
  series.filter((s) => s.label).reduce((n, s) => n + 10 + 7 * (s.label.length + 2), 0);

/** The series as drawn: points under a series' floor left out. */
const aboveFloor = (s) =>
  s.floor === undefined ? s.y : Array.from(s.y, (v) => (v >= s.floor ? v : Number.NaN));

export function lineChart({
  title,
  width = chartWidth(),
  height = 260,
  x,
  y,
  series,
  markers = [],
  note,
}) {
  const root = svg('svg', {
    xmlns: NS,
    viewBox: `0 0 ${width} ${height}`,
    class: 'plot',
    role: 'img',
    'aria-label': note ? `${title}. ${note}` : title,
  });
  root.append(svg('title', {}, note ? `${title}. ${note}` : title));
  const drawn = series.map((s) => ({ ...s, y: aboveFloor(s) }));
  const xs = drawn.map((s) => s.x);
  const ys = drawn.map((s) => s.y);
  const xt = axisTicks(x, (log) => extent(xs, log), 6);
  const yt = axisTicks(y, (log) => extent(ys, log), 5);
  // Room for the widest y tick label and the rotated axis label.
  const left = Math.max(40, 26 + Math.max(...yt.ticks.map((t) => textWidth(labelOf(t, y)))));
  // The title wraps when it is wider than the drawing; the legend goes on a line
  // of its own when it does not fit beside the title's last line.
  const titleLines = wrapped(title, width - 16, TITLE_CHAR_PX);
  const lastLine = titleLines.at(-1) ?? '';
  const ownLine = lastLine.length * TITLE_CHAR_PX + legendWidth(series) + 24 > width;
  const legendY = 16 + 14 * (titleLines.length - 1) + (ownLine ? 14 : 0);
  const top = MARGIN.top + (legendY - 16);
  const inner = { x0: left, x1: width - MARGIN.right, y0: height - MARGIN.bottom, y1: top };
  const sx = makeScale(xt.domain, [inner.x0, inner.x1], x.log);
  const sy = makeScale(yt.domain, [inner.y0, inner.y1], y.log);
  root.append(gridAndTicks(x, y, { sx, sy, xTicks: xt.ticks, yTicks: yt.ticks, inner }));
  frameAndLabels(root, { x, y, titleLines, inner, height });

  const clipId = `clip-${Math.random().toString(36).slice(2, 10)}`;
  const defs = svg('defs');
  const clip = svg('clipPath', { id: clipId });
  clip.append(
    svg('rect', {
      x: inner.x0,
      y: inner.y1,
      width: inner.x1 - inner.x0,
      height: inner.y0 - inner.y1,
    }),
  );
  defs.append(clip);
  root.append(defs);
  const plotArea = svg('g', { 'clip-path': `url(#${clipId})` });
  for (const s of drawn)
    plotArea.append(
      svg('path', {
        d: pathOf(s.x, s.y, sx, sy),
        class: `plot-series plot-series-${s.kind ?? 'a'}`,
      }),
    );
  // Markers place their labels inside the frame; the clip keeps a band that
  // reaches past the axis range inside too.
  plotArea.append(...drawMarkers(markers, sx, sy, inner));
  root.append(plotArea);
  if (note) {
    const lines = wrapped(note, inner.x1 - inner.x0 - 8, 5.6);
    const y0 = inner.y0 - 5 - 12 * (lines.length - 1);
    root.append(multiline({ x: inner.x0 + 4, y: y0, class: 'plot-note' }, lines, 12));
  }
  root.append(legendOf(series, { x1: inner.x1, y: legendY }));
  return root;
}

function pathOf(xs, ys, sx, sy) {
  let d = '';
  let pen = false;
  for (let i = 0; i < xs.length; i++) {
    const ok =
      Number.isFinite(xs[i]) &&
      Number.isFinite(ys[i]) &&
      (!sx.log || xs[i] > 0) &&
      (!sy.log || ys[i] > 0);
    if (!ok) {
      pen = false;
      continue;
    }
    d += `${pen ? 'L' : 'M'}${sx(xs[i]).toFixed(1)},${sy(ys[i]).toFixed(1)}`;
    pen = true;
  }
  return d || 'M0,0';
}
