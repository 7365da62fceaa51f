/**
 * Writes a set of output files so that the out folder holds either the whole
 * new set or nothing new: every file is written into a hidden temp folder
 * inside the out folder (same file system, so rename is atomic), and only
 * when all are written are they renamed into place. With `force`, files
 * being replaced are first moved aside and put back if a rename fails.
 */
import { mkdir, rename, rm, stat, writeFile, access, rmdir } from "node:fs/promises";
import { constants } from "node:fs";
import path from "node:path";
import { InputError } from "../errors.js";

/** A file's content: text, bytes, or byte chunks in order (written as they come, never joined in memory). */
export type OutputData = string | Uint8Array | ArrayBuffer | Iterable<Uint8Array>;

export interface OutputFile {
  /** File name inside the out folder (no folders). */
  name: string;
  /** The content, or a function making it (called one at a time, so big rasters need not all sit in memory). */
  data: OutputData | (() => OutputData | Promise<OutputData>);
  /**
   * Writes the file itself at `filePath` (on a worker thread, say) while the others are
   * written; started before them. Resolves true when written, false when it could not start
   * (then `data` is written instead, after the others); a rejection fails the whole set.
   */
  background?: (filePath: string) => Promise<boolean>;
}

export interface WriteOutputsOptions {
  /** Replace existing files of the same names. */
  force?: boolean;
  /** Field name used in errors (the CLI flag). Default `--out`. */
  field?: string;
}

/**
 * Writes all `files` into `outDir` atomically as a set; returns their paths.
 * Throws InputError (nothing written) when the folder cannot be written or an
 * output exists without `force`.
 *
 * @example
 *   await writeOutputSet("out", [{ name: "waypoints.csv", data: csv }, { name: "gsd.tif", data: () => tif }]);
 */
export async function writeOutputSet(outDir: string, files: OutputFile[], options: WriteOutputsOptions = {}): Promise<string[]> {
  const field = options.field ?? "--out";
  const dir = path.resolve(outDir);
  for (const f of files) {
    if (!f.name || f.name !== path.basename(f.name) || f.name.startsWith(".gsdplan-")) {
      throw new Error(`output name ${JSON.stringify(f.name)} must be a plain file name`);
    }
  }
  if (new Set(files.map((f) => f.name)).size !== files.length) throw new Error("output names must be unique");

  const existedBefore = await exists(dir);
  if (existedBefore && !(await stat(dir)).isDirectory()) {
    throw new InputError(field, outDir, "a folder (or a path where one can be made)", "not a folder");
  }
  const targets = files.map((f) => path.join(dir, f.name));
  if (!options.force) {
    const present: string[] = [];
    for (const t of targets) if (await exists(t)) present.push(path.basename(t));
    if (present.length) {
      throw new InputError(field, outDir, "a folder without earlier outputs, or --force to replace them", `outputs exist (${present.join(", ")})`);
    }
  }

  try {
    await makeDirs(dir);
    await access(dir, constants.W_OK);
  } catch (e) {
    throw new InputError(field, outDir, "a folder you can write to", `cannot write there (${(e as NodeJS.ErrnoException).code ?? e})`);
  }

  const tmp = path.join(dir, `.gsdplan-${process.pid}-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 8)}`);
  const backup = path.join(tmp, ".replaced");
  const placed: string[] = [];
  const movedAside: string[] = [];
  try {
    await mkdir(backup, { recursive: true });
    const write = async (f: OutputFile) => {
      const data = typeof f.data === "function" ? await f.data() : f.data;
      await writeFile(path.join(tmp, f.name), data instanceof ArrayBuffer ? new Uint8Array(data) : data);
    };
    // Files that write themselves start first and are awaited once the others are written
    // (all of them, even when one fails, so none still writes into the folder removed below).
    const started = files.filter((f) => f.background).map((f) => ({ f, written: f.background!(path.join(tmp, f.name)) }));
    // Handled here so a failure while the others are written is not an unhandled rejection; it is thrown below.
    for (const s of started) s.written.catch(() => undefined);
    try {
      for (const f of files) if (!f.background) await write(f);
    } finally {
      await Promise.allSettled(started.map((s) => s.written));
    }
    for (const { f, written } of started) if (!(await written)) await write(f);
    for (const [i, f] of files.entries()) {
      if (options.force && (await exists(targets[i]))) {
        await rename(targets[i], path.join(backup, f.name));
        movedAside.push(f.name);
      }
      await rename(path.join(tmp, f.name), targets[i]);
      placed.push(f.name);
    }
  } catch (e) {
    // Undo: remove what was placed, put back what was replaced, drop the temp folder.
    for (const name of placed) await rm(path.join(dir, name), { force: true });
    for (const name of movedAside) await rename(path.join(backup, name), path.join(dir, name)).catch(() => undefined);
    await rm(tmp, { recursive: true, force: true });
    if (!existedBefore) await rmdir(dir).catch(() => undefined);
    const code = (e as NodeJS.ErrnoException).code;
    if (code === "EACCES" || code === "EPERM" || code === "EROFS" || code === "ENOSPC") {
      throw new InputError(field, outDir, "a folder you can write to, with space left", `cannot write there (${code})`);
    }
    throw e;
  }
  await rm(tmp, { recursive: true, force: true });
  return targets;
}

/**
 * mkdir -p, one level at a time: Node 20's `mkdir(dir, { recursive: true })` never
 * settles for a path it cannot make under /proc (mkdir there fails with ENOENT
 * although the parent exists, and the recursive walk retries for ever).
 */
async function makeDirs(dir: string): Promise<void> {
  const missing: string[] = [];
  for (let d = dir; !(await exists(d)); d = path.dirname(d)) {
    missing.push(d);
    if (path.dirname(d) === d) break;
  }
  for (const d of missing.reverse()) {
    try {
      await mkdir(d);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== "EEXIST") throw e;
    }
  }
}

async function exists(p: string): Promise<boolean> {
  try {
    await stat(p);
    return true;
  } catch {
    return false;
  }
}
