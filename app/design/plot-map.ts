// The plot map's data (as /api/trials/:trialId/layout returns it) and its geometry in metres.
// Shared by the page that draws it in the browser and the SVG download drawn on the server.

export type PlotMapData = {
  trial: {
    id: string;
    title: string;
    status: "draft" | "locked" | "running" | "closed";
    design: "crd" | "rcbd" | "factorial_rcbd" | "split_plot";
    seed: number | null;
    arrangement: "straight" | "serpentine";
    blockOrientation: "rows" | "columns";
    /** Compass bearing (whole degrees from true north) that the map's top faces; 0 = north at the top. */
    mapBearingDeg: number;
    plotLengthM: number;
    plotWidthM: number;
    alleyBetweenPlotsM: number;
    alleyBetweenBlocksM: number;
    lockedAt: string | null;
    siteName: string | null;
  };
  unitSystem: "si" | "us";
  treatments: { code: string; name: string; isCheck: boolean }[];
  plots: {
    plotNumber: number;
    block: number;
    position: number;
    mainPlot: number | null;
    fieldRow: number;
    fieldColumn: number;
    treatment: string;
  }[];
};

const COMPASS_POINTS = ["N", "NNE", "NE", "ENE", "E", "ESE", "SE", "SSE", "S", "SSW", "SW", "WSW", "W", "WNW", "NW", "NNW"] as const;

/** The nearest of the 16 compass points to a bearing (22.5° sectors centred on each point; common practice). */
export function compassPoint(bearingDeg: number): (typeof COMPASS_POINTS)[number] {
  const d = ((bearingDeg % 360) + 360) % 360;
  return COMPASS_POINTS[Math.round(d / 22.5) % 16];
}

/** How the map sits in the field, for captions: "north at the top" or "top of the map facing 30° (NNE)". */
export function orientationText(bearingDeg: number): string {
  return bearingDeg === 0 ? "north at the top" : `top of the map facing ${bearingDeg}° (${compassPoint(bearingDeg)})`;
}

/** Words for the map's two directions: compass words when north is up, the page's otherwise. */
export function mapAxes(bearingDeg: number): { across: string; along: string } {
  return bearingDeg === 0 ? { across: "east–west", along: "north–south" } : { across: "left to right on the map", along: "top to bottom on the map" };
}

/**
 * Fill colours: Paul Tol's "light" qualitative scheme, chosen to stay distinguishable with the common
 * colour-vision deficiencies (Tol 2021, "Colour Schemes", SRON/EPS/TN/09-002). All are light enough
 * for near-black label text well above WCAG AA contrast; the labels carry the meaning, not the colour.
 */
export const TREATMENT_FILLS = ["#77AADD", "#EE8866", "#EEDD88", "#FFAABB", "#99DDFF", "#44BB99", "#BBCC33", "#AAAA00"] as const;
export const CHECK_FILL = "#FFFFFF";
export const LABEL_INK = "#1d150e";

/** Fill and whether a hatch is added (when treatments outnumber the colours, the second round is hatched). */
export function treatmentStyle(index: number, isCheck: boolean): { fill: string; hatched: boolean } {
  if (isCheck) return { fill: CHECK_FILL, hatched: false };
  return { fill: TREATMENT_FILLS[index % TREATMENT_FILLS.length], hatched: index >= TREATMENT_FILLS.length };
}

/** Colour index per treatment code: checks excluded, others in their listed order. */
export function styleIndexByCode(treatments: PlotMapData["treatments"]): Map<string, number> {
  const out = new Map<string, number>();
  let i = 0;
  for (const t of treatments) out.set(t.code, t.isCheck ? -1 : i++);
  return out;
}

export type PlacedPlot = PlotMapData["plots"][number] & { xM: number; yM: number; widthM: number; heightM: number };

export type FieldGeometry = {
  plots: PlacedPlot[];
  widthM: number;
  heightM: number;
  /** Size of one plot as drawn (across, along the map; east–west and north–south when north is up). */
  plotWM: number;
  plotHM: number;
  /** Gap between neighbouring plots across and along the map. */
  gapXM: number;
  gapYM: number;
};

/**
 * Places every plot on the field as seen with the map's top ahead (north, unless the trial's map
 * bearing says otherwise; only the north arrow turns). Directions below are for north at the top. Blocks as rows: each block runs east–west, plots
 * side by side (plot width east–west, length north–south), alleys between blocks north–south. Blocks as
 * columns: the same turned a quarter.
 */
export function fieldGeometry(data: Pick<PlotMapData, "trial" | "plots">): FieldGeometry {
  const { blockOrientation, plotLengthM, plotWidthM, alleyBetweenPlotsM, alleyBetweenBlocksM } = data.trial;
  const rows = blockOrientation === "rows";
  const plotWM = rows ? plotWidthM : plotLengthM;
  const plotHM = rows ? plotLengthM : plotWidthM;
  const gapXM = rows ? alleyBetweenPlotsM : alleyBetweenBlocksM;
  const gapYM = rows ? alleyBetweenBlocksM : alleyBetweenPlotsM;
  const plots = data.plots.map((p) => ({
    ...p,
    xM: p.fieldColumn * (plotWM + gapXM),
    yM: p.fieldRow * (plotHM + gapYM),
    widthM: plotWM,
    heightM: plotHM,
  }));
  const widthM = plots.length ? Math.max(...plots.map((p) => p.xM + p.widthM)) : 0;
  const heightM = plots.length ? Math.max(...plots.map((p) => p.yM + p.heightM)) : 0;
  return { plots, widthM, heightM, plotWM, plotHM, gapXM, gapYM };
}
