import { Form, Link, redirect, useActionData, useLoaderData } from "react-router";
import { AmendmentInput, createAmendment, listAmendments } from "~/.server/design/amendments";
import { refusing } from "~/.server/design/respond";
import { parseForm, readForm } from "~/.server/forms";
import { requirePermission } from "~/.server/permissions";
import { AmendmentFormFields } from "~/components/amendment-form";
import { buttonClass, FormMessage, SubmitButton } from "~/components/form";
import { formState } from "~/components/form-state";
import { Caution } from "~/components/more-fields";
import { Empty, PageHeader, Section } from "~/components/page";
import { DEFER_TO_LOCAL, MATERIAL_LABELS, NUTRIENT_LOADING_CAUTION, PATHOGEN_HANDLING_CAUTION } from "~/design/cautions";
import { formatNumber } from "~/format";
import { roleCan } from "~/permissions";
import type { Route } from "./+types/program.amendments";

export const meta: Route.MetaFunction = () => [{ title: "Amendments · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "results.view");
  return {
    program: { id: member.programId, name: member.programName },
    canEdit: roleCan(member.role, "samples.edit"),
    amendments: await listAmendments(member.programId),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "samples.edit");
  const parsed = parseForm(await readForm(request), AmendmentInput);
  if (!parsed.ok) return parsed.response;
  const result = await refusing(parsed.data, () => createAmendment(member.user.id, member.programId, parsed.data));
  if ("id" in result) throw redirect(`/programs/${member.programId}/amendments/${result.id}`);
  return result;
}

export default function AmendmentsPage() {
  const { program, canEdit, amendments } = useLoaderData<typeof loader>();
  const { errors, values, message } = formState(useActionData<typeof action>());
  const v = values ?? {};
  return (
    <>
      <PageHeader
        crumbs={[{ to: `/programs/${program.id}`, label: program.name }]}
        eyebrow="Amendments"
        title="Amendments and batches"
        lead="Each material a trial applies, with a batch for every delivery and its lab analysis. Moisture is on a wet basis; C and N on a dry basis."
        actions={
          <Link to={`/programs/${program.id}/blend-calculator`} className={buttonClass("secondary")}>
            Blend C:N calculator
          </Link>
        }
      />
      <div className="mb-8 grid gap-3 md:grid-cols-2">
        <Caution title="Handling: pathogens">
          <p>{PATHOGEN_HANDLING_CAUTION}</p>
        </Caution>
        <Caution title="Nutrient loads">
          <p>{NUTRIENT_LOADING_CAUTION}</p>
          <p>{DEFER_TO_LOCAL}</p>
        </Caution>
      </div>
      <div className="grid gap-10 lg:grid-cols-[2fr_1fr]">
        <Section title={`Amendments (${amendments.length})`}>
          {amendments.length === 0 ? (
            <Empty>No amendments recorded yet.</Empty>
          ) : (
            <table className="w-full border-collapse bg-white text-left text-sm shadow-xs">
              <thead className="bg-loam-100 text-loam-800">
                <tr>
                  <th scope="col" className="px-3 py-2 font-medium">Amendment</th>
                  <th scope="col" className="px-3 py-2 font-medium">Batch</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">Moisture (% wet)</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">C (% dry)</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">N (% dry)</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">C:N</th>
                </tr>
              </thead>
              <tbody>
                {amendments.flatMap((a) =>
                  (a.batches.length ? a.batches : [null]).map((b, i) => (
                    <tr key={`${a.id}-${b?.id ?? "none"}`} className={i === 0 ? "border-t border-loam-200" : ""}>
                      <td className="px-3 py-1.5 align-top">
                        {i === 0 && (
                          <>
                            <Link to={`/programs/${program.id}/amendments/${a.id}`}>{a.name}</Link>
                            <span className="block text-xs text-loam-600">{MATERIAL_LABELS[a.material]}</span>
                          </>
                        )}
                      </td>
                      {b ? (
                        <>
                          <td className="num px-3 py-1.5">
                            <Link to={`/programs/${program.id}/amendments/${a.id}/batches/${b.id}`}>{b.label}</Link>
                          </td>
                          <td className="num px-3 py-1.5 text-right">{formatNumber(b.moistureWetBasisPct, 1)}</td>
                          <td className="num px-3 py-1.5 text-right">{formatNumber(b.totalCarbonDryPct, 1)}</td>
                          <td className="num px-3 py-1.5 text-right">{formatNumber(b.totalNitrogenDryPct, 2)}</td>
                          <td className="num px-3 py-1.5 text-right">{formatNumber(b.cnRatio, 1)}</td>
                        </>
                      ) : (
                        <td colSpan={5} className="px-3 py-1.5 text-loam-600">
                          No batches yet
                        </td>
                      )}
                    </tr>
                  )),
                )}
              </tbody>
            </table>
          )}
        </Section>
        {canEdit && (
          <Section title="Add an amendment">
            <Form method="post" className="flex flex-col gap-4" noValidate>
              {message && <FormMessage>{message}</FormMessage>}
              <AmendmentFormFields values={v} errors={errors} />
              <div>
                <SubmitButton pendingLabel="Saving…">Add amendment</SubmitButton>
              </div>
            </Form>
          </Section>
        )}
      </div>
    </>
  );
}
