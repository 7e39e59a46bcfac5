import { Form, Link, redirect, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { draftBrief, listBriefs, publishBrief, type BriefSelection } from "~/.server/briefs";
import { invalid, parseForm, readForm } from "~/.server/forms";
import { requirePermission } from "~/.server/permissions";
import { ResultsError, trialData } from "~/.server/results/service";
import { buttonClass, Field, FormMessage, SelectField, SubmitButton } from "~/components/form";
import { TextAreaField } from "~/components/more-fields";
import { Empty, Section } from "~/components/page";
import { formatNumber, formatP } from "~/format";
import { roleCan } from "~/permissions";
import type { Route } from "./+types/trial.briefs";

export const meta: Route.MetaFunction = () => [{ title: "Field briefs · Tilthmark" }];

const Selection = z.object({
  variables: z.array(z.string().regex(/^[a-z][a-z0-9_]{1,39}$/)).min(1, "Choose at least one variable.").max(8),
  depth: z.string().max(20).optional(),
  season: z.string().max(120).optional(),
  method: z.enum(["tukey", "lsd"]).default("tukey"),
  alpha: z.coerce.number().min(0.001).max(0.2).default(0.05),
});

function selectionFrom(params: URLSearchParams) {
  return Selection.safeParse({
    variables: params.getAll("variables"),
    depth: params.get("depth") || undefined,
    season: params.get("season") || undefined,
    method: params.get("method") || undefined,
    alpha: params.get("alpha") || undefined,
  });
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "results.view");
  const briefs = await listBriefs({ trialId: params.trialId });
  const canPublish = roleCan(member.role, "briefs.publish");
  if (!canPublish) return { canPublish, briefs, options: null, draft: null, error: null, author: member.user.name };
  const data = await trialData(params.trialId);
  const options = { variables: data.variables, depths: data.depths, seasons: data.seasons.filter((s) => !s.isBaseline) };
  const url = new URL(request.url);
  if (!url.searchParams.has("variables")) return { canPublish, briefs, options, draft: null, error: null, author: member.user.name };
  const selection = selectionFrom(url.searchParams);
  if (!selection.success) return { canPublish, briefs, options, draft: null, error: selection.error.issues[0].message, author: member.user.name };
  try {
    const draft = await draftBrief(params.trialId, selection.data, url.searchParams.get("water") === "on");
    return { canPublish, briefs, options, draft: { content: draft, selection: selection.data, water: url.searchParams.get("water") === "on" }, error: null, author: member.user.name };
  } catch (error) {
    if (error instanceof ResultsError) return { canPublish, briefs, options, draft: null, error: error.message, author: member.user.name };
    throw error;
  }
}

const Publish = z.object({
  briefId: z.union([z.literal("new"), z.uuid("Choose a brief from the list.")]),
  title: z.string().trim().min(5, "Give the brief a title of at least 5 characters.").max(160, "Use at most 160 characters."),
  summary: z.string().trim().min(20, "Write at least a sentence of findings (20 characters or more).").max(5000, "Keep the summary under 5,000 characters."),
  context: z.string().trim().max(5000, "Keep the context under 5,000 characters.").optional(),
  authors: z.string().trim().min(2, "Name the authors.").max(300, "Use at most 300 characters."),
  isPublic: z.enum(["yes", "no"]).default("no"),
  selection: z.string().max(2000),
});

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "briefs.publish");
  const formData = await readForm(request);
  const parsed = parseForm(formData, Publish);
  if (!parsed.ok) return parsed.response;
  const input = parsed.data;
  const selection = selectionFrom(new URLSearchParams(input.selection));
  if (!selection.success) return invalid({}, input, "The selection behind this draft is not valid; draft the brief again.");
  try {
    const { briefId, version } = await publishBrief({ id: member.user.id, programId: member.programId }, params.trialId, {
      briefId: input.briefId === "new" ? null : input.briefId,
      title: input.title,
      summary: input.summary,
      context: input.context || null,
      authors: input.authors,
      isPublic: input.isPublic === "yes",
      includeWater: new URLSearchParams(input.selection).get("water") === "on",
      selection: selection.data as BriefSelection,
    });
    return redirect(`/briefs/${briefId}/v/${version}`);
  } catch (error) {
    if (error instanceof ResultsError) return invalid({}, input, error.message);
    throw error;
  }
}

export default function TrialBriefs() {
  const { canPublish, briefs, options, draft, error, author } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const errors = result && "errors" in result ? result.errors : undefined;
  const values = result && "values" in result ? result.values : undefined;
  const selectionString = draft
    ? new URLSearchParams([
        ...draft.selection.variables.map((v) => ["variables", v]),
        ...(draft.selection.depth ? [["depth", draft.selection.depth]] : []),
        ...(draft.selection.season ? [["season", draft.selection.season]] : []),
        ["method", draft.selection.method],
        ["alpha", String(draft.selection.alpha)],
        ...(draft.water ? [["water", "on"]] : []),
      ]).toString()
    : "";
  return (
    <div className="flex flex-col gap-2">
      <Section title="Published field briefs">
        {briefs.length === 0 ? (
          <Empty>No field brief has been published for this trial yet.</Empty>
        ) : (
          <ul className="divide-y divide-loam-200 rounded-lg border border-loam-200 bg-white">
            {briefs.map((b) => (
              <li key={b.id} className="flex flex-wrap items-center justify-between gap-2 px-4 py-3">
                <span>
                  <Link to={`/briefs/${b.id}`}>{b.title}</Link>
                  <span className="ml-2 text-sm text-loam-600">
                    version {b.version} · {new Date(b.publishedAt).toISOString().slice(0, 10)} · {b.isPublic ? "public" : "program members"}
                  </span>
                </span>
              </li>
            ))}
          </ul>
        )}
      </Section>

      {canPublish && options && (
        <Section title="Draft a field brief">
          <p className="mb-4 max-w-3xl text-sm text-loam-700">
            Choose what the brief reports. Tilthmark drafts the summary table and a plain-language paragraph from the current
            results; you edit the text, add context, and publish. A published version is frozen: later data do not change it.
          </p>
          <Form method="get" className="flex flex-wrap items-end gap-4 rounded-lg border border-loam-200 bg-white p-4">
            <fieldset className="flex flex-col gap-1">
              <legend className="text-sm font-medium">Variables</legend>
              <div className="flex flex-wrap gap-3 pt-1">
                {options.variables.map((v) => (
                  <label key={v.id} className="flex items-center gap-1.5 text-sm">
                    <input type="checkbox" name="variables" value={v.id} defaultChecked={draft ? draft.selection.variables.includes(v.id) : v.id === "som"} />
                    {v.label}
                  </label>
                ))}
              </div>
            </fieldset>
            <label className="flex flex-col gap-1 text-sm font-medium">
              Depth
              <select name="depth" defaultValue={draft?.selection.depth ?? ""} className="rounded-md border border-loam-400 bg-white px-2 py-1.5 text-sm">
                <option value="">Top increment</option>
                {options.depths.increments.map((d) => (
                  <option key={`${d.topCm}-${d.bottomCm}`} value={`${d.topCm}-${d.bottomCm}`}>
                    {d.topCm}–{d.bottomCm} cm
                  </option>
                ))}
                {options.depths.cumulative.map((d) => (
                  <option key={`c${d.bottomCm}`} value={`${d.topCm}-${d.bottomCm}`}>
                    {d.topCm}–{d.bottomCm} cm (cumulative, stocks only)
                  </option>
                ))}
              </select>
            </label>
            <label className="flex flex-col gap-1 text-sm font-medium">
              Season reported
              <select name="season" defaultValue={draft?.selection.season ?? ""} className="rounded-md border border-loam-400 bg-white px-2 py-1.5 text-sm">
                <option value="">Latest</option>
                {options.seasons.map((s) => (
                  <option key={s.label} value={s.label}>
                    {s.label}
                  </option>
                ))}
              </select>
            </label>
            <label className="flex flex-col gap-1 text-sm font-medium">
              Comparisons
              <select name="method" defaultValue={draft?.selection.method ?? "tukey"} className="rounded-md border border-loam-400 bg-white px-2 py-1.5 text-sm">
                <option value="tukey">Tukey–Kramer</option>
                <option value="lsd">Protected LSD</option>
              </select>
            </label>
            <label className="flex items-center gap-1.5 text-sm">
              <input type="checkbox" name="water" defaultChecked={draft?.water ?? false} /> Add a rough water-holding estimate
            </label>
            <button type="submit" className={buttonClass("secondary")}>
              Draft
            </button>
          </Form>
          {error && (
            <div className="mt-4">
              <FormMessage>{error}</FormMessage>
            </div>
          )}
          {draft && (
            <div className="mt-6 grid gap-6">
              {draft.content.sections.map((s) => (
                <div key={`${s.variable.id}-${s.depthLabel}`}>
                  <h3 className="font-semibold">
                    {s.variable.label}, {s.depthLabel}, {s.season}
                  </h3>
                  <table className="mt-2 w-full rounded-lg bg-white text-sm shadow-xs">
                    <thead className="bg-loam-100 text-left text-loam-800">
                      <tr>
                        <th scope="col" className="px-3 py-2 font-medium">Treatment</th>
                        <th scope="col" className="px-3 py-2 text-right font-medium">Mean ({s.variable.unit})</th>
                        <th scope="col" className="px-3 py-2 text-right font-medium">Change from baseline</th>
                        <th scope="col" className="px-3 py-2 text-center font-medium">Group</th>
                        <th scope="col" className="px-3 py-2 text-right font-medium">vs check (CI)</th>
                        <th scope="col" className="px-3 py-2 text-right font-medium">p</th>
                      </tr>
                    </thead>
                    <tbody>
                      {s.rows.map((r) => (
                        <tr key={r.code} className="border-t border-loam-200">
                          <td className="px-3 py-1.5">{r.name}</td>
                          <td className="num px-3 py-1.5 text-right">{formatNumber(r.mean, s.variable.decimals)}</td>
                          <td className="num px-3 py-1.5 text-right">
                            {formatNumber(r.change, s.variable.decimals)} ({formatNumber(r.changePercent, 0)} %)
                          </td>
                          <td className="num px-3 py-1.5 text-center">{r.group}</td>
                          <td className="num px-3 py-1.5 text-right">
                            {r.vsCheck
                              ? `${formatNumber(r.vsCheck.diff, s.variable.decimals)} (${formatNumber(r.vsCheck.lower, s.variable.decimals)} to ${formatNumber(r.vsCheck.upper, s.variable.decimals)})`
                              : "—"}
                          </td>
                          <td className="num px-3 py-1.5 text-right">{r.vsCheck ? formatP(r.vsCheck.p) : ""}</td>
                        </tr>
                      ))}
                    </tbody>
                  </table>
                </div>
              ))}
              <Form method="post" className="flex max-w-3xl flex-col gap-4 rounded-lg border border-loam-200 bg-white p-4" noValidate>
                {result && "message" in result && result.message && <FormMessage>{result.message}</FormMessage>}
                <input type="hidden" name="selection" value={selectionString} />
                <SelectField
                  label="Publish as"
                  name="briefId"
                  defaultValue={values?.briefId ?? "new"}
                  options={[{ value: "new", label: "A new field brief" }, ...briefs.map((b) => ({ value: b.id, label: `Version ${b.version + 1} of “${b.title}”` }))]}
                  errors={errors}
                />
                <Field label="Title" name="title" maxLength={160} defaultValue={values?.title ?? `${draft.content.trial.title}: what the amendments did`} errors={errors} required />
                <TextAreaField
                  label="Findings in plain language"
                  name="summary"
                  rows={6}
                  defaultValue={values?.summary ?? draft.content.sections.map((s) => s.sentence).join("\n\n")}
                  hint="Drafted from the numbers above; edit freely, but keep it true to the table."
                  errors={errors}
                />
                <TextAreaField
                  label="Context (site, soil, weather, rates applied, cost where known)"
                  name="context"
                  rows={4}
                  defaultValue={values?.context ?? [draft.content.trial.site, draft.content.trial.soil].filter(Boolean).join("; ")}
                  errors={errors}
                />
                <Field label="Authors" name="authors" maxLength={300} defaultValue={values?.authors ?? author} errors={errors} required />
                <SelectField
                  label="Who can read it"
                  name="isPublic"
                  defaultValue={values?.isPublic ?? "no"}
                  options={[
                    { value: "no", label: "Members of this program (extension agents included)" },
                    { value: "yes", label: "Anyone with the link (page and CSV, no sign-in)" },
                  ]}
                  errors={errors}
                />
                <div>
                  <SubmitButton pendingLabel="Publishing…">Publish field brief</SubmitButton>
                </div>
              </Form>
            </div>
          )}
        </Section>
      )}
    </div>
  );
}

