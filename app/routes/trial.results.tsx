import { Form, Link, useLoaderData, useNavigation, useSubmit } from "react-router";
import { getTrial } from "~/.server/design/trials";
import { requirePermission } from "~/.server/permissions";
import { contrastsView } from "~/.server/results/contrasts";
import { parseResultsQuery, ResultsError, trialData, trialResults, type ResultsView } from "~/.server/results/service";
import { cacheResponse } from "~/.server/response-cache";
import { ContrastsTable, OrthogonalityNote } from "~/components/contrasts-table";
import { buttonClass, FormMessage } from "~/components/form";
import { Empty, Section } from "~/components/page";
import { AnovaTable, ComparisonsTable, MeansTable, methodsParagraph, SeasonMeansTable } from "~/components/results-tables";
import { ResultsCharts } from "~/components/results-charts";
import { formatNumber } from "~/format";
import { roleCan } from "~/permissions";
import { MODEL_LABELS, type ResultsModel } from "../../analysis/results";
import packageJson from "../../package.json";
import type { Route } from "./+types/trial.results";

export const meta: Route.MetaFunction = () => [{ title: "Results · Tilthmark" }];

// Read-only: answered from the response cache while nothing has changed.
export const middleware: Route.MiddlewareFunction[] = [cacheResponse];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "results.view");
  const url = new URL(request.url);
  const [data, trial] = await Promise.all([trialData(params.trialId), getTrial(params.trialId)]);
  const options = {
    variables: data.variables,
    depths: data.depths,
    seasons: data.seasons,
    design: data.trial.design,
    // Without a lab method's calibration, SOM is taken equal to LOI (the two variables then agree).
    somIsLoi: !trial?.labMethodId,
  };
  const canEditContrasts = roleCan(member.role, "trials.edit");
  const parsed = parseResultsQuery(url);
  if (!parsed.ok) return { options, query: null, view: null, contrasts: null, canEditContrasts, error: parsed.message, search: url.search };
  try {
    const [view, contrasts]: [ResultsView, Awaited<ReturnType<typeof contrastsView>>] = await Promise.all([
      trialResults(params.trialId, parsed.query),
      contrastsView(params.trialId, parsed.query),
    ]);
    return { options, query: parsed.query, view, contrasts, canEditContrasts, error: null, search: url.search };
  } catch (error) {
    if (error instanceof ResultsError) return { options, query: parsed.query, view: null, contrasts: null, canEditContrasts, error: error.message, search: url.search };
    throw error;
  }
}

const MODELS = Object.keys(MODEL_LABELS) as ResultsModel[];
const selectClass = "rounded-md border border-loam-400 bg-white px-2 py-1.5 text-sm";

export default function ResultsPage({ params }: Route.ComponentProps) {
  const { options, query, view, contrasts, canEditContrasts, error, search } = useLoaderData<typeof loader>();
  const submit = useSubmit();
  const navigation = useNavigation();
  const base = `/trials/${params.trialId}`;
  if (options.variables.length === 0) {
    return <Empty>No lab results have been committed for this trial yet. Results appear once LOI or bulk-density data are in.</Empty>;
  }
  const variable = view?.selection.variable ?? options.variables.find((v) => v.id === query?.variable) ?? options.variables[0];
  const model = query?.model ?? "per_season";
  const stock = variable.id === "soc_stock" || variable.id === "soc_stock_esm";
  // Equivalent-soil-mass stocks run from the surface: the top increment and every cumulative span.
  const increments = variable.id === "soc_stock_esm" ? options.depths.increments.filter((d) => d.topCm === 0) : options.depths.increments;
  const depthOptions = [
    ...increments.map((d) => ({ value: `${d.topCm}-${d.bottomCm}`, label: `${d.topCm}–${d.bottomCm} cm` })),
    ...(stock ? options.depths.cumulative.map((d) => ({ value: `${d.topCm}-${d.bottomCm}`, label: `${d.topCm}–${d.bottomCm} cm (cumulative)` })) : []),
  ];
  const seasonOptions = options.seasons.filter((s) => model !== "change_from_baseline" || !s.isBaseline);
  const chosenDepth = view ? `${view.selection.depth.topCm}-${view.selection.depth.bottomCm}` : (query?.depth ?? "");
  const seasonShown = view?.results.season ?? query?.season ?? "";
  // Rates of change are per year; every other model is in the variable's own unit.
  const valueUnit = view ? `${view.selection.variable.unit}${model === "rate_of_change" ? "/yr" : ""}` : "";
  return (
    <div className="flex flex-col gap-8">
      <Form
        method="get"
        className="no-print flex flex-wrap items-end gap-3 rounded-lg border border-loam-200 bg-white p-4"
        onChange={(e) => submit(e.currentTarget, { preventScrollReset: true })}
        aria-label="What to analyse"
      >
        <label className="flex flex-col gap-1 text-sm font-medium">
          Variable
          <select name="variable" defaultValue={variable.id} className={selectClass} key={`v-${variable.id}`}>
            {options.variables.map((v) => (
              <option key={v.id} value={v.id}>
                {v.label} ({v.unit})
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-medium">
          Depth
          <select name="depth" defaultValue={chosenDepth} className={selectClass} key={`d-${chosenDepth}-${variable.id}`}>
            {depthOptions.map((d) => (
              <option key={d.value} value={d.value}>
                {d.label}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-medium">
          Model
          <select name="model" defaultValue={model} className={selectClass} key={`m-${model}`}>
            {MODELS.map((m) => (
              <option key={m} value={m}>
                {MODEL_LABELS[m]}
              </option>
            ))}
          </select>
        </label>
        {(model === "per_season" || model === "change_from_baseline") && (
          <label className="flex flex-col gap-1 text-sm font-medium">
            Season
            <select name="season" defaultValue={seasonShown} className={selectClass} key={`s-${seasonShown}`}>
              {seasonOptions.map((s) => (
                <option key={s.label} value={s.label}>
                  {s.label}
                  {s.isBaseline ? " (baseline)" : ""}
                </option>
              ))}
            </select>
          </label>
        )}
        <label className="flex flex-col gap-1 text-sm font-medium">
          Comparisons
          <select name="method" defaultValue={query?.method ?? "tukey"} className={selectClass}>
            <option value="tukey">Tukey–Kramer</option>
            <option value="lsd">Protected LSD</option>
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-medium">
          α
          <select name="alpha" defaultValue={String(query?.alpha ?? 0.05)} className={selectClass}>
            {["0.01", "0.05", "0.1"].map((a) => (
              <option key={a} value={a}>
                {a}
              </option>
            ))}
          </select>
        </label>
        <noscript>
          <button type="submit" className={buttonClass("secondary")}>
            Analyse
          </button>
        </noscript>
        {navigation.state === "loading" && <span className="text-sm text-loam-600" role="status">Updating…</span>}
      </Form>

      {error && <FormMessage>{error}</FormMessage>}

      {view && (
        <>
          <Summary view={view} somIsLoi={options.somIsLoi} />
          <Section title="Analysis of variance">
            <AnovaTable results={view.results} />
            <p className="num mt-2 text-sm text-loam-700">
              Grand mean {formatNumber(view.results.grandMean, view.selection.variable.decimals + 1)} {valueUnit} · CV{" "}
              {formatNumber(view.results.cvPercent, 1)} %
              {view.results.cvPercentMainPlot !== null && <> · CV(a) {formatNumber(view.results.cvPercentMainPlot, 1)} %</>}
              {view.results.sphericity && <> · Greenhouse–Geisser ε {formatNumber(view.results.sphericity.epsilon, 3)}</>}
            </p>
          </Section>
          <Section title={model === "change_from_baseline" ? "Change from baseline by treatment" : model === "rate_of_change" ? "Rate of change by treatment (per year)" : "Treatment means"}>
            <MeansTable results={view.results} decimals={view.selection.variable.decimals} unit={valueUnit} />
            {view.results.notes.length > 0 && (
              <ul className="mt-3 list-disc space-y-1 pl-5 text-sm text-loam-800">
                {view.results.notes.map((n) => (
                  <li key={n}>{n}</li>
                ))}
              </ul>
            )}
          </Section>
          {view.results.seasonMeans.length > 0 && (
            <Section title="Treatment means by season">
              <SeasonMeansTable results={view.results} decimals={view.selection.variable.decimals} unit={valueUnit} />
            </Section>
          )}
          <Section
            title="Contrasts"
            aside={
              <Link to={`${base}/results/contrasts${search}`} className="text-sm">
                {canEditContrasts ? "Write or add contrasts" : "All contrasts"}
              </Link>
            }
          >
            {!contrasts || contrasts.contrasts.length === 0 ? (
              <Empty>No contrasts are saved for this trial yet.{canEditContrasts ? " Write your own or add a preset set (each treatment vs the check)." : ""}</Empty>
            ) : (
              <div className="flex flex-col gap-3">
                {contrasts.analysisError ? <FormMessage>{contrasts.analysisError}</FormMessage> : <ContrastsTable view={contrasts} decimals={view.selection.variable.decimals} />}
                <OrthogonalityNote view={contrasts} />
              </div>
            )}
          </Section>
          <ResultsCharts trialId={params.trialId} search={search} />
          <Section title="All pairwise comparisons">
            <details>
              <summary className="cursor-pointer text-sm text-moss-800">Show {view.results.comparisons.length} comparisons</summary>
              <div className="mt-3">
                <ComparisonsTable results={view.results} decimals={view.selection.variable.decimals} />
              </div>
            </details>
          </Section>
          <Section title="Methods, for your paper">
            <p className="max-w-3xl rounded-lg border border-loam-200 bg-white p-4 text-sm leading-relaxed">
              {methodsParagraph(view.results, {
                variableLabel: view.selection.variable.label,
                unit: view.selection.variable.unit,
                depthLabel: view.selection.depth.label,
                version: packageJson.version,
                referenceMass: view.selection.referenceMassMgPerHa,
              })}
            </p>
          </Section>
          <Section title="Downloads">
            <ul className="flex flex-wrap gap-3 text-sm">
              <li>
                <Link reloadDocument className={buttonClass("secondary")} to={`/api/trials/${params.trialId}/data.csv`}>
                  All measurements, tidy CSV
                </Link>
              </li>
              {(["anova", "means", "comparisons"] as const).map((table) => (
                <li key={table}>
                  <Link reloadDocument className={buttonClass("secondary")} to={`${base}/export/${table}.csv${search}`}>
                    {table === "anova" ? "ANOVA table" : table === "means" ? "Means table" : "Comparisons"} (CSV)
                  </Link>
                </li>
              ))}
            </ul>
          </Section>
        </>
      )}
    </div>
  );
}

function Summary({ view, somIsLoi }: { view: ResultsView; somIsLoi: boolean }) {
  const { selection, results } = view;
  const missing = results.missing.length;
  return (
    <p className="text-sm text-loam-800">
      <strong>{selection.variable.label}</strong> at {selection.depth.label}
      {results.season && <> in {results.season}</>} · {results.modelLabel} · {results.n} plot values
      {missing > 0 && (
        <>
          {" "}· {missing} missing (
          {results.missing
            .map((m) => `plot ${m.plotNumber ?? "?"}${m.estimate !== null ? ` estimated ${formatNumber(m.estimate, selection.variable.decimals)}` : ""}`)
            .join("; ")}
          )
        </>
      )}
      {results.excludedCount > 0 && <> · {results.excludedCount} excluded in QC</>}
      {selection.referenceMassMgPerHa !== null && <> · reference mass {formatNumber(selection.referenceMassMgPerHa, 0)} Mg/ha</>}
      {somIsLoi && (selection.variable.id === "som" || selection.variable.id === "loi") && (
        <> · SOM is taken equal to LOI: this trial has no LOI-to-SOM calibration (a researcher can set one under Lab method)</>
      )}
    </p>
  );
}
