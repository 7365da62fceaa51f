/**
 * Escaping for everything user-given that reaches the HTML: site and file names, plan
 * keys, warnings. The HTML Standard's text and attribute contexts need &, <, > and the
 * quotes replaced; inline JSON in a <script> block additionally must not contain "</"
 * or "<!--", so every "<" (and ">", "&", U+2028, U+2029) becomes a \u escape that
 * JSON.parse reads back unchanged.
 */

const HTML: Record<string, string> = { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" };

/**
 * Text or attribute value, safe in both contexts.
 *
 * @example esc('<script>alert(1)</script>') // "&lt;script&gt;alert(1)&lt;/script&gt;"
 */
export function esc(value: unknown): string {
  return String(value ?? "").replace(/[&<>"']/g, (c) => HTML[c]);
}

/**
 * JSON text safe inside <script type="application/json">.
 *
 * @example jsonForScript({ name: "</script>" }) // '{"name":"\\u003c/script\\u003e"}'
 */
export function jsonForScript(value: unknown): string {
  return JSON.stringify(value)
    .replace(/</g, "\\u003c")
    .replace(/>/g, "\\u003e")
    .replace(/&/g, "\\u0026")
    .replace(/\u2028/g, "\\u2028")
    .replace(/\u2029/g, "\\u2029");
}
