import "@fontsource/ibm-plex-sans/400.css";
import "@fontsource/ibm-plex-sans/500.css";
import "@fontsource/ibm-plex-sans/600.css";
import "@fontsource/ibm-plex-sans/400-italic.css";
import "@fontsource/ibm-plex-mono/400.css";
import "@fontsource/ibm-plex-mono/500.css";
import { isRouteErrorResponse, Link, Links, Meta, Outlet, Scripts, ScrollRestoration } from "react-router";
import type { Route } from "./+types/root";
import { guardRequest } from "./.server/http-guard";
import "./app.css";
import { Wordmark } from "./components/wordmark";

// Every request: cross-origin writes refused, security headers, 503 during a database outage, a log line.
export const middleware: Route.MiddlewareFunction[] = [({ request }, next) => guardRequest(request, next)];

export const links: Route.LinksFunction = () => [{ rel: "icon", href: "/favicon.svg", type: "image/svg+xml" }];

export function Layout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-screen">
        {children}
        <ScrollRestoration />
        <Scripts />
      </body>
    </html>
  );
}

export default function App() {
  return <Outlet />;
}

const explanations: Record<number, { title: string; body: string }> = {
  401: { title: "Please sign in", body: "This page belongs to a program. Sign in to see it." },
  403: {
    title: "You don't have access to this",
    body: "Your role in this program does not include this page or action. A program owner can change your role.",
  },
  404: { title: "Nothing here", body: "The page, trial or program you asked for does not exist, or it was removed." },
  413: { title: "That is too large", body: "The request was larger than Tilthmark accepts." },
  429: { title: "Slow down a little", body: "Too many attempts in a short time. Wait a few minutes and try again." },
  503: {
    title: "Tilthmark can't reach its database",
    body: "The database is restarting or unreachable. Nothing you entered was saved half-way; try again in a minute.",
  },
};

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  let status = 500;
  let detail: string | undefined;
  if (isRouteErrorResponse(error)) {
    status = error.status;
    detail = typeof error.data === "string" ? error.data : (error.data?.error as string | undefined);
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message;
  }
  const text = explanations[status] ?? {
    title: "Something went wrong on our side",
    body: "The error has been logged. Your data are safe: changes are saved all at once or not at all. Try again, or go back to your programs.",
  };
  return (
    <main className="mx-auto flex min-h-screen max-w-xl flex-col justify-center gap-6 px-6 py-16">
      <Wordmark />
      <div>
        <p className="num text-sm text-clay-700">Error {status}</p>
        <h1 className="mt-1 text-3xl font-semibold">{text.title}</h1>
        <p className="mt-3 text-loam-700">{text.body}</p>
        {detail && detail !== text.title && <p className="mt-3 rounded border border-loam-200 bg-white p-3 text-sm">{detail}</p>}
      </div>
      <p className="flex gap-4">
        <Link to="/home">Your programs</Link>
        <Link to="/">Tilthmark home</Link>
        {status === 401 && <Link to="/sign-in">Sign in</Link>}
      </p>
    </main>
  );
}
