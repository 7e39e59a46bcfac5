import type { ResultsPayload } from "../../analysis/results";
import { formatDf, formatNumber, formatP, formatStatistic } from "~/format";

const th = "px-3 py-2 text-left font-medium";
const thNum = "px-3 py-2 text-right font-medium";
const td = "px-3 py-1.5";
const tdNum = "num px-3 py-1.5 text-right whitespace-nowrap";

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
    <div className="overflow-x-auto rounded-lg border border-loam-200 bg-white">
      <table className="w-full text-sm">
        <caption className="sr-only">Analysis of variance</caption>
        <thead className="bg-loam-100 text-loam-800">
          <tr>
            <th scope="col" className={th}>Source</th>
            <th scope="col" className={thNum}>df</th>
            <th scope="col" className={thNum}>SS</th>
            <th scope="col" className={thNum}>MS</th>
            <th scope="col" className={thNum}>F</th>
            <th scope="col" className={thNum}>p</th>
            <th scope="col" className={th}>Tested against</th>
          </tr>
        </thead>
        <tbody>
          {results.anova.map((row) => (
            <tr key={row.source} className={`border-t border-loam-200 ${row.source === "total" ? "font-medium" : ""}`}>
              <th scope="row" className={`${td} text-left font-normal`}>{sourceLabel(row.source, errorSources)}</th>
              <td className={tdNum}>{formatDf(row.df)}</td>
              <td className={tdNum}>{formatStatistic(row.ss)}</td>
              <td className={tdNum}>{formatStatistic(row.ms)}</td>
              <td className={tdNum}>{row.f === null ? "" : formatNumber(row.f, 2)}</td>
              <td className={`${tdNum} ${row.p !== null && row.p < results.alpha ? "font-semibold text-moss-900" : ""}`}>
                {row.p === null ? "" : formatP(row.p)}
              </td>
              <td className={`${td} text-loam-700`}>{row.errorTerm ? sourceLabel(row.errorTerm, errorSources) : ""}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

const METHOD_NAMES = { tukey: "Tukey–Kramer", lsd: "Fisher's protected LSD" } as const;

/** Treatment means ± SE with letters and the difference from the check under the same method. */
export function MeansTable({ results, decimals, unit }: { results: ResultsPayload; decimals: number; unit: string }) {
  const level = Math.round((1 - results.alpha) * 100);
  return (
    <div className="overflow-x-auto rounded-lg border border-loam-200 bg-white">
      <table className="w-full text-sm">
        <caption className="sr-only">Treatment means</caption>
        <thead className="bg-loam-100 text-loam-800">
          <tr>
            <th scope="col" className={th}>Treatment</th>
            <th scope="col" className={thNum}>n</th>
            <th scope="col" className={thNum}>Mean ± SE ({unit})</th>
            <th scope="col" className={`${th} text-center`}>Group</th>
            <th scope="col" className={thNum}>Difference from check</th>
            <th scope="col" className={thNum}>{level} % CI</th>
            <th scope="col" className={thNum}>p</th>
          </tr>
        </thead>
        <tbody>
          {results.means.map((m) => (
            <tr key={m.code} className="border-t border-loam-200">
              <th scope="row" className={`${td} text-left font-normal`}>
                <span className="num mr-2 text-loam-600">{m.code}</span>
                {m.name}
                {m.isCheck && <span className="ml-2 rounded bg-loam-100 px-1.5 py-0.5 text-xs">check</span>}
              </th>
              <td className={tdNum}>{m.n}</td>
              <td className={tdNum}>
                {formatNumber(m.mean, decimals)} ± {formatNumber(m.se, decimals)}
              </td>
              <td className="num px-3 py-1.5 text-center font-medium">{m.group}</td>
              <td className={tdNum}>{m.vsCheck ? formatNumber(m.vsCheck.diff, decimals) : ""}</td>
              <td className={tdNum}>
                {m.vsCheck ? `${formatNumber(m.vsCheck.lower, decimals)} to ${formatNumber(m.vsCheck.upper, decimals)}` : ""}
              </td>
              <td className={`${tdNum} ${m.vsCheck?.significant ? "font-semibold text-moss-900" : ""}`}>{m.vsCheck ? formatP(m.vsCheck.p) : ""}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="border-t border-loam-200 px-3 py-2 text-xs text-loam-700">
        Means sharing a letter do not differ at α = {results.alpha} ({METHOD_NAMES[results.method]}); ‘a’ is the highest mean.
        Differences from the check use the same method{results.method === "tukey" ? " (Tukey–Kramer adjusted intervals and p-values)" : ""}.
      </p>
    </div>
  );
}

export function ComparisonsTable({ results, decimals }: { results: ResultsPayload; decimals: number }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-loam-200 bg-white">
      <table className="w-full text-sm">
        <caption className="sr-only">Pairwise comparisons</caption>
        <thead className="bg-loam-100 text-loam-800">
          <tr>
            <th scope="col" className={th}>Comparison</th>
            <th scope="col" className={thNum}>Difference</th>
            <th scope="col" className={thNum}>SE</th>
            <th scope="col" className={thNum}>df</th>
            <th scope="col" className={thNum}>CI</th>
            <th scope="col" className={thNum}>p (adjusted)</th>
          </tr>
        </thead>
        <tbody>
          {results.comparisons.map((c) => (
            <tr key={`${c.a}|${c.b}`} className="border-t border-loam-200">
              <th scope="row" className={`${td} text-left font-normal`}>
                {c.aName} − {c.bName}
              </th>
              <td className={tdNum}>{formatNumber(c.diff, decimals)}</td>
              <td className={tdNum}>{formatNumber(c.se, decimals + 1)}</td>
              <td className={tdNum}>{formatDf(c.df)}</td>
              <td className={tdNum}>
                {formatNumber(c.lower, decimals)} to {formatNumber(c.upper, decimals)}
              </td>
              <td className={`${tdNum} ${c.significant ? "font-semibold text-moss-900" : ""}`}>{formatP(c.p)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
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
