/**
 * Errors that a user can fix. The CLI prints `message` on one line and exits
 * with code 2; anything else is an internal error (exit 1).
 */
export class InputError extends Error {
  /** The field, key, flag or file the problem is in (e.g. `camera.focalLengthMm`). */
  readonly field: string;
  /** The offending value, as the user gave it (stringified for the message). */
  readonly value: unknown;
  /** What would have been accepted, in words (e.g. "a number > 0"). */
  readonly allowed: string;

  constructor(field: string, value: unknown, allowed: string, detail?: string) {
    const shown = formatValue(value);
    super(`${field}: ${detail ?? "invalid value"} (got ${shown}; allowed: ${allowed})`);
    this.name = "InputError";
    this.field = field;
    this.value = value;
    this.allowed = allowed;
  }
}

/**
 * A problem with an input file as a whole (not a TIFF, truncated, no
 * georeferencing...). Also exit code 2.
 */
export class InputFileError extends Error {
  readonly file: string;
  constructor(file: string, problem: string) {
    super(`${file}: ${problem}`);
    this.name = "InputFileError";
    this.file = file;
  }
}

/** True for errors the user caused and can fix: exit code 2, no stack trace. */
export function isUserError(e: unknown): e is InputError | InputFileError {
  return e instanceof InputError || e instanceof InputFileError;
}

function formatValue(v: unknown): string {
  if (typeof v === "string") return JSON.stringify(v.length > 80 ? v.slice(0, 77) + "..." : v);
  if (typeof v === "number" || typeof v === "boolean" || v === null || v === undefined) return String(v);
  try {
    const s = JSON.stringify(v);
    return s.length > 80 ? s.slice(0, 77) + "..." : s;
  } catch {
    return String(v);
  }
}
