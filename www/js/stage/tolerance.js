// Worst case and Monte Carlo of a stage against its spec, behind one small adapter:
// today the two-resistor engine of the network area (worstCase, monteCarlo; the
// amplifier's A0 spread, Rd and Ro with the two feedback resistors' tolerance), for
// the non-inverting and inverting stages. A whole-stage engine can replace
// `stageTolerance` without the view changing: it returns the same shape.

import { formatPlain } from '../format.js';

/** The network engine's name of a stage kind, or null when it does not model it. */
const NETWORK_STAGE = { 'non-inverting': 'non-inverting', inverting: 'inverting' };

/**
 * `{worst: {nominal, min, max, pass}, monteCarlo: {yieldFraction, mean, sd,
 * trials}, note}` for the stage `n` (numbers read by the core's reader: rf, rg,
 * a0Min, a0, a0Max, rd, ro, gbwHz or dominantPoleHz, partTolerance) against the
 * gain limits `lower` … `upper`; `{note}` alone when the engine does not apply.
 */
export function stageTolerance(api, kind, n, { lower, upper }) {
  const stage = NETWORK_STAGE[kind];
  if (!stage || !(n.rf > 0) || !(n.rg > 0))
    return {
      note: 'Worst case and Monte Carlo cover the non-inverting and inverting stages with Rf and Rg for now.',
    };
  const common = {
    stage,
    r1: n.rg,
    r2: n.rf,
    tolR1: n.partTolerance,
    tolR2: n.partTolerance,
    aMin: n.a0Min ?? n.a0,
    aTyp: n.a0,
    aMax: n.a0Max ?? n.a0,
    // The network engine takes one input resistance; Rd stands for it (1 TΩ when none is given).
    ri: n.rd ?? 1e12,
    ro: n.ro ?? 0,
    ...(n.gbwHz ? { gbwHz: n.gbwHz } : { poleHz: n.dominantPoleHz }),
  };
  const wc = api.worstCase(common);
  // The network engine signs the inverting gain; the spec is on its magnitude.
  const limits = stage === 'inverting' ? { lower: -upper, upper: -lower } : { lower, upper };
  const mc = api.monteCarlo({ ...common, metric: 'gain', trials: 20000, seed: 1, ...limits });
  const g = wc.gain;
  const lo = Math.min(Math.abs(g.min), Math.abs(g.max));
  const hi = Math.max(Math.abs(g.min), Math.abs(g.max));
  return {
    worst: {
      nominal: Math.abs(g.nominal),
      min: lo,
      max: hi,
      pass: lo >= lower && hi <= upper,
      // Which end of each part gives the lowest and the highest |gain|.
      corners:
        Math.abs(g.min) <= Math.abs(g.max)
          ? [g.minCorner, g.maxCorner]
          : [g.maxCorner, g.minCorner],
    },
    monteCarlo: {
      yieldFraction: mc.stats.yieldFraction,
      mean: Math.abs(mc.stats.mean),
      sd: mc.stats.sd,
      trials: mc.stats.count,
    },
    note: `Two resistors at ±${formatPlain(n.partTolerance * 100, 3, '%')} (uniform) and A0 over its spread (log-normal), 20 000 trials; the network engine of the Calculators tab.`,
  };
}
