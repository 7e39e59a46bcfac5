import { Form, Link, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { invalid, parseForm, readForm } from "~/.server/forms";
import { requirePermission } from "~/.server/permissions";
import { kindsOf } from "~/.server/intake/context";
import { IntakeError } from "~/.server/intake/errors";
import { createSamplingEvent, listEvents, listSeasons, parseDepths, plotCount } from "~/.server/intake/events";
import { Field, FormMessage, SubmitButton } from "~/components/form";
import { formState } from "~/components/form-state";
import { Caution, CheckboxField } from "~/components/more-fields";
import { Empty, Section } from "~/components/page";
import { BURIED_UTILITIES_CAUTION } from "~/design/cautions";
import type { Route } from "./+types/trial.sampling";

export const meta: Route.MetaFunction = () => [{ title: "Sampling · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "samples.edit");
  const [events, seasons, { kinds }, plots] = await Promise.all([
    listEvents(params.trialId),
    listSeasons(params.trialId),
    kindsOf(member.programId),
    plotCount(params.trialId),
  ]);
  return {
    trialId: params.trialId,
    plots,
    events: events.map((e) => ({ ...e, depths: e.depths.map((d) => `${d.topCm}–${d.bottomCm}`).join(", ") })),
    seasons: seasons.map((s) => s.label),
    kinds: kinds.map((k) => ({ id: k.id, label: k.label })),
  };
}

const NewEvent = z.object({
  seasonLabel: z.string().trim().min(1, "Name the season, for example 2026 fall.").max(60, "Use at most 60 characters."),
  eventDate: z.iso.date({ error: "Enter the sampling date (yyyy-mm-dd)." }),
  depths: z.string().trim().min(1, "Enter the depth increments, for example 0-10, 10-20, 20-30."),
  isBaseline: z.literal("on").optional(),
});

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "samples.edit");
  const form = await readForm(request);
  const parsed = parseForm(form, NewEvent);
  if (!parsed.ok) return parsed.response;
  const values = Object.fromEntries([...form].filter(([, v]) => typeof v === "string")) as Record<string, string>;
  const depths = parseDepths(parsed.data.depths);
  if (typeof depths === "string") return invalid({ depths: [depths] }, values);
  const { kinds } = await kindsOf(member.programId);
  const variables = form.getAll("variables").map(String).filter((v) => kinds.some((k) => k.id === v));
  if (variables.length === 0) return invalid({ variables: ["Tick at least one thing to measure."] }, values);
  try {
    const created = await createSamplingEvent(params.trialId, member.user.id, {
      seasonLabel: parsed.data.seasonLabel,
      eventDate: parsed.data.eventDate,
      depths,
      variables,
      isBaseline: parsed.data.isBaseline === "on",
    });
    return { ok: `Event ${created.eventCode} created with ${created.sampleCount} sample codes.`, eventId: created.eventId };
  } catch (error) {
    if (error instanceof IntakeError) return invalid(error.field ? { [error.field]: [error.message] } : {}, values, error.field ? undefined : error.message);
    throw error;
  }
}

export default function SamplingPage() {
  const { trialId, plots, events, seasons, kinds } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const { errors, values, message } = formState(result);
  const ok = result && "ok" in result ? result : undefined;
  return (
    <div className="grid grid-cols-1 gap-10 lg:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
      <div className="min-w-0">
        <Section title={`Sampling events (${events.length})`}>
          {events.length === 0 ? (
            <Empty>No sampling events yet. Create the first one (usually the pre-treatment baseline) with the form.</Empty>
          ) : (
            // Positioned, so the sr-only heading inside scrolls with the table instead of widening the page.
            <div className="relative overflow-x-auto rounded-lg bg-white shadow-xs">
              <table className="w-full border-collapse text-left text-sm">
                <thead className="bg-loam-100 text-loam-800">
                  <tr>
                    <th scope="col" className="px-3 py-2 font-medium">Event</th>
                    <th scope="col" className="px-3 py-2 font-medium">Season</th>
                    <th scope="col" className="px-3 py-2 font-medium">Date</th>
                    <th scope="col" className="px-3 py-2 font-medium">Depths (cm)</th>
                    <th scope="col" className="px-3 py-2 text-right font-medium">Samples</th>
                    <th scope="col" className="px-3 py-2 text-right font-medium">Results in</th>
                    <th scope="col" className="px-3 py-2 font-medium"><span className="sr-only">Sheets</span></th>
                  </tr>
                </thead>
                <tbody>
                  {events.map((e) => (
                    <tr key={e.id} className="border-t border-loam-200 align-top">
                      <td className="num px-3 py-2">{e.code}</td>
                      <td className="px-3 py-2">
                        {e.season}
                        {e.isBaseline && <span className="ml-2 rounded bg-clay-100 px-1.5 py-0.5 text-xs text-clay-800">baseline</span>}
                      </td>
                      <td className="num px-3 py-2 whitespace-nowrap">{e.eventDate}</td>
                      <td className="num px-3 py-2">{e.depths}</td>
                      <td className="num px-3 py-2 text-right">{e.sampleCount}</td>
                      <td className="num px-3 py-2 text-right">
                        {e.variables.map((v) => `${v.toUpperCase()} ${e.measured[v] ?? 0}`).join(" · ")}
                      </td>
                      <td className="px-3 py-2">
                        <Link to={`/trials/${trialId}/sampling/sheet?event=${e.id}`}>Sample sheet</Link>
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </Section>
        <Caution title="Before coring">
          <p>{BURIED_UTILITIES_CAUTION}</p>
          <p>Soil cores and full sample bags are heavy: lift with your legs, share the load. In heat, carry water, take shade breaks and watch each other for heat illness.</p>
        </Caution>
      </div>
      <aside className="min-w-0">
        <Section title="New sampling event">
          {plots === 0 ? (
            <Empty>This trial has no plots yet. Once its plot map is laid out, each event gets a sample code per plot and depth.</Empty>
          ) : (
            <Form method="post" className="flex flex-col gap-4" noValidate>
              <div aria-live="polite" className="empty:hidden">
                {ok && (
                  <FormMessage tone="success">
                    {ok.ok} <Link to={`/trials/${trialId}/sampling/sheet?event=${ok.eventId}`}>Open its sample sheet</Link>.
                  </FormMessage>
                )}
                {message && <FormMessage>{message}</FormMessage>}
              </div>
              <Field label="Season" name="seasonLabel" defaultValue={values?.seasonLabel} errors={errors} hint={seasons.length ? `Existing: ${seasons.join(", ")}` : "For example 2026 fall"} required maxLength={60} />
              <Field label="Sampling date" name="eventDate" type="date" defaultValue={values?.eventDate} errors={errors} required />
              <Field label="Depth increments (cm)" name="depths" defaultValue={values?.depths ?? "0-10, 10-20, 20-30"} errors={errors} hint="Top-bottom, from the surface down, no gaps." required />
              <fieldset className="flex flex-col gap-1">
                <legend className="text-sm font-medium text-loam-900">To measure</legend>
                {kinds.map((k) => (
                  <label key={k.id} className="inline-flex items-center gap-2 text-sm">
                    <input type="checkbox" name="variables" value={k.id} defaultChecked={k.id === "loi" || k.id === "bd"} className="size-4 accent-moss-700" />
                    {k.label}
                  </label>
                ))}
                {errors?.variables && <p className="text-sm font-medium text-brick-700">{errors.variables[0]}</p>}
              </fieldset>
              <CheckboxField
                label="Pre-treatment baseline"
                name="isBaseline"
                defaultChecked={values?.isBaseline === "on"}
                errors={errors}
                hint="Sampled before any amendment goes on; dated before every other event."
              />
              <SubmitButton pendingLabel="Creating…">Create event and sample codes</SubmitButton>
            </Form>
          )}
        </Section>
      </aside>
    </div>
  );
}
