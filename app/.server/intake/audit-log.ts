// The audit log of a trial: who changed what and when, with before/after values and reasons.
import { and, desc, eq, gte, lt, sql, type SQL } from "drizzle-orm";
import type { CsvCell } from "../csv";
import { db, schema } from "../db";

export interface AuditFilter {
  action?: string;
  actorId?: string;
  /** yyyy-mm-dd, inclusive. */
  from?: string;
  /** yyyy-mm-dd, inclusive. */
  to?: string;
  /** Free text searched in the details (sample code, file name, reason). */
  text?: string;
}

const ACTION_LABELS: Record<string, string> = {
  seed: "demo written",
  create: "created",
  receive: "file received",
  map_columns: "columns mapped",
  commit: "file committed",
  discard: "file set aside",
  enter: "result entered",
  correct: "result corrected",
  accept: "accepted in QC",
  exclude: "excluded in QC",
};

export const actionLabel = (action: string) => ACTION_LABELS[action] ?? action.replace(/_/g, " ");

function conditions(trialId: string, f: AuditFilter): SQL[] {
  const where: SQL[] = [eq(schema.auditLog.trialId, trialId)];
  if (f.action) where.push(eq(schema.auditLog.action, f.action));
  if (f.actorId) where.push(eq(schema.auditLog.actorId, f.actorId));
  if (f.from && /^\d{4}-\d{2}-\d{2}$/.test(f.from)) where.push(gte(schema.auditLog.at, new Date(`${f.from}T00:00:00Z`)));
  if (f.to && /^\d{4}-\d{2}-\d{2}$/.test(f.to)) where.push(lt(schema.auditLog.at, new Date(new Date(`${f.to}T00:00:00Z`).getTime() + 86_400_000)));
  if (f.text) where.push(sql`${schema.auditLog.details}::text ilike ${`%${f.text.replace(/[%_\\]/g, (c) => `\\${c}`)}%`}`);
  return where;
}

export async function listAuditEntries(trialId: string, filter: AuditFilter, { limit = 100, offset = 0 } = {}) {
  const where = and(...conditions(trialId, filter));
  const [rows, [{ total }]] = await Promise.all([
    db
      .select({ id: schema.auditLog.id, at: schema.auditLog.at, action: schema.auditLog.action, entity: schema.auditLog.entity, entityId: schema.auditLog.entityId, details: schema.auditLog.details, actor: schema.users.name })
      .from(schema.auditLog)
      .leftJoin(schema.users, eq(schema.users.id, schema.auditLog.actorId))
      .where(where)
      .orderBy(desc(schema.auditLog.at), desc(schema.auditLog.id))
      .limit(limit)
      .offset(offset),
    db.select({ total: sql<number>`count(*)::int` }).from(schema.auditLog).where(where),
  ]);
  return { rows, total };
}

/** People and actions that occur in the trial's log, for the filter's choices. */
export async function auditFilterChoices(trialId: string) {
  const [actors, actions] = await Promise.all([
    db
      .selectDistinct({ id: schema.users.id, name: schema.users.name })
      .from(schema.auditLog)
      .innerJoin(schema.users, eq(schema.users.id, schema.auditLog.actorId))
      .where(eq(schema.auditLog.trialId, trialId)),
    db.selectDistinct({ action: schema.auditLog.action }).from(schema.auditLog).where(eq(schema.auditLog.trialId, trialId)),
  ]);
  return { actors, actions: actions.map((a) => ({ value: a.action, label: actionLabel(a.action) })) };
}

/** A one-line summary of an entry's details for people. */
export function describeDetails(details: Record<string, unknown> | null): { summary: string; before: string; after: string; reason: string } {
  const d = details ?? {};
  const parts: string[] = [];
  for (const key of ["sampleCode", "kind", "filename", "rows", "season", "eventDate"]) if (d[key] !== undefined && d[key] !== null) parts.push(`${key === "sampleCode" ? "sample" : key} ${String(d[key])}`);
  const show = (v: unknown) => (v === undefined || v === null ? "" : typeof v === "object" ? Object.entries(v as Record<string, unknown>).filter(([, x]) => x !== null && x !== "").map(([k, x]) => `${k}=${x}`).join(", ") : String(v));
  return { summary: parts.join(" · "), before: show(d.before), after: show(d.after), reason: show(d.reason ?? (d.after as { reason?: string } | undefined)?.reason) };
}

export async function auditCsvRows(trialId: string, filter: AuditFilter): Promise<CsvCell[][]> {
  const { rows } = await listAuditEntries(trialId, filter, { limit: 100_000 });
  return [
    ["at_utc", "who", "action", "entity", "entity_id", "summary", "before", "after", "reason", "details_json"],
    ...rows.map((r) => {
      const d = describeDetails(r.details);
      return [r.at.toISOString(), r.actor ?? "", actionLabel(r.action), r.entity, r.entityId ?? "", d.summary, d.before, d.after, d.reason, JSON.stringify(r.details ?? {})];
    }),
  ];
}
