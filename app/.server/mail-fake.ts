// A local SMTP server on loopback that keeps every message in the mailbox table.
// Used in demo mode and tests only; /dev/mailbox lists what it caught.
import type { AddressInfo } from "node:net";
import { simpleParser } from "mailparser";
import { SMTPServer } from "smtp-server";
import { db, schema } from "./db";

export async function startMailFake(port = 0): Promise<{ port: number; close: () => Promise<void> }> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    logger: false,
    size: 5 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((mail) =>
          db.insert(schema.mailboxMessages).values({
            envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
            envelopeTo: session.envelope.rcptTo.map((r) => r.address).join(", "),
            subject: mail.subject ?? null,
            text: mail.text ?? null,
            html: typeof mail.html === "string" ? mail.html : null,
          }),
        )
        .then(() => callback(), (error: Error) => callback(error));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, "127.0.0.1", () => resolve());
  });
  // The catcher must not keep a stopping server process alive.
  server.server.unref();
  const address = server.server.address() as AddressInfo;
  return { port: address.port, close: () => new Promise((resolve) => server.close(() => resolve())) };
}
