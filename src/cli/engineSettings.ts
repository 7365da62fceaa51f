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
 * The engine flags set: the interrupt budget above, and two of the optimising compiler's
 * phases left out, escape analysis and loop peeling, which were about a quarter of its work
 * here: on the 4 km2 benchmark (perf, one run each) the compiler's CPU fell from 0.99 s to
 * 0.85 s without escape analysis and to 0.74 s without both, for code that ran about as fast
 * (the plan's hot loops run over typed arrays and allocate little for escape analysis to
 * remove). The whole run, interleaved with the budget alone: 3.12 -> 3.00 s median over 8
 * pairs (CPU 5.90 -> 5.65 s), 3.03 -> 3.00 s over 12 (8 faster; CPU 5.72 -> 5.64 s); the demo
 * through the CLI 1.53 -> 1.48 s (8 pairs). Leaving out more phases (load elimination, loop
 * variable analysis, splitting) took no more off; inlining is kept (without it the run was
 * slower).
 */
export const ENGINE_FLAGS: readonly string[] = [`--interrupt-budget=${INTERRUPT_BUDGET}`, "--no-turbo-escape", "--no-turbo-loop-peeling"];

/**
 * Set for the CLI's process, first thing (this module is program.ts's first import, so no
 * other module's code has run), and so for the worker threads it starts. The library itself
 * leaves the engine's settings to the program that loads it. V8 reads the budget whenever
 * it (re)arms a function's counter, and the compiler's phases at each compile, so setting
 * them at run time takes effect for the code that runs after it (checked with perf: the
 * compiler's share fell as with the command-line flags).
 *
 * The engine takes a code cache (codeCache.ts) only under the flags it was written with. The
 * CLI's bundle is read (its cache checked) before this runs, under the engine's own flags, so
 * the build's run that writes that cache (WRITE_ENV "1") leaves the flags alone; the worker
 * threads start after it, and find their caches by the flags named in FLAGS_ENV, written by
 * the build's run with the flags (WRITE_ENV "workers"). The flags do not change what a
 * cache holds (the functions' bytecode, made on their first call).
 */
if (process.env[WRITE_ENV] !== "1") {
  for (const flag of ENGINE_FLAGS) setFlagsFromString(flag);
  // "interrupt-budget-400000_no-turbo-escape_no-turbo-loop-peeling": the caches' name part.
  process.env[FLAGS_ENV] = ENGINE_FLAGS.map((f) => f.replace(/^--/, "").replace(/=/g, "-")).join("_");
}
