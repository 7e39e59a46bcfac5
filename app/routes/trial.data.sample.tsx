import { Form, Link, data, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { invalid, parseForm, readForm } from "~/.server/forms";
import { notFound, requirePermission } from "~/.server/permissions";
import { kindsOf } from "~/.server/intake/context";
import { loadDerivedSamples } from "~/.server/intake/derived";
import { saveEntries, sampleHistory } from "~/.server/intake/entry";
import { IntakeError } from "~/.server/intake/errors";
import { setMeasurementStatus } from "~/.server/intake/qc";
import { FormMessage, SubmitButton } from "~/components/form";
import { formState, outcomeOf } from "~/components/form-state";
import { RowMessages } from "~/components/intake-messages";
import { CheckboxField, TextAreaField } from "~/components/more-fields";
import { Section } from "~/components/page";
import { formatNumber } from "~/format";
import { roleCan } from "~/permissions";
import type { Route } from "./+types/trial.data.sample";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Sample ${data?.sample.sampleCode ?? ""} · Tilthmark` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "results.view");
  const code = new URL(request.url).searchParams.get("code") ?? "";
  const found = await sampleHistory(params.trialId, code);
  if (!found) notFound(request, `No sample ${code} in this trial.`);
  const sample = (await loadDerivedSamples(params.trialId, { eventId: found.eventId })).find((s) => s.sampleId === found.sampleId)!;
  const { kinds } = await kindsOf(member.programId);
  return {
    trialId: params.trialId,
    sample,
    history: found.history,
    kinds: kinds.map((k) => ({ id: k.id, label: k.label, fields: k.fields.filter((f) => f.key !== "sampleCode").map((f) => ({ key: f.key, label: f.label, type: f.type })) })),
    canCorrect: roleCan(member.role, "measurements.upload"),
    canReview: roleCan(member.role, "measurements.review"),
  };
}

const Qc = z.object({
  intent: z.literal("qc"),
  measurementId: z.string().uuid(),
  decision: z.enum(["accept", "exclude"]),
  reason: z.string().trim().min(3, "Give the reason in a few words (it goes into the audit log).").max(500, "Use at most 500 characters."),
});

export async function action({ request, params }: Route.ActionArgs) {
  const code = new URL(request.url).searchParams.get("code") ?? "";
  const member = await requirePermission(request, { trialId: params.trialId }, "measurements.upload");
  const form = await readForm(request);
  if (form.get("intent") === "qc") {
    await requirePermission(request, { trialId: params.trialId }, "measurements.review");
    const parsed = parseForm(form, Qc);
    if (!parsed.ok) return parsed.response;
    try {
      await setMeasurementStatus(params.trialId, member.programId, member.user.id, parsed.data.measurementId, parsed.data.decision, parsed.data.reason);
    } catch (error) {
      if (error instanceof IntakeError) return invalid({}, { intent: "qc" }, error.message);
      throw error;
    }
    return { ok: parsed.data.decision === "exclude" ? "Excluded: the value stays visible, marked, and is left out of analyses." : "Accepted: the value counts in analyses." };
  }
  const kind = String(form.get("kind") ?? "");
  const values = Object.fromEntries([...form].filter(([, v]) => typeof v === "string")) as Record<string, string>;
  const cells = Object.fromEntries(Object.entries(values).filter(([k]) => k.startsWith("f:")).map(([k, v]) => [k.slice(2), v]));
  try {
    const outcome = await saveEntries(
      params.trialId,
      member.programId,
      member.user.id,
      kind,
      [{ sampleCode: code, cells, reason: values.reason }],
      { confirmWarnings: values.confirmWarnings === "on" },
    );
    if (outcome.ok) return { ok: outcome.corrected ? "Corrected. The earlier value stays in the history and the audit log." : "Entered." };
    const reasonError = Object.values(outcome.reasonErrors)[0];
    return data(
      { errors: reasonError ? { reason: [reasonError] } : {}, values: { ...values, intent: `entry-${kind}` }, message: outcome.message, rowMessages: outcome.review.rows[0]?.messages ?? [] },
      { status: 400 },
    );
  } catch (error) {
    if (error instanceof IntakeError) return invalid({}, { ...values, intent: `entry-${kind}` }, error.message);
    throw error;
  }
}

export default function SamplePage() {
  const { trialId, sample, history, kinds, canCorrect, canReview } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const { ok, message } = outcomeOf(result);
  const derived: [string, string, number | null, number][] = [
    ["loi", "LOI %", sample.loi, 2],
    ["som", "SOM %", sample.som, 2],
    ["soc", "SOC %", sample.soc, 2],
    ["bd", "BD g/cm³", sample.bd, 3],
    ["bd_fine", "BD fine g/cm³", sample.bd_fine, 3],
    ["moisture", "Moisture % (dry basis)", sample.moisture, 1],
    ["soc_stock", "SOC stock Mg C/ha", sample.soc_stock, 2],
    ["soc_stock_cumulative", "SOC stock from 0 cm Mg C/ha", sample.soc_stock_cumulative, 2],
    ["fine_earth_mass_cumulative", "Fine-earth mass from 0 cm Mg/ha", sample.fine_earth_mass_cumulative, 0],
  ];
  return (
    <>
      <p className="mb-4 text-sm">
        <Link to={`/trials/${trialId}/data?event=${sample.eventId}`}>← Data, {sample.season}</Link>
      </p>
      <h2 className="text-2xl font-semibold">
        Sample <span className="num">{sample.sampleCode}</span>
      </h2>
      <p className="mb-6 text-loam-700">
        Plot <span className="num">{sample.plotNumber}</span> · block <span className="num">{sample.block}</span> · {sample.treatmentCode} {sample.treatmentName} ·{" "}
        <span className="num">
          {sample.topCm}–{sample.bottomCm}
        </span>{" "}
        cm · {sample.season} (<span className="num">{sample.eventDate}</span>)
      </p>
      <div aria-live="polite" className="mb-6 empty:hidden">
        {ok && <FormMessage tone="success">{ok}</FormMessage>}
        {message && <FormMessage>{message}</FormMessage>}
      </div>
      <Section title="Derived values">
        <dl className="grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-3">
          {derived.map(([key, label, value, digits]) => (
            <div key={key} className="flex justify-between gap-2 border-b border-loam-200 py-1">
              <dt className="text-loam-700">{label}</dt>
              <dd className="num">{formatNumber(value, digits)}</dd>
            </div>
          ))}
        </dl>
      </Section>
      {kinds.map((k) => {
        const own = history.filter((h) => h.kind === k.id);
        const current = own.find((h) => h.current);
        const entry = formState(result, `entry-${k.id}`);
        if (own.length === 0 && !canCorrect) return null;
        return (
          <Section key={k.id} title={k.label}>
            {own.length === 0 ? (
              <p className="mb-3 text-sm text-loam-700">No result yet.</p>
            ) : (
              <ol className="mb-4 space-y-2 text-sm">
                {own.map((h) => (
                  <li key={h.id} className={`rounded border px-3 py-2 ${h.current ? "border-loam-400 bg-white" : "border-loam-200 bg-loam-50 text-loam-600"}`}>
                    <p>
                      <strong>{h.current ? (h.status === "excluded" ? "Current, excluded in QC" : "Current") : "Replaced"}</strong> · {h.enteredBy} ·{" "}
                      <span className="num">{new Date(h.createdAt).toISOString().slice(0, 16).replace("T", " ")}</span> UTC ·{" "}
                      {h.filename ? (
                        <>
                          from <Link to={`/trials/${trialId}/intake/${h.uploadId}`}>{h.filename}</Link> row <span className="num">{h.sourceRow}</span>
                        </>
                      ) : (
                        "entered by hand"
                      )}
                      {h.statusReason && <> · QC: {h.statusReason}</>}
                    </p>
                    <p className="num mt-1 text-xs">
                      {k.fields
                        .filter((f) => h.inputs[f.key] !== null && h.inputs[f.key] !== undefined)
                        .map((f) => `${f.label}: ${h.inputs[f.key]}`)
                        .join(" · ")}
                    </p>
                    {h.current && canReview && (
                      <Form method="post" className="mt-2 flex flex-wrap items-end gap-2">
                        <input type="hidden" name="intent" value="qc" />
                        <input type="hidden" name="measurementId" value={h.id} />
                        <label className="flex flex-col gap-1 text-sm">
                          <span className="font-medium">QC reason</span>
                          <input name="reason" required minLength={3} maxLength={500} className="w-72 rounded-md border border-loam-400 px-2 py-1.5" />
                        </label>
                        {h.status === "excluded" ? (
                          <SubmitButton name="decision" value="accept" variant="secondary">
                            Accept again
                          </SubmitButton>
                        ) : (
                          <>
                            <SubmitButton name="decision" value="accept" variant="secondary">
                              Accept
                            </SubmitButton>
                            <SubmitButton name="decision" value="exclude" variant="danger">
                              Exclude
                            </SubmitButton>
                          </>
                        )}
                      </Form>
                    )}
                  </li>
                ))}
              </ol>
            )}
            {canCorrect && (
              <details className="rounded border border-loam-200 bg-white p-3" open={entry.mine}>
                <summary className="cursor-pointer text-sm font-medium">{current ? "Correct this result" : "Enter a result by hand"}</summary>
                <Form method="post" className="mt-3 grid gap-3 sm:grid-cols-3" noValidate>
                  <input type="hidden" name="intent" value="entry" />
                  <input type="hidden" name="kind" value={k.id} />
                  {k.fields.map((f) => (
                    <label key={f.key} className="flex flex-col gap-1 text-sm">
                      <span className="font-medium">{f.label}</span>
                      <input
                        name={`f:${f.key}`}
                        inputMode={f.type === "number" ? "decimal" : undefined}
                        defaultValue={entry.values?.[`f:${f.key}`] ?? (current?.inputs[f.key] != null ? String(current.inputs[f.key]) : "")}
                        className={`rounded-md border border-loam-400 px-2 py-1.5 ${f.type === "number" ? "num" : ""}`}
                      />
                    </label>
                  ))}
                  {current && (
                    <div className="sm:col-span-3">
                      <TextAreaField label="Reason for the correction" name="reason" rows={2} defaultValue={entry.values?.reason} errors={entry.errors} maxLength={500} />
                    </div>
                  )}
                  {entry.mine && result && "rowMessages" in result && result.rowMessages.length > 0 && (
                    <div className="sm:col-span-3" role="alert">
                      <RowMessages rowLabel={`sample ${sample.sampleCode}`} messages={result.rowMessages} />
                    </div>
                  )}
                  <div className="flex flex-wrap items-center gap-4 sm:col-span-3">
                    <CheckboxField label="I checked the warnings" name="confirmWarnings" idSuffix={`-${k.id}`} />
                    <SubmitButton pendingLabel="Saving…">{current ? "Save correction" : "Save result"}</SubmitButton>
                  </div>
                </Form>
              </details>
            )}
          </Section>
        );
      })}
    </>
  );
}
