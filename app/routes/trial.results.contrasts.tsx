import { useState } from "react";
import { Form, Link, redirect, useActionData, useLoaderData, useSearchParams } from "react-router";
import { invalid, nulRefusal, readForm } from "~/.server/forms";
import { requirePermission } from "~/.server/permissions";
import { addPreset, contrastsView, deleteContrast, saveContrast } from "~/.server/results/contrasts";
import { parseResultsQuery, ResultsError, ResultsQuery, trialData } from "~/.server/results/service";
import { ContrastsTable, coefficientText, OrthogonalityNote } from "~/components/contrasts-table";
import { buttonClass, Field, FormMessage, SubmitButton } from "~/components/form";
import { Empty, Section } from "~/components/page";
import { roleCan } from "~/permissions";
import { contrastPresets, contrastProblem } from "../../analysis/treatment-contrasts";
import type { Route } from "./+types/trial.results.contrasts";

export const meta: Route.MetaFunction = () => [{ title: "Contrasts · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "results.view");
  const url = new URL(request.url);
  const parsed = parseResultsQuery(url);
  const query = parsed.ok ? parsed.query : ResultsQuery.parse({});
  const [data, view] = await Promise.all([trialData(params.trialId), contrastsView(params.trialId, query)]);
  const { presets, unavailable } = contrastPresets(data.treatments);
  return {
    canEdit: roleCan(member.role, "trials.edit"),
    treatments: data.treatments.map((t) => ({ code: t.code, name: t.name, isCheck: t.isCheck })),
    presets: presets.map((p) => ({ id: p.id, label: p.label, names: p.contrasts.map((c) => c.name) })),
    unavailable,
    view,
    decimals: data.variables.find((v) => v.id === query.variable)?.decimals ?? 2,
    queryError: parsed.ok ? null : parsed.message,
    search: url.search,
  };
}

/** "1", "−0.5", "+2", "1/3": a coefficient as researchers write it; null when it is not a number. */
function parseCoefficient(text: string): number | null {
  const t = text.trim().replace(/^−/, "-");
  if (t === "") return 0;
  const m = /^([+-]?\d+(?:\.\d+)?|[+-]?\.\d+)(?:\/(\d+(?:\.\d+)?))?$/.exec(t);
  if (!m) return null;
  const value = Number(m[1]) / (m[2] === undefined ? 1 : Number(m[2]));
  return Number.isFinite(value) ? value : null;
}

export async function action({ request, params }: Route.ActionArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "trials.edit");
  const form = await readForm(request);
  const values = Object.fromEntries([...form].filter((e): e is [string, string] => typeof e[1] === "string"));
  const nul = nulRefusal(values);
  if (nul) return nul;
  const back = (saved: string) => {
    const search = new URL(request.url).searchParams;
    search.set("saved", saved);
    return redirect(`/trials/${params.trialId}/results/contrasts?${search}`);
  };
  const actor = member.user.id;
  switch (values.intent) {
    case "save": {
      const data = await trialData(params.trialId);
      const errors: Record<string, string[]> = {};
      const name = (values.name ?? "").trim();
      if (name === "") errors.name = ["Name the contrast, e.g. “Composts vs check”."];
      else if (name.length > 80) errors.name = ["Use at most 80 characters."];
      const coefficients: Record<string, number> = {};
      for (const t of data.treatments) {
        const value = parseCoefficient(values[`c:${t.code}`] ?? "");
        if (value === null) errors[`c:${t.code}`] = [`Write a number such as 1, −1, 0.5 or 1/3.`];
        else if (value !== 0) coefficients[t.code] = value;
      }
      if (Object.keys(errors).every((k) => !k.startsWith("c:"))) {
        const problem = contrastProblem(coefficients);
        if (problem) errors.coefficients = [problem];
      }
      if (Object.keys(errors).length > 0) return invalid(errors, values);
      const outcome = await saveContrast(params.trialId, actor, { name, coefficients });
      return back(outcome === "replaced" ? `Replaced the coefficients of “${name}”.` : `Saved “${name}”.`);
    }
    case "preset": {
      try {
        const { added, kept } = await addPreset(params.trialId, actor, values.preset ?? "");
        return back(
          added.length === 0
            ? "Every contrast of that preset is already saved."
            : `Added ${added.length} contrast${added.length === 1 ? "" : "s"}${kept.length ? `; ${kept.length} already saved kept as they were` : ""}.`,
        );
      } catch (error) {
        if (error instanceof ResultsError) return invalid({}, values, error.message);
        throw error;
      }
    }
    case "delete": {
      const contrastId = values.contrastId ?? "";
      const deleted = /^[0-9a-f-]{36}$/i.test(contrastId) ? await deleteContrast(params.trialId, actor, contrastId) : null;
      if (!deleted) return invalid({}, values, "That contrast was already deleted.");
      return back(`Deleted “${deleted}”.`);
    }
    default:
      return invalid({}, values, "Unknown action.");
  }
}

export default function ContrastsPage({ params }: Route.ComponentProps) {
  const { canEdit, treatments, presets, unavailable, view, decimals, queryError, search } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const [searchParams] = useSearchParams();
  const saved = searchParams.get("saved");
  const selection = new URLSearchParams(search);
  selection.delete("saved");
  const selectionSearch = selection.size ? `?${selection}` : "";
  return (
    <div className="flex flex-col gap-8">
      <p className="text-sm text-loam-800">
        <Link to={`/trials/${params.trialId}/results${selectionSearch}`}>← Results</Link>
        {view.analysisLabel && (
          <>
            {" "}· Contrasts are tested on the treatment means of <strong>{view.analysisLabel}</strong>; change the selection on the results page.
          </>
        )}
      </p>
      <div aria-live="polite" className="flex flex-col gap-2 empty:hidden">
        {saved && !result && <FormMessage tone="success">{saved}</FormMessage>}
        {result?.message && <FormMessage>{result.message}</FormMessage>}
        {queryError && <FormMessage>{queryError}</FormMessage>}
      </div>

      <Section title={`Saved contrasts (${view.contrasts.length})`}>
        {view.contrasts.length === 0 ? (
          <Empty>No contrasts yet.{canEdit ? " Write one below or add a preset set." : " A researcher adds them."}</Empty>
        ) : (
          <div className="flex flex-col gap-3">
            {view.analysisError ? <FormMessage>{view.analysisError}</FormMessage> : <ContrastsTable view={view} decimals={decimals} />}
            <OrthogonalityNote view={view} />
            {canEdit && (
              <details>
                <summary className="cursor-pointer text-sm text-moss-800">Delete a contrast</summary>
                <ul className="mt-2 flex flex-col gap-2">
                  {view.contrasts.map((c) => (
                    <li key={c.id} className="flex flex-wrap items-center gap-3 text-sm">
                      <Form method="post">
                        <input type="hidden" name="contrastId" value={c.id} />
                        <button type="submit" name="intent" value="delete" className={buttonClass("danger")} aria-label={`Delete contrast ${c.name}`}>
                          Delete
                        </button>
                      </Form>
                      <span>
                        {c.name} <span className="num text-loam-600">({coefficientText(c.coefficients)})</span>
                      </span>
                    </li>
                  ))}
                </ul>
              </details>
            )}
          </div>
        )}
      </Section>

      {canEdit ? (
        <>
          <Section title="New contrast">
            <ContrastForm treatments={treatments} errors={result?.errors} values={result?.values} key={saved ?? "new"} />
          </Section>
          <Section title="Presets">
            {presets.length === 0 ? (
              <Empty>No preset fits these treatments.</Empty>
            ) : (
              <ul className="flex flex-col gap-3">
                {presets.map((p) => (
                  <li key={p.id} className="flex flex-wrap items-center gap-3">
                    <Form method="post">
                      <input type="hidden" name="preset" value={p.id} />
                      <SubmitButton name="intent" value="preset" variant="secondary">
                        Add: {p.label}
                      </SubmitButton>
                    </Form>
                    <span className="text-sm text-loam-700">{p.names.join(" · ")}</span>
                  </li>
                ))}
              </ul>
            )}
            {unavailable.length > 0 && (
              <ul className="mt-3 list-disc pl-5 text-sm text-loam-700">
                {unavailable.map((u) => (
                  <li key={u}>{u}</li>
                ))}
              </ul>
            )}
          </Section>
        </>
      ) : (
        <p className="text-sm text-loam-700">Owners and researchers of the program save contrasts; you can read their results here and on the results page.</p>
      )}
    </div>
  );
}

function ContrastForm({
  treatments,
  errors,
  values,
}: {
  treatments: { code: string; name: string; isCheck: boolean }[];
  errors?: Record<string, string[] | undefined>;
  values?: Record<string, string>;
}) {
  const [typed, setTyped] = useState<Record<string, string>>(() =>
    Object.fromEntries(treatments.map((t) => [t.code, values?.[`c:${t.code}`] ?? ""])),
  );
  const numbers = Object.values(typed).map((v) => parseCoefficient(v));
  const sum = numbers.every((n) => n !== null) ? numbers.reduce((s: number, n) => s + (n as number), 0) : null;
  const sumError = errors?.coefficients?.[0];
  return (
    <Form method="post" className="flex max-w-3xl flex-col gap-4 rounded-lg border border-loam-200 bg-white p-4">
      <Field label="Name" name="name" defaultValue={values?.name} errors={errors} maxLength={80} hint="e.g. “Composts vs check” or “Manure vs compost”." />
      <fieldset aria-describedby={sumError ? "coefficients-error" : "coefficients-sum"} className="flex flex-col gap-2">
        <legend className="mb-1 text-sm font-medium">Coefficient per treatment (blank is 0; the coefficients must sum to zero)</legend>
        <div className="grid gap-2 sm:grid-cols-2">
          {treatments.map((t) => {
            const name = `c:${t.code}`;
            const error = errors?.[name]?.[0];
            return (
              <div key={t.code} className="flex flex-col gap-1">
                <label htmlFor={`coef-${t.code}`} className="flex items-center gap-2 text-sm">
                  <input
                    id={`coef-${t.code}`}
                    name={name}
                    inputMode="decimal"
                    value={typed[t.code]}
                    onChange={(e) => setTyped({ ...typed, [t.code]: e.target.value })}
                    aria-invalid={error ? true : undefined}
                    aria-describedby={error ? `coef-${t.code}-error` : undefined}
                    className={`num w-20 rounded-md border bg-white px-2 py-1.5 text-right ${error ? "border-brick-700" : "border-loam-400"}`}
                  />
                  <span className="num text-loam-600">{t.code}</span>
                  <span>{t.name}</span>
                  {t.isCheck && <span className="rounded bg-loam-100 px-1.5 py-0.5 text-xs">check</span>}
                </label>
                {error && (
                  <p id={`coef-${t.code}-error`} className="text-sm font-medium text-brick-700">
                    {error}
                  </p>
                )}
              </div>
            );
          })}
        </div>
        <p id="coefficients-sum" className="num text-sm text-loam-700" aria-live="polite">
          Sum: {sum === null ? "—" : Number(sum.toPrecision(6))}
          {sum !== null && Math.abs(sum) > 1e-9 && " (not yet zero)"}
        </p>
        {sumError && (
          <p id="coefficients-error" className="text-sm font-medium text-brick-700">
            {sumError}
          </p>
        )}
      </fieldset>
      <div>
        <SubmitButton name="intent" value="save" pendingLabel="Saving…">
          Save contrast
        </SubmitButton>
      </div>
    </Form>
  );
}
