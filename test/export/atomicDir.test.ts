import { describe, it, expect } from "vitest";
import { chmodSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { InputError } from "../../src/errors.js";
import { writeOutputSet } from "../../src/export/atomicDir.js";

const fresh = () => mkdtempSync(path.join(tmpdir(), "gsdplan-atomic-"));

describe("writeOutputSet", () => {
  it("writes every file, creating the folder, and leaves no temp folder", async () => {
    const out = path.join(fresh(), "out");
    const paths = await writeOutputSet(out, [
      { name: "a.csv", data: "x,y\n" },
      { name: "b.bin", data: new Uint8Array([1, 2, 3]) },
      { name: "c.bin", data: () => new Uint8Array([4]).buffer },
    ]);
    expect(paths.map((p) => path.basename(p))).toEqual(["a.csv", "b.bin", "c.bin"]);
    expect(readdirSync(out).sort()).toEqual(["a.csv", "b.bin", "c.bin"]);
    expect([...readFileSync(path.join(out, "b.bin"))]).toEqual([1, 2, 3]);
    expect([...readFileSync(path.join(out, "c.bin"))]).toEqual([4]);
  });

  it("leaves nothing when a file fails midway", async () => {
    const parent = fresh();
    const out = path.join(parent, "out");
    const run = writeOutputSet(out, [
      { name: "a.csv", data: "first" },
      {
        name: "b.tif",
        data: () => {
          throw new Error("encoder failed");
        },
      },
      { name: "c.json", data: "{}" },
    ]);
    await expect(run).rejects.toThrow("encoder failed");
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(parent)).toEqual([]);
  });

  it("leaves an existing folder as it was when a file fails midway", async () => {
    const out = fresh();
    writeFileSync(path.join(out, "notes.txt"), "mine");
    await expect(writeOutputSet(out, [{ name: "a.csv", data: "1" }, { name: "b.csv", data: () => Promise.reject(new Error("boom")) }])).rejects.toThrow("boom");
    expect(readdirSync(out)).toEqual(["notes.txt"]);
  });

  it("refuses to overwrite an existing output without force, naming it, and writes nothing", async () => {
    const out = fresh();
    writeFileSync(path.join(out, "b.csv"), "old");
    const e = await writeOutputSet(out, [{ name: "a.csv", data: "new" }, { name: "b.csv", data: "new" }]).catch((x) => x);
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toMatch(/^--out: outputs exist \(b\.csv\) \(got ".*"; allowed: a folder without earlier outputs, or --force to replace them\)$/);
    expect(readdirSync(out)).toEqual(["b.csv"]);
    expect(readFileSync(path.join(out, "b.csv"), "utf8")).toBe("old");
  });

  it("replaces existing outputs with force", async () => {
    const out = fresh();
    writeFileSync(path.join(out, "b.csv"), "old");
    await writeOutputSet(out, [{ name: "b.csv", data: "new" }], { force: true });
    expect(readFileSync(path.join(out, "b.csv"), "utf8")).toBe("new");
    expect(readdirSync(out)).toEqual(["b.csv"]);
  });

  it("turns an out path that cannot be a folder into one InputError line with the path", async () => {
    const parent = fresh();
    const file = path.join(parent, "plain-file");
    writeFileSync(file, "x");
    const e1 = await writeOutputSet(file, [{ name: "a.csv", data: "1" }]).catch((x) => x);
    expect(e1).toBeInstanceOf(InputError);
    expect(e1.message).toContain(JSON.stringify(file));
    const e2 = await writeOutputSet(path.join(file, "sub"), [{ name: "a.csv", data: "1" }]).catch((x) => x);
    expect(e2).toBeInstanceOf(InputError);
    expect(e2.message).toMatch(/^--out: cannot write there \(ENOTDIR\)/);
  });

  it.skipIf(process.getuid?.() === 0)("reports a read-only folder as InputError", async () => {
    const out = fresh();
    mkdirSync(path.join(out, "ro"));
    chmodSync(path.join(out, "ro"), 0o555);
    const e = await writeOutputSet(path.join(out, "ro"), [{ name: "a.csv", data: "1" }]).catch((x) => x);
    chmodSync(path.join(out, "ro"), 0o755);
    expect(e).toBeInstanceOf(InputError);
    expect(e.message).toMatch(/cannot write there \(EACCES\)/);
    expect(readdirSync(path.join(out, "ro"))).toEqual([]);
  });
});

describe("writeOutputSet with files that write themselves", () => {
  /** A background writer that records when it started and writes `text` at its path after `ms`. */
  const writer = (log: string[], text: string, ms: number, ok = true) => async (filePath: string) => {
    log.push(`start ${path.basename(filePath)}`);
    await new Promise((r) => setTimeout(r, ms));
    if (!ok) return false;
    writeFileSync(filePath, text);
    log.push(`done ${path.basename(filePath)}`);
    return true;
  };

  it("starts them before the other files and places them with the set", async () => {
    const out = path.join(fresh(), "out");
    const log: string[] = [];
    const paths = await writeOutputSet(out, [
      { name: "a.csv", data: () => (log.push("a.csv"), "a") },
      { name: "big.tif", data: () => "made here", background: writer(log, "made there", 30) },
      { name: "c.json", data: () => (log.push("c.json"), "{}") },
    ]);
    expect(paths.map((p) => path.basename(p))).toEqual(["a.csv", "big.tif", "c.json"]);
    // Started first; the other files were made while it ran.
    expect(log).toEqual(["start big.tif", "a.csv", "c.json", "done big.tif"]);
    expect(readFileSync(path.join(out, "big.tif"), "utf8")).toBe("made there");
    expect(readdirSync(out).sort()).toEqual(["a.csv", "big.tif", "c.json"]);
  });

  it("writes the file's data instead when its writer could not start", async () => {
    const out = path.join(fresh(), "out");
    const log: string[] = [];
    await writeOutputSet(out, [
      { name: "big.tif", data: () => (log.push("data big.tif"), "made here"), background: writer(log, "made there", 5, false) },
      { name: "a.csv", data: () => (log.push("a.csv"), "a") },
    ]);
    expect(log).toEqual(["start big.tif", "a.csv", "data big.tif"]);
    expect(readFileSync(path.join(out, "big.tif"), "utf8")).toBe("made here");
  });

  it("leaves nothing when the writer fails, waiting for it before clearing up", async () => {
    const parent = fresh();
    const out = path.join(parent, "out");
    const run = writeOutputSet(out, [
      { name: "a.csv", data: "a" },
      {
        name: "big.tif",
        data: "made here",
        background: async () => {
          await new Promise((r) => setTimeout(r, 20));
          throw new Error("disk full");
        },
      },
    ]);
    await expect(run).rejects.toThrow("disk full");
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(parent)).toEqual([]);
  });

  it("waits for a running writer when another file fails, so it does not write into a removed folder", async () => {
    const parent = fresh();
    const out = path.join(parent, "out");
    const log: string[] = [];
    const run = writeOutputSet(out, [
      { name: "big.tif", data: "made here", background: writer(log, "made there", 40) },
      { name: "b.csv", data: () => Promise.reject(new Error("boom")) },
    ]);
    await expect(run).rejects.toThrow("boom");
    // The writer had finished before the temp folder was removed: nothing is left behind.
    expect(log).toEqual(["start big.tif", "done big.tif"]);
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(parent)).toEqual([]);
  });
});
