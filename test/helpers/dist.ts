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
