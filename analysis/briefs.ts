// Field-brief summaries: a table per variable and depth, and plain-language sentences drawn from
// the same numbers, so text, intervals and letters never disagree. Pure.
import type { ResultsPayload } from "./results";
import type { SiUnit } from "./units";

export interface BriefRow {
  code: string;
  name: string;
  isCheck: boolean;
  n: number;
  /** Least-squares mean in the reported season. */
  mean: number;
  /** Mean of the plot values in the baseline season, when one was sampled. */
  baselineMean: number | null;
  change: number | null;
  changePercent: number | null;
  group: string;
  vsCheck: { diff: number; lower: number; upper: number; p: number; significant: boolean } | null;
}

export interface BriefSection {
  variable: { id: string; label: string; unit: string; siUnit: SiUnit | null; decimals: number };
  depthLabel: string;
  season: string;
  baselineSeason: string | null;
  method: "tukey" | "lsd";
  alpha: number;
  rows: BriefRow[];
  /** Treatment means ± SE per season, frozen for the brief's chart. */
  chart: { season: string; seasonOrder: number; code: string; mean: number; se: number | null }[];
  sentence: string;
}

const METHOD_WORDS = { tukey: "Tukey–Kramer comparisons", lsd: "Fisher's protected LSD" } as const;

/** The amount words for a difference: percentage points for %, else the unit. */
function amount(value: number, unit: string, decimals: number): string {
  const text = Math.abs(value).toFixed(decimals);
  return unit === "%" ? `${text} percentage points` : `${text} ${unit}`;
}

function joinNames(names: string[]): string {
  if (names.length <= 1) return names.join("");
  return `${names.slice(0, -1).join(", ")} and ${names.at(-1)}`;
}

/** Summary rows from a per-season analysis and the baseline means per treatment. */
export function briefRows(results: ResultsPayload, baselineMeans: ReadonlyMap<string, number>): BriefRow[] {
  return results.means.map((m) => {
    const baselineMean = baselineMeans.get(m.code) ?? null;
    const change = baselineMean === null ? null : m.mean - baselineMean;
    return {
      code: m.code,
      name: m.name,
      isCheck: m.isCheck,
      n: m.n,
      mean: m.mean,
      baselineMean,
      change,
      changePercent: baselineMean ? ((m.mean - baselineMean) / baselineMean) * 100 : null,
      group: m.group,
      vsCheck: m.vsCheck ? { diff: m.vsCheck.diff, lower: m.vsCheck.lower, upper: m.vsCheck.upper, p: m.vsCheck.p, significant: m.vsCheck.significant } : null,
    };
  });
}

/**
 * One paragraph in plain words from the rows: which treatments raised or lowered the variable
 * relative to the check (with the interval), and which did not differ, under the declared method.
 */
export function briefSentence(section: Omit<BriefSection, "sentence">): string {
  const { variable, depthLabel, season, rows } = section;
  const check = rows.find((r) => r.isCheck);
  if (!check) return `${variable.label} in ${depthLabel}, ${season}: no untreated check, so no treatment is compared with one.`;
  const level = Math.round((1 - section.alpha) * 100);
  const clauses: string[] = [];
  const same: string[] = [];
  for (const r of rows) {
    if (r.isCheck || !r.vsCheck) continue;
    if (!r.vsCheck.significant) {
      same.push(r.name);
      continue;
    }
    const verb = r.vsCheck.diff > 0 ? "raised" : "lowered";
    clauses.push(
      `${r.name} ${verb} ${variable.label.toLowerCase()} in ${depthLabel} by ${amount(r.vsCheck.diff, variable.unit, variable.decimals)} ` +
        `compared with the untreated check (${level} % CI ${r.vsCheck.lower.toFixed(variable.decimals)} to ${r.vsCheck.upper.toFixed(variable.decimals)})`,
    );
  }
  const parts: string[] = [];
  if (clauses.length > 0) parts.push(`In ${season}, ${clauses.join("; ")}.`);
  if (same.length > 0) {
    parts.push(
      `${clauses.length > 0 ? "" : `In ${season}, `}${joinNames(same)} did not differ from the check${clauses.length > 0 ? "" : ` in ${variable.label.toLowerCase()} (${depthLabel})`}.`,
    );
  }
  parts.push(`Differences judged by ${METHOD_WORDS[section.method]} at α = ${section.alpha}.`);
  return parts.join(" ");
}
