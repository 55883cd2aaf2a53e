// The function help panel, generated from the engine's machine-readable catalog
// (functionCatalog()): nothing here is written twice.

import { el, clear } from '../dom.js';

export function mountHelp(host, catalogJson, { onUse = () => {} } = {}) {
  const catalog = JSON.parse(catalogJson);
  const search = el('input', {
    type: 'search',
    class: 'help-search',
    placeholder: 'find a function (gain, noise, margin…)',
    'aria-label': 'find a function',
  });
  const list = el('div', { class: 'help-list' });
  host.append(el('h3', {}, 'Functions'), search, list);

  function signature(f) {
    const params = f.params.map((p) => (p.optional ? `[${p.name}]` : p.name));
    if (f.repeats) params.push('…');
    return `${f.name}(${params.join('; ')})`;
  }

  function show(filter) {
    clear(list);
    const words = filter.toLowerCase().split(/\s+/).filter(Boolean);
    const areas = new Map();
    for (const f of catalog.functions) {
      const hay = `${f.name} ${f.summary} ${f.area}`.toLowerCase();
      if (!words.every((w) => hay.includes(w))) continue;
      if (!areas.has(f.area)) areas.set(f.area, []);
      areas.get(f.area).push(f);
    }
    for (const [area, fns] of areas) {
      list.append(el('h4', {}, area));
      for (const f of fns) {
        const params = el(
          'ul',
          { class: 'help-params' },
          f.params.map((p) =>
            el(
              'li',
              {},
              el('code', {}, p.name),
              ` — ${p.summary}`,
              p.unit && p.unit !== 'any' ? ` [${p.unit}]` : '',
              p.range && p.range !== 'any' ? `, ${p.range}` : '',
              p.default !== null && p.default !== undefined ? `, default ${p.default}` : '',
            ),
          ),
        );
        const examples = (f.examples ?? []).map((x) =>
          el(
            'li',
            {},
            el('code', {}, x.formula),
            ' ',
            el(
              'button',
              { type: 'button', class: 'button', onclick: () => onUse(x.formula) },
              'use',
            ),
          ),
        );
        list.append(
          el(
            'details',
            { class: 'help-fn' },
            el('summary', {}, el('code', {}, signature(f)), ` — ${f.summary}`),
            f.result ? el('p', {}, `Result: ${f.result}`) : null,
            params,
            examples.length ? el('ul', { class: 'help-examples' }, examples) : null,
          ),
        );
      }
    }
    if (!areas.size) list.append(el('p', {}, 'No function matches.'));
  }

  search.addEventListener('input', () => show(search.value));
  show('');
  return { count: catalog.functions.length };
}
