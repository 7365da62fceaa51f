/**
 * Strip profiles as SVG: the ground under the strip, the hard corridor (clearance floor
 * and ceiling), the detail band, the flown altitude through its waypoints, and the
 * stations the solver flagged (detail-limited, unflyable).
 */
import type { ProfiledLeg, StripDrawing } from "./model.js";
import { esc } from "./escape.js";
import { fixed1, fmt } from "./format.js";
import { niceStep, ticks } from "./nice.js";

// Drawn about 500 units wide so that two side by side on a printed A4 or Letter page
// (about 340 CSS px each) keep their 11-unit labels near 7 pt.
const W = 500, H = 215, ML = 46, MR = 8, MT = 24, MB = 34;

export interface StripProfile {
  strip: number;
  lengthM: number;
  svg: string;
  flaggedStations: { detailLimited: number; unflyable: number };
}

/**
 * One SVG per strip, in strip order, from the strips' drawings (stripDrawings).
 *
 * @example for (const p of stripProfiles(stripDrawings(input.legs))) html += p.svg;
 */
export function stripProfiles(data: readonly StripDrawing[], opts: { sharedScales?: boolean } = {}): StripProfile[] {
  // Small multiples share their scales (same metres per unit along and up), so strips can
  // be compared at a glance; a strip shorter than the longest draws shorter.
  if (opts.sharedScales ?? true) {
    const all = { lo: Infinity, hi: -Infinity, sMax: 0 };
    for (const d of data) {
      all.lo = Math.min(all.lo, d.lo);
      all.hi = Math.max(all.hi, d.hi);
      all.sMax = Math.max(all.sMax, d.sMax);
    }
    return data.map((d) => draw(d, all));
  }
  return data.map((d) => draw(d, { lo: d.lo, hi: d.hi, sMax: d.sMax }));
}

/**
 * What each strip's profile draws (its strip legs joined along the strip direction), in strip
 * order: made from the legs' stations once (report/serialize.ts compactReportInput), so
 * report-data.json holds these instead of every station.
 *
 * @example stripDrawings(input.legs)[0].ground // the ground's envelope per bin
 */
export function stripDrawings(legs: readonly ProfiledLeg[]): StripDrawing[] {
  const byStrip = new Map<number, ProfiledLeg[]>();
  // A bridge over an unflyable stretch belongs to its strip's profile: it is where the
  // strip could not be flown within the bounds.
  for (const l of legs) if (l.kind === "strip" || l.conflictGap) (byStrip.get(l.strip) ?? byStrip.set(l.strip, []).get(l.strip)!).push(l);
  return [...byStrip.entries()].sort((a, b) => a[0] - b[0]).map(([strip, ls]) => collect(strip, ls));
}

interface Series {
  s: number[];
  ground: number[];
  hardLow: number[];
  hardHigh: number[];
  bandLow: number[];
  bandHigh: number[];
}

function collect(strip: number, legs: ProfiledLeg[]): StripDrawing {
  const first = legs[0];
  const L0 = Math.hypot(first.to[0] - first.from[0], first.to[1] - first.from[1]) || 1;
  const ux = (first.to[0] - first.from[0]) / L0;
  const uy = (first.to[1] - first.from[1]) / L0;
  const off = (l: ProfiledLeg) => (l.from[0] - first.from[0]) * ux + (l.from[1] - first.from[1]) * uy;

  // Envelope per bin (about 320 bins a strip): the safe side of each bound, so the
  // picture never shows more room than the solver had.
  const ser: Series = { s: [], ground: [], hardLow: [], hardHigh: [], bandLow: [], bandHigh: [] };
  const flagged: number[] = [];
  const flight: number[] = [];
  let total = 0;
  for (const l of legs) total += l.profile.s.length;
  const binSize = Math.max(1, Math.ceil(total / 320));
  let nDetail = 0;
  let nUnfly = 0;
  let sMax = 0;
  for (const l of legs) {
    const p = l.profile;
    const o = off(l);
    const n = p.s.length;
    for (let b = 0; b < n; b += binSize) {
      const e = Math.min(n, b + binSize);
      let g = -Infinity, hl = -Infinity, hh = Infinity, bl = -Infinity, bh = Infinity;
      for (let i = b; i < e; i++) {
        g = Math.max(g, p.groundM[i]);
        hl = Math.max(hl, p.hardLowM[i]);
        hh = Math.min(hh, p.hardHighM[i]);
        bl = Math.max(bl, p.bandLowM[i]);
        bh = Math.min(bh, p.bandHighM[i]);
      }
      ser.s.push(o + p.s[Math.min(n - 1, b + (binSize >> 1))]);
      ser.ground.push(g);
      ser.hardLow.push(hl);
      ser.hardHigh.push(hh);
      ser.bandLow.push(bl);
      ser.bandHigh.push(bh);
    }
    // Flagged stretches at full station resolution.
    let i = 0;
    while (i < n) {
      const st = p.status[i];
      if (st === 0) {
        i++;
        continue;
      }
      let j = i;
      while (j + 1 < n && p.status[j + 1] === st) j++;
      const half = n > 1 ? (p.s[1] - p.s[0]) / 2 : 0;
      flagged.push(o + p.s[i] - half, o + p.s[j] + half, st);
      if (st === 1) nDetail += j - i + 1;
      else nUnfly += j - i + 1;
      i = j + 1;
    }
    for (const w of l.waypoints) flight.push(o + w.s, w.altitudeAmslM);
    sMax = Math.max(sMax, o + (n ? p.s[n - 1] : l.lengthM));
  }

  let lo = Infinity, hi = -Infinity;
  const take = (v: number) => {
    if (Number.isFinite(v)) {
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
  };
  ser.ground.forEach(take);
  ser.bandHigh.forEach(take);
  ser.hardLow.forEach(take);
  for (let k = 1; k < flight.length; k += 2) take(flight[k]);
  // The ceiling only widens the axis when it is near the flight.
  const top0 = hi;
  for (const v of ser.hardHigh) if (Number.isFinite(v) && v <= top0 + 0.35 * (top0 - lo)) hi = Math.max(hi, v);
  if (!(hi > lo)) {
    lo = (Number.isFinite(lo) ? lo : 0) - 10;
    hi = lo + 20;
  }
  const f64 = (v: number[]) => Float64Array.from(v);
  return {
    strip, s: f64(ser.s), ground: f64(ser.ground), hardLow: f64(ser.hardLow), hardHigh: f64(ser.hardHigh), bandLow: f64(ser.bandLow), bandHigh: f64(ser.bandHigh),
    flagged: f64(flagged), flight: f64(flight), nDetail, nUnfly, sMax, lo, hi,
  };
}

function draw(c: StripDrawing, scale: { lo: number; hi: number; sMax: number }): StripProfile {
  const { strip, flagged, flight, nDetail, nUnfly, sMax } = c;
  const pad = (scale.hi - scale.lo) * 0.08;
  const lo = scale.lo - pad;
  const hi = scale.hi + pad;
  const sAxis = scale.sMax || 1;
  const sx = (s: number) => fixed1(ML + (s / sAxis) * (W - ML - MR));
  const sy = (z: number) => fixed1(MT + ((hi - Math.max(lo, Math.min(hi, z))) / (hi - lo)) * (H - MT - MB));

  // Every path of the strip runs over the same bins: their x texts are made once.
  const xs = Array.from(c.s, sx);
  const area = (upper: ArrayLike<number>, lower: ArrayLike<number>): string => {
    let d = "";
    let i = 0;
    const n = c.s.length;
    while (i < n) {
      while (i < n && !(Number.isFinite(upper[i]) && Number.isFinite(lower[i]))) i++;
      let j = i;
      while (j < n && Number.isFinite(upper[j]) && Number.isFinite(lower[j])) j++;
      if (j - i >= 1) {
        // Pieces joined once: far less garbage than growing a string point by point.
        const parts: string[] = [];
        for (let k = i; k < j; k++) parts.push(k === i ? "M" : "L", xs[k], ",", sy(upper[k]));
        for (let k = j - 1; k >= i; k--) parts.push("L", xs[k], ",", sy(lower[k]));
        d += parts.join("") + "Z";
      }
      i = j;
    }
    return d;
  };
  const line = (vals: ArrayLike<number>): string => {
    const parts: string[] = [];
    let pen = false;
    for (let k = 0; k < c.s.length; k++) {
      if (!Number.isFinite(vals[k]) || vals[k] > hi || vals[k] < lo) {
        pen = false;
        continue;
      }
      parts.push(pen ? "L" : "M", xs[k], ",", sy(vals[k]));
      pen = true;
    }
    return parts.join("");
  };
  const floor = c.ground.map(() => lo);
  const clippedHigh = c.hardHigh.map((v) => (Number.isFinite(v) ? Math.min(v, hi) : hi));

  let flagsSvg = "";
  for (let k = 0; k < flagged.length; k += 3) {
    const status = flagged[k + 2];
    const x0 = +sx(Math.max(0, flagged[k]));
    const x1 = +sx(Math.min(sMax, flagged[k + 1]));
    const fill = status === 2 ? "#d62728" : "#ff9f1c";
    flagsSvg +=
      `<rect class="flagged status-${status}" x="${x0}" y="${MT}" width="${fixed1(Math.max(1, x1 - x0))}" height="${H - MT - MB}" fill="${fill}" fill-opacity="0.16"/>` +
      `<rect x="${x0}" y="${MT - 7}" width="${fixed1(Math.max(1, x1 - x0))}" height="5" fill="${fill}"/>`;
  }
  const zStep = niceStep(hi - lo, 5);
  const sStep = niceStep(sAxis, 8);
  let axes = "";
  for (const z of ticks(lo, hi, zStep))
    axes += `<line x1="${ML}" x2="${sx(sMax)}" y1="${sy(z)}" y2="${sy(z)}" stroke="#000" stroke-opacity="0.08"/><text x="${ML - 6}" y="${fixed1(+sy(z) + 4)}" text-anchor="end">${fmt(z)}</text>`;
  for (const s of ticks(0, sMax, sStep))
    axes += `<line x1="${sx(s)}" x2="${sx(s)}" y1="${H - MB}" y2="${H - MB + 4}" stroke="#333"/><text x="${sx(s)}" y="${H - MB + 16}" text-anchor="middle">${fmt(s)}</text>`;
  let flightD = "";
  let wps = "";
  for (let k = 0; k < flight.length; k += 2) {
    flightD += (k ? "L" : "M") + sx(flight[k]) + "," + sy(flight[k + 1]);
    wps += `<circle cx="${sx(flight[k])}" cy="${sy(flight[k + 1])}" r="3"/>`;
  }

  const svg =
    `<svg class="profile-svg" viewBox="0 0 ${W} ${H}" xmlns="http://www.w3.org/2000/svg" role="img" aria-label="Profile of strip ${strip}">` +
    `<rect x="${ML}" y="${MT}" width="${(+sx(sMax) - ML).toFixed(1)}" height="${H - MT - MB}" fill="#fbfbfa"/>` +
    axes +
    `<path class="corridor" d="${area(clippedHigh, c.hardLow)}" fill="#9ecae1" fill-opacity="0.35"/>` +
    `<path class="band" d="${area(c.bandHigh, c.bandLow)}" fill="#31a354" fill-opacity="0.35"/>` +
    `<path class="ground" d="${area(c.ground, floor)}" fill="#b89b72" fill-opacity="0.9" stroke="#6b5236" stroke-width="1"/>` +
    `<path class="hard-low" d="${line(c.hardLow)}" fill="none" stroke="#8c510a" stroke-width="1.2" stroke-dasharray="4 3"/>` +
    `<path class="hard-high" d="${line(c.hardHigh)}" fill="none" stroke="#c0392b" stroke-width="1.2" stroke-dasharray="7 3"/>` +
    flagsSvg +
    `<path class="flight" d="${flightD}" fill="none" stroke="#111" stroke-width="2"/>` +
    `<g class="wps" fill="#fff" stroke="#111" stroke-width="1.3">${wps}</g>` +
    `<text x="4" y="13" font-weight="600">Strip ${esc(strip)}</text>` +
    `<text x="${W - MR}" y="13" text-anchor="end" class="small">${fmt(sMax)} m · ${flight.length / 2} waypoints` +
    (nDetail || nUnfly ? ` · flagged: ${nDetail} detail-limited, ${nUnfly} unflyable stations` : "") +
    `</text>` +
    `<text x="14" y="${(MT + (H - MT - MB) / 2).toFixed(1)}" transform="rotate(-90 14 ${(MT + (H - MT - MB) / 2).toFixed(1)})" text-anchor="middle" class="small">m AMSL</text>` +
    `<text x="${((ML + +sx(sMax)) / 2).toFixed(1)}" y="${H - 4}" text-anchor="middle" class="small">distance along strip, m</text>` +
    `</svg>`;
  return { strip, lengthM: sMax, svg, flaggedStations: { detailLimited: nDetail, unflyable: nUnfly } };
}

/** The legend shared by all profiles. */
export function profileLegend(): string {
  const item = (x: number, sw: string, label: string) => `<g transform="translate(${x},6)">${sw}<text x="26" y="10">${label}</text></g>`;
  return (
    `<svg class="legend" viewBox="0 0 930 24" xmlns="http://www.w3.org/2000/svg" role="img" aria-label="Profile legend">` +
    item(0, `<rect width="20" height="12" fill="#b89b72"/>`, "ground below") +
    item(120, `<rect width="20" height="12" fill="#9ecae1" fill-opacity="0.6"/>`, "hard corridor") +
    item(245, `<rect width="20" height="12" fill="#31a354" fill-opacity="0.5"/>`, "detail band") +
    item(360, `<path d="M0,6H20" stroke="#111" stroke-width="2"/><circle cx="10" cy="6" r="3" fill="#fff" stroke="#111"/>`, "flight, waypoints") +
    item(505, `<path d="M0,6H20" stroke="#c0392b" stroke-dasharray="7 3"/>`, "ceiling") +
    item(590, `<path d="M0,6H20" stroke="#8c510a" stroke-dasharray="4 3"/>`, "clearance floor") +
    item(715, `<rect width="20" height="12" fill="#ff9f1c"/>`, "detail-limited") +
    item(825, `<rect width="20" height="12" fill="#d62728"/>`, "unflyable") +
    `</svg>`
  );
}
