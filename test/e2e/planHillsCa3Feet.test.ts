import { hillsPlanSuite } from "./hillsSuite.js";
import { US_SURVEY_FOOT_M } from "./reference.js";

// fixtures/gdal/hills_ca3_ftus_f32.tif: written by GDAL (scripts/make-gdal-fixtures.mjs),
// EPSG:2227 (NAD83 / California zone 3, US survey feet) + NAVD88 height in US survey
// feet (6360), 3 ftUS cells. The tool works on the DEM's own cells, its feet taken as metres.
hillsPlanSuite({
  title: "California zone 3 + NAVD88, US survey feet (JSON plan, KML site)",
  planFile: "fixtures/e2e/hills-ca3-plan.json",
  dem: "fixtures/gdal/hills_ca3_ftus_f32.tif",
  site: "fixtures/e2e/hills-ca3-site.kml",
  demEpsg: 2227,
  demUnitToM: US_SURVEY_FOOT_M,
  // NAVD88 is neither EGM96 nor EGM2008: the loader keeps it as "other".
  verticalDatum: "other",
  frameEpsg: null,
  cellSizeM: 3 * US_SURVEY_FOOT_M,
  plan: { gsdCm: 2.5, tolerancePct: 15, imageWidthPx: 4000, imageHeightPx: 3000, frontPct: 75, sidePct: 65, speedMps: 8, ceilingM: 121.92, clearanceM: 30 },
  undulationRoughM: -32,
});
