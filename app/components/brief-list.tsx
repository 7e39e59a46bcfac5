import type { ReactNode } from "react";
import { Link } from "react-router";
import { Empty } from "~/components/page";

export type BriefListItem = {
  id: string;
  title: string;
  trialTitle: string;
  version: number;
  /** ISO timestamp of the latest version. */
  publishedAt: string;
  authors: string;
};

/** A program's published field briefs, newest first as given, each linking to its page (which every member may open). */
export function BriefList({ briefs, empty }: { briefs: BriefListItem[]; empty: ReactNode }) {
  if (briefs.length === 0) return <Empty>{empty}</Empty>;
  return (
    <ul className="divide-y divide-loam-200 rounded-lg border border-loam-200 bg-white">
      {briefs.map((b) => (
        <li key={b.id} className="px-4 py-3">
          <Link to={`/briefs/${b.id}`} className="font-medium">
            {b.title}
          </Link>
          <p className="text-sm text-loam-700">
            {b.trialTitle} · version <span className="num">{b.version}</span>,{" "}
            <span className="num">{b.publishedAt.slice(0, 10)}</span> · {b.authors}
          </p>
        </li>
      ))}
    </ul>
  );
}
