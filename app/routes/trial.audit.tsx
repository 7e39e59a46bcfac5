import { Form, useLoaderData } from "react-router";
import { requirePermission } from "~/.server/permissions";
import { actionLabel, auditFilterChoices, describeDetails, listAuditEntries } from "~/.server/intake/audit-log";
import { buttonClass } from "~/components/form";
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
  const exportQuery = new URLSearchParams(d.query);
  exportQuery.delete("page");
  const pageHref = (p: number) => {
    const q = new URLSearchParams(d.query);
    q.set("page", String(p));
    return `?${q}`;
  };
  return (
    <>
      <div className="mb-4 flex flex-wrap items-end justify-between gap-4">
        <Form method="get" className="flex flex-wrap items-end gap-3 text-sm">
          <label className="flex flex-col gap-1">
            <span className="font-medium">What</span>
            <select name="action" defaultValue={d.filter.action} className="rounded-md border border-loam-400 bg-white px-2 py-1.5">
              <option value="">Everything</option>
              {d.choices.actions.map((a) => (
                <option key={a.value} value={a.value}>
                  {a.label}
                </option>
              ))}
            </select>
          </label>
          <label className="flex flex-col gap-1">
            <span className="font-medium">Who</span>
            <select name="actor" defaultValue={d.filter.actor} className="rounded-md border border-loam-400 bg-white px-2 py-1.5">
              <option value="">Anyone</option>
              {d.choices.actors.map((a) => (
                <option key={a.id} value={a.id}>
                  {a.name}
                </option>
              ))}
            </select>
          </label>
          <label className="flex flex-col gap-1">
            <span className="font-medium">From</span>
            <input type="date" name="from" defaultValue={d.filter.from} className="rounded-md border border-loam-400 bg-white px-2 py-1" />
          </label>
          <label className="flex flex-col gap-1">
            <span className="font-medium">To</span>
            <input type="date" name="to" defaultValue={d.filter.to} className="rounded-md border border-loam-400 bg-white px-2 py-1" />
          </label>
          <label className="flex flex-col gap-1">
            <span className="font-medium">Containing</span>
            <input name="text" defaultValue={d.filter.text} placeholder="sample code, file, reason" className="rounded-md border border-loam-400 bg-white px-2 py-1.5" />
          </label>
          <button type="submit" className={buttonClass("secondary")}>
            Filter
          </button>
        </Form>
        <a className={buttonClass("secondary")} href={`/api/trials/${d.trialId}/audit.csv?${exportQuery}`} download>
          Export CSV
        </a>
      </div>
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
