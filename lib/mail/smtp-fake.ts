import type { AddressInfo } from "node:net";
import { simpleParser, type AddressObject } from "mailparser";
import { SMTPServer } from "smtp-server";
import type { Db } from "@/db/client";
import { insertReceived } from "@/db/mail";

// A small SMTP server for the demo and the tests: accepts every message on 127.0.0.1 and keeps it in mail_received,
// where an administrator reads it at /admin/mailbox. It relays nothing anywhere.

export type SmtpFake = {
  host: string;
  port: number;
  url: string;
  close(): Promise<void>;
};

const MAX_SIZE = 10 * 1024 * 1024;

function addressText(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return "";
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(", ");
}

export async function startSmtpFake(opts: { db: Db; host?: string; port?: number; log?: (line: string) => void }): Promise<SmtpFake> {
  const { db } = opts;
  const host = opts.host ?? "127.0.0.1";
  const log = opts.log ?? ((line: string) => console.log(`[smtp-fake] ${line}`));

  const server = new SMTPServer({
    banner: "Airkeep SMTP fake: messages are kept for the admin mailbox, never relayed",
    size: MAX_SIZE,
    authOptional: true,
    allowInsecureAuth: true,
    disabledCommands: ["STARTTLS"],
    logger: false,
    disableReverseLookup: true,
    closeTimeout: 2000,
    // Any credentials are fine: the fake only listens on the loopback interface.
    onAuth(auth, _session, callback) {
      callback(null, { user: auth.username ?? "anonymous" });
    },
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (chunk: Buffer) => chunks.push(chunk));
      stream.on("error", (e) => callback(e));
      stream.on("end", () => {
        if (stream.sizeExceeded) {
          const err = new Error("Message too large") as Error & { responseCode: number };
          err.responseCode = 552;
          return callback(err);
        }
        const raw = Buffer.concat(chunks);
        simpleParser(raw)
          .then((parsed) => {
            const row = insertReceived(db, {
              receivedAt: Date.now(),
              messageId: parsed.messageId ?? null,
              envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : "",
              envelopeTo: session.envelope.rcptTo.map((r) => r.address),
              fromText: addressText(parsed.from),
              toText: addressText(parsed.to),
              subject: parsed.subject ?? "",
              text: parsed.text ?? "",
              html: parsed.html === false ? null : (parsed.html ?? null),
              headers: parsed.headerLines.map((h) => [h.key, h.line.slice(h.line.indexOf(":") + 1).trim()] as [string, string]),
              size: raw.length,
              remoteAddress: session.remoteAddress,
            });
            if (row.duplicateOf !== null) log(`message ${row.id} repeats Message-ID ${row.messageId} of message ${row.duplicateOf}`);
            callback(null, `Message queued as ${row.id}`);
          })
          .catch((e: Error) => {
            log(`could not store a message: ${e.message}`);
            const err = new Error("Could not store the message, try again later") as Error & { responseCode: number };
            err.responseCode = 451;
            callback(err);
          });
      });
    },
  });

  await new Promise<void>((resolve, reject) => {
    const onError = (e: Error) => reject(e);
    server.server.once("error", onError);
    server.listen(opts.port ?? 2525, host, () => {
      server.server.off("error", onError);
      resolve();
    });
  });
  server.on("error", (e: Error) => log(`error: ${e.message}`));
  const port = (server.server.address() as AddressInfo).port;

  return {
    host,
    port,
    url: `smtp://${host}:${port}`,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
