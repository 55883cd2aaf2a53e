// The Nyquist plot of a loop gain T(jω) with a radially compressed radius, so that
// a loop with a large |T| at low frequencies shows both its far part and the
// neighbourhood of −1 (a linear plot of such a loop is a vertical line near −1).
//
// The mapping (display only; the encirclement count and the least |1 + T| are the
// core's, circuitNyquist): a point of radius r = |T| is drawn at the same angle with
// radius ρ(r) = r for r ≤ 1 and ρ(r) = 1 + log₁₀ r beyond. The unit circle and −1
// stay where they are; each decade beyond |T| = 1 adds one unit of radius and is
// drawn as a ring. The axes' tick labels name the values they stand for on the axes
// (1, 10, 100, …), and the plot states the mapping.

import { lineChart, chartWidth } from './chart.js';
import { tickLabel } from './scale.js';

/** The drawn radius ρ(r): r up to 1, 1 + log₁₀ r beyond. */
export function compressedRadius(r) {
  return r <= 1 ? r : 1 + Math.log10(r);
}

/** The value a drawn coordinate t stands for on an axis (inverse of ρ, with the sign). */
function axisValue(t) {
  const a = Math.abs(t);
  const v = a <= 1 ? a : 10 ** (a - 1);
  return Math.sign(t) * v;
}

/** `re`, `im` drawn through ρ: each point moved along its ray. */
function compressed(re, im) {
  const x = new Array(re.length);
  const y = new Array(re.length);
  for (let i = 0; i < re.length; i++) {
    const r = Math.hypot(re[i], im[i]);
    const k = r > 0 && Number.isFinite(r) ? compressedRadius(r) / r : Number.NaN;
    x[i] = re[i] * k;
    y[i] = im[i] * k;
  }
  return { x, y };
}

function ring(radius) {
  const n = 121;
  const x = [];
  const y = [];
  for (let i = 0; i < n; i++) {
    const a = (2 * Math.PI * i) / (n - 1);
    x.push(radius * Math.cos(a));
    y.push(radius * Math.sin(a));
  }
  return { x, y };
}

/**
 * The compressed Nyquist chart: `curve` {re, im} for ω > 0 (the mirror for ω < 0 is
 * drawn too), the −1 point, the unit circle and a ring per decade of |T| beyond it.
 * `note` is added after the statement of the mapping.
 */
export function nyquistChart({ title, curve, note, width = chartWidth() }) {
  const pos = compressed(curve.re, curve.im);
  let far = 1;
  for (const [i, v] of pos.x.entries()) {
    const r = Math.hypot(v, pos.y[i]);
    if (Number.isFinite(r) && r > far) far = r;
  }
  // Whole decades out to the farthest point, at least |T| = 10.
  const reach = Math.max(2, Math.ceil(far - 1e-9));
  const height = Math.round(Math.min(420, Math.max(300, width * 0.66)));
  // About the same scale on both axes (the frame is wider than it is tall).
  const aspect = (width - 76) / (height - 80);
  const xReach = Math.max(reach, Math.floor(reach * aspect));
  const ticks = (n) => Array.from({ length: 2 * n + 1 }, (_, i) => i - n);
  const tickText = (t) => tickLabel(axisValue(t), true);
  const rings = [];
  for (let d = 2; d <= reach; d++) rings.push({ ...ring(d), kind: 'ring' });
  const mapping = `Radius drawn as |T| up to 1 and 1 + log₁₀|T| beyond (rings at |T| = 10, 100, …).`;
  return lineChart({
    title,
    width,
    height,
    x: {
      label: 'Re T (radius compressed beyond |T| = 1)',
      domain: [-xReach, xReach],
      ticks: ticks(xReach),
      tickText,
    },
    y: { label: 'Im T', domain: [-reach, reach], ticks: ticks(reach), tickText },
    series: [
      ...rings,
      { label: 'unit circle', ...ring(1), kind: 'unit' },
      { label: 'T(jω), ω > 0', x: pos.x, y: pos.y, kind: 'a' },
      { label: 'ω < 0', x: pos.x, y: pos.y.map((v) => -v), kind: 'c' },
    ],
    markers: [{ x: -1, y: 0, label: '−1' }],
    note: note ? `${mapping} ${note}` : mapping,
  });
}
