import { Link, useLoaderData } from "react-router";
import { requirePermission } from "~/.server/permissions";
import { DATA_COLUMNS, dataRows } from "~/.server/intake/data-table";
import { listEvents } from "~/.server/intake/events";
import { getTrialOverview } from "~/.server/trials";
import { FilterCheckbox, FilterForm, FilterSelect, filterQuery } from "~/components/filter-form";
import { FormMessage } from "~/components/form";
import { Empty, Pager } from "~/components/page";
import { formatNumber } from "~/format";
import { roleCan } from "~/permissions";
import type { Route } from "./+types/trial.data";

export const meta: Route.MetaFunction = () => [{ title: "Data · Tilthmark" }];

const PAGE_SIZE = 100;
/** The commit notice's parameters: shown once, never carried into page links or the export. */
const ONE_OFF = ["committed", "notice"];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "results.view");
  const q = new URL(request.url).searchParams;
  const filter = {
    eventId: q.get("event") || undefined,
    treatment: q.get("treatment") || undefined,
    depth: q.get("depth") || undefined,
    excludedOnly: q.get("excluded") === "1",
  };
  const [events, overview, all] = await Promise.all([listEvents(params.trialId), getTrialOverview(request, params.trialId), dataRows(params.trialId, filter)]);
  const pages = Math.max(1, Math.ceil(all.length / PAGE_SIZE));
  const page = Math.min(pages, Math.max(1, Number(q.get("page")) || 1));
  const depths = [...new Set(events.flatMap((e) => e.depths.map((d) => `${d.topCm}-${d.bottomCm}`)))];
  return {
    trialId: params.trialId,
    socFactor: overview?.trial.socFactor ?? 1.724,
    filter: { event: filter.eventId ?? "", treatment: filter.treatment ?? "", depth: filter.depth ?? "", excluded: filter.excludedOnly },
    query: q.toString(),
    committed: q.get("committed") ? { notice: q.get("notice") } : null,
    canUpload: roleCan(member.role, "measurements.upload"),
    events: events.map((e) => ({ id: e.id, label: `${e.code} · ${e.season}` })),
    treatments: overview?.treatments.map((t) => ({ code: t.code, name: t.name })) ?? [],
    depths,
    total: all.length,
    page,
    pages,
    rows: all.slice((page - 1) * PAGE_SIZE, page * PAGE_SIZE).map((r) => ({
      sampleCode: r.sampleCode,
      eventCode: r.eventCode,
      season: r.season,
      plotNumber: r.plotNumber,
      block: r.block,
      treatmentCode: r.treatmentCode,
      depth: `${r.topCm}–${r.bottomCm}`,
      excluded: r.excluded,
      values: DATA_COLUMNS.map(([key]) => r[key] as number | null),
      asMeasured: Object.assign({}, ...r.measurements.filter((m) => m.status === "excluded").map((m) => m.asMeasured ?? {})) as Record<string, number | null>,
    })),
    columns: DATA_COLUMNS.map(([key, label, digits]) => ({ key: String(key), label, digits })),
  };
}

export default function DataPage() {
  const d = useLoaderData<typeof loader>();
  const pageHref = (page: number) => `?${filterQuery(d.query, ONE_OFF, page)}`;
  return (
    <>
      {d.committed && (
        <div className="mb-6" aria-live="polite">
          <FormMessage tone="success">
            Committed. The values below are derived from the file's raw numbers.{" "}
            {d.committed.notice === "mail-failed"
              ? "The e-mail to the trial's researchers could not be sent; tell them yourself."
              : "The trial's researchers were told by e-mail."}
          </FormMessage>
        </div>
      )}
      <FilterForm submitLabel="Show" exportHref={`/api/trials/${d.trialId}/data.csv?${filterQuery(d.query, [...ONE_OFF, "page"])}`}>
        <FilterSelect label="Event" name="event" value={d.filter.event} anyLabel="All events" options={d.events.map((e) => ({ value: e.id, label: e.label }))} />
        <FilterSelect
          label="Treatment"
          name="treatment"
          value={d.filter.treatment}
          anyLabel="All treatments"
          options={d.treatments.map((t) => ({ value: t.code, label: `${t.code} ${t.name}` }))}
        />
        <FilterSelect label="Depth (cm)" name="depth" value={d.filter.depth} anyLabel="All depths" options={d.depths.map((x) => ({ value: x, label: x.replace("-", "–") }))} />
        <FilterCheckbox label="Excluded in QC only" name="excluded" checked={d.filter.excluded} />
      </FilterForm>
      <p className="mb-3 text-sm text-loam-700">
        Derived on the server from the raw inputs: SOM from LOI, SOC = SOM / <span className="num">{d.socFactor}</span>, stocks = SOC × fine-earth BD × thickness. Excluded values are
        struck through and left out of analyses. <span className="num">{d.total}</span> samples.
      </p>
      {d.rows.length === 0 ? (
        <Empty>No results yet for this choice.{d.canUpload && " Upload lab files under Lab intake."}</Empty>
      ) : (
        <div className="overflow-x-auto rounded-lg border border-loam-200 bg-white">
          <table className="w-full border-collapse text-left text-sm">
            <caption className="sr-only">Derived soil values per sample</caption>
            <thead className="bg-loam-100 text-loam-800">
              <tr>
                <th scope="col" className="px-2 py-2 font-medium">Sample</th>
                <th scope="col" className="px-2 py-2 font-medium">Season</th>
                <th scope="col" className="px-2 py-2 text-right font-medium">Plot</th>
                <th scope="col" className="px-2 py-2 text-right font-medium">Block</th>
                <th scope="col" className="px-2 py-2 font-medium">Trt</th>
                <th scope="col" className="px-2 py-2 text-right font-medium">Depth cm</th>
                {d.columns.map((c) => (
                  <th key={c.key} scope="col" className="px-2 py-2 text-right font-medium" data-column={c.key}>
                    {c.label}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {d.rows.map((r) => (
                <tr key={r.sampleCode} className={`border-t border-loam-200 ${r.excluded ? "bg-loam-100/60" : ""}`}>
                  <td className="num px-2 py-1.5 whitespace-nowrap">
                    <Link to={`/trials/${d.trialId}/data/sample?code=${encodeURIComponent(r.sampleCode)}`}>{r.sampleCode}</Link>
                    {r.excluded && <span className="ml-1 rounded bg-clay-100 px-1 text-xs text-clay-800">excluded</span>}
                  </td>
                  <td className="px-2 py-1.5 whitespace-nowrap">{r.season}</td>
                  <td className="num px-2 py-1.5 text-right">{r.plotNumber}</td>
                  <td className="num px-2 py-1.5 text-right">{r.block}</td>
                  <td className="num px-2 py-1.5">{r.treatmentCode}</td>
                  <td className="num px-2 py-1.5 text-right">{r.depth}</td>
                  {d.columns.map((c, i) => {
                    const shown = r.values[i];
                    const struck = shown === null ? r.asMeasured[c.key] : undefined;
                    return (
                      <td key={c.key} className="num px-2 py-1.5 text-right" data-column={c.key}>
                        {struck !== undefined && struck !== null ? (
                          <s className="text-loam-600" title="Excluded in QC">
                            {formatNumber(struck, c.digits)}
                          </s>
                        ) : (
                          formatNumber(shown, c.digits)
                        )}
                      </td>
                    );
                  })}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <Pager page={d.page} pages={d.pages} href={pageHref} />
    </>
  );
}
