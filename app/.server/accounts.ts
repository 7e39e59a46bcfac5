// Account creation happens in exactly two places: first-run setup (the administrator) and
// accepting an invitation. Both write user, credential and membership in one transaction.
import { randomUUID } from "node:crypto";
import { APIError } from "better-auth/api";
import { hashPassword } from "better-auth/crypto";
import { and, count, eq, gt, sql } from "drizzle-orm";
import { auth } from "./auth";
import { recordAudit } from "./audit";
import { db, schema, type Tx } from "./db";

export async function userCount(): Promise<number> {
  const [row] = await db.select({ n: count() }).from(schema.users);
  return row.n;
}

async function insertUserWithPassword(
  tx: Tx,
  input: { name: string; email: string; password: string; isAdmin: boolean },
): Promise<string> {
  const id = randomUUID();
  await tx.insert(schema.users).values({
    id,
    name: input.name,
    email: input.email.toLowerCase(),
    emailVerified: true,
    isAdmin: input.isAdmin,
  });
  await tx.insert(schema.accounts).values({
    id: randomUUID(),
    accountId: id,
    providerId: "credential",
    userId: id,
    password: await hashPassword(input.password),
  });
  return id;
}

export class AccountError extends Error {}

/** First-run: the first account becomes the install's administrator. Refused once any user exists. */
export async function createFirstAdministrator(input: { name: string; email: string; password: string }) {
  return db.transaction(async (tx) => {
    // Serialize concurrent first-run attempts.
    await tx.execute(sql`lock table "user" in exclusive mode`);
    const [row] = await tx.select({ n: count() }).from(schema.users);
    if (row.n > 0) throw new AccountError("This Tilthmark install already has an administrator. Sign in instead.");
    const userId = await insertUserWithPassword(tx, { ...input, isAdmin: true });
    await recordAudit({ actorId: userId, action: "create", entity: "administrator", entityId: userId }, tx);
    return userId;
  });
}

export type InvitationView = {
  id: string;
  email: string;
  role: string;
  programId: string;
  programName: string;
  inviterName: string;
  state: "open" | "used" | "expired" | "canceled";
  accountExists: boolean;
};

export async function findInvitation(invitationId: string): Promise<InvitationView | null> {
  const [row] = await db
    .select({
      id: schema.invitations.id,
      email: schema.invitations.email,
      role: schema.invitations.role,
      status: schema.invitations.status,
      expiresAt: schema.invitations.expiresAt,
      programId: schema.programs.id,
      programName: schema.programs.name,
      inviterName: schema.users.name,
    })
    .from(schema.invitations)
    .innerJoin(schema.programs, eq(schema.programs.id, schema.invitations.organizationId))
    .innerJoin(schema.users, eq(schema.users.id, schema.invitations.inviterId))
    .where(eq(schema.invitations.id, invitationId));
  if (!row) return null;
  const [existing] = await db
    .select({ id: schema.users.id })
    .from(schema.users)
    .where(eq(schema.users.email, row.email.toLowerCase()));
  const state =
    row.status === "accepted"
      ? "used"
      : row.status === "canceled" || row.status === "rejected"
        ? "canceled"
        : row.expiresAt.getTime() <= Date.now()
          ? "expired"
          : "open";
  return { ...row, state, accountExists: Boolean(existing) };
}

/**
 * Accepts an open invitation. Creates the account when the e-mail has none (name + password),
 * otherwise `existingUserId` must be the signed-in owner of that e-mail. One use only: the
 * invitation row is claimed with a conditional update inside the transaction.
 */
export async function acceptInvitation(
  invitationId: string,
  account: { kind: "new"; name: string; password: string } | { kind: "existing"; userId: string },
) {
  return db.transaction(async (tx) => {
    const [claimed] = await tx
      .update(schema.invitations)
      .set({ status: "accepted" })
      .where(
        and(
          eq(schema.invitations.id, invitationId),
          eq(schema.invitations.status, "pending"),
          gt(schema.invitations.expiresAt, new Date()),
        ),
      )
      .returning();
    if (!claimed) throw new AccountError("This invitation link has already been used, was withdrawn, or has expired.");

    const userId =
      account.kind === "new"
        ? await insertUserWithPassword(tx, {
            name: account.name,
            email: claimed.email,
            password: account.password,
            isAdmin: false,
          })
        : account.userId;

    const [already] = await tx
      .select({ id: schema.members.id })
      .from(schema.members)
      .where(and(eq(schema.members.organizationId, claimed.organizationId), eq(schema.members.userId, userId)));
    if (already) throw new AccountError("You are already a member of this program.");

    await tx.insert(schema.members).values({
      id: randomUUID(),
      organizationId: claimed.organizationId,
      userId,
      role: claimed.role,
    });
    await recordAudit(
      {
        programId: claimed.organizationId,
        actorId: userId,
        action: "accept",
        entity: "invitation",
        entityId: claimed.id,
        details: { role: claimed.role, email: claimed.email },
      },
      tx,
    );
    return { userId, programId: claimed.organizationId, email: claimed.email };
  });
}

/** Signs in with e-mail and password; returns the Set-Cookie headers or null when refused. */
export async function signInWithPassword(email: string, password: string): Promise<Headers | null> {
  try {
    const { headers } = await auth.api.signInEmail({
      body: { email: email.toLowerCase(), password, rememberMe: true },
      returnHeaders: true,
    });
    return headers;
  } catch (error) {
    if (error instanceof APIError && error.statusCode < 500) return null;
    throw error;
  }
}
