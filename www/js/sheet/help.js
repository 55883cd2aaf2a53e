// The function help panel, generated from the engine's machine-readable catalog
// (functionCatalog()): nothing here is written twice. The search matches every
// word typed against an entry's name, summary, parameters, units, the names of
// the parts of a result that fans out, and the entry's own search words
// (synonyms, trade words and units, kept with the catalog entries).

import { el, clear } from '../dom.js';

export function mountHelp(host, catalogJson, { onUse = () => {} } = {}) {
  const catalog = JSON.parse(catalogJson);
  const search = el('input', {
    type: 'search',
    class: 'help-search',
    placeholder: 'find a function (gain, E96, thd, margin…)',
    'aria-label': 'find a function',
  });
  const list = el('div', { class: 'help-list' });
  host.append(el('h3', {}, 'Functions'), search, list);

  function signature(f) {
    const params = f.params.map((p) => (p.optional ? `[${p.name}]` : p.name));
    if (f.repeats) params.push('…');
    return `${f.name}(${params.join('; ')})`;
  }

  /** Everything an entry is found by, lower case. */
  function haystack(f) {
    const params = f.params.map((p) => `${p.name} ${p.summary} ${p.unit} ${p.range}`);
    return [f.name, f.summary, f.area, f.result, f.words ?? '', ...params, ...(f.spill ?? [])]
      .join(' ')
      .toLowerCase();
  }
  const hays = new Map(catalog.functions.map((f) => [f, haystack(f)]));

  /** The parts of a result that fans out, in order, as the grid names them. */
  function resultParts(f) {
    if (!f.spill?.length) return f.result ? el('p', {}, `Result: ${f.result}`) : null;
    return el(
      'div',
      { class: 'help-parts' },
      el('p', {}, `Result: fans out into ${f.spill.length} cells to the right (${f.resultUnit}):`),
      el(
        'ol',
        {},
        f.spill.map((part) => el('li', {}, part)),
      ),
    );
  }

  function show(filter) {
    clear(list);
    const words = filter.toLowerCase().split(/\s+/).filter(Boolean);
    const areas = new Map();
    for (const f of catalog.functions) {
      const hay = hays.get(f);
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
            resultParts(f),
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
