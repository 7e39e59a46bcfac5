// API keys for scripts that call Tilthmark's JSON routes. A key acts as its owner, with exactly the
// owner's memberships and roles. Keys are random (256 bits), so a SHA-256 of the key is a safe
// lookup value to keep at rest (common practice); the key itself is shown once and never stored.
import { createHash, randomBytes } from "node:crypto";
import { and, desc, eq, isNull } from "drizzle-orm";
import { recordAudit } from "./audit";
import { db, schema } from "./db";
import type { SessionUser } from "./session";

const hashOf = (key: string) => createHash("sha256").update(key, "utf8").digest("hex");

export async function createApiKey(userId: string, name: string): Promise<{ key: string; prefix: string }> {
  const key = `tm_${randomBytes(32).toString("base64url")}`;
  const prefix = key.slice(0, 10);
  await db.transaction(async (tx) => {
    const [row] = await tx.insert(schema.apiKeys).values({ userId, name, prefix, keyHash: hashOf(key) }).returning();
    await recordAudit({ actorId: userId, action: "create", entity: "api-key", entityId: row.id, details: { name, prefix } }, tx);
  });
  return { key, prefix };
}

export async function listApiKeys(userId: string) {
  return db
    .select({
      id: schema.apiKeys.id,
      name: schema.apiKeys.name,
      prefix: schema.apiKeys.prefix,
      createdAt: schema.apiKeys.createdAt,
      lastUsedAt: schema.apiKeys.lastUsedAt,
      revokedAt: schema.apiKeys.revokedAt,
    })
    .from(schema.apiKeys)
    .where(eq(schema.apiKeys.userId, userId))
    .orderBy(desc(schema.apiKeys.createdAt));
}

/** Revokes one of the user's own keys; returns false when the key is not theirs or already revoked. */
export async function revokeApiKey(userId: string, keyId: string): Promise<boolean> {
  return db.transaction(async (tx) => {
    const revoked = await tx
      .update(schema.apiKeys)
      .set({ revokedAt: new Date() })
      .where(and(eq(schema.apiKeys.id, keyId), eq(schema.apiKeys.userId, userId), isNull(schema.apiKeys.revokedAt)))
      .returning({ id: schema.apiKeys.id });
    if (revoked.length === 0) return false;
    await recordAudit({ actorId: userId, action: "revoke", entity: "api-key", entityId: keyId }, tx);
    return true;
  });
}

/** The user an `x-api-key` header stands for, or null for an unknown or revoked key. */
export async function userForApiKey(key: string): Promise<SessionUser | null> {
  if (!/^tm_[A-Za-z0-9_-]{20,100}$/.test(key)) return null;
  const [row] = await db
    .select({
      keyId: schema.apiKeys.id,
      id: schema.users.id,
      name: schema.users.name,
      email: schema.users.email,
      isAdmin: schema.users.isAdmin,
      unitSystem: schema.users.unitSystem,
    })
    .from(schema.apiKeys)
    .innerJoin(schema.users, eq(schema.users.id, schema.apiKeys.userId))
    .where(and(eq(schema.apiKeys.keyHash, hashOf(key)), isNull(schema.apiKeys.revokedAt)));
  if (!row) return null;
  await db.update(schema.apiKeys).set({ lastUsedAt: new Date() }).where(eq(schema.apiKeys.id, row.keyId));
  return { id: row.id, name: row.name, email: row.email, isAdmin: row.isAdmin, unitSystem: row.unitSystem === "us" ? "us" : "si" };
}
