// Bundled by esbuild for the browser, then run in headless Chromium: the result
// lands in the page title for the test to read.
import init, { closedLoopGain, summarizeFeedback } from 'loopwright';

try {
  await init({ module_or_path: new URL('./loopwright_bg.wasm', import.meta.url) });
  // A = 10⁵, β = 0.00999 → D = 1000, Af = 100 (closed form).
  const af = closedLoopGain(1e5, 0.00999);
  const unit = summarizeFeedback('series-series', 5, 200).gainUnit;
  document.title = `ok ${af.toFixed(6)} ${unit}`;
} catch (err) {
  document.title = `failed ${err.message}`;
}
