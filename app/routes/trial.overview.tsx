import { useLoaderData } from "react-router";
import { notFound, requirePermission } from "~/.server/permissions";
import { getTrialOverview } from "~/.server/trials";
import { cacheResponse } from "~/.server/response-cache";
import { DESIGN_LABELS, Section } from "~/components/page";
import type { Route } from "./+types/trial.overview";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.trial.title ?? "Trial"} · Tilthmark` }];

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "results.view");
  const overview = await getTrialOverview(request, params.trialId);
  if (!overview) notFound(request, "No such trial.");
  const { trial, site, treatments } = overview;
  return {
    trial: {
      title: trial.title,
      objective: trial.objective,
      hypotheses: trial.hypotheses,
      status: trial.status,
      design: trial.design,
      plotLengthM: trial.plotLengthM,
      plotWidthM: trial.plotWidthM,
      blockCount: trial.blockCount,
    },
    site: site && {
      name: site.name,
      soilSeries: site.soilSeries,
      textureClass: site.textureClass,
      sandPct: site.sandPct,
      siltPct: site.siltPct,
      clayPct: site.clayPct,
      latitude: site.latitude,
      longitude: site.longitude,
    },
    treatments: treatments.map((t) => ({ code: t.code, name: t.name, description: t.description, isCheck: t.isCheck })),
  };
}

const fmt = (n: number | null | undefined, digits = 1) => (n == null ? "—" : n.toFixed(digits));

export default function TrialPage() {
  const { trial, site, treatments } = useLoaderData<typeof loader>();
  return (
    <>
      {trial.objective && <p className="mb-8 max-w-3xl text-loam-800">{trial.objective}</p>}
      <div className="grid gap-8 lg:grid-cols-3">
        <div className="lg:col-span-2">
          <Section title={`Treatments (${treatments.length})`}>
            <table className="w-full border-collapse rounded-lg bg-white text-left text-sm shadow-xs">
              <thead className="bg-loam-100 text-loam-800">
                <tr>
                  <th scope="col" className="px-4 py-2 font-medium">Code</th>
                  <th scope="col" className="px-4 py-2 font-medium">Treatment</th>
                  <th scope="col" className="px-4 py-2 font-medium">Description</th>
                </tr>
              </thead>
              <tbody>
                {treatments.map((t) => (
                  <tr key={t.code} className="border-t border-loam-200 align-top">
                    <td className="num px-4 py-2">{t.code}</td>
                    <td className="px-4 py-2">
                      {t.name}
                      {t.isCheck && <span className="ml-2 rounded bg-loam-100 px-1.5 py-0.5 text-xs">check</span>}
                    </td>
                    <td className="px-4 py-2 text-loam-700">{t.description ?? ""}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </Section>
          {trial.hypotheses && (
            <Section title="Hypotheses">
              <p className="whitespace-pre-line text-loam-800">{trial.hypotheses}</p>
            </Section>
          )}
        </div>
        <aside>
          <Section title="Design">
            <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
              <dt className="text-loam-600">Layout</dt>
              <dd>{DESIGN_LABELS[trial.design]}</dd>
              <dt className="text-loam-600">Blocks</dt>
              <dd className="num">{trial.blockCount ?? "—"}</dd>
              <dt className="text-loam-600">Plot size</dt>
              <dd className="num">
                {fmt(trial.plotLengthM)} m × {fmt(trial.plotWidthM)} m
              </dd>
            </dl>
          </Section>
          {site && (
            <Section title="Site">
              <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
                <dt className="text-loam-600">Name</dt>
                <dd>{site.name}</dd>
                <dt className="text-loam-600">Soil</dt>
                <dd>{[site.soilSeries, site.textureClass].filter(Boolean).join(", ") || "—"}</dd>
                <dt className="text-loam-600">Sand/silt/clay</dt>
                <dd className="num">
                  {fmt(site.sandPct, 0)} / {fmt(site.siltPct, 0)} / {fmt(site.clayPct, 0)} %
                </dd>
                <dt className="text-loam-600">Location</dt>
                <dd className="num">
                  {site.latitude != null && site.longitude != null ? `${site.latitude.toFixed(4)}, ${site.longitude.toFixed(4)}` : "—"}
                </dd>
              </dl>
            </Section>
          )}
        </aside>
      </div>
    </>
  );
}
