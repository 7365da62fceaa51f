/**
 * The campaign's progress display: one line on stderr, redrawn as workers report their
 * stages, only when stderr is a terminal and --quiet is not given (pipes and logs stay clean).
 */
import type { SiteStage } from "./types.js";

/** What the display knows: sites to plan, those finished, and the stage of each one running. */
export interface ProgressState {
  total: number;
  finished: number;
  failed: number;
  /** Running sites by name, with their current stage, in the order they started. */
  running: Map<string, SiteStage>;
}

/**
 * The progress line for a state, cut to `columns` characters.
 * @example progressLine({ total: 4, finished: 1, failed: 0, running: new Map([["gorge", "solve"]]) }, 80)
 *   // "[#####...............] 1/4 sites  gorge: solve"
 */
export function progressLine(state: ProgressState, columns: number): string {
  const width = 20;
  const filled = state.total ? Math.round((width * state.finished) / state.total) : width;
  const failed = state.failed ? ` (${state.failed} failed)` : "";
  const running = [...state.running].map(([name, stage]) => `${name}: ${stage}`).join(" | ");
  const line = `[${"#".repeat(filled)}${".".repeat(width - filled)}] ${state.finished}/${state.total} sites${failed}${running ? `  ${running}` : ""}`;
  const max = Math.max(20, columns - 1);
  return line.length > max ? line.slice(0, max - 3) + "..." : line;
}

/**
 * A display on `stream`, inert unless it is a terminal and not `quiet`.
 * @example const p = campaignProgress(process.stderr, false, 3); p.stage("gorge", "solve"); p.finished("gorge", false); p.done();
 */
export function campaignProgress(stream: NodeJS.WriteStream, quiet: boolean, total: number) {
  const active = !quiet && stream.isTTY === true;
  const state: ProgressState = { total, finished: 0, failed: 0, running: new Map() };
  let shown = 0;
  const draw = () => {
    if (!active) return;
    const line = progressLine(state, stream.columns || 80);
    stream.write(`\r${line}${" ".repeat(Math.max(0, shown - line.length))}`);
    shown = line.length;
  };
  return {
    stage(name: string, stage: SiteStage) {
      state.running.set(name, stage);
      draw();
    },
    finished(name: string, failed: boolean) {
      state.running.delete(name);
      state.finished++;
      if (failed) state.failed++;
      draw();
    },
    done() {
      if (active && shown) stream.write(`\r${" ".repeat(shown)}\r`);
    },
  };
}
