// The benchmark table: one row per figure, the figure beside its reference measured in the
// same run and their ratio, the target and whether it is met. Printed as a markdown table.

const MB = 2 ** 20;

/** Number formatting for the table: seconds, megabytes, percent, ratios. */
export const fmt = {
  s: (v) => (Number.isFinite(v) ? `${v < 10 ? v.toFixed(2) : v.toFixed(1)} s` : "n/a"),
  mb: (v) => (Number.isFinite(v) ? `${(v / MB).toFixed(0)} MB` : "n/a"),
  pct: (v) => (Number.isFinite(v) ? `${v.toFixed(1)} %` : "n/a"),
  x: (v) => (Number.isFinite(v) ? `${v < 10 ? v.toFixed(2) : v.toFixed(1)}x` : "n/a"),
  n: (v, d = 0) => (Number.isFinite(v) ? v.toLocaleString("en-US", { maximumFractionDigits: d, minimumFractionDigits: d }) : "n/a"),
  cm: (v) => (Number.isFinite(v) ? `${v.toFixed(2)} cm` : "n/a"),
  m2: (v) => (Number.isFinite(v) ? `${Math.round(v).toLocaleString("en-US")} m2` : "n/a"),
};

/**
 * One table row. `met` is true, false, or undefined (no target).
 * @example row("2", "plan wall time", fmt.s(7), "GDAL read " + fmt.s(0.5), 14, "< 8 s", true)
 */
export function row(section, figure, ours, reference = "", ratio = NaN, target = "", met = undefined) {
  return { section, figure, ours, reference, ratio: Number.isFinite(ratio) ? fmt.x(ratio) : "", target, met: met === undefined ? "" : met ? "yes" : "NO" };
}

/**
 * Renders rows as a markdown table.
 * @example markdownTable([row("1", "read", "1 s")])
 */
export function markdownTable(rows) {
  const head = ["#", "figure", "ours", "reference (same run)", "ratio", "target", "met"];
  const cells = rows.map((r) => [r.section, r.figure, r.ours, r.reference, r.ratio, r.target, r.met]);
  const widths = head.map((h, i) => Math.max(h.length, ...cells.map((c) => String(c[i]).length)));
  const line = (c) => "| " + c.map((v, i) => String(v).padEnd(widths[i])).join(" | ") + " |";
  return [line(head), "| " + widths.map((w) => "-".repeat(w)).join(" | ") + " |", ...cells.map(line)].join("\n");
}
