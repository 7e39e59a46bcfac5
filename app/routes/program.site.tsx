import { Form, useActionData, useLoaderData, useSearchParams } from "react-router";
import { refusing } from "~/.server/design/respond";
import { getSite, SiteInput, TEXTURE_CLASSES, updateSite } from "~/.server/design/sites";
import { parseForm, readForm } from "~/.server/forms";
import { notFound, requirePermission } from "~/.server/permissions";
import { FormMessage, SubmitButton } from "~/components/form";
import { formState, outcomeOf } from "~/components/form-state";
import { PageHeader, Section } from "~/components/page";
import { SiteFormFields } from "~/components/site-form";
import { formatNumber } from "~/format";
import { roleCan } from "~/permissions";
import type { Route } from "./+types/program.site";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.site.name ?? "Site"} · Tilthmark` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "results.view");
  const site = await getSite(member.programId, params.siteId);
  if (!site) notFound(request, "No such site in this program.");
  return { program: { id: member.programId, name: member.programName }, canEdit: roleCan(member.role, "trials.edit"), site, textureClasses: TEXTURE_CLASSES };
}

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "trials.edit");
  const parsed = parseForm(await readForm(request), SiteInput);
  if (!parsed.ok) return parsed.response;
  const result = await refusing(parsed.data, () => updateSite(member.user.id, member.programId, params.siteId, parsed.data));
  return "id" in result ? { ok: "Site saved." } : result;
}

const str = (v: number | string | null) => (v === null ? "" : String(v));

export default function SitePage() {
  const { program, canEdit, site, textureClasses } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const { errors, values, message } = formState(result);
  const { ok } = outcomeOf(result);
  const [search] = useSearchParams();
  const current = {
    name: site.name,
    latitude: str(site.latitude),
    longitude: str(site.longitude),
    soilSeries: str(site.soilSeries),
    textureClass: str(site.textureClass),
    sandPct: str(site.sandPct),
    siltPct: str(site.siltPct),
    clayPct: str(site.clayPct),
    notes: str(site.notes),
  };
  return (
    <>
      <PageHeader
        crumbs={[
          { to: `/programs/${program.id}`, label: program.name },
          { to: `/programs/${program.id}/sites`, label: "Sites" },
        ]}
        eyebrow="Site"
        title={site.name}
        lead={[site.soilSeries, site.textureClass].filter(Boolean).join(" · ") || undefined}
      />
      {canEdit ? (
        <Section title="Details">
          <Form method="post" className="flex max-w-2xl flex-col gap-4" noValidate>
            <div aria-live="polite" className="empty:hidden">
              {(ok || (search.get("saved") && !result)) && <FormMessage tone="success">{ok ?? "Site saved."}</FormMessage>}
              {message && <FormMessage>{message}</FormMessage>}
            </div>
            <SiteFormFields values={values ?? current} errors={errors} textureClasses={textureClasses} />
            <div>
              <SubmitButton pendingLabel="Saving…">Save site</SubmitButton>
            </div>
          </Form>
        </Section>
      ) : (
        <Section title="Details">
          <dl className="grid max-w-xl grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
            <dt className="text-loam-600">Location</dt>
            <dd className="num">{site.latitude !== null ? `${formatNumber(site.latitude, 4)}, ${formatNumber(site.longitude, 4)}` : "—"}</dd>
            <dt className="text-loam-600">Sand / silt / clay</dt>
            <dd className="num">
              {formatNumber(site.sandPct, 0)} / {formatNumber(site.siltPct, 0)} / {formatNumber(site.clayPct, 0)} %
            </dd>
            <dt className="text-loam-600">Notes</dt>
            <dd>{site.notes ?? "—"}</dd>
          </dl>
        </Section>
      )}
    </>
  );
}
