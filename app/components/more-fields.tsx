import type { ReactNode } from "react";
import { controlBorder, FieldFrame, fieldParts, type FieldErrors } from "./form";

/** A labelled multi-line text box with its hint and error beside it. */
export function TextAreaField({
  label,
  name,
  defaultValue,
  errors,
  hint,
  rows = 3,
  maxLength,
}: {
  label: string;
  name: string;
  defaultValue?: string;
  errors?: FieldErrors;
  hint?: ReactNode;
  rows?: number;
  maxLength?: number;
}) {
  const { id, error, hintShown, describedBy, invalid } = fieldParts(name, errors, hint);
  return (
    <FieldFrame id={id} label={label} hint={hint} hintShown={hintShown} error={error}>
      <textarea
        id={id}
        name={name}
        rows={rows}
        maxLength={maxLength}
        defaultValue={defaultValue}
        aria-invalid={invalid}
        aria-describedby={describedBy}
        className={`rounded-md border bg-white px-3 py-2 text-base text-loam-950 shadow-xs outline-none focus:border-moss-700 focus:ring-2 focus:ring-moss-600/30 ${controlBorder(error)}`}
      />
    </FieldFrame>
  );
}

/** A checkbox with its label to the right and an error below. */
export function CheckboxField({
  label,
  name,
  defaultChecked,
  errors,
  hint,
  idSuffix = "",
}: {
  label: string;
  name: string;
  defaultChecked?: boolean;
  errors?: FieldErrors;
  hint?: ReactNode;
  idSuffix?: string;
}) {
  const error = errors?.[name]?.[0];
  const id = `field-${name}${idSuffix}`;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="inline-flex items-center gap-2 text-sm font-medium text-loam-900">
        <input id={id} type="checkbox" name={name} defaultChecked={defaultChecked} className="size-4 accent-moss-700" />
        {label}
      </label>
      {hint && <p className="text-sm text-loam-600">{hint}</p>}
      {error && <p className="text-sm font-medium text-brick-700">{error}</p>}
    </div>
  );
}

/** A caution box: what can hurt people or break rules, shown where the work happens. */
export function Caution({ title, children }: { title: string; children: ReactNode }) {
  return (
    <aside className="rounded-lg border border-clay-700/40 bg-clay-100/60 px-4 py-3 text-sm text-loam-900" aria-label={title}>
      <p className="font-semibold text-clay-800">{title}</p>
      <div className="mt-1 space-y-1">{children}</div>
    </aside>
  );
}
