import type { ReactNode } from "react";
import { Form } from "react-router";
import { buttonClass } from "~/components/form";

/**
 * The filters above a paged table: a GET form (it works without JavaScript, and the filter stays in
 * the address), its submit button, and the CSV export of the same filter on the right.
 */
export function FilterForm({ submitLabel, exportHref, children }: { submitLabel: string; exportHref: string; children: ReactNode }) {
  return (
    <div className="mb-4 flex flex-wrap items-end justify-between gap-4">
      <Form method="get" className="flex flex-wrap items-end gap-3 text-sm">
        {children}
        <button type="submit" className={buttonClass("secondary")}>
          {submitLabel}
        </button>
      </Form>
      <a className={buttonClass("secondary")} href={exportHref} download>
        Export CSV
      </a>
    </div>
  );
}

const control = "rounded-md border border-loam-400 bg-white px-2";

/** A labelled choice whose first option, with the empty value, means "no filter". */
export function FilterSelect({
  label,
  name,
  value,
  anyLabel,
  options,
}: {
  label: string;
  name: string;
  value: string;
  anyLabel: string;
  options: { value: string; label: string }[];
}) {
  return (
    <label className="flex flex-col gap-1">
      <span className="font-medium">{label}</span>
      <select name={name} defaultValue={value} className={`${control} py-1.5`}>
        <option value="">{anyLabel}</option>
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </label>
  );
}

/** A labelled text or date field; empty means "no filter". */
export function FilterInput({ label, name, value, type, placeholder }: { label: string; name: string; value: string; type?: "date"; placeholder?: string }) {
  return (
    <label className="flex flex-col gap-1">
      <span className="font-medium">{label}</span>
      {/* A date input draws taller than a text one: less padding keeps the row level. */}
      <input type={type} name={name} defaultValue={value} placeholder={placeholder} className={`${control} ${type === "date" ? "py-1" : "py-1.5"}`} />
    </label>
  );
}

/** A checkbox filter, sent as name=1 when ticked. */
export function FilterCheckbox({ label, name, checked }: { label: string; name: string; checked: boolean }) {
  return (
    <label className="inline-flex items-center gap-2 pb-2">
      <input type="checkbox" name={name} value="1" defaultChecked={checked} className="size-4 accent-moss-700" />
      {label}
    </label>
  );
}

/** The page's query without the given keys (the page number, one-off notices), with `page` set when given. */
export function filterQuery(query: string, drop: string[], page?: number): string {
  const q = new URLSearchParams(query);
  for (const key of drop) q.delete(key);
  if (page !== undefined) q.set("page", String(page));
  return q.toString();
}
