/**
 * A site's name becomes a folder under --out, so it must be one plain folder name:
 * no path separators, not "." or "..", nothing a file system or a shell trips over.
 */
import { InputError } from "../errors.js";

/** Files gsdplan campaign writes beside the site folders: no site may take their names. */
export const CAMPAIGN_FILES = ["campaign.csv", "index.html"] as const;

const ALLOWED = "a folder name: not empty, no / or \\, not . or .., no control characters, no leading dot or surrounding spaces, at most 200 bytes";
// Many file systems allow 255 bytes in a name; 200 leaves room for the atomic writer's temp names.
const MAX_NAME_BYTES = 200;

/**
 * Throws an InputError (naming `field`) unless `name` is safe as one folder name.
 * @example checkSiteName("North field", "sites[0].name") // passes
 * @example checkSiteName("../etc", "sites[1].name") // throws: a path separator
 */
export function checkSiteName(name: unknown, field: string): asserts name is string {
  if (typeof name !== "string") {
    throw new InputError(field, name, ALLOWED, name === undefined ? "every site needs a name" : "not a text (quote it in YAML)");
  }
  const problem =
    name.length === 0 ? "empty"
    : name.trim() !== name ? "spaces at its start or end"
    : /[/\\]/.test(name) ? "a path separator"
    : name === "." || name === ".." ? "not a folder name"
    : name.startsWith(".") ? "a leading dot (a hidden folder)"
    : /[\u0000-\u001f\u007f]/.test(name) ? "a control character"
    : Buffer.byteLength(name, "utf8") > MAX_NAME_BYTES ? "too long"
    : CAMPAIGN_FILES.some((f) => f === folderKey(name)) ? "the name of a campaign file"
    : null;
  if (problem) throw new InputError(field, name, ALLOWED, problem);
}

/**
 * The key two names clash on as folders: Unicode NFC and case folded, since macOS and
 * Windows file systems by default treat "Site A" and "site a" as the same folder.
 * @example folderKey("Site A") === folderKey("site a") // true
 */
export function folderKey(name: string): string {
  return name.normalize("NFC").toLowerCase();
}
