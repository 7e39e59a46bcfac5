import QRCode from "qrcode";
import { Link, useLoaderData } from "react-router";
import { notFound, requirePermission } from "~/.server/permissions";
import { getEvent, listEventSamples } from "~/.server/intake/events";
import type { Route } from "./+types/trial.sampling.labels";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Bag labels ${data?.event.code ?? ""} · Tilthmark` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "samples.edit");
  const eventId = new URL(request.url).searchParams.get("event") ?? "";
  const event = await getEvent(params.trialId, eventId);
  if (!event) notFound(request, "No such sampling event in this trial.");
  const samples = await listEventSamples(event.id);
  // QR codes carry only the sample code, so any phone or lab scanner reads it as text.
  const labels = await Promise.all(
    samples.map(async (s) => ({
      ...s,
      qrSvg: await QRCode.toString(s.code, { type: "svg", errorCorrectionLevel: "M", margin: 0 }),
    })),
  );
  return { trialId: params.trialId, event, labels };
}

export default function LabelsPage() {
  const { trialId, event, labels } = useLoaderData<typeof loader>();
  return (
    <>
      <div className="no-print mb-6 flex flex-wrap items-center justify-between gap-4">
        <div>
          <p className="text-sm">
            <Link to={`/trials/${trialId}/sampling/sheet?event=${event.id}`}>← Sample sheet {event.code}</Link>
          </p>
          <h2 className="text-2xl font-semibold">Bag labels: {event.season}</h2>
          <p className="text-loam-700">
            <span className="num">{labels.length}</span> labels, three across on A4 or Letter. Print on weatherproof label stock; use a pencil or
            solvent-proof marker for anything written in the field.
          </p>
        </div>
        <button type="button" onClick={() => window.print()} className="rounded-md bg-moss-700 px-4 py-2 text-sm font-medium text-white hover:bg-moss-800">
          Print labels
        </button>
      </div>
      <p className="mb-4 rounded border border-clay-700/40 bg-clay-100/60 px-3 py-2 text-sm print:text-xs">
        <strong>Before coring:</strong> locate buried utilities. <strong>Carrying:</strong> lift bags with your legs, share loads. <strong>Heat:</strong> water, shade, rest.
      </p>
      <ol className="grid grid-cols-3 gap-2 print:gap-1">
        {labels.map((l) => (
          <li key={l.id} className="flex break-inside-avoid items-center gap-3 rounded border border-loam-400 bg-white p-2">
            <span className="size-20 shrink-0" role="img" aria-label={`QR code for ${l.code}`} dangerouslySetInnerHTML={{ __html: l.qrSvg }} />
            <span className="min-w-0 text-xs leading-snug">
              <span className="num block text-sm font-semibold">{l.code}</span>
              <span className="block">
                Plot <span className="num">{l.plotNumber}</span> · Block <span className="num">{l.block}</span> · <span className="num">{l.treatmentCode}</span>
              </span>
              <span className="block">
                <span className="num">
                  {l.topCm}–{l.bottomCm}
                </span>{" "}
                cm · <span className="num">{event.eventDate}</span>
              </span>
            </span>
          </li>
        ))}
      </ol>
    </>
  );
}
