import { readableBrief, readerUnits } from "~/.server/brief-access";
import type { BriefContent } from "~/.server/briefs";
import { csvResponse } from "~/.server/csv";
import { inReaderUnits, unitLabel } from "~/brief-units";
import type { Route } from "./+types/brief-csv";

/** The frozen summary table of a brief version as CSV, in the reader's units. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { brief, version } = await readableBrief(request, params.briefId, params.version);
  const units = await readerUnits(request);
  const content = version.content as BriefContent;
  const header = ["variable", "depth", "season", "unit", "treatment_code", "treatment", "is_check", "n", "mean", "baseline_mean", "change", "change_percent", "group", "diff_vs_check", "ci_lower", "ci_upper", "p", "method", "alpha"];
  const rows = content.sections.flatMap((s) =>
    s.rows.map((r) => [
      s.variable.id,
      s.depthLabel,
      s.season,
      unitLabel(s, units),
      r.code,
      r.name,
      r.isCheck ? "yes" : "no",
      r.n,
      inReaderUnits(s, r.mean, units),
      inReaderUnits(s, r.baselineMean, units),
      inReaderUnits(s, r.change, units),
      r.changePercent,
      r.group,
      inReaderUnits(s, r.vsCheck?.diff ?? null, units),
      inReaderUnits(s, r.vsCheck?.lower ?? null, units),
      inReaderUnits(s, r.vsCheck?.upper ?? null, units),
      r.vsCheck?.p ?? null,
      s.method,
      s.alpha,
    ]),
  );
  return csvResponse(`field-brief-${brief.id.slice(0, 8)}-v${version.version}.csv`, [header, ...rows]);
}
