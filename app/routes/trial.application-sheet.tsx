import { Link, useLoaderData } from "react-router";
import { PATHOGEN_REDUCTION_CAUTION } from "../../analysis/amendments";
import { applicationSheet, unitsFor } from "~/.server/design/application-sheet";
import { getTrial } from "~/.server/design/trials";
import { notFound, requirePermission } from "~/.server/permissions";
import { buttonClass } from "~/components/form";
import { Caution } from "~/components/more-fields";
import { Empty, Section } from "~/components/page";
import { BURIED_UTILITIES_CAUTION, DEFER_TO_LOCAL, NUTRIENT_LOADING_CAUTION, PATHOGEN_HANDLING_CAUTION } from "~/design/cautions";
import { formatNumber } from "~/format";
import type { Route } from "./+types/trial.application-sheet";

export const meta: Route.MetaFunction = () => [{ title: "Application sheet · Tilthmark" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const member = await requirePermission(request, { trialId: params.trialId }, "results.view");
  const trial = await getTrial(params.trialId);
  if (!trial) notFound(request, "No such trial.");
  const units = unitsFor(request, member.user.unitSystem);
  return { trialId: trial.id, sheet: await applicationSheet(trial.id, units), units };
}

export default function ApplicationSheetPage() {
  const { trialId, sheet, units } = useLoaderData<typeof loader>();
  const cautions = (
    <div className="grid gap-3 md:grid-cols-2 print:grid-cols-2">
      <div className="md:col-span-2 print:col-span-2">
        <Caution title="Before staking or digging">
          <p>{BURIED_UTILITIES_CAUTION}</p>
        </Caution>
      </div>
      <Caution title="Handling: pathogens">
        <p>{PATHOGEN_HANDLING_CAUTION}</p>
        <p>{PATHOGEN_REDUCTION_CAUTION.split(". ")[0]}: a batch whose log meets the pathogen-reduction rule still needs this care.</p>
      </Caution>
      <Caution title="Nutrient loads">
        <p>{NUTRIENT_LOADING_CAUTION}</p>
        <p>{DEFER_TO_LOCAL}</p>
      </Caution>
    </div>
  );
  if (!sheet) {
    return (
      <>
        <Empty>The application sheet lists every plot, so it appears once the design has been randomized.</Empty>
        <div className="mt-6">{cautions}</div>
      </>
    );
  }
  const u = sheet.units;
  const other = units === "si" ? "us" : "si";
  return (
    <>
      <div className="no-print mb-4 flex flex-wrap items-center gap-3">
        <button type="button" className={buttonClass("secondary")} onClick={() => window.print()}>
          Print application sheet
        </button>
        <a href={`/trials/${trialId}/application-sheet.csv?units=${units}`} download className={buttonClass("secondary")}>
          Download CSV
        </a>
        <Link to={`?units=${other}`} className="text-sm">
          Show in {other === "us" ? "US customary units" : "SI units"}
        </Link>
      </div>
      <header className="mb-4">
        <h2 className="text-xl font-semibold">Application sheet</h2>
        <p className="text-sm text-loam-700">
          Each plot <span className="num">{formatNumber(sheet.plotArea, 1)}</span> {u.area}. As-is mass is what goes on the plot, moisture
          included (from the batch's wet-basis moisture); C and N applied are on a dry basis. {sheet.status === "draft" && <strong>Draft layout: it may still change.</strong>}
        </p>
      </header>
      <div className="mb-8">{cautions}</div>

      <Section title="To bring to the field">
        <div className="max-w-3xl overflow-x-auto bg-white shadow-xs print:overflow-visible">
          <table className="w-full border-collapse text-left text-sm">
            <thead className="bg-loam-100 text-loam-800">
              <tr>
                <th scope="col" className="px-3 py-2 font-medium">Amendment · batch</th>
                <th scope="col" className="px-3 py-2 text-right font-medium">Plots</th>
                <th scope="col" className="px-3 py-2 text-right font-medium">As-is total ({u.mass})</th>
                <th scope="col" className="px-3 py-2 text-right font-medium">Volume total ({u.volume})</th>
              </tr>
            </thead>
            <tbody>
              {sheet.totals.map((t) => (
                <tr key={`${t.amendment}-${t.batch}`} className="border-t border-loam-200">
                  <td className="px-3 py-1.5">
                    {t.amendment} · <span className="num">{t.batch}</span>
                  </td>
                  <td className="num px-3 py-1.5 text-right">{t.plots}</td>
                  <td className="num px-3 py-1.5 text-right">{formatNumber(t.asIs, 1)}</td>
                  <td className="num px-3 py-1.5 text-right">{formatNumber(t.volume, 2)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <p className="mt-1 text-xs text-loam-600">Per application. Add a margin for spillage; timing below says how often.</p>
      </Section>

      <Section title="Per plot">
        <div className="overflow-x-auto bg-white shadow-xs print:overflow-visible">
          <table className="print-flow w-full border-collapse text-left text-sm print:text-xs" data-testid="application-sheet">
            <thead className="bg-loam-100 text-loam-800">
              <tr>
                <th scope="col" className="px-2 py-2 font-medium">Plot</th>
                <th scope="col" className="px-2 py-2 font-medium">Treatment</th>
                <th scope="col" className="px-2 py-2 font-medium">Amendment · batch</th>
                <th scope="col" className="px-2 py-2 font-medium">When</th>
                <th scope="col" className="px-2 py-2 text-right font-medium">Rate ({u.rate})</th>
                <th scope="col" className="px-2 py-2 text-right font-medium">As-is per plot ({u.mass})</th>
                <th scope="col" className="px-2 py-2 text-right font-medium">Layer ({u.depth}) · volume ({u.volume})</th>
                <th scope="col" className="px-2 py-2 text-right font-medium">C applied ({u.perArea})</th>
                <th scope="col" className="px-2 py-2 text-right font-medium">N applied ({u.perArea})</th>
                <th scope="col" className="px-2 py-2 text-center font-medium">Done</th>
              </tr>
            </thead>
            <tbody>
              {sheet.rows.map((row) => {
                const items = row.items.length ? row.items : [null];
                return items.map((item, i) => (
                  <tr key={`${row.plotNumber}-${i}`} className={`${i === 0 ? "border-t-2 border-loam-200" : "border-t border-dotted border-loam-200"} break-inside-avoid align-top`}>
                    <th scope="row" className="num px-2 py-1.5 text-left font-semibold">
                      {i === 0 ? row.plotNumber : ""}
                    </th>
                    <td className="px-2 py-1.5">{i === 0 ? `${row.treatmentCode} ${row.treatmentName}` : ""}</td>
                    {item ? (
                      <>
                        <td className="px-2 py-1.5">
                          {item.amendment} · <span className="num">{item.batch}</span>
                          {item.note && <p className="text-xs text-clay-800">{item.note}</p>}
                        </td>
                        <td className="px-2 py-1.5">{item.timing}</td>
                        <td className="num px-2 py-1.5 text-right">{formatNumber(item.rate, 2)}</td>
                        <td className="num px-2 py-1.5 text-right font-semibold">{formatNumber(item.asIsPerPlot, 2)}</td>
                        <td className="num px-2 py-1.5 text-right">
                          {item.layerDepth === null ? "—" : `${formatNumber(item.layerDepth, 1)} · ${formatNumber(item.volumePerPlot, 2)}`}
                        </td>
                        <td className="num px-2 py-1.5 text-right">{formatNumber(item.carbon, 0)}</td>
                        <td className="num px-2 py-1.5 text-right">{formatNumber(item.nitrogen, 0)}</td>
                      </>
                    ) : (
                      <td colSpan={7} className="px-2 py-1.5 text-loam-700">
                        {row.isCheck ? "Nothing: untreated check" : "No application recorded"}
                      </td>
                    )}
                    <td className="px-2 py-1 text-center text-base leading-none" aria-hidden="true">
                      ☐
                    </td>
                  </tr>
                ));
              })}
            </tbody>
          </table>
        </div>
      </Section>
    </>
  );
}
