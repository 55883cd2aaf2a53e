// Histogram with spec limits, as hand-drawn SVG (see chart.js for why no library).
//
// histogramChart({title, width, height, label, edges, counts, limits: [{x, label}]})
// `edges` has counts.length + 1 entries.

import { svg } from './svg.js';
import { chartWidth } from './chart.js';
import { makeScale, linearTicks, niceDomain, tickLabel, plainAxis } from './scale.js';

const MARGIN = { top: 26, right: 14, bottom: 40, left: 56 };

export function histogramChart({
  title,
  width = chartWidth(),
  height = 240,
  label,
  edges,
  counts,
  limits = [],
}) {
  const root = svg('svg', {
    xmlns: 'http://www.w3.org/2000/svg',
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
  const xs = [edges[0], edges[edges.length - 1], ...limits.map((l) => l.x)].filter(Number.isFinite);
  const xDomain = [Math.min(...xs), Math.max(...xs)];
  const pad = (xDomain[1] - xDomain[0]) * 0.04 || 1;
  const sx = makeScale([xDomain[0] - pad, xDomain[1] + pad], [inner.x0, inner.x1]);
  const yDomain = niceDomain(0, Math.max(1, ...counts), 4);
  const sy = makeScale(yDomain, [inner.y0, inner.y1]);

  const grid = svg('g', { class: 'plot-grid' });
  for (const t of linearTicks(xDomain[0] - pad, xDomain[1] + pad, 6).ticks) {
    grid.append(
      svg(
        'text',
        { x: sx(t).toFixed(1), y: inner.y0 + 16, 'text-anchor': 'middle', class: 'plot-tick' },
        tickLabel(t, plainAxis({ label })),
      ),
    );
  }
  for (const t of linearTicks(...yDomain, 4).ticks) {
    const py = sy(t).toFixed(1);
    grid.append(svg('line', { x1: inner.x0, x2: inner.x1, y1: py, y2: py }));
    grid.append(
      svg(
        'text',
        { x: inner.x0 - 6, y: Number(py) + 4, 'text-anchor': 'end', class: 'plot-tick' },
        tickLabel(t),
      ),
    );
  }
  root.append(grid);
  const bars = svg('g', { class: 'plot-bars' });
  for (let i = 0; i < counts.length; i++) {
    const x0 = sx(edges[i]);
    const x1 = sx(edges[i + 1]);
    const y = sy(counts[i]);
    bars.append(
      svg('rect', {
        x: x0.toFixed(1),
        y: y.toFixed(1),
        width: Math.max(0.5, x1 - x0 - 0.5).toFixed(1),
        height: (inner.y0 - y).toFixed(1),
      }),
    );
  }
  root.append(bars);
  for (const l of limits) {
    const g = svg('g', { class: 'plot-marker plot-marker-limit' });
    const px = sx(l.x).toFixed(1);
    g.append(svg('line', { x1: px, x2: px, y1: inner.y1, y2: inner.y0 }));
    if (l.label) g.append(svg('text', { x: Number(px) + 4, y: inner.y1 + 12 }, l.label));
    root.append(g);
  }
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
      label,
    ),
  );
  root.append(svg('text', { x: inner.x0, y: 16, class: 'plot-title' }, title));
  return root;
}
