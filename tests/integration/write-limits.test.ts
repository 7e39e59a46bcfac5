// Lab-file uploads are rate-limited per person (RATE_LIMIT_UPLOAD per window; 60 per 10 minutes by
// default) and invitations per inviting owner (RATE_LIMIT_INVITE; 30), see app/.server/env.ts.
// This file lowers the limits to 3 uploads and 2 invitations before the app's modules load.
import { vi } from "vitest";

vi.hoisted(() => {
  process.env.RATE_LIMIT_UPLOAD = "3";
  process.env.RATE_LIMIT_INVITE = "2";
});

import { eq } from "drizzle-orm";
import { beforeAll, expect, it } from "vitest";
import { db, schema } from "~/.server/db";
import { seedDemo } from "~/.server/seed";
import { action as intakeAction } from "~/routes/trial.intake";
import { action as membersAction } from "~/routes/program.members";
import { DEMO_PASSWORD, demoUsers } from "../../datasets/demo/scenario";
import { uploadRequest } from "../support/intake";
import { cookieFor, formPost, outcome } from "../support/sessions";

let trialId: string;
let programId: string;
const cookies: Record<string, string> = {};
const uploadsKept = async () => (await db.select({ id: schema.uploads.id }).from(schema.uploads).where(eq(schema.uploads.trialId, trialId))).length;
const upload = (role: string, n: number) =>
  outcome(() =>
    intakeAction({ request: uploadRequest(cookies[role], trialId, { name: `bad-${role}-${n}.csv`, bytes: `not,a,lab\nfile,from,${role}-${n}\n` }), params: { trialId }, context: {} } as never),
  );

beforeAll(async () => {
  ({ trialId, programId } = await seedDemo());
  for (const u of demoUsers) cookies[u.role] = await cookieFor(u.email, DEMO_PASSWORD);
});

it("refuses a person's fourth upload in the window with a sentence saying when to retry, and keeps nothing of it", async () => {
  for (let n = 0; n < 3; n++) {
    // Received and kept for review (its problems are listed there): the limit counts every file.
    expect((await upload("technician", n)).status).toBe(302);
  }
  const kept = await uploadsKept();
  const blocked = await upload("technician", 3);
  expect(blocked.status).toBe(400);
  expect((blocked.body as { errors: { file: string[] } }).errors.file[0]).toMatch(/^Too many uploads\. Please wait \d+ minutes? and try again\.$/);
  expect(await uploadsKept()).toBe(kept);
  // Another person is not affected.
  expect((await upload("researcher", 0)).status).toBe(302);
  expect(await uploadsKept()).toBe(kept + 1);
});

it("refuses an owner's third invitation in the window and sends nothing for it", async () => {
  const invite = (n: number) =>
    outcome(() =>
      membersAction({
        request: formPost(cookies.owner, `/programs/${programId}/members`, { intent: "invite", email: `field-hand-${n}@uni.example`, role: "technician" }),
        params: { programId },
        context: {},
      } as never),
    );
  const invitations = async () => (await db.select({ id: schema.invitations.id }).from(schema.invitations)).length;
  for (const n of [1, 2]) expect((await invite(n)).body).toEqual({ ok: `Invitation sent to field-hand-${n}@uni.example as technician.` });
  const before = await invitations();
  const blocked = await invite(3);
  expect(blocked.status).toBe(400);
  expect((blocked.body as { message: string }).message).toMatch(/^Too many attempts\. Please wait \d+ minutes? and try again\.$/);
  expect(await invitations()).toBe(before);
});
