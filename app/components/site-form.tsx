import { Field, SelectField, type FieldErrors } from "./form";
import { TextAreaField } from "./more-fields";

export function SiteFormFields({ values, errors, textureClasses }: { values: Record<string, string | undefined>; errors?: FieldErrors; textureClasses: readonly string[] }) {
  return (
    <>
      <Field label="Site name" name="name" defaultValue={values.name} errors={errors} maxLength={120} required />
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="Latitude (°)" name="latitude" defaultValue={values.latitude} errors={errors} hint="Decimal degrees, north positive, e.g. 40.0712" />
        <Field label="Longitude (°)" name="longitude" defaultValue={values.longitude} errors={errors} hint="Decimal degrees, east positive, e.g. −88.1964" />
      </div>
      <Field label="Soil series" name="soilSeries" defaultValue={values.soilSeries} errors={errors} hint="As mapped or described, free text." />
      <SelectField
        label="USDA texture class"
        name="textureClass"
        options={[{ value: "", label: "Not recorded" }, ...textureClasses.map((t) => ({ value: t, label: t }))]}
        defaultValue={values.textureClass ?? ""}
        errors={errors}
      />
      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-1 text-sm font-medium text-loam-900">Particle size (%, must add up to 100)</legend>
        <Field label="Sand (%)" name="sandPct" defaultValue={values.sandPct} errors={errors} />
        <Field label="Silt (%)" name="siltPct" defaultValue={values.siltPct} errors={errors} />
        <Field label="Clay (%)" name="clayPct" defaultValue={values.clayPct} errors={errors} />
      </fieldset>
      <TextAreaField label="Notes" name="notes" defaultValue={values.notes} errors={errors} rows={3} />
    </>
  );
}
