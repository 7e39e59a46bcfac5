import { Form, Link, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { listBriefs } from "~/.server/briefs";
import { requireAdmin, requirePermission, requireUser } from "~/.server/permissions";
import { ProgramError, createProgram, listProgramsOf } from "~/.server/programs";
import { invalid, parseForm, readForm } from "~/.server/forms";
import { listTrialsByProgram } from "~/.server/trials";
import { cacheResponse } from "~/.server/response-cache";
import { BriefList } from "~/components/brief-list";
import { Field, FormMessage, SubmitButton } from "~/components/form";
import { Empty, PageHeader, Section, StatusBadge, DESIGN_LABELS } from "~/components/page";
import { ROLE_LABELS, roleCan } from "~/permissions";
import type { Route } from "./+types/home";

export const meta: Route.MetaFunction = () => [{ title: "Your programs · Tilthmark" }];

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const programs = await listProgramsOf(request, user.id);
  // Roles with results.view see the program's trials (and can open them); the others (extension
  // agents) see its published field briefs instead, never a link to a page they would be refused.
  const withData = programs.filter((p) => roleCan(p.role, "results.view"));
  const briefsOnly = programs.filter((p) => !roleCan(p.role, "results.view"));
  const [trials, briefs] = await Promise.all([
    listTrialsByProgram(withData.map((p) => p.id)),
    Promise.all(
      briefsOnly.map(async (p) => {
        const member = await requirePermission(request, { programId: p.id }, "briefs.view");
        const list = await listBriefs({ programId: member.programId });
        return [p.id, list.map((b) => ({ ...b, publishedAt: b.publishedAt.toISOString() }))] as const;
      }),
    ).then((entries) => new Map(entries)),
  ]);
  return {
    user: { name: user.name, isAdmin: user.isAdmin },
    programs: programs.map((p) => ({ ...p, trials: trials.get(p.id) ?? [], briefs: briefs.get(p.id) ?? null })),
  };
}

const NewProgram = z.object({
  name: z.string().trim().min(3, "Use at least 3 characters.").max(100, "Use at most 100 characters."),
});

export async function action({ request }: Route.ActionArgs) {
  const admin = await requireAdmin(request);
  const parsed = parseForm(await readForm(request), NewProgram);
  if (!parsed.ok) return parsed.response;
  try {
    const program = await createProgram(request, admin.id, parsed.data.name);
    return { created: program.name };
  } catch (error) {
    if (error instanceof ProgramError) return invalid({ name: [error.message] }, parsed.data);
    throw error;
  }
}

export default function Home() {
  const { user, programs } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  return (
    <>
      <PageHeader
        eyebrow="Overview"
        title={`Welcome, ${user.name.split(" ")[0]}`}
        lead={
          programs.length > 0 && programs.every((p) => p.briefs)
            ? "The field briefs published in your programs. Open one to read, print or download it."
            : "Your programs and their trials. Open a trial to see its layout, lab data and results."
        }
      />
      {programs.length === 0 && !user.isAdmin && (
        <Empty>You are not a member of any program yet. Ask a program owner to invite you.</Empty>
      )}
      {programs.map((program) => (
        <Section
          key={program.id}
          title={program.name}
          aside={
            <span className="text-sm text-loam-700">
              Your role: <strong>{ROLE_LABELS[program.role].label}</strong> ·{" "}
              <Link to={`/programs/${program.id}`}>program page</Link>
            </span>
          }
        >
          {program.briefs ? (
            <>
              <h3 className="mb-2 text-sm font-medium text-loam-800">Published field briefs</h3>
              <BriefList
                briefs={program.briefs}
                empty="No field briefs have been published yet. When researchers in this program publish one, it appears here, ready to read, print and download."
              />
            </>
          ) : program.trials.length === 0 ? (
            <Empty>No trials in this program yet.</Empty>
          ) : (
            <ul className="grid gap-3 sm:grid-cols-2">
              {program.trials.map((trial) => (
                <li key={trial.id}>
                  <Link
                    to={`/trials/${trial.id}`}
                    className="block rounded-lg border border-loam-200 bg-white p-4 no-underline shadow-xs hover:border-moss-600"
                  >
                    <span className="flex items-start justify-between gap-3">
                      <span className="font-medium text-loam-950">{trial.title}</span>
                      <StatusBadge status={trial.status} />
                    </span>
                    <span className="mt-1 block text-sm text-loam-700">
                      {DESIGN_LABELS[trial.design]} {trial.siteName && <>· {trial.siteName}</>}
                    </span>
                  </Link>
                </li>
              ))}
            </ul>
          )}
        </Section>
      ))}
      {user.isAdmin && (
        <Section title="Create a program">
          <Form method="post" className="flex max-w-lg flex-col gap-4" noValidate>
            {result && "created" in result && (
              <FormMessage tone="success">Program “{result.created}” created. You are its owner.</FormMessage>
            )}
            <Field
              label="Program name"
              name="name"
              hint="A research group or station, e.g. “Upland Soils Lab”."
              defaultValue={result && "values" in result ? result.values?.name : undefined}
              errors={result && "errors" in result ? result.errors : undefined}
              maxLength={100}
              required
            />
            <div>
              <SubmitButton pendingLabel="Creating…">Create program</SubmitButton>
            </div>
          </Form>
        </Section>
      )}
    </>
  );
}
