// The plot map: the field drawn to scale, with a north arrow (north at the top unless the trial's map
// bearing says the map's top faces another way), every plot labelled with its number and
// treatment code (colour only repeats what the text says). One component draws it in the page and
// in the SVG download, so what is printed is what was seen.
import { inUnitSystem } from "../../analysis/units";
import { compassPoint, fieldGeometry, LABEL_INK, mapAxes, orientationText, styleIndexByCode, treatmentStyle, type PlotMapData } from "~/design/plot-map";
import { formatNumber } from "~/format";
import { DESIGN_LABELS } from "./page";

const FONT = "'IBM Plex Sans', 'Helvetica Neue', Arial, sans-serif";
const MONO = "'IBM Plex Mono', 'Courier New', monospace";
const PAD = 24;
const HEADER_H = 74;
const FIELD_MAX_W = 760;
const FIELD_MAX_H = 820;
const SIDE_W = 150;
const LEGEND_ROW = 22;
const r1 = (n: number) => Math.round(n * 10) / 10;

function lengthText(metres: number, system: "si" | "us") {
  const { value, unit } = inUnitSystem(metres, "m", system);
  return `${formatNumber(value, 1)} ${unit}`;
}

/** About how wide a line of text is drawn (IBM Plex Sans averages a little over half an em per character). */
function textWidth(text: string, fontSize: number, emPerChar = 0.55): number {
  return text.length * fontSize * emPerChar;
}

/** A round scale-bar length near a quarter of the field width, in display units. */
function scaleBarLength(fieldDisplayWidth: number): number {
  const target = fieldDisplayWidth / 4;
  const steps = [1, 2, 5, 10, 20, 25, 50, 100, 200, 500];
  return steps.filter((s) => s <= target).at(-1) ?? 1;
}

export function PlotMapSvg({ data }: { data: PlotMapData }) {
  const { trial, unitSystem, treatments } = data;
  const geo = fieldGeometry(data);
  const rows = trial.blockOrientation === "rows";
  const blocked = trial.design !== "crd";
  const bearing = trial.mapBearingDeg;
  const axes = mapAxes(bearing);
  const scale = Math.min(FIELD_MAX_W / Math.max(geo.widthM, 1), FIELD_MAX_H / Math.max(geo.heightM, 1), 40);
  const labelW = rows ? 78 : 0;
  const topLabelH = rows ? 0 : 22;
  const x0 = PAD + labelW;
  const y0 = PAD + HEADER_H + topLabelH + 28;
  const fieldW = geo.widthM * scale;
  const fieldH = geo.heightM * scale;
  const mapWidth = Math.max(x0 + fieldW + SIDE_W, 680);
  const legendY = y0 + fieldH + 56;
  const footY = legendY + treatments.length * LEGEND_ROW + 16;
  const height = footY + 66;

  const styleIndex = styleIndexByCode(treatments);
  const treatmentOf = new Map(treatments.map((t) => [t.code, t]));
  const plotPxW = geo.plotWM * scale;
  const plotPxH = geo.plotHM * scale;
  const numberFont = Math.max(7, Math.min(15, plotPxW / 4.2, plotPxH / 3.4));

  // Blocks (or CRD field rows) and, for split plots, main plots: outlined around their plots.
  const groups = (key: (p: (typeof geo.plots)[number]) => string) => {
    const out = new Map<string, { x1: number; y1: number; x2: number; y2: number; block: number }>();
    for (const p of geo.plots) {
      const k = key(p);
      const g = out.get(k) ?? { x1: Infinity, y1: Infinity, x2: -Infinity, y2: -Infinity, block: p.block };
      g.x1 = Math.min(g.x1, p.xM);
      g.y1 = Math.min(g.y1, p.yM);
      g.x2 = Math.max(g.x2, p.xM + p.widthM);
      g.y2 = Math.max(g.y2, p.yM + p.heightM);
      out.set(k, g);
    }
    return [...out.entries()];
  };
  const strips = groups((p) => (blocked ? `b${p.block}` : rows ? `r${p.fieldRow}` : `c${p.fieldColumn}`));
  const mainPlots = trial.design === "split_plot" ? groups((p) => `${p.block}-${p.mainPlot}`) : [];

  const displayWidth = inUnitSystem(geo.widthM, "m", unitSystem).value;
  const barUnits = scaleBarLength(displayWidth);
  const barPx = (barUnits / Math.max(displayWidth, 1e-9)) * fieldW;
  const unitLabel = inUnitSystem(1, "m", unitSystem).unit;
  const plotCount = data.plots.length;
  const blockCount = new Set(data.plots.map((p) => p.block)).size;
  const statusLine =
    trial.status === "draft"
      ? "Draft: may still be re-randomized; do not stake out until locked"
      : `Locked ${trial.lockedAt ? trial.lockedAt.slice(0, 10) : ""}${trial.status !== "locked" ? ` · ${trial.status}` : ""}`;
  const summaryText = [trial.siteName, DESIGN_LABELS[trial.design], `${blockCount} ${blocked ? "blocks" : "rows"} × ${treatments.length} treatments = ${plotCount} plots`]
    .filter(Boolean)
    .join(" · ");
  const seedText = ` · ${trial.arrangement} numbering · ${statusLine}`;
  const sizeNote =
    `Each plot ${lengthText(trial.plotWidthM, unitSystem)} wide × ${lengthText(trial.plotLengthM, unitSystem)} long; ` +
    `alleys ${lengthText(trial.alleyBetweenPlotsM, unitSystem)} between plots, ${lengthText(trial.alleyBetweenBlocksM, unitSystem)} between ${blocked ? "blocks" : "rows"}.`;
  const numberingNote =
    `Plot number = ${blocked ? "block" : "row"} × 100 + position${trial.arrangement === "serpentine" ? ", every second " + (blocked ? "block" : "row") + " numbered back the other way" : ""}. ` +
    `${blocked ? "Blocks" : "Rows"} laid as ${rows ? `rows (${axes.across})` : `columns (${axes.along})`}, ${orientationText(bearing)}.`;
  // Wide enough for the longest line of text, so nothing is cut off at the right edge.
  const width = Math.max(
    mapWidth,
    PAD * 2 + textWidth(trial.title, 18, 0.6),
    PAD * 2 + textWidth(summaryText, 12.5),
    PAD * 2 + textWidth(`Randomization seed ${trial.seed ?? "—"}${seedText}`, 12.5, 0.58),
    PAD * 2 + textWidth(sizeNote, 11.5),
    PAD * 2 + textWidth(numberingNote, 11.5),
    ...treatments.map((t) => PAD * 2 + 24 + textWidth(`${t.code}  ${t.name} (untreated check)`, 12.5)),
  );
  const titleId = `plot-map-title-${trial.id}`;
  const descId = `plot-map-desc-${trial.id}`;

  return (
    <svg
      xmlns="http://www.w3.org/2000/svg"
      viewBox={`0 0 ${r1(width)} ${r1(height)}`}
      width={r1(width)}
      height={r1(height)}
      role="img"
      aria-labelledby={`${titleId} ${descId}`}
      fontFamily={FONT}
      style={{ maxWidth: "100%", height: "auto", background: "#ffffff" }}
      data-testid="plot-map"
      className="plot-map"
    >
      <title id={titleId}>{`Plot map: ${trial.title}`}</title>
      <desc id={descId}>
        {`${plotCount} plots in ${blockCount} ${blocked ? "blocks" : "field rows"}, drawn to scale with the ${orientationText(bearing)}. ` +
          `Field ${lengthText(geo.widthM, unitSystem)} ${axes.across} by ${lengthText(geo.heightM, unitSystem)} ${axes.along}. ` +
          "Each plot is labelled with its plot number and treatment code."}
      </desc>
      <defs>
        <pattern id="plot-map-hatch" patternUnits="userSpaceOnUse" width="7" height="7" patternTransform="rotate(45)">
          <line x1="0" y1="0" x2="0" y2="7" stroke={LABEL_INK} strokeOpacity="0.35" strokeWidth="1.6" />
        </pattern>
      </defs>
      <rect x="0" y="0" width={r1(width)} height={r1(height)} fill="#ffffff" />

      {/* Heading */}
      <text x={PAD} y={PAD + 16} fontSize="18" fontWeight="600" fill={LABEL_INK}>
        {trial.title}
      </text>
      <text x={PAD} y={PAD + 38} fontSize="12.5" fill={LABEL_INK}>
        {summaryText}
      </text>
      <text x={PAD} y={PAD + 58} fontSize="12.5" fill={LABEL_INK}>
        <tspan>Randomization seed </tspan>
        <tspan fontFamily={MONO}>{trial.seed ?? "—"}</tspan>
        <tspan>{seedText}</tspan>
      </text>

      {/* Overall dimensions */}
      <g stroke={LABEL_INK} strokeWidth="1" fill="none">
        <line x1={r1(x0)} y1={r1(y0 - 14)} x2={r1(x0 + fieldW)} y2={r1(y0 - 14)} />
        <line x1={r1(x0)} y1={r1(y0 - 19)} x2={r1(x0)} y2={r1(y0 - 9)} />
        <line x1={r1(x0 + fieldW)} y1={r1(y0 - 19)} x2={r1(x0 + fieldW)} y2={r1(y0 - 9)} />
        <line x1={r1(x0 + fieldW + 16)} y1={r1(y0)} x2={r1(x0 + fieldW + 16)} y2={r1(y0 + fieldH)} />
        <line x1={r1(x0 + fieldW + 11)} y1={r1(y0)} x2={r1(x0 + fieldW + 21)} y2={r1(y0)} />
        <line x1={r1(x0 + fieldW + 11)} y1={r1(y0 + fieldH)} x2={r1(x0 + fieldW + 21)} y2={r1(y0 + fieldH)} />
      </g>
      <text x={r1(x0 + fieldW / 2)} y={r1(y0 - 19)} fontSize="12" textAnchor="middle" fill={LABEL_INK} fontFamily={MONO}>
        {lengthText(geo.widthM, unitSystem)}
      </text>
      <text
        x={r1(x0 + fieldW + 30)}
        y={r1(y0 + fieldH / 2)}
        fontSize="12"
        textAnchor="middle"
        fill={LABEL_INK}
        fontFamily={MONO}
        transform={`rotate(90 ${r1(x0 + fieldW + 30)} ${r1(y0 + fieldH / 2)})`}
      >
        {lengthText(geo.heightM, unitSystem)}
      </text>

      {/* Strip outlines and labels */}
      {strips.map(([key, g], i) => {
        const label = blocked ? `Block ${g.block}` : `Row ${i + 1}`;
        return (
          <g key={key}>
            <rect
              x={r1(x0 + g.x1 * scale - 3)}
              y={r1(y0 + g.y1 * scale - 3)}
              width={r1((g.x2 - g.x1) * scale + 6)}
              height={r1((g.y2 - g.y1) * scale + 6)}
              fill="none"
              stroke={LABEL_INK}
              strokeWidth="1"
              strokeDasharray="4 3"
            />
            {rows ? (
              <text x={r1(x0 - 10)} y={r1(y0 + ((g.y1 + g.y2) / 2) * scale + 4)} fontSize="12.5" fontWeight="600" textAnchor="end" fill={LABEL_INK}>
                {label}
              </text>
            ) : (
              <text x={r1(x0 + ((g.x1 + g.x2) / 2) * scale)} y={r1(y0 - 30)} fontSize="12.5" fontWeight="600" textAnchor="middle" fill={LABEL_INK}>
                {label}
              </text>
            )}
          </g>
        );
      })}

      {/* Plots */}
      {geo.plots.map((p) => {
        const t = treatmentOf.get(p.treatment);
        const style = treatmentStyle(styleIndex.get(p.treatment) ?? 0, t?.isCheck ?? false);
        const x = x0 + p.xM * scale;
        const y = y0 + p.yM * scale;
        const codeFont = Math.max(6, Math.min(numberFont * 0.9, (plotPxW * 0.9) / (0.6 * Math.max(p.treatment.length, 1))));
        return (
          <g key={p.plotNumber} data-plot={p.plotNumber}>
            <rect x={r1(x)} y={r1(y)} width={r1(plotPxW)} height={r1(plotPxH)} fill={style.fill} stroke={LABEL_INK} strokeWidth="1" />
            {style.hatched && <rect x={r1(x)} y={r1(y)} width={r1(plotPxW)} height={r1(plotPxH)} fill="url(#plot-map-hatch)" />}
            <text x={r1(x + plotPxW / 2)} y={r1(y + plotPxH / 2 - numberFont * 0.15)} fontSize={r1(numberFont)} fontWeight="600" textAnchor="middle" fill={LABEL_INK} fontFamily={MONO}>
              {p.plotNumber}
            </text>
            <text x={r1(x + plotPxW / 2)} y={r1(y + plotPxH / 2 + codeFont * 1.05)} fontSize={r1(codeFont)} textAnchor="middle" fill={LABEL_INK}>
              {p.treatment}
            </text>
          </g>
        );
      })}
      {mainPlots.map(([key, g]) => (
        <rect
          key={`main-${key}`}
          x={r1(x0 + g.x1 * scale)}
          y={r1(y0 + g.y1 * scale)}
          width={r1((g.x2 - g.x1) * scale)}
          height={r1((g.y2 - g.y1) * scale)}
          fill="none"
          stroke={LABEL_INK}
          strokeWidth="3"
        />
      ))}

      {/* North arrow (turned to true north when the map's top faces another bearing) and scale bar */}
      <g transform={`translate(${r1(x0 + fieldW + 84)} ${r1(y0 + 30)})`} data-bearing={bearing}>
        <g transform={bearing === 0 ? undefined : `rotate(${-bearing})`}>
          <polygon points="0,-24 11,6 0,-1 -11,6" fill={LABEL_INK} />
          <text x="0" y="-30" fontSize="15" fontWeight="600" textAnchor="middle" fill={LABEL_INK} transform={bearing === 0 ? undefined : `rotate(${bearing} 0 -35)`}>
            N
          </text>
        </g>
        {bearing !== 0 && (
          <text x="0" y="34" fontSize="11" textAnchor="middle" fill={LABEL_INK} fontFamily={MONO}>
            {`top ${bearing}° ${compassPoint(bearing)}`}
          </text>
        )}
      </g>
      <g transform={`translate(${r1(x0)} ${r1(y0 + fieldH + 22)})`}>
        <rect x="0" y="0" width={r1(barPx / 2)} height="6" fill={LABEL_INK} />
        <rect x={r1(barPx / 2)} y="0" width={r1(barPx / 2)} height="6" fill="#ffffff" stroke={LABEL_INK} strokeWidth="1" />
        <text x={r1(barPx + 8)} y="7" fontSize="11.5" fill={LABEL_INK} fontFamily={MONO}>
          {`${barUnits} ${unitLabel}`}
        </text>
      </g>

      {/* Legend */}
      <text x={PAD} y={r1(legendY - 8)} fontSize="12.5" fontWeight="600" fill={LABEL_INK}>
        Treatments
      </text>
      {treatments.map((t, i) => {
        const style = treatmentStyle(styleIndex.get(t.code) ?? 0, t.isCheck);
        const y = legendY + i * LEGEND_ROW;
        return (
          <g key={t.code}>
            <rect x={PAD} y={r1(y)} width="16" height="16" fill={style.fill} stroke={LABEL_INK} strokeWidth="1" />
            {style.hatched && <rect x={PAD} y={r1(y)} width="16" height="16" fill="url(#plot-map-hatch)" />}
            <text x={PAD + 24} y={r1(y + 12.5)} fontSize="12.5" fill={LABEL_INK}>
              <tspan fontWeight="600">{t.code}</tspan>
              <tspan>{`  ${t.name}${t.isCheck && !/check/i.test(t.name) ? " (untreated check)" : ""}`}</tspan>
            </text>
          </g>
        );
      })}

      {/* Notes */}
      <text x={PAD} y={r1(footY + 4)} fontSize="11.5" fill={LABEL_INK}>
        {sizeNote}
      </text>
      <text x={PAD} y={r1(footY + 22)} fontSize="11.5" fill={LABEL_INK}>
        {numberingNote}
      </text>
      {trial.design === "split_plot" && (
        <text x={PAD} y={r1(footY + 40)} fontSize="11.5" fill={LABEL_INK}>
          Heavy outlines are main plots; the plots inside them are sub-plots.
        </text>
      )}
    </svg>
  );
}
