// Behind HTTPS (TILTHMARK_BASE_URL starting with https://) the session cookie is Secure, with the
// __Secure- name prefix browsers enforce, besides HttpOnly and SameSite=Lax. This file sets the
// HTTPS address before the app's modules load; the plain-HTTP flags are checked in the browser tests.
import { vi } from "vitest";

vi.hoisted(() => {
  process.env.TILTHMARK_BASE_URL = "https://trials.cedarhollow.example";
});

import { expect, it } from "vitest";
import { signInWithPassword } from "~/.server/accounts";
import { seedDemo } from "~/.server/seed";
import { DEMO_PASSWORD } from "../../datasets/demo/scenario";

it("marks the session cookie Secure, HttpOnly and SameSite=Lax", async () => {
  await seedDemo();
  const headers = await signInWithPassword("researcher@cedarhollow.example", DEMO_PASSWORD);
  const session = headers?.getSetCookie().find((c) => c.includes("session_token"));
  expect(session).toMatch(/^__Secure-/);
  expect(session).toMatch(/;\s*Secure/i);
  expect(session).toMatch(/;\s*HttpOnly/i);
  expect(session).toMatch(/;\s*SameSite=Lax/i);
});
