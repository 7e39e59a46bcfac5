import type { ReactNode } from "react";
import { Link } from "react-router";
import { Wordmark } from "./wordmark";

/** The frame of the signed-out pages: sign-in, setup, password reset, invitation. */
export function AuthCard({ title, lead, children }: { title: string; lead?: ReactNode; children: ReactNode }) {
  return (
    <div className="flex min-h-screen flex-col">
      <header className="px-6 py-5">
        <Link to="/" className="no-underline" aria-label="Tilthmark home">
          <Wordmark />
        </Link>
      </header>
      <main className="flex flex-1 items-start justify-center px-4 pt-6 pb-16 sm:pt-12">
        <div className="w-full max-w-md rounded-xl border border-loam-200 bg-white p-6 shadow-sm sm:p-8">
          <h1 className="text-2xl font-semibold">{title}</h1>
          {lead && <p className="mt-2 text-loam-700">{lead}</p>}
          <div className="mt-6">{children}</div>
        </div>
      </main>
    </div>
  );
}
