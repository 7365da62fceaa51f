/**
 * Runs the built CLI (`node dist/bundle/main.js`, package.json's bin) as a user would, from the
 * repository root. `npm test` builds first; a missing build is an error here,
 * not a silent skip.
 */
import { spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdtempSync, readdirSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
export const CLI = path.join(ROOT, "dist", "bundle", "main.js");

export interface CliResult {
  status: number | null;
  stdout: string;
  stderr: string;
}

/** `node dist/bundle/main.js ...args` with stdout and stderr piped (not a terminal). */
export function runCli(args: string[], opts: { cwd?: string; timeoutMs?: number } = {}): CliResult {
  if (!existsSync(CLI)) throw new Error(`${CLI} is missing: run \`npm run build\` first (npm test does)`);
  const r = spawnSync(process.execPath, [CLI, ...args], {
    cwd: opts.cwd ?? ROOT,
    encoding: "utf8",
    timeout: opts.timeoutMs ?? 120_000,
    env: { ...process.env, GDAL_PAM_ENABLED: "NO", FORCE_COLOR: "0" },
  });
  if (r.error) throw r.error;
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

/**
 * The same command with stderr (and stdout) on a pseudo-terminal, through
 * util-linux `script`, so the CLI sees a TTY as in an interactive shell.
 * Returns the child's exit status (script -e) and everything it printed.
 */
export function runCliOnTty(args: string[], opts: { timeoutMs?: number } = {}): CliResult {
  const quoted = [process.execPath, CLI, ...args].map((a) => `'${a.replace(/'/g, `'\\''`)}'`).join(" ");
  const r = spawnSync("script", ["-q", "-e", "-c", quoted, "/dev/null"], {
    cwd: ROOT,
    encoding: "utf8",
    timeout: opts.timeoutMs ?? 120_000,
    env: { ...process.env, GDAL_PAM_ENABLED: "NO", FORCE_COLOR: "0" },
  });
  if (r.error) throw r.error;
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** A fresh temporary folder (the CLI's --out goes inside it, so "absent" can be checked too). */
export function tempDir(prefix: string): string {
  return mkdtempSync(path.join(tmpdir(), `gsdplan-e2e-${prefix}-`));
}

/** SHA-256 of a file's bytes. */
export function sha256(file: string): string {
  return createHash("sha256").update(readFileSync(file)).digest("hex");
}

/** Files in a folder, or null when the folder does not exist. */
export function listDir(dir: string): string[] | null {
  return existsSync(dir) ? readdirSync(dir) : null;
}

/** RFC 4180-style CSV without quoted fields (waypoints.csv has none): header and rows. */
export function parseCsv(text: string): { header: string[]; rows: string[][] } {
  expectTrailingNewline(text);
  const lines = text.replace(/\r\n/g, "\n").replace(/\n$/, "").split("\n");
  const header = lines[0].split(",");
  const rows = lines.slice(1).map((l) => l.split(","));
  return { header, rows };
}

function expectTrailingNewline(text: string): void {
  if (!text.endsWith("\n")) throw new Error("CSV does not end with a line break");
}
