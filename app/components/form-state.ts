import type { FieldErrors } from "./form";

type Result = { ok?: string; errors?: FieldErrors; values?: Record<string, string>; message?: string };

/**
 * What an action answered, for one of several forms on a page: a form sees errors and kept values only
 * when the submission was its own (same intent, and same record when `id` names one). Without an
 * intent, a page's only form sees everything.
 */
export function formState(result: unknown, intent?: string, id?: { field: string; value: string }) {
  const r = (result ?? {}) as Result;
  const mine = (intent === undefined || r.values?.intent === intent) && (!id || r.values?.[id.field] === id.value);
  return {
    mine,
    errors: mine ? r.errors : undefined,
    values: mine ? r.values : undefined,
    message: mine ? r.message : undefined,
  };
}

/** The page-level outcome: a success sentence or a refusal that is not tied to one field. */
export function outcomeOf(result: unknown): { ok?: string; message?: string } {
  const r = (result ?? {}) as Result;
  return { ok: r.ok, message: r.message };
}
