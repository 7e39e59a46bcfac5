import type { ContrastsView } from "~/.server/results/contrasts";
import { formatDf, formatNumber, formatP } from "~/format";

const th = "px-3 py-2 text-left font-medium";
const thNum = "px-3 py-2 text-right font-medium";
const tdNum = "num px-3 py-1.5 text-right";

/** "+1 T2, −1 T1": the non-zero coefficients, largest first. */
export function coefficientText(coefficients: Record<string, number>): string {
  return Object.entries(coefficients)
    .filter(([, c]) => c !== 0)
    .sort((a, b) => b[1] - a[1])
    .map(([code, c]) => `${c > 0 ? "+" : "−"}${Math.abs(c)} ${code}`)
    .join(", ");
}

/** Each saved contrast tested in the selected analysis: estimate, SE, CI, t, df, p. */
export function ContrastsTable({ view, decimals }: { view: ContrastsView; decimals: number }) {
  const level = Math.round((1 - view.alpha) * 1000) / 10;
  return (
    <div className="overflow-x-auto rounded-lg border border-loam-200 bg-white">
      <table className="w-full text-sm">
        <caption className="sr-only">Contrasts{view.analysisLabel ? ` in ${view.analysisLabel}` : ""}</caption>
        <thead className="bg-loam-100 text-loam-800">
          <tr>
            <th scope="col" className={th}>Contrast</th>
            <th scope="col" className={th}>Coefficients</th>
            <th scope="col" className={thNum}>Estimate{view.unit ? ` (${view.unit})` : ""}</th>
            <th scope="col" className={thNum}>SE</th>
            <th scope="col" className={thNum}>{level} % CI</th>
            <th scope="col" className={thNum}>t</th>
            <th scope="col" className={thNum}>df</th>
            <th scope="col" className={thNum}>p</th>
          </tr>
        </thead>
        <tbody>
          {view.outcomes.map((o) => (
            <tr key={o.id} className="border-t border-loam-200">
              <th scope="row" className="px-3 py-1.5 text-left font-normal">{o.name}</th>
              <td className="num px-3 py-1.5 text-loam-700">{coefficientText(o.coefficients)}</td>
              {o.result ? (
                <>
                  <td className={tdNum}>{formatNumber(o.result.estimate, decimals)}</td>
                  <td className={tdNum}>{formatNumber(o.result.se, decimals + 1)}</td>
                  <td className={tdNum}>
                    {formatNumber(o.result.lower, decimals)} to {formatNumber(o.result.upper, decimals)}
                  </td>
                  <td className={tdNum}>{formatNumber(o.result.t, 2)}</td>
                  <td className={tdNum}>{formatDf(o.result.df)}</td>
                  <td className={`${tdNum} ${o.result.p < view.alpha ? "font-semibold text-moss-900" : ""}`}>{formatP(o.result.p)}</td>
                </>
              ) : (
                <td colSpan={6} className="px-3 py-1.5 text-brick-700">{o.error}</td>
              )}
            </tr>
          ))}
        </tbody>
      </table>
      <p className="border-t border-loam-200 px-3 py-2 text-xs text-loam-700">
        Estimate = Σ coefficient × least-squares mean{view.analysisLabel ? ` (${view.analysisLabel})` : ""}; t on the error degrees of freedom of the
        analysis, two-sided p, not adjusted for the number of contrasts.
      </p>
    </div>
  );
}

/** The warning shown when a saved set is not orthogonal. */
export function OrthogonalityNote({ view }: { view: ContrastsView }) {
  if (view.contrasts.length < 2) return null;
  if (view.nonOrthogonal.length === 0) {
    return <p className="text-sm text-loam-700">The {view.contrasts.length} saved contrasts are mutually orthogonal (Σ cᵢdᵢ = 0 for every pair).</p>;
  }
  const shown = view.nonOrthogonal.slice(0, 4);
  return (
    <div role="status" className="rounded-md border border-clay-500/50 bg-clay-100 px-4 py-3 text-sm text-clay-800">
      <strong>Not an orthogonal set.</strong> {view.nonOrthogonal.length} pair{view.nonOrthogonal.length === 1 ? " is" : "s are"} not orthogonal (
      {shown.map((p) => `${p.a} and ${p.b}: Σ cᵢdᵢ = ${formatNumber(p.product, 2)}`).join("; ")}
      {view.nonOrthogonal.length > shown.length ? "; …" : ""}), so their sums of squares overlap and do not add up to the treatment sum of squares.
      That is fine for planned comparisons such as each treatment against the check; read their p-values as separate questions.
    </div>
  );
}
