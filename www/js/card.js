// A calculator card: named input cells, the formula as text, result cells.
//
// A card definition is {id, title, blurb, formula, inputs, compute}:
// - inputs: [{name, label, unit, value, choices?}]; `unit` is text or a function
//   (values, api) => text; `name` is the core's parameter
//   name, so a thrown error's `param` points at the cell that caused it;
// - compute(values, api): returns [{label, value, unit, format?}] or throws.

import { el, clear } from './dom.js';
import { parseEngineering, formatEngineering, formatPlain } from './format.js';
import { CLASS } from './constants.js';

export function mountCard(host, def, api) {
  const inputs = new Map();
  const results = el('dl', { class: CLASS.results, 'aria-live': 'polite' });
  const message = el('p', { class: CLASS.cardMessage, role: 'status' });

  const grid = el('div', { class: CLASS.inputs });
  for (const input of def.inputs) {
    const id = `${def.id}-${input.name}`;
    const hint = el('span', { class: CLASS.cellHint, id: `${id}-hint` });
    const control = input.choices
      ? el('select', { id, name: input.name }, input.choices.map(([value, label]) =>
          el('option', { value, selected: value === input.value }, label)))
      : el('input', {
          id, name: input.name, value: input.value, inputmode: 'decimal', autocomplete: 'off',
          spellcheck: 'false', 'aria-describedby': `${id}-hint`,
        });
    control.addEventListener('input', recompute);
    control.addEventListener('change', recompute);
    const unit = el('span', { class: CLASS.cellUnit }, typeof input.unit === 'string' ? input.unit : '');
    inputs.set(input.name, { def: input, control, hint, unit });
    grid.append(el('label', { class: CLASS.cell, for: id },
      el('span', { class: CLASS.cellName }, input.label),
      control,
      unit,
      hint));
  }

  const card = el('section', { class: CLASS.card, id: def.id, 'aria-labelledby': `${def.id}-title` },
    el('h2', { id: `${def.id}-title` }, def.title),
    def.blurb ? el('p', { class: CLASS.blurb }, def.blurb) : null,
    grid,
    el('pre', { class: CLASS.formula, 'aria-label': 'formula' }, def.formula),
    message,
    results);
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
      const parsed = parseEngineering(control.value);
      if ('error' in parsed) {
        hint.textContent = parsed.error;
        control.setAttribute('aria-invalid', 'true');
        bad = true;
      } else {
        values[name] = parsed.value;
      }
    }
    for (const { def: input, unit } of inputs.values()) {
      if (typeof input.unit === 'function') {
        try { unit.textContent = input.unit(values, api); } catch { unit.textContent = ''; }
      }
    }
    message.textContent = '';
    delete message.dataset.code;
    clear(results);
    if (bad) {
      message.textContent = 'Fix the marked cell to see results.';
      return;
    }
    try {
      for (const row of def.compute(values, api)) {
        const text = row.text ?? (row.format === 'plain' ? formatPlain(row.value) : formatEngineering(row.value));
        results.append(
          el('dt', {}, row.label),
          el('dd', { 'data-name': row.name ?? row.label },
            el('output', {}, text), row.unit ? el('span', { class: CLASS.cellUnit }, ` ${row.unit}`) : null));
      }
    } catch (err) {
      const target = err && inputs.get(err.param);
      if (target) {
        target.hint.textContent = err.message;
        target.control.setAttribute('aria-invalid', 'true');
      }
      message.textContent = err && err.message ? err.message : String(err);
      message.dataset.code = err && err.code ? err.code : 'error';
    }
  }

  recompute();
  return { card, recompute };
}
