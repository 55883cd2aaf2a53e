// A calculator card: named input cells, the formula as text, result cells.
//
// A card definition is {id, title, blurb, formula, inputs, compute}:
// - inputs: [{name, label, unit, value, choices?, list?, field?}]; `list` reads
//   several numbers ("10, 1M, 30M"); `unit` is text or a function
//   (values, api) => text; `name` is the JS API's parameter name, or `field` names
//   the API field(s) the cell feeds when the cell's name is shorter (`polesHz`), so
//   a thrown error's `param` points at the cell that caused it;
// - compute(values, api): returns rows [{name, label, value, unit, format?, text?}]
//   or {rows, figures: [{svg, name}]}, or throws (a LoopwrightError's `param`, the
//   name the caller used, such as `amplifier.polesHz[2]`, marks the input cell at
//   fault).

import { el, clear } from './dom.js';
import { formatEngineering, formatPlain } from './format.js';
import { CLASS } from './constants.js';
import { saveSvg, savePng } from './plot/export.js';

/**
 * The input cell a LoopwrightError's `param` names: by the cell's name or its
 * `field`, then without a list index (`polesHz[2]`), then inside the amplifier
 * model (`amplifier.polesHz` → `polesHz`), then by the first part (`beta.gain` →
 * `beta`), then as a cell named in snake_case (`aMin` → `a_min`).
 */
function inputForParam(inputs, param) {
  if (typeof param !== 'string') return undefined;
  const find = (name) => {
    for (const [key, cell] of inputs) {
      const field = cell.def.field;
      if (key === name || field === name || (Array.isArray(field) && field.includes(name))) {
        return cell;
      }
    }
    return undefined;
  };
  const plain = param.replace(/\[\d+\]$/, '');
  return (
    find(param) ??
    find(plain) ??
    (plain.startsWith('amplifier.') ? find(plain.slice('amplifier.'.length)) : undefined) ??
    find(plain.split('.')[0]) ??
    find(plain.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`))
  );
}

/**
 * A number as typed in a cell, read by the core's parser (SI prefixes, IEC 60062
 * letter codes, unit words); a trailing % divides by 100.
 */
export function parseNumber(text, api) {
  const t = String(text).trim();
  return t.endsWith('%') ? api.parseValue(t.slice(0, -1)) / 100 : api.parseValue(t);
}

/** A list of numbers separated by commas, semicolons or spaces; empty text is an empty list. */
export function parseList(text, api) {
  const parts = String(text)
    .split(/[,;\s]+/)
    .filter(Boolean);
  return parts.map((p) => parseNumber(p, api));
}

export function mountCard(host, def, api) {
  const inputs = new Map();
  const results = el('dl', { class: CLASS.results, 'aria-live': 'polite' });
  const message = el('p', { class: CLASS.cardMessage, role: 'status' });
  const figures = el('div', { class: 'card-figures' });

  const grid = el('div', { class: CLASS.inputs });
  for (const input of def.inputs) {
    const id = `${def.id}-${input.name}`;
    const hint = el('span', { class: CLASS.cellHint, id: `${id}-hint` });
    const control = input.choices
      ? el(
          'select',
          { id, name: input.name },
          input.choices.map(([value, label]) =>
            el('option', { value, selected: value === input.value }, label),
          ),
        )
      : el('input', {
          id,
          name: input.name,
          value: input.value,
          inputmode: 'decimal',
          autocomplete: 'off',
          spellcheck: 'false',
          'aria-describedby': `${id}-hint`,
        });
    control.addEventListener('input', recompute);
    control.addEventListener('change', recompute);
    const unit = el(
      'span',
      { class: CLASS.cellUnit },
      typeof input.unit === 'string' ? input.unit : '',
    );
    inputs.set(input.name, { def: input, control, hint, unit });
    grid.append(
      el(
        'label',
        { class: CLASS.cell, for: id },
        el('span', { class: CLASS.cellName }, input.label),
        control,
        unit,
        hint,
      ),
    );
  }

  const card = el(
    'section',
    { class: CLASS.card, id: def.id, 'aria-labelledby': `${def.id}-title` },
    el('h2', { id: `${def.id}-title` }, def.title),
    def.blurb ? el('p', { class: CLASS.blurb }, def.blurb) : null,
    grid,
    el('pre', { class: CLASS.formula, 'aria-label': 'formula' }, def.formula),
    message,
    results,
    figures,
  );
  host.append(card);

  function recompute() {
    const values = {};
    let bad = false;
    for (const [name, { def: input, control, hint }] of inputs) {
      hint.textContent = '';
      control.removeAttribute('aria-invalid');
      if (input.choices) {
        values[name] = control.value;
        continue;
      }
      try {
        values[name] = input.list ? parseList(control.value, api) : parseNumber(control.value, api);
      } catch (err) {
        hint.textContent = `"${control.value.trim()}" ${err.message.replace(/^text: /, '')}`;
        control.setAttribute('aria-invalid', 'true');
        bad = true;
      }
    }
    for (const { def: input, unit } of inputs.values()) {
      if (typeof input.unit === 'function') {
        try {
          unit.textContent = input.unit(values, api);
        } catch {
          unit.textContent = '';
        }
      }
    }
    message.textContent = '';
    delete message.dataset.code;
    clear(results);
    clear(figures);
    if (bad) {
      message.textContent = 'Fix the marked cell to see results.';
      return;
    }
    try {
      const out = def.compute(values, api);
      const rows = Array.isArray(out) ? out : out.rows;
      for (const fig of Array.isArray(out) ? [] : (out.figures ?? [])) {
        figures.append(
          fig.svg,
          el(
            'div',
            { class: 'plot-tools' },
            el('button', { type: 'button', onclick: () => saveSvg(fig.svg, fig.name) }, 'SVG'),
            el('button', { type: 'button', onclick: () => savePng(fig.svg, fig.name) }, 'PNG'),
          ),
        );
      }
      for (const row of rows) {
        const text =
          row.text ??
          (row.format === 'plain' ? formatPlain(row.value) : formatEngineering(row.value));
        results.append(
          el('dt', {}, row.label),
          el(
            'dd',
            { 'data-name': row.name ?? row.label },
            el('output', {}, text),
            row.unit ? el('span', { class: CLASS.cellUnit }, ` ${row.unit}`) : null,
          ),
        );
      }
    } catch (err) {
      const target = err && inputForParam(inputs, err.param);
      if (target) {
        target.hint.textContent = err.message;
        target.control.setAttribute('aria-invalid', 'true');
      }
      message.textContent = err?.message ? err.message : String(err);
      message.dataset.code = err?.code ? err.code : 'error';
    }
  }

  recompute();
  return { card, recompute };
}
