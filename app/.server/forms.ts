import { data } from "react-router";
import { z } from "zod";

const SECRET_FIELDS = new Set(["password", "confirmPassword", "currentPassword"]);

/**
 * The posted form, or a 400 with a sentence when the body is not one (JSON, a broken multipart
 * body, a wrong content type): hostile or garbled posts get an answer, not a server error.
 */
export async function readForm(request: Request): Promise<FormData> {
  try {
    return await request.formData();
  } catch {
    throw data("This request did not carry a form Tilthmark can read. Reload the page and submit the form again.", { status: 400 });
  }
}

/** PostgreSQL text cannot hold U+0000, and no form field needs it. */
const NUL = "\u0000";

/** A 400 naming each field that holds a null character, with the values kept (minus those characters); null when none does. */
export function nulRefusal(values: Record<string, string>) {
  const withNul = Object.keys(values).filter((k) => values[k].includes(NUL) || k.includes(NUL));
  if (withNul.length === 0) return null;
  const errors = Object.fromEntries(withNul.map((k) => [k, ["This contains a null character (U+0000), which cannot be saved. Retype the value."]]));
  return invalid(errors, Object.fromEntries(Object.entries(values).map(([k, v]) => [k.replaceAll(NUL, ""), v.replaceAll(NUL, "")])));
}

/**
 * Parses a submitted form with a zod schema. On failure returns a 400 `data` response with
 * errors keyed by field and the submitted values (secrets removed) so the form keeps them.
 */
export function parseForm<S extends z.ZodType>(formData: FormData, schema: S) {
  const values: Record<string, string> = {};
  for (const [key, value] of formData) {
    if (typeof value === "string") values[key] = value;
  }
  const nul = nulRefusal(values);
  if (nul) return { ok: false as const, response: nul };
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
