// Sign-in, reset and invitation requests are rate-limited (limits from the environment; 10 sign-ins
// and 5 resets per address per window by default, see app/.server/env.ts).
import { expect, it } from "vitest";
import * as forgot from "~/routes/forgot-password";
import * as signIn from "~/routes/sign-in";
import { formPost, outcome } from "../support/sessions";

const post = (route: { action: (a: never) => Promise<unknown> }, path: string, fields: Record<string, string>) =>
  outcome(() => route.action({ request: formPost(null, path, fields), params: {}, context: {} } as never));

it("stops the eleventh sign-in attempt for one address and says when to retry", async () => {
  for (let i = 0; i < 10; i++) {
    const attempt = await post(signIn, "/sign-in", { email: "target@uni.example", password: `guess-${i}` });
    expect(attempt.body).toMatchObject({ message: "That e-mail and password do not match an account." });
  }
  const blocked = await post(signIn, "/sign-in", { email: "Target@Uni.example", password: "guess-10" });
  expect(blocked.status).toBe(400);
  expect((blocked.body as { message: string }).message).toMatch(/^Too many attempts\. Please wait \d+ minutes? and try again\.$/);
  // Another address is not affected.
  const other = await post(signIn, "/sign-in", { email: "other@uni.example", password: "guess" });
  expect(other.body).toMatchObject({ message: "That e-mail and password do not match an account." });
});

it("stops the sixth password-reset request for one address", async () => {
  for (let i = 0; i < 5; i++) {
    expect((await post(forgot, "/forgot-password", { email: "reset@uni.example" })).body).toMatchObject({ sent: true });
  }
  const blocked = await post(forgot, "/forgot-password", { email: "reset@uni.example" });
  expect((blocked.body as { message: string }).message).toMatch(/^Too many attempts/);
});
