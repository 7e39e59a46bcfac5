import { invalid } from "../forms";
import { DesignError } from "./errors";

/**
 * Runs a design change; a refusal comes back as a 400 with the message beside its field (or above
 * the form) and the typed values kept. Anything else propagates.
 */
export async function refusing<T>(values: Record<string, unknown>, run: () => Promise<T>) {
  try {
    return await run();
  } catch (error) {
    if (!(error instanceof DesignError)) throw error;
    const kept = Object.fromEntries(Object.entries(values).map(([k, v]) => [k, v === null || v === undefined ? "" : String(v)]));
    return error.field ? invalid({ [error.field]: [error.message] }, kept) : invalid({}, kept, error.message);
  }
}

/** The submitted form as plain strings (for keeping values on a refusal). */
export function formValues(form: FormData): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of form) if (typeof v === "string") out[k] = v;
  return out;
}
