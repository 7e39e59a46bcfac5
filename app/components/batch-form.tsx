import { COMPOSTING_METHOD_LABELS } from "~/design/cautions";
import { Field, SelectField, type FieldErrors } from "./form";
import { TextAreaField } from "./more-fields";

const COMPOSTING_OPTIONS = [
  { value: "", label: "Not composted / not recorded" },
  ...Object.entries(COMPOSTING_METHOD_LABELS).map(([value, label]) => ({ value, label })),
];

export function BatchFormFields({ values, errors, composted }: { values: Record<string, string | undefined>; errors?: FieldErrors; composted: boolean }) {
  return (
    <>
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="Batch label" name="label" defaultValue={values.label} errors={errors} hint="As on the delivery or lab report, e.g. YWC-2026-A." maxLength={80} required />
        <Field label="Received on" name="receivedOn" type="date" defaultValue={values.receivedOn} errors={errors} />
      </div>
      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-1 text-sm font-medium text-loam-900">Lab analysis</legend>
        <Field label="Moisture (% wet basis)" name="moistureWetBasisPct" defaultValue={values.moistureWetBasisPct} errors={errors} hint="Water ÷ as-is mass." />
        <Field label="Total C (% dry basis)" name="totalCarbonDryPct" defaultValue={values.totalCarbonDryPct} errors={errors} />
        <Field label="Total N (% dry basis)" name="totalNitrogenDryPct" defaultValue={values.totalNitrogenDryPct} errors={errors} />
        <Field label="pH" name="ph" defaultValue={values.ph} errors={errors} />
        <Field label="EC (dS/m)" name="ecDsPerM" defaultValue={values.ecDsPerM} errors={errors} />
      </fieldset>
      {composted && (
        <SelectField
          label="Composting method"
          name="compostingMethod"
          options={COMPOSTING_OPTIONS}
          defaultValue={values.compostingMethod ?? ""}
          errors={errors}
          hint="Decides which pathogen-reduction rule the temperature log is checked against."
        />
      )}
      <TextAreaField label="Notes" name="notes" defaultValue={values.notes} errors={errors} rows={2} />
    </>
  );
}
