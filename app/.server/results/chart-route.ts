// The body every chart resource route shares: guard, parse the page's selection, build, answer JSON.
import { requirePermission } from "../permissions";
import { parseResultsQuery, ResultsError, type ResultsQuery } from "./service";

/** 200 with the chart's JSON, 400 `{ error }` with a message when the selection cannot be drawn. */
export async function chartResponse(
  request: Request,
  trialId: string,
  build: (query: ResultsQuery, url: URL) => Promise<unknown>,
): Promise<Response> {
  await requirePermission(request, { trialId }, "results.view");
  const url = new URL(request.url);
  const parsed = parseResultsQuery(url);
  if (!parsed.ok) return Response.json({ error: parsed.message }, { status: 400 });
  try {
    return Response.json(await build(parsed.query, url));
  } catch (error) {
    if (error instanceof ResultsError) return Response.json({ error: error.message }, { status: 400 });
    throw error;
  }
}
