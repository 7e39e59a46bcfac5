// E-mail to a trial's researchers when lab results are committed.
import { and, eq, or } from "drizzle-orm";
import { db, schema } from "../db";
import { env } from "../env";
import { sendMail } from "../mail";
import type { CommitResult } from "./uploads";

/** Researchers of the trial's program, plus the trial's author when still a member. */
export async function trialResearchers(trialId: string) {
  const rows = await db
    .selectDistinct({ email: schema.users.email, name: schema.users.name })
    .from(schema.trials)
    .innerJoin(schema.members, eq(schema.members.organizationId, schema.trials.programId))
    .innerJoin(schema.users, eq(schema.users.id, schema.members.userId))
    .where(and(eq(schema.trials.id, trialId), or(eq(schema.members.role, "researcher"), eq(schema.members.userId, schema.trials.createdBy))));
  return rows;
}

/** Sends the commit notice; returns how many were sent. Failures are the caller's to report, never the commit's. */
export async function notifyCommitted(trialId: string, committed: CommitResult, committedBy: string): Promise<number> {
  const [trial] = await db.select({ title: schema.trials.title }).from(schema.trials).where(eq(schema.trials.id, trialId));
  const recipients = await trialResearchers(trialId);
  const link = new URL(`/trials/${trialId}/data`, env.TILTHMARK_BASE_URL).toString();
  for (const r of recipients) {
    await sendMail({
      to: r.email,
      subject: `Lab results committed: ${committed.kind.label}, ${trial.title}`,
      text: [
        `Hello ${r.name},`,
        "",
        `${committedBy} committed ${committed.rows} ${committed.kind.label} row${committed.rows === 1 ? "" : "s"} from “${committed.filename}” to ${trial.title}.`,
        committed.warnings > 0 ? `${committed.warnings} row${committed.warnings === 1 ? " had a warning" : "s had warnings"} that ${committedBy} confirmed; you may want to look at them in QC.` : "Every row passed the checks without warnings.",
        "",
        "See the derived values (SOM, SOC, bulk density, stocks) here:",
        link,
      ].join("\n"),
    });
  }
  return recipients.length;
}
