import * as Plot from "@observablehq/plot";
import { useEffect, useRef } from "react";
import { Link, useLoaderData } from "react-router";
import type { BriefSection } from "../../analysis/briefs";
import { usGallonsPerAcreToCubicMetresPerHa, type UnitSystem } from "../../analysis/units";
import { readableBrief, readerUnits } from "~/.server/brief-access";
import type { BriefContent } from "~/.server/briefs";
import { env } from "~/.server/env";
import { getSession } from "~/.server/session";
import { citation, inReaderUnits, unitLabel } from "~/brief-units";
import { labelledGroups, TREATMENT_COLOURS } from "~/components/chart-panel";
import { Caution } from "~/components/more-fields";
import { Wordmark } from "~/components/wordmark";
import { formatNumber, formatP } from "~/format";
import type { Route } from "./+types/brief";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.version.title ?? "Field brief"} · Tilthmark field brief` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { brief, version, programName } = await readableBrief(request, params.briefId, params.version);
  const units = await readerUnits(request);
  const signedIn = Boolean(await getSession(request));
  const stableUrl = new URL(`/briefs/${brief.id}/v/${version.version}`, env.TILTHMARK_BASE_URL).toString();
  return {
    brief: { id: brief.id, isPublic: brief.isPublic },
    version: {
      version: version.version,
      title: version.title,
      summary: version.summary,
      context: version.context,
      authors: version.authors,
      publishedAt: version.publishedAt.toISOString(),
      content: version.content,
      versions: version.versions.map((v) => ({ version: v.version, publishedAt: v.publishedAt.toISOString() })),
    },
    programName,
    units,
    signedIn,
    stableUrl,
  };
}

export default function BriefPage() {
  const { brief, version, programName, units, signedIn, stableUrl } = useLoaderData<typeof loader>();
  const content = version.content as BriefContent;
  const year = new Date(version.publishedAt).getUTCFullYear();
  const base = `/briefs/${brief.id}/v/${version.version}`;
  const latest = version.versions.at(-1)?.version;
  return (
    <div className="min-h-screen bg-white print:bg-white">
      <header className="no-print border-b border-loam-200 bg-loam-50">
        <div className="mx-auto flex max-w-4xl flex-wrap items-center justify-between gap-3 px-6 py-3">
          <Link to={signedIn ? "/home" : "/"} className="no-underline" aria-label="Tilthmark">
            <Wordmark />
          </Link>
          <nav className="flex flex-wrap items-center gap-3 text-sm" aria-label="Brief tools">
            <span>
              Units:{" "}
              <Link to={`${base}?units=si`} aria-current={units === "si" ? "true" : undefined} className={units === "si" ? "font-semibold" : ""}>
                SI
              </Link>{" "}
              ·{" "}
              <Link to={`${base}?units=us`} aria-current={units === "us" ? "true" : undefined} className={units === "us" ? "font-semibold" : ""}>
                US customary
              </Link>
            </span>
            <Link reloadDocument to={`${base}/summary.csv?units=${units}`}>
              Summary table (CSV)
            </Link>
            <button type="button" onClick={() => window.print()} className="rounded border border-loam-400 px-2 py-1 hover:bg-loam-100">
              Print
            </button>
          </nav>
        </div>
      </header>
      <main className="mx-auto max-w-4xl px-6 py-8 print:max-w-none print:px-0 print:py-0">
        <p className="text-sm font-medium tracking-wide text-clay-700 uppercase">Field brief · {programName}</p>
        <h1 className="mt-1 text-3xl font-semibold tracking-tight">{version.title}</h1>
        <p className="mt-2 text-sm text-loam-700">
          {version.authors} · version {version.version}, published {version.publishedAt.slice(0, 10)}
          {latest !== undefined && latest !== version.version && (
            <>
              {" "}· <Link to={`/briefs/${brief.id}`}>a newer version ({latest}) exists</Link>
            </>
          )}
        </p>
        <p className="mt-1 text-sm text-loam-700">
          Trial: {content.trial.title}
          {content.trial.site && <> · {content.trial.site}</>}
          {content.trial.soil && <> · {content.trial.soil}</>}
        </p>

        <section className="mt-6">
          <h2 className="sr-only">Findings</h2>
          {version.summary.split(/\n{2,}/).map((p, i) => (
            <p key={i} className="mb-3 text-lg leading-relaxed">
              {p}
            </p>
          ))}
          {version.context && (
            <p className="mt-2 text-sm whitespace-pre-line text-loam-800">
              <strong>Context:</strong> {version.context}
            </p>
          )}
        </section>

        {content.sections.map((s) => (
          <BriefSectionView key={`${s.variable.id}-${s.depthLabel}`} section={s} units={units} />
        ))}

        {content.water.length > 0 && (
          <section className="mt-8 break-inside-avoid rounded-lg border border-loam-200 bg-loam-50 p-4">
            <h2 className="font-semibold">Water held by the extra organic matter — a rough estimate</h2>
            <p className="mt-1 text-sm text-loam-800">
              How much more water the top {content.water[0].depthCm} cm might hold with the extra organic matter measured over the check.
              Effects are larger in sandy soils and small in clays. This is an estimate, not a measurement.
            </p>
            <ul className="mt-2 space-y-1 text-sm">
              {content.water.map((w) => (
                <li key={w.treatment}>
                  <strong>{w.treatment}</strong> (+{formatNumber(w.somIncrease, 2)} percentage points of SOM): roughly{" "}
                  {units === "us" ? (
                    <span className="num">
                      {formatNumber(Math.round(w.low / 10) * 10, 0)} to {formatNumber(Math.round(w.high / 10) * 10, 0)} US gal/acre
                    </span>
                  ) : (
                    <span className="num">
                      {formatNumber(usGallonsPerAcreToCubicMetresPerHa(w.low), 0)} to {formatNumber(usGallonsPerAcreToCubicMetresPerHa(w.high), 0)} m³/ha
                    </span>
                  )}
                </li>
              ))}
            </ul>
            <p className="mt-2 text-xs text-loam-700">
              Low end: {content.water[0].sources[0]}. High end: {content.water[0].sources[1]}. The two disagree widely; treat the range as
              an order of magnitude, not a prediction.
            </p>
          </section>
        )}

        <div className="mt-8 break-inside-avoid">
          <Caution title="Before acting on this brief">
            <ul className="list-disc space-y-1 pl-5">
              {content.cautions.map((c) => (
                <li key={c}>{c}</li>
              ))}
            </ul>
          </Caution>
        </div>

        <section className="mt-8 border-t border-loam-200 pt-4 text-sm text-loam-800">
          <h2 className="font-semibold">Cite this brief</h2>
          <p className="mt-1">{citation({ authors: version.authors, year, title: version.title, version: version.version, program: programName, url: stableUrl })}</p>
          <p className="mt-2 text-xs text-loam-600">
            This version is frozen: its numbers were computed when it was published and do not change with later data.
            {version.versions.length > 1 && (
              <>
                {" "}Versions:{" "}
                {version.versions.map((v, i) => (
                  <span key={v.version}>
                    {i > 0 && ", "}
                    <Link to={`/briefs/${brief.id}/v/${v.version}`}>
                      {v.version} ({v.publishedAt.slice(0, 10)})
                    </Link>
                  </span>
                ))}
              </>
            )}
          </p>
        </section>
      </main>
    </div>
  );
}

/**
 * The treatment column stays in view while the table scrolls sideways on a phone; opaque, like the page. Its
 * lines are inset shadows because the opaque background covers the row's collapsed border; on paper it is a plain cell.
 */
const STICKY_NAME = "sticky left-0 z-10 min-w-28 bg-white print:static print:shadow-none";
const STICKY_NAME_ROW = `${STICKY_NAME} shadow-[inset_0_-1px_0_var(--color-loam-200)] max-sm:shadow-[inset_-1px_-1px_0_var(--color-loam-200)]`;
const STICKY_NAME_HEAD = `${STICKY_NAME} max-sm:shadow-[inset_-1px_0_0_var(--color-loam-200)]`;

function BriefSectionView({ section, units }: { section: BriefSection; units: UnitSystem }) {
  const unit = unitLabel(section, units);
  const show = (v: number | null) => formatNumber(inReaderUnits(section, v, units), section.variable.decimals);
  const level = Math.round((1 - section.alpha) * 100);
  return (
    <section className="mt-8 break-inside-avoid">
      <h2 className="text-xl font-semibold">
        {section.variable.label}, {section.depthLabel}
      </h2>
      <p className="text-sm text-loam-700">
        {section.season}
        {section.baselineSeason && <> compared with the baseline ({section.baselineSeason})</>} · {section.method === "tukey" ? "Tukey–Kramer" : "protected LSD"}, α = {section.alpha}
      </p>
      <p className="mt-3 text-xs text-loam-600 sm:hidden print:hidden" aria-hidden="true">
        Scroll the table sideways for the difference from the check and p. →
      </p>
      {/* On a phone the table scrolls inside this box (treatment names stay put); the page itself never scrolls sideways. */}
      <div
        className="mt-1 overflow-x-auto sm:mt-3 print:overflow-visible"
        tabIndex={0}
        role="region"
        aria-label={`${section.variable.label}, ${section.depthLabel}: treatment means and differences`}
      >
        <table className="w-full text-sm">
          <thead className="border-b-2 border-loam-900 text-left">
            <tr>
              <th scope="col" className={`${STICKY_NAME_HEAD} py-1.5 pr-3 font-medium`}>
                Treatment
              </th>
              <th scope="col" className="px-2 py-1.5 text-right font-medium">Mean ({unit})</th>
              <th scope="col" className="px-2 py-1.5 text-right font-medium">Change since baseline</th>
              <th scope="col" className="px-2 py-1.5 text-center font-medium">Group</th>
              <th scope="col" className="px-2 py-1.5 text-right font-medium">Difference from check ({level} % CI)</th>
              <th scope="col" className="py-1.5 pl-2 text-right font-medium">p</th>
            </tr>
          </thead>
          <tbody>
            {section.rows.map((r) => (
              <tr key={r.code} className="border-b border-loam-200">
                <th scope="row" className={`${STICKY_NAME_ROW} py-1.5 pr-3 text-left font-normal`}>
                  {r.name}
                  {r.isCheck && <span className="ml-1 text-xs text-loam-600">(check)</span>}
                </th>
                <td className="num px-2 py-1.5 text-right">{show(r.mean)}</td>
                <td className="num px-2 py-1.5 text-right whitespace-nowrap">
                  {r.change === null ? "—" : `${show(r.change)} (${formatNumber(r.changePercent, 0)} %)`}
                </td>
                <td className="num px-2 py-1.5 text-center">{r.group}</td>
                <td className="num px-2 py-1.5 text-right whitespace-nowrap">
                  {r.vsCheck ? `${show(r.vsCheck.diff)} (${show(r.vsCheck.lower)} to ${show(r.vsCheck.upper)})` : "—"}
                </td>
                <td className="num py-1.5 pl-2 text-right whitespace-nowrap">{r.vsCheck ? formatP(r.vsCheck.p) : ""}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="mt-1 text-xs text-loam-600">Treatments sharing a group letter did not differ; ‘a’ is the highest mean.</p>
      <FrozenChart section={section} units={units} />
    </section>
  );
}

/** The chart drawn from the data frozen in the brief (no request to the live results). */
function FrozenChart({ section, units }: { section: BriefSection; units: UnitSystem }) {
  const holder = useRef<HTMLDivElement>(null);
  useEffect(() => {
    const el = holder.current;
    if (!el || section.chart.length === 0) return;
    const codes = section.rows.map((r) => r.code);
    const nameOf = (code: string) => section.rows.find((r) => r.code === code)?.name ?? code;
    const seasons = [...new Map(section.chart.map((p) => [p.season, p.seasonOrder])).entries()].sort((a, b) => a[1] - b[1]).map(([s]) => s);
    const points = section.chart.map((p) => ({ ...p, value: inReaderUnits(section, p.mean, units) ?? 0, label: nameOf(p.code) }));
    const chart = Plot.plot({
      width: Math.min(760, el.clientWidth || 760),
      height: 280,
      marginLeft: 52,
      x: { domain: seasons, label: "Season", padding: 0.3 },
      y: { label: `${section.variable.label} (${unitLabel(section, units)})`, grid: true, nice: true },
      color: { domain: codes.map(nameOf), range: TREATMENT_COLOURS, legend: true },
      marks: [
        Plot.line(points, { x: "season", y: "value", z: "code", stroke: "label" }),
        Plot.dot(points, { x: "season", y: "value", fill: "label", r: 2.5 }),
      ],
    });
    el.replaceChildren(labelledGroups(chart));
    return () => el.replaceChildren();
  }, [section, units]);
  return (
    <figure className="mt-4">
      <div ref={holder} role="img" aria-label={`${section.variable.label} by season for each treatment`} />
      <figcaption className="text-xs text-loam-600">
        Treatment means by season, as published with this version ({section.depthLabel}).
      </figcaption>
    </figure>
  );
}
