import { openDatabase } from "@/db/client";
import { notifyConfigFromEnv } from "@/lib/notify/config";
import { startNotifier } from "@/lib/notify/notifier";
import { queueMonthlyReportMails } from "@/lib/reports/monthly-mail";
import { mailConfigFromEnv } from "./config";
import { mailboxProbe, startOutboxSender } from "./outbox";
import { startSmtpFake, type SmtpFake } from "./smtp-fake";

// Node only, run with tsx: the alarm notifier and the outbox sender, plus the built-in SMTP fake when SMTP_URL is unset,
// and every few minutes the queueing of the monthly report e-mails (lib/reports/monthly-mail.ts).
// Expects a migrated database (the demo and `start` migrate first).

const db = openDatabase();
const mail = mailConfigFromEnv();
const notify = notifyConfigFromEnv();

let fake: SmtpFake | null = null;
if (mail.useFake) {
  fake = await startSmtpFake({ db, host: mail.fakeHost, port: mail.fakePort });
  console.log(`[mail] SMTP fake listening on ${fake.url}; messages are kept for /admin/mailbox`);
}

const sender = startOutboxSender({
  db,
  ...mail,
  // Only the fake shares this database, so only then can an interrupted send be checked against what arrived.
  acceptedProbe: fake ? mailboxProbe(db) : undefined,
});
const notifier = startNotifier({ db, config: notify, onQueued: () => sender.kick() });
console.log(
  `[mail] notifier polling every ${notify.pollMs} ms (escalate after ${notify.escalateAfterMs / 60_000} min, digest above ${notify.digestThreshold} alarms in ${
    notify.digestWindowMs / 60_000
  } min); sending to ${redactedUrl(mail.smtpUrl)}`,
);

/** The SMTP address without its user name and password, for logs. */
function redactedUrl(url: string): string {
  try {
    const u = new URL(url);
    u.username = "";
    u.password = "";
    return u.toString();
  } catch {
    return "(unparsable SMTP_URL)";
  }
}

const REPORT_CHECK_MS = 5 * 60_000;
let reportsDeferred = false;
function queueReports() {
  try {
    const r = queueMonthlyReportMails(db, Date.now(), { from: mail.from, baseUrl: notify.baseUrl });
    if (r.deferred && !reportsDeferred) console.log("[mail] monthly report e-mails wait: history is still being written (backfill)");
    reportsDeferred = Boolean(r.deferred);
    if (r.queued) {
      console.log(`[mail] queued ${r.queued} monthly report e-mail(s) for ${r.reports} report(s)`);
      sender.kick();
    }
  } catch (e) {
    console.error(`[mail] monthly reports could not be queued: ${(e as Error).message}`);
  }
}
queueReports();
const reportTimer = setInterval(queueReports, REPORT_CHECK_MS);

let stopping = false;
async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`[mail] ${signal}: stopping`);
  const force = setTimeout(() => process.exit(1), 10_000);
  try {
    notifier.close();
    clearInterval(reportTimer);
    await sender.close();
    await fake?.close();
    db.$client.close();
  } finally {
    clearTimeout(force);
    process.exit(0);
  }
}
process.on("SIGINT", () => void stop("SIGINT"));
process.on("SIGTERM", () => void stop("SIGTERM"));
