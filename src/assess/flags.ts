/**
 * Per-cell flag bits of the assessment (written to flags.tif as UInt16).
 * Effect bits (1, 2, 4) are the assessment's own measurement of what is
 * wrong with the cell; cause bits (8, 16, 64, 128) are the solver's
 * explanation of why, painted from its stations; 32 comes from the DEM;
 * 256 marks the too-few-images ground that a keep-out zone's cut hides.
 */
export const FLAG_COARSE = 1;
export const FLAG_FINE = 2;
export const FLAG_FEW_IMAGES = 4;
export const FLAG_CEILING = 8;
export const FLAG_CLEARANCE = 16;
export const FLAG_NODATA = 32;
export const FLAG_UNFLYABLE = 64;
/** Cause: the ground within the strip's zone varies more than the band allows (solver CAUSE_RELIEF). */
export const FLAG_RELIEF = 128;
/** Effect: fewer images than required where strips were cut at a keep-out zone (the cut's footprint). */
export const FLAG_KEEP_OUT = 256;
/** Distinct flag values: every combination of the nine bits. */
export const FLAG_VALUES = 512;

/**
 * Relative slack on the GSD band's edges: GSD is stored as float32 (about 6e-8
 * relative), so a cell flown exactly at a band edge must not flip out of band
 * by rounding.
 */
export const BAND_SLACK = 1e-6;

export interface FlagKind {
  bit: number;
  key: "coarse" | "fine" | "fewImages" | "ceiling" | "clearance" | "nodata" | "unflyable" | "relief" | "keepOut";
  label: string;
  /** Plain words for the report and the terminal summary. */
  explanation: string;
  /** What the user can do about it. */
  remedy: string;
}

export const FLAG_KINDS: readonly FlagKind[] = [
  {
    bit: FLAG_COARSE,
    key: "coarse",
    label: "coarser than the band",
    explanation: "The camera is too high above this ground: pixels are larger than the tolerance allows.",
    remedy: "Raise the tolerance, accept a coarser target, or get permission to fly a lower minimum over the obstacle that forced the climb.",
  },
  {
    bit: FLAG_FINE,
    key: "fine",
    label: "finer than the band",
    explanation: "The camera is closer to this ground than the band wants: more detail, but smaller footprints and less overlap.",
    remedy: "Usually harmless; change the heading to fly along the slope, or split the site so each part has its own height.",
  },
  {
    bit: FLAG_FEW_IMAGES,
    key: "fewImages",
    label: "too few images",
    explanation: "Fewer overlapping photos see this ground than required, so the reconstruction may have holes.",
    remedy: "Raise the overlaps, change the heading, or add a cross-hatch flight over the area.",
  },
  {
    bit: FLAG_CEILING,
    key: "ceiling",
    label: "limited by the ceiling",
    explanation: "The legal height ceiling keeps the aircraft lower than the detail band needs over this ground.",
    remedy: "Use a finer target or a wider tolerance, choose the ceiling rule your rules allow, or get permission to fly higher.",
  },
  {
    bit: FLAG_CLEARANCE,
    key: "clearance",
    label: "limited by clearance or climb",
    explanation: "Terrain clearance or the aircraft's climb and descent limits hold it higher or lower than the band needs here.",
    remedy: "Fly a heading along the slope, lower the speed, raise the tolerance, or split the site.",
  },
  {
    bit: FLAG_NODATA,
    key: "nodata",
    label: "no DEM data",
    explanation: "The elevation model has no height here, so the plan cannot know the ground.",
    remedy: "Fill the DEM from another source, or give a safe --assume-ground height after checking the site.",
  },
  {
    bit: FLAG_UNFLYABLE,
    key: "unflyable",
    label: "under an unflyable section",
    explanation: "Clearance and the ceiling conflict over this ground: no legal, safe height exists for the strip here.",
    remedy: "Get permission for a higher ceiling, use the `surface` ceiling rule where it applies, or survey this part from another site.",
  },
];

/**
 * The relief cause (bit 128), kept out of FLAG_KINDS so that code listing the
 * original seven kinds keeps working; the assessment's statistics and flag
 * polygons use ASSESSMENT_FLAG_KINDS, which includes it.
 */
export const RELIEF_FLAG_KIND: FlagKind = {
  bit: FLAG_RELIEF,
  key: "relief",
  label: "relief wider than the band",
  explanation: "The ground under this strip rises and falls more than the detail band allows: no single height gives all of it the wanted GSD.",
  remedy: "Raise the tolerance, narrow the strip spacing (more overlap), or fly the heading along the slope.",
};

/** The keep-out effect (bit 256): ground the cut strips no longer image often enough. */
export const KEEP_OUT_FLAG_KIND: FlagKind = {
  bit: FLAG_KEEP_OUT,
  key: "keepOut",
  label: "hidden by a keep-out zone",
  explanation: "Strips stop where they would enter a keep-out zone or its buffer, so this ground has fewer images than required.",
  remedy: "Image it from outside the zone (an oblique pass or a strip along the zone's edge), narrow the zone's buffer if your rules allow, or accept the gap.",
};

/** Every kind the assessment reports: FLAG_KINDS, the relief cause and the keep-out effect. */
export const ASSESSMENT_FLAG_KINDS: readonly FlagKind[] = [...FLAG_KINDS, RELIEF_FLAG_KIND, KEEP_OUT_FLAG_KIND];
