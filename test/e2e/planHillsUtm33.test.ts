import { hillsPlanSuite } from "./hillsSuite.js";

// fixtures/gdal/hills_utm33_f32.tif: written by GDAL (scripts/make-gdal-fixtures.mjs),
// EPSG:32633 + EGM96 height (5773), 1 m cells, heights in metres.
hillsPlanSuite({
  title: "UTM 33N + EGM96, metres (YAML plan, GeoJSON site)",
  planFile: "fixtures/e2e/hills-utm33-plan.yaml",
  dem: "fixtures/gdal/hills_utm33_f32.tif",
  site: "fixtures/e2e/hills-utm33-site.geojson",
  demEpsg: 32633,
  demUnitToM: 1,
  verticalDatum: "egm96",
  frameEpsg: 32633,
  cellSizeM: 1,
  plan: { gsdCm: 3, tolerancePct: 10, imageWidthPx: 4000, imageHeightPx: 3000, frontPct: 75, sidePct: 65, speedMps: 8, ceilingM: 120, clearanceM: 30 },
  undulationRoughM: 47,
});
