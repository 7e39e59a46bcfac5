import { Form, Link, redirect, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { AmendmentInput, BatchInput, createBatch, deleteAmendment, getAmendment, updateAmendment } from "~/.server/design/amendments";
import { refusing } from "~/.server/design/respond";
import { parseForm, readForm } from "~/.server/forms";
import { notFound, requirePermission } from "~/.server/permissions";
import { AmendmentFormFields } from "~/components/amendment-form";
import { BatchFormFields } from "~/components/batch-form";
import { FormMessage, SubmitButton } from "~/components/form";
import { formState, outcomeOf } from "~/components/form-state";
import { Caution } from "~/components/more-fields";
import { Empty, PageHeader, Section } from "~/components/page";
import { DEFER_TO_LOCAL, MATERIAL_LABELS, NUTRIENT_LOADING_CAUTION, PATHOGEN_HANDLING_CAUTION, PATHOGEN_MATERIALS, TEMPERATURE_LOG_MATERIALS } from "~/design/cautions";
import { formatNumber } from "~/format";
import { roleCan } from "~/permissions";
import type { Route } from "./+types/program.amendment";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.amendment.name ?? "Amendment"} · Tilthmark` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "results.view");
  const amendment = await getAmendment(member.programId, params.amendmentId);
  if (!amendment) notFound(request, "No such amendment in this program.");
  return { program: { id: member.programId, name: member.programName }, canEdit: roleCan(member.role, "samples.edit"), amendment };
}

const DetailsInput = AmendmentInput.extend({ intent: z.literal("update") });

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "samples.edit");
  const amendment = await getAmendment(member.programId, params.amendmentId);
  if (!amendment) notFound(request, "No such amendment in this program.");
  const form = await readForm(request);
  switch (form.get("intent")) {
    case "update": {
      const parsed = parseForm(form, DetailsInput);
      if (!parsed.ok) return parsed.response;
      const { intent: _, ...input } = parsed.data;
      const result = await refusing(parsed.data, () => updateAmendment(member.user.id, member.programId, amendment.id, input));
      return result ?? { ok: "Details saved." };
    }
    case "delete": {
      const result = await refusing({ intent: "delete" }, () => deleteAmendment(member.user.id, member.programId, amendment.id));
      if (result) return result;
      throw redirect(`/programs/${member.programId}/amendments`);
    }
    default: {
      // "batch", the page's main form.
      const parsed = parseForm(form, BatchInput);
      if (!parsed.ok) return parsed.response;
      const result = await refusing(parsed.data, () => createBatch(member.user.id, member.programId, amendment.id, parsed.data));
      if ("id" in result) throw redirect(`/programs/${member.programId}/amendments/${amendment.id}/batches/${result.id}`);
      return result;
    }
  }
}

export default function AmendmentPage() {
  const { program, canEdit, amendment } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const { errors, values, message } = formState(result, "batch");
  const details = formState(result, "update");
  const removal = formState(result, "delete");
  const { ok } = outcomeOf(result);
  const pathogenRisk = PATHOGEN_MATERIALS.has(amendment.material);
  return (
    <>
      <PageHeader
        crumbs={[
          { to: `/programs/${program.id}`, label: program.name },
          { to: `/programs/${program.id}/amendments`, label: "Amendments" },
        ]}
        eyebrow={MATERIAL_LABELS[amendment.material]}
        title={amendment.name}
        lead={[amendment.source, amendment.description].filter(Boolean).join(" — ") || undefined}
      />
      <div className="mb-8 grid gap-3 md:grid-cols-2">
        {pathogenRisk && (
          <Caution title="Handling: pathogens">
            <p>{PATHOGEN_HANDLING_CAUTION}</p>
          </Caution>
        )}
        <Caution title="Nutrient loads">
          <p>{NUTRIENT_LOADING_CAUTION}</p>
          <p>{DEFER_TO_LOCAL}</p>
        </Caution>
      </div>
      <div className="grid gap-10 lg:grid-cols-[1.4fr_1fr]">
        <Section title={`Batches (${amendment.batches.length})`}>
          {amendment.batches.length === 0 ? (
            <Empty>No batches yet. Record one for each delivery or lot with its lab report.</Empty>
          ) : (
            <table className="w-full border-collapse bg-white text-left text-sm shadow-xs">
              <thead className="bg-loam-100 text-loam-800">
                <tr>
                  <th scope="col" className="px-3 py-2 font-medium">Batch</th>
                  <th scope="col" className="px-3 py-2 font-medium">Received</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">Moisture (% wet)</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">C:N</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">pH</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">EC (dS/m)</th>
                </tr>
              </thead>
              <tbody>
                {amendment.batches.map((b) => (
                  <tr key={b.id} className="border-t border-loam-200">
                    <td className="num px-3 py-1.5">
                      <Link to={`/programs/${program.id}/amendments/${amendment.id}/batches/${b.id}`}>{b.label}</Link>
                    </td>
                    <td className="num px-3 py-1.5">{b.receivedOn ?? "—"}</td>
                    <td className="num px-3 py-1.5 text-right">{formatNumber(b.moistureWetBasisPct, 1)}</td>
                    <td className="num px-3 py-1.5 text-right">{formatNumber(b.cnRatio, 1)}</td>
                    <td className="num px-3 py-1.5 text-right">{formatNumber(b.ph, 1)}</td>
                    <td className="num px-3 py-1.5 text-right">{formatNumber(b.ecDsPerM, 1)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </Section>
        {canEdit && (
          <Section title="Record a batch">
            <Form method="post" className="flex flex-col gap-4" noValidate>
              <input type="hidden" name="intent" value="batch" />
              {message && <FormMessage>{message}</FormMessage>}
              <BatchFormFields values={values ?? {}} errors={errors} composted={TEMPERATURE_LOG_MATERIALS.has(amendment.material)} />
              <div>
                <SubmitButton pendingLabel="Saving…">Save batch</SubmitButton>
              </div>
            </Form>
          </Section>
        )}
      </div>
      {canEdit && (
        <div className="mt-10 grid gap-10 lg:grid-cols-[1.4fr_1fr]">
          <Section title="Correct the details">
            <Form method="post" className="flex max-w-xl flex-col gap-4" noValidate>
              <input type="hidden" name="intent" value="update" />
              {ok && <FormMessage tone="success">{ok}</FormMessage>}
              {details.message && <FormMessage>{details.message}</FormMessage>}
              <AmendmentFormFields
                values={details.values ?? { name: amendment.name, material: amendment.material, source: amendment.source ?? "", description: amendment.description ?? "" }}
                errors={details.errors}
              />
              <div>
                <SubmitButton pendingLabel="Saving…">Save details</SubmitButton>
              </div>
            </Form>
          </Section>
          <Section title="Remove">
            {removal.message && <FormMessage>{removal.message}</FormMessage>}
            {amendment.batches.length > 0 ? (
              <p className="text-sm text-loam-800">
                Amendments with batches stay on record: batches carry lab analyses and trials name them. Correct the name or material instead.
              </p>
            ) : (
              <Form method="post" className="flex flex-col items-start gap-3">
                <p className="text-sm text-loam-800">No batches are recorded, so nothing refers to this amendment. Removing it is noted in the audit log.</p>
                <SubmitButton name="intent" value="delete" variant="secondary" pendingLabel="Removing…">
                  Remove this amendment
                </SubmitButton>
              </Form>
            )}
          </Section>
        </div>
      )}
    </>
  );
}
