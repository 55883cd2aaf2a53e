// Benchmark cases of the circuit noise analysis, in the form of bench/cases.mjs
// (spread into CASES there). The target: the output noise of an 11-node
// circuit with every contribution at 1 000 frequencies in under 5 ms in wasm,
// beside numpy doing it by superposition (bench/peers.py, the same circuit).
//
// The circuit (bench/noise_circuit_11.json): an amplifier with voltage and current
// noise (1/f corners) and Ro = 75 Ω driving a six-section RC ladder, a divider fed
// back from its end and an RC load: 11 nodes besides ground, 13 noise sources.

import { readFileSync } from 'node:fs';

const json = readFileSync(new URL('./noise_circuit_11.json', import.meta.url), 'utf8');

export const NOISE_CASES = [
  {
    key: 'noise_circuit_1000',
    area: 'noise',
    what: 'output noise of an 11-node circuit, all 13 contributions, at 1 000 frequencies (circuitNoise)',
    make: (lw) => {
      const freqs = new Float64Array(1000).map((_, i) => 10 ** (1 + (6 * i) / 999));
      return () =>
        lw.circuitNoise({
          circuit: json,
          output: 'x',
          frequenciesHz: freqs,
          inputSource: 'Vs',
        });
    },
    python: true,
    pythonLabel: 'numpy, superposition (one solve per source per frequency)',
    target: '< 5 ms',
  },
];
