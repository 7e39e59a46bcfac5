import { Form, Link, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { lockDesign, plotCount, randomize, samplingEventCount, STORED_SEED_MAX, unlockDesign } from "~/.server/design/layout";
import { optionalNumber, requiredNumber, requiredText } from "~/.server/design/inputs";
import { refusing } from "~/.server/design/respond";
import { listFactors, listTreatments } from "~/.server/design/treatments";
import { getTrial, lockedMessage, trialHistory } from "~/.server/design/trials";
import { parseForm, readForm } from "~/.server/forms";
import { notFound, requirePermission } from "~/.server/permissions";
import { Field, FormMessage, SelectField, SubmitButton, buttonClass } from "~/components/form";
import { formState, outcomeOf } from "~/components/form-state";
import { TextAreaField } from "~/components/more-fields";
import { DESIGN_LABELS, Section } from "~/components/page";
import { PlotMapPanel } from "~/components/plot-map-panel";
import type { Route } from "./+types/trial.randomization";

export const meta: Route.MetaFunction = () => [{ title: "Randomization · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, { trialId: params.trialId }, "trials.edit");
  const trial = await getTrial(params.trialId);
  if (!trial) notFound(request, "No such trial.");
  const [treatments, factors, plots, history, samplingEvents] = await Promise.all([
    listTreatments(trial.id),
    listFactors(trial.id),
    plotCount(trial.id),
    trialHistory(trial.id, 25),
    samplingEventCount(trial.id),
  ]);
  return {
    trial: {
      id: trial.id,
      status: trial.status,
      design: trial.design,
      blockCount: trial.blockCount,
      seed: trial.randomizationSeed,
      arrangement: trial.arrangement,
      blockOrientation: trial.blockOrientation,
      lockedAt: trial.lockedAt?.toISOString() ?? null,
      hasPlotSize: Boolean(trial.plotLengthM && trial.plotWidthM),
    },
    treatmentCount: treatments.length,
    factorCount: factors.length,
    plots,
    samplingEvents,
    lockedNote: trial.status === "draft" ? null : lockedMessage(trial),
    history: history.map((h) => ({ ...h, at: h.at.toISOString() })),
    seedMax: STORED_SEED_MAX,
  };
}

const Intent = z.discriminatedUnion(
  "intent",
  [
    z.object({
      intent: z.literal("randomize"),
      blockCount: requiredNumber("Number of blocks", { min: 1, max: 50, integer: true }),
      arrangement: z.enum(["straight", "serpentine"], { error: "Choose straight or serpentine numbering." }),
      blockOrientation: z.enum(["rows", "columns"], { error: "Choose rows or columns." }),
      seed: optionalNumber("The seed", { min: 0, max: STORED_SEED_MAX, integer: true }),
    }),
    z.object({ intent: z.literal("lock") }),
    z.object({ intent: z.literal("unlock"), reason: requiredText("the reason for unlocking", 500) }),
  ],
  { error: "Unknown action." },
);

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "trials.edit");
  const parsed = parseForm(await readForm(request), Intent);
  if (!parsed.ok) return parsed.response;
  const input = parsed.data;
  if (input.intent === "lock") {
    const result = await refusing(input, () => lockDesign(member.user.id, params.trialId));
    return result instanceof Date ? { ok: "Design locked. The plots are fixed; print the plot map and application sheet for the field." } : result;
  }
  if (input.intent === "unlock") {
    const result = await refusing(input, () => unlockDesign(member.user.id, params.trialId, input.reason));
    return result ?? { ok: "Design unlocked. Correct it, randomize again if needed, and lock it before sampling." };
  }
  const { intent, ...options } = input;
  const result = await refusing(input, () => randomize(member.user.id, params.trialId, options));
  return "seed" in result ? { ok: `Randomized with seed ${result.seed}: ${result.plots} plots drawn.` } : result;
}

const ACTION_WORDS: Record<string, string> = {
  create: "created",
  update: "changed",
  add: "added",
  delete: "removed",
  generate: "generated",
  randomize: "randomized",
  lock: "locked",
  unlock: "unlocked",
  "change-status": "changed status of",
};

export default function RandomizationPage() {
  const { trial, treatmentCount, factorCount, plots, samplingEvents, lockedNote, history, seedMax } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const { ok, message } = outcomeOf(result);
  const rand = formState(result, "randomize");
  const unlock = formState(result, "unlock");
  const v = rand.values ?? {};
  const draft = trial.status === "draft";
  const crd = trial.design === "crd";
  const needsFactors = (trial.design === "factorial_rcbd" || trial.design === "split_plot") && factorCount === 0;
  return (
    <>
      <div aria-live="polite" className="mb-6 flex flex-col gap-2 empty:hidden">
        {ok && <FormMessage tone="success">{ok}</FormMessage>}
        {message && <FormMessage>{message}</FormMessage>}
        {lockedNote && <FormMessage tone="info">{lockedNote}</FormMessage>}
      </div>
      <div className="grid gap-10 lg:grid-cols-[1fr_2fr]">
        <div>
          <Section title="Layout">
            <dl className="mb-5 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
              <dt className="text-loam-600">Design</dt>
              <dd>
                {DESIGN_LABELS[trial.design]} {draft && <Link to={`/trials/${trial.id}/setup`}>(change)</Link>}
              </dd>
              <dt className="text-loam-600">Treatments</dt>
              <dd className="num">{treatmentCount}</dd>
              <dt className="text-loam-600">Plots drawn</dt>
              <dd className="num">{plots}</dd>
              <dt className="text-loam-600">Seed</dt>
              <dd className="num" data-testid="seed">
                {trial.seed ?? "—"}
              </dd>
            </dl>
            {draft ? (
              <Form method="post" className="flex flex-col gap-4" noValidate>
                {!trial.hasPlotSize && <FormMessage tone="info">Enter the plot size on Setup first: the plot map is drawn to scale.</FormMessage>}
                {needsFactors && <FormMessage tone="info">Add the factors on the Treatments page first.</FormMessage>}
                <Field label={crd ? "Replicates per treatment" : "Blocks"} name="blockCount" defaultValue={v.blockCount ?? String(trial.blockCount ?? 4)} errors={rand.errors} />
                <SelectField
                  label="Plot numbering"
                  name="arrangement"
                  options={[
                    { value: "straight", label: "Straight: every block numbered from the same end" },
                    { value: "serpentine", label: "Serpentine: every second block numbered back" },
                  ]}
                  defaultValue={v.arrangement ?? trial.arrangement}
                  errors={rand.errors}
                />
                <SelectField
                  label={crd ? "Field rows laid as" : "Blocks laid as"}
                  name="blockOrientation"
                  options={[
                    { value: "rows", label: "Rows (each runs east–west)" },
                    { value: "columns", label: "Columns (each runs north–south)" },
                  ]}
                  defaultValue={v.blockOrientation ?? trial.blockOrientation}
                  errors={rand.errors}
                />
                <Field
                  label="Seed (optional)"
                  name="seed"
                  defaultValue={v.seed ?? ""}
                  errors={rand.errors}
                  hint={`Leave blank for a fresh random seed, or enter a whole number from 0 to ${seedMax} to redraw a layout exactly.`}
                />
                <div>
                  <SubmitButton name="intent" value="randomize" pendingLabel="Randomizing…">
                    {plots > 0 ? "Randomize again" : "Randomize"}
                  </SubmitButton>
                </div>
              </Form>
            ) : (
              <p className="text-sm text-loam-700">
                Locked on <span className="num">{trial.lockedAt?.slice(0, 10)}</span>. The same seed always redraws this layout.
              </p>
            )}
          </Section>
          {draft && plots > 0 && (
            <Section title="Lock the design">
              <p className="mb-3 text-sm text-loam-700">
                Locking fixes the plots, treatments, applications and plot size. Check the map first. Until the first sampling
                event a researcher can unlock it again, with a reason; after that the layout is fixed for the life of the trial.
              </p>
              <Form
                method="post"
                onSubmit={(e) => {
                  if (!confirm("Lock this design? The plots become fixed for sampling.")) e.preventDefault();
                }}
              >
                <SubmitButton name="intent" value="lock" variant="danger" pendingLabel="Locking…">
                  Lock design
                </SubmitButton>
              </Form>
            </Section>
          )}
          {trial.status === "locked" && (
            <Section title="Unlock the design">
              {samplingEvents > 0 ? (
                <p className="text-sm text-loam-700">
                  Samples have been planned or taken on these plots ({samplingEvents} sampling event{samplingEvents === 1 ? "" : "s"}), so the layout stays fixed:
                  sample codes and measurements name its plots.
                </p>
              ) : (
                <Form method="post" className="flex flex-col gap-3" noValidate>
                  <p className="text-sm text-loam-700">No sampling event yet, so the design can be reopened for a correction. The reason goes into the audit log.</p>
                  <TextAreaField label="Reason for unlocking" name="reason" errors={unlock.errors} defaultValue={unlock.values?.reason} rows={2} />
                  <div>
                    <SubmitButton name="intent" value="unlock" variant="secondary" pendingLabel="Unlocking…">
                      Unlock design
                    </SubmitButton>
                  </div>
                </Form>
              )}
            </Section>
          )}
          <Section title="History">
            {history.length === 0 ? (
              <p className="text-sm text-loam-700">No changes recorded yet.</p>
            ) : (
              <ol className="space-y-1.5 text-sm">
                {history.map((h) => (
                  <li key={h.id}>
                    <time dateTime={h.at} className="num text-loam-600">
                      {h.at.slice(0, 16).replace("T", " ")}
                    </time>{" "}
                    {h.actor ?? "someone"} {ACTION_WORDS[h.action] ?? h.action} {h.entity.replace(/_/g, " ")}
                    {h.action === "randomize" && h.details && "seed" in h.details && (
                      <>
                        {" "}
                        (seed <span className="num">{String(h.details.seed)}</span>)
                      </>
                    )}
                  </li>
                ))}
              </ol>
            )}
          </Section>
        </div>
        <Section
          title="Plot map"
          aside={
            plots > 0 && (
              <Link to={`/trials/${trial.id}/plot-map`} className="text-sm">
                Full page, print and download
              </Link>
            )
          }
        >
          <PlotMapPanel trialId={trial.id} version={`${trial.seed}-${plots}-${trial.status}-${trial.arrangement}-${trial.blockOrientation}`} />
        </Section>
      </div>
    </>
  );
}
