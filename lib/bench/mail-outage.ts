// Mail recovery benchmark: with the default mail settings (MAIL_POLL_MS, MAIL_RETRY_*_S, MAIL_PROBE_S), 30 first
// notices and 10 escalations wait through a mail-server outage long enough for their own back-offs to grow; then the
// built-in SMTP fake comes back on the same port. Prints the seconds from its return to the last first notice
// delivered (target < 10 s) and checks that no escalation went before its first notice.
// Run: npm run bench:mail [-- --outage 40]
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { parseArgs } from "node:util";
import { openDatabase } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { mailOutbox } from "@/db/schema";
import { mailConfigFromEnv } from "@/lib/mail/config";
import { enqueueMail, startOutboxSender } from "@/lib/mail/outbox";
import { startSmtpFake } from "@/lib/mail/smtp-fake";

const { values: flags } = parseArgs({ options: { outage: { type: "string", default: "40" } } });
const OUTAGE_MS = Number(flags.outage) * 1000;
const FIRST = 30;
const ESCALATIONS = 10;

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-mail-bench-"));
const db = openDatabase(path.join(dir, "airkeep.db"));
runMigrations(db);
const config = mailConfigFromEnv({ ...process.env, SMTP_URL: undefined, SMTP_PORT: "0" });

// Find a free port, then leave it closed: the server is down.
const probe = await startSmtpFake({ db, port: 0, log: () => {} });
await probe.close();
const port = probe.port;

const mail = (key: string, kind: "raise" | "escalation", threadId: number) =>
  enqueueMail(
    db,
    {
      key,
      kind,
      priority: "critical",
      threadId,
      to: { name: `Bench ${key}`, address: `${key.replace(/[^a-z0-9]/gi, ".")}@airkeep.demo` },
      subject: `Bench ${key}`,
      text: "Bench",
      html: "<p>Bench</p>",
    },
    { from: config.from },
  );
for (let i = 0; i < FIRST; i++) mail(`bench:${i}:raise:0`, "raise", i + 1);

const sender = startOutboxSender({ db, ...config, smtpUrl: `smtp://127.0.0.1:${port}`, log: () => {} });
sender.kick();
await new Promise((r) => setTimeout(r, OUTAGE_MS / 2));
// Escalations queued later in the outage, due at once.
for (let i = 0; i < ESCALATIONS; i++) mail(`bench:${i}:raise:1`, "escalation", i + 1);
sender.kick();
await new Promise((r) => setTimeout(r, OUTAGE_MS / 2));

const rows = () => db.select().from(mailOutbox).all();
const upAt = Date.now();
const fake = await startSmtpFake({ db, port, log: () => {} });
while (rows().some((r) => r.status !== "sent")) await new Promise((r) => setTimeout(r, 20));

const all = rows();
const firstSent = Math.min(...all.map((r) => r.sentAt!));
const lastFirst = Math.max(...all.filter((r) => r.kind === "raise").map((r) => r.sentAt!));
const overtaken = all.filter((e) => e.kind === "escalation" && all.some((f) => f.kind === "raise" && f.threadId === e.threadId && f.sentAt! > e.sentAt!)).length;
console.log(
  `mail outage ${OUTAGE_MS / 1000} s, probe every ${config.probeMs / 1000} s, poll ${config.pollMs} ms, back-off base ${config.retryBaseMs / 1000} s; ` +
    `first delivery ${((firstSent - upAt) / 1000).toFixed(2)} s after the server's return`,
);
console.log(`seconds from the mail server's return to the last of ${FIRST} first notices delivered: ${((lastFirst - upAt) / 1000).toFixed(2)} s (target < 10 s)`);
console.log(`escalations delivered before their first notice: ${overtaken} of ${ESCALATIONS} (target 0)`);

await sender.close();
await fake.close();
db.$client.close();
fs.rmSync(dir, { recursive: true, force: true });
