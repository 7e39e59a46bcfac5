import { useLoaderData } from "react-router";
import { requirePermission } from "~/.server/permissions";
import { actionLabel, auditFilterChoices, describeDetails, listAuditEntries } from "~/.server/intake/audit-log";
import { FilterForm, FilterInput, FilterSelect, filterQuery } from "~/components/filter-form";
import { Empty, Pager } from "~/components/page";
import type { Route } from "./+types/trial.audit";

export const meta: Route.MetaFunction = () => [{ title: "Audit log · Tilthmark" }];

const PAGE_SIZE = 100;

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "results.view");
  const q = new URL(request.url).searchParams;
  const filter = { action: q.get("action") || undefined, actorId: q.get("actor") || undefined, from: q.get("from") || undefined, to: q.get("to") || undefined, text: q.get("text")?.trim() || undefined };
  const page = Math.max(1, Number(q.get("page")) || 1);
  const [{ rows, total }, choices] = await Promise.all([listAuditEntries(params.trialId, filter, { limit: PAGE_SIZE, offset: (page - 1) * PAGE_SIZE }), auditFilterChoices(params.trialId)]);
  return {
    trialId: params.trialId,
    filter: { action: filter.action ?? "", actor: filter.actorId ?? "", from: filter.from ?? "", to: filter.to ?? "", text: filter.text ?? "" },
    query: q.toString(),
    choices,
    total,
    page,
    pages: Math.max(1, Math.ceil(total / PAGE_SIZE)),
    rows: rows.map((r) => ({ id: r.id, at: r.at.toISOString(), actor: r.actor ?? "a former member", action: actionLabel(r.action), entity: r.entity.replace(/_/g, " "), ...describeDetails(r.details) })),
  };
}

export default function AuditPage() {
  const d = useLoaderData<typeof loader>();
  const pageHref = (p: number) => `?${filterQuery(d.query, [], p)}`;
  return (
    <>
      <FilterForm submitLabel="Filter" exportHref={`/api/trials/${d.trialId}/audit.csv?${filterQuery(d.query, ["page"])}`}>
        <FilterSelect label="What" name="action" value={d.filter.action} anyLabel="Everything" options={d.choices.actions} />
        <FilterSelect label="Who" name="actor" value={d.filter.actor} anyLabel="Anyone" options={d.choices.actors.map((a) => ({ value: a.id, label: a.name }))} />
        <FilterInput label="From" name="from" type="date" value={d.filter.from} />
        <FilterInput label="To" name="to" type="date" value={d.filter.to} />
        <FilterInput label="Containing" name="text" value={d.filter.text} placeholder="sample code, file, reason" />
      </FilterForm>
      <p className="mb-3 text-sm text-loam-700">
        <span className="num">{d.total}</span> entries, newest first. Times in UTC.
      </p>
      {d.rows.length === 0 ? (
        <Empty>Nothing matches this filter.</Empty>
      ) : (
        <div className="overflow-x-auto rounded-lg border border-loam-200 bg-white">
          <table className="w-full border-collapse text-left text-sm">
            <thead className="bg-loam-100 text-loam-800">
              <tr>
                <th scope="col" className="px-2 py-2 font-medium">When</th>
                <th scope="col" className="px-2 py-2 font-medium">Who</th>
                <th scope="col" className="px-2 py-2 font-medium">What</th>
                <th scope="col" className="px-2 py-2 font-medium">Details</th>
                <th scope="col" className="px-2 py-2 font-medium">Before</th>
                <th scope="col" className="px-2 py-2 font-medium">After</th>
                <th scope="col" className="px-2 py-2 font-medium">Reason</th>
              </tr>
            </thead>
            <tbody>
              {d.rows.map((r) => (
                <tr key={r.id} className="border-t border-loam-200 align-top">
                  <td className="num px-2 py-1.5 whitespace-nowrap">{r.at.slice(0, 16).replace("T", " ")}</td>
                  <td className="px-2 py-1.5">{r.actor}</td>
                  <td className="px-2 py-1.5">
                    {r.action} <span className="text-loam-600">({r.entity})</span>
                  </td>
                  <td className="px-2 py-1.5">{r.summary}</td>
                  <td className="num px-2 py-1.5 text-xs">{r.before}</td>
                  <td className="num px-2 py-1.5 text-xs">{r.after}</td>
                  <td className="px-2 py-1.5">{r.reason}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <Pager page={d.page} pages={d.pages} href={pageHref} labels={["← Newer", "Older →"]} />
    </>
  );
}
