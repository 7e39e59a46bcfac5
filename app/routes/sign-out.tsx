import { redirect } from "react-router";
import { auth } from "~/.server/auth";
import { requireUser } from "~/.server/permissions";
import type { Route } from "./+types/sign-out";

export async function loader() {
  return redirect("/");
}

export async function action({ request }: Route.ActionArgs) {
  await requireUser(request);
  const { headers } = await auth.api.signOut({ headers: request.headers, returnHeaders: true });
  return redirect("/", { headers });
}
