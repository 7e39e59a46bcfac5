import { NavLink, Outlet, useLoaderData } from "react-router";
import { notFound, requirePermission } from "~/.server/permissions";
import { getTrialOverview } from "~/.server/trials";
import { PageHeader, StatusBadge } from "~/components/page";
import { TRIAL_TABS } from "~/components/trial-tabs";
import { roleCan } from "~/permissions";
import type { Route } from "./+types/trial-layout";

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "results.view");
  const overview = await getTrialOverview(request, params.trialId);
  if (!overview) notFound(request, "No such trial.");
  return {
    program: { id: member.programId, name: member.programName },
    trial: { id: overview.trial.id, title: overview.trial.title, status: overview.trial.status },
    role: member.role,
    tabs: TRIAL_TABS.filter((t) => roleCan(member.role, t.permission)).map(({ path, label }) => ({ path, label })),
  };
}

export default function TrialLayout() {
  const { program, trial, tabs } = useLoaderData<typeof loader>();
  return (
    <>
      <PageHeader
        crumbs={[{ to: `/programs/${program.id}`, label: program.name }]}
        eyebrow={
          <>
            Trial · <StatusBadge status={trial.status} />
          </>
        }
        title={trial.title}
      />
      <nav aria-label="Trial sections" className="no-print -mt-4 mb-8 flex flex-wrap gap-1 border-b border-loam-200">
        {tabs.map((tab) => (
          <NavLink
            key={tab.path}
            to={tab.path ? `/trials/${trial.id}/${tab.path}` : `/trials/${trial.id}`}
            end={tab.path === ""}
            className={({ isActive }) =>
              `-mb-px border-b-2 px-3 py-2 text-sm no-underline ${
                isActive ? "border-moss-700 font-medium text-moss-900" : "border-transparent text-loam-700 hover:text-loam-950"
              }`
            }
          >
            {tab.label}
          </NavLink>
        ))}
      </nav>
      <Outlet />
    </>
  );
}
