// Types of the entry module (loopwright.js): the same names and signatures as the
// generated glue, whose declarations (with their doc comments) are re-exported.
export * from './loopwright_glue.js';
export { default } from './loopwright_glue.js';
