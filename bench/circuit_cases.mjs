// Benchmark cases of the circuit area, in the form of bench/cases.mjs (spread
// them into CASES there). The target: an exact solve of a 10-node circuit
// at 1 000 frequencies in under 5 ms in wasm under Node.
//
// The circuit: an op-amp (VCVS with Ri and Ro) driving a six-section RC ladder,
// with a resistive divider fed back from the ladder's end — 11 nodes besides
// ground, 13 unknowns. Frequencies log-spaced from 10 Hz to 10 MHz.

const ladder = () => {
  const els = [
    { name: 'Vs', kind: 'voltage-source', nodes: ['s', '0'], value: 1 },
    { name: 'Rs', kind: 'resistor', nodes: ['s', 'in'], value: '1k' },
    { name: 'Ri', kind: 'resistor', nodes: ['in', 'fb'], value: '1M' },
    { name: 'A', kind: 'vcvs', nodes: ['a', '0'], control: ['in', 'fb'], value: 1e5 },
    { name: 'Ro', kind: 'resistor', nodes: ['a', 'n1'], value: 75 },
  ];
  for (let k = 1; k <= 6; k++) {
    els.push({ name: `R${k}`, kind: 'resistor', nodes: [`n${k}`, `n${k + 1}`], value: '1k' });
    els.push({ name: `C${k}`, kind: 'capacitor', nodes: [`n${k + 1}`, '0'], value: '1n' });
  }
  els.push({ name: 'Rf', kind: 'resistor', nodes: ['n7', 'fb'], value: '9k' });
  els.push({ name: 'Rg', kind: 'resistor', nodes: ['fb', '0'], value: '1k' });
  return JSON.stringify({ format: 'loopwright-circuit', version: 1, elements: els });
};

export const CIRCUIT_CASES = [
  {
    key: 'circuit_sweep_1000',
    area: 'circuit',
    what: 'exact MNA of an 11-node circuit at 1 000 frequencies (circuitSweep)',
    make: (lw) => {
      const json = ladder();
      const freqs = new Float64Array(1000).map((_, i) => 10 ** (1 + (6 * i) / 999));
      return () =>
        lw.circuitSweep({
          circuit: json,
          source: 'Vs',
          plus: 'n7',
          minus: '0',
          frequencies: freqs,
        });
    },
    python: true,
    pythonLabel: 'numpy (batched solve)',
    target: '< 5 ms; ≤ 1.5 µs per frequency',
  },
  {
    key: 'circuit_two_port',
    area: 'circuit',
    what: 'two-port method beside the exact solution, one series-shunt stage',
    make: (lw) => (i) =>
      lw.circuitTwoPort({
        topology: 'series-shunt',
        ri: 1e5,
        ro: 1e3,
        gain: 1e4 + i,
        rf: 1e6,
        rg: 1e3,
        rs: 1e4,
        rl: 2e3,
      }),
    target: '< 0.2 ms',
  },
];
