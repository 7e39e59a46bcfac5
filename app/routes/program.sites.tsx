import { Form, Link, redirect, useActionData, useLoaderData } from "react-router";
import { refusing } from "~/.server/design/respond";
import { createSite, listSites, SiteInput, TEXTURE_CLASSES } from "~/.server/design/sites";
import { parseForm, readForm } from "~/.server/forms";
import { requirePermission } from "~/.server/permissions";
import { FormMessage, SubmitButton } from "~/components/form";
import { formState } from "~/components/form-state";
import { Empty, PageHeader, Section } from "~/components/page";
import { SiteFormFields } from "~/components/site-form";
import { formatNumber } from "~/format";
import { roleCan } from "~/permissions";
import type { Route } from "./+types/program.sites";

export const meta: Route.MetaFunction = () => [{ title: "Sites · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "results.view");
  return {
    program: { id: member.programId, name: member.programName },
    canEdit: roleCan(member.role, "trials.edit"),
    sites: await listSites(member.programId),
    textureClasses: TEXTURE_CLASSES,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "trials.edit");
  const parsed = parseForm(await readForm(request), SiteInput);
  if (!parsed.ok) return parsed.response;
  const result = await refusing(parsed.data, () => createSite(member.user.id, member.programId, parsed.data));
  if ("id" in result) throw redirect(`/programs/${member.programId}/sites/${result.id}?saved=1`);
  return result;
}

export default function SitesPage() {
  const { program, canEdit, sites, textureClasses } = useLoaderData<typeof loader>();
  const { errors, values, message } = formState(useActionData<typeof action>());
  return (
    <>
      <PageHeader crumbs={[{ to: `/programs/${program.id}`, label: program.name }]} eyebrow="Sites" title="Where the trials are" lead="A site is a field with its soil. Trials name the site they are laid out on." />
      <div className="grid gap-10 lg:grid-cols-[1.2fr_1fr]">
        <Section title={`Sites (${sites.length})`}>
          {sites.length === 0 ? (
            <Empty>No sites recorded yet.</Empty>
          ) : (
            <ul className="flex flex-col gap-3">
              {sites.map((s) => (
                <li key={s.id} className="rounded-lg border border-loam-200 bg-white p-4">
                  <Link to={`/programs/${program.id}/sites/${s.id}`} className="font-medium">
                    {s.name}
                  </Link>
                  <p className="text-sm text-loam-700">{[s.soilSeries, s.textureClass].filter(Boolean).join(" · ") || "No soil description yet"}</p>
                  {s.sandPct !== null && (
                    <p className="num text-sm text-loam-700">
                      sand {formatNumber(s.sandPct, 0)} · silt {formatNumber(s.siltPct, 0)} · clay {formatNumber(s.clayPct, 0)} %
                    </p>
                  )}
                </li>
              ))}
            </ul>
          )}
        </Section>
        {canEdit && (
          <Section title="Record a site">
            <Form method="post" className="flex flex-col gap-4" noValidate>
              {message && <FormMessage>{message}</FormMessage>}
              <SiteFormFields values={values ?? {}} errors={errors} textureClasses={textureClasses} />
              <div>
                <SubmitButton pendingLabel="Saving…">Save site</SubmitButton>
              </div>
            </Form>
          </Section>
        )}
      </div>
    </>
  );
}
