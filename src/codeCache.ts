/**
 * Loads a CommonJS bundle (scripts/bundle.mjs: dist/bundle/lib.cjs, the library; cli.cjs,
 * the CLI; xWorker.cjs, each worker thread's module) through V8's code cache: the bytecode of
 * every function a plan ran, written by the build (scripts/code-cache.mjs) beside the bundle.
 * Without it the engine parses the 3 MB bundle at each start (~50 ms) and compiles each
 * function on its first call (tens of milliseconds more over a plan, on the thread that does
 * the plan's work), and each worker thread does the same for its own.
 *
 * Why by hand: Node 20 keeps no compile cache of its own (module.enableCompileCache is
 * Node 22's), and the packages that add one to require() write it as the module is
 * compiled, before it runs, so it holds the top level but not the functions a run compiles
 * later; here the cache is written when the run that makes it exits.
 *
 * The engine accepts a cache only for its own version and flags, and checks the source by
 * its length only: the cache's file name carries a digest of the bundle's text (put in the
 * entry module by the build), so a rebuilt bundle never reads an older bundle's cache. Nor
 * does a release build of the engine check the cache's own bytes (a damaged byte was taken,
 * test/codeCache.test.ts): the file begins with the SHA-256 of the rest, checked here (~1 ms
 * for the library's 1.7 MB). A cache that fails that or that the engine refuses (another
 * Node, other flags) costs nothing but the read: the bundle is compiled as without one.
 */
import { createHash } from "node:crypto";
import { readFileSync, renameSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import { Script } from "node:vm";
import { isMainThread, threadId } from "node:worker_threads";

/** What became of the cache: read and used, refused by the engine, or not there. */
export type CacheState = "accepted" | "rejected" | "none";

/**
 * Environment variable: "1" makes each entry write its cache when the process exits, or a
 * worker thread at its checkpoint; "workers" the worker threads only (the build's runs,
 * scripts/code-cache.mjs).
 */
export const WRITE_ENV = "GSDPLAN_CODE_CACHE_WRITE";

/**
 * Environment variable naming the engine flags a program set after loading its bundle
 * (cli/engineSettings.ts), which the worker threads it starts inherit with the environment:
 * their caches carry it in their names, since the engine takes a cache only under the flags
 * it was written with. Unset: the engine's own flags.
 */
export const FLAGS_ENV = "GSDPLAN_ENGINE_FLAGS";

/** A bundle compiled, not yet run: its script, what became of the cache, and the cache's writer. */
export interface CompiledBundle {
  script: Script;
  cache: CacheState;
  /** Writes the cache of every function of the script compiled so far in this thread (to a temporary file, then renamed). */
  writeCache: () => void;
}

/** A bundle run: its exports, what became of the cache, and the cache's writer. */
export interface LoadedBundle extends Omit<CompiledBundle, "script"> {
  exports: Record<string, unknown>;
}

/**
 * Compiles `file` (a CommonJS module's text, in the wrapper require() puts around it) with
 * the code cache in `cacheFile` when the engine accepts it; nothing of it runs.
 * @example compileBundle("/pkg/dist/bundle/lib.cjs", "/pkg/dist/bundle/lib.3f2a9c1e.v8cache").cache // "accepted"
 */
export function compileBundle(file: string, cacheFile: string): CompiledBundle {
  const source = readFileSync(file, "utf8");
  const stored = readCache(cacheFile);
  const cachedData = stored === "damaged" ? undefined : stored;
  const script = new Script(`(function (exports, require, module, __filename, __dirname) { ${source}\n})`, { filename: file, cachedData });
  const cache: CacheState = stored === "damaged" || script.cachedDataRejected ? "rejected" : cachedData === undefined ? "none" : "accepted";
  const writeCache = () => {
    const data = script.createCachedData();
    const tmp = `${cacheFile}.${process.pid}.${threadId}.tmp`;
    writeFileSync(tmp, Buffer.concat([sha256(data), data]));
    renameSync(tmp, cacheFile);
  };
  return { script, cache, writeCache };
}

/**
 * Runs `file` as require() would, compiled by compileBundle. `beforeRun` is given the
 * cache's writer before the module's code runs (a worker's module does its work as it loads).
 * @example const { exports } = loadBundle("/pkg/dist/bundle/lib.cjs", "/pkg/dist/bundle/lib.3f2a9c1e.v8cache")
 */
export function loadBundle(file: string, cacheFile: string, beforeRun?: (writeCache: () => void) => void): LoadedBundle {
  const { script, cache, writeCache } = compileBundle(file, cacheFile);
  beforeRun?.(writeCache);
  const run = script.runInThisContext() as (exports: object, require: NodeRequire, module: { exports: object }, filename: string, dirname: string) => void;
  const module = { exports: {} as Record<string, unknown> };
  run.call(module.exports, module.exports, createRequire(file), module, file, path.dirname(file));
  return { exports: module.exports, cache, writeCache };
}

/** The engine's cache data in `cacheFile` (after its SHA-256), "damaged" when the digest does not match, undefined when there is no such file. */
function readCache(cacheFile: string): Buffer | "damaged" | undefined {
  let bytes: Buffer;
  try {
    bytes = readFileSync(cacheFile);
  } catch {
    return undefined;
  }
  const data = bytes.subarray(DIGEST_BYTES);
  return bytes.length > DIGEST_BYTES && sha256(data).equals(bytes.subarray(0, DIGEST_BYTES)) ? data : "damaged";
}

const DIGEST_BYTES = 32;

function sha256(data: Uint8Array): Buffer {
  return createHash("sha256").update(data).digest();
}

/**
 * The entry modules' loader (the library's, the CLI's, each worker thread's): `name`'s
 * bundle and cache in `dir`, the cache for the engine flags FLAGS_ENV names, if any. When
 * WRITE_ENV says so the cache is written when the process exits, and by a worker thread at
 * its codeCacheCheckpoint (its caller ends it without an exit of its own).
 * @example const lib = loadEntry(__dirname, "lib", "3f2a9c1e")
 */
export function loadEntry(dir: string, name: string, digest: string): Record<string, unknown> {
  const mode = process.env[WRITE_ENV];
  const writing = mode === "1" || (mode === "workers" && !isMainThread);
  return loadBundle(path.join(dir, `${name}.cjs`), path.join(dir, cacheFileName(name, digest, process.env[FLAGS_ENV])), (writeCache) => {
    if (!writing) return;
    process.once("exit", writeCache);
    (globalThis as Checkpoint)[CHECKPOINT] = writeCache;
  }).exports;
}

/** Where loadEntry leaves the cache's writer for codeCacheCheckpoint: a bundle has its own copy of this module, the thread's global object is shared. */
const CHECKPOINT = Symbol.for("gsdplan.codeCacheCheckpoint");
type Checkpoint = { [CHECKPOINT]?: () => void };

/**
 * A worker thread's work is done (every function it runs has been compiled): in the build's
 * cache run, the cache of the bundle the thread was loaded from is written now; otherwise
 * nothing happens. Called before the thread tells its caller, which may end it at once.
 * @example codeCacheCheckpoint(); parentPort?.postMessage(result)
 */
export function codeCacheCheckpoint(): void {
  (globalThis as Checkpoint)[CHECKPOINT]?.();
}

/** The cache's file name for a bundle whose text has `digest`, run under the engine flags named `flags` (FLAGS_ENV; none: the engine's own). */
export function cacheFileName(name: string, digest: string, flags?: string): string {
  return flags ? `${name}.${digest}.${flags.replace(/[^A-Za-z0-9-]/g, "-")}.v8cache` : `${name}.${digest}.v8cache`;
}
