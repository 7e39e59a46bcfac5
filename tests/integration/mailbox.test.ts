// /dev/mailbox exists only in demo mode.
import { expect, it } from "vitest";

it("answers 404 outside demo mode", async () => {
  process.env.TILTHMARK_DEMO = "0";
  const route = await import("~/routes/dev.mailbox");
  const thrown = await route.loader().then(
    () => null,
    (error: unknown) => error,
  );
  expect(thrown).toMatchObject({ type: "DataWithResponseInit", init: { status: 404 } });
});
