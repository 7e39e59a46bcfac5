import { Form, Link, useActionData } from "react-router";
import { z } from "zod";
import { auth } from "~/.server/auth";
import { email, invalid, parseForm, readForm } from "~/.server/forms";
import { consumeAttempt } from "~/.server/rate-limit";
import { AuthCard } from "~/components/auth-card";
import { Field, FormMessage, SubmitButton } from "~/components/form";
import type { Route } from "./+types/forgot-password";

export const meta: Route.MetaFunction = () => [{ title: "Reset your password · Tilthmark" }];

export async function loader() {
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  const parsed = parseForm(await readForm(request), z.object({ email }));
  if (!parsed.ok) return parsed.response;
  const limited = await consumeAttempt("reset", parsed.data.email);
  if (limited) return invalid({}, parsed.data, limited);
  // Same answer whether or not the address has an account, so the form can't be used to probe.
  await auth.api.requestPasswordReset({ body: { email: parsed.data.email.toLowerCase(), redirectTo: "/reset-password" } });
  return { sent: true as const, email: parsed.data.email };
}

export default function ForgotPasswordPage() {
  const result = useActionData<typeof action>();
  if (result && "sent" in result) {
    return (
      <AuthCard title="Check your e-mail">
        <FormMessage tone="success">
          If <strong>{result.email}</strong> has a Tilthmark account, a link to choose a new password is on its way. The link
          works once and expires in one hour.
        </FormMessage>
        <p className="mt-6 text-sm">
          <Link to="/sign-in">Back to sign-in</Link>
        </p>
      </AuthCard>
    );
  }
  return (
    <AuthCard title="Reset your password" lead="We'll e-mail you a link to choose a new one.">
      <Form method="post" className="flex flex-col gap-4" noValidate>
        {result?.message && <FormMessage>{result.message}</FormMessage>}
        <Field label="E-mail" name="email" type="email" autoComplete="email" defaultValue={result?.values?.email} errors={result?.errors} required />
        <SubmitButton pendingLabel="Sending…">Send reset link</SubmitButton>
        <p className="text-sm">
          <Link to="/sign-in">Back to sign-in</Link>
        </p>
      </Form>
    </AuthCard>
  );
}
