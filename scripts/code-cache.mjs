// Writes V8's code cache for the bundles (dist/bundle/*.cjs; read by src/codeCache.ts): the
// demo plan runs once through the library's API, as a program that loads it would, once
// through the CLI (`gsdplan demo`), and once more through the library under the engine flags
// the CLI sets (for the worker threads' caches of the CLI's runs), each in a process of its
// own that writes the bytecode of every function that ran when it exits (the worker threads,
// when their work is done).
// The cache holds no results, only compiled code: planning any other site runs the same
// functions, and any the demo did not call are compiled on their first call as without a
// cache.
//
// Usage: node scripts/code-cache.mjs   (run by `npm run build` after scripts/bundle.mjs)
import { spawnSync } from "node:child_process";
import { mkdtempSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join, relative } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const bundle = join(root, "dist", "bundle");
const planFile = join(root, "fixtures", "demo", "corrie-vane-plan.yaml");
// codeCache.ts WRITE_ENV and FLAGS_ENV (a caller's own flags name left out).
const env = { ...process.env };
delete env.GSDPLAN_ENGINE_FLAGS;

// The library's run, in a child process (this script with --library-run: worker threads
// inherit the process's arguments, so the run cannot be given as `node -e`'s text).
if (process.argv[2] === "--library-run") {
  const lib = await import(pathToFileURL(join(bundle, "index.js")).href);
  // With --cli-flags, the engine flags the CLI sets once its bundle is read (the CLI's own
  // module), so that the worker threads' caches are written for the CLI's runs.
  if (process.argv[5] === "--cli-flags") await import(pathToFileURL(join(root, "dist", "cli", "engineSettings.js")).href);
  const file = await lib.loadPlanFile(process.argv[3]);
  // Two threads asked for: the passes a grid this small keeps on one thread are split
  // too, so that every worker module's cache is written (src/background.ts splitAllowed).
  const run = await lib.planMission(lib.resolvePlanOptions(file.data, {}, file.dir), { threads: 2 });
  await lib.writeOutputSet(process.argv[4], lib.planOutputs(run).files, { force: true });
  process.exit(0);
}

// A cache is only a head start: gsdplan runs without one (each bundle then compiled as it
// loads). A failed run here leaves the caches out and says so, rather than failing the build
// (and `npm ci`, which builds); the tests require the caches (test/codeCache.test.ts).
const tmp = mkdtempSync(join(tmpdir(), "gsdplan-code-cache-"));
try {
  for (const [what, args, mode = "1"] of [
    ["library", [fileURLToPath(import.meta.url), "--library-run", planFile, join(tmp, "library")]],
    ["CLI", [join(bundle, "main.js"), "demo", "--quiet", "--out", join(tmp, "cli")]],
    // The worker threads under the engine flags the CLI sets (cli/engineSettings.ts).
    ["CLI's workers", [fileURLToPath(import.meta.url), "--library-run", planFile, join(tmp, "cliWorkers"), "--cli-flags"], "workers"],
  ]) {
    const r = spawnSync(process.execPath, args, { env: { ...env, GSDPLAN_CODE_CACHE_WRITE: mode }, encoding: "utf8", timeout: 300_000 });
    if (r.status !== 0) throw new Error(`the ${what}'s demo run failed (exit ${r.status ?? r.signal}):\n${r.stderr}`);
  }
  // Every bundle's cache, but the campaign's site worker's (the build plans no campaign;
  // that worker compiles as without a cache).
  const written = readdirSync(bundle).filter((f) => f.endsWith(".v8cache"));
  const bundles = readdirSync(bundle)
    .filter((f) => f.endsWith(".cjs") && f !== "siteWorker.cjs")
    .map((f) => f.replace(/\.cjs$/, ""));
  const missing = [
    ...bundles.filter((name) => !written.some((w) => w.startsWith(`${name}.`) && w.split(".").length === 3)),
    ...bundles.filter((name) => name.endsWith("Worker") && !written.some((w) => w.startsWith(`${name}.`) && w.split(".").length === 4)).map((name) => `${name} (the CLI's flags)`),
  ];
  if (missing.length) throw new Error(`no cache was written for ${missing.join(", ")}`);
  console.log(`code cache: ${relative(root, bundle)}/ (${written.length} caches: ${bundles.join(", ")}; the workers' also under the CLI's flags)`);
} catch (e) {
  console.warn(`code cache: not complete in ${relative(root, bundle)}/ (${e.message}); gsdplan runs without it, compiling its code as it loads`);
} finally {
  rmSync(tmp, { recursive: true, force: true });
}
