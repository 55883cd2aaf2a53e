// What the Stage view tests share: the view's demo stage written as a stage
// document for the JS API (www/js/stage/fields.js DEMO), the view's default part
// grades for stageTolerance, and typing into one of the view's fields. The tests
// pass these to `page.evaluate` as its argument (a closure there cannot see them).

/**
 * The demo stage of the view (fields.js DEMO) as a stage document, with `kind` and
 * `parts` replaced where a test describes another stage on the same amplifier.
 */
export function demoStage({ kind = 'non-inverting', parts } = {}) {
  return {
    format: 'loopwright-stage',
    version: 1,
    kind,
    amplifier: {
      a0: { min: '200k', typ: '1M', max: '5M' },
      gbwHz: '1M',
      polesHz: [15e6],
      rd: '10M',
      cd: '3p',
      rcm: '1G',
      ccm: '4p',
      ro: '50',
      slewRate: '0.5M',
      voltageNoise: { density: '9n', cornerHz: '10' },
      currentNoise: { density: '0.2p', cornerHz: '50' },
    },
    spreadPoint: 'typ',
    parts: parts ?? { rf: '100k', rg: '1k', rs: '350', rl: '10k', cl: '1n' },
  };
}

/**
 * The view's default grades (fields.js DEMO) for the named parts, as
 * stageTolerance's `parts`: resistors of the network 0.1 % at 25 ppm/K,
 * capacitors 5 % at 30 ppm/K, source and load resistors 1 % at 25 ppm/K.
 */
export function viewGrades(names) {
  const grade = { rf: [0.1, 25], rg: [0.1, 25], riso: [0.1, 25], rs: [1, 25], rl: [1, 25] };
  return names.map((part) => {
    const [percent, tempcoPpm] = grade[part] ?? [5, 30];
    return { part, tolerance: { distribution: 'uniform', percent }, tempcoPpm };
  });
}

/**
 * Type `text` into the view's field `#stage-<key>` as a user does (click, select
 * all, type, Tab); a select gets the option; '' clears the field.
 */
export async function typeStageField(page, key, text) {
  const id = `#stage-${key}`;
  if ((await page.locator(id).evaluate((n) => n.tagName)) === 'SELECT') {
    await page.selectOption(id, text);
    return;
  }
  await page.click(id);
  await page.keyboard.press('Control+A');
  if (text === '') await page.keyboard.press('Delete');
  else await page.keyboard.type(text);
  await page.keyboard.press('Tab');
}
