import { data, Form, Link, redirect, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { AccountError, acceptInvitation, findInvitation, signInWithPassword } from "~/.server/accounts";
import { invalid, newPassword, parseForm, personName, readForm } from "~/.server/forms";
import { consumeAttempt } from "~/.server/rate-limit";
import { findUserIdByEmail } from "~/.server/users";
import { AuthCard } from "~/components/auth-card";
import { Field, FormMessage, SubmitButton } from "~/components/form";
import { ROLE_LABELS, isRole } from "~/permissions";
import type { Route } from "./+types/invitation";

export const meta: Route.MetaFunction = () => [{ title: "Join a program · Tilthmark" }];

const idSchema = z.string().min(1).max(100);

async function openInvitation(invitationId: string) {
  const invitation = idSchema.safeParse(invitationId).success ? await findInvitation(invitationId) : null;
  if (!invitation) throw data("This invitation link is not valid. Check that you copied all of it.", { status: 404 });
  return invitation;
}

export async function loader({ params }: Route.LoaderArgs) {
  const invitation = await openInvitation(params.invitationId);
  return {
    programName: invitation.programName,
    inviterName: invitation.inviterName,
    email: invitation.email,
    role: invitation.role,
    state: invitation.state,
    accountExists: invitation.accountExists,
  };
}

const NewAccount = z
  .object({ name: personName, password: newPassword, confirmPassword: z.string() })
  .refine((v) => v.password === v.confirmPassword, { path: ["confirmPassword"], message: "The two passwords differ." });
const ExistingAccount = z.object({ password: z.string().min(1, "Enter your password.").max(128) });

export async function action({ request, params }: Route.ActionArgs) {
  const invitation = await openInvitation(params.invitationId);
  if (invitation.state !== "open") return invalid({}, {}, stateMessage(invitation.state));
  const limited = await consumeAttempt("invite", `accept:${invitation.id}`);
  if (limited) return invalid({}, {}, limited);
  const formData = await readForm(request);

  try {
    if (invitation.accountExists) {
      const parsed = parseForm(formData, ExistingAccount);
      if (!parsed.ok) return parsed.response;
      const headers = await signInWithPassword(invitation.email, parsed.data.password);
      if (!headers) return invalid({ password: ["That password does not match your Tilthmark account."] });
      const userId = await findUserIdByEmail(invitation.email);
      const { programId } = await acceptInvitation(invitation.id, { kind: "existing", userId: userId as string });
      return redirect(`/programs/${programId}`, { headers });
    }
    const parsed = parseForm(formData, NewAccount);
    if (!parsed.ok) return parsed.response;
    const { programId } = await acceptInvitation(invitation.id, { kind: "new", ...parsed.data });
    const headers = await signInWithPassword(invitation.email, parsed.data.password);
    return redirect(`/programs/${programId}`, headers ? { headers } : undefined);
  } catch (error) {
    if (error instanceof AccountError) return invalid({}, {}, error.message);
    throw error;
  }
}

function stateMessage(state: "used" | "expired" | "canceled" | "open") {
  switch (state) {
    case "used":
      return "This invitation has already been used. If that was you, sign in.";
    case "expired":
      return "This invitation has expired. Ask the program owner to send a new one.";
    case "canceled":
      return "This invitation was withdrawn by the program owner.";
    default:
      return "";
  }
}

export default function InvitationPage() {
  const invite = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const roleLabel = isRole(invite.role) ? ROLE_LABELS[invite.role].label : invite.role;
  if (invite.state !== "open") {
    return (
      <AuthCard title="This invitation can't be used">
        <FormMessage>{stateMessage(invite.state)}</FormMessage>
        <p className="mt-6 text-sm">
          <Link to="/sign-in">Sign in</Link>
        </p>
      </AuthCard>
    );
  }
  return (
    <AuthCard
      title={`Join ${invite.programName}`}
      lead={
        <>
          {invite.inviterName} invited <strong>{invite.email}</strong> as <strong>{roleLabel}</strong>.{" "}
          {isRole(invite.role) && ROLE_LABELS[invite.role].summary}
        </>
      }
    >
      <Form method="post" className="flex flex-col gap-4" noValidate>
        {result?.message && <FormMessage>{result.message}</FormMessage>}
        <Field label="E-mail" name="emailShown" defaultValue={invite.email} readOnly />
        {invite.accountExists ? (
          <>
            <p className="text-sm text-loam-700">You already have a Tilthmark account. Enter its password to join.</p>
            <Field label="Password" name="password" type="password" autoComplete="current-password" errors={result?.errors} required />
            <SubmitButton pendingLabel="Joining…">Join program</SubmitButton>
          </>
        ) : (
          <>
            <Field label="Your name" name="name" autoComplete="name" defaultValue={result?.values?.name} errors={result?.errors} required />
            <Field label="Choose a password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." errors={result?.errors} required />
            <Field label="Password again" name="confirmPassword" type="password" autoComplete="new-password" errors={result?.errors} required />
            <SubmitButton pendingLabel="Creating your account…">Create account and join</SubmitButton>
          </>
        )}
      </Form>
    </AuthCard>
  );
}
