// First-run setup, invitations (one use, expiry), membership changes and password reset,
// driven through the route actions exactly as a browser form would post them.
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { db, schema } from "~/.server/db";
import * as homeRoute from "~/routes/home";
import * as invitationRoute from "~/routes/invitation";
import * as membersRoute from "~/routes/program.members";
import * as setupRoute from "~/routes/setup";
import * as forgotRoute from "~/routes/forgot-password";
import * as resetRoute from "~/routes/reset-password";
import * as signInRoute from "~/routes/sign-in";
import { cookieFor, formPost, outcome } from "../support/sessions";

const ctx = {} as never;
let programId: string;
let ownerCookie: string;

async function latestMailTo(address: string) {
  // The SMTP fake stores messages asynchronously; wait briefly for delivery.
  for (let i = 0; i < 50; i++) {
    const rows = await db.select().from(schema.mailboxMessages).where(eq(schema.mailboxMessages.envelopeTo, address));
    if (rows.length > 0) return rows[rows.length - 1];
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`no mail arrived for ${address}`);
}

async function post(route: { action: (args: never) => Promise<unknown> }, cookie: string | null, path: string, fields: Record<string, string>, params = {}) {
  return outcome(() => route.action({ request: formPost(cookie, path, fields), params, context: ctx } as never));
}

beforeAll(async () => {
  // First run on an empty database: the administrator creates the first program.
  const setup = await post(setupRoute, null, "/setup", {
    name: "Ada Admin",
    email: "Ada@Station.example",
    password: "correct-horse-battery",
    confirmPassword: "correct-horse-battery",
  });
  expect(setup.status).toBe(302);
  ownerCookie = await cookieFor("ada@station.example", "correct-horse-battery");
  const created = await post(homeRoute, ownerCookie, "/home", { name: "Upland Soils Lab" });
  expect(created.body).toMatchObject({ created: "Upland Soils Lab" });
  const [program] = await db.select().from(schema.programs).where(eq(schema.programs.name, "Upland Soils Lab"));
  programId = program.id;
});

describe("first-run setup", () => {
  it("made the first account the administrator", async () => {
    const [user] = await db.select().from(schema.users).where(eq(schema.users.email, "ada@station.example"));
    expect(user.isAdmin).toBe(true);
  });

  it("refuses a second administrator and creates nothing", async () => {
    const before = await db.select().from(schema.users);
    const again = await outcome(() => setupRoute.loader());
    expect(again).toMatchObject({ status: 302, location: "/sign-in" });
    const result = await post(setupRoute, null, "/setup", {
      name: "Mallory",
      email: "mallory@evil.example",
      password: "correct-horse-battery",
      confirmPassword: "correct-horse-battery",
    });
    expect(result.status).toBe(409);
    expect(result.body).toBe("This Tilthmark install already has an administrator. Sign in instead.");
    expect(await db.select().from(schema.users)).toHaveLength(before.length);
  });
});

describe("sign-in form", () => {
  it("puts messages beside the fields for empty input", async () => {
    const result = await post(signInRoute, null, "/sign-in", { email: "", password: "" });
    expect(result.status).toBe(400);
    expect(result.body).toMatchObject({
      errors: { email: ["Enter an e-mail address."], password: ["Enter your password."] },
    });
  });

  it("refuses a wrong password without saying which part was wrong and keeps the e-mail", async () => {
    const result = await post(signInRoute, null, "/sign-in", { email: "ada@station.example", password: "wrong-password" });
    expect(result).toMatchObject({
      status: 400,
      body: { message: "That e-mail and password do not match an account.", values: { email: "ada@station.example" } },
    });
    expect(JSON.stringify(result.body)).not.toContain("wrong-password");
  });
});

describe("invitations", () => {
  const path = () => `/programs/${programId}/members`;

  it("rejects a forged role and an over-long e-mail beside the field, inviting nobody", async () => {
    const forged = await post(membersRoute, ownerCookie, path(), { intent: "invite", email: "x@uni.example", role: "admin" }, { programId });
    expect(forged.status).toBe(400);
    expect(forged.body).toMatchObject({ errors: { role: ["Choose one of the listed roles."] } });
    const long = await post(membersRoute, ownerCookie, path(), { intent: "invite", email: `${"a".repeat(300)}@uni.example`, role: "technician" }, { programId });
    expect(long.status).toBe(400);
    expect(long.body).toMatchObject({ errors: { email: ["That e-mail address is too long."] } });
    expect(await db.select().from(schema.invitations)).toHaveLength(0);
  });

  it("e-mails a one-time link that creates the account, and refuses the link the second time", async () => {
    const sent = await post(membersRoute, ownerCookie, path(), { intent: "invite", email: "Kim@Uni.example", role: "collaborator" }, { programId });
    expect(sent.status).toBe(200);
    const mail = await latestMailTo("kim@uni.example");
    const link = /\/invitations\/(\S+)/.exec(mail.text ?? "");
    expect(link).not.toBeNull();
    const invitationId = link![1];

    const accepted = await post(invitationRoute, null, `/invitations/${invitationId}`, {
      name: "Kim Park",
      password: "kims-long-password",
      confirmPassword: "kims-long-password",
    }, { invitationId });
    expect(accepted).toMatchObject({ status: 302, location: `/programs/${programId}` });
    const [member] = await db
      .select({ role: schema.members.role })
      .from(schema.members)
      .innerJoin(schema.users, eq(schema.users.id, schema.members.userId))
      .where(and(eq(schema.users.email, "kim@uni.example"), eq(schema.members.organizationId, programId)));
    expect(member.role).toBe("collaborator");

    const again = await post(invitationRoute, null, `/invitations/${invitationId}`, {
      name: "Someone Else",
      password: "another-password",
      confirmPassword: "another-password",
    }, { invitationId });
    expect(again.status).toBe(400);
    expect(again.body).toMatchObject({ message: "This invitation has already been used. If that was you, sign in." });
    expect(await db.select().from(schema.users).where(eq(schema.users.email, "kim@uni.example"))).toHaveLength(1);
  });

  it("refuses an expired invitation", async () => {
    await post(membersRoute, ownerCookie, path(), { intent: "invite", email: "late@uni.example", role: "technician" }, { programId });
    const [inv] = await db.select().from(schema.invitations).where(eq(schema.invitations.email, "late@uni.example"));
    await db.update(schema.invitations).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(schema.invitations.id, inv.id));
    const result = await post(invitationRoute, null, `/invitations/${inv.id}`, {
      name: "Late Larry",
      password: "larrys-long-password",
      confirmPassword: "larrys-long-password",
    }, { invitationId: inv.id });
    expect(result.status).toBe(400);
    expect(result.body).toMatchObject({ message: "This invitation has expired. Ask the program owner to send a new one." });
    expect(await db.select().from(schema.users).where(eq(schema.users.email, "late@uni.example"))).toHaveLength(0);
  });
});

describe("membership changes", () => {
  const path = () => `/programs/${programId}/members`;
  const memberIdOf = async (email: string) => {
    const [row] = await db
      .select({ id: schema.members.id })
      .from(schema.members)
      .innerJoin(schema.users, eq(schema.users.id, schema.members.userId))
      .where(and(eq(schema.users.email, email), eq(schema.members.organizationId, programId)));
    return row.id;
  };

  it("never removes or demotes the last owner", async () => {
    const ownerMember = await memberIdOf("ada@station.example");
    const demote = await post(membersRoute, ownerCookie, path(), { intent: "change-role", memberId: ownerMember, role: "researcher" }, { programId });
    expect(demote.status).toBe(400);
    expect(demote.body).toMatchObject({ message: "A program needs at least one owner. Make someone else an owner first." });
    const remove = await post(membersRoute, ownerCookie, path(), { intent: "remove", memberId: ownerMember }, { programId });
    expect(remove.status).toBe(400);
    const [still] = await db.select().from(schema.members).where(eq(schema.members.id, ownerMember));
    expect(still.role).toBe("owner");
  });

  it("changes a role, then removes the member while keeping the person's account", async () => {
    const kim = await memberIdOf("kim@uni.example");
    const changed = await post(membersRoute, ownerCookie, path(), { intent: "change-role", memberId: kim, role: "technician" }, { programId });
    expect(changed.status).toBe(200);
    const [after] = await db.select().from(schema.members).where(eq(schema.members.id, kim));
    expect(after.role).toBe("technician");

    const removed = await post(membersRoute, ownerCookie, path(), { intent: "remove", memberId: kim }, { programId });
    expect(removed.status).toBe(200);
    expect(await db.select().from(schema.members).where(eq(schema.members.id, kim))).toHaveLength(0);
    expect(await db.select().from(schema.users).where(eq(schema.users.email, "kim@uni.example"))).toHaveLength(1);
    const audit = await db.select().from(schema.auditLog).where(eq(schema.auditLog.entityId, kim));
    expect(audit.map((a) => a.action).sort()).toEqual(["change-role", "remove"]);
  });

  it("refuses member management to a non-owner with 403", async () => {
    await post(membersRoute, ownerCookie, path(), { intent: "invite", email: "tech@uni.example", role: "technician" }, { programId });
    const mail = await latestMailTo("tech@uni.example");
    const invitationId = /\/invitations\/(\S+)/.exec(mail.text ?? "")![1];
    await post(invitationRoute, null, `/invitations/${invitationId}`, { name: "Tess Tech", password: "tess-long-password", confirmPassword: "tess-long-password" }, { invitationId });
    const techCookie = await cookieFor("tech@uni.example", "tess-long-password");
    const result = await post(membersRoute, techCookie, path(), { intent: "invite", email: "friend@uni.example", role: "owner" }, { programId });
    expect(result.status).toBe(403);
    expect(await db.select().from(schema.invitations).where(eq(schema.invitations.email, "friend@uni.example"))).toHaveLength(0);
  });
});

describe("password reset", () => {
  it("mails a link whose token sets a new password once", async () => {
    const asked = await post(forgotRoute, null, "/forgot-password", { email: "ada@station.example" });
    expect(asked.body).toMatchObject({ sent: true });
    const mail = await latestMailTo("ada@station.example");
    const token = decodeURIComponent(/token=(\S+)/.exec(mail.text ?? "")![1]);

    const mismatch = await post(resetRoute, null, "/reset-password", { token, password: "brand-new-password", confirmPassword: "different-password" });
    expect(mismatch.body).toMatchObject({ errors: { confirmPassword: ["The two passwords differ."] } });

    const done = await post(resetRoute, null, "/reset-password", { token, password: "brand-new-password", confirmPassword: "brand-new-password" });
    expect(done.body).toMatchObject({ done: true });
    await expect(cookieFor("ada@station.example", "brand-new-password")).resolves.toContain("session_token");
    await expect(cookieFor("ada@station.example", "correct-horse-battery")).rejects.toThrow();

    const reused = await post(resetRoute, null, "/reset-password", { token, password: "third-password-x", confirmPassword: "third-password-x" });
    expect(reused.status).toBe(400);
  });

  it("answers the same for an unknown address, so the form cannot probe accounts", async () => {
    const result = await post(forgotRoute, null, "/forgot-password", { email: "nobody@nowhere.example" });
    expect(result.body).toMatchObject({ sent: true });
  });
});

describe("account preferences", () => {
  it("saves the unit system and refuses a forged value beside the field", async () => {
    const accountRoute = await import("~/routes/account");
    const cookie = await cookieFor("ada@station.example", "brand-new-password");
    const forged = await post(accountRoute, cookie, "/account", { intent: "preferences", name: "Ada Admin", unitSystem: "imperial", notifyBriefs: "yes" });
    expect(forged.status).toBe(400);
    expect(forged.body).toMatchObject({ errors: { unitSystem: ["Choose SI or US customary units."] } });
    const saved = await post(accountRoute, cookie, "/account", { intent: "preferences", name: "Ada Admin", unitSystem: "us", notifyBriefs: "no" });
    expect(saved.body).toMatchObject({ ok: "Preferences saved." });
    const [user] = await db.select().from(schema.users).where(eq(schema.users.email, "ada@station.example"));
    expect(user).toMatchObject({ unitSystem: "us", notifyBriefs: false });
  });

  it("refuses an empty or over-long program name beside the field and creates nothing", async () => {
    const before = await db.select().from(schema.programs);
    const cookie = await cookieFor("ada@station.example", "brand-new-password");
    const empty = await post(homeRoute, cookie, "/home", { name: "  " });
    expect(empty.body).toMatchObject({ errors: { name: ["Use at least 3 characters."] } });
    const long = await post(homeRoute, cookie, "/home", { name: "x".repeat(101) });
    expect(long.body).toMatchObject({ errors: { name: ["Use at most 100 characters."] } });
    expect(await db.select().from(schema.programs)).toHaveLength(before.length);
  });

  it("refuses program creation to someone who is not the administrator", async () => {
    const cookie = await cookieFor("tech@uni.example", "tess-long-password");
    const result = await post(homeRoute, cookie, "/home", { name: "Rogue Program" });
    expect(result.status).toBe(403);
  });
});
