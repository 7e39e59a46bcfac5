// SIGTERM while a request is in flight: the server stops taking new connections, finishes the
// request it is serving (here a sign-in whose form is still arriving), then exits with status 0.
import { afterAll, expect, inject, it } from "vitest";
import { type AppServer, startAppServer } from "../support/app-server";
import { DEMO_PASSWORD } from "../../datasets/demo/scenario";

const APP_PORT = Number(process.env.TILTHMARK_E2E_PORT ?? 3111) + 3;
let app: AppServer | undefined;

afterAll(async () => {
  await app?.stop(2_000);
});

const pause = (ms: number) => new Promise((r) => setTimeout(r, ms));

it("finishes the request in flight and exits cleanly on SIGTERM", async () => {
  app = await startAppServer({ port: APP_PORT, databaseUrl: inject("databaseUrl"), env: { RATE_LIMIT_SIGN_IN: "500" } });
  const form = new TextEncoder().encode(new URLSearchParams({ email: "collaborator@cedarhollow.example", password: DEMO_PASSWORD }).toString());
  let sentFirstPart!: () => void;
  const firstPartSent = new Promise<void>((r) => (sentFirstPart = r));
  const body = new ReadableStream<Uint8Array>({
    async start(controller) {
      controller.enqueue(form.slice(0, 10));
      sentFirstPart();
      await pause(1_500); // SIGTERM arrives in here
      controller.enqueue(form.slice(10));
      controller.close();
    },
  });
  const exited = new Promise<number | null>((resolve) => app!.process.once("exit", (code) => resolve(code)));
  const inFlight = fetch(`${app.baseUrl}/sign-in`, {
    method: "POST",
    body,
    duplex: "half",
    redirect: "manual",
    headers: { "Content-Type": "application/x-www-form-urlencoded", Origin: app.baseUrl },
  } as RequestInit);

  await firstPartSent;
  await pause(300);
  app.process.kill("SIGTERM");
  await pause(300);
  // No new connections once stopping.
  await expect(fetch(`${app.baseUrl}/healthz`)).rejects.toThrow();

  const res = await inFlight;
  expect(res.status).toBe(302);
  expect(res.headers.get("set-cookie")).toContain("session_token");
  expect(await exited).toBe(0);
});
