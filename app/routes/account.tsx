import { APIError } from "better-auth/api";
import { eq } from "drizzle-orm";
import { Form, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { createApiKey, listApiKeys, revokeApiKey } from "~/.server/api-keys";
import { auth } from "~/.server/auth";
import { db, schema } from "~/.server/db";
import { invalid, newPassword, parseForm, personName, readForm } from "~/.server/forms";
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
  const keys = await listApiKeys(user.id);
  return { ...row, keys };
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
    z.object({
      intent: z.literal("create-key"),
      keyName: z.string().trim().min(1, "Name the key, e.g. “analysis scripts”.").max(80, "Use at most 80 characters."),
    }),
    z.object({ intent: z.literal("revoke-key"), keyId: z.uuid("Unknown key.") }),
  ],
  { error: "Unknown action." },
);

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const parsed = parseForm(await readForm(request), Intent);
  if (!parsed.ok) return parsed.response;
  const input = parsed.data;
  if (input.intent === "create-key") {
    const { key } = await createApiKey(user.id, input.keyName);
    return { ok: `API key “${input.keyName}” created.`, newKey: key };
  }
  if (input.intent === "revoke-key") {
    const revoked = await revokeApiKey(user.id, input.keyId);
    if (!revoked) return invalid({}, { intent: "revoke-key" }, "That key is not yours or was already revoked.");
    return { ok: "API key revoked; scripts using it now get 401." };
  }
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
      <div aria-live="polite" className="mb-6 max-w-2xl empty:hidden">
        {result && "ok" in result && <FormMessage tone="success">{result.ok}</FormMessage>}
        {result && "message" in result && result.message && <FormMessage>{result.message}</FormMessage>}
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
      <Section title="API keys for scripts">
        <p className="mb-4 max-w-3xl text-sm text-loam-700">
          Scripts can call Tilthmark's JSON routes (listed in the README) with the header <code className="num">x-api-key</code>. A key
          acts as you, with your roles in each program. It is shown once; Tilthmark keeps only a fingerprint of it.
        </p>
        {result && "newKey" in result && result.newKey && (
          <div className="mb-4 max-w-3xl rounded-md border border-moss-600/40 bg-moss-50 p-4 text-sm">
            <p className="font-medium">Copy this key now; it will not be shown again:</p>
            <p className="num mt-2 break-all rounded bg-white p-2 select-all" data-testid="new-api-key">
              {result.newKey}
            </p>
          </div>
        )}
        <Form method="post" className="mb-6 flex max-w-xl flex-wrap items-end gap-3" noValidate>
          <input type="hidden" name="intent" value="create-key" />
          <div className="flex-1">
            <Field label="Key name" name="keyName" maxLength={80} errors={failedIntent === "create-key" ? errors : undefined} required />
          </div>
          <SubmitButton variant="secondary">Create key</SubmitButton>
        </Form>
        {account.keys.length > 0 && (
          <table className="w-full max-w-3xl rounded-lg bg-white text-left text-sm shadow-xs">
            <thead className="bg-loam-100 text-loam-800">
              <tr>
                <th scope="col" className="px-3 py-2 font-medium">Name</th>
                <th scope="col" className="px-3 py-2 font-medium">Key starts</th>
                <th scope="col" className="px-3 py-2 font-medium">Last used</th>
                <th scope="col" className="px-3 py-2 font-medium">Status</th>
              </tr>
            </thead>
            <tbody>
              {account.keys.map((k) => (
                <tr key={k.id} className="border-t border-loam-200">
                  <td className="px-3 py-2">{k.name}</td>
                  <td className="num px-3 py-2">{k.prefix}…</td>
                  <td className="num px-3 py-2">{k.lastUsedAt ? new Date(k.lastUsedAt).toISOString().slice(0, 16).replace("T", " ") : "never"}</td>
                  <td className="px-3 py-2">
                    {k.revokedAt ? (
                      <span className="text-loam-600">revoked</span>
                    ) : (
                      <Form method="post">
                        <input type="hidden" name="intent" value="revoke-key" />
                        <input type="hidden" name="keyId" value={k.id} />
                        <SubmitButton variant="danger">Revoke</SubmitButton>
                      </Form>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Section>
    </>
  );
}
