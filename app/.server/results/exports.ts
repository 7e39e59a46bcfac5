// The results tables as CSV rows: one header row, then numbers as numbers (app/.server/csv.ts guards text).
import type { CsvCell } from "../csv";
import type { ResultsView } from "./service";

export const RESULT_TABLES = ["anova", "means", "comparisons"] as const;
export type ResultTable = (typeof RESULT_TABLES)[number];

/** The selection, repeated on every row so a table read on its own still says what it is. */
function context(view: ResultsView): { header: string[]; cells: CsvCell[] } {
  const { selection, results } = view;
  const unit = results.model === "rate_of_change" ? `${selection.variable.unit}/yr` : selection.variable.unit;
  return {
    header: ["variable", "unit", "depth", "model", "season"],
    cells: [selection.variable.id, unit, selection.depth.label, results.model, results.season],
  };
}

export function resultTableRows(view: ResultsView, table: ResultTable): CsvCell[][] {
  const { header, cells } = context(view);
  const { results } = view;
  switch (table) {
    case "anova":
      return [
        [...header, "source", "df", "ss", "ms", "f", "p", "error_term"],
        ...results.anova.map((r) => [...cells, r.source, r.df, r.ss, r.ms, r.f, r.p, r.errorTerm]),
      ];
    case "means": {
      const rows: CsvCell[][] = [
        [...header, "method", "alpha", "means_in_season", "treatment", "treatment_name", "is_check", "n", "mean", "se", "group", "diff_from_check", "ci_lower", "ci_upper", "p_vs_check"],
      ];
      const lead = [...cells, results.method, results.alpha];
      for (const m of results.means) {
        rows.push([...lead, results.season ?? "all", m.code, m.name, m.isCheck, m.n, m.mean, m.se, m.group, m.vsCheck?.diff, m.vsCheck?.lower, m.vsCheck?.upper, m.vsCheck?.p]);
      }
      // Across seasons: the treatment means within each season, with letters within season.
      const names = new Map(results.means.map((m) => [m.code, m]));
      for (const s of results.seasonMeans) {
        for (const m of s.means) {
          rows.push([...lead, s.season, m.code, names.get(m.code)?.name ?? m.code, names.get(m.code)?.isCheck ?? false, m.n, m.mean, m.se, m.group, null, null, null, null]);
        }
      }
      return rows;
    }
    case "comparisons":
      return [
        [...header, "method", "alpha", "treatment_a", "name_a", "treatment_b", "name_b", "diff", "se", "df", "ci_lower", "ci_upper", "p_adjusted", "significant"],
        ...results.comparisons.map((c) => [
          ...cells,
          results.method,
          results.alpha,
          c.a,
          c.aName,
          c.b,
          c.bName,
          c.diff,
          c.se,
          c.df,
          c.lower,
          c.upper,
          c.p,
          c.significant,
        ]),
      ];
  }
}
