import { desc } from "drizzle-orm";
import { data, useLoaderData } from "react-router";
import { db, schema } from "~/.server/db";
import { env } from "~/.server/env";
import { Wordmark } from "~/components/wordmark";
import type { Route } from "./+types/dev.mailbox";

export const meta: Route.MetaFunction = () => [{ title: "Demo mailbox · Tilthmark" }];

// Demo mode only: the messages caught by the local SMTP fake. Outside demo mode it does not exist.
export async function loader() {
  if (!env.demo) throw data("Not found", { status: 404 });
  const messages = await db.select().from(schema.mailboxMessages).orderBy(desc(schema.mailboxMessages.id)).limit(100);
  return {
    messages: messages.map((m) => ({ id: m.id, to: m.envelopeTo, subject: m.subject, text: m.text, at: m.receivedAt.toISOString() })),
  };
}

/** Links in plain-text mail, made clickable; everything else stays text. */
function Linkified({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/\S+)/g);
  return (
    <>
      {parts.map((part, i) =>
        /^https?:\/\//.test(part) ? (
          <a key={i} href={part}>
            {part}
          </a>
        ) : (
          <span key={i}>{part}</span>
        ),
      )}
    </>
  );
}

export default function Mailbox() {
  const { messages } = useLoaderData<typeof loader>();
  return (
    <main className="mx-auto max-w-3xl px-6 py-10">
      <Wordmark />
      <h1 className="mt-6 text-2xl font-semibold">Demo mailbox</h1>
      <p className="mt-1 text-loam-700">
        In demo mode Tilthmark sends no real e-mail: a local mail catcher keeps every message here, newest first.
      </p>
      {messages.length === 0 && <p className="mt-6 text-loam-700">No messages yet.</p>}
      <ol className="mt-6 space-y-4">
        {messages.map((m) => (
          <li key={m.id} className="rounded-lg border border-loam-200 bg-white p-4" data-testid="mail">
            <p className="text-sm text-loam-600">
              To <span className="font-medium text-loam-900">{m.to}</span> ·{" "}
              <time dateTime={m.at} className="num">{m.at.replace("T", " ").slice(0, 19)} UTC</time>
            </p>
            <h2 className="mt-1 font-semibold">{m.subject}</h2>
            <pre className="mt-2 font-sans text-sm whitespace-pre-wrap text-loam-800">
              <Linkified text={m.text ?? ""} />
            </pre>
          </li>
        ))}
      </ol>
    </main>
  );
}
