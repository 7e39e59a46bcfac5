// The trial form, shared by "new trial" and a trial's Setup page.
import { Field, SelectField, type FieldErrors } from "./form";
import { TextAreaField } from "./more-fields";
import { DESIGN_LABELS } from "./page";

export type TrialFormValues = Partial<
  Record<
    | "title"
    | "objective"
    | "hypotheses"
    | "siteId"
    | "design"
    | "plotLengthM"
    | "plotWidthM"
    | "alleyBetweenPlotsM"
    | "alleyBetweenBlocksM"
    | "blockCount",
    string
  >
>;

const designOptions = Object.entries(DESIGN_LABELS).map(([value, label]) => ({ value, label }));

export function TrialFormFields({
  values,
  errors,
  sites,
  structureLocked = false,
}: {
  values: TrialFormValues;
  errors?: FieldErrors;
  sites: { id: string; name: string }[];
  structureLocked?: boolean;
}) {
  const siteOptions = [{ value: "", label: sites.length ? "Choose a site…" : "No sites yet" }, ...sites.map((s) => ({ value: s.id, label: s.name }))];
  return (
    <>
      <Field label="Title" name="title" defaultValue={values.title} errors={errors} maxLength={200} required />
      <TextAreaField label="Objective" name="objective" defaultValue={values.objective ?? ""} errors={errors} hint="What the trial sets out to learn, in a sentence or two." />
      <TextAreaField label="Hypotheses" name="hypotheses" defaultValue={values.hypotheses ?? ""} errors={errors} rows={4} hint="One per line, e.g. “H1: compost raises SOM in 0–10 cm by the second fall.”" />
      {!structureLocked && (
      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-sm font-semibold text-loam-900">Field and design</legend>
        <SelectField label="Site" name="siteId" options={siteOptions} defaultValue={values.siteId ?? ""} errors={errors} />
        <SelectField label="Design" name="design" options={designOptions} defaultValue={values.design ?? "rcbd"} errors={errors} />
        <Field label="Plot length (m)" name="plotLengthM" type="text" defaultValue={values.plotLengthM} errors={errors} hint="North–south when blocks run as rows." />
        <Field label="Plot width (m)" name="plotWidthM" type="text" defaultValue={values.plotWidthM} errors={errors} hint="Along the block." />
        <Field label="Alley between plots (m)" name="alleyBetweenPlotsM" defaultValue={values.alleyBetweenPlotsM ?? "0"} errors={errors} />
        <Field label="Alley between blocks (m)" name="alleyBetweenBlocksM" defaultValue={values.alleyBetweenBlocksM ?? "0"} errors={errors} hint="In a completely randomized design: between field rows." />
        <Field label="Blocks (replicates)" name="blockCount" defaultValue={values.blockCount ?? "4"} errors={errors} hint="Power planning can suggest how many." />
      </fieldset>
      )}
    </>
  );
}
