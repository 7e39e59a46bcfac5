import { Form, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { invalid, parseForm, readForm } from "~/.server/forms";
import { addCustomVariable, addLabMethod, LabMethodError, listCustomVariables, listLabMethods } from "~/.server/lab-methods";
import { requirePermission } from "~/.server/permissions";
import { Field, FormMessage, SubmitButton } from "~/components/form";
import { formState, outcomeOf } from "~/components/form-state";
import { Caution } from "~/components/more-fields";
import { Empty, PageHeader, Section } from "~/components/page";
import { formatNumber } from "~/format";
import { roleCan } from "~/permissions";
import { checkCustomVariableId } from "../../analysis/variables";
import type { Route } from "./+types/program.lab";

export const meta: Route.MetaFunction = () => [{ title: "Lab methods and variables · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "results.view");
  const [methods, variables] = await Promise.all([listLabMethods(member.programId), listCustomVariables(member.programId)]);
  return { program: { id: member.programId, name: member.programName }, canEdit: roleCan(member.role, "samples.edit"), methods, variables };
}

const optionalNumber = (label: string, min: number, max: number) =>
  z
    .string()
    .trim()
    .transform((v) => (v === "" ? null : Number(v.replace(",", "."))))
    .refine((v) => v === null || Number.isFinite(v), `${label} must be a number.`)
    .refine((v) => v === null || !Number.isFinite(v) || (v >= min && v <= max), `${label} must be between ${min} and ${max}.`);
const requiredNumber = (label: string, min: number, max: number) =>
  z
    .string()
    .trim()
    .min(1, `Enter ${label.toLowerCase()}.`)
    .transform((v) => Number(v.replace(",", ".")))
    .refine((v) => Number.isFinite(v), `${label} must be a number.`)
    .refine((v) => !Number.isFinite(v) || (v >= min && v <= max), `${label} must be between ${min} and ${max}.`);
const text = (max: number) =>
  z
    .string()
    .trim()
    .max(max, `Use at most ${max} characters.`)
    .transform((v) => v || null);

const Intent = z.discriminatedUnion(
  "intent",
  [
    z.object({
      intent: z.literal("method"),
      name: z.string().trim().min(2, "Name the method, e.g. “LOI 550 °C, 4 h”.").max(100, "Use at most 100 characters."),
      ignitionC: optionalNumber("Ignition temperature", 300, 1000),
      ignitionHours: optionalNumber("Ignition time", 0.5, 48),
      somSlope: requiredNumber("The slope", 0.1, 10),
      somIntercept: requiredNumber("The intercept", -20, 20),
      notes: text(1000),
    }),
    z
      .object({
        intent: z.literal("variable"),
        variableId: z.string().trim(),
        label: z.string().trim().min(2, "Give the variable a label.").max(80, "Use at most 80 characters."),
        unit: z.string().trim().min(1, "Give the unit, e.g. “worms/m²” or “pH units”.").max(30, "Use at most 30 characters."),
        decimals: requiredNumber("Decimals", 0, 6),
        minValue: optionalNumber("The lowest plausible value", -1e9, 1e9),
        maxValue: optionalNumber("The highest plausible value", -1e9, 1e9),
        description: text(500),
      })
      .superRefine((v, ctx) => {
        const check = checkCustomVariableId(v.variableId);
        if (!check.ok) ctx.addIssue({ code: "custom", path: ["variableId"], message: check.message });
        if (!Number.isInteger(v.decimals)) ctx.addIssue({ code: "custom", path: ["decimals"], message: "Decimals must be a whole number." });
        if (v.minValue !== null && v.maxValue !== null && v.minValue >= v.maxValue) {
          ctx.addIssue({ code: "custom", path: ["maxValue"], message: "The highest value must be above the lowest." });
        }
      }),
  ],
  { error: "Unknown action." },
);

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "samples.edit");
  const parsed = parseForm(await readForm(request), Intent);
  if (!parsed.ok) return parsed.response;
  const { intent, ...input } = parsed.data;
  try {
    if (intent === "method") {
      await addLabMethod(member.user.id, member.programId, input as Parameters<typeof addLabMethod>[2]);
      return { ok: `Lab method “${(input as { name: string }).name}” added. Choose it for a trial on the trial's Lab method tab.` };
    }
    await addCustomVariable(member.user.id, member.programId, input as Parameters<typeof addCustomVariable>[2]);
    return { ok: `Variable “${(input as { label: string }).label}” registered; lab intake now offers a template for it.` };
  } catch (error) {
    if (error instanceof LabMethodError) {
      const values = Object.fromEntries(Object.entries({ intent, ...input }).map(([k, v]) => [k, v === null ? "" : String(v)]));
      return invalid(error.field ? { [error.field]: [error.message] } : {}, values, error.field ? undefined : error.message);
    }
    throw error;
  }
}

export default function LabPage() {
  const { program, canEdit, methods, variables } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const method = formState(result, "method");
  const variable = formState(result, "variable");
  const outcome = outcomeOf(result);
  return (
    <>
      <PageHeader
        crumbs={[{ to: `/programs/${program.id}`, label: program.name }]}
        eyebrow="Lab"
        title="Lab methods and variables"
        lead="How this program's lab turns loss on ignition into soil organic matter, and the extra variables its trials record."
      />
      <div aria-live="polite" className="mb-6 max-w-3xl empty:hidden">
        {outcome.ok && <FormMessage tone="success">{outcome.ok}</FormMessage>}
        {outcome.message && <FormMessage>{outcome.message}</FormMessage>}
      </div>
      <div className="mb-8 max-w-3xl">
        <Caution title="Muffle furnaces">
          <p>
            Ignition runs at about 550 °C: use tongs and heat-resistant gloves, and let crucibles cool in a desiccator before
            weighing. Follow your institution's laboratory safety rules.
          </p>
        </Caution>
      </div>
      <div className="grid gap-10 lg:grid-cols-2">
        <Section title="LOI methods and SOM calibration">
          {methods.length === 0 ? (
            <Empty>No lab method yet: trials use SOM = LOI.</Empty>
          ) : (
            <table className="w-full rounded-lg bg-white text-left text-sm shadow-xs">
              <thead className="bg-loam-100 text-loam-800">
                <tr>
                  <th scope="col" className="px-3 py-2 font-medium">Method</th>
                  <th scope="col" className="px-3 py-2 font-medium">Ignition</th>
                  <th scope="col" className="px-3 py-2 font-medium">SOM =</th>
                </tr>
              </thead>
              <tbody>
                {methods.map((m) => (
                  <tr key={m.id} className="border-t border-loam-200">
                    <td className="px-3 py-2">{m.name}</td>
                    <td className="num px-3 py-2">
                      {m.ignitionC ? `${formatNumber(m.ignitionC, 0)} °C` : "—"}
                      {m.ignitionHours ? `, ${formatNumber(m.ignitionHours, 1)} h` : ""}
                    </td>
                    <td className="num px-3 py-2">
                      {formatNumber(m.somSlope, 3)} × LOI {m.somIntercept < 0 ? "−" : "+"} {formatNumber(Math.abs(m.somIntercept), 3)}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
          {canEdit && (
            <Form method="post" className="mt-6 flex flex-col gap-3" noValidate>
              <h3 className="font-medium">Add a lab method</h3>
              <input type="hidden" name="intent" value="method" />
              <Field label="Name" name="name" maxLength={100} defaultValue={method.values?.name} errors={method.errors} required />
              <div className="grid grid-cols-2 gap-3">
                <Field label="Ignition temperature (°C)" name="ignitionC" defaultValue={method.values?.ignitionC ?? "550"} errors={method.errors} />
                <Field label="Ignition time (hours)" name="ignitionHours" defaultValue={method.values?.ignitionHours ?? "4"} errors={method.errors} />
                <Field label="Calibration slope a" name="somSlope" defaultValue={method.values?.somSlope ?? "1"} errors={method.errors} hint="SOM = a·LOI + b" />
                <Field label="Calibration intercept b (%)" name="somIntercept" defaultValue={method.values?.somIntercept ?? "0"} errors={method.errors} />
              </div>
              <Field label="Notes (calibration source)" name="notes" maxLength={1000} defaultValue={method.values?.notes} errors={method.errors} />
              <div>
                <SubmitButton name="intent" value="method" variant="secondary">
                  Add method
                </SubmitButton>
              </div>
            </Form>
          )}
        </Section>
        <Section title="Custom variables">
          {variables.length === 0 ? (
            <Empty>No custom variables. Register earthworm counts, pH, yield and the like here to upload them.</Empty>
          ) : (
            <table className="w-full rounded-lg bg-white text-left text-sm shadow-xs">
              <thead className="bg-loam-100 text-loam-800">
                <tr>
                  <th scope="col" className="px-3 py-2 font-medium">Id</th>
                  <th scope="col" className="px-3 py-2 font-medium">Label</th>
                  <th scope="col" className="px-3 py-2 font-medium">Unit</th>
                  <th scope="col" className="px-3 py-2 font-medium">Plausible range</th>
                </tr>
              </thead>
              <tbody>
                {variables.map((v) => (
                  <tr key={v.id} className="border-t border-loam-200">
                    <td className="num px-3 py-2">{v.variableId}</td>
                    <td className="px-3 py-2">{v.label}</td>
                    <td className="px-3 py-2">{v.unit}</td>
                    <td className="num px-3 py-2">
                      {v.minValue ?? "—"} to {v.maxValue ?? "—"}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
          {canEdit && (
            <Form method="post" className="mt-6 flex flex-col gap-3" noValidate>
              <h3 className="font-medium">Register a variable</h3>
              <input type="hidden" name="intent" value="variable" />
              <div className="grid grid-cols-2 gap-3">
                <Field label="Id" name="variableId" maxLength={40} hint="Lower case, e.g. earthworms" defaultValue={variable.values?.variableId} errors={variable.errors} required />
                <Field label="Label" name="label" maxLength={80} defaultValue={variable.values?.label} errors={variable.errors} required />
                <Field label="Unit" name="unit" maxLength={30} defaultValue={variable.values?.unit} errors={variable.errors} required />
                <Field label="Decimals shown" name="decimals" defaultValue={variable.values?.decimals ?? "1"} errors={variable.errors} />
                <Field label="Lowest plausible value" name="minValue" defaultValue={variable.values?.minValue} errors={variable.errors} />
                <Field label="Highest plausible value" name="maxValue" defaultValue={variable.values?.maxValue} errors={variable.errors} />
              </div>
              <Field label="Description" name="description" maxLength={500} defaultValue={variable.values?.description} errors={variable.errors} />
              <div>
                <SubmitButton name="intent" value="variable" variant="secondary">
                  Register variable
                </SubmitButton>
              </div>
            </Form>
          )}
        </Section>
      </div>
    </>
  );
}
