import { data } from "react-router";
import { csvResponse } from "~/.server/csv";
import { requirePermission } from "~/.server/permissions";
import { RESULT_TABLES, resultTableRows, type ResultTable } from "~/.server/results/exports";
import { parseResultsQuery, ResultsError, trialResults } from "~/.server/results/service";
import type { Route } from "./+types/export.results-csv";

/** /trials/:trialId/export/{anova,means,comparisons}.csv with the results page's search params. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "results.view");
  const table = params.file.replace(/\.csv$/, "") as ResultTable;
  if (!params.file.endsWith(".csv") || !RESULT_TABLES.includes(table)) {
    throw data(`There is no export “${params.file}”. Tables: ${RESULT_TABLES.map((t) => `${t}.csv`).join(", ")}.`, { status: 404 });
  }
  const parsed = parseResultsQuery(new URL(request.url));
  if (!parsed.ok) throw data(parsed.message, { status: 400 });
  try {
    const view = await trialResults(params.trialId, parsed.query);
    const { variable, depth } = view.selection;
    const stem = [table, variable.id, `${depth.topCm}-${depth.bottomCm}cm`, view.results.season ?? view.results.model].join("-");
    return csvResponse(`${stem}.csv`, resultTableRows(view, table));
  } catch (error) {
    if (error instanceof ResultsError) throw data(error.message, { status: 400 });
    throw error;
  }
}
