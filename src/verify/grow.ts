/**
 * The checks keep their work stacks in module-level typed arrays (no allocation per
 * point); this grows one, rarely, keeping its content.
 * @example stack = grown(stack, sp + 4)
 */
export function grown<T extends Float64Array | Int32Array>(a: T, need: number): T {
  if (need <= a.length) return a;
  const b = (a instanceof Int32Array ? new Int32Array(Math.max(need, a.length * 2)) : new Float64Array(Math.max(need, a.length * 2))) as T;
  b.set(a);
  return b;
}
