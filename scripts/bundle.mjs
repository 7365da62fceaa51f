// Bundles the compiled library (dist/, from tsc) into dist/bundle/: the CLI (main.js), the
// library's entry (index.js) and every worker thread's module (*Worker.js), each one file
// with all it imports, dependencies included.
//
// Why: Node resolves, reads and links each ES module on its own. The plan command loads
// some 460 files (ours and our dependencies'); as one bundle the same code loads in ~80 ms
// instead of ~220 ms (~300 ms of CPU), on every run and again in each worker thread; the
// demo's plan measured 2.32 -> 2.12 s (median of 10 interleaved runs, 4.0 -> 3.7 s of CPU).
// Tried and left: code shared between the entries split into chunks (~70 files: the library's
// entry loaded in ~100 ms, not ~80), and the CLI's commands as chunks of their own (--help
// 0.10 s instead of 0.14 s, a plan no faster, 55 more files).
// The library bundles its dependencies too (a user's own proj4 or zod is another copy:
// gsdplan's API takes CRS as text and EPSG codes, and plan options as plain objects).
//
// All outputs sit in one folder, so `new URL("./xWorker.js", import.meta.url)` finds a
// worker's module from any bundled file as it does beside its caller in dist/. Files the
// code reads at run time are found from the package root (src/packageRoot.ts), not from
// the module's own folder. Dependencies read through createRequire (EPSG index, EGM96
// grid) stay in node_modules.
//
// Usage: node scripts/bundle.mjs   (run by `npm run build` after tsc)
import { readdirSync, rmSync } from "node:fs";
import { dirname, join, relative } from "node:path";
import { fileURLToPath } from "node:url";
import { build } from "esbuild";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const dist = join(root, "dist");
const out = join(dist, "bundle");

/** dist's worker modules, by their file names (unique: they become one folder's files). */
function workerModules(dir) {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = join(dir, e.name);
    if (e.isDirectory()) return p === out ? [] : workerModules(p);
    return /Worker\.js$/.test(e.name) ? [p] : [];
  });
}

const workers = workerModules(dist);
const names = workers.map((p) => p.split("/").pop());
const twice = names.filter((n, i) => names.indexOf(n) !== i);
if (twice.length) throw new Error(`bundle: worker modules share a file name (${twice.join(", ")}): the bundle keeps them in one folder`);

rmSync(out, { recursive: true, force: true });
await build({
  entryPoints: [join(dist, "index.js"), join(dist, "cli", "main.js"), ...workers],
  outdir: out,
  entryNames: "[name]",
  bundle: true,
  format: "esm",
  platform: "node",
  target: "node20",
  // CommonJS dependencies call require(); an ES module has none of its own.
  banner: { js: "import { createRequire as __gsdplanRequire } from \"node:module\"; const require = __gsdplanRequire(import.meta.url);" },
  logLevel: "warning",
});
console.log(`bundle: ${relative(root, out)}/ (main.js, index.js, ${workers.length} worker modules)`);
