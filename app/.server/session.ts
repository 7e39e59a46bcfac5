import { auth, SESSION_TIMES } from "./auth";
import { noteSession } from "./request-context";

export type SessionUser = {
  id: string;
  name: string;
  email: string;
  isAdmin: boolean;
  unitSystem: "si" | "us";
};

/** The signed-in user of a request, or null. */
export async function getSession(request: Request): Promise<{ user: SessionUser } | null> {
  const result = await auth.api.getSession({ headers: request.headers });
  if (!result) return null;
  // better-auth extends a session once it is `updateAge` past its last refresh (and the session
  // expires later still): until then it stands as it is.
  const refreshDue = new Date(result.session.expiresAt).getTime() - (SESSION_TIMES.expiresIn - SESSION_TIMES.updateAge) * 1000;
  noteSession(refreshDue);
  const u = result.user as typeof result.user & { isAdmin?: boolean; unitSystem?: string };
  return {
    user: {
      id: u.id,
      name: u.name,
      email: u.email,
      isAdmin: Boolean(u.isAdmin),
      unitSystem: u.unitSystem === "us" ? "us" : "si",
    },
  };
}
