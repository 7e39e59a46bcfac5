import { Link, useLoaderData } from "react-router";
import { requirePermission } from "~/.server/permissions";
import { listBriefs } from "~/.server/briefs";
import { listMembers } from "~/.server/programs";
import { listSites, listTrials } from "~/.server/trials";
import { cacheResponse } from "~/.server/response-cache";
import { BriefList } from "~/components/brief-list";
import { buttonClass } from "~/components/form";
import { DESIGN_LABELS, Empty, PageHeader, Section, StatusBadge } from "~/components/page";
import { ROLE_LABELS, roleCan } from "~/permissions";
import type { Route } from "./+types/program";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.program.name ?? "Program"} · Tilthmark` }];

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "briefs.view");
  const canSeeData = roleCan(member.role, "results.view");
  const [trials, sites, members] = canSeeData
    ? await Promise.all([listTrials(member.programId), listSites(member.programId), listMembers(member.programId)])
    : [[], [], []];
  const briefs = await listBriefs({ programId: member.programId });
  return {
    briefs: briefs.map((b) => ({ ...b, publishedAt: b.publishedAt.toISOString() })),
    program: { id: member.programId, name: member.programName },
    role: member.role,
    canSeeData,
    canManageMembers: roleCan(member.role, "members.manage"),
    trials,
    sites: sites.map((s) => ({ id: s.id, name: s.name, soilSeries: s.soilSeries, textureClass: s.textureClass })),
    memberCount: members.length,
  };
}

export default function ProgramPage() {
  const { program, role, canSeeData, canManageMembers, trials, sites, memberCount, briefs } = useLoaderData<typeof loader>();
  return (
    <>
      <PageHeader
        eyebrow="Program"
        title={program.name}
        lead={
          <>
            You are <strong>{ROLE_LABELS[role].label.toLowerCase()}</strong> here: {ROLE_LABELS[role].summary.toLowerCase()}
          </>
        }
        actions={
          <>
            {canSeeData && (
              <>
                <Link to={`/programs/${program.id}/sites`} className={buttonClass("secondary")}>
                  Sites
                </Link>
                <Link to={`/programs/${program.id}/amendments`} className={buttonClass("secondary")}>
                  Amendments
                </Link>
                <Link to={`/programs/${program.id}/lab`} className={buttonClass("secondary")}>
                  Lab methods
                </Link>
              </>
            )}
            {canManageMembers && (
              <Link to={`/programs/${program.id}/members`} className={buttonClass("secondary")}>
                Members ({memberCount})
              </Link>
            )}
          </>
        }
      />
      {canSeeData ? (
        <>
          <Section
            title="Trials"
            aside={
              roleCan(role, "trials.edit") && (
                <Link to={`/programs/${program.id}/trials/new`} className={buttonClass("primary")}>
                  New trial
                </Link>
              )
            }
          >
            {trials.length === 0 ? (
              <Empty>No trials yet.</Empty>
            ) : (
              <table className="w-full border-collapse overflow-hidden rounded-lg bg-white text-left text-sm shadow-xs">
                <thead className="bg-loam-100 text-loam-800">
                  <tr>
                    <th scope="col" className="px-4 py-2 font-medium">Trial</th>
                    <th scope="col" className="px-4 py-2 font-medium">Design</th>
                    <th scope="col" className="px-4 py-2 font-medium">Site</th>
                    <th scope="col" className="px-4 py-2 font-medium">Status</th>
                  </tr>
                </thead>
                <tbody>
                  {trials.map((t) => (
                    <tr key={t.id} className="border-t border-loam-200">
                      <td className="px-4 py-2">
                        <Link to={`/trials/${t.id}`}>{t.title}</Link>
                      </td>
                      <td className="px-4 py-2">{DESIGN_LABELS[t.design]}</td>
                      <td className="px-4 py-2">{t.siteName ?? "—"}</td>
                      <td className="px-4 py-2">
                        <StatusBadge status={t.status} />
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
          </Section>
          <Section title="Sites">
            {sites.length === 0 ? (
              <Empty>No sites recorded yet.</Empty>
            ) : (
              <ul className="grid gap-3 sm:grid-cols-2">
                {sites.map((s) => (
                  <li key={s.id} className="rounded-lg border border-loam-200 bg-white p-4">
                    <p className="font-medium">{s.name}</p>
                    <p className="text-sm text-loam-700">{[s.soilSeries, s.textureClass].filter(Boolean).join(" · ") || "No soil description yet"}</p>
                  </li>
                ))}
              </ul>
            )}
          </Section>
        </>
      ) : null}
      <Section title="Field briefs">
        <BriefList
          briefs={briefs}
          empty={
            <>
              No field briefs have been published in this program yet. When researchers publish one, it appears here with its
              summary table and cautions, ready to read, print and download.
            </>
          }
        />
      </Section>
    </>
  );
}
