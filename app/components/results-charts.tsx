import * as Plot from "@observablehq/plot";
import { scaleLinear } from "d3-scale";
import { useCallback, useState } from "react";
import type {
  ContrastsChart,
  DepthProfileChart,
  DiagnosticsChart,
  PlotMapChart,
  PlotValuesChart,
  SeasonMeansChart,
  StocksChart,
} from "~/.server/results/charts";
import { formatNumber, formatP } from "~/format";
import { ChartPanel, TREATMENT_COLOURS } from "./chart-panel";

type Point = SeasonMeansChart["points"][number];
type Treatment = { code: string; name: string };

const INK = "#2b2118";
const GRID = "#ddd3c6";
/** Blocks are told apart by position (their number on the axis); colour repeats it. */
const BLOCK_COLOURS = ["#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000"];

const labelOf = (treatments: Treatment[]) => (code: string) => `${code} ${treatments.find((t) => t.code === code)?.name ?? ""}`;

function treatmentColour(treatments: Treatment[]) {
  const labels = treatments.map((t) => labelOf(treatments)(t.code));
  return { domain: labels, range: TREATMENT_COLOURS };
}

/** Codes → names under a chart that labels treatments by code. */
function TreatmentKey({ treatments }: { treatments: Treatment[] }) {
  return (
    <ul className="mt-2 flex flex-wrap gap-x-4 gap-y-1 text-xs text-loam-700" aria-label="Treatment codes">
      {treatments.map((t) => (
        <li key={t.code}>
          <span className="num font-medium text-loam-900">{t.code}</span> {t.name}
        </li>
      ))}
    </ul>
  );
}

/**
 * Label positions (in data units) for end-of-line labels: each at its value, pushed apart so that
 * neighbours are at least `gap` apart, the group kept centred on the values.
 */
function spreadLabels(values: number[], gap: number): number[] {
  const order = values.map((v, i) => ({ v, i })).sort((a, b) => a.v - b.v);
  const placed = order.map((o) => o.v);
  for (let k = 1; k < placed.length; k++) placed[k] = Math.max(placed[k], placed[k - 1] + gap);
  const shift = (placed.reduce((s, v) => s + v, 0) - order.reduce((s, o) => s + o.v, 0)) / Math.max(1, placed.length);
  const out = new Array<number>(values.length);
  order.forEach((o, k) => (out[o.i] = placed[k] - shift));
  return out;
}

function drawSeasonMeans(data: SeasonMeansChart, width: number) {
  const label = labelOf(data.treatments);
  const seasons = [...new Map(data.points.map((p) => [p.season, p.seasonOrder])).entries()].sort((a, b) => a[1] - b[1]).map(([s]) => s);
  const narrow = width < 640;
  const height = 360;
  const marginBottom = narrow ? 72 : 48;
  const lows = data.points.map((p) => p.mean - (p.se ?? 0));
  const highs = data.points.map((p) => p.mean + (p.se ?? 0));
  const [yMin, yMax] = [Math.min(...lows), Math.max(...highs)];
  const last = data.points.filter((p) => p.season === seasons.at(-1));
  // About 12 px between labels, converted to data units over the plotting height.
  const labelY = spreadLabels(last.map((p) => p.mean), ((yMax - yMin) * 12) / (height - marginBottom - 30));
  const ends = last.map((p, i) => ({ ...p, labelY: labelY[i] }));
  return Plot.plot({
    width,
    height,
    marginLeft: 56,
    marginRight: 40,
    marginBottom,
    x: { domain: seasons, label: "Season", padding: 0.3 },
    y: { label: data.yLabel, grid: true, nice: true },
    color: { ...treatmentColour(data.treatments), legend: true },
    marks: [
      // Long season names wrap on narrow screens instead of running into each other.
      Plot.axisX({ label: "Season", lineWidth: narrow ? 5 : 12 }),
      Plot.ruleX(data.points.filter((p) => p.se !== null), {
        x: "season",
        y1: (p: Point) => p.mean - p.se!,
        y2: (p: Point) => p.mean + p.se!,
        stroke: (p: Point) => label(p.code),
        strokeOpacity: 0.7,
      }),
      Plot.line(data.points, { x: "season", y: "mean", z: "code", stroke: (p: Point) => label(p.code), strokeWidth: 1.5 }),
      Plot.dot(data.points, {
        x: "season",
        y: "mean",
        fill: (p: Point) => label(p.code),
        r: 3,
        tip: true,
        title: (p: Point) => `${label(p.code)}\n${p.season}: ${formatNumber(p.mean, 2)} ± ${formatNumber(p.se, 2)} (n = ${p.n})`,
      }),
      Plot.text(ends, { x: "season", y: "labelY", text: "code", dx: 12, textAnchor: "start", fontSize: 11, fontWeight: "bold", fill: (p: Point) => label(p.code) }),
    ],
  });
}

type ValuePoint = PlotValuesChart["points"][number];

function drawPlotValues(data: PlotValuesChart, width: number) {
  const codes = data.treatments.map((t) => t.code).filter((c) => data.points.some((p) => p.code === c) || data.means.some((m) => m.code === c));
  return Plot.plot({
    width,
    height: 380,
    marginLeft: 56,
    marginBottom: 40,
    fx: { domain: codes, label: "Treatment", padding: 0.12 },
    x: { domain: data.blocks, label: "Block", tickSize: 0 },
    y: { label: data.yLabel, grid: true, nice: true },
    color: { domain: data.blocks, range: BLOCK_COLOURS, legend: true, tickFormat: (b: number) => `Block ${b}` },
    marks: [
      Plot.frame({ stroke: GRID }),
      Plot.tickY(data.means, { fx: "code", y: "mean", stroke: INK, strokeWidth: 2 }),
      Plot.dot(data.points, {
        fx: "code",
        x: "block",
        y: "value",
        fill: "block",
        stroke: "white",
        r: 4.5,
        tip: true,
        title: (p: ValuePoint) => `Plot ${p.plotNumber} · ${p.code} · block ${p.block}\n${formatNumber(p.value, 3)}`,
      }),
    ],
  });
}

type Cell = PlotMapChart["cells"][number];

/** Black or white text, whichever reads better on an rgb() fill (WCAG relative luminance). */
function inkOn(fill: string): string {
  const [r, g, b] = (fill.match(/\d+(\.\d+)?/g) ?? ["255", "255", "255"]).map(Number).map((c) => {
    const s = c / 255;
    return s <= 0.03928 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
  });
  return 0.2126 * r + 0.7152 * g + 0.0722 * b > 0.22 ? INK : "#ffffff";
}

function drawPlotMap(data: PlotMapChart, width: number) {
  const values = data.cells.map((c) => c.value).filter((v): v is number => v !== null);
  // d3-scale: sequential light → dark green for values; diverging blue–white–orange around 0 for residuals.
  const colour =
    data.mode === "values"
      ? scaleLinear<string>()
          .domain([Math.min(...values), (Math.min(...values) + Math.max(...values)) / 2, Math.max(...values)])
          .range(["#f4efd8", "#8fbf7f", "#1f4f33"])
      : (() => {
          const extent = Math.max(...values.map(Math.abs)) || 1;
          return scaleLinear<string>().domain([-extent, 0, extent]).range(["#1f6fb2", "#f5f2ec", "#c65a00"]);
        })();
  const fill = (c: Cell) => (c.value === null ? "#cfc8bd" : colour(c.value));
  const ink = (c: Cell) => inkOn(fill(c));
  // Two decimals with a real minus sign; a residual that rounds to zero is shown without one.
  const valueText = (c: Cell) => (c.value === null ? "no value" : formatNumber(c.value, 2).replace(/^−(0\.00)$/, "$1"));
  const narrow = width < 560;
  const cellHeight = narrow ? 64 : 60;
  const holder = document.createElement("div");
  const legend = Plot.legend({
    color: { type: "linear", domain: colour.domain(), range: colour.range(), label: data.legendLabel },
    width: Math.min(340, width),
    ticks: 5,
  });
  const map = Plot.plot({
    width,
    height: data.rows * cellHeight + 56,
    marginTop: 28,
    marginLeft: 44,
    padding: 0,
    x: { domain: [...Array(data.columns).keys()], label: "Field column →", tickFormat: (c: number) => String(c + 1), axis: "top" },
    y: { domain: [...Array(data.rows).keys()], label: "Field row ↓", tickFormat: (r: number) => String(r + 1) },
    marks: [
      Plot.cell(data.cells, { x: "column", y: "row", fill, inset: 1.5, stroke: (c: Cell) => (c.flagged ? INK : "none"), strokeWidth: 3 }),
      Plot.text(data.cells, { x: "column", y: "row", text: (c: Cell) => String(c.plotNumber), dy: narrow ? -15 : -8, fontWeight: "bold", fontSize: 12, fill: ink }),
      // On a phone the code and the value get a line each, so they stay inside their cell.
      ...(narrow
        ? [
            Plot.text(data.cells, { x: "column", y: "row", text: "code", dy: 0, fontSize: 10, fill: ink }),
            Plot.text(data.cells, { x: "column", y: "row", text: (c: Cell) => (c.value === null ? "—" : valueText(c)), dy: 14, fontSize: 10, fill: ink }),
          ]
        : [Plot.text(data.cells, { x: "column", y: "row", text: (c: Cell) => `${c.code} · ${valueText(c)}`, dy: 9, fontSize: 11, fill: ink })]),
      Plot.tip(data.cells, Plot.pointer({ x: "column", y: "row", title: (c: Cell) => `Plot ${c.plotNumber} · ${c.code} · block ${c.block}\n${c.value === null ? "no value" : formatNumber(c.value, 4)}` })),
    ],
  });
  holder.append(legend, map);
  return holder;
}

type DepthPoint = DepthProfileChart["points"][number];

/** Small multiples, one panel per treatment, with the check's profile repeated in each for reference. */
function drawDepthProfile(data: DepthProfileChart, width: number) {
  const codes = data.treatments.map((t) => t.code).filter((c) => data.points.some((p) => p.code === c));
  const columns = width < 560 ? 2 : width < 900 ? 3 : Math.min(codes.length, 6);
  const panel = new Map(codes.map((c, i) => [c, { fx: i % columns, fy: Math.floor(i / columns) }]));
  const points = data.points.map((p) => ({ ...p, ...panel.get(p.code)! }));
  const checkPoints = data.points.filter((p) => p.code === data.checkCode);
  const reference = codes.filter((c) => c !== data.checkCode).flatMap((c) => checkPoints.map((p) => ({ ...p, ...panel.get(c)! })));
  const bottom = Math.max(...data.points.map((p) => p.bottomCm));
  const boundaries = [...new Set(data.points.flatMap((p) => [p.topCm, p.bottomCm]))].sort((a, b) => a - b);
  const rows = Math.ceil(codes.length / columns);
  const colour = (code: string) => TREATMENT_COLOURS[data.treatments.findIndex((t) => t.code === code) % TREATMENT_COLOURS.length];
  const titles = codes.map((code) => ({ code, ...panel.get(code)! }));
  return Plot.plot({
    width,
    height: rows * 230 + 60,
    marginLeft: 52,
    marginRight: 12,
    marginTop: 40,
    fx: { axis: null, padding: 0.08 },
    fy: { axis: null, padding: 0.12 },
    x: { label: data.xLabel, grid: true, nice: true, axis: "top", ticks: width < 560 ? 3 : 4 },
    y: { domain: [0, bottom], label: "Depth (cm)", ticks: boundaries, reverse: true },
    marks: [
      Plot.frame({ stroke: GRID }),
      Plot.line(reference, { fx: "fx", fy: "fy", x: "mean", y: "midCm", z: "code", stroke: "#a39280", strokeDasharray: "4 3" }),
      Plot.ruleY(points.filter((p) => p.se !== null), {
        fx: "fx",
        fy: "fy",
        y: "midCm",
        x1: (p: DepthPoint) => p.mean - p.se!,
        x2: (p: DepthPoint) => p.mean + p.se!,
        stroke: (p: DepthPoint) => colour(p.code),
      }),
      Plot.line(points, { fx: "fx", fy: "fy", x: "mean", y: "midCm", z: "code", stroke: (p: DepthPoint) => colour(p.code), strokeWidth: 2 }),
      Plot.dot(points, {
        fx: "fx",
        fy: "fy",
        x: "mean",
        y: "midCm",
        fill: (p: DepthPoint) => colour(p.code),
        r: 3.5,
        tip: true,
        title: (p: DepthPoint) => `${p.code} ${p.topCm}–${p.bottomCm} cm\n${formatNumber(p.mean, 3)} ± ${formatNumber(p.se, 3)} (n = ${p.n})`,
      }),
      Plot.text(titles, { fx: "fx", fy: "fy", text: "code", frameAnchor: "bottom-right", dx: -6, dy: -6, fontSize: 13, fontWeight: "bold", fill: (t: { code: string }) => colour(t.code) }),
    ],
  });
}

type StockPoint = StocksChart["points"][number];

function drawStocks(data: StocksChart, width: number) {
  const codes = data.treatments.map((t) => t.code).filter((c) => data.points.some((p) => p.code === c));
  const styles = {
    "Fixed depth": { dy: -7, symbol: "circle", fill: INK },
    "Equivalent soil mass": { dy: 7, symbol: "square", fill: "white" },
  } as const;
  const marks = (Object.keys(styles) as StockPoint["basis"][]).flatMap((basis) => {
    const points = data.points.filter((p) => p.basis === basis);
    const { dy, symbol, fill } = styles[basis];
    return [
      Plot.ruleY(points.filter((p) => p.se !== null), { y: "code", x1: (p: StockPoint) => p.mean - p.se!, x2: (p: StockPoint) => p.mean + p.se!, dy, stroke: INK }),
      Plot.dot(points, {
        y: "code",
        x: "mean",
        dy,
        symbol,
        r: 5,
        fill,
        stroke: INK,
        strokeWidth: 1.5,
        tip: true,
        title: (p: StockPoint) => `${p.code} · ${p.basis}\n${formatNumber(p.mean, 2)} ± ${formatNumber(p.se, 2)} (n = ${p.n})`,
      }),
      // The key sits in the top margin so the downloaded SVG carries it too.
      Plot.dot([basis], { frameAnchor: "top-left", dx: basis === "Fixed depth" ? 6 : 126, dy: -22, symbol, r: 5, fill, stroke: INK, strokeWidth: 1.5 }),
      Plot.text([basis], { frameAnchor: "top-left", dx: basis === "Fixed depth" ? 16 : 136, dy: -22, text: (b: string) => (b === "Fixed depth" ? "Fixed depth" : "ESM"), textAnchor: "start", fontSize: 12 }),
    ];
  });
  return Plot.plot({
    width,
    height: codes.length * 44 + 90,
    marginTop: 40,
    marginLeft: 44,
    marginRight: 24,
    x: { label: data.xLabel, grid: true, nice: true },
    y: { domain: codes, label: "Treatment", padding: 0.2 },
    marks: [Plot.frame({ stroke: GRID }), ...marks],
  });
}

type Residual = DiagnosticsChart["points"][number];

/** "plot 201" beside each flagged point, on the side facing the middle of the chart so it stays inside. */
function sideLabels(points: Residual[], x: "fitted" | "theoretical") {
  const xs = points.map((p) => p[x]);
  const middle = (Math.min(...xs) + Math.max(...xs)) / 2;
  const flagged = points.filter((p) => p.flagged);
  const text = (p: Residual) => `plot ${p.plotNumber}`;
  return [
    Plot.text(flagged.filter((p) => p[x] >= middle), { x, y: "residual", text, dx: -8, textAnchor: "end", fontSize: 11, fontWeight: "bold" }),
    Plot.text(flagged.filter((p) => p[x] < middle), { x, y: "residual", text, dx: 8, textAnchor: "start", fontSize: 11, fontWeight: "bold" }),
  ];
}

function drawDiagnostics(data: DiagnosticsChart, width: number) {
  const panelWidth = width >= 680 ? Math.floor((width - 24) / 2) : width;
  const panelTitle = (text: string) => Plot.text([text], { frameAnchor: "top", dy: -30, fontSize: 13, fontWeight: "bold" });
  const fittedPanel = Plot.plot({
    width: panelWidth,
    height: 340,
    marginTop: 44,
    marginLeft: 56,
    x: { label: `Fitted value (${data.unit})`, nice: true, grid: true },
    y: { label: `Residual (${data.unit})`, nice: true, grid: true },
    marks: [
      panelTitle("Residuals vs fitted"),
      Plot.ruleY([0], { stroke: INK, strokeDasharray: "4 3" }),
      Plot.dot(data.points, {
        x: "fitted",
        y: "residual",
        r: 3.5,
        fill: (p: Residual) => (p.flagged ? "#D55E00" : "#0072B2"),
        tip: true,
        title: (p: Residual) =>
          `Plot ${p.plotNumber} (${p.code})\nfitted ${formatNumber(p.fitted, 3)}, residual ${formatNumber(p.residual, 3)}, studentized ${formatNumber(p.studentized, 2)}`,
      }),
      ...sideLabels(data.points, "fitted"),
    ],
  });
  const xs = data.points.map((p) => p.theoretical);
  const ends = [Math.min(...xs), Math.max(...xs)].map((x) => ({ x, y: data.qqLine.intercept + data.qqLine.slope * x }));
  const qqPanel = Plot.plot({
    width: panelWidth,
    height: 340,
    marginTop: 44,
    marginLeft: 56,
    x: { label: "Normal score", grid: true },
    y: { label: `Residual (${data.unit})`, nice: true, grid: true },
    marks: [
      panelTitle("Normal Q–Q"),
      Plot.line(ends, { x: "x", y: "y", stroke: INK, strokeDasharray: "4 3" }),
      Plot.dot(data.points, {
        x: "theoretical",
        y: "residual",
        r: 3.5,
        fill: (p: Residual) => (p.flagged ? "#D55E00" : "#0072B2"),
        tip: true,
        title: (p: Residual) => `Plot ${p.plotNumber} (${p.code})\nresidual ${formatNumber(p.residual, 3)}, normal score ${formatNumber(p.theoretical, 2)}`,
      }),
      ...sideLabels(data.points, "theoretical"),
    ],
  });
  const holder = document.createElement("div");
  holder.className = "flex flex-wrap gap-6";
  holder.append(fittedPanel, qqPanel);
  return holder;
}

type Estimate = ContrastsChart["estimates"][number];

function drawContrasts(data: ContrastsChart, width: number) {
  if (data.estimates.length === 0) return null;
  const longest = Math.max(...data.estimates.map((e) => e.name.length));
  return Plot.plot({
    width,
    height: data.estimates.length * 34 + 64,
    marginLeft: Math.min(Math.max(60, longest * 7 + 12), Math.floor(width * 0.45)),
    marginRight: 24,
    x: { label: data.xLabel, grid: true, nice: true },
    y: { domain: data.estimates.map((e) => e.name), label: null },
    marks: [
      Plot.ruleX([0], { stroke: INK, strokeDasharray: "4 3" }),
      Plot.ruleY(data.estimates, { y: "name", x1: "lower", x2: "upper", stroke: "#0072B2", strokeWidth: 2 }),
      Plot.dot(data.estimates, {
        y: "name",
        x: "estimate",
        r: 5,
        stroke: "#0072B2",
        strokeWidth: 2,
        fill: (e: Estimate) => (e.significant ? "#0072B2" : "white"),
        tip: true,
        title: (e: Estimate) =>
          `${e.name}\n${formatNumber(e.estimate, 3)} (${data.level} % CI ${formatNumber(e.lower, 3)} to ${formatNumber(e.upper, 3)}), p ${formatP(e.p).startsWith("<") ? formatP(e.p) : `= ${formatP(e.p)}`}`,
      }),
    ],
  });
}

function withParams(path: string, search: string, extra: Record<string, string> = {}) {
  const params = new URLSearchParams(search);
  for (const [k, v] of Object.entries(extra)) params.set(k, v);
  const text = params.toString();
  return text ? `${path}?${text}` : path;
}

/** The charts of the results page, each fetched from its own JSON route with the page's selection. */
export function ResultsCharts({ trialId, search }: { trialId: string; search: string }) {
  const [mapMode, setMapMode] = useState<"values" | "residuals">("values");
  const api = `/api/trials/${trialId}/charts`;
  const keyed = useCallback((data: { treatments: Treatment[] }) => <TreatmentKey treatments={data.treatments} />, []);
  const problems = useCallback(
    (data: ContrastsChart) =>
      data.problems.length > 0 ? (
        <ul className="mt-2 text-sm text-brick-700">
          {data.problems.map((p) => (
            <li key={p.name}>
              {p.name}: {p.error}
            </li>
          ))}
        </ul>
      ) : null,
    [],
  );
  return (
    <section className="mb-10" aria-label="Charts">
      <div className="mb-3 border-b border-loam-200 pb-2">
        <h2 className="text-lg font-semibold">Charts</h2>
      </div>
      <div className="grid gap-6">
        <ChartPanel<SeasonMeansChart> url={withParams(`${api}/season-means`, search)} draw={drawSeasonMeans} filename="season-means.svg" />
        <ChartPanel<PlotValuesChart> url={withParams(`${api}/plot-values`, search)} draw={drawPlotValues} filename="plot-values.svg">
          {keyed}
        </ChartPanel>
        <ChartPanel<PlotMapChart>
          url={withParams(`${api}/plot-map`, search, { show: mapMode })}
          draw={drawPlotMap}
          filename={`plot-map-${mapMode}.svg`}
          controls={
            <fieldset className="no-print flex gap-3 text-sm">
              <legend className="sr-only">Colour the plot map by</legend>
              {(["values", "residuals"] as const).map((mode) => (
                <label key={mode} className="flex items-center gap-1">
                  <input type="radio" name="plot-map-mode" value={mode} checked={mapMode === mode} onChange={() => setMapMode(mode)} />
                  {mode === "values" ? "Values" : "Residuals"}
                </label>
              ))}
            </fieldset>
          }
        />
        <ChartPanel<DepthProfileChart> url={withParams(`${api}/depth-profile`, search)} draw={drawDepthProfile} filename="depth-profile.svg">
          {keyed}
        </ChartPanel>
        <ChartPanel<StocksChart> url={withParams(`${api}/stocks`, search)} draw={drawStocks} filename="stocks-fixed-vs-esm.svg">
          {keyed}
        </ChartPanel>
        <ChartPanel<DiagnosticsChart> url={withParams(`${api}/diagnostics`, search)} draw={drawDiagnostics} filename="residual-checks.svg" />
        <ChartPanel<ContrastsChart> url={withParams(`${api}/contrasts`, search)} draw={drawContrasts} filename="contrasts.svg">
          {problems}
        </ChartPanel>
      </div>
    </section>
  );
}
