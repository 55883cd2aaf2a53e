// Entry point of the page: load the wasm core once, then mount the cards.

import init, * as api from '../pkg/loopwright.js';
import { mountCard } from './card.js';
import { FEEDBACK_CARDS } from './cards/feedback.js';
import { wasmSource } from './wasm-source.js';

async function start() {
  const status = document.getElementById('load-status');
  try {
    await init({ module_or_path: wasmSource() });
  } catch (err) {
    status.textContent = `The calculation core could not be loaded: ${err.message}`;
    status.dataset.state = 'failed';
    return;
  }
  const host = document.getElementById('cards');
  for (const def of FEEDBACK_CARDS) mountCard(host, def, api);
  performance.mark('loopwright-first-result');
  status.textContent = `Core ${api.version()} loaded.`;
  status.dataset.state = 'ready';
  document.documentElement.dataset.ready = 'true';
}

start();
