import type { ReactNode } from "react";
import type { ResultsPayload } from "../../analysis/results";
import { formatDf, formatNumber, formatP, formatStatistic } from "~/format";

const td = "px-3 py-1.5";
const tdNum = "num px-3 py-1.5 text-right whitespace-nowrap";
const row = "border-t border-loam-200";
/** A p-value (or its row's finding) below α is set bold. */
const significant = (yes: boolean) => (yes ? " font-semibold text-moss-900" : "");

/** A column heading: text left-aligned, numbers (made with `num`) right-aligned, the letters centred. */
type Column = string | { label: string; align: "right" | "center" };
const num = (label: string): Column => ({ label, align: "right" });

/** The frame every results table shares: scrolling box, hidden caption, headings, then the rows. */
function ResultTable({ caption, columns, children, note }: { caption: string; columns: Column[]; children: ReactNode; note?: ReactNode }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-loam-200 bg-white">
      <table className="w-full text-sm">
        <caption className="sr-only">{caption}</caption>
        <thead className="bg-loam-100 text-loam-800">
          <tr>
            {columns.map((c, i) =>
              typeof c === "string" ? (
                <th key={i} scope="col" className="px-3 py-2 text-left font-medium">
                  {c}
                </th>
              ) : (
                <th key={i} scope="col" className={`px-3 py-2 font-medium ${c.align === "center" ? "text-center" : "text-right"}`}>
                  {c.label}
                </th>
              ),
            )}
          </tr>
        </thead>
        <tbody>{children}</tbody>
      </table>
      {note && <p className="border-t border-loam-200 px-3 py-2 text-xs text-loam-700">{note}</p>}
    </div>
  );
}

/** The first cell of a row, naming what the row is about. */
function RowHead({ children }: { children: ReactNode }) {
  return (
    <th scope="row" className={`${td} text-left font-normal`}>
      {children}
    </th>
  );
}

const SOURCE_LABELS: Record<string, string> = {
  block: "Block",
  treatment: "Treatment",
  residual: "Residual",
  total: "Total",
  season: "Season",
  "block:treatment": "Block × treatment (error a)",
  "treatment:season": "Treatment × season",
  baseline: "Baseline (covariate)",
};

export function sourceLabel(source: string, errorSources: Set<string>): string {
  if (SOURCE_LABELS[source]) return SOURCE_LABELS[source];
  const label = source.split(":").join(" × ");
  return errorSources.has(source) ? `${label} (error a)` : label;
}

/** The ANOVA table with the error term used for each F, as a journal would print it. */
export function AnovaTable({ results }: { results: ResultsPayload }) {
  const errorSources = new Set(results.anova.map((r) => r.errorTerm).filter((e): e is string => Boolean(e) && e !== "residual"));
  return (
    <ResultTable caption="Analysis of variance" columns={["Source", num("df"), num("SS"), num("MS"), num("F"), num("p"), "Tested against"]}>
      {results.anova.map((r) => (
        <tr key={r.source} className={`${row} ${r.source === "total" ? "font-medium" : ""}`}>
          <RowHead>{sourceLabel(r.source, errorSources)}</RowHead>
          <td className={tdNum}>{formatDf(r.df)}</td>
          <td className={tdNum}>{formatStatistic(r.ss)}</td>
          <td className={tdNum}>{formatStatistic(r.ms)}</td>
          <td className={tdNum}>{r.f === null ? "" : formatNumber(r.f, 2)}</td>
          <td className={tdNum + significant(r.p !== null && r.p < results.alpha)}>{r.p === null ? "" : formatP(r.p)}</td>
          <td className={`${td} text-loam-700`}>{r.errorTerm ? sourceLabel(r.errorTerm, errorSources) : ""}</td>
        </tr>
      ))}
    </ResultTable>
  );
}

const METHOD_NAMES = { tukey: "Tukey–Kramer", lsd: "Fisher's protected LSD" } as const;

/** Treatment means ± SE with letters and the difference from the check under the same method. */
export function MeansTable({ results, decimals, unit }: { results: ResultsPayload; decimals: number; unit: string }) {
  const level = Math.round((1 - results.alpha) * 100);
  const note = (
    <>
      Means sharing a letter do not differ at α = {results.alpha} ({METHOD_NAMES[results.method]}); ‘a’ is the highest mean.
      Differences from the check use the same method{results.method === "tukey" ? " (Tukey–Kramer adjusted intervals and p-values)" : ""}.
    </>
  );
  return (
    <ResultTable
      caption="Treatment means"
      columns={["Treatment", num("n"), num(`Mean ± SE (${unit})`), { label: "Group", align: "center" }, num("Difference from check"), num(`${level} % CI`), num("p")]}
      note={note}
    >
      {results.means.map((m) => (
        <tr key={m.code} className={row}>
          <RowHead>
            <span className="num mr-2 text-loam-600">{m.code}</span>
            {m.name}
            {m.isCheck && <span className="ml-2 rounded bg-loam-100 px-1.5 py-0.5 text-xs">check</span>}
          </RowHead>
          <td className={tdNum}>{m.n}</td>
          <td className={tdNum}>
            {formatNumber(m.mean, decimals)} ± {formatNumber(m.se, decimals)}
          </td>
          <td className="num px-3 py-1.5 text-center font-medium">{m.group}</td>
          <td className={tdNum}>{m.vsCheck ? formatNumber(m.vsCheck.diff, decimals) : ""}</td>
          <td className={tdNum}>{m.vsCheck ? `${formatNumber(m.vsCheck.lower, decimals)} to ${formatNumber(m.vsCheck.upper, decimals)}` : ""}</td>
          <td className={tdNum + significant(Boolean(m.vsCheck?.significant))}>{m.vsCheck ? formatP(m.vsCheck.p) : ""}</td>
        </tr>
      ))}
    </ResultTable>
  );
}

/** Across seasons: each treatment's mean in each season, with letters that compare treatments within that season. */
export function SeasonMeansTable({ results, decimals, unit }: { results: ResultsPayload; decimals: number; unit: string }) {
  const names = new Map(results.means.map((m) => [m.code, m.name]));
  const cell = new Map(results.seasonMeans.flatMap((s) => s.means.map((m) => [`${s.season}|${m.code}`, m] as const)));
  return (
    <ResultTable
      caption={`Treatment means by season (${unit})`}
      columns={["Treatment", ...results.seasonMeans.map((s) => num(s.season))]}
      note={<>Means ({unit}) with letters: within one season, means sharing a letter do not differ at α = {results.alpha} ({METHOD_NAMES[results.method]}).</>}
    >
      {results.means.map((m) => (
        <tr key={m.code} className={row}>
          <RowHead>
            <span className="num mr-2 text-loam-600">{m.code}</span>
            {names.get(m.code)}
          </RowHead>
          {results.seasonMeans.map((s) => {
            const c = cell.get(`${s.season}|${m.code}`);
            return (
              <td key={s.season} className={tdNum}>
                {c ? (
                  <>
                    {formatNumber(c.mean, decimals)} <span className="font-medium">{c.group}</span>
                  </>
                ) : (
                  "—"
                )}
              </td>
            );
          })}
        </tr>
      ))}
    </ResultTable>
  );
}

export function ComparisonsTable({ results, decimals }: { results: ResultsPayload; decimals: number }) {
  return (
    <ResultTable caption="Pairwise comparisons" columns={["Comparison", num("Difference"), num("SE"), num("df"), num("CI"), num("p (adjusted)")]}>
      {results.comparisons.map((c) => (
        <tr key={`${c.a}|${c.b}`} className={row}>
          <RowHead>
            {c.aName} − {c.bName}
          </RowHead>
          <td className={tdNum}>{formatNumber(c.diff, decimals)}</td>
          <td className={tdNum}>{formatNumber(c.se, decimals + 1)}</td>
          <td className={tdNum}>{formatDf(c.df)}</td>
          <td className={tdNum}>
            {formatNumber(c.lower, decimals)} to {formatNumber(c.upper, decimals)}
          </td>
          <td className={tdNum + significant(c.significant)}>{formatP(c.p)}</td>
        </tr>
      ))}
    </ResultTable>
  );
}

/** A methods paragraph ready to paste into a paper. */
export function methodsParagraph(
  results: ResultsPayload,
  context: { variableLabel: string; unit: string; depthLabel: string; version: string; referenceMass: number | null },
): string {
  const model =
    results.model === "split_plot_time"
      ? "a split-plot in time with blocks, treatments and block × treatment (error a) in the whole-plot stratum and season and treatment × season tested against the residual (error b); Greenhouse–Geisser ε is reported for the season stratum"
      : results.model === "change_from_baseline"
        ? "an analysis of covariance of the change from the pre-treatment baseline, with blocks, treatments and the baseline value as covariate (type II sums of squares)"
        : results.model === "rate_of_change"
          ? "a randomized complete block analysis of per-plot least-squares slopes over time (units per year)"
          : results.design === "split_plot"
            ? "a split-plot ANOVA with main plots in blocks (error a) and sub-plots (error b)"
            : results.design === "crd"
              ? "a one-way ANOVA (completely randomized design)"
              : "a randomized complete block ANOVA";
  const separation =
    results.method === "tukey"
      ? "Tukey–Kramer pairwise comparisons"
      : "Fisher's protected least significant difference, applied only when the treatment F test was significant";
  const esm =
    context.referenceMass !== null
      ? ` Stocks were compared on an equivalent soil mass basis at a reference mass of ${context.referenceMass.toFixed(0)} Mg/ha fine earth (Ellert & Bettany 1995), interpolated linearly in cumulative mass coordinates.`
      : "";
  return (
    `${context.variableLabel} (${context.unit}, ${context.depthLabel}) was analysed by ${model}` +
    `${results.season ? ` for ${results.season}` : ""}. Means were separated by ${separation} at α = ${results.alpha}, ` +
    `with differences from the untreated check computed under the same method.${esm} ` +
    `Missing plot values were handled by least squares with type II adjusted sums of squares. ` +
    `Analyses were run in Tilthmark ${context.version} (TypeScript; distributions from jStat).`
  );
}
