/**
 * The campaign's progress line: what it says, that it fits the terminal, and that it
 * writes nothing unless stderr is a terminal.
 */
import { describe, expect, it } from "vitest";
import { campaignProgress, progressLine } from "../../src/campaign/progress.js";

describe("campaign progress", () => {
  it("shows the share of sites finished, failures, and each running site's stage", () => {
    const running = new Map<string, "solve" | "assess">([["Gorge", "solve"], ["Hills", "assess"]]);
    expect(progressLine({ total: 4, finished: 1, failed: 1, running }, 120)).toBe("[#####...............] 1/4 sites (1 failed)  Gorge: solve | Hills: assess");
    const cut = progressLine({ total: 4, finished: 1, failed: 0, running }, 30);
    expect(cut).toHaveLength(29);
    expect(cut.endsWith("...")).toBe(true);
  });

  it("writes nothing to a stream that is not a terminal, or with quiet", () => {
    const written: string[] = [];
    const fake = (isTTY: boolean) => ({ isTTY, columns: 80, write: (s: string) => written.push(s) }) as unknown as NodeJS.WriteStream;
    for (const [tty, quiet] of [[false, false], [true, true]]) {
      const p = campaignProgress(fake(tty), quiet, 2);
      p.stage("a", "load");
      p.finished("a", false);
      p.done();
    }
    expect(written).toEqual([]);
    const p = campaignProgress(fake(true), false, 2);
    p.stage("a", "load");
    p.done();
    expect(written[0]).toBe("\r[....................] 0/2 sites  a: load");
    expect(written[1]).toMatch(/^\r +\r$/);
  });
});
