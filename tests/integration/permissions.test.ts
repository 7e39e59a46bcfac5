// The one guard: 401/redirect when signed out, 403 for the wrong role or another program,
// the member when allowed — checked for every permission × role of DESIGN.md's table.
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { db, schema } from "~/.server/db";
import { requirePermission } from "~/.server/permissions";
import { seedDemo } from "~/.server/seed";
import { PERMISSIONS, ROLES, type Permission } from "~/permissions";
import { DEMO_PASSWORD, demoUsers } from "../../datasets/demo/scenario";
import { cookieFor, outcome, requestAs } from "../support/sessions";

let programId: string;
let trialId: string;
const cookies: Record<string, string> = {};
let outsiderCookie: string;

beforeAll(async () => {
  ({ programId, trialId } = await seedDemo());
  for (const u of demoUsers) cookies[u.role] = await cookieFor(u.email, DEMO_PASSWORD);

  // A member of a different program, to prove programs are walled off from each other.
  const { hashPassword } = await import("better-auth/crypto");
  const otherProgram = randomUUID();
  const outsider = randomUUID();
  await db.insert(schema.programs).values({ id: otherProgram, name: "Other Station", slug: "other-station" });
  await db.insert(schema.users).values({ id: outsider, name: "Outsider", email: "outsider@other.example" });
  await db.insert(schema.accounts).values({
    id: randomUUID(),
    accountId: outsider,
    providerId: "credential",
    userId: outsider,
    password: await hashPassword("outsider-password"),
  });
  await db.insert(schema.members).values({ id: randomUUID(), organizationId: otherProgram, userId: outsider, role: "owner" });
  outsiderCookie = await cookieFor("outsider@other.example", "outsider-password");
});

describe("requirePermission", () => {
  it("redirects a signed-out page request to sign-in, keeping where it was going", async () => {
    const result = await outcome(() =>
      requirePermission(requestAs(null, `/programs/${programId}?tab=1`), { programId }, "briefs.view"),
    );
    expect(result.status).toBe(302);
    expect(result.location).toBe(`/sign-in?redirectTo=${encodeURIComponent(`/programs/${programId}?tab=1`)}`);
  });

  it("answers a signed-out API request with 401 JSON", async () => {
    const result = await outcome(() =>
      requirePermission(requestAs(null, `/api/programs/${programId}/trials`), { programId }, "results.view"),
    );
    expect(result).toMatchObject({ status: 401, body: { error: "Sign in required." } });
  });

  const cases = (Object.keys(PERMISSIONS) as Permission[]).flatMap((permission) =>
    ROLES.map((role) => ({ permission, role, allowed: (PERMISSIONS[permission] as readonly string[]).includes(role) })),
  );

  it.each(cases)("$role → $permission: allowed=$allowed (program and trial scope)", async ({ permission, role, allowed }) => {
    for (const scope of [{ programId }, { trialId }]) {
      const result = await outcome(() => requirePermission(requestAs(cookies[role], "/x"), scope, permission));
      if (allowed) {
        expect(result.status).toBe(200);
        expect(result.body).toMatchObject({ programId, role });
      } else {
        expect(result.status).toBe(403);
      }
    }
  });

  it("refuses a member of another program with 403, whatever their role there", async () => {
    const result = await outcome(() => requirePermission(requestAs(outsiderCookie, "/x"), { trialId }, "briefs.view"));
    expect(result.status).toBe(403);
  });

  it("answers 404 for a trial or program that does not exist", async () => {
    const noTrial = await outcome(() =>
      requirePermission(requestAs(cookies.owner, "/x"), { trialId: randomUUID() }, "results.view"),
    );
    expect(noTrial.status).toBe(404);
    const noProgram = await outcome(() =>
      requirePermission(requestAs(cookies.owner, "/x"), { programId: "nope" }, "results.view"),
    );
    expect(noProgram.status).toBe(404);
  });

  it("rejects a forged session cookie as signed out", async () => {
    const forged = cookies.owner.replace(/=([^.;]+)/, "=forged");
    const result = await outcome(() =>
      requirePermission(requestAs(forged, "/api/x"), { programId }, "results.view"),
    );
    expect(result.status).toBe(401);
  });
});
