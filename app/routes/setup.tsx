import { data, Form, redirect, useActionData } from "react-router";
import { z } from "zod";
import { AccountError, createFirstAdministrator, signInWithPassword, userCount } from "~/.server/accounts";
import { email, invalid, newPassword, parseForm, personName, readForm } from "~/.server/forms";
import { AuthCard } from "~/components/auth-card";
import { Field, FormMessage, SubmitButton } from "~/components/form";
import type { Route } from "./+types/setup";

export const meta: Route.MetaFunction = () => [{ title: "Set up Tilthmark" }];

// First run only: once any account exists this page sends people to sign-in.
export async function loader() {
  if ((await userCount()) > 0) throw redirect("/sign-in");
  return null;
}

const Setup = z
  .object({ name: personName, email, password: newPassword, confirmPassword: z.string() })
  .refine((v) => v.password === v.confirmPassword, { path: ["confirmPassword"], message: "The two passwords differ." });

export async function action({ request }: Route.ActionArgs) {
  if ((await userCount()) > 0) throw data("This Tilthmark install already has an administrator. Sign in instead.", { status: 409 });
  const parsed = parseForm(await readForm(request), Setup);
  if (!parsed.ok) return parsed.response;
  try {
    await createFirstAdministrator(parsed.data);
  } catch (error) {
    if (error instanceof AccountError) return invalid({}, parsed.data, error.message);
    throw error;
  }
  const headers = await signInWithPassword(parsed.data.email, parsed.data.password);
  return redirect("/home", headers ? { headers } : undefined);
}

export default function SetupPage() {
  const result = useActionData<typeof action>();
  return (
    <AuthCard
      title="Set up this Tilthmark install"
      lead="The first account administers the install: it creates programs and invites their first members."
    >
      <Form method="post" className="flex flex-col gap-4" noValidate>
        {result?.message && <FormMessage>{result.message}</FormMessage>}
        <Field label="Your name" name="name" autoComplete="name" defaultValue={result?.values?.name} errors={result?.errors} required />
        <Field label="E-mail" name="email" type="email" autoComplete="email" defaultValue={result?.values?.email} errors={result?.errors} required />
        <Field label="Password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." errors={result?.errors} required />
        <Field label="Password again" name="confirmPassword" type="password" autoComplete="new-password" errors={result?.errors} required />
        <SubmitButton pendingLabel="Creating…">Create administrator account</SubmitButton>
      </Form>
    </AuthCard>
  );
}
