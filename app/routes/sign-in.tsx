import { Form, Link, redirect, useActionData, useSearchParams } from "react-router";
import { z } from "zod";
import { userCount, signInWithPassword } from "~/.server/accounts";
import { email, invalid, parseForm, readForm } from "~/.server/forms";
import { consumeAttempt } from "~/.server/rate-limit";
import { getSession } from "~/.server/session";
import { Field, FormMessage, SubmitButton } from "~/components/form";
import { AuthCard } from "~/components/auth-card";
import type { Route } from "./+types/sign-in";

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Tilthmark" }];

/** Only same-site paths: never send someone to another host after sign-in. */
function safeRedirect(to: string | null | undefined) {
  return to && to.startsWith("/") && !to.startsWith("//") ? to : "/home";
}

export async function loader({ request }: Route.LoaderArgs) {
  if (await getSession(request)) throw redirect(safeRedirect(new URL(request.url).searchParams.get("redirectTo")));
  if ((await userCount()) === 0) throw redirect("/setup");
  return null;
}

const SignIn = z.object({
  email,
  password: z.string().min(1, "Enter your password.").max(128, "That password is too long."),
  redirectTo: z.string().max(2000).optional(),
});

export async function action({ request }: Route.ActionArgs) {
  const parsed = parseForm(await readForm(request), SignIn);
  if (!parsed.ok) return parsed.response;
  const { email: address, password, redirectTo } = parsed.data;
  const limited = await consumeAttempt("signIn", address);
  if (limited) return invalid({}, { email: address }, limited);
  const headers = await signInWithPassword(address, password);
  if (!headers) return invalid({}, { email: address }, "That e-mail and password do not match an account.");
  return redirect(safeRedirect(redirectTo), { headers });
}

export default function SignInPage() {
  const result = useActionData<typeof action>();
  const [params] = useSearchParams();
  return (
    <AuthCard title="Sign in" lead="Use the e-mail address your program invited.">
      <Form method="post" className="flex flex-col gap-4" noValidate>
        {result?.message && <FormMessage>{result.message}</FormMessage>}
        <input type="hidden" name="redirectTo" value={params.get("redirectTo") ?? ""} />
        <Field
          label="E-mail"
          name="email"
          type="email"
          autoComplete="username"
          defaultValue={result?.values?.email}
          errors={result?.errors}
          required
        />
        <Field label="Password" name="password" type="password" autoComplete="current-password" errors={result?.errors} required />
        <SubmitButton pendingLabel="Signing in…">Sign in</SubmitButton>
        <p className="text-sm">
          <Link to="/forgot-password">Forgot your password?</Link>
        </p>
      </Form>
    </AuthCard>
  );
}
