import { existsSync, readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

let root: string | undefined;

/**
 * The folder of gsdplan's package.json, found upward from this module's file: the same
 * answer from src/ (tests), dist/ (tsc's output) and dist/bundle/ (the bundled CLI and
 * library, scripts/bundle.mjs), where a fixed number of ".." would differ.
 * @example join(packageRoot(), "fixtures", "demo", "corrie-vane-plan.yaml")
 */
export function packageRoot(): string {
  if (root !== undefined) return root;
  let dir = dirname(fileURLToPath(import.meta.url));
  for (;;) {
    const file = join(dir, "package.json");
    if (existsSync(file) && isOurs(file)) return (root = dir);
    const up = dirname(dir);
    if (up === dir) throw new Error(`gsdplan's package.json not found above ${fileURLToPath(import.meta.url)}`);
    dir = up;
  }
}

/**
 * The version in gsdplan's package.json, "unknown" when it cannot be read.
 * @example packageVersion() // "0.1.0"
 */
export function packageVersion(): string {
  try {
    return (JSON.parse(readFileSync(join(packageRoot(), "package.json"), "utf8")) as { version: string }).version;
  } catch {
    return "unknown";
  }
}

function isOurs(file: string): boolean {
  try {
    return (JSON.parse(readFileSync(file, "utf8")) as { name?: string }).name === "gsdplan";
  } catch {
    return false;
  }
}
