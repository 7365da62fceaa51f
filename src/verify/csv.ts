/**
 * Reads waypoints.csv as written by `gsdplan plan` or edited by hand in a
 * spreadsheet: the header must name the columns in order (the twelve original ones,
 * optionally followed by height_above_terrain_m, which verify recomputes); fields may
 * be quoted, lines may end in CRLF or LF; ground and height-above-ground may be
 * empty (they are recomputed from the DEM, not trusted).
 */
import { InputError, InputFileError } from "../errors.js";
import { WAYPOINT_CSV_COLUMNS } from "../export/waypointsCsv.js";
import type { VerifyRow } from "./types.js";

/** The header verify expects: the waypoints.csv contract, as the exporter writes it. */
export const VERIFY_CSV_COLUMNS = WAYPOINT_CSV_COLUMNS;

/** Lists written before height_above_terrain_m was added carry the first twelve columns only. */
const ORIGINAL_COLUMNS = WAYPOINT_CSV_COLUMNS.slice(0, WAYPOINT_CSV_COLUMNS.indexOf("height_above_terrain_m"));

/** Columns that may be empty: everything verify recomputes or does not need. */
const MAY_BE_EMPTY = new Set(["altitude_amsl_m", "altitude_ellipsoid_m", "altitude_takeoff_m", "ground_amsl_m", "height_above_ground_m", "height_above_terrain_m"]);

function unquote(f: string): string {
  const t = f.trim();
  return t.length >= 2 && t.startsWith('"') && t.endsWith('"') ? t.slice(1, -1).replace(/""/g, '"').trim() : t;
}

/**
 * Parses the text of a waypoint list. Throws InputFileError (one line) for a
 * wrong header, a short row or a value that is not a number.
 * @example parseWaypointsCsv(readFileSync("out/waypoints.csv", "utf8"), "out/waypoints.csv")[0].flight // 1
 */
export function parseWaypointsCsv(text: string, file: string): VerifyRow[] {
  const lines = text.replace(/^\uFEFF/, "").split(/\r?\n/);
  while (lines.length && lines[lines.length - 1].trim() === "") lines.pop();
  if (!lines.length) throw new InputFileError(file, "empty file: expected the waypoints.csv header and rows");
  const header = lines[0].split(",").map(unquote);
  const expected = VERIFY_CSV_COLUMNS.join(",");
  const columns = header.join(",") === ORIGINAL_COLUMNS.join(",") ? ORIGINAL_COLUMNS.length : VERIFY_CSV_COLUMNS.length;
  if (header.join(",") !== expected && columns === VERIFY_CSV_COLUMNS.length) {
    throw new InputFileError(file, `bad header "${lines[0].slice(0, 120)}"; expected ${expected}`);
  }
  const rows: VerifyRow[] = [];
  const seenFlights = new Set<number>();
  let lastFlight = -1;
  for (let li = 1; li < lines.length; li++) {
    const raw = lines[li];
    if (raw.trim() === "") continue;
    const f = raw.split(",").map(unquote);
    const rowNo = rows.length + 1;
    if (f.length !== columns) {
      throw new InputFileError(file, `line ${li + 1} (row ${rowNo}) has ${f.length} fields; expected ${columns}`);
    }
    const num = (k: number): number => {
      const name = VERIFY_CSV_COLUMNS[k];
      if (f[k] === "") {
        if (MAY_BE_EMPTY.has(name)) return NaN;
        throw new InputError(`${file} line ${li + 1} ${name}`, f[k], "a number", "empty field");
      }
      const v = Number(f[k]);
      if (!Number.isFinite(v)) throw new InputError(`${file} line ${li + 1} ${name}`, f[k], "a finite number", "not a number");
      return v;
    };
    const whole = (k: number): number => {
      const v = num(k);
      if (!Number.isInteger(v) || v < 1) throw new InputError(`${file} line ${li + 1} ${VERIFY_CSV_COLUMNS[k]}`, f[k], "a whole number >= 1");
      return v;
    };
    const segment = f[3];
    if (segment !== "strip" && segment !== "transit") throw new InputError(`${file} line ${li + 1} segment`, segment, "strip or transit");
    const row: VerifyRow = {
      flight: whole(0),
      strip: whole(1),
      index: whole(2),
      segment,
      longitude: num(4),
      latitude: num(5),
      altitudeAmslM: num(6),
      altitudeEllipsoidM: num(7),
      groundAmslM: num(9),
      heightAboveGroundM: num(10),
      speedMps: num(11),
    };
    if (!(row.longitude >= -180 && row.longitude <= 180)) throw new InputError(`${file} line ${li + 1} longitude`, f[4], "degrees from -180 to 180");
    if (!(row.latitude >= -90 && row.latitude <= 90)) throw new InputError(`${file} line ${li + 1} latitude`, f[5], "degrees from -90 to 90");
    if (!(row.speedMps >= 0)) throw new InputError(`${file} line ${li + 1} speed_m_s`, f[11], "a number >= 0");
    if (Number.isNaN(row.altitudeAmslM) && Number.isNaN(row.altitudeEllipsoidM)) {
      throw new InputError(`${file} line ${li + 1} altitude_amsl_m`, "", "a number in altitude_amsl_m or altitude_ellipsoid_m", "no altitude");
    }
    // Rows are in flight order: a flight's rows are one run; a legs' join across flights would be a jump.
    if (row.flight !== lastFlight) {
      if (seenFlights.has(row.flight)) throw new InputFileError(file, `line ${li + 1}: the rows of flight ${row.flight} are not together (rows must be in flight order)`);
      seenFlights.add(row.flight);
      lastFlight = row.flight;
    }
    rows.push(row);
  }
  if (!rows.length) throw new InputFileError(file, "no waypoint rows after the header");
  return rows;
}
