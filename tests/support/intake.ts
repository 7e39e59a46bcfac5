// Helpers for lab-intake tests: multipart uploads as a signed-in person, and counts of what the trial holds.
import { eq, sql } from "drizzle-orm";
import { db, schema } from "~/.server/db";
import { requestAs } from "./sessions";

export function uploadRequest(cookie: string, trialId: string, file: { name: string; bytes: Uint8Array | string }, fields: Record<string, string> = {}) {
  const form = new FormData();
  const bytes = typeof file.bytes === "string" ? new TextEncoder().encode(file.bytes) : file.bytes;
  form.set("file", new File([new Uint8Array(bytes)], file.name, { type: "text/csv" }));
  form.set("kind", fields.kind ?? "loi");
  form.set("delimiter", fields.delimiter ?? "auto");
  if (fields.decimalComma) form.set("decimalComma", "on");
  return requestAs(cookie, `/trials/${trialId}/intake`, { method: "POST", body: form });
}

/** What a bad file must leave untouched. */
export async function trialState(trialId: string) {
  const [row] = await db
    .select({
      dataVersion: schema.trials.dataVersion,
      measurements: sql<number>`(select count(*)::int from measurement m join sample s on s.id = m.sample_id where s.trial_id = ${trialId})`,
      committed: sql<number>`(select count(*)::int from upload u where u.trial_id = ${trialId} and u.status = 'committed')`,
    })
    .from(schema.trials)
    .where(eq(schema.trials.id, trialId));
  return row;
}
