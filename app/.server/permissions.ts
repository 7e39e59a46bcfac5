// The guard every loader and action calls. It checks a permission (never a rank) for a scope.
import { and, eq, inArray } from "drizzle-orm";
import { data, redirect } from "react-router";
import { roleCan, type Permission, type Role } from "~/permissions";
import { userForApiKey } from "./api-keys";
import { noteUser, sharedRead } from "./request-context";
import { db, schema } from "./db";
import { getSession, type SessionUser } from "./session";

export type Scope = { programId: string } | { trialId: string };

export type ProgramMember = {
  user: SessionUser;
  programId: string;
  programName: string;
  role: Role;
  memberId: string;
};

function isApiRequest(request: Request) {
  return new URL(request.url).pathname.startsWith("/api/");
}

/** 401: pages redirect to sign-in and come back; API routes answer JSON. */
export function unauthorized(request: Request): never {
  if (isApiRequest(request)) {
    throw data({ error: "Sign in required." }, { status: 401 });
  }
  const url = new URL(request.url);
  const back = url.pathname + url.search;
  throw redirect(`/sign-in?redirectTo=${encodeURIComponent(back)}`);
}

export function forbidden(request: Request, message: string): never {
  throw data(isApiRequest(request) ? { error: message } : message, { status: 403 });
}

export function notFound(request: Request, message: string): never {
  throw data(isApiRequest(request) ? { error: message } : message, { status: 404 });
}

/**
 * Signed-in user or 401. For pages that belong to no program (home, account). JSON routes under
 * /api/ also accept an `x-api-key` header, which acts with its owner's memberships and roles.
 */
export function requireUser(request: Request): Promise<SessionUser> {
  return sharedRead(request, "user", () => readUser(request));
}

async function readUser(request: Request): Promise<SessionUser> {
  const apiKey = request.headers.get("x-api-key");
  if (apiKey && isApiRequest(request)) {
    const user = await userForApiKey(apiKey);
    if (!user) throw data({ error: "This API key is not valid or was revoked." }, { status: 401 });
    noteUser(user.id);
    return user;
  }
  const session = await getSession(request);
  if (!session) unauthorized(request);
  noteUser(session.user.id);
  return session.user;
}

/** The install's administrator (the first account) creates programs. */
export async function requireAdmin(request: Request): Promise<SessionUser> {
  const user = await requireUser(request);
  if (!user.isAdmin) forbidden(request, "Only the administrator of this Tilthmark install can do this.");
  return user;
}

/** The program of a scope as a subquery-ready condition; trial ids that are not UUIDs match nothing. */
function programCondition(scope: Scope) {
  if ("programId" in scope) return eq(schema.programs.id, scope.programId);
  if (!/^[0-9a-f-]{36}$/i.test(scope.trialId)) return null;
  return inArray(
    schema.programs.id,
    db.select({ programId: schema.trials.programId }).from(schema.trials).where(eq(schema.trials.id, scope.trialId)),
  );
}

/**
 * Returns the signed-in member of the scope's program when their role grants `permission`;
 * otherwise throws 401 (signed out), 404 (no such program or trial) or 403 (not allowed).
 */
export async function requirePermission(
  request: Request,
  scope: Scope,
  permission: Permission,
): Promise<ProgramMember> {
  const user = await requireUser(request);
  const condition = programCondition(scope);
  if (!condition) notFound(request, "No such trial.");

  // One query: the scope's program and the user's membership in it (if any).
  const scopeKey = "programId" in scope ? `program:${scope.programId}` : `trial:${scope.trialId}`;
  const [row] = await sharedRead(request, `membership|${scopeKey}`, async () =>
    db
      .select({
        programId: schema.programs.id,
        memberId: schema.members.id,
        role: schema.members.role,
        programName: schema.programs.name,
      })
      .from(schema.programs)
      .leftJoin(
        schema.members,
        and(eq(schema.members.organizationId, schema.programs.id), eq(schema.members.userId, user.id)),
      )
      .where(condition),
  );

  if (!row) notFound(request, "trialId" in scope ? "No such trial." : "No such program.");
  if (!row.memberId || !row.role) forbidden(request, "You are not a member of this program.");
  if (!roleCan(row.role, permission)) {
    forbidden(request, `Your role (${row.role}) does not allow this. Ask a program owner if you need it.`);
  }
  return { user, programId: row.programId, programName: row.programName, role: row.role as Role, memberId: row.memberId };
}
