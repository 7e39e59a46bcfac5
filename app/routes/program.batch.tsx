import { Form, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { PATHOGEN_REDUCTION_RULES } from "../../analysis/amendments";
import {
  addReadings,
  batchPathogenCheck,
  BatchInput,
  deleteReading,
  getBatch,
  updateBatch,
} from "~/.server/design/amendments";
import { requiredNumber } from "~/.server/design/inputs";
import { parseLogDateTime, parseTemperatureCsv } from "~/.server/design/temperature-log";
import { formValues, refusing } from "~/.server/design/respond";
import { invalid, parseForm, readForm } from "~/.server/forms";
import { notFound, requirePermission } from "~/.server/permissions";
import { BatchFormFields } from "~/components/batch-form";
import { Field, FormMessage, SubmitButton } from "~/components/form";
import { formState, outcomeOf } from "~/components/form-state";
import { Caution, CheckboxField, TextAreaField } from "~/components/more-fields";
import { PageHeader, Section } from "~/components/page";
import { COMPOSTING_METHOD_LABELS, DEFER_TO_LOCAL, MATERIAL_LABELS, NUTRIENT_LOADING_CAUTION, PATHOGEN_HANDLING_CAUTION, PATHOGEN_MATERIALS, TEMPERATURE_LOG_MATERIALS } from "~/design/cautions";
import { formatNumber } from "~/format";
import { roleCan } from "~/permissions";
import type { Route } from "./+types/program.batch";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Batch ${data?.batch.label ?? ""} · Tilthmark` }];

const MAX_LOG_BYTES = 1_000_000;

async function openBatch(request: Request, programId: string, amendmentId: string, batchId: string) {
  const found = await getBatch(programId, amendmentId, batchId);
  if (!found) notFound(request, "No such batch in this program.");
  return found;
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "results.view");
  const { amendment, batch, readings } = await openBatch(request, member.programId, params.amendmentId, params.batchId);
  const check = batchPathogenCheck(batch.compostingMethod, readings);
  return {
    program: { id: member.programId, name: member.programName },
    canEdit: roleCan(member.role, "samples.edit"),
    amendment: { id: amendment.id, name: amendment.name, material: amendment.material },
    batch: { ...batch, createdAt: batch.createdAt.toISOString() },
    readings: readings.map((r) => ({ id: r.id, readAt: r.readAt.toISOString().slice(0, 16), probeC: r.probeC, turned: r.turned })),
    check,
    unitSystem: member.user.unitSystem,
  };
}

const Reading = z.object({
  intent: z.literal("add-reading"),
  readAt: z
    .string()
    .trim()
    .min(1, "Enter the date and time of the reading.")
    .refine((v) => parseLogDateTime(v) !== null, "Enter the date and time as 2025-06-01 08:30."),
  probeC: requiredNumber("The probe reading", { min: -30, max: 95, unit: "°C" }),
  turned: z
    .string()
    .optional()
    .transform((v) => v === "on"),
});

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "samples.edit");
  const { batch } = await openBatch(request, member.programId, params.amendmentId, params.batchId);
  const form = await readForm(request);
  const intent = form.get("intent");
  const actor = member.user.id;
  switch (intent) {
    case "update": {
      const parsed = parseForm(form, BatchInput.extend({ intent: z.literal("update") }));
      if (!parsed.ok) return parsed.response;
      const { intent: _, ...input } = parsed.data;
      const result = await refusing(parsed.data, () => updateBatch(actor, member.programId, batch.id, input));
      return result === undefined ? { ok: "Batch saved." } : result;
    }
    case "add-reading": {
      const parsed = parseForm(form, Reading);
      if (!parsed.ok) return parsed.response;
      const readAt = parseLogDateTime(parsed.data.readAt)!.toISOString();
      const result = await refusing(parsed.data, () => addReadings(actor, member.programId, batch.id, [{ readAt, probeC: parsed.data.probeC, turned: parsed.data.turned }], "form"));
      return result === undefined ? { ok: "Reading added." } : result;
    }
    case "import": {
      const values = formValues(form);
      const file = form.get("file");
      let text = typeof values.csv === "string" ? values.csv : "";
      let source = "pasted";
      if (file instanceof File && file.size > 0) {
        if (file.size > MAX_LOG_BYTES) return invalid({ file: ["The file is larger than 1 MB; split the log."] }, { intent: "import" });
        text = await file.text();
        source = file.name;
      }
      if (!text.trim()) return invalid({ csv: ["Choose a CSV file or paste the log."] }, { intent: "import" });
      const { rows, problems } = parseTemperatureCsv(text);
      if (problems.length) {
        return invalid({ csv: [`Nothing was added. ${problems.length} problem${problems.length === 1 ? "" : "s"}: ${problems.slice(0, 8).join(" ")}${problems.length > 8 ? " …" : ""}`] }, { intent: "import", csv: values.csv ?? "" });
      }
      await addReadings(actor, member.programId, batch.id, rows, source);
      return { ok: `${rows.length} reading${rows.length === 1 ? "" : "s"} added from ${source === "pasted" ? "the pasted log" : source}.` };
    }
    case "delete-reading": {
      const parsed = parseForm(form, z.object({ intent: z.literal("delete-reading"), readingId: z.string().uuid() }));
      if (!parsed.ok) return parsed.response;
      const result = await refusing(parsed.data, () => deleteReading(actor, member.programId, batch.id, parsed.data.readingId));
      return result === undefined ? { ok: "Reading removed." } : result;
    }
    default:
      return invalid({}, {}, "Unknown action.");
  }
}

const str = (v: number | string | null) => (v === null ? "" : String(v));

export default function BatchPage() {
  const { program, canEdit, amendment, batch, readings, check } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const update = formState(result, "update");
  const reading = formState(result, "add-reading");
  const importing = formState(result, "import");
  const { ok, message } = outcomeOf(result);
  const logApplies = TEMPERATURE_LOG_MATERIALS.has(amendment.material);
  const current = {
    label: batch.label,
    receivedOn: str(batch.receivedOn),
    moistureWetBasisPct: str(batch.moistureWetBasisPct),
    totalCarbonDryPct: str(batch.totalCarbonDryPct),
    totalNitrogenDryPct: str(batch.totalNitrogenDryPct),
    ph: str(batch.ph),
    ecDsPerM: str(batch.ecDsPerM),
    compostingMethod: str(batch.compostingMethod),
    notes: str(batch.notes),
  };
  return (
    <>
      <PageHeader
        crumbs={[
          { to: `/programs/${program.id}`, label: program.name },
          { to: `/programs/${program.id}/amendments`, label: "Amendments" },
          { to: `/programs/${program.id}/amendments/${amendment.id}`, label: amendment.name },
        ]}
        eyebrow={`${MATERIAL_LABELS[amendment.material]} batch`}
        title={batch.label}
      />
      <div aria-live="polite" className="mb-6 flex flex-col gap-2 empty:hidden">
        {ok && <FormMessage tone="success">{ok}</FormMessage>}
        {message && <FormMessage>{message}</FormMessage>}
      </div>
      <div className="mb-8 grid gap-3 md:grid-cols-2">
        {PATHOGEN_MATERIALS.has(amendment.material) && (
          <Caution title="Handling: pathogens">
            <p>{PATHOGEN_HANDLING_CAUTION}</p>
          </Caution>
        )}
        <Caution title="Nutrient loads">
          <p>{NUTRIENT_LOADING_CAUTION}</p>
          <p>{DEFER_TO_LOCAL}</p>
        </Caution>
      </div>

      <div className="grid gap-10 lg:grid-cols-[1fr_1.2fr]">
        <Section title="Lab analysis">
          <dl className="mb-6 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
            <dt className="text-loam-600">C:N (derived)</dt>
            <dd className="num" data-testid="cn-ratio">
              {batch.cnRatio === null ? "— (needs total C and N)" : `${formatNumber(batch.cnRatio, 1)} : 1`}
            </dd>
            {batch.compostingMethod && (
              <>
                <dt className="text-loam-600">Composting</dt>
                <dd>{COMPOSTING_METHOD_LABELS[batch.compostingMethod]}</dd>
              </>
            )}
          </dl>
          {canEdit ? (
            <Form method="post" className="flex flex-col gap-4" noValidate>
              {update.message && <FormMessage>{update.message}</FormMessage>}
              <BatchFormFields values={update.values ?? current} errors={update.errors} composted={logApplies} />
              <div>
                <SubmitButton name="intent" value="update" pendingLabel="Saving…">
                  Save batch
                </SubmitButton>
              </div>
            </Form>
          ) : (
            <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
              <dt className="text-loam-600">Moisture (% wet basis)</dt>
              <dd className="num">{formatNumber(batch.moistureWetBasisPct, 1)}</dd>
              <dt className="text-loam-600">Total C (% dry basis)</dt>
              <dd className="num">{formatNumber(batch.totalCarbonDryPct, 1)}</dd>
              <dt className="text-loam-600">Total N (% dry basis)</dt>
              <dd className="num">{formatNumber(batch.totalNitrogenDryPct, 2)}</dd>
              <dt className="text-loam-600">pH</dt>
              <dd className="num">{formatNumber(batch.ph, 1)}</dd>
              <dt className="text-loam-600">EC (dS/m)</dt>
              <dd className="num">{formatNumber(batch.ecDsPerM, 1)}</dd>
            </dl>
          )}
        </Section>

        {logApplies && (
          <div>
            <Section title="Pathogen-reduction check">
              {!batch.compostingMethod ? (
                <p className="text-sm text-loam-700">Choose the composting method to check the temperature log against its rule.</p>
              ) : !check ? (
                <p className="text-sm text-loam-700">No temperature readings yet. Add them below or import the probe log as CSV.</p>
              ) : (
                <div className="flex flex-col gap-3" data-testid="pathogen-check">
                  <p className={`rounded-md border px-4 py-3 font-medium ${check.passed ? "border-moss-600/40 bg-moss-50 text-moss-900" : "border-brick-700/40 bg-brick-50 text-brick-700"}`}>
                    {check.passed ? "Meets the rule (indication only)" : "Does not meet the rule"}: {check.summary}
                  </p>
                  <p className="text-sm">
                    <strong>Rule:</strong> {check.rule}
                  </p>
                  <p className="text-sm text-loam-700">
                    <strong>From:</strong> {check.citation}
                  </p>
                  <Caution title="An indication, not compliance">
                    <p>{check.caution}</p>
                  </Caution>
                  <table className="w-full border-collapse bg-white text-left text-sm shadow-xs">
                    <caption className="mb-1 text-left text-loam-700">Days in the log (a day counts when every reading is at or above 55 °C)</caption>
                    <thead className="bg-loam-100 text-loam-800">
                      <tr>
                        <th scope="col" className="px-3 py-1.5 font-medium">Date</th>
                        <th scope="col" className="px-3 py-1.5 text-right font-medium">Readings</th>
                        <th scope="col" className="px-3 py-1.5 text-right font-medium">Min °C</th>
                        <th scope="col" className="px-3 py-1.5 text-right font-medium">Max °C</th>
                        <th scope="col" className="px-3 py-1.5 text-right font-medium">Turnings</th>
                        <th scope="col" className="px-3 py-1.5 font-medium">Counts?</th>
                      </tr>
                    </thead>
                    <tbody>
                      {check.days.map((d) => (
                        <tr key={d.date} className="border-t border-loam-200">
                          <td className="num px-3 py-1">{d.date}</td>
                          <td className="num px-3 py-1 text-right">{d.readings}</td>
                          <td className="num px-3 py-1 text-right">{formatNumber(d.minimumC, 1)}</td>
                          <td className="num px-3 py-1 text-right">{formatNumber(d.maximumC, 1)}</td>
                          <td className="num px-3 py-1 text-right">{d.turnings}</td>
                          <td className="px-3 py-1">{d.counts ? "yes" : "no"}</td>
                        </tr>
                      ))}
                    </tbody>
                  </table>
                </div>
              )}
              {!check && batch.compostingMethod && (
                <p className="mt-3 text-sm text-loam-700">
                  Rule for this method: {batch.compostingMethod === "turned_windrow" ? PATHOGEN_REDUCTION_RULES.turned_windrow.text : PATHOGEN_REDUCTION_RULES.static.text}
                </p>
              )}
            </Section>

            <Section title={`Temperature log (${readings.length} readings)`}>
              {readings.length > 0 && (
                <div className="mb-4 max-h-80 overflow-y-auto rounded-lg border border-loam-200 bg-white">
                  <table className="w-full border-collapse text-left text-sm">
                    <thead className="sticky top-0 bg-loam-100 text-loam-800">
                      <tr>
                        <th scope="col" className="px-3 py-1.5 font-medium">Date-time</th>
                        <th scope="col" className="px-3 py-1.5 text-right font-medium">Probe °C</th>
                        <th scope="col" className="px-3 py-1.5 font-medium">Turned</th>
                        {canEdit && <th scope="col" className="px-3 py-1.5"><span className="sr-only">Remove</span></th>}
                      </tr>
                    </thead>
                    <tbody>
                      {readings.map((r) => (
                        <tr key={r.id} className="border-t border-loam-200">
                          <td className="num px-3 py-1">{r.readAt.replace("T", " ")}</td>
                          <td className="num px-3 py-1 text-right">{formatNumber(r.probeC, 1)}</td>
                          <td className="px-3 py-1">{r.turned ? "yes" : ""}</td>
                          {canEdit && (
                            <td className="px-3 py-1 text-right">
                              <Form method="post">
                                <input type="hidden" name="readingId" value={r.id} />
                                <button type="submit" name="intent" value="delete-reading" className="text-xs text-brick-700 underline">
                                  Remove<span className="sr-only"> reading of {r.readAt}</span>
                                </button>
                              </Form>
                            </td>
                          )}
                        </tr>
                      ))}
                    </tbody>
                  </table>
                </div>
              )}
              {canEdit && (
                <div className="grid gap-6">
                  <Form key={readings.length} method="post" className="grid gap-3 rounded-lg border border-loam-200 bg-white p-4 sm:grid-cols-[1.4fr_1fr_auto] sm:items-end" noValidate>
                    <Field label="Date-time" name="readAt" defaultValue={reading.values?.readAt} errors={reading.errors} hint="2025-06-01 08:30" />
                    <Field label="Probe (°C)" name="probeC" defaultValue={reading.values?.probeC} errors={reading.errors} />
                    <CheckboxField label="Turned" name="turned" defaultChecked={reading.values?.turned === "on"} />
                    <div className="sm:col-span-3">
                      <SubmitButton name="intent" value="add-reading" variant="secondary">
                        Add reading
                      </SubmitButton>
                    </div>
                  </Form>
                  <Form key={`import-${readings.length}`} method="post" encType="multipart/form-data" className="flex flex-col gap-3 rounded-lg border border-loam-200 bg-white p-4" noValidate>
                    <h3 className="font-medium">Import a probe log (CSV)</h3>
                    <p className="text-sm text-loam-700">
                      Columns <code>read_at</code> (2025-06-01 08:30), <code>probe_c</code> (°C) and <code>turned</code> (yes/no). The whole
                      file is checked first; nothing is added unless every line reads cleanly.
                    </p>
                    <div className="flex flex-col gap-1">
                      <label htmlFor="field-file" className="text-sm font-medium text-loam-900">
                        CSV file
                      </label>
                      <input id="field-file" type="file" name="file" accept=".csv,text/csv" className="text-sm" aria-describedby={importing.errors?.file ? "field-file-error" : undefined} />
                      {importing.errors?.file && (
                        <p id="field-file-error" className="text-sm font-medium text-brick-700">
                          {importing.errors.file[0]}
                        </p>
                      )}
                    </div>
                    <TextAreaField label="…or paste the log" name="csv" defaultValue={importing.values?.csv} errors={importing.errors} rows={4} />
                    <div>
                      <SubmitButton name="intent" value="import" variant="secondary" pendingLabel="Checking…">
                        Import log
                      </SubmitButton>
                    </div>
                  </Form>
                </div>
              )}
            </Section>
          </div>
        )}
      </div>
    </>
  );
}
