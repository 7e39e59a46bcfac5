// Programs, their members and invitations. Membership changes go through better-auth's
// organization plugin (which enforces "never the last owner"); Tilthmark adds audit entries.
import { APIError } from "better-auth/api";
import { and, asc, desc, eq } from "drizzle-orm";
import type { Role } from "~/permissions";
import { auth } from "./auth";
import { recordAudit } from "./audit";
import { db, schema } from "./db";
import { sharedRead } from "./request-context";

export class ProgramError extends Error {}

/** Turns better-auth's refusal into a sentence for the page; other errors propagate. */
async function viaAuth<T>(call: () => Promise<T>): Promise<T> {
  try {
    return await call();
  } catch (error) {
    if (error instanceof APIError && error.statusCode < 500) {
      throw new ProgramError(friendlyAuthMessage(error.body?.code, error.message));
    }
    throw error;
  }
}

function friendlyAuthMessage(code: string | undefined, fallback: string): string {
  switch (code) {
    case "YOU_CANNOT_LEAVE_THE_ORGANIZATION_WITHOUT_AN_OWNER":
    case "YOU_CANNOT_LEAVE_THE_ORGANIZATION_AS_THE_ONLY_OWNER":
      return "A program needs at least one owner. Make someone else an owner first.";
    case "USER_IS_ALREADY_A_MEMBER_OF_THIS_ORGANIZATION":
      return "That person is already a member of this program.";
    case "ORGANIZATION_ALREADY_EXISTS":
    case "ORGANIZATION_SLUG_ALREADY_TAKEN":
      return "A program with that name already exists.";
    case "INVITATION_LIMIT_REACHED":
      return "This program has too many open invitations. Withdraw some first.";
    default:
      return fallback || "The request was refused.";
  }
}

export function slugify(name: string): string {
  return (
    name
      .normalize("NFKD")
      .replace(/[\u0300-\u036f]/g, "")
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, "-")
      .replace(/^-|-$/g, "")
      .slice(0, 48) || "program"
  );
}

export async function createProgram(request: Request, actorId: string, name: string) {
  const program = await viaAuth(() =>
    auth.api.createOrganization({ body: { name, slug: slugify(name) }, headers: request.headers }),
  );
  if (!program) throw new ProgramError("The program could not be created.");
  await recordAudit({ programId: program.id, actorId, action: "create", entity: "program", entityId: program.id });
  return program;
}

export type ProgramSummary = { id: string; name: string; role: Role };

/** The programs a user belongs to, with their role; read once per request (the app layout and home both show them). */
export function listProgramsOf(request: Request, userId: string): Promise<ProgramSummary[]> {
  return sharedRead(request, `programs-of|${userId}`, async () => {
    const rows = await db
      .select({ id: schema.programs.id, name: schema.programs.name, role: schema.members.role })
      .from(schema.members)
      .innerJoin(schema.programs, eq(schema.programs.id, schema.members.organizationId))
      .where(eq(schema.members.userId, userId))
      .orderBy(asc(schema.programs.name));
    return rows.map((r) => ({ ...r, role: r.role as Role }));
  });
}

export async function listMembers(programId: string) {
  return db
    .select({
      memberId: schema.members.id,
      userId: schema.users.id,
      name: schema.users.name,
      email: schema.users.email,
      role: schema.members.role,
      joinedAt: schema.members.createdAt,
    })
    .from(schema.members)
    .innerJoin(schema.users, eq(schema.users.id, schema.members.userId))
    .where(eq(schema.members.organizationId, programId))
    .orderBy(asc(schema.users.name));
}

export async function listOpenInvitations(programId: string) {
  return db
    .select({
      id: schema.invitations.id,
      email: schema.invitations.email,
      role: schema.invitations.role,
      expiresAt: schema.invitations.expiresAt,
      createdAt: schema.invitations.createdAt,
    })
    .from(schema.invitations)
    .where(and(eq(schema.invitations.organizationId, programId), eq(schema.invitations.status, "pending")))
    .orderBy(desc(schema.invitations.createdAt));
}

export async function inviteMember(request: Request, actorId: string, programId: string, email: string, role: Role) {
  const invitation = await viaAuth(() =>
    auth.api.createInvitation({
      body: { email: email.toLowerCase(), role, organizationId: programId, resend: true },
      headers: request.headers,
    }),
  );
  await recordAudit({
    programId,
    actorId,
    action: "invite",
    entity: "invitation",
    entityId: invitation?.id ?? null,
    details: { email: email.toLowerCase(), role },
  });
  return invitation;
}

async function memberOfProgram(programId: string, memberId: string) {
  const [member] = await db
    .select({ id: schema.members.id, role: schema.members.role, userId: schema.members.userId })
    .from(schema.members)
    .where(and(eq(schema.members.id, memberId), eq(schema.members.organizationId, programId)));
  if (!member) throw new ProgramError("That member is not in this program.");
  return member;
}

export async function changeRole(
  request: Request,
  actorId: string,
  programId: string,
  memberId: string,
  role: Role,
) {
  const member = await memberOfProgram(programId, memberId);
  await viaAuth(() =>
    auth.api.updateMemberRole({ body: { memberId, role, organizationId: programId }, headers: request.headers }),
  );
  await recordAudit({
    programId,
    actorId,
    action: "change-role",
    entity: "member",
    entityId: memberId,
    details: { from: member.role, to: role, userId: member.userId },
  });
}

/** Removes a membership. The user and everything they uploaded stay, attributed to them. */
export async function removeMember(request: Request, actorId: string, programId: string, memberId: string) {
  const member = await memberOfProgram(programId, memberId);
  await viaAuth(() =>
    auth.api.removeMember({ body: { memberIdOrEmail: memberId, organizationId: programId }, headers: request.headers }),
  );
  await recordAudit({
    programId,
    actorId,
    action: "remove",
    entity: "member",
    entityId: memberId,
    details: { role: member.role, userId: member.userId },
  });
}

export async function withdrawInvitation(request: Request, actorId: string, programId: string, invitationId: string) {
  const [invitation] = await db
    .select({ id: schema.invitations.id })
    .from(schema.invitations)
    .where(and(eq(schema.invitations.id, invitationId), eq(schema.invitations.organizationId, programId)));
  if (!invitation) throw new ProgramError("That invitation is not in this program.");
  await viaAuth(() => auth.api.cancelInvitation({ body: { invitationId }, headers: request.headers }));
  await recordAudit({ programId, actorId, action: "withdraw", entity: "invitation", entityId: invitationId });
}
