/**
 * XML text escaping for the KML and GPX writers (XML 1.0, 2.4 and 3.3.3:
 * `&`, `<` and, in attributes, quotes must be escaped). Written by hand:
 * five replacements do not merit a dependency. Characters XML 1.0 forbids
 * (control characters other than tab, LF, CR) are dropped.
 */
export function escapeXml(text: string): string {
  return text
    // eslint-disable-next-line no-control-regex
    .replace(/[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]/g, "")
    .replace(/&/g, "&amp;")
    .replace(/</g, "&lt;")
    .replace(/>/g, "&gt;")
    .replace(/"/g, "&quot;")
    .replace(/'/g, "&apos;");
}
