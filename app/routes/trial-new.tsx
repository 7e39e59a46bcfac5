import { Form, Link, redirect, useActionData, useLoaderData } from "react-router";
import { TrialInput } from "~/.server/design/inputs";
import { refusing } from "~/.server/design/respond";
import { createTrial, listSitesOf } from "~/.server/design/trials";
import { parseForm, readForm } from "~/.server/forms";
import { requirePermission } from "~/.server/permissions";
import { FormMessage, SubmitButton } from "~/components/form";
import { formState } from "~/components/form-state";
import { PageHeader } from "~/components/page";
import { TrialFormFields } from "~/components/trial-form";
import type { Route } from "./+types/trial-new";

export const meta: Route.MetaFunction = () => [{ title: "New trial · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "trials.edit");
  return { program: { id: member.programId, name: member.programName }, sites: await listSitesOf(member.programId) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "trials.edit");
  const parsed = parseForm(await readForm(request), TrialInput);
  if (!parsed.ok) return parsed.response;
  const result = await refusing(parsed.data, () => createTrial(member.user.id, member.programId, parsed.data));
  if ("id" in result) throw redirect(`/trials/${result.id}/treatments`);
  return result;
}

export default function NewTrialPage() {
  const { program, sites } = useLoaderData<typeof loader>();
  const { errors, values, message } = formState(useActionData<typeof action>());
  return (
    <>
      <PageHeader
        crumbs={[{ to: `/programs/${program.id}`, label: program.name }]}
        eyebrow="New trial"
        title="Set up a trial"
        lead="Title, site, plot size and design. Treatments, randomization and the plot map come next; nothing is fixed until you lock the design."
      />
      <Form method="post" className="flex max-w-3xl flex-col gap-5" noValidate>
        {message && <FormMessage>{message}</FormMessage>}
        {sites.length === 0 && (
          <FormMessage tone="info">
            This program has no sites yet. You can <Link to={`/programs/${program.id}/sites`}>record the site</Link> first, or add it to the trial later.
          </FormMessage>
        )}
        <TrialFormFields values={values ?? {}} errors={errors} sites={sites} />
        <div>
          <SubmitButton pendingLabel="Creating…">Create trial</SubmitButton>
        </div>
      </Form>
    </>
  );
}
