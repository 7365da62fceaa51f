import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";

/**
 * A module of the built library (dist/) and whether it is there with the worker modules it
 * starts: worker threads run only from the build (`npm test` builds it first). Under
 * CI=true a missing build is an error, not a skipped test.
 * @example const m = builtModule("report/background.js", ["renderWorker.js"]); describe.skipIf(!m.available)(...)
 */
export function builtModule(path: string, workers: string[]): { href: string; available: boolean } {
  const url = new URL(`../../dist/${path}`, import.meta.url);
  const available = existsSync(fileURLToPath(url)) && workers.every((w) => existsSync(fileURLToPath(new URL(w, url))));
  if (!available && process.env.CI === "true") throw new Error(`dist/${path} and its workers are required under CI=true (npm test builds them first)`);
  return { href: url.href, available };
}

/**
 * The first difference between two values holding typed arrays, as a short text (or "" when
 * equal): a failing toEqual on arrays of a million numbers would spend minutes on its diff.
 * @example expect(firstDifference(worker, here)).toBe("")
 */
export function firstDifference(a: unknown, b: unknown, path = ""): string {
  if (ArrayBuffer.isView(a) && ArrayBuffer.isView(b)) {
    const x = a as unknown as ArrayLike<number>, y = b as unknown as ArrayLike<number>;
    if (a.constructor !== b.constructor || x.length !== y.length) return `${path}: ${a.constructor.name}(${x.length}) vs ${b.constructor.name}(${y.length})`;
    for (let i = 0; i < x.length; i++) if (!Object.is(x[i], y[i])) return `${path}[${i}]: ${x[i]} vs ${y[i]}`;
    return "";
  }
  if (a !== null && b !== null && typeof a === "object" && typeof b === "object") {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys) {
      const d = firstDifference((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`);
      if (d) return d;
    }
    return "";
  }
  return Object.is(a, b) ? "" : `${path}: ${String(a).slice(0, 80)} vs ${String(b).slice(0, 80)}`;
}
