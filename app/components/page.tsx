import type { ReactNode } from "react";
import { Link } from "react-router";

export function PageHeader({
  title,
  eyebrow,
  lead,
  actions,
  crumbs,
}: {
  title: string;
  eyebrow?: ReactNode;
  lead?: ReactNode;
  actions?: ReactNode;
  crumbs?: { to: string; label: string }[];
}) {
  return (
    <div className="mb-8 flex flex-wrap items-end justify-between gap-4">
      <div>
        {crumbs && crumbs.length > 0 && (
          <nav aria-label="Breadcrumb" className="mb-2 text-sm">
            {crumbs.map((c, i) => (
              <span key={c.to}>
                {i > 0 && <span className="px-1.5 text-loam-400">/</span>}
                <Link to={c.to}>{c.label}</Link>
              </span>
            ))}
          </nav>
        )}
        {eyebrow && <p className="text-sm font-medium tracking-wide text-clay-700 uppercase">{eyebrow}</p>}
        <h1 className="text-3xl font-semibold tracking-tight">{title}</h1>
        {lead && <p className="mt-2 max-w-3xl text-loam-700">{lead}</p>}
      </div>
      {actions && <div className="flex gap-2">{actions}</div>}
    </div>
  );
}

export function Section({ title, children, aside }: { title: string; children: ReactNode; aside?: ReactNode }) {
  return (
    <section className="mb-10">
      <div className="mb-3 flex items-baseline justify-between gap-4 border-b border-loam-200 pb-2">
        <h2 className="text-lg font-semibold">{title}</h2>
        {aside}
      </div>
      {children}
    </section>
  );
}

export function Empty({ children }: { children: ReactNode }) {
  return <p className="rounded-lg border border-dashed border-loam-400 bg-white/60 px-4 py-6 text-loam-700">{children}</p>;
}

const statusStyles: Record<string, string> = {
  draft: "bg-loam-100 text-loam-800",
  locked: "bg-clay-100 text-clay-800",
  running: "bg-moss-100 text-moss-900",
  closed: "bg-loam-200 text-loam-800",
};

export function StatusBadge({ status }: { status: string }) {
  return (
    <span className={`inline-block rounded px-2 py-0.5 text-xs font-medium ${statusStyles[status] ?? statusStyles.draft}`}>
      {status}
    </span>
  );
}

export const DESIGN_LABELS: Record<string, string> = {
  crd: "Completely randomized",
  rcbd: "Randomized complete block (RCBD)",
  factorial_rcbd: "Factorial in RCBD",
  split_plot: "Split-plot",
};

/** Previous/next links under a paged table, with "Page n of m" (and an optional note after it). */
export function Pager({
  page,
  pages,
  href,
  labels = ["← Previous", "Next →"],
  note,
}: {
  page: number;
  pages: number;
  href: (page: number) => string;
  labels?: [string, string];
  note?: ReactNode;
}) {
  if (pages <= 1) return null;
  return (
    <nav aria-label="Pages" className="mt-4 flex items-center gap-3 text-sm">
      {page > 1 && <Link to={href(page - 1)}>{labels[0]}</Link>}
      <span>
        Page <span className="num">{page}</span> of <span className="num">{pages}</span>
        {note}
      </span>
      {page < pages && <Link to={href(page + 1)}>{labels[1]}</Link>}
    </nav>
  );
}
