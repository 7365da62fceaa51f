/**
 * Plan keys of a site over the campaign's defaults.
 */

/**
 * Merges `over` into `base` key by key: nested mappings (camera, target, ...) merge
 * their keys, anything else (numbers, texts, lists) replaces the default, and `null`
 * removes it (so a site can drop a default such as `takeoff`). Neither input is changed.
 *
 * @example mergePlanKeys({ camera: { focalLengthMm: 8.8, imageWidthPx: 5472 } }, { camera: { focalLengthMm: 4.5 } })
 *   // { camera: { focalLengthMm: 4.5, imageWidthPx: 5472 } }
 */
export function mergePlanKeys(base: Record<string, unknown>, over: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = structuredClone(base);
  for (const [key, value] of Object.entries(over)) {
    if (value === null) {
      delete out[key];
      continue;
    }
    const prev = out[key];
    out[key] = isMapping(prev) && isMapping(value) ? mergePlanKeys(prev, value) : structuredClone(value);
  }
  return out;
}

/**
 * True for a plain mapping (a YAML map or JSON object), false for lists and values.
 * @example isMapping({ a: 1 }) // true
 */
export function isMapping(v: unknown): v is Record<string, unknown> {
  return typeof v === "object" && v !== null && !Array.isArray(v);
}
