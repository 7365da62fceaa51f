/**
 * A strip flown over two batteries: the solved strip leg cut at a station, the
 * first part flown to there, the next flight resuming from there at the same
 * height, with the photo spacing carried over the cut.
 */
import type { SolvedLeg, StationProfile, Waypoint } from "../solve/types.js";

/** A solved strip leg with what the assessment reads about its photos. */
export type ResumableLeg = SolvedLeg & {
  noPhotoIntervals?: [number, number][];
  /** Along-track distance of the leg's first photo from its start (a resumed strip's phase); default 0. */
  photoPhaseM?: number;
  /** True when the leg starts where an earlier flight left its strip. */
  resumes?: boolean;
};

/**
 * The leg cut at along-track distance `sCut` (0 < sCut < length): two legs that
 * meet at the cut point at the path's own height there (the path is linear in
 * distance between waypoints), times split by the segments' speeds, no-photo
 * intervals shifted, and the second leg's photo phase set so that photos keep
 * one trigger distance across the cut: the first leg's last photo is the last
 * multiple of `triggerM` (from its own phase) at or before the cut, the second
 * leg's first photo the next one. Null when the cut is not inside the leg.
 * @example const parts = cutLegAt(leg, 300, 22.5); parts?.[0].to // the cut point
 */
export function cutLegAt(leg: ResumableLeg, sCut: number, triggerM: number): [ResumableLeg, ResumableLeg] | null {
  const wps = leg.waypoints;
  const len = leg.lengthM;
  if (!(sCut > 1e-6 && sCut < len - 1e-6) || wps.length < 2) return null;
  const ux = (leg.to[0] - leg.from[0]) / len, uy = (leg.to[1] - leg.from[1]) / len;
  // The waypoint segment holding the cut, and the path's height there.
  let j = 1;
  while (j < wps.length - 1 && wps[j].s < sCut) j++;
  const a = wps[j - 1], b = wps[j];
  const t = b.s > a.s ? (sCut - a.s) / (b.s - a.s) : 0;
  const alt = a.altitudeAmslM + t * (b.altitudeAmslM - a.altitudeAmslM);
  const ground = groundAt(leg.profile, sCut);
  const x = leg.from[0] + sCut * ux, y = leg.from[1] + sCut * uy;
  const cut: Waypoint = { x, y, s: sCut, altitudeAmslM: alt, groundAmslM: ground, heightAboveGroundM: alt - ground, speedMps: b.speedMps };
  const firstWps = [...wps.slice(0, j), cut];
  const secondWps: Waypoint[] = [{ ...cut, s: 0, speedMps: 0 }, ...wps.slice(j).map((w) => ({ ...w, s: w.s - sCut }))];
  const time = (ws: Waypoint[]) => {
    let tS = 0;
    for (let k = 1; k < ws.length; k++) {
      const d = ws[k].s - ws[k - 1].s;
      if (d > 0 && ws[k].speedMps > 0) tS += d / ws[k].speedMps;
    }
    return tS;
  };
  // The original time also holds vertical steps at the ends: keep them with their ends.
  const firstTime = time(firstWps), secondTime = time(secondWps);
  const extra = Math.max(0, leg.timeS - time(wps));
  const phase = leg.photoPhaseM ?? 0;
  const lastPhotoS = phase + Math.floor((sCut - phase) / triggerM + 1e-9) * triggerM;
  const nextPhase = lastPhotoS + triggerM - sCut;
  const np = leg.noPhotoIntervals ?? [];
  const first: ResumableLeg = {
    ...leg,
    to: [x, y],
    waypoints: firstWps,
    profile: sliceProfile(leg.profile, 0, sCut),
    lengthM: sCut,
    timeS: firstTime + (wps[0].s === wps[1]?.s ? extra : 0),
    ...clipNoPhoto(np, 0, sCut),
  };
  const second: ResumableLeg = {
    ...leg,
    from: [x, y],
    waypoints: secondWps,
    profile: sliceProfile(leg.profile, sCut, len),
    lengthM: len - sCut,
    timeS: secondTime + (wps[0].s === wps[1]?.s ? 0 : extra),
    photoPhaseM: nextPhase,
    resumes: true,
    ...clipNoPhoto(np, sCut, len),
  };
  if (!first.noPhotoIntervals) delete first.noPhotoIntervals;
  if (!second.noPhotoIntervals) delete second.noPhotoIntervals;
  return [first, second];
}

function clipNoPhoto(np: readonly [number, number][], s0: number, s1: number): { noPhotoIntervals?: [number, number][] } {
  const out = np.map(([p, q]): [number, number] => [Math.max(p, s0) - s0, Math.min(q, s1) - s0]).filter(([p, q]) => q > p);
  return out.length ? { noPhotoIntervals: out } : {};
}

/** Ground at s on the profile (linear between stations). */
function groundAt(p: StationProfile, s: number): number {
  const n = p.s.length;
  let k = 1;
  while (k < n - 1 && p.s[k] < s) k++;
  const t = p.s[k] > p.s[k - 1] ? (s - p.s[k - 1]) / (p.s[k] - p.s[k - 1]) : 0;
  return p.groundM[k - 1] + t * (p.groundM[k] - p.groundM[k - 1]);
}

/** The stations with s in [s0, s1], distances from s0 (the cut may fall between stations: both keep the one across it). */
function sliceProfile(p: StationProfile, s0: number, s1: number): StationProfile {
  let a = 0;
  while (a + 1 < p.s.length && p.s[a + 1] <= s0) a++;
  let b = p.s.length - 1;
  while (b - 1 >= 0 && p.s[b - 1] >= s1) b--;
  const cut = <T extends Float64Array | Uint8Array>(arr: T) => arr.slice(a, b + 1) as T;
  const s = cut(p.s).map((v) => Math.max(0, Math.min(s1, v) - s0));
  return {
    s,
    x: cut(p.x),
    y: cut(p.y),
    groundM: cut(p.groundM),
    hardLowM: cut(p.hardLowM),
    hardHighM: cut(p.hardHighM),
    bandLowM: cut(p.bandLowM),
    bandHighM: cut(p.bandHighM),
    altitudeM: cut(p.altitudeM),
    ...(p.knownLowM ? { knownLowM: cut(p.knownLowM) } : {}),
    status: cut(p.status),
    cause: cut(p.cause),
  };
}
