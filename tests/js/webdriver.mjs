// A minimal W3C WebDriver client over fetch, enough to smoke-test the page in a
// second engine (Firefox ESR through geckodriver) without any npm package that
// might try to download drivers or browsers.

import { spawn } from 'node:child_process';
import { createServer } from 'node:net';
import { setTimeout as sleep } from 'node:timers/promises';

const ELEMENT = 'element-6066-11e4-a52e-4f735466cecf';

function freePort() {
  return new Promise((ok, fail) => {
    const s = createServer();
    s.once('error', fail);
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address();
      s.close(() => ok(port));
    });
  });
}

export async function startGecko({
  driver = process.env.GECKODRIVER || 'geckodriver',
  binary = '/usr/bin/firefox-esr',
} = {}) {
  const port = await freePort();
  const proc = spawn(driver, ['--host', '127.0.0.1', '--port', String(port)], { stdio: 'ignore' });
  const base = `http://127.0.0.1:${port}`;
  for (let i = 0; i < 100; i++) {
    try {
      const r = await fetch(`${base}/status`);
      if (r.ok) break;
    } catch {
      await sleep(100);
    }
  }
  const call = async (method, path, body) => {
    const r = await fetch(`${base}${path}`, {
      method,
      headers: { 'content-type': 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const json = await r.json();
    if (!r.ok)
      throw new Error(`webdriver ${method} ${path}: ${json.value?.error} ${json.value?.message}`);
    return json.value;
  };
  const session = await call('POST', '/session', {
    capabilities: {
      alwaysMatch: {
        browserName: 'firefox',
        'moz:firefoxOptions': { binary, args: ['-headless'] },
      },
    },
  });
  const sid = session.sessionId;
  const s = (method, path, body) => call(method, `/session/${sid}${path}`, body);
  return {
    async go(url) {
      await s('POST', '/url', { url });
    },
    async run(script, ...args) {
      return s('POST', '/execute/sync', { script, args });
    },
    async find(css) {
      return (await s('POST', '/element', { using: 'css selector', value: css }))[ELEMENT];
    },
    async clearAndType(css, text) {
      const id = await this.find(css);
      await s('POST', `/element/${id}/clear`, {});
      await s('POST', `/element/${id}/value`, { text });
    },
    async text(css) {
      return s('GET', `/element/${await this.find(css)}/text`);
    },
    async waitFor(script, timeoutMs = 20000) {
      const end = Date.now() + timeoutMs;
      while (Date.now() < end) {
        if (await this.run(script)) return;
        await sleep(100);
      }
      throw new Error(`timed out waiting for: ${script}`);
    },
    async quit() {
      try {
        await s('DELETE', '');
      } finally {
        proc.kill();
      }
    },
  };
}
