// Entry point of the page: load the lite core (the calculator areas), mount the
// calculator cards and the tabs, and load the full core (circuit solver and
// worksheet) only when a view needs it: the worksheet tab opened (or the page came
// with a share link or was on the sheet before a reload), the Stage tab opened (or
// open before a reload), or the loaded-stage card scrolled near the screen. docs/wasm-size.md has the two modules' sizes and the
// first-result time.

import initLite, * as lite from '../pkg/lite/loopwright.js';
import { mountCard } from './card.js';
import { useCore } from './format.js';
import { FEEDBACK_CARDS } from './cards/feedback.js';
import { NETWORK_CARDS } from './cards/network.js';
import { DISTORTION_CARDS } from './cards/distortion.js';
import { FREQ_CARDS } from './cards/freq.js';
import { CIRCUIT_CARDS } from './cards/circuit.js';
import { mountWorksheet } from './sheet/worksheet.js';
import { mountStageView } from './stage/view.js';
import { hasSheetLink } from './sheet/opening.js';
import { el } from './dom.js';
import { CLASS } from './constants.js';
import { wasmSource } from './wasm-source.js';

let fullCore = null;

/**
 * The full module (every export: the lite ones, the circuit solver, the worksheet),
 * fetched and started on the first call; later calls share the same promise.
 */
export function loadFullCore() {
  fullCore ??= import('../pkg/loopwright.js').then(async (full) => {
    await full.default({ module_or_path: wasmSource('full') });
    return full;
  });
  return fullCore;
}

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

/** The tabs; `onSelect(id)` is called with the id of each tab selected. */
function setUpTabs(onSelect) {
  const tabs = [...document.querySelectorAll('[role="tab"]')];
  const select = (tab) => {
    rememberView(tab.id);
    onSelect(tab.id);
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

/**
 * Mount the cards that need the full module (the circuit solver) in place of a
 * placeholder each, once the placeholder comes within a screen of the view.
 */
function mountLater(host, defs, status) {
  const slots = defs.map((def) => {
    const slot = el(
      'section',
      { class: `${CLASS.card} card-pending`, id: `${def.id}-pending`, 'aria-busy': 'true' },
      el('h2', {}, def.title),
      el('p', { class: CLASS.blurb }, 'Loads the circuit solver when shown…'),
    );
    host.append(slot);
    return [slot, def];
  });
  const mountAll = () =>
    loadFullCore().then(
      (full) => {
        for (const [slot, def] of slots) {
          const box = document.createElement('div');
          mountCard(box, def, full);
          slot.replaceWith(...box.childNodes);
        }
      },
      (err) => {
        for (const [slot] of slots) {
          slot.lastChild.textContent = `The circuit solver could not be loaded: ${err.message}`;
          slot.removeAttribute('aria-busy');
        }
        status.textContent = `The full core could not be loaded: ${err.message}`;
      },
    );
  if (typeof IntersectionObserver !== 'function') return mountAll();
  const watch = new IntersectionObserver(
    (entries) => {
      if (!entries.some((e) => e.isIntersecting)) return;
      watch.disconnect();
      mountAll();
    },
    { rootMargin: '100% 0px' },
  );
  for (const [slot] of slots) watch.observe(slot);
}

async function start() {
  const status = document.getElementById('load-status');
  const sheetHost = document.getElementById('worksheet');
  let sheetView = null;
  // The worksheet, mounted once with the full module; `select` is set below.
  let select = () => {};
  const openSheet = () => {
    sheetView ??= loadFullCore().then(
      async (full) => {
        const view = full.Worksheet
          ? await mountWorksheet(sheetHost, full, {
              onLink: () => select(document.getElementById('tab-sheet')),
            })
          : null;
        document.documentElement.dataset.sheet = 'ready';
        return view;
      },
      (err) => {
        sheetHost.textContent = `The worksheet could not be loaded: ${err.message}`;
        document.documentElement.dataset.sheet = 'failed';
        return null;
      },
    );
    return sheetView;
  };
  // The Stage view, mounted once with the full module (it needs the circuit solver).
  // Its worksheet actions open the worksheet (mounting it if need be) and write there.
  let stageView = null;
  const openStage = () => {
    stageView ??= loadFullCore().then(
      (full) => {
        if (full.stageCircuit)
          mountStageView(document.getElementById('stage'), full, {
            worksheet: async () => {
              const view = await openSheet();
              return (
                view && {
                  sheet: view.sheet,
                  record: view.record,
                  refresh: () => view.grid.refresh(),
                }
              );
            },
          });
        document.documentElement.dataset.stage = 'ready';
      },
      (err) => {
        document.getElementById('stage').textContent =
          `The Stage view could not be loaded: ${err.message}`;
        document.documentElement.dataset.stage = 'failed';
      },
    );
    return stageView;
  };
  select = setUpTabs((id) => {
    if (id === 'tab-sheet') openSheet();
    if (id === 'tab-stage') openStage();
  });
  try {
    await initLite({ module_or_path: wasmSource('lite') });
  } catch (err) {
    status.textContent = `The calculation core could not be loaded: ${err.message}`;
    status.dataset.state = 'failed';
    return;
  }
  useCore(lite);
  const host = document.getElementById('cards');
  [...FEEDBACK_CARDS, ...FREQ_CARDS, ...NETWORK_CARDS].forEach((def, i) => {
    mountCard(host, def, lite);
    if (i === 0) performance.mark('loopwright-first-result');
  });
  mountLater(host, CIRCUIT_CARDS, status);
  for (const def of DISTORTION_CARDS) mountCard(host, def, lite);
  // The sheet's tab when the page came with a share link, when asked for, or when
  // it was open before a reload; else the Stage tab when asked for or open before a
  // reload. The page is ready once the view it opens on is.
  if (
    hasSheetLink() ||
    location.search.includes('view=sheet') ||
    rememberedView() === 'tab-sheet'
  ) {
    select(document.getElementById('tab-sheet'));
    await openSheet();
  } else if (rememberedView() === 'tab-stage' || location.search.includes('view=stage')) {
    select(document.getElementById('tab-stage'));
    await openStage();
  }
  // A share link pasted into the address bar before the worksheet was first opened
  // (once it is mounted, the worksheet watches the links itself).
  window.addEventListener('hashchange', () => {
    if (!sheetView && hasSheetLink()) select(document.getElementById('tab-sheet'));
  });
  status.textContent = `Core ${lite.version()} loaded.`;
  status.dataset.state = 'ready';
  document.documentElement.dataset.ready = 'true';
}

start();
