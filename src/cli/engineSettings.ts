import { setFlagsFromString } from "node:v8";
import { FLAGS_ENV, WRITE_ENV } from "../codeCache.js";

/**
 * How much bytecode a function runs before V8 optimises it (its "interrupt budget"; Node 20's
 * V8 starts at 67 584). A plan runs for seconds on code that starts cold, in several threads
 * that each compile their own: on the demo the optimising compiler (TurboFan, on V8's
 * background threads) took a third of the CPU (perf, 4 runs: 1.25-1.44 s of 3.8-4.4 s), more
 * than the optimised code itself ran (0.7-0.9 s), much of it for functions that had already
 * done their work. With a larger budget the long loops are still optimised (a few
 * milliseconds later) and the short-lived functions are not: on the demo, 0.7-0.9 s of
 * compiling and 3.5-3.8 s of CPU in all at 300 000-500 000 (1 000 000: 0.58 s compiling but
 * 3.7 s in all, the interpreter taking the difference). At 400 000, the demo through the CLI,
 * 12 interleaved pairs: 11 faster, paired median -0.13 s, CPU mean 4.36 -> 4.05 s; the 4 km2
 * benchmark no different (5 interleaved pairs at 300 000: CPU median 9.90 vs 9.87 s).
 */
export const INTERRUPT_BUDGET = 400_000;

/**
 * Set for the CLI's process, first thing (this module is program.ts's first import, so no
 * other module's code has run), and so for the worker threads it starts. The library itself
 * leaves the engine's settings to the program that loads it. V8 reads this budget whenever
 * it (re)arms a function's counter, so setting it at run time takes effect for the code that
 * runs after it (checked with perf: the compiler's share fell as with the command-line flag).
 *
 * The engine takes a code cache (codeCache.ts) only under the flags it was written with. The
 * CLI's bundle is read (its cache checked) before this runs, under the engine's own flags, so
 * the build's run that writes that cache (WRITE_ENV "1") leaves the budget alone; the worker
 * threads start after it, and find their caches by the flags named in FLAGS_ENV, written by
 * the build's run with the budget (WRITE_ENV "workers"). The budget does not change what a
 * cache holds (the functions' bytecode, made on their first call).
 */
if (process.env[WRITE_ENV] !== "1") {
  setFlagsFromString(`--interrupt-budget=${INTERRUPT_BUDGET}`);
  process.env[FLAGS_ENV] = `interrupt-budget-${INTERRUPT_BUDGET}`;
}
