/**
 * The bundles' loader through V8's code cache (src/codeCache.ts) and the caches the build
 * writes (scripts/code-cache.mjs). The judge is the engine itself: vm.Script's
 * cachedDataRejected says whether it took a cache, read in a fresh process as a user's run
 * reads it.
 */
import { describe, expect, it } from "vitest";
import { spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { Worker } from "node:worker_threads";
import { build } from "esbuild";
import { cacheFileName, loadBundle, WRITE_ENV } from "../src/codeCache.js";
import { ROOT } from "./e2e/cli.js";

const LOADER = pathToFileURL(path.join(ROOT, "dist", "bundle", "codeCache.js")).href;
const FULL_GC = path.join(ROOT, "dist", "cli", "fullGc.js");

/** A small CommonJS module: a function, a value and strict mode (its `this` in a plain call). */
function bundleFile(): string {
  const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-code-cache-test-"));
  const file = path.join(dir, "small.cjs");
  writeFileSync(file, '"use strict";\nexports.twice = (x) => 2 * x;\nexports.name = require("node:path").basename(__filename);\nexports.strict = (function () { return this === undefined; })();\n');
  return file;
}

/** Runs `script` (an ES module's text, the built loader's exports in scope) in a fresh Node process; its stdout. */
function inChild(script: string): string {
  const r = spawnSync(process.execPath, ["--input-type=module", "-e", `const { loadBundle } = await import(${JSON.stringify(LOADER)});\n${script}`], { encoding: "utf8" });
  if (r.status !== 0) throw new Error(r.stderr);
  return r.stdout;
}

/** Compiles `file` with `cache` in a fresh process without running it (a worker's module does its work as it loads): what became of the cache. */
function compiledInChild(file: string, cache: string): string {
  return inChild(`const { compileBundle } = await import(${JSON.stringify(LOADER)});\nprocess.stdout.write(compileBundle(${JSON.stringify(file)}, ${JSON.stringify(cache)}).cache);`);
}

/** Loads `file` with `cache` in a fresh process: what became of the cache and what the module exported. */
function loadInChild(file: string, cache: string): { cache: string; twice: number; name: string; strict: boolean } {
  return JSON.parse(inChild(`const r = loadBundle(${JSON.stringify(file)}, ${JSON.stringify(cache)});\nprocess.stdout.write(JSON.stringify({ cache: r.cache, twice: r.exports.twice(21), name: r.exports.name, strict: r.exports.strict }));`));
}

describe("loadBundle", () => {
  it("runs a CommonJS module as require() would, and a cache it writes is taken by a fresh process", () => {
    const file = bundleFile();
    const cache = path.join(path.dirname(file), cacheFileName("small", "0123456789abcdef"));
    const first = loadBundle(file, cache);
    expect(first.cache).toBe("none");
    expect((first.exports.twice as (x: number) => number)(21)).toBe(42);
    expect(first.exports.name).toBe("small.cjs");
    expect(first.exports.strict).toBe(true);
    first.writeCache();
    expect(existsSync(cache)).toBe(true);
    expect(loadInChild(file, cache)).toEqual({ cache: "accepted", twice: 42, name: "small.cjs", strict: true });
  });

  it("compiles as without a cache when the cache is damaged (its digest) or is another source's (the engine's check)", () => {
    const file = bundleFile();
    const cache = path.join(path.dirname(file), "small.damaged.v8cache");
    loadBundle(file, cache).writeCache();
    const bytes = readFileSync(cache);
    // A byte of the engine's data changed: Node 20's engine takes such a cache unchecked
    // (found while writing this test), the file's own digest refuses it.
    bytes[bytes.length - 8] ^= 0xff;
    writeFileSync(cache, bytes);
    expect(loadInChild(file, cache)).toEqual({ cache: "rejected", twice: 42, name: "small.cjs", strict: true });
    // Another module's cache, intact: the engine refuses it (the sources' lengths differ).
    const other = path.join(path.dirname(file), "other.cjs");
    writeFileSync(other, 'exports.twice = (x) => x + x; exports.name = "other.cjs"; exports.strict = false;\n');
    loadBundle(other, cache).writeCache();
    expect(loadInChild(file, cache)).toEqual({ cache: "rejected", twice: 42, name: "small.cjs", strict: true });
  });

  it("a cache written after the CLI's full collection (cli/fullGc.ts) is still taken: the engine's flags are left as they were", () => {
    const file = bundleFile();
    const cache = path.join(path.dirname(file), "small.gc.v8cache");
    inChild(`const r = loadBundle(${JSON.stringify(file)}, ${JSON.stringify(cache)});\nconst { collectGarbage } = await import(${JSON.stringify(pathToFileURL(FULL_GC).href)});\ncollectGarbage();\nr.writeCache();`);
    expect(loadInChild(file, cache).cache).toBe("accepted");
  });
});

describe("a worker thread's cache (loadEntry, codeCacheCheckpoint)", () => {
  it("is written at the worker's checkpoint, though its caller ends it as soon as it has the result", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "gsdplan-code-cache-worker-"));
    // A worker module that does its work as it loads, as ours do, then tells its caller;
    // bundled as CommonJS with its own copy of codeCache.ts, as scripts/bundle.mjs bundles ours.
    writeFileSync(
      path.join(dir, "testWorker.ts"),
      `import { parentPort } from "node:worker_threads";\nimport { codeCacheCheckpoint } from ${JSON.stringify(path.join(ROOT, "src", "codeCache.ts"))};\nconst sum = (n: number) => { let s = 0; for (let i = 0; i < n; i++) s += i; return s; };\nconst result = sum(1000);\ncodeCacheCheckpoint();\nparentPort?.postMessage(result);\n`,
    );
    await build({ entryPoints: [path.join(dir, "testWorker.ts")], outfile: path.join(dir, "testWorker.cjs"), bundle: true, platform: "node", format: "cjs", logLevel: "silent" });
    writeFileSync(path.join(dir, "testWorker.js"), `import { loadEntry } from ${JSON.stringify(LOADER)};\nloadEntry(${JSON.stringify(dir)}, "testWorker", "0123456789abcdef");\n`);
    const w = new Worker(path.join(dir, "testWorker.js"), { env: { ...process.env, [WRITE_ENV]: "1" } });
    const result = await new Promise((resolve, reject) => {
      w.once("message", resolve);
      w.once("error", reject);
    });
    await w.terminate();
    expect(result).toBe(499500);
    const cache = path.join(dir, cacheFileName("testWorker", "0123456789abcdef"));
    expect(existsSync(cache)).toBe(true);
    expect(compiledInChild(path.join(dir, "testWorker.cjs"), cache)).toBe("accepted");
  });
});

describe("the build's caches (scripts/bundle.mjs, scripts/code-cache.mjs)", () => {
  const bundle = path.join(ROOT, "dist", "bundle");
  const entries: [string, string][] = [
    ["index.js", "lib"],
    ["main.js", "cli"],
    ...["baselineWorker", "blockWorker", "cogFileWorker", "coverageWorker", "flagPolygonsWorker", "mapsWorker", "renderWorker"].map((w): [string, string] => [`${w}.js`, w]),
  ];
  for (const [entry, name] of entries) {
    it(`${entry} names the cache of ${name}.cjs by the digest of its text, and a fresh process takes it`, () => {
      const digest = createHash("sha256").update(readFileSync(path.join(bundle, `${name}.cjs`))).digest("hex").slice(0, 16);
      expect(readFileSync(path.join(bundle, entry), "utf8")).toContain(`"${name}", "${digest}"`);
      const cache = path.join(bundle, cacheFileName(name, digest));
      expect(existsSync(cache), `${cache} is missing: npm run build writes it`).toBe(true);
      expect(compiledInChild(path.join(bundle, `${name}.cjs`), cache)).toBe("accepted");
    });
  }

  // The CLI sets engine flags once its bundle is read (cli/engineSettings.ts); the workers it
  // starts then find their caches by the flags' name (FLAGS_ENV), as the CLI's process does.
  for (const [entry, name] of entries.filter(([, n]) => n.endsWith("Worker"))) {
    it(`${entry}'s cache under the CLI's engine flags is taken there, and the plain one is not`, () => {
      const digest = createHash("sha256").update(readFileSync(path.join(bundle, `${name}.cjs`))).digest("hex").slice(0, 16);
      const settings = pathToFileURL(path.join(ROOT, "dist", "cli", "engineSettings.js")).href;
      const states = inChild(
        `const { compileBundle, cacheFileName, FLAGS_ENV } = await import(${JSON.stringify(LOADER)});\n` +
          `await import(${JSON.stringify(settings)});\n` +
          `const file = ${JSON.stringify(path.join(bundle, `${name}.cjs`))};\n` +
          `const flagged = compileBundle(file, ${JSON.stringify(bundle)} + "/" + cacheFileName(${JSON.stringify(name)}, ${JSON.stringify(digest)}, process.env[FLAGS_ENV])).cache;\n` +
          `const plain = compileBundle(file, ${JSON.stringify(bundle)} + "/" + cacheFileName(${JSON.stringify(name)}, ${JSON.stringify(digest)})).cache;\n` +
          `process.stdout.write(JSON.stringify({ flags: process.env[FLAGS_ENV], flagged, plain }));`,
      );
      expect(JSON.parse(states)).toEqual({ flags: "interrupt-budget-400000_no-turbo-escape_no-turbo-loop-peeling", flagged: "accepted", plain: "rejected" });
    });
  }
});
