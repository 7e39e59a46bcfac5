import { Form, Link, useActionData, useLoaderData } from "react-router";
import { eq } from "drizzle-orm";
import { z } from "zod";
import { db, schema } from "~/.server/db";
import { invalid, parseForm, readForm } from "~/.server/forms";
import { LabMethodError, listLabMethods, setCarbonMethod } from "~/.server/lab-methods";
import { notFound, requirePermission } from "~/.server/permissions";
import { FormMessage, SelectField, SubmitButton } from "~/components/form";
import { formState, outcomeOf } from "~/components/form-state";
import { Section } from "~/components/page";
import { formatNumber } from "~/format";
import type { Route } from "./+types/trial.lab-method";

export const meta: Route.MetaFunction = () => [{ title: "Lab method · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "trials.edit");
  const [trial] = await db
    .select({ socFactor: schema.trials.socFactor, labMethodId: schema.trials.labMethodId })
    .from(schema.trials)
    .where(eq(schema.trials.id, params.trialId));
  if (!trial) notFound(request, "No such trial.");
  const methods = await listLabMethods(member.programId);
  return { programId: member.programId, trial, methods };
}

const CarbonMethod = z.object({
  socFactor: z.enum(["1.724", "2.0"], { error: "Choose 1.724 or 2.0." }).transform(Number),
  labMethodId: z.string().transform((v) => (v === "" ? null : v)),
});

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "trials.edit");
  const parsed = parseForm(await readForm(request), CarbonMethod);
  if (!parsed.ok) return parsed.response;
  try {
    await setCarbonMethod(member.user.id, params.trialId, parsed.data);
  } catch (error) {
    if (error instanceof LabMethodError) return invalid(error.field ? { [error.field]: [error.message] } : {}, {}, error.field ? undefined : error.message);
    throw error;
  }
  return { ok: "Saved. Every derived SOM, SOC and stock value of this trial now uses this method; results were recomputed." };
}

export default function TrialLabMethod() {
  const { programId, trial, methods } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const form = formState(result);
  const outcome = outcomeOf(result);
  return (
    <Section title="How this trial derives SOM and SOC">
      <p className="mb-4 max-w-3xl text-sm text-loam-700">
        SOM comes from loss on ignition, either as it is or through the lab's calibration SOM = a·LOI + b. SOC is SOM divided by
        a conversion factor: 1.724 (van Bemmelen; Nelson &amp; Sommers 1996) by default, or 2.0 (Pribyl 2010). Raw lab values are
        never changed; every derived number follows this choice.
      </p>
      <Form method="post" className="flex max-w-xl flex-col gap-4" noValidate>
        {outcome.ok && <FormMessage tone="success">{outcome.ok}</FormMessage>}
        {outcome.message && <FormMessage>{outcome.message}</FormMessage>}
        <SelectField
          label="SOC conversion factor"
          name="socFactor"
          defaultValue={trial.socFactor === 2 ? "2.0" : "1.724"}
          options={[
            { value: "1.724", label: "1.724 (van Bemmelen; Nelson & Sommers 1996)" },
            { value: "2.0", label: "2.0 (Pribyl 2010)" },
          ]}
          errors={form.errors}
        />
        <SelectField
          label="SOM from LOI"
          name="labMethodId"
          defaultValue={trial.labMethodId ?? ""}
          options={[
            { value: "", label: "SOM = LOI (no calibration)" },
            ...methods.map((m) => ({ value: m.id, label: `${m.name}: SOM = ${formatNumber(m.somSlope, 3)}·LOI ${m.somIntercept < 0 ? "−" : "+"} ${formatNumber(Math.abs(m.somIntercept), 3)}` })),
          ]}
          hint={
            <>
              Lab methods are set up on the program's <Link to={`/programs/${programId}/lab`}>lab methods page</Link>.
            </>
          }
          errors={form.errors}
        />
        <div>
          <SubmitButton pendingLabel="Saving…">Save method</SubmitButton>
        </div>
      </Form>
    </Section>
  );
}
