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
// The library, the CLI and the workers are CommonJS bundles (lib.cjs, cli.cjs, xWorker.cjs)
// behind small ES module entries (index.js, main.js, xWorker.js) that run them through V8's
// code cache (src/codeCache.ts; the cache is written by scripts/code-cache.mjs, after this):
// the 4 km2 benchmark, 8 interleaved pairs, 3.47 -> 3.29 s (CPU 6.39 -> 6.13 s; the demo
// 1.63 -> 1.54 s), the engine no longer parsing the 3 MB bundle at each start nor compiling
// each function a plan calls. An ES module cannot be run from a cache on Node 20. The
// entries' digests name the cache files (codeCache.ts says why).
//
// Usage: node scripts/bundle.mjs   (run by `npm run build` after tsc)
import { createHash } from "node:crypto";
import { chmodSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
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
const common = { bundle: true, platform: "node", target: "node20", logLevel: "warning" };
// The library, the CLI and the worker modules as CommonJS (so that they can run from a code
// cache): import.meta.url (worker modules and package files are found from it) becomes the
// bundle's own file URL; strict, as the ES modules were.
const entries = { lib: join(dist, "index.js"), cli: join(dist, "cli", "program.js"), ...Object.fromEntries(workers.map((p) => [p.split("/").pop().replace(/\.js$/, ""), p])) };
const { metafile } = await build({
  ...common,
  entryPoints: entries,
  outdir: out,
  outExtension: { ".js": ".cjs" },
  format: "cjs",
  define: { "import.meta.url": "__gsdplanModuleUrl" },
  banner: { js: "\"use strict\"; var __gsdplanModuleUrl = require(\"node:url\").pathToFileURL(__filename).href;" },
  metafile: true,
});
// A script run from a code cache has no module loader behind it: an import() left in a bundle
// (of a module outside it) would fail when called.
const dynamic = Object.entries(metafile.outputs).flatMap(([file, o]) => o.imports.filter((i) => i.kind === "dynamic-import").map((i) => `${relative(root, file)}: import("${i.path}")`));
if (dynamic.length) throw new Error(`bundle: dynamic imports cannot run from the code cache:\n${dynamic.join("\n")}`);
await build({ ...common, entryPoints: [join(dist, "codeCache.js")], outfile: join(out, "codeCache.js"), format: "esm" });

/** The first 16 hex digits of the SHA-256 of a bundle's text (the cache's file name, codeCache.ts). */
const digest = (name) => createHash("sha256").update(readFileSync(join(out, `${name}.cjs`))).digest("hex").slice(0, 16);
const loader = (name) =>
  `import { dirname } from "node:path";\n` +
  `import { fileURLToPath } from "node:url";\n` +
  `import { loadEntry } from "./codeCache.js";\n` +
  `const loaded = loadEntry(dirname(fileURLToPath(import.meta.url)), ${JSON.stringify(name)}, ${JSON.stringify(digest(name))});\n`;
// The library's entry re-exports each of lib.cjs's exports by name (read from the module itself).
const libNames = Object.keys(createRequire(import.meta.url)(join(out, "lib.cjs")));
const bad = libNames.filter((n) => !/^[A-Za-z_$][\w$]*$/.test(n) || n === "default");
if (bad.length) throw new Error(`bundle: the library exports names an ES module cannot re-export as constants: ${bad.join(", ")}`);
writeFileSync(join(out, "index.js"), `// gsdplan's library (lib.cjs, scripts/bundle.mjs).\n${loader("lib")}export const {\n${libNames.map((n) => `  ${n},`).join("\n")}\n} = loaded;\n`);
writeFileSync(join(out, "main.js"), `#!/usr/bin/env node\n// gsdplan's command line (cli.cjs, scripts/bundle.mjs).\n${loader("cli")}await loaded.runCli(process.argv);\n`);
chmodSync(join(out, "main.js"), 0o755);
// Each worker's module runs its bundle (which does its work on load).
for (const name of Object.keys(entries).filter((n) => n.endsWith("Worker"))) {
  writeFileSync(join(out, `${name}.js`), `// A gsdplan worker thread (${name}.cjs, scripts/bundle.mjs).\n${loader(name).replace("const loaded = ", "")}`);
}
console.log(`bundle: ${relative(root, out)}/ (main.js, index.js and ${workers.length} worker modules over their CommonJS bundles)`);
