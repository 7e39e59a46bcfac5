import { auth } from "./auth";

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
