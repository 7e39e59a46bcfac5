// One structured log line per request: time, level, method, path, status, ms and the user id, and
// nothing else — no query string, body, cookie, API key, password or token ever reaches the log.
import { afterEach, expect, it, vi } from "vitest";
import { guardRequest } from "~/.server/http-guard";
import { noteUser } from "~/.server/request-context";

const SECRETS = ["hunter2-password", "reset-token-abc123", "tmk_live_secretkey", "session-cookie-value"];

afterEach(() => {
  vi.restoreAllMocks();
});

it("logs method, path, status, time and user id, and never a secret", async () => {
  delete process.env.TILTHMARK_QUIET_LOGS;
  const lines: string[] = [];
  vi.spyOn(process.stdout, "write").mockImplementation((chunk: string | Uint8Array) => {
    lines.push(String(chunk));
    return true;
  });
  const request = new Request(`http://127.0.0.1:3999/reset-password?token=${SECRETS[1]}`, {
    method: "POST",
    body: new URLSearchParams({ password: SECRETS[0], confirmPassword: SECRETS[0] }),
    headers: { "x-api-key": SECRETS[2], cookie: `better-auth.session_token=${SECRETS[3]}`, Origin: "http://127.0.0.1:3999" },
  });
  const response = await guardRequest(request, async () => {
    noteUser("user-42");
    await request.text();
    return new Response(null, { status: 302, headers: { Location: "/sign-in" } });
  });
  expect(response.status).toBe(302);

  expect(lines).toHaveLength(1);
  const entry = JSON.parse(lines[0]);
  expect(Object.keys(entry).sort()).toEqual(["level", "method", "ms", "path", "status", "time", "userId"]);
  expect(entry).toMatchObject({ level: "info", method: "POST", path: "/reset-password", status: 302, userId: "user-42" });
  expect(typeof entry.ms).toBe("number");
  for (const secret of SECRETS) expect(lines[0]).not.toContain(secret);
});
