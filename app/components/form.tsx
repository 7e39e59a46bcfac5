import type { ReactNode } from "react";
import { useNavigation } from "react-router";

export type FieldErrors = Partial<Record<string, string[] | undefined>>;

type FieldProps = {
  label: string;
  name: string;
  type?: string;
  defaultValue?: string;
  errors?: FieldErrors;
  hint?: ReactNode;
  required?: boolean;
  autoComplete?: string;
  maxLength?: number;
  readOnly?: boolean;
  /** The on-screen keyboard a phone shows (numbers for measured values). */
  inputMode?: "numeric" | "decimal" | "text";
};

/** The id, error and aria-describedby shared by every labelled field. */
export function fieldParts(name: string, errors: FieldErrors | undefined, hint: ReactNode, showHintWithError = true) {
  const error = errors?.[name]?.[0];
  const id = `field-${name}`;
  const hintShown = Boolean(hint) && (showHintWithError || !error);
  const describedBy = [hintShown ? `${id}-hint` : null, error ? `${id}-error` : null].filter(Boolean).join(" ");
  return { id, error, hintShown, describedBy: describedBy || undefined, invalid: error ? true : undefined };
}

/** A field's label above its control, and its hint and error message right below. */
export function FieldFrame({
  id,
  label,
  hint,
  hintShown,
  error,
  children,
}: {
  id: string;
  label: string;
  hint?: ReactNode;
  hintShown: boolean;
  error?: string;
  children: ReactNode;
}) {
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-sm font-medium text-loam-900">
        {label}
      </label>
      {children}
      {hintShown && (
        <p id={`${id}-hint`} className="text-sm text-loam-600">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${id}-error`} className="text-sm font-medium text-brick-700">
          {error}
        </p>
      )}
    </div>
  );
}

/** Border colour of a control: red when its field has an error. */
export const controlBorder = (error: string | undefined) => (error ? "border-brick-700" : "border-loam-400");

/** A labelled input with its hint and its error message right beside it. */
export function Field({ label, name, type = "text", defaultValue, errors, hint, ...rest }: FieldProps) {
  const { id, error, hintShown, describedBy, invalid } = fieldParts(name, errors, hint);
  return (
    <FieldFrame id={id} label={label} hint={hint} hintShown={hintShown} error={error}>
      <input
        id={id}
        name={name}
        type={type}
        defaultValue={defaultValue}
        aria-invalid={invalid}
        aria-describedby={describedBy}
        className={`rounded-md border bg-white px-3 py-2 text-base text-loam-950 shadow-xs outline-none focus:border-moss-700 focus:ring-2 focus:ring-moss-600/30 read-only:bg-loam-100 ${controlBorder(error)}`}
        {...rest}
      />
    </FieldFrame>
  );
}

type SelectProps = {
  label: string;
  name: string;
  options: readonly { value: string; label: string }[];
  defaultValue?: string;
  errors?: FieldErrors;
  hint?: ReactNode;
};

export function SelectField({ label, name, options, defaultValue, errors, hint }: SelectProps) {
  const { id, error, hintShown, describedBy, invalid } = fieldParts(name, errors, hint, false);
  return (
    <FieldFrame id={id} label={label} hint={hint} hintShown={hintShown} error={error}>
      <select
        id={id}
        name={name}
        defaultValue={defaultValue}
        aria-invalid={invalid}
        aria-describedby={describedBy}
        className={`rounded-md border bg-white px-3 py-2 text-base focus:border-moss-700 focus:ring-2 focus:ring-moss-600/30 ${controlBorder(error)}`}
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </FieldFrame>
  );
}

/** A message about the whole form (not one field). */
export function FormMessage({ tone = "error", children }: { tone?: "error" | "success" | "info"; children: ReactNode }) {
  const styles = {
    error: "border-brick-700/40 bg-brick-50 text-brick-700",
    success: "border-moss-600/40 bg-moss-50 text-moss-900",
    info: "border-loam-200 bg-white text-loam-800",
  }[tone];
  return (
    <div role={tone === "error" ? "alert" : "status"} className={`rounded-md border px-4 py-3 text-sm ${styles}`}>
      {children}
    </div>
  );
}

export function SubmitButton({
  children,
  name,
  value,
  variant = "primary",
  pendingLabel,
}: {
  children: ReactNode;
  name?: string;
  value?: string;
  variant?: "primary" | "secondary" | "danger";
  pendingLabel?: string;
}) {
  const navigation = useNavigation();
  const pending =
    navigation.state === "submitting" && (name === undefined || navigation.formData?.get(name) === value);
  return (
    <button type="submit" name={name} value={value} disabled={pending} className={buttonClass(variant)}>
      {pending && pendingLabel ? pendingLabel : children}
    </button>
  );
}

export function buttonClass(variant: "primary" | "secondary" | "danger" = "primary") {
  const base =
    "inline-flex items-center justify-center gap-2 rounded-md px-4 py-2 text-sm font-medium no-underline transition-colors disabled:opacity-60";
  return {
    primary: `${base} bg-moss-700 text-white hover:bg-moss-800`,
    secondary: `${base} border border-loam-400 bg-white text-loam-900 hover:bg-loam-100`,
    danger: `${base} border border-brick-700/50 bg-white text-brick-700 hover:bg-brick-50`,
  }[variant];
}
