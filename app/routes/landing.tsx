import { Link, useLoaderData } from "react-router";
import { userCount } from "~/.server/accounts";
import { getSession } from "~/.server/session";
import { buttonClass } from "~/components/form";
import { Wordmark } from "~/components/wordmark";
import type { Route } from "./+types/landing";

export const meta: Route.MetaFunction = () => [
  { title: "Tilthmark · replicated plot trials for soil organic matter" },
  {
    name: "description",
    content:
      "Lay out block designs, take in loss-on-ignition and bulk-density results, derive SOC stocks and publish field briefs.",
  },
];

export async function loader({ request }: Route.LoaderArgs) {
  const [session, users] = await Promise.all([getSession(request), userCount()]);
  return { signedIn: Boolean(session), needsSetup: users === 0 };
}

const steps = [
  {
    title: "Plot map",
    who: "Researcher",
    text: "Randomized complete block, factorial and split-plot layouts from a stored seed, drawn to scale with treatment labels and an application sheet for the field crew.",
  },
  {
    title: "Lab intake",
    who: "Technician",
    text: "Loss-on-ignition and bulk-density CSV files checked row by row, committed all-or-nothing, and kept byte-for-byte as received.",
  },
  {
    title: "Results",
    who: "Researcher · collaborator",
    text: "SOM, SOC and SOC stocks at fixed depth and equivalent soil mass; ANOVA with the right error terms, contrasts and mean separation across seasons.",
  },
  {
    title: "Field brief",
    who: "Extension agent",
    text: "A frozen, citable summary table with plain-language findings, units growers use, and the cautions that go with amendments.",
  },
];

export default function Landing() {
  const { signedIn, needsSetup } = useLoaderData<typeof loader>();
  return (
    <div className="min-h-screen">
      <header className="mx-auto flex max-w-6xl items-center justify-between px-6 py-5">
        <Wordmark />
        <nav aria-label="Account">
          {signedIn ? (
            <Link to="/home" className={buttonClass("secondary")}>
              Your programs
            </Link>
          ) : (
            <Link to="/sign-in" className={buttonClass("secondary")}>
              Sign in
            </Link>
          )}
        </nav>
      </header>
      <main>
        <section className="mx-auto grid max-w-6xl items-center gap-10 px-6 pt-10 pb-16 lg:grid-cols-[1.1fr_1fr]">
          <div>
            <p className="text-sm font-medium tracking-wide text-clay-700 uppercase">For soil scientists and their field crews</p>
            <h1 className="mt-3 text-4xl leading-tight font-semibold tracking-tight sm:text-5xl">
              Does it really build soil organic matter? Run the trial that answers it.
            </h1>
            <p className="mt-5 max-w-xl text-lg text-loam-700">
              Tilthmark carries a replicated field-plot trial of soil amendments from the randomized plot map through lab
              results to statistics a journal will accept, and to a field brief an extension agent can hand to growers.
            </p>
            <div className="mt-8 flex flex-wrap gap-3">
              {needsSetup ? (
                <Link to="/setup" className={buttonClass("primary")}>
                  Set up this install
                </Link>
              ) : signedIn ? (
                <Link to="/home" className={buttonClass("primary")}>
                  Go to your programs
                </Link>
              ) : (
                <Link to="/sign-in" className={buttonClass("primary")}>
                  Sign in
                </Link>
              )}
            </div>
          </div>
          <FieldSketch />
        </section>
        <section className="border-t border-loam-200 bg-white">
          <ol className="mx-auto grid max-w-6xl gap-6 px-6 py-14 sm:grid-cols-2 lg:grid-cols-4">
            {steps.map((s, i) => (
              <li key={s.title}>
                <p className="num text-sm text-clay-700">0{i + 1}</p>
                <h2 className="mt-1 text-lg font-semibold">{s.title}</h2>
                <p className="text-sm font-medium text-moss-800">{s.who}</p>
                <p className="mt-2 text-sm text-loam-700">{s.text}</p>
              </li>
            ))}
          </ol>
        </section>
        <section className="mx-auto max-w-6xl px-6 py-12 text-sm text-loam-700">
          <p className="max-w-3xl">
            Tilthmark computes estimates for research. Manure and compost handling, furnace work, coring near buried
            utilities and nutrient-loading rules carry their own cautions, shown where the work happens; local codes,
            institutional safety offices and licensed practice come first.
          </p>
        </section>
      </main>
    </div>
  );
}

/** An illustrative four-block layout: each treatment once per block, labelled, never colour alone. */
function FieldSketch() {
  const palette = ["#0072b2", "#e69f00", "#009e73", "#cc79a7", "#56b4e9", "#d55e00"];
  const rows = [
    [3, 0, 5, 1, 4, 2],
    [1, 4, 2, 0, 5, 3],
    [5, 2, 0, 3, 1, 4],
    [0, 3, 4, 2, 5, 1],
  ];
  return (
    <figure className="rounded-xl border border-loam-200 bg-white p-5 shadow-sm">
      <svg viewBox="0 0 330 220" role="img" aria-labelledby="sketch-title" className="w-full">
        <title id="sketch-title">Example plot map: four blocks of six treatment plots, T1 to T6, each once per block</title>
        {rows.map((row, b) =>
          row.map((t, p) => (
            <g key={`${b}-${p}`}>
              <rect x={30 + p * 50} y={10 + b * 52} width={44} height={44} rx={3} fill={palette[t]} fillOpacity={0.85} />
              <text x={52 + p * 50} y={30 + b * 52} textAnchor="middle" fontSize="12" fontWeight="600" fill="#fff" fontFamily="IBM Plex Mono">
                T{t + 1}
              </text>
              <text x={52 + p * 50} y={46 + b * 52} textAnchor="middle" fontSize="9" fill="#fff" fontFamily="IBM Plex Mono">
                {(b + 1) * 100 + p + 1}
              </text>
            </g>
          )),
        )}
        {rows.map((_, b) => (
          <text key={b} x={12} y={36 + b * 52} textAnchor="middle" fontSize="10" fill="#54442f" fontFamily="IBM Plex Sans">
            B{b + 1}
          </text>
        ))}
      </svg>
      <figcaption className="mt-3 text-sm text-loam-700">
        A randomized complete block layout: plot numbers follow block × 100 + position.
      </figcaption>
    </figure>
  );
}
