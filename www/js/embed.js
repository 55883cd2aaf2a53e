// <loopwright-panel>: the calculator cards as a custom element for wiki pages.
//
//   <script type="module" src="https://your-host/loopwright/js/embed.js"></script>
//   <loopwright-panel cards="stage inverse spread"></loopwright-panel>
//
// Everything lives in the element's shadow root (no global names, no style leaks);
// the stylesheet and the wasm are loaded from beside this script, so a content
// security policy of script-src/style-src/connect-src <that origin> plus
// 'wasm-unsafe-eval' is enough. See docs/embed.md.

// The lite module: the feedback cards need no circuit solver or worksheet, and it is
// less than half the size of the full one (see scripts/build-wasm.sh).
import init, * as api from '../pkg/lite/loopwright.js';
import { mountCard } from './card.js';
import { el } from './dom.js';
import { FEEDBACK_CARDS } from './cards/feedback.js';

const TAG = 'loopwright-panel';
const CARDS_BY_NAME = new Map(FEEDBACK_CARDS.map((def) => [def.id.replace(/^card-/, ''), def]));
let ready = null;

class LoopwrightPanel extends HTMLElement {
  async connectedCallback() {
    if (this.shadowRoot) return;
    const root = this.attachShadow({ mode: 'open' });
    root.append(
      el('link', { rel: 'stylesheet', href: new URL('../css/style.css', import.meta.url).href }),
    );
    const status = el(
      'p',
      { class: 'load-status', role: 'status' },
      'Loading the calculation core…',
    );
    const host = el('div', { class: 'cards' });
    root.append(status, host);
    try {
      ready ??= init();
      await ready;
    } catch (err) {
      status.textContent = `The calculation core could not be loaded: ${err.message}`;
      status.dataset.state = 'failed';
      return;
    }
    const wanted = (this.getAttribute('cards') ?? '').split(/\s+/).filter(Boolean);
    const defs = wanted.length
      ? wanted.map((n) => CARDS_BY_NAME.get(n)).filter(Boolean)
      : FEEDBACK_CARDS;
    for (const def of defs) mountCard(host, def, api);
    status.textContent = '';
    status.dataset.state = 'ready';
    this.dataset.ready = 'true';
  }
}

if (!customElements.get(TAG)) customElements.define(TAG, LoopwrightPanel);
