// Save a plot as SVG or PNG. The SVG carries its colours inline at export time
// (copied from the computed style), so the file looks the same outside the page.

import { downloadBlob } from '../dom.js';

const STYLE_PROPS = [
  'fill',
  'stroke',
  'stroke-width',
  'stroke-dasharray',
  'font-size',
  'font-family',
  'font-weight',
  'opacity',
];

export function svgText(svgElement) {
  const copy = svgElement.cloneNode(true);
  const src = svgElement.querySelectorAll('*');
  const dst = copy.querySelectorAll('*');
  src.forEach((node, i) => {
    const cs = getComputedStyle(node);
    const decl = STYLE_PROPS.map((p) => `${p}:${cs.getPropertyValue(p)}`).join(';');
    dst[i].setAttribute('style', decl);
  });
  const box = svgElement.viewBox.baseVal;
  copy.setAttribute('width', String(box.width));
  copy.setAttribute('height', String(box.height));
  return new XMLSerializer().serializeToString(copy);
}

export function saveSvg(svgElement, name) {
  downloadBlob(new Blob([svgText(svgElement)], { type: 'image/svg+xml' }), `${name}.svg`);
}

export async function savePng(svgElement, name, scale = 2) {
  const text = svgText(svgElement);
  const img = new Image();
  img.src = `data:image/svg+xml;base64,${btoa(unescape(encodeURIComponent(text)))}`;
  await img.decode();
  const canvas = document.createElement('canvas');
  canvas.width = img.width * scale;
  canvas.height = img.height * scale;
  const ctx = canvas.getContext('2d');
  ctx.fillStyle = '#ffffff';
  ctx.fillRect(0, 0, canvas.width, canvas.height);
  ctx.drawImage(img, 0, 0, canvas.width, canvas.height);
  const blob = await new Promise((ok) => canvas.toBlob(ok, 'image/png'));
  downloadBlob(blob, `${name}.png`);
}
