import { data } from "react-router";
import { z } from "zod";

const SECRET_FIELDS = new Set(["password", "confirmPassword", "currentPassword"]);

/**
 * Parses a submitted form with a zod schema. On failure returns a 400 `data` response with
 * errors keyed by field and the submitted values (secrets removed) so the form keeps them.
 */
export function parseForm<S extends z.ZodType>(formData: FormData, schema: S) {
  const values: Record<string, string> = {};
  for (const [key, value] of formData) {
    if (typeof value === "string") values[key] = value;
  }
  const result = schema.safeParse(values);
  if (result.success) return { ok: true as const, data: result.data as z.output<S> };
  return { ok: false as const, response: invalid(z.flattenError(result.error).fieldErrors, values) };
}

export function invalid(errors: Record<string, string[] | undefined>, values: Record<string, string> = {}, message?: string) {
  const kept = Object.fromEntries(Object.entries(values).filter(([k]) => !SECRET_FIELDS.has(k)));
  return data({ errors, values: kept, message }, { status: 400 });
}

export const email = z
  .string()
  .trim()
  .min(1, "Enter an e-mail address.")
  .max(254, "That e-mail address is too long.")
  .pipe(z.email("Enter an e-mail address like name@example.org."));

export const newPassword = z
  .string()
  .min(10, "Use at least 10 characters.")
  .max(128, "Use at most 128 characters.");

export const personName = z.string().trim().min(1, "Enter your name.").max(120, "Use at most 120 characters.");
