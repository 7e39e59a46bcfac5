// Helpers to act as a signed-in person in integration tests: real better-auth sessions.
import { cookieHeaderFrom } from "~/.server/auth";
import { signInWithPassword } from "~/.server/accounts";

export async function cookieFor(email: string, password: string): Promise<string> {
  const headers = await signInWithPassword(email, password);
  if (!headers) throw new Error(`could not sign in as ${email}`);
  return cookieHeaderFrom(headers).get("cookie") ?? "";
}

export function requestAs(cookie: string | null, path: string, init: RequestInit = {}): Request {
  const headers = new Headers(init.headers);
  if (cookie) headers.set("cookie", cookie);
  return new Request(new URL(path, "http://127.0.0.1:3999"), { ...init, headers });
}

export function formPost(cookie: string | null, path: string, fields: Record<string, string>): Request {
  return requestAs(cookie, path, { method: "POST", body: new URLSearchParams(fields) });
}

/** What a loader or action threw or returned: a Response, or React Router's data() wrapper. */
export async function outcome(run: () => Promise<unknown>): Promise<{ status: number; body: unknown; location?: string }> {
  try {
    const value = await run();
    return describe(value);
  } catch (thrown) {
    return describe(thrown);
  }
}

async function describe(value: unknown): Promise<{ status: number; body: unknown; location?: string }> {
  if (value instanceof Response) {
    const text = await value.text();
    let body: unknown = text;
    try {
      body = JSON.parse(text);
    } catch {
      /* plain text */
    }
    return { status: value.status, body, location: value.headers.get("location") ?? undefined };
  }
  if (value && typeof value === "object" && "type" in value && (value as { type: string }).type === "DataWithResponseInit") {
    const d = value as unknown as { data: unknown; init: ResponseInit | null };
    return { status: d.init?.status ?? 200, body: d.data };
  }
  if (value instanceof Error) throw value;
  return { status: 200, body: value };
}
