import { readlinkSync } from "node:fs";
import { getPriority, setPriority } from "node:os";

/**
 * Lowers the calling thread's scheduling priority to nice value `nice` at least (Linux keeps
 * one per thread; a thread already at or above it stays). For a worker whose result is
 * wanted only much later (the constant-altitude comparison started before the solve): on a
 * two-core machine it then takes the core the plan leaves idle without slowing the thread
 * the plan waits on, nor V8's compiler threads that optimise that thread's code. Does
 * nothing where threads have no id of their own to set (other systems) or the call is refused.
 * @example lowerThisThreadPriority(10)
 */
export function lowerThisThreadPriority(nice: number): void {
  try {
    // /proc/thread-self links to "<pid>/task/<tid>".
    const tid = Number(readlinkSync("/proc/thread-self").split("/").pop());
    if (Number.isInteger(tid) && tid > 0) setPriority(tid, Math.max(getPriority(tid), nice));
  } catch {
    // Not Linux, or not allowed: the worker keeps the process's priority.
  }
}
