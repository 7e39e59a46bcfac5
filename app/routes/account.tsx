import { APIError } from "better-auth/api";
import { eq } from "drizzle-orm";
import { Form, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { auth } from "~/.server/auth";
import { db, schema } from "~/.server/db";
import { invalid, newPassword, parseForm, personName } from "~/.server/forms";
import { requireUser } from "~/.server/permissions";
import { Field, FormMessage, SelectField, SubmitButton } from "~/components/form";
import { PageHeader, Section } from "~/components/page";
import type { Route } from "./+types/account";

export const meta: Route.MetaFunction = () => [{ title: "Your account · Tilthmark" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const [row] = await db
    .select({ name: schema.users.name, email: schema.users.email, unitSystem: schema.users.unitSystem, notifyBriefs: schema.users.notifyBriefs })
    .from(schema.users)
    .where(eq(schema.users.id, user.id));
  return row;
}

const Intent = z.discriminatedUnion(
  "intent",
  [
    z.object({
      intent: z.literal("preferences"),
      name: personName,
      unitSystem: z.enum(["si", "us"], { error: "Choose SI or US customary units." }),
      notifyBriefs: z.enum(["yes", "no"], { error: "Choose yes or no." }),
    }),
    z
      .object({
        intent: z.literal("password"),
        currentPassword: z.string().min(1, "Enter your current password.").max(128),
        password: newPassword,
        confirmPassword: z.string(),
      })
      .refine((v) => v.password === v.confirmPassword, { path: ["confirmPassword"], message: "The two passwords differ." }),
  ],
  { error: "Unknown action." },
);

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const parsed = parseForm(await request.formData(), Intent);
  if (!parsed.ok) return parsed.response;
  const input = parsed.data;
  if (input.intent === "preferences") {
    await db
      .update(schema.users)
      .set({ name: input.name, unitSystem: input.unitSystem, notifyBriefs: input.notifyBriefs === "yes", updatedAt: new Date() })
      .where(eq(schema.users.id, user.id));
    return { ok: "Preferences saved." };
  }
  try {
    await auth.api.changePassword({
      body: { currentPassword: input.currentPassword, newPassword: input.password, revokeOtherSessions: true },
      headers: request.headers,
    });
  } catch (error) {
    if (error instanceof APIError && error.statusCode < 500) {
      return invalid({ currentPassword: ["That is not your current password."] }, { intent: "password" });
    }
    throw error;
  }
  return { ok: "Password changed. Other devices were signed out." };
}

export default function AccountPage() {
  const account = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const errors = result && "errors" in result ? result.errors : undefined;
  const failedIntent = result && "values" in result ? result.values?.intent : undefined;
  return (
    <>
      <PageHeader eyebrow="Account" title="Your account" lead={<>Signed in as <strong>{account.email}</strong>.</>} />
      <div aria-live="polite" className="mb-6 max-w-lg empty:hidden">
        {result && "ok" in result && <FormMessage tone="success">{result.ok}</FormMessage>}
      </div>
      <div className="grid max-w-4xl gap-10 md:grid-cols-2">
        <Section title="Preferences">
          <Form method="post" className="flex flex-col gap-4" noValidate>
            <input type="hidden" name="intent" value="preferences" />
            <Field label="Name" name="name" autoComplete="name" defaultValue={account.name} errors={failedIntent === "preferences" ? errors : undefined} required />
            <SelectField
              label="Units on sheets and field briefs"
              name="unitSystem"
              defaultValue={account.unitSystem}
              options={[
                { value: "si", label: "SI (Mg/ha, kg/ha, cm)" },
                { value: "us", label: "US customary (short tons/acre, lb/acre, inches)" },
              ]}
              errors={failedIntent === "preferences" ? errors : undefined}
            />
            <SelectField
              label="E-mail me when a field brief is published"
              name="notifyBriefs"
              defaultValue={account.notifyBriefs ? "yes" : "no"}
              options={[
                { value: "yes", label: "Yes" },
                { value: "no", label: "No" },
              ]}
              errors={failedIntent === "preferences" ? errors : undefined}
            />
            <div>
              <SubmitButton pendingLabel="Saving…">Save preferences</SubmitButton>
            </div>
          </Form>
        </Section>
        <Section title="Change password">
          <Form method="post" className="flex flex-col gap-4" noValidate>
            <input type="hidden" name="intent" value="password" />
            <Field label="Current password" name="currentPassword" type="password" autoComplete="current-password" errors={failedIntent === "password" ? errors : undefined} required />
            <Field label="New password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." errors={failedIntent === "password" ? errors : undefined} required />
            <Field label="New password again" name="confirmPassword" type="password" autoComplete="new-password" errors={failedIntent === "password" ? errors : undefined} required />
            <div>
              <SubmitButton pendingLabel="Changing…">Change password</SubmitButton>
            </div>
          </Form>
        </Section>
      </div>
    </>
  );
}
