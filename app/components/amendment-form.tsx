import { MATERIAL_LABELS } from "~/design/cautions";
import { Field, type FieldErrors, SelectField } from "./form";
import { TextAreaField } from "./more-fields";

/** The fields of an amendment, for adding one and for correcting its details. */
export function AmendmentFormFields({ values, errors }: { values: Record<string, string | undefined>; errors?: FieldErrors }) {
  return (
    <>
      <Field label="Name" name="name" defaultValue={values.name} errors={errors} maxLength={120} required />
      <SelectField
        label="Material"
        name="material"
        options={Object.entries(MATERIAL_LABELS).map(([value, label]) => ({ value, label }))}
        defaultValue={values.material ?? "compost"}
        errors={errors}
      />
      <Field label="Source" name="source" defaultValue={values.source} errors={errors} hint="Supplier or where it was made." maxLength={300} />
      <TextAreaField label="Description" name="description" defaultValue={values.description} errors={errors} rows={2} />
    </>
  );
}
