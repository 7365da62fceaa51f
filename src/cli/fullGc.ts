import { setFlagsFromString } from "node:v8";
import { runInNewContext } from "node:vm";

let collect: (() => void) | undefined;

/**
 * A full garbage collection now. For the one point of a plan run where it pays: when the
 * plan is made and its output set built, the run (its DEM window: 79 MB of heights at
 * 4 km2) is garbage, but the engine collects its old generation only under
 * pressure, which the outputs do not make: at 4 km2 the window was still held while the
 * files were written in 2 of 4 runs, and the process's peak rose 40-45 MB above the plan's
 * own; with this collection the outputs stayed under the plan's peak in 4 of 4. It takes a
 * few milliseconds (the plan's own heap is tens of MB; the window's memory is outside it).
 * The engine's gc function is reached through its --expose-gc flag, set here when first
 * asked for (it exposes gc to contexts made afterwards, such as the one made here) and
 * cleared once the function is had, so the engine's flags are as before (a code cache
 * written at exit, codeCache.ts, is accepted only under the flags the bundle was read
 * with); the library itself never calls this: the program decides (cli/planCommand.ts).
 * @example collectGarbage();
 */
export function collectGarbage(): void {
  if (!collect) {
    setFlagsFromString("--expose-gc");
    collect = runInNewContext("gc") as () => void;
    setFlagsFromString("--no-expose-gc");
  }
  collect();
}
