import { Form, Link, redirect, useActionData, useLoaderData, useSearchParams } from "react-router";
import { z } from "zod";
import { listProgramBatches } from "~/.server/design/amendments";
import { checkbox, optionalNumber, optionalText, requiredText, timingField, uuidField } from "~/.server/design/inputs";
import { orderedFactors } from "~/.server/design/draw";
import { refusing } from "~/.server/design/respond";
import {
  addApplication,
  addFactor,
  addTreatment,
  deleteApplication,
  deleteFactor,
  deleteTreatment,
  generateCombinations,
  listFactors,
  listTreatments,
  parseLevels,
  updateTreatment,
} from "~/.server/design/treatments";
import { getTrial, lockedMessage } from "~/.server/design/trials";
import { parseForm, readForm } from "~/.server/forms";
import { notFound, requirePermission } from "~/.server/permissions";
import { Field, FormMessage, SelectField, SubmitButton, buttonClass } from "~/components/form";
import { formState, outcomeOf } from "~/components/form-state";
import { CheckboxField, TextAreaField } from "~/components/more-fields";
import { Empty, Section } from "~/components/page";
import { MATERIAL_LABELS, TIMING_LABELS, timingText } from "~/design/cautions";
import { formatNumber } from "~/format";
import { roleCan } from "~/permissions";
import type { Route } from "./+types/trial.treatments";

export const meta: Route.MetaFunction = () => [{ title: "Treatments · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "results.view");
  const trial = await getTrial(params.trialId);
  if (!trial) notFound(request, "No such trial.");
  const canEdit = roleCan(member.role, "trials.edit") && trial.status === "draft";
  const [treatments, factors, batches] = await Promise.all([
    listTreatments(trial.id),
    listFactors(trial.id),
    canEdit ? listProgramBatches(member.programId) : Promise.resolve([]),
  ]);
  return {
    trial: { id: trial.id, design: trial.design, status: trial.status },
    programId: member.programId,
    canEdit,
    lockedNote: trial.status === "draft" ? null : lockedMessage(trial),
    treatments,
    factors: orderedFactors(factors),
    batches: batches.map((b) => ({ id: b.id, label: `${b.amendment} — ${b.label}` })),
  };
}

const treatmentFields = {
  code: requiredText("a code", 40),
  name: requiredText("a name", 120),
  description: optionalText(2000),
  isCheck: checkbox,
};
const id = z.string().uuid();

const Intent = z.discriminatedUnion(
  "intent",
  [
    z.object({ intent: z.literal("add-treatment"), ...treatmentFields }),
    z.object({ intent: z.literal("update-treatment"), treatmentId: id, ...treatmentFields }),
    z.object({ intent: z.literal("delete-treatment"), treatmentId: id }),
    z.object({
      intent: z.literal("add-application"),
      treatmentId: id,
      batchId: uuidField("a batch"),
      rateMgDmPerHa: optionalNumber("The rate", { min: 0.01, max: 500, unit: "Mg/ha" }),
      layerDepthCm: optionalNumber("The layer depth", { min: 0.1, max: 100, unit: "cm" }),
      timing: timingField,
      everyNWeeks: optionalNumber("The interval", { min: 1, max: 52, integer: true, unit: "weeks" }),
      notes: optionalText(500),
    }),
    z.object({ intent: z.literal("delete-application"), applicationId: id }),
    z.object({
      intent: z.literal("add-factor"),
      factorName: requiredText("the factor's name", 60),
      levels: requiredText("the levels", 600),
      stratum: z
        .string()
        .optional()
        .transform((v) => (v === "main" || v === "sub" ? v : null)),
    }),
    z.object({ intent: z.literal("delete-factor"), factorId: id }),
    z.object({ intent: z.literal("generate") }),
  ],
  { error: "Unknown action." },
);

const SAVED: Record<string, string> = {
  "add-treatment": "Treatment added.",
  "update-treatment": "Treatment saved.",
  "delete-treatment": "Treatment removed.",
  "add-application": "Application added.",
  "delete-application": "Application removed.",
  "add-factor": "Factor added.",
  "delete-factor": "Factor removed.",
  generate: "Treatments generated from the factors.",
};

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "trials.edit");
  const parsed = parseForm(await readForm(request), Intent);
  if (!parsed.ok) return parsed.response;
  const input = parsed.data;
  const actor = member.user.id;
  const trialId = params.trialId;
  let layoutCleared = false;
  const result = await refusing(input, async () => {
    switch (input.intent) {
      case "add-treatment": {
        const { intent, ...t } = input;
        layoutCleared = (await addTreatment(actor, trialId, t)).layoutCleared;
        return true;
      }
      case "update-treatment": {
        const { intent, treatmentId, ...t } = input;
        await updateTreatment(actor, trialId, treatmentId, t);
        return true;
      }
      case "delete-treatment":
        layoutCleared = (await deleteTreatment(actor, trialId, input.treatmentId)).layoutCleared;
        return true;
      case "add-application": {
        const { intent, treatmentId, ...a } = input;
        await addApplication(actor, trialId, treatmentId, a);
        return true;
      }
      case "delete-application":
        await deleteApplication(actor, trialId, input.applicationId);
        return true;
      case "add-factor":
        await addFactor(actor, trialId, { name: input.factorName, levels: parseLevels(input.levels), stratum: input.stratum });
        return true;
      case "delete-factor":
        await deleteFactor(actor, trialId, input.factorId);
        return true;
      case "generate":
        await generateCombinations(actor, trialId);
        return true;
    }
  });
  if (result !== true) return result;
  throw redirect(`/trials/${trialId}/treatments?saved=${input.intent}${layoutCleared ? "&cleared=1" : ""}`);
}

export default function TreatmentsPage() {
  const { trial, canEdit, lockedNote, treatments, factors, batches, programId } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const [search] = useSearchParams();
  const editing = search.get("edit");
  const applying = search.get("apply");
  const saved = SAVED[search.get("saved") ?? ""];
  const { message } = outcomeOf(result);
  const factorial = trial.design === "factorial_rcbd" || trial.design === "split_plot";
  const here = `/trials/${trial.id}/treatments`;
  return (
    <>
      <div aria-live="polite" className="mb-6 flex flex-col gap-2 empty:hidden">
        {saved && !result && <FormMessage tone="success">{saved}</FormMessage>}
        {search.get("cleared") && !result && (
          <FormMessage tone="info">The treatments changed, so the drawn layout was cleared. Randomize again before locking.</FormMessage>
        )}
        {message && <FormMessage>{message}</FormMessage>}
        {lockedNote && <FormMessage tone="info">{lockedNote}</FormMessage>}
      </div>

      {factorial && <FactorsSection factors={factors} canEdit={canEdit} design={trial.design} result={result} />}

      <Section title={`Treatments (${treatments.length})`}>
        {treatments.length === 0 ? (
          <Empty>
            {factorial ? "Add the factors above, then generate the treatments from their levels." : "No treatments yet. Add the untreated check and each amendment below."}
          </Empty>
        ) : (
          <ol className="flex flex-col gap-4">
            {treatments.map((t) => (
              <li key={t.id} className="rounded-lg border border-loam-200 bg-white p-4 shadow-xs" data-testid="treatment">
                {editing === t.id && canEdit ? (
                  <TreatmentForm intent="update-treatment" treatment={t} result={result} cancelTo={here} />
                ) : (
                  <div className="flex flex-wrap items-start justify-between gap-3">
                    <div>
                      <h3 className="font-semibold">
                        <span className="num mr-2">{t.code}</span>
                        {t.name}
                        {t.isCheck && <span className="ml-2 rounded bg-loam-100 px-1.5 py-0.5 text-xs font-normal">untreated check</span>}
                      </h3>
                      {t.description && <p className="mt-1 text-sm text-loam-700">{t.description}</p>}
                    </div>
                    {canEdit && (
                      <div className="flex gap-2">
                        <Link to={`${here}?edit=${t.id}`} className={buttonClass("secondary")} aria-label={`Edit treatment ${t.code}`}>
                          Edit
                        </Link>
                        <Form
                          method="post"
                          onSubmit={(e) => {
                            if (!confirm(`Remove treatment ${t.code}? Its applications go with it, and any drawn layout is cleared.`)) e.preventDefault();
                          }}
                        >
                          <input type="hidden" name="treatmentId" value={t.id} />
                          <SubmitButton name="intent" value="delete-treatment" variant="danger">
                            Remove<span className="sr-only"> treatment {t.code}</span>
                          </SubmitButton>
                        </Form>
                      </div>
                    )}
                  </div>
                )}
                <ApplicationsTable applications={t.applications} canEdit={canEdit} isCheck={t.isCheck} />
                {canEdit && !t.isCheck && (
                  applying === t.id ? (
                    <ApplicationForm treatmentId={t.id} code={t.code} batches={batches} result={result} cancelTo={here} programId={programId} />
                  ) : (
                    <Link to={`${here}?apply=${t.id}`} className="mt-3 inline-block text-sm">
                      Add an application to {t.code}
                    </Link>
                  )
                )}
              </li>
            ))}
          </ol>
        )}
      </Section>

      {canEdit && !factorial && !editing && (
        <Section title="Add a treatment">
          {/* A new key after each addition empties the form (its inputs are uncontrolled). */}
          <TreatmentForm key={treatments.length} intent="add-treatment" result={result} />
        </Section>
      )}
    </>
  );
}

type Treatment = ReturnType<typeof useLoaderData<typeof loader>>["treatments"][number];

function TreatmentForm({ intent, treatment, result, cancelTo }: { intent: string; treatment?: Treatment; result: unknown; cancelTo?: string }) {
  const state = formState(result, intent, treatment ? { field: "treatmentId", value: treatment.id } : undefined);
  const v = state.values ?? {
    code: treatment?.code ?? "",
    name: treatment?.name ?? "",
    description: treatment?.description ?? "",
    isCheck: treatment?.isCheck ? "on" : "",
  };
  return (
    <Form method="post" className="flex max-w-2xl flex-col gap-4" noValidate>
      {treatment && <input type="hidden" name="treatmentId" value={treatment.id} />}
      <div className="grid gap-4 sm:grid-cols-[10rem_1fr]">
        <Field label="Code" name="code" defaultValue={v.code} errors={state.errors} hint="Short, e.g. T1." maxLength={40} required />
        <Field label="Name" name="name" defaultValue={v.name} errors={state.errors} maxLength={120} required />
      </div>
      <TextAreaField label="Description" name="description" defaultValue={v.description} errors={state.errors} rows={2} />
      <CheckboxField label="Untreated check (receives no amendment)" name="isCheck" defaultChecked={v.isCheck === "on"} errors={state.errors} />
      <div className="flex gap-2">
        <SubmitButton name="intent" value={intent}>
          {treatment ? "Save treatment" : "Add treatment"}
        </SubmitButton>
        {cancelTo && (
          <Link to={cancelTo} className={buttonClass("secondary")}>
            Cancel
          </Link>
        )}
      </div>
    </Form>
  );
}

function ApplicationsTable({ applications, canEdit, isCheck }: { applications: Treatment["applications"]; canEdit: boolean; isCheck: boolean }) {
  if (applications.length === 0) {
    return <p className="mt-3 text-sm text-loam-700">{isCheck ? "No amendment: this is the untreated check." : "No applications yet."}</p>;
  }
  return (
    <table className="mt-3 w-full border-collapse text-left text-sm">
      <caption className="sr-only">Applications</caption>
      <thead className="text-loam-700">
        <tr>
          <th scope="col" className="py-1 pr-3 font-medium">Amendment · batch</th>
          <th scope="col" className="py-1 pr-3 text-right font-medium">Rate (Mg DM/ha)</th>
          <th scope="col" className="py-1 pr-3 text-right font-medium">Layer (cm)</th>
          <th scope="col" className="py-1 pr-3 font-medium">When</th>
          {canEdit && <th scope="col" className="py-1 font-medium"><span className="sr-only">Remove</span></th>}
        </tr>
      </thead>
      <tbody>
        {applications.map((a) => (
          <tr key={a.id} className="border-t border-loam-200">
            <td className="py-1.5 pr-3">
              {a.amendmentName} · <span className="num">{a.batchLabel}</span>
              {a.material && <span className="ml-1 text-loam-600">({MATERIAL_LABELS[a.material]})</span>}
              {a.notes && <p className="text-loam-600">{a.notes}</p>}
            </td>
            <td className="num py-1.5 pr-3 text-right">{formatNumber(a.rateMgDmPerHa, 1)}</td>
            <td className="num py-1.5 pr-3 text-right">{formatNumber(a.layerDepthCm, 1)}</td>
            <td className="py-1.5 pr-3">{timingText(a.timing, a.everyNWeeks)}</td>
            {canEdit && (
              <td className="py-1.5 text-right">
                <Form method="post">
                  <input type="hidden" name="applicationId" value={a.id} />
                  <button type="submit" name="intent" value="delete-application" className="text-sm text-brick-700 underline">
                    Remove<span className="sr-only"> {a.batchLabel}</span>
                  </button>
                </Form>
              </td>
            )}
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function ApplicationForm({
  treatmentId,
  code,
  batches,
  result,
  cancelTo,
  programId,
}: {
  treatmentId: string;
  code: string;
  batches: { id: string; label: string }[];
  result: unknown;
  cancelTo: string;
  programId: string;
}) {
  const state = formState(result, "add-application", { field: "treatmentId", value: treatmentId });
  const v = state.values ?? {};
  if (batches.length === 0) {
    return (
      <p className="mt-3 text-sm">
        No amendment batches yet. <Link to={`/programs/${programId}/amendments`}>Record the amendment and its batch</Link> first.
      </p>
    );
  }
  return (
    <Form method="post" className="mt-4 flex flex-col gap-4 rounded-md border border-loam-200 bg-loam-50 p-4" noValidate>
      <h4 className="font-medium">New application for {code}</h4>
      {state.message && <FormMessage>{state.message}</FormMessage>}
      <input type="hidden" name="treatmentId" value={treatmentId} />
      <SelectField label="Batch" name="batchId" options={[{ value: "", label: "Choose a batch…" }, ...batches.map((b) => ({ value: b.id, label: b.label }))]} defaultValue={v.batchId ?? ""} errors={state.errors} />
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="Dry-matter rate (Mg DM/ha)" name="rateMgDmPerHa" defaultValue={v.rateMgDmPerHa} errors={state.errors} hint="For spread amendments. Leave blank for a layer." />
        <Field label="Layer depth (cm)" name="layerDepthCm" defaultValue={v.layerDepthCm} errors={state.errors} hint="For mulches laid as a layer." />
        <SelectField label="Timing" name="timing" options={Object.entries(TIMING_LABELS).map(([value, label]) => ({ value, label }))} defaultValue={v.timing ?? "once"} errors={state.errors} />
        <Field label="Every N weeks" name="everyNWeeks" defaultValue={v.everyNWeeks} errors={state.errors} hint="Only for “every N weeks”." />
      </div>
      <Field label="Notes" name="notes" defaultValue={v.notes} errors={state.errors} maxLength={500} />
      <div className="flex gap-2">
        <SubmitButton name="intent" value="add-application">Add application</SubmitButton>
        <Link to={cancelTo} className={buttonClass("secondary")}>
          Cancel
        </Link>
      </div>
    </Form>
  );
}

function FactorsSection({
  factors,
  canEdit,
  design,
  result,
}: {
  factors: { id: string; name: string; levels: string[]; stratum: "main" | "sub" | null }[];
  canEdit: boolean;
  design: string;
  result: unknown;
}) {
  const state = formState(result, "add-factor");
  const generate = formState(result, "generate");
  const v = state.values ?? {};
  const split = design === "split_plot";
  const combinations = factors.reduce((n, f) => n * f.levels.length, factors.length ? 1 : 0);
  return (
    <Section title="Factors and levels">
      <p className="mb-3 max-w-3xl text-sm text-loam-700">
        {split
          ? "A split-plot trial has two factors: the main-plot factor is randomized over main plots within each block, the sub-plot factor over the sub-plots within each main plot."
          : "Every combination of the factors' levels becomes one treatment (e.g. amendment × rate)."}
      </p>
      {factors.length > 0 && (
        <ul className="mb-4 divide-y divide-loam-200 rounded-lg border border-loam-200 bg-white">
          {factors.map((f) => (
            <li key={f.id} className="flex flex-wrap items-center justify-between gap-3 px-4 py-2">
              <span>
                <strong>{f.name}</strong>
                {f.stratum && <span className="ml-2 text-sm text-loam-600">({f.stratum === "main" ? "main plots" : "sub-plots"})</span>}: {f.levels.join(", ")}
              </span>
              {canEdit && (
                <Form method="post">
                  <input type="hidden" name="factorId" value={f.id} />
                  <button type="submit" name="intent" value="delete-factor" className="text-sm text-brick-700 underline">
                    Remove<span className="sr-only"> factor {f.name}</span>
                  </button>
                </Form>
              )}
            </li>
          ))}
        </ul>
      )}
      {canEdit && (
        <div className="grid gap-6 lg:grid-cols-2">
          <Form key={factors.length} method="post" className="flex flex-col gap-3" noValidate>
            {state.message && <FormMessage>{state.message}</FormMessage>}
            <Field label="Factor name" name="factorName" defaultValue={v.factorName} errors={state.errors} hint="e.g. amendment, or rate" maxLength={60} />
            <Field label="Levels" name="levels" defaultValue={v.levels} errors={state.errors} hint="Separated by commas, e.g. 0, 10, 20" />
            {split && (
              <SelectField
                label="Stratum"
                name="stratum"
                options={[
                  { value: "main", label: "Main plots" },
                  { value: "sub", label: "Sub-plots" },
                ]}
                defaultValue={v.stratum ?? (factors.some((f) => f.stratum === "main") ? "sub" : "main")}
                errors={state.errors}
              />
            )}
            <div>
              <SubmitButton name="intent" value="add-factor" variant="secondary">
                Add factor
              </SubmitButton>
            </div>
          </Form>
          <Form method="post" className="flex flex-col gap-3">
            {generate.message && <FormMessage>{generate.message}</FormMessage>}
            <p className="text-sm text-loam-700">
              {combinations > 0 ? (
                <>
                  The factors give <span className="num">{combinations}</span> combinations. Generating replaces the current treatments and their applications.
                </>
              ) : (
                "Add at least one factor with two or more levels."
              )}
            </p>
            <div>
              <SubmitButton name="intent" value="generate">
                Generate treatments
              </SubmitButton>
            </div>
          </Form>
        </div>
      )}
    </Section>
  );
}
