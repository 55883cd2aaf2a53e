// Types of the entry module (loopwright.js): the same names and signatures as the
// generated glue, whose declarations (with their doc comments) are re-exported.
export * from './loopwright_glue.js';
export { default } from './loopwright_glue.js';

/** What a context allows when reading a typed value (docs/notation.md). */
export interface ReadOptions {
  /** A trailing % (÷ 100) is allowed. Default false. */
  percent?: boolean;
  /** dB is allowed (a level). Default false. */
  decibels?: boolean;
  /** The declared unit (Ω, V, A, W, S, Hz, F, H, s, dB): another written unit is refused. Default none. */
  unit?: string | null;
}
/** Read one typed value: `4k7`, `4.7 kΩ`, `100nF`, `R47`; throws a LoopwrightError (code "syntax", with `column`). */
export function parseValue(text: string, options?: ReadOptions): number;
/** Read a list of values separated by `,` or `;`. */
export function parseList(text: string, options?: ReadOptions): Float64Array;
