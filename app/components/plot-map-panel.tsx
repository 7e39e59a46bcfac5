// The plot map on a page: its data come from the JSON resource route, fetched in the browser.
import { useEffect } from "react";
import { useFetcher } from "react-router";
import type { PlotMapData } from "~/design/plot-map";
import { Empty } from "./page";
import { PlotMapSvg } from "./plot-map";

/** `version` changes whenever the layout may have changed (a new seed, a lock), so the map refetches. */
export function PlotMapPanel({ trialId, version }: { trialId: string; version: string }) {
  const fetcher = useFetcher<PlotMapData>();
  // Refetch only when the layout may have changed; the fetcher object itself changes on every render.
  useEffect(() => {
    fetcher.load(`/api/trials/${trialId}/layout`);
  }, [trialId, version]);
  const data = fetcher.data;
  if (!data) {
    return (
      <p className="text-loam-700" role="status">
        {fetcher.state === "idle" ? "The plot map could not be loaded. Reload the page to try again." : "Drawing the plot map…"}
      </p>
    );
  }
  if (data.plots.length === 0) return <Empty>No layout yet: randomize the design to draw the plot map.</Empty>;
  return (
    <>
      <div className="overflow-x-auto rounded-lg border border-loam-200 bg-white p-2 print:overflow-visible print:border-0 print:p-0">
        <PlotMapSvg data={data} />
      </div>
      <PlotTable data={data} />
    </>
  );
}

/** The same layout as text: one row per block, plots in plot-number order (for screen readers and copying). */
function PlotTable({ data }: { data: PlotMapData }) {
  const names = new Map(data.treatments.map((t) => [t.code, t.name]));
  const blocks = [...new Set(data.plots.map((p) => p.block))];
  return (
    <details className="no-print mt-3 text-sm">
      <summary className="cursor-pointer text-moss-800 underline">Plots as a table</summary>
      <table className="mt-2 border-collapse bg-white text-left">
        <caption className="sr-only">Plots by {data.trial.design === "crd" ? "field row" : "block"}, in plot-number order</caption>
        <tbody>
          {blocks.map((b) => (
            <tr key={b} className="border-t border-loam-200 align-top">
              <th scope="row" className="px-3 py-1.5 font-medium">
                {data.trial.design === "crd" ? "All plots" : `Block ${b}`}
              </th>
              {data.plots
                .filter((p) => p.block === b)
                .map((p) => (
                  <td key={p.plotNumber} className="px-3 py-1.5">
                    <span className="num font-semibold">{p.plotNumber}</span> <span title={names.get(p.treatment)}>{p.treatment}</span>
                  </td>
                ))}
            </tr>
          ))}
        </tbody>
      </table>
    </details>
  );
}
