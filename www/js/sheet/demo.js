// The demo worksheet, a scenario of our own: the front end of a towed hydrophone
// array channel — a low-noise non-inverting preamplifier followed by a line driver
// into a long cable. The figures are illustrative inputs, not a recommended design.

const CELLS = {
  A1: 'Hydrophone channel: preamp + line driver',
  A3: 'Preamp op-amp gain, min', B3: '60k', C3: 'V/V, data-sheet minimum',
  A4: 'Preamp op-amp gain, typ', B4: '250k', C4: 'V/V',
  A5: 'Preamp op-amp gain, max', B5: '1M', C5: 'V/V',
  A6: 'Target preamp gain', B6: '40', C6: 'V/V (32 dB)',
  A7: 'β for the target at typ', B7: '=FB.BETA(Atyp; Gtarget)',
  A8: 'Closed-loop gain at typ', B8: '=FB.GAIN(Atyp; B7)',
  A9: 'Amount of feedback', B9: '=FB.AMOUNTDB(Atyp; B7)', C9: 'dB',
  A10: 'Least A for 0.05 % gain error', B10: '=FB.MINGAIN(B7; 0.05%)',
  A11: 'Gain over the A spread (min/typ/max…)', B11: '=FB.SPREAD(B7; B3; Atyp; B5)',
  A21: 'Preamp input resistance', B21: '=FB.ZIN("series-shunt"; 10MΩ; Atyp; B7)', C21: 'op-amp Rid 10 MΩ, series mixing',
  A23: 'Line driver open-loop gain', B23: '100k',
  A24: 'Line driver gain', B24: '2.5', C24: 'V/V into the cable',
  A25: 'Line driver β', B25: '=FB.BETA(B23; B24)',
  A26: 'Driver output resistance', B26: '=FB.ZOUT("series-shunt"; 40 ohm; B23; B25)', C26: 'open-loop Ro 40 Ω',
  A27: 'Overall gain', B27: '=B8*FB.GAIN(B23; B25)', C27: 'V/V',
  A28: 'Overall gain in dB', B28: '=DB.VOLTAGE(B27)', C28: 'dB',
  A30: 'Preamp op-amp poles', B30: '4 Hz', C30: '12 MHz',
  A31: 'Preamp phase margin (°), crossover', B31: '=LOOP.PM(Atyp; B7; B30:C30)',
  A32: 'Preamp closed-loop bandwidth', B32: '=LOOP.BANDWIDTH(Atyp; B7; B30:C30)',
  A33: 'Step: overshoot %, rise s, 1 % settling s', B33: '=LOOP.STEP(Atyp; B7; 1%; B30:C30)',
  A34: 'Gain resistors R1, R2 (E96, 10k…100k total)', B34: '=RES.PAIR("non-inverting"; Gtarget; "E96"; 10k; 100k; 3)',
  A38: 'Preamp noise at 1 kHz (out, in, per source)', B38: '=NOISE.STAGE("non-inverting"; C34; B34; 1k; 3n; 5; 0.4p; 150; 300; 1 kHz)',
  A39: 'Preamp noise 10 Hz…20 kHz (V rms out, in)', B39: '=NOISE.TOTAL("non-inverting"; C34; B34; 1k; 3n; 5; 0.4p; 150; 300; 1 MHz; 10; 20k)',
  A40: 'Line driver full-power bandwidth, 10 V peak', B40: '=DIST.FPBW(20e6; 10 V)', C40: 'slew rate 20 V/µs',
};

const NAMES = { Atyp: 'B4', Gtarget: 'B6' };

export const DEMO_SHEET = `${JSON.stringify({ format: 'loopwright-sheet', version: 1, cells: CELLS, names: NAMES }, null, 2)}\n`;
