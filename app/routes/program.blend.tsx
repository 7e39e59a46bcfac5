import { Form, Link, useLoaderData } from "react-router";
import { blendCnRatio } from "../../analysis/amendments";
import { listProgramBatches } from "~/.server/design/amendments";
import { requirePermission } from "~/.server/permissions";
import { Field, FormMessage, SelectField } from "~/components/form";
import { PageHeader, Section } from "~/components/page";
import { formatNumber } from "~/format";
import type { Route } from "./+types/program.blend";

export const meta: Route.MetaFunction = () => [{ title: "Blend C:N calculator · Tilthmark" }];

const ROWS = 4;

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { programId: params.programId }, "results.view");
  const batches = await listProgramBatches(member.programId);
  const search = new URL(request.url).searchParams;
  const values: Record<string, string> = Object.fromEntries(search);
  const errors: Record<string, string[]> = {};
  const components: { label: string; dryMass: number; carbon: number; nitrogen: number; cn: number | null; asIs: number | null }[] = [];
  for (let i = 0; i < ROWS; i++) {
    const batchId = search.get(`batch${i}`) ?? "";
    const massText = (search.get(`mass${i}`) ?? "").trim();
    if (!batchId && !massText) continue;
    const batch = batches.find((b) => b.id === batchId);
    if (!batch) {
      errors[`batch${i}`] = ["Choose a batch for this dry mass."];
      continue;
    }
    const mass = Number(massText);
    if (!massText || !Number.isFinite(mass) || mass <= 0) {
      errors[`mass${i}`] = ["Enter a dry mass above 0."];
      continue;
    }
    if (batch.totalCarbonDryPct === null || batch.totalNitrogenDryPct === null) {
      errors[`batch${i}`] = [`${batch.label} has no total C and N on record; add its lab analysis first.`];
      continue;
    }
    const asIs = batch.moistureWetBasisPct === null ? null : mass / (1 - batch.moistureWetBasisPct / 100);
    components.push({ label: `${batch.amendment} — ${batch.label}`, dryMass: mass, carbon: batch.totalCarbonDryPct, nitrogen: batch.totalNitrogenDryPct, cn: batch.cnRatio, asIs });
  }
  let blend: number | null = null;
  let problem: string | null = null;
  if (components.length > 0 && Object.keys(errors).length === 0) {
    try {
      blend = blendCnRatio(components.map((c) => ({ dryMass: c.dryMass, carbonPercentDry: c.carbon, nitrogenPercentDry: c.nitrogen })));
    } catch (error) {
      problem = error instanceof Error ? error.message : String(error);
    }
  }
  return {
    program: { id: member.programId, name: member.programName },
    options: [{ value: "", label: "—" }, ...batches.map((b) => ({ value: b.id, label: `${b.amendment} — ${b.label}${b.cnRatio !== null ? ` (C:N ${formatNumber(b.cnRatio, 1)})` : ""}` }))],
    values,
    errors,
    components,
    blend,
    problem,
  };
}

export default function BlendPage() {
  const { program, options, values, errors, components, blend, problem } = useLoaderData<typeof loader>();
  const totalDry = components.reduce((s, c) => s + c.dryMass, 0);
  return (
    <>
      <PageHeader
        crumbs={[
          { to: `/programs/${program.id}`, label: program.name },
          { to: `/programs/${program.id}/amendments`, label: "Amendments" },
        ]}
        eyebrow="Blend calculator"
        title="C:N of a mix of batches"
        lead="Weighted by dry mass: C:N = Σ mᵢCᵢ / Σ mᵢNᵢ. Averaging the batches' own ratios would be wrong, because ratios do not mix linearly."
      />
      <div className="grid gap-10 lg:grid-cols-[1.3fr_1fr]">
        <Section title="Batches in the blend">
          <Form method="get" className="flex flex-col gap-4" noValidate>
            {Array.from({ length: ROWS }, (_, i) => (
              <fieldset key={i} className="grid gap-3 sm:grid-cols-[2fr_1fr]">
                <legend className="sr-only">Component {i + 1}</legend>
                <SelectField label={`Batch ${i + 1}`} name={`batch${i}`} options={options} defaultValue={values[`batch${i}`] ?? ""} errors={errors} />
                <Field label={`Dry mass ${i + 1} (kg)`} name={`mass${i}`} defaultValue={values[`mass${i}`]} errors={errors} />
              </fieldset>
            ))}
            <div>
              <button type="submit" className="inline-flex items-center rounded-md bg-moss-700 px-4 py-2 text-sm font-medium text-white hover:bg-moss-800">
                Work out the blend
              </button>
            </div>
          </Form>
        </Section>
        <Section title="Blend">
          {problem && <FormMessage>{problem}</FormMessage>}
          {blend === null ? (
            <p className="text-loam-700">Choose at least one batch with its dry mass. Only batches with total C and N on record can be used.</p>
          ) : (
            <>
              <p className="text-2xl font-semibold" data-testid="blend-cn">
                C:N <span className="num">{formatNumber(blend, 1)}</span> : 1
              </p>
              <p className="mt-1 text-sm text-loam-700">
                A composting feedstock target is commonly about 25–30 : 1 (common practice, not a rule).
              </p>
              <table className="mt-4 w-full border-collapse bg-white text-left text-sm shadow-xs">
                <thead className="bg-loam-100 text-loam-800">
                  <tr>
                    <th scope="col" className="px-3 py-1.5 font-medium">Batch</th>
                    <th scope="col" className="px-3 py-1.5 text-right font-medium">Dry kg</th>
                    <th scope="col" className="px-3 py-1.5 text-right font-medium">Share</th>
                    <th scope="col" className="px-3 py-1.5 text-right font-medium">C:N</th>
                    <th scope="col" className="px-3 py-1.5 text-right font-medium">As-is kg</th>
                  </tr>
                </thead>
                <tbody>
                  {components.map((c, i) => (
                    <tr key={i} className="border-t border-loam-200">
                      <td className="px-3 py-1">{c.label}</td>
                      <td className="num px-3 py-1 text-right">{formatNumber(c.dryMass, 1)}</td>
                      <td className="num px-3 py-1 text-right">{formatNumber((100 * c.dryMass) / totalDry, 0)} %</td>
                      <td className="num px-3 py-1 text-right">{formatNumber(c.cn, 1)}</td>
                      <td className="num px-3 py-1 text-right">{formatNumber(c.asIs, 1)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
              <p className="mt-2 text-xs text-loam-600">As-is mass is what to weigh out, from each batch's wet-basis moisture.</p>
            </>
          )}
          <p className="mt-6 text-sm">
            <Link to={`/programs/${program.id}/amendments`}>Back to amendments</Link>
          </p>
        </Section>
      </div>
    </>
  );
}
