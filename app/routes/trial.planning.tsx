import { Form, useLoaderData } from "react-router";
import { z } from "zod";
import { PlanningInput, planTrial } from "~/.server/design/planning";
import { listTreatments } from "~/.server/design/treatments";
import { getTrial } from "~/.server/design/trials";
import { notFound, requirePermission } from "~/.server/permissions";
import { Field, FormMessage } from "~/components/form";
import { Section } from "~/components/page";
import { formatNumber } from "~/format";
import type { Route } from "./+types/trial.planning";

export const meta: Route.MetaFunction = () => [{ title: "Power planning · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "trials.edit");
  const trial = await getTrial(params.trialId);
  if (!trial) notFound(request, "No such trial.");
  const treatments = (await listTreatments(trial.id)).length;
  const url = new URL(request.url);
  const values = Object.fromEntries(url.searchParams);
  const base = { trial: { status: trial.status, blockCount: trial.blockCount }, treatments, values };
  if (url.searchParams.size === 0) return { ...base, errors: undefined, plan: null };
  const parsed = PlanningInput.safeParse(values);
  if (!parsed.success) return { ...base, errors: z.flattenError(parsed.error).fieldErrors as Record<string, string[]>, plan: null };
  if (treatments < 2) return { ...base, errors: undefined, plan: null };
  return { ...base, errors: undefined, plan: planTrial(treatments, parsed.data), difference: parsed.data.difference };
}

export default function PlanningPage() {
  const data = useLoaderData<typeof loader>();
  const { trial, treatments, values, errors, plan } = data;
  const difference = "difference" in data ? data.difference : null;
  return (
    <div className="grid gap-10 lg:grid-cols-[1fr_1.4fr]">
      <Section title="Assumptions">
        {trial.status !== "draft" && (
          <div className="mb-4">
            <FormMessage tone="info">The design is locked; planning here is for reference only.</FormMessage>
          </div>
        )}
        {treatments < 2 && (
          <div className="mb-4">
            <FormMessage tone="info">Add at least two treatments first: the error degrees of freedom depend on their number.</FormMessage>
          </div>
        )}
        <Form method="get" className="flex flex-col gap-4" noValidate>
          <p className="text-sm text-loam-700">
            For a variable such as SOM (%) in 0–10 cm. Give an expected CV with its mean, or a residual mean square (MSE) from a pilot or
            an earlier trial on similar soil; a pilot MSE is used when both are given.
          </p>
          <div className="grid gap-4 sm:grid-cols-2">
            <Field label="Expected CV (%)" name="cv" defaultValue={values.cv} errors={errors} />
            <Field label="Expected mean" name="mean" defaultValue={values.mean} errors={errors} hint="e.g. 2.5 (% SOM)" />
          </div>
          <Field label="Pilot MSE (optional)" name="mse" defaultValue={values.mse} errors={errors} hint="Residual mean square, in the variable's units squared." />
          <Field label="Difference worth detecting" name="difference" defaultValue={values.difference} errors={errors} hint="Between two treatment means, in the variable's units." />
          <div className="grid gap-4 sm:grid-cols-2">
            <Field label="α (two-sided)" name="alpha" defaultValue={values.alpha ?? "0.05"} errors={errors} />
            <Field label="Power" name="power" defaultValue={values.power ?? "0.80"} errors={errors} />
          </div>
          <div>
            <button type="submit" className="inline-flex items-center rounded-md bg-moss-700 px-4 py-2 text-sm font-medium text-white hover:bg-moss-800">
              Work it out
            </button>
          </div>
        </Form>
      </Section>
      <Section title="Blocks and detectable difference">
        {!plan ? (
          <p className="text-loam-700">Enter the assumptions to see the minimum detectable difference for 3 to 8 blocks.</p>
        ) : (
          <>
            <table className="w-full max-w-md border-collapse bg-white text-left text-sm shadow-xs" data-testid="mdd-table">
              <caption className="mb-2 text-left text-loam-700">
                <span className="num">{treatments}</span> treatments · MSE <span className="num">{formatNumber(plan.mse, 4)}</span> (
                {plan.mseSource === "pilot" ? "pilot" : "from CV and mean"}) · α <span className="num">{plan.alpha}</span> · power{" "}
                <span className="num">{plan.power}</span>
              </caption>
              <thead className="bg-loam-100 text-loam-800">
                <tr>
                  <th scope="col" className="px-3 py-2 font-medium">Blocks</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">Error df</th>
                  <th scope="col" className="px-3 py-2 text-right font-medium">MDD</th>
                  <th scope="col" className="px-3 py-2 font-medium">Target met?</th>
                </tr>
              </thead>
              <tbody>
                {plan.table.map((row) => (
                  <tr key={row.blocks} className={`border-t border-loam-200 ${row.blocks === trial.blockCount ? "bg-moss-50" : ""}`}>
                    <th scope="row" className="num px-3 py-1.5 text-left font-normal">
                      {row.blocks}
                      {row.blocks === trial.blockCount && <span className="ml-2 font-sans text-xs text-loam-600">(this trial)</span>}
                    </th>
                    <td className="num px-3 py-1.5 text-right">{row.df}</td>
                    <td className="num px-3 py-1.5 text-right">{formatNumber(row.mdd, 3)}</td>
                    <td className="px-3 py-1.5">{difference !== null && row.mdd <= difference ? "yes" : "no"}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            <p className="mt-4 text-loam-900" data-testid="blocks-needed">
              {plan.needed === null ? (
                <>No number of blocks up to 50 detects a difference of <span className="num">{difference}</span>; consider a larger difference or a less variable measure.</>
              ) : (
                <>
                  Blocks needed to detect a difference of <span className="num">{difference}</span> with {Math.round(plan.power * 100)} % power:{" "}
                  <strong className="num">{plan.needed}</strong>.
                </>
              )}
            </p>
            <div className="mt-6 text-sm text-loam-700">
              <h3 className="font-semibold text-loam-900">How this is worked out</h3>
              <p className="mt-1">
                MDD = (t<sub>1−α/2, df</sub> + t<sub>power, df</sub>) · √(2·MSE / r), with df = (t − 1)(r − 1) for t treatments in r
                blocks of an RCBD; MSE from a CV is (CV/100 · mean)². It assumes the MSE holds for the new trial, normal errors with
                equal variance, one measurement per plot and a comparison of two treatment means. Seasons and depths analysed together
                change the error structure; treat this as a guide to the order of magnitude.
              </p>
            </div>
          </>
        )}
      </Section>
    </div>
  );
}
