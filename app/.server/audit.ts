import type { Db, Tx } from "./db";
import { db as defaultDb, schema } from "./db";

export type AuditEntry = {
  programId?: string | null;
  trialId?: string | null;
  actorId: string | null;
  action: string;
  entity: string;
  entityId?: string | null;
  details?: Record<string, unknown>;
};

/** Records who did what. Pass the transaction so the entry commits with the change it records. */
export async function recordAudit(entry: AuditEntry, tx: Db | Tx = defaultDb) {
  await tx.insert(schema.auditLog).values(entry);
}
