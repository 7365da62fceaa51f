/**
 * A one-line stage display on stderr, only when stderr is a terminal and the
 * user did not ask for quiet: pipes and logs stay clean.
 * @example const p = stageProgress(process.stderr, quiet); p.stage("solve"); p.done();
 */
export function stageProgress(stream: NodeJS.WriteStream, quiet: boolean, stages: readonly string[]) {
  const active = !quiet && stream.isTTY === true;
  let i = 0;
  return {
    stage(name: string) {
      if (!active) return;
      i = Math.max(i, stages.indexOf(name) + 1);
      const width = 20;
      const filled = Math.round((width * (i - 1)) / stages.length);
      stream.write(`\r[${"#".repeat(filled)}${".".repeat(width - filled)}] ${name.padEnd(12)}`);
    },
    done() {
      if (active) stream.write(`\r${" ".repeat(40)}\r`);
    },
  };
}
