// Line charts as hand-drawn SVG (no chart library: a few hundred lines cover the
// Bode, response and step plots, add nothing to download, and need no inline
// styles, so they work under the page's strict content security policy).
//
// lineChart({title, width, height, x: {label, log}, y: {label, log?, domain?},
//            series: [{label, x, y, kind}], markers: [{kind, x?, y?, label, align?}]})
// returns an <svg> element. Series and markers are styled by CSS classes
// (plot-series-<kind>, plot-marker-<kind>), so the look stays in the stylesheet.

import {
  makeScale,
  extent,
  linearTicks,
  niceDomain,
  decadeTicks,
  tickLabel,
  plainAxis,
} from './scale.js';

const NS = 'http://www.w3.org/2000/svg';
const MARGIN = { top: 26, right: 14, bottom: 40, left: 56 };

export function svg(tag, attrs = {}, text) {
  const node = document.createElementNS(NS, tag);
  for (const [k, v] of Object.entries(attrs))
    if (v !== undefined && v !== null) node.setAttribute(k, String(v));
  if (text !== undefined) node.textContent = text;
  return node;
}

export function lineChart({ title, width = 640, height = 260, x, y, series, markers = [] }) {
  const root = svg('svg', {
    xmlns: NS,
    viewBox: `0 0 ${width} ${height}`,
    class: 'plot',
    role: 'img',
    'aria-label': title,
  });
  root.append(svg('title', {}, title));
  const inner = {
    x0: MARGIN.left,
    x1: width - MARGIN.right,
    y0: height - MARGIN.bottom,
    y1: MARGIN.top,
  };

  let xDomain = extent(
    series.map((s) => s.x),
    x.log,
  );
  let xTicks;
  if (x.log) ({ ticks: xTicks, domain: xDomain } = decadeTicks(...xDomain));
  else {
    xDomain = niceDomain(...xDomain);
    xTicks = linearTicks(...xDomain).ticks;
  }
  let yDomain;
  let yTicks;
  if (y.log)
    ({ ticks: yTicks, domain: yDomain } = decadeTicks(
      ...(y.domain ??
        extent(
          series.map((s) => s.y),
          true,
        )),
    ));
  else {
    yDomain = y.domain ?? niceDomain(...extent(series.map((s) => s.y)));
    yTicks = linearTicks(...yDomain, 5).ticks;
  }
  const sx = makeScale(xDomain, [inner.x0, inner.x1], x.log);
  const sy = makeScale(yDomain, [inner.y0, inner.y1], y.log);

  const grid = svg('g', { class: 'plot-grid' });
  for (const t of xTicks) {
    const px = sx(t).toFixed(1);
    grid.append(svg('line', { x1: px, x2: px, y1: inner.y1, y2: inner.y0 }));
    grid.append(
      svg(
        'text',
        { x: px, y: inner.y0 + 16, 'text-anchor': 'middle', class: 'plot-tick' },
        tickLabel(t, plainAxis(x)),
      ),
    );
  }
  for (const t of yTicks) {
    const py = sy(t).toFixed(1);
    grid.append(svg('line', { x1: inner.x0, x2: inner.x1, y1: py, y2: py }));
    grid.append(
      svg(
        'text',
        { x: inner.x0 - 6, y: Number(py) + 4, 'text-anchor': 'end', class: 'plot-tick' },
        tickLabel(t, plainAxis(y)),
      ),
    );
  }
  root.append(grid);
  root.append(
    svg('rect', {
      x: inner.x0,
      y: inner.y1,
      width: inner.x1 - inner.x0,
      height: inner.y0 - inner.y1,
      class: 'plot-frame',
    }),
  );
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
  );
  root.append(
    svg(
      'text',
      {
        x: 12,
        y: (inner.y0 + inner.y1) / 2,
        'text-anchor': 'middle',
        class: 'plot-axis-label',
        transform: `rotate(-90 12 ${(inner.y0 + inner.y1) / 2})`,
      },
      y.label,
    ),
  );
  root.append(svg('text', { x: inner.x0, y: 16, class: 'plot-title' }, title));

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
  for (const s of series)
    plotArea.append(
      svg('path', {
        d: pathOf(s.x, s.y, sx, sy),
        class: `plot-series plot-series-${s.kind ?? 'a'}`,
      }),
    );
  for (const m of markers) plotArea.append(marker(m, sx, sy, inner));
  root.append(plotArea);

  const legend = svg('g', { class: 'plot-legend' });
  let lx = inner.x1;
  for (const s of [...series].reverse()) {
    if (!s.label) continue;
    const text = svg(
      'text',
      { x: lx, y: 16, 'text-anchor': 'end', class: `plot-legend-${s.kind ?? 'a'}` },
      `— ${s.label}`,
    );
    legend.append(text);
    lx -= 10 + 7 * (s.label.length + 2);
  }
  root.append(legend);
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

function marker(m, sx, sy, inner) {
  const g = svg('g', { class: `plot-marker plot-marker-${m.kind}` });
  if (m.y0 !== undefined) {
    // A vertical span at x from y0 to y1: a margin drawn as a bar.
    const px = sx(m.x).toFixed(1);
    g.append(
      svg('line', {
        x1: px,
        x2: px,
        y1: sy(m.y0).toFixed(1),
        y2: sy(m.y1).toFixed(1),
        class: 'plot-span',
      }),
    );
    if (m.label)
      g.append(
        svg('text', { x: Number(px) + 5, y: ((sy(m.y0) + sy(m.y1)) / 2 + 4).toFixed(1) }, m.label),
      );
  } else if (m.x !== undefined && m.y === undefined) {
    const px = sx(m.x).toFixed(1);
    g.append(svg('line', { x1: px, x2: px, y1: inner.y1, y2: inner.y0 }));
    if (m.label) {
      const left = m.align === 'left';
      g.append(
        svg(
          'text',
          {
            x: Number(px) + (left ? -4 : 4),
            y: inner.y1 + 12,
            'text-anchor': left ? 'end' : 'start',
          },
          m.label,
        ),
      );
    }
  } else if (m.y !== undefined && m.x === undefined) {
    const py = sy(m.y).toFixed(1);
    g.append(svg('line', { x1: inner.x0, x2: inner.x1, y1: py, y2: py }));
    if (m.label) g.append(svg('text', { x: inner.x0 + 4, y: Number(py) - 4 }, m.label));
  } else {
    const [px, py] = [sx(m.x).toFixed(1), sy(m.y).toFixed(1)];
    g.append(svg('circle', { cx: px, cy: py, r: 4 }));
    if (m.label) g.append(svg('text', { x: Number(px) + 6, y: Number(py) - 6 }, m.label));
  }
  return g;
}
