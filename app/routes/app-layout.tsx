import { Form, Link, NavLink, Outlet, useLoaderData } from "react-router";
import { requireUser } from "~/.server/permissions";
import { listProgramsOf } from "~/.server/programs";
import { Wordmark } from "~/components/wordmark";
import type { Route } from "./+types/app-layout";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const programs = await listProgramsOf(request, user.id);
  return { user: { name: user.name, email: user.email, isAdmin: user.isAdmin }, programs };
}

export default function AppLayout() {
  const { user, programs } = useLoaderData<typeof loader>();
  return (
    <div className="flex min-h-screen flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:m-2 focus:rounded focus:bg-white focus:p-2">
        Skip to content
      </a>
      <header className="no-print border-b border-loam-200 bg-white">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3 sm:px-6">
          <Link to="/home" className="no-underline" aria-label="Tilthmark: your programs">
            <Wordmark />
          </Link>
          <nav aria-label="Programs" className="flex flex-1 flex-wrap gap-1 text-sm">
            <NavItem to="/home" end>
              Overview
            </NavItem>
            {programs.map((p) => (
              <NavItem key={p.id} to={`/programs/${p.id}`}>
                {p.name}
              </NavItem>
            ))}
          </nav>
          <div className="flex items-center gap-3 text-sm">
            <Link to="/account" className="text-loam-800 no-underline hover:underline">
              <span className="sr-only">Your account: </span>
              {user.name}
              {user.isAdmin && <span className="ml-2 rounded bg-loam-100 px-1.5 py-0.5 text-xs text-loam-800">administrator</span>}
            </Link>
            <Form method="post" action="/sign-out">
              <button type="submit" className="rounded px-2 py-1 text-moss-800 underline underline-offset-2 hover:bg-loam-100">
                Sign out
              </button>
            </Form>
          </div>
        </div>
      </header>
      <main id="main" className="mx-auto w-full max-w-6xl flex-1 px-4 py-8 sm:px-6">
        <Outlet />
      </main>
      <footer className="no-print border-t border-loam-200 py-4 text-center text-xs text-loam-600">
        Tilthmark gives estimates for research use, not regulatory compliance. Follow local codes and your institution's
        safety office.
      </footer>
    </div>
  );
}

function NavItem({ to, end, children }: { to: string; end?: boolean; children: React.ReactNode }) {
  return (
    <NavLink
      to={to}
      end={end}
      className={({ isActive }) =>
        `rounded-md px-3 py-1.5 no-underline ${isActive ? "bg-moss-100 font-medium text-moss-900" : "text-loam-800 hover:bg-loam-100"}`
      }
    >
      {children}
    </NavLink>
  );
}
