// A calculator card: named input cells, the formula as text, result cells.
//
// A card definition is {id, title, blurb, formula, inputs, compute}:
// - inputs: [{name, label, unit, value, choices?, list?, field?}]; `list` reads
//   several numbers ("10, 1M, 30M"); `unit` is text or a function
//   (values, api) => text; `name` is the JS API's parameter name, or `field` names
//   the API field(s) the cell feeds when the cell's name is shorter (`polesHz`), so
//   a thrown error's `param` points at the cell that caused it;
// - compute(values, api): returns rows [{name, label, value, unit, format?, text?}]
//   or {rows, figures: [{svg, name}], tables: [...]} (tableOf below), or throws (a LoopwrightError's `param`, the
//   name the caller used, such as `amplifier.polesHz[2]`, marks the input cell at
//   fault).

import { el, clear } from './dom.js';
import { formatEngineering, formatPlain, useCore } from './format.js';
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

// The unit words the core's reader checks a typed value against (docs/notation.md).
const READER_UNITS = new Set(['Ω', 'V', 'A', 'W', 'S', 'Hz', 'F', 'H', 's']);

/** The reader's options for an input: % allowed, its unit declared when the core knows it. */
function readOptions(unit) {
  return { percent: true, unit: typeof unit === 'string' && READER_UNITS.has(unit) ? unit : null };
}

/**
 * A number as typed in a cell, read by the core's one reader (SI prefixes, IEC
 * 60062 letter codes, unit words checked against the input's unit, a trailing %).
 */
export function parseNumber(text, api, unit) {
  return api.parseValue(String(text), readOptions(unit));
}

/** A list of numbers separated by commas or semicolons, read by the core; empty text is an empty list. */
export function parseList(text, api, unit) {
  return Array.from(api.parseList(String(text), readOptions(unit)));
}

/**
 * A result table `{name, caption, columns: [{key, label, numeric?}], rows: [{key: text}],
 * note?}`: text only, in a scroller so that a narrow screen scrolls the table, not the page.
 */
function tableOf({ name, caption, columns, rows, note }) {
  const head = el(
    'tr',
    {},
    columns.map((c) => el('th', { scope: 'col', class: c.numeric ? 'num' : null }, c.label)),
  );
  const body = rows.map((r) =>
    el(
      'tr',
      { class: r.pass === false ? 'fails' : r.pass === true ? 'passes' : null },
      columns.map((c) => el('td', { class: c.numeric ? 'num' : null }, r[c.key] ?? '—')),
    ),
  );
  // The caption stands above the scroller, so that it wraps on a narrow screen.
  const captionId = `table-${name}-${Math.random().toString(36).slice(2, 8)}`;
  return el(
    'div',
    { class: 'result-table-block', 'data-name': name },
    el('p', { class: 'result-table-caption', id: captionId }, caption),
    el(
      'div',
      { class: 'result-table-scroller' },
      el(
        'table',
        { class: 'result-table', 'aria-labelledby': captionId },
        el('thead', {}, head),
        el('tbody', {}, body),
      ),
    ),
    note ? el('p', { class: 'result-table-note' }, note) : null,
  );
}

export function mountCard(host, def, api) {
  useCore(api);
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
      delete hint.dataset.column;
      control.removeAttribute('aria-invalid');
      if (input.choices) {
        values[name] = control.value;
        continue;
      }
      try {
        values[name] = input.list
          ? parseList(control.value, api, input.unit)
          : parseNumber(control.value, api, input.unit);
      } catch (err) {
        hint.textContent = `"${control.value.trim()}" ${err.message.replace(/^text: /, '')}`;
        if (err?.column) hint.dataset.column = String(err.column);
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
      for (const table of Array.isArray(out) ? [] : (out.tables ?? []))
        figures.append(tableOf(table));
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
        // One display (the core's): the unit after a space, an SI prefix on it
        // unless the row is plain (a ratio, or a unit that carries its prefix).
        const unit = row.unit ?? '';
        const text =
          row.text ??
          (row.format === 'plain'
            ? formatPlain(row.value, 6, unit)
            : formatEngineering(row.value, 4, unit));
        results.append(
          el('dt', {}, row.label),
          el('dd', { 'data-name': row.name ?? row.label }, el('output', {}, text)),
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
