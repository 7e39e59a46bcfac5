import { APIError } from "better-auth/api";
import { Form, Link, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { auth } from "~/.server/auth";
import { invalid, newPassword, parseForm, readForm } from "~/.server/forms";
import { AuthCard } from "~/components/auth-card";
import { Field, FormMessage, SubmitButton } from "~/components/form";
import type { Route } from "./+types/reset-password";

export const meta: Route.MetaFunction = () => [{ title: "Choose a new password · Tilthmark" }];

export async function loader({ request }: Route.LoaderArgs) {
  return { token: new URL(request.url).searchParams.get("token") ?? "" };
}

const Reset = z
  .object({
    token: z.string().min(1, "This reset link is incomplete. Ask for a new one.").max(200),
    password: newPassword,
    confirmPassword: z.string(),
  })
  .refine((v) => v.password === v.confirmPassword, { path: ["confirmPassword"], message: "The two passwords differ." });

export async function action({ request }: Route.ActionArgs) {
  const parsed = parseForm(await readForm(request), Reset);
  if (!parsed.ok) return parsed.response;
  try {
    await auth.api.resetPassword({ body: { token: parsed.data.token, newPassword: parsed.data.password } });
  } catch (error) {
    if (error instanceof APIError && error.statusCode < 500) {
      return invalid({}, {}, "This reset link has expired or was already used. Ask for a new one.");
    }
    throw error;
  }
  return { done: true as const };
}

export default function ResetPasswordPage() {
  const { token } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  if (result && "done" in result) {
    return (
      <AuthCard title="Password changed">
        <FormMessage tone="success">Your new password is set, and other sessions were signed out.</FormMessage>
        <p className="mt-6">
          <Link to="/sign-in">Sign in</Link>
        </p>
      </AuthCard>
    );
  }
  const tokenError = result?.errors?.token?.[0];
  return (
    <AuthCard title="Choose a new password">
      {!token ? (
        <FormMessage>
          This page needs the link from the reset e-mail. <Link to="/forgot-password">Ask for a new link</Link>.
        </FormMessage>
      ) : (
        <Form method="post" className="flex flex-col gap-4" noValidate>
          {(result?.message || tokenError) && (
            <FormMessage>
              {result?.message ?? tokenError} <Link to="/forgot-password">Ask for a new link</Link>.
            </FormMessage>
          )}
          <input type="hidden" name="token" value={token} />
          <Field label="New password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." errors={result?.errors} required />
          <Field label="New password again" name="confirmPassword" type="password" autoComplete="new-password" errors={result?.errors} required />
          <SubmitButton pendingLabel="Saving…">Set new password</SubmitButton>
        </Form>
      )}
    </AuthCard>
  );
}
