import { Link, useLoaderData } from "react-router";
import { notFound, requirePermission } from "~/.server/permissions";
import { getEvent, listEventSamples } from "~/.server/intake/events";
import { buttonClass } from "~/components/form";
import { Caution } from "~/components/more-fields";
import { Section } from "~/components/page";
import type { Route } from "./+types/trial.sampling.sheet";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Sample sheet ${data?.event.code ?? ""} · Tilthmark` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "samples.edit");
  const eventId = new URL(request.url).searchParams.get("event") ?? "";
  const event = await getEvent(params.trialId, eventId);
  if (!event) notFound(request, "No such sampling event in this trial.");
  const samples = await listEventSamples(event.id);
  return { trialId: params.trialId, event, samples };
}

export default function SampleSheetPage() {
  const { trialId, event, samples } = useLoaderData<typeof loader>();
  return (
    <>
      <p className="mb-4 text-sm">
        <Link to={`/trials/${trialId}/sampling`}>← All sampling events</Link>
      </p>
      <div className="mb-6 flex flex-wrap items-end justify-between gap-4">
        <div>
          <h2 className="text-2xl font-semibold">
            Sample sheet <span className="num">{event.code}</span>: {event.season}
          </h2>
          <p className="text-loam-700">
            Sampled <span className="num">{event.eventDate}</span> · <span className="num">{samples.length}</span> bags, one per plot and depth
            {event.isBaseline && " · pre-treatment baseline"}
          </p>
        </div>
        <div className="flex flex-wrap gap-2">
          <a className={buttonClass("secondary")} href={`/api/trials/${trialId}/sample-sheet.csv?event=${event.id}`} download>
            Download sample sheet (CSV)
          </a>
          <Link className={buttonClass()} to={`/trials/${trialId}/sampling/labels?event=${event.id}`}>
            Print bag labels
          </Link>
        </div>
      </div>
      <div className="mb-6">
        <Caution title="In the field">
          <p>Locate buried utilities before coring: call your local one-call service and wait for the marks.</p>
          <p>Full sample bags and core rings add up: lift with your legs and share loads. In heat, drink water, rest in shade, and watch each other for heat illness.</p>
        </Caution>
      </div>
      <Section title="Samples">
        <table className="w-full border-collapse rounded-lg bg-white text-left text-sm shadow-xs">
          <thead className="bg-loam-100 text-loam-800">
            <tr>
              <th scope="col" className="px-3 py-2 font-medium">Sample code</th>
              <th scope="col" className="px-3 py-2 text-right font-medium">Plot</th>
              <th scope="col" className="px-3 py-2 text-right font-medium">Block</th>
              <th scope="col" className="px-3 py-2 font-medium">Treatment</th>
              <th scope="col" className="px-3 py-2 text-right font-medium">Depth (cm)</th>
            </tr>
          </thead>
          <tbody>
            {samples.map((s) => (
              <tr key={s.id} className="border-t border-loam-200">
                <td className="num px-3 py-1.5">{s.code}</td>
                <td className="num px-3 py-1.5 text-right">{s.plotNumber}</td>
                <td className="num px-3 py-1.5 text-right">{s.block}</td>
                <td className="px-3 py-1.5">
                  <span className="num">{s.treatmentCode}</span> {s.treatmentName}
                </td>
                <td className="num px-3 py-1.5 text-right">
                  {s.topCm}–{s.bottomCm}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </Section>
    </>
  );
}
