import { Form, Link, data, useActionData, useLoaderData } from "react-router";
import { notFound, requirePermission } from "~/.server/permissions";
import { kindOf, kindsOf } from "~/.server/intake/context";
import { currentInputsOfEvent, saveEntries, type EntryRow } from "~/.server/intake/entry";
import { IntakeError } from "~/.server/intake/errors";
import { getEvent, listEventSamples } from "~/.server/intake/events";
import { FormMessage, SubmitButton } from "~/components/form";
import { MessageBlock, RowMessages } from "~/components/intake-messages";
import { Caution, CheckboxField } from "~/components/more-fields";
import type { Route } from "./+types/trial.intake.entry";
import { readForm } from "~/.server/forms";

export const meta: Route.MetaFunction = () => [{ title: "Enter results by hand · Tilthmark" }];

async function resolve(request: Request, trialId: string, programId: string) {
  const q = new URL(request.url).searchParams;
  const event = await getEvent(trialId, q.get("event") ?? "");
  if (!event) notFound(request, "No such sampling event in this trial.");
  const kindId = q.get("kind") || event.variables[0] || "loi";
  try {
    return { event, ...(await kindOf(programId, kindId)) };
  } catch (error) {
    if (error instanceof IntakeError) notFound(request, error.message);
    throw error;
  }
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "measurements.upload");
  const { event, kind } = await resolve(request, params.trialId, member.programId);
  const [samples, current, { kinds }] = await Promise.all([listEventSamples(event.id), currentInputsOfEvent(event.id, kind.id), kindsOf(member.programId)]);
  return {
    trialId: params.trialId,
    event: { id: event.id, code: event.code, season: event.season, eventDate: event.eventDate },
    kind: { id: kind.id, label: kind.label },
    kinds: kinds.filter((k) => event.variables.includes(k.id)).map((k) => ({ id: k.id, label: k.label })),
    fields: kind.fields.filter((f) => f.key !== "sampleCode").map((f) => ({ key: f.key, label: f.label, type: f.type })),
    rows: samples.map((s) => {
      const stored = current.get(s.code);
      return {
        code: s.code,
        plotNumber: s.plotNumber,
        treatmentCode: s.treatmentCode,
        depth: `${s.topCm}–${s.bottomCm}`,
        stored: stored ? Object.fromEntries(Object.entries(stored.inputs).map(([k, v]) => [k, v === null ? "" : String(v)])) : null,
        excluded: stored?.status === "excluded",
      };
    }),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "measurements.upload");
  const { event, kind } = await resolve(request, params.trialId, member.programId);
  const form = await readForm(request);
  const values = Object.fromEntries([...form].filter(([, v]) => typeof v === "string")) as Record<string, string>;
  const current = await currentInputsOfEvent(event.id, kind.id);
  const fieldKeys = kind.fields.filter((f) => f.key !== "sampleCode").map((f) => f.key);
  const samples = await listEventSamples(event.id);
  // Only rows that differ from what is stored (or are new and not blank) are checked and saved.
  const rows: EntryRow[] = [];
  for (const s of samples) {
    const cells = Object.fromEntries(fieldKeys.map((k) => [k, (values[`c:${s.code}:${k}`] ?? "").trim()]));
    const stored = current.get(s.code);
    const same = stored ? fieldKeys.every((k) => cells[k] === (stored.inputs[k] === null || stored.inputs[k] === undefined ? "" : String(stored.inputs[k]))) : fieldKeys.every((k) => cells[k] === "");
    if (!same) rows.push({ sampleCode: s.code, cells, reason: values[`r:${s.code}`] });
  }
  if (rows.length === 0) return data({ message: "Nothing changed: type results into the grid, then save.", values, rows: {} as Record<string, unknown[]>, reasons: {} as Record<string, string> }, { status: 400 });
  try {
    const outcome = await saveEntries(params.trialId, member.programId, member.user.id, kind.id, rows, { confirmWarnings: values.confirmWarnings === "on" });
    if (outcome.ok) return { ok: `Saved: ${outcome.entered} new result${outcome.entered === 1 ? "" : "s"}, ${outcome.corrected} correction${outcome.corrected === 1 ? "" : "s"}.` };
    const byCode = Object.fromEntries(outcome.review.rows.filter((r) => r.messages.length > 0).map((r) => [r.sampleCode, r.messages]));
    return data({ message: outcome.message, values, rows: byCode as Record<string, unknown[]>, reasons: outcome.reasonErrors }, { status: 400 });
  } catch (error) {
    if (error instanceof IntakeError) return data({ message: error.message, values, rows: {} as Record<string, unknown[]>, reasons: {} as Record<string, string> }, { status: error.status });
    throw error;
  }
}

/** The sample column stays in view while the grid scrolls sideways; each cell sets an opaque background so inputs never show through. */
const STICKY_SAMPLE = "sticky left-0 z-10 shadow-[inset_-1px_0_0_var(--color-loam-200)]";

export default function EntryPage() {
  const d = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const failed = result && "message" in result ? result : undefined;
  const ok = result && "ok" in result ? result.ok : undefined;
  return (
    <>
      <p className="mb-4 text-sm">
        <Link to={`/trials/${d.trialId}/intake`}>← Lab intake</Link>
      </p>
      <h2 className="text-2xl font-semibold">
        Enter results by hand: <span className="num">{d.event.code}</span> {d.event.season}
      </h2>
      <p className="mb-4 max-w-3xl text-loam-700">
        Type the lab's raw numbers; Tilthmark derives the rest. Changing a stored value is a correction and needs a reason in the last column. The same checks as an uploaded file
        apply, and nothing is saved until every changed row passes.
      </p>
      <nav aria-label="Kind of result" className="mb-4 flex gap-2 text-sm">
        {d.kinds.map((k) => (
          <Link key={k.id} to={`?event=${d.event.id}&kind=${k.id}`} aria-current={k.id === d.kind.id ? "page" : undefined} className={`rounded px-2 py-1 ${k.id === d.kind.id ? "bg-moss-100 font-semibold text-moss-900 no-underline" : ""}`}>
            {k.label}
          </Link>
        ))}
      </nav>
      {d.kind.id === "loi" && (
        <div className="mb-4">
          <Caution title="At the furnace">
            <p>Muffle furnaces run at 550 °C: tongs and heat-resistant gloves, and let crucibles cool in a desiccator before weighing.</p>
          </Caution>
        </div>
      )}
      <div aria-live="polite" className="mb-4 empty:hidden">
        {ok && <FormMessage tone="success">{ok}</FormMessage>}
        {failed && <FormMessage>{failed.message}</FormMessage>}
      </div>
      <Form method="post" noValidate key={ok ?? "grid"}>
        <div className="@container overflow-x-auto rounded-lg border border-loam-200 bg-white">
          <table className="w-full border-collapse text-left text-sm">
            <caption className="sr-only">
              {d.kind.label} for each sample of event {d.event.code}
            </caption>
            <thead className="bg-loam-100 text-loam-800">
              <tr>
                <th scope="col" className={`${STICKY_SAMPLE} bg-loam-100 px-2 py-2 font-medium`}>
                  Sample
                </th>
                {d.fields.map((f) => (
                  <th key={f.key} scope="col" className="px-2 py-2 font-medium">
                    {f.label}
                  </th>
                ))}
                <th scope="col" className="px-2 py-2 font-medium">Reason (corrections)</th>
              </tr>
            </thead>
            <tbody>
              {d.rows.flatMap((r) => {
                const messages = (failed?.rows as Record<string, { severity: "error" | "warning"; column: string | null; message: string }[]> | undefined)?.[r.code];
                const reasonError = (failed?.reasons as Record<string, string> | undefined)?.[r.code];
                const hasError = messages?.some((m) => m.severity === "error");
                return [
                  <tr key={r.code} className={`border-t border-loam-200 ${hasError ? "bg-brick-50/60" : ""}`}>
                    <th scope="row" className={`${STICKY_SAMPLE} num px-2 py-1 text-left font-normal whitespace-nowrap ${hasError ? "bg-brick-50" : "bg-white"}`}>
                      {r.code}
                      {r.excluded && <span className="ml-1 rounded bg-clay-100 px-1 text-xs text-clay-800">excluded</span>}
                    </th>
                    {d.fields.map((f) => {
                      const name = `c:${r.code}:${f.key}`;
                      return (
                        <td key={f.key} className="px-1 py-1">
                          <input
                            name={name}
                            aria-label={`${f.label}, ${r.code}`}
                            inputMode={f.type === "number" ? "decimal" : undefined}
                            defaultValue={failed?.values?.[name] ?? r.stored?.[f.key] ?? ""}
                            className={`w-full min-w-20 rounded border border-loam-200 px-1.5 py-1 ${f.type === "number" ? "num text-right" : ""}`}
                          />
                        </td>
                      );
                    })}
                    <td className="px-1 py-1">
                      <input
                        name={`r:${r.code}`}
                        aria-label={`Reason for correcting ${r.code}`}
                        aria-invalid={reasonError ? true : undefined}
                        defaultValue={failed?.values?.[`r:${r.code}`] ?? ""}
                        disabled={!r.stored}
                        placeholder={r.stored ? "needed if changed" : "—"}
                        className={`w-full min-w-40 rounded border px-1.5 py-1 disabled:bg-loam-50 ${reasonError ? "border-brick-700" : "border-loam-200"}`}
                      />
                    </td>
                  </tr>,
                  (messages || reasonError) && (
                    <tr key={`${r.code}-m`} className="bg-brick-50/40">
                      <td colSpan={d.fields.length + 2} className="p-0">
                        <MessageBlock>
                          {messages && <RowMessages rowLabel={`sample ${r.code}`} messages={messages} />}
                          {reasonError && <p className="text-sm text-brick-700">{reasonError}</p>}
                        </MessageBlock>
                      </td>
                    </tr>
                  ),
                ];
              })}
            </tbody>
          </table>
        </div>
        <div className="mt-4 flex flex-wrap items-center gap-4">
          <CheckboxField label="I checked the warnings" name="confirmWarnings" />
          <SubmitButton pendingLabel="Checking and saving…">Check and save changed rows</SubmitButton>
        </div>
      </Form>
    </>
  );
}
