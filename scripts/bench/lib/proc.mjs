// Child-process helpers for the benchmarks: every measured job runs in its own process,
// so its peak resident memory is its own and not the runner's. Each also reports its CPU
// time (user + system, all threads): on a shared machine wall time includes waiting for a
// core, CPU time does not, so both are printed.
import { spawnSync } from "node:child_process";
import { loadavg } from "node:os";

/**
 * Runs a command under GNU time (`/usr/bin/time -v`), optionally under coreutils `timeout`;
 * returns wall and CPU seconds, peak RSS in bytes, stdout and stderr, and `timedOut`.
 * Throws with the command's stderr when it fails for another reason.
 * @example const t = timedRun("gdal_translate", ["-q", "-of", "MEM", src, "x"]); t.seconds
 */
export function timedRun(cmd, args, { timeoutS } = {}) {
  const argv = timeoutS ? ["-v", "timeout", "-k", "5", String(timeoutS), cmd, ...args] : ["-v", cmd, ...args];
  const r = spawnSync("/usr/bin/time", argv, { encoding: "utf8", maxBuffer: 1 << 28 });
  const timedOut = Boolean(timeoutS) && /Exit status: 124/.test(r.stderr);
  if (r.status !== 0 && !timedOut) throw new Error(`${cmd} ${args.slice(0, 3).join(" ")} ... failed (${r.status}):\n${r.stderr.slice(-4000)}`);
  const num = (re) => Number(re.exec(r.stderr)?.[1] ?? NaN);
  const wall = /Elapsed \(wall clock\) time \(h:mm:ss or m:ss\): (?:(\d+):)?(\d+):([\d.]+)/.exec(r.stderr);
  const seconds = wall ? Number(wall[1] ?? 0) * 3600 + Number(wall[2]) * 60 + Number(wall[3]) : NaN;
  return {
    seconds,
    cpuS: num(/User time \(seconds\): ([\d.]+)/) + num(/System time \(seconds\): ([\d.]+)/),
    peakRssBytes: num(/Maximum resident set size \(kbytes\): (\d+)/) * 1024,
    stdout: r.stdout,
    stderr: r.stderr,
    timedOut,
  };
}

/**
 * Runs a Node script under GNU time; the script prints one JSON object as the last line of
 * its stdout, returned as `json` (null when it timed out) with the wall time, CPU time and
 * peak RSS of the whole child process.
 * @example const { json, peakRssBytes } = nodeJson("scripts/bench/planChild.mjs", ["plan.json", "out"])
 */
export function nodeJson(script, args = [], { nodeArgs = [], timeoutS } = {}) {
  const t = timedRun(process.execPath, [...nodeArgs, script, ...args], { timeoutS });
  if (t.timedOut) return { ...t, json: null };
  const lines = t.stdout.trim().split("\n");
  let json;
  try {
    json = JSON.parse(lines[lines.length - 1]);
  } catch {
    throw new Error(`${script} printed no JSON result:\n${t.stdout.slice(-2000)}\n${t.stderr.slice(-2000)}`);
  }
  return { ...t, json };
}

/** Smallest value of `key` over repeated runs (the usual figure on a noisy shared machine). */
export function best(rows, key) {
  return Math.min(...rows.map((r) => r[key]));
}

/** Load average over the last minute, as a note beside the figures (2 cores here). */
export function loadAverage() {
  return loadavg()[0];
}
