import { Form, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { optionalText, requiredText, statusField, TrialInput } from "~/.server/design/inputs";
import { refusing } from "~/.server/design/respond";
import { changeStatus, getTrial, listSitesOf, lockedMessage, STATUS_MOVES, updateTrial } from "~/.server/design/trials";
import { parseForm, readForm } from "~/.server/forms";
import { notFound, requirePermission } from "~/.server/permissions";
import { FormMessage, SelectField, SubmitButton } from "~/components/form";
import { formState, outcomeOf } from "~/components/form-state";
import { DESIGN_LABELS, Section } from "~/components/page";
import { TrialFormFields } from "~/components/trial-form";
import { formatNumber } from "~/format";
import type { Route } from "./+types/trial.setup";

export const meta: Route.MetaFunction = () => [{ title: "Trial setup · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "trials.edit");
  const trial = await getTrial(params.trialId);
  if (!trial) notFound(request, "No such trial.");
  const sites = await listSitesOf(member.programId);
  return {
    trial: {
      title: trial.title,
      objective: trial.objective,
      hypotheses: trial.hypotheses,
      siteId: trial.siteId,
      design: trial.design,
      plotLengthM: trial.plotLengthM,
      plotWidthM: trial.plotWidthM,
      alleyBetweenPlotsM: trial.alleyBetweenPlotsM,
      alleyBetweenBlocksM: trial.alleyBetweenBlocksM,
      blockCount: trial.blockCount,
      status: trial.status,
    },
    siteName: sites.find((s) => s.id === trial.siteId)?.name ?? null,
    lockedNote: trial.status === "draft" ? null : lockedMessage(trial),
    statusMoves: STATUS_MOVES[trial.status],
    sites,
  };
}

const Describe = z.object({ title: requiredText("a title", 200), objective: optionalText(4000), hypotheses: optionalText(4000) });

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "trials.edit");
  const form = await readForm(request);
  const intent = form.get("intent");
  if (intent === "status") {
    const parsed = parseForm(form, z.object({ intent: z.literal("status"), status: statusField }));
    if (!parsed.ok) return parsed.response;
    const result = await refusing(parsed.data, () => changeStatus(member.user.id, params.trialId, parsed.data.status));
    return "id" in result ? { ok: `Status is now ${result.status}.` } : result;
  }
  const parsed = parseForm(form, intent === "describe" ? Describe.extend({ intent: z.literal("describe") }) : TrialInput.extend({ intent: z.literal("save") }));
  if (!parsed.ok) return parsed.response;
  const { intent: _, ...input } = parsed.data;
  const result = await refusing(parsed.data, () => updateTrial(member.user.id, params.trialId, input));
  return "id" in result ? { ok: "Trial saved." } : result;
}

const str = (n: number | null | undefined) => (n === null || n === undefined ? "" : String(n));

export default function TrialSetupPage() {
  const { trial, sites, siteName, lockedNote, statusMoves } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const locked = trial.status !== "draft";
  const save = formState(result, locked ? "describe" : "save");
  const status = formState(result, "status");
  const { ok } = outcomeOf(result);
  const values = save.values ?? {
    title: trial.title,
    objective: trial.objective ?? "",
    hypotheses: trial.hypotheses ?? "",
    siteId: trial.siteId ?? "",
    design: trial.design,
    plotLengthM: str(trial.plotLengthM),
    plotWidthM: str(trial.plotWidthM),
    alleyBetweenPlotsM: str(trial.alleyBetweenPlotsM),
    alleyBetweenBlocksM: str(trial.alleyBetweenBlocksM),
    blockCount: str(trial.blockCount),
  };
  return (
    <div className="grid gap-10 lg:grid-cols-[2fr_1fr]">
      <Section title="Trial">
        <Form method="post" className="flex flex-col gap-5" noValidate>
          <div aria-live="polite" className="empty:hidden">
            {ok && <FormMessage tone="success">{ok}</FormMessage>}
            {save.message && <FormMessage>{save.message}</FormMessage>}
          </div>
          {lockedNote && <FormMessage tone="info">{lockedNote}</FormMessage>}
          <TrialFormFields values={values} errors={save.errors} sites={sites} structureLocked={locked} />
          <div>
            <SubmitButton name="intent" value={locked ? "describe" : "save"} pendingLabel="Saving…">
              Save trial
            </SubmitButton>
          </div>
        </Form>
      </Section>
      <aside>
        <Section title="Status">
          <p className="mb-3 text-sm text-loam-700">
            A trial runs <strong>draft → locked → running → closed</strong>. It becomes locked when you lock its design on the
            Randomization page; after that the plots are fixed.
          </p>
          <p className="mb-4 text-sm">
            Now: <strong>{trial.status}</strong>
          </p>
          {statusMoves.length > 0 ? (
            <Form method="post" className="flex flex-col gap-3" noValidate>
              {status.message && <FormMessage>{status.message}</FormMessage>}
              <SelectField
                label="Move to"
                name="status"
                options={statusMoves.map((s) => ({ value: s, label: s }))}
                defaultValue={statusMoves[0]}
                errors={status.errors}
              />
              <div>
                <SubmitButton name="intent" value="status" variant="secondary">
                  Change status
                </SubmitButton>
              </div>
            </Form>
          ) : (
            <p className="text-sm text-loam-700">{trial.status === "closed" ? "The trial is closed." : "Lock the design to move on from draft."}</p>
          )}
        </Section>
        {locked && (
          <Section title="Fixed by the lock">
            <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
              <dt className="text-loam-600">Site</dt>
              <dd>{siteName ?? "—"}</dd>
              <dt className="text-loam-600">Design</dt>
              <dd>{DESIGN_LABELS[trial.design]}</dd>
              <dt className="text-loam-600">Blocks</dt>
              <dd className="num">{trial.blockCount ?? "—"}</dd>
              <dt className="text-loam-600">Plot</dt>
              <dd className="num">
                {formatNumber(trial.plotWidthM)} m × {formatNumber(trial.plotLengthM)} m
              </dd>
              <dt className="text-loam-600">Alleys</dt>
              <dd className="num">
                {formatNumber(trial.alleyBetweenPlotsM)} m / {formatNumber(trial.alleyBetweenBlocksM)} m
              </dd>
            </dl>
          </Section>
        )}
      </aside>
    </div>
  );
}
