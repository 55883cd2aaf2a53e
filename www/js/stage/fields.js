// The fields of the stage view: one stage described once (docs/stage.md) and its
// spec. Each field keeps the text the engineer typed; the stage document carries
// those texts as they are (the core's value reader reads "4k7", "2p2", "10M"), and
// the few numbers the page itself hands to other exports (the spec, the lists of
// poles) are read with api.parseValue / api.parseList, never in JS.

/** The five stage kinds of the stage document and the feedback topology each is. */
export const KINDS = [
  ['non-inverting', 'non-inverting (series-shunt)'],
  ['inverting', 'inverting (shunt-shunt, voltage in)'],
  ['transimpedance', 'transimpedance (shunt-shunt)'],
  ['transconductance', 'transconductance (series-series)'],
  ['current-amplifier', 'current amplifier (shunt-series)'],
];

/**
 * Every field: `key` is the stage view's name (and, for the stage's own fields,
 * the name of the worksheet's name/value pairs, docs/worksheet.md); `group` the
 * box it sits in; `unit` the unit the reader checks; `list` a list of values.
 */
export const FIELDS = [
  { key: 'kind', group: 'stage', label: 'Kind', choices: KINDS },
  {
    key: 'spreadPoint',
    group: 'stage',
    label: 'A0 point analysed',
    choices: [
      ['typ', 'typical'],
      ['min', 'minimum'],
      ['max', 'maximum'],
    ],
  },
  { key: 'a0Min', group: 'amplifier', label: 'A0 min', unit: 'V/V' },
  { key: 'a0', group: 'amplifier', label: 'A0 typ', unit: 'V/V' },
  { key: 'a0Max', group: 'amplifier', label: 'A0 max', unit: 'V/V' },
  { key: 'gbwHz', group: 'amplifier', label: 'Gain-bandwidth', unit: 'Hz' },
  { key: 'dominantPoleHz', group: 'amplifier', label: 'Dominant pole', unit: 'Hz' },
  { key: 'polesHz', group: 'amplifier', label: 'Further poles', unit: 'Hz', list: true },
  { key: 'rd', group: 'amplifier', label: 'Rd (differential)', unit: 'Ω' },
  { key: 'cd', group: 'amplifier', label: 'Cd (differential)', unit: 'F' },
  { key: 'rcm', group: 'amplifier', label: 'Rcm (each input)', unit: 'Ω' },
  { key: 'ccm', group: 'amplifier', label: 'Ccm (each input)', unit: 'F' },
  { key: 'ro', group: 'amplifier', label: 'Ro (output)', unit: 'Ω' },
  { key: 'slewRate', group: 'amplifier', label: 'Slew rate', unit: 'V/s' },
  { key: 'enDensity', group: 'amplifier', label: 'Voltage noise', unit: 'V/√Hz' },
  { key: 'enCornerHz', group: 'amplifier', label: 'its 1/f corner', unit: 'Hz' },
  { key: 'inDensity', group: 'amplifier', label: 'Current noise', unit: 'A/√Hz' },
  { key: 'inCornerHz', group: 'amplifier', label: 'its 1/f corner', unit: 'Hz' },
  { key: 'hd2Open', group: 'amplifier', label: 'Open-loop HD2', unit: '%' },
  { key: 'hd3Open', group: 'amplifier', label: 'Open-loop HD3', unit: '%' },
  { key: 'hdAmplitude', group: 'amplifier', label: 'at an output peak of', unit: 'V' },
  { key: 'rf', group: 'parts', label: 'Rf (feedback)', unit: 'Ω' },
  { key: 'rg', group: 'parts', label: 'Rg (gain / sense)', unit: 'Ω' },
  { key: 'cf', group: 'parts', label: 'Cf (across Rf)', unit: 'F' },
  { key: 'rs', group: 'parts', label: 'Rs (source)', unit: 'Ω' },
  { key: 'cs', group: 'parts', label: 'Cs (source)', unit: 'F' },
  { key: 'rl', group: 'parts', label: 'Rl (load)', unit: 'Ω' },
  { key: 'cl', group: 'parts', label: 'Cl (load)', unit: 'F' },
  { key: 'riso', group: 'parts', label: 'Riso (isolation)', unit: 'Ω' },
  { key: 'gain', group: 'spec', label: 'Gain |Af|', unit: 'gain' },
  { key: 'tolerance', group: 'spec', label: 'Gain tolerance', unit: '%' },
  { key: 'minPhaseMarginDeg', group: 'spec', label: 'Least phase margin', unit: '°' },
  { key: 'noiseFromHz', group: 'spec', label: 'Noise band from', unit: 'Hz' },
  { key: 'noiseToHz', group: 'spec', label: 'Noise band to', unit: 'Hz' },
  { key: 'maxNoiseRms', group: 'spec', label: 'Most output noise', unit: 'V rms' },
  { key: 'distortionLevel', group: 'spec', label: 'Distortion at a peak of', unit: 'V' },
  { key: 'distortionHz', group: 'spec', label: 'and a frequency of', unit: 'Hz' },
  { key: 'maxThd', group: 'spec', label: 'Most HD2 or HD3', unit: '%' },
  { key: 'partTolerance', group: 'tolerance', label: 'Resistor grade (Rf, Rg, Riso)', unit: '%' },
  { key: 'resistorTempco', group: 'tolerance', label: 'Resistor tempco', unit: 'ppm/K' },
  {
    key: 'capacitorTolerance',
    group: 'tolerance',
    label: 'Capacitor tolerance (Cf, Cs, Cl)',
    unit: '%',
  },
  { key: 'capacitorTempco', group: 'tolerance', label: 'Capacitor tempco', unit: 'ppm/K' },
  { key: 'sourceLoadTolerance', group: 'tolerance', label: 'Rs and Rl tolerance', unit: '%' },
  // The amplifier's GBW and Ro spreads: min and max here, typ the amplifier's own
  // Gain-bandwidth and Ro fields (the core checks that typ is the model's figure).
  { key: 'gbwMin', group: 'tolerance', label: 'Gain-bandwidth min', unit: 'Hz' },
  { key: 'gbwMax', group: 'tolerance', label: 'Gain-bandwidth max', unit: 'Hz' },
  { key: 'roMin', group: 'tolerance', label: 'Ro min', unit: 'Ω' },
  { key: 'roMax', group: 'tolerance', label: 'Ro max', unit: 'Ω' },
  { key: 'tempLowC', group: 'tolerance', label: 'Temperature from', unit: '°C' },
  { key: 'tempHighC', group: 'tolerance', label: 'Temperature to', unit: '°C' },
  { key: 'mcTrials', group: 'tolerance', label: 'Monte Carlo trials', unit: '' },
  { key: 'pairTotalMin', group: 'spec', label: 'Rf + Rg at least', unit: 'Ω' },
  { key: 'pairTotalMax', group: 'spec', label: 'Rf + Rg at most', unit: 'Ω' },
  {
    key: 'series',
    group: 'spec',
    label: 'Resistor series',
    choices: ['E12', 'E24', 'E48', 'E96', 'E192'].map((s) => [s, s]),
  },
];

export const GROUPS = [
  ['stage', 'Stage'],
  ['amplifier', 'Amplifier (datasheet figures)'],
  ['parts', 'Network, source and load'],
  ['spec', 'Spec'],
  ['tolerance', 'Tolerances and temperature'],
];

/** The fields that are the stage document's (the worksheet block carries these). */
export const STAGE_KEYS = FIELDS.filter(
  (f) =>
    !['spec', 'tolerance'].includes(f.group) &&
    ![
      'enDensity',
      'enCornerHz',
      'inDensity',
      'inCornerHz',
      'hd2Open',
      'hd3Open',
      'hdAmplitude',
    ].includes(f.key),
).map((f) => f.key);

/**
 * The demo stage: a strain-bridge front end of our own (gain 101 from a 350 Ω
 * bridge into an ADC driver's 10 kΩ || 1 nF), a 1 MHz general-purpose amplifier.
 */
export const DEMO = {
  kind: 'non-inverting',
  spreadPoint: 'typ',
  a0Min: '200k',
  a0: '1M',
  a0Max: '5M',
  gbwHz: '1M',
  dominantPoleHz: '',
  polesHz: '15M',
  rd: '10M',
  cd: '3p',
  rcm: '1G',
  ccm: '4p',
  ro: '50',
  slewRate: '0.5M',
  enDensity: '9n',
  enCornerHz: '10',
  inDensity: '0.2p',
  inCornerHz: '50',
  hd2Open: '0.3%',
  hd3Open: '0.1%',
  hdAmplitude: '5',
  rf: '100k',
  rg: '1k',
  cf: '',
  rs: '350',
  cs: '',
  rl: '10k',
  cl: '1n',
  riso: '',
  gain: '101',
  tolerance: '1%',
  minPhaseMarginDeg: '45',
  noiseFromHz: '0.1',
  noiseToHz: '10',
  maxNoiseRms: '20µ',
  distortionLevel: '2',
  distortionHz: '1k',
  maxThd: '0.05%',
  // Tolerances (common grades: 0.1 % thin film at 25 ppm/K, C0G at ±30 ppm/K within
  // 5 %, the source and load known to 1 %; common practice, no source) and an
  // industrial-commercial range 0 … 70 °C.
  partTolerance: '0.1%',
  resistorTempco: '25',
  capacitorTolerance: '5%',
  capacitorTempco: '30',
  sourceLoadTolerance: '1%',
  // The amplifier's GBW and Ro spreads: left empty, both are exact at their typ.
  gbwMin: '',
  gbwMax: '',
  roMin: '',
  roMax: '',
  tempLowC: '0',
  tempHighC: '70',
  // Each trial solves the stage at both temperatures (the phase margin takes ~4 ms a
  // point): 200 keep the view quick; raise for a finer yield.
  mcTrials: '200',
  pairTotalMin: '5k',
  pairTotalMax: '200k',
  series: 'E96',
  // Not a field: the two parts of Rf when a two-part pair was put in (the view's
  // note and the report show them; the stage document holds the total).
  rfParts: '',
};

/** Where a field reads a value from: the core's reader options of its unit. */
const READER_UNITS = new Set(['Ω', 'Hz', 'F', 'V', 'V/s']);
const readOptions = (f) => ({
  percent: f.unit === '%',
  unit: READER_UNITS.has(f.unit) ? f.unit : null,
});

/** One field read by the core's reader (a LoopwrightError with `field` set on failure). */
export function readField(api, values, key) {
  const f = FIELDS.find((x) => x.key === key);
  try {
    return api.parseValue(String(values[key]), readOptions(f));
  } catch (err) {
    err.field = key;
    throw err;
  }
}

/** A list field read by the core's reader; an empty text is an empty list. */
export function readListField(api, values, key) {
  const f = FIELDS.find((x) => x.key === key);
  try {
    return Array.from(api.parseList(String(values[key]), readOptions(f)));
  } catch (err) {
    err.field = key;
    throw err;
  }
}

const given = (t) => typeof t === 'string' && t.trim() !== '';

/**
 * The stage document (docs/stage.md, version 1) of the field texts `v`: empty
 * fields left out, values kept as typed (the core reads them).
 */
export function stageDocument(api, v) {
  const amplifier = {};
  const a0 = { typ: v.a0 };
  if (given(v.a0Min)) a0.min = v.a0Min;
  if (given(v.a0Max)) a0.max = v.a0Max;
  amplifier.a0 = a0;
  for (const k of ['gbwHz', 'dominantPoleHz', 'rd', 'cd', 'rcm', 'ccm', 'ro', 'slewRate'])
    if (given(v[k])) amplifier[k] = v[k];
  if (given(v.polesHz)) amplifier.polesHz = readListField(api, v, 'polesHz');
  if (given(v.enDensity))
    amplifier.voltageNoise = {
      density: v.enDensity,
      cornerHz: given(v.enCornerHz) ? v.enCornerHz : 0,
    };
  if (given(v.inDensity))
    amplifier.currentNoise = {
      density: v.inDensity,
      cornerHz: given(v.inCornerHz) ? v.inCornerHz : 0,
    };
  const parts = {};
  for (const k of ['rf', 'rg', 'cf', 'rs', 'cs', 'rl', 'cl', 'riso'])
    if (given(v[k])) parts[k] = v[k];
  return {
    format: 'loopwright-stage',
    version: 1,
    kind: v.kind,
    amplifier,
    spreadPoint: v.spreadPoint || 'typ',
    parts,
  };
}

/**
 * The field a LoopwrightError's `param` points at: `circuit.parts.rf` → rf,
 * `stage.amplifier.gbwHz` → gbwHz, `amplifier.a0.min` → a0Min,
 * `voltageNoise.density` → enDensity, `polesHz[1]` → polesHz.
 */
export function fieldOfParam(param) {
  if (typeof param !== 'string' || param === '') return null;
  const path = param.replace(/\[\d+\]/g, '').split('.');
  const last = path.at(-1);
  const before = path.at(-2);
  if (before === 'a0' || last === 'a0')
    return last === 'min' ? 'a0Min' : last === 'max' ? 'a0Max' : 'a0';
  if (before === 'voltageNoise' || last === 'voltageNoise')
    return last === 'cornerHz' ? 'enCornerHz' : 'enDensity';
  if (before === 'currentNoise' || last === 'currentNoise')
    return last === 'cornerHz' ? 'inCornerHz' : 'inDensity';
  return FIELDS.some((f) => f.key === last) ? last : null;
}
