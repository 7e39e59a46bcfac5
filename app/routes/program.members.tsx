import { useEffect, useRef } from "react";
import { Form, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { email, invalid, parseForm, readForm } from "~/.server/forms";
import { requirePermission } from "~/.server/permissions";
import {
  ProgramError,
  changeRole,
  inviteMember,
  listMembers,
  listOpenInvitations,
  removeMember,
  withdrawInvitation,
} from "~/.server/programs";
import { consumeAttempt } from "~/.server/rate-limit";
import { Field, FormMessage, SelectField, SubmitButton } from "~/components/form";
import { PageHeader, Section } from "~/components/page";
import { ROLES, ROLE_LABELS, isRole } from "~/permissions";
import type { Route } from "./+types/program.members";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Members of ${data?.program.name ?? "program"} · Tilthmark` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "members.manage");
  const [members, invitations] = await Promise.all([listMembers(member.programId), listOpenInvitations(member.programId)]);
  return {
    program: { id: member.programId, name: member.programName },
    me: member.user.id,
    members,
    invitations: invitations.map((i) => ({ ...i, expired: i.expiresAt.getTime() <= Date.now() })),
  };
}

const role = z.enum(ROLES, { error: "Choose one of the listed roles." });
const id = z.string().trim().min(1).max(100);
const Intent = z.discriminatedUnion(
  "intent",
  [
    z.object({ intent: z.literal("invite"), email, role }),
    z.object({ intent: z.literal("change-role"), memberId: id, role }),
    z.object({ intent: z.literal("remove"), memberId: id }),
    z.object({ intent: z.literal("withdraw"), invitationId: id }),
  ],
  { error: "Unknown action." },
);

export async function action({ request, params }: Route.ActionArgs) {
  const owner = await requirePermission(request, { programId: params.programId }, "members.manage");
  const parsed = parseForm(await readForm(request), Intent);
  if (!parsed.ok) return parsed.response;
  const input = parsed.data;
  const actor = owner.user.id;
  try {
    switch (input.intent) {
      case "invite": {
        const limited = await consumeAttempt("invite", actor);
        if (limited) return invalid({}, input, limited);
        await inviteMember(request, actor, owner.programId, input.email, input.role);
        return { ok: `Invitation sent to ${input.email.toLowerCase()} as ${ROLE_LABELS[input.role].label.toLowerCase()}.` };
      }
      case "change-role":
        await changeRole(request, actor, owner.programId, input.memberId, input.role);
        return { ok: `Role changed to ${ROLE_LABELS[input.role].label.toLowerCase()}.` };
      case "remove":
        await removeMember(request, actor, owner.programId, input.memberId);
        return { ok: "Member removed. Their past uploads and entries stay attributed to them." };
      case "withdraw":
        await withdrawInvitation(request, actor, owner.programId, input.invitationId);
        return { ok: "Invitation withdrawn; its link no longer works." };
    }
  } catch (error) {
    if (error instanceof ProgramError) return invalid({}, input.intent === "invite" ? input : {}, error.message);
    throw error;
  }
}

const roleOptions = ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r].label }));

export default function MembersPage() {
  const { program, me, members, invitations } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const errors = result && "errors" in result ? result.errors : undefined;
  const values = result && "values" in result ? result.values : undefined;
  const inviteFailed = values?.intent === "invite";
  const inviteForm = useRef<HTMLFormElement>(null);
  const invited = result && "ok" in result && result.ok.startsWith("Invitation sent");
  // After a successful invitation, clear the form for the next person.
  useEffect(() => {
    if (invited) inviteForm.current?.reset();
  }, [result, invited]);
  return (
    <>
      <PageHeader
        crumbs={[{ to: `/programs/${program.id}`, label: program.name }]}
        eyebrow="Members"
        title="Who works in this program"
        lead="Invite people by e-mail with a role. Roles decide what each person can see and change."
      />
      <div aria-live="polite" className="mb-6 empty:hidden">
        {result && "ok" in result && <FormMessage tone="success">{result.ok}</FormMessage>}
        {result && "message" in result && result.message && <FormMessage>{result.message}</FormMessage>}
        {errors && !inviteFailed && Object.keys(errors).length > 0 && (
          <FormMessage>{Object.values(errors).flat().filter(Boolean)[0]}</FormMessage>
        )}
      </div>
      <div className="grid gap-10 lg:grid-cols-[2fr_1fr]">
        <div>
          <Section title={`Members (${members.length})`}>
            <ul className="divide-y divide-loam-200 rounded-lg border border-loam-200 bg-white">
              {members.map((m) => (
                <li key={m.memberId} className="flex flex-wrap items-center gap-3 px-4 py-3">
                  <div className="min-w-48 flex-1">
                    <p className="font-medium">
                      {m.name} {m.userId === me && <span className="text-sm font-normal text-loam-600">(you)</span>}
                    </p>
                    <p className="text-sm text-loam-700">{m.email}</p>
                  </div>
                  <Form method="post" className="flex items-center gap-2">
                    <input type="hidden" name="memberId" value={m.memberId} />
                    <label className="sr-only" htmlFor={`role-${m.memberId}`}>
                      Role of {m.name}
                    </label>
                    <select
                      id={`role-${m.memberId}`}
                      name="role"
                      defaultValue={m.role}
                      className="rounded-md border border-loam-400 bg-white px-2 py-1.5 text-sm"
                    >
                      {roleOptions.map((o) => (
                        <option key={o.value} value={o.value}>
                          {o.label}
                        </option>
                      ))}
                    </select>
                    <SubmitButton name="intent" value="change-role" variant="secondary">
                      Change role
                    </SubmitButton>
                  </Form>
                  <Form
                    method="post"
                    onSubmit={(e) => {
                      if (!confirm(`Remove ${m.name} from ${program.name}? Their past uploads stay attributed to them.`)) e.preventDefault();
                    }}
                  >
                    <input type="hidden" name="memberId" value={m.memberId} />
                    <SubmitButton name="intent" value="remove" variant="danger">
                      Remove
                    </SubmitButton>
                  </Form>
                </li>
              ))}
            </ul>
          </Section>
          <Section title={`Open invitations (${invitations.length})`}>
            {invitations.length === 0 ? (
              <p className="text-loam-700">No invitations waiting.</p>
            ) : (
              <ul className="divide-y divide-loam-200 rounded-lg border border-loam-200 bg-white">
                {invitations.map((i) => (
                  <li key={i.id} className="flex flex-wrap items-center gap-3 px-4 py-3">
                    <div className="flex-1">
                      <p className="font-medium">{i.email}</p>
                      <p className="text-sm text-loam-700">
                        {isRole(i.role) ? ROLE_LABELS[i.role].label : i.role} ·{" "}
                        {i.expired ? (
                          <span className="text-clay-800">expired</span>
                        ) : (
                          <>expires <time dateTime={new Date(i.expiresAt).toISOString()}>{new Date(i.expiresAt).toUTCString().slice(0, 22)} UTC</time></>
                        )}
                      </p>
                    </div>
                    <Form method="post">
                      <input type="hidden" name="invitationId" value={i.id} />
                      <SubmitButton name="intent" value="withdraw" variant="secondary">
                        Withdraw
                      </SubmitButton>
                    </Form>
                  </li>
                ))}
              </ul>
            )}
          </Section>
        </div>
        <aside>
          <Section title="Invite someone">
            <Form method="post" ref={inviteForm} className="flex flex-col gap-4" noValidate>
              <Field
                label="E-mail"
                name="email"
                type="email"
                autoComplete="off"
                defaultValue={inviteFailed ? values?.email : undefined}
                errors={inviteFailed ? errors : undefined}
                required
              />
              <SelectField
                label="Role"
                name="role"
                options={roleOptions}
                defaultValue={inviteFailed ? values?.role : "collaborator"}
                errors={inviteFailed ? errors : undefined}
              />
              <SubmitButton name="intent" value="invite" pendingLabel="Sending…">
                Send invitation
              </SubmitButton>
            </Form>
          </Section>
          <Section title="What each role can do">
            <dl className="space-y-2 text-sm">
              {ROLES.map((r) => (
                <div key={r}>
                  <dt className="font-medium">{ROLE_LABELS[r].label}</dt>
                  <dd className="text-loam-700">{ROLE_LABELS[r].summary}</dd>
                </div>
              ))}
            </dl>
          </Section>
        </aside>
      </div>
    </>
  );
}
