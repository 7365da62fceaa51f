import { describe, expect, it } from "vitest";
import { parseWaypointsCsv } from "../../src/verify/csv.js";
import { InputError, InputFileError } from "../../src/errors.js";

const HEADER = "flight,strip,index,segment,longitude,latitude,altitude_amsl_m,altitude_ellipsoid_m,altitude_takeoff_m,ground_amsl_m,height_above_ground_m,speed_m_s";

describe("parseWaypointsCsv: the list as written, or edited in a spreadsheet", () => {
  it("reads CRLF or LF lines, a byte-order mark, quoted fields (RFC 4180) and empty ground fields", () => {
    const text = "\uFEFF" + HEADER + "\r\n" + '1,1,1,transit,"7.95845700",46.49954730,989.41,1040.06,91.20,898.21,91.20,0.00\n' + "1,1,2,strip,7.95875304,46.49913961,988.87,1039.52,,,,8.00\r\n";
    const rows = parseWaypointsCsv(text, "w.csv");
    expect(rows).toHaveLength(2);
    expect(rows[0]).toMatchObject({ flight: 1, strip: 1, index: 1, segment: "transit", longitude: 7.958457, altitudeAmslM: 989.41, groundAmslM: 898.21, speedMps: 0 });
    expect(rows[1].groundAmslM).toBeNaN();
    expect(rows[1].heightAboveGroundM).toBeNaN();
  });

  it("refuses a wrong header, a short row, a bad number and flights out of order, each on one line", () => {
    const bad = (text: string) => {
      try {
        parseWaypointsCsv(text, "w.csv");
      } catch (e) {
        expect(e instanceof InputError || e instanceof InputFileError).toBe(true);
        expect((e as Error).message.split("\n")).toHaveLength(1);
        return (e as Error).message;
      }
      throw new Error("accepted");
    };
    expect(bad("flight,strip\n1,1\n")).toMatch(/bad header/);
    expect(bad(`${HEADER}\n1,1,1,strip,7.9,46.5\n`)).toMatch(/has 6 fields; expected 12/);
    expect(bad(`${HEADER}\n1,1,1,strip,7.9,46.5,abc,1,1,1,1,5\n`)).toMatch(/altitude_amsl_m.*not a number/);
    expect(bad(`${HEADER}\n1,1,1,hover,7.9,46.5,1,1,1,1,1,5\n`)).toMatch(/segment/);
    const row = (f: number) => `${f},1,1,strip,7.9,46.5,1,1,1,1,1,5`;
    expect(bad(`${HEADER}\n${row(1)}\n${row(2)}\n${row(1)}\n`)).toMatch(/flight 1 are not together/);
  });
});
