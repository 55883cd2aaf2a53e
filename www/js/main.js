// Entry point of the page: load the wasm core once, mount the calculator cards and
// the worksheet, and switch between them with the tabs.

import init, * as api from '../pkg/loopwright.js';
import { mountCard } from './card.js';
import { useCore } from './format.js';
import { FEEDBACK_CARDS } from './cards/feedback.js';
import { NETWORK_CARDS } from './cards/network.js';
import { DISTORTION_CARDS } from './cards/distortion.js';
import { FREQ_CARDS } from './cards/freq.js';
import { CIRCUIT_CARDS } from './cards/circuit.js';
import { mountWorksheet } from './sheet/worksheet.js';
import { mountStageView } from './stage/view.js';
import { wasmSource } from './wasm-source.js';

/** Where the open tab is remembered for a reload of this browser tab. */
const VIEW_KEY = 'loopwright.view';

function rememberView(id) {
  try {
    sessionStorage.setItem(VIEW_KEY, id);
  } catch {
    // storage off: a reload opens on the first tab
  }
}

function rememberedView() {
  try {
    return sessionStorage.getItem(VIEW_KEY);
  } catch {
    return null;
  }
}

function setUpTabs() {
  const tabs = [...document.querySelectorAll('[role="tab"]')];
  const select = (tab) => {
    rememberView(tab.id);
    for (const t of tabs) {
      const on = t === tab;
      t.setAttribute('aria-selected', String(on));
      t.tabIndex = on ? 0 : -1;
      document.getElementById(t.getAttribute('aria-controls')).hidden = !on;
    }
  };
  for (const tab of tabs) {
    tab.addEventListener('click', () => select(tab));
    tab.addEventListener('keydown', (e) => {
      const i = tabs.indexOf(tab);
      const next =
        e.key === 'ArrowRight'
          ? tabs[(i + 1) % tabs.length]
          : e.key === 'ArrowLeft'
            ? tabs[(i - 1 + tabs.length) % tabs.length]
            : null;
      if (next) {
        e.preventDefault();
        select(next);
        next.focus();
      }
    });
  }
  return select;
}

async function start() {
  const status = document.getElementById('load-status');
  const select = setUpTabs();
  try {
    await init({ module_or_path: wasmSource() });
  } catch (err) {
    status.textContent = `The calculation core could not be loaded: ${err.message}`;
    status.dataset.state = 'failed';
    return;
  }
  useCore(api);
  const host = document.getElementById('cards');
  [
    ...FEEDBACK_CARDS,
    ...FREQ_CARDS,
    ...NETWORK_CARDS,
    ...CIRCUIT_CARDS,
    ...DISTORTION_CARDS,
  ].forEach((def, i) => {
    mountCard(host, def, api);
    if (i === 0) performance.mark('loopwright-first-result');
  });
  const sheetView = api.Worksheet
    ? await mountWorksheet(document.getElementById('worksheet'), api, {
        onLink: () => select(document.getElementById('tab-sheet')),
      })
    : null;
  // The stage view needs the circuit solver of the full module.
  if (api.stageCircuit)
    mountStageView(document.getElementById('stage'), api, {
      worksheet: () =>
        sheetView && {
          sheet: sheetView.sheet,
          record: sheetView.record,
          refresh: () => sheetView.grid.refresh(),
        },
    });
  if (rememberedView() === 'tab-stage' || location.search.includes('view=stage'))
    select(document.getElementById('tab-stage'));
  // The sheet's tab when the page came with a share link, when asked for, or when
  // it was open before a reload.
  if (
    sheetView &&
    (sheetView.cameWithLink ||
      location.search.includes('view=sheet') ||
      rememberedView() === 'tab-sheet')
  )
    select(document.getElementById('tab-sheet'));
  status.textContent = `Core ${api.version()} loaded.`;
  status.dataset.state = 'ready';
  document.documentElement.dataset.ready = 'true';
}

start();
