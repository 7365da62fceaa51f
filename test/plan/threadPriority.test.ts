import { readFileSync } from "node:fs";
import { Worker } from "node:worker_threads";
import { describe, expect, it } from "vitest";
import { builtModule } from "../helpers/dist.js";

/** A thread's nice value: field 19 of /proc/<pid>/task/<tid>/stat (proc(5)). */
const niceOf = (stat: string) => Number(stat.slice(stat.lastIndexOf(")") + 2).split(" ")[16]);

const built = builtModule("threadPriority.js", []);

// The constant-altitude comparison's worker lowers its own thread's priority, not the
// process's: Linux keeps a nice value per thread (setpriority(2) on a thread id, proc(5)).
describe.skipIf(process.platform !== "linux" || !built.available)("lowerThisThreadPriority", () => {
  it("raises the calling thread's nice value to the one asked for and leaves the other threads' alone", async () => {
    const before = niceOf(readFileSync("/proc/thread-self/stat", "utf8"));
    const code = `
      const { parentPort } = require("node:worker_threads");
      const { readFileSync } = require("node:fs");
      import(${JSON.stringify(built.href)}).then(({ lowerThisThreadPriority }) => {
        lowerThisThreadPriority(7);
        parentPort.postMessage(readFileSync("/proc/thread-self/stat", "utf8"));
      });`;
    const stat = await new Promise<string>((resolve, reject) => {
      const w = new Worker(code, { eval: true });
      w.once("message", (m: string) => void w.terminate().then(() => resolve(m)));
      w.once("error", reject);
    });
    expect(niceOf(stat)).toBe(Math.max(before, 7));
    expect(niceOf(readFileSync("/proc/thread-self/stat", "utf8"))).toBe(before);
  });
});
