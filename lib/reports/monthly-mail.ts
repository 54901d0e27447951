import type { Db } from "@/db/client";
import { historyBackfillMark } from "@/db/history-backfill";
import { processAlive } from "@/lib/process-alive";
import { buildMonthlyReportMail, dueMonthlyReports, reportMailKey, reportRecipients } from "@/db/reports";
import type { MailOutboxRow } from "@/db/schema";
import { enqueueMail } from "@/lib/mail/outbox";

// Queues each site's monthly report for its managers once the month has ended in the site's time zone.
// Call it every few minutes from a long-running process (the mail process); the outbox's idempotency keys
// (report:<siteId>:<yyyy-mm>:to:u<userId>) make repeated calls harmless, and a report already queued for every
// recipient is not even rebuilt.

// mail_outbox.kind's TypeScript enum (db/schema.ts) does not list "report" yet; SQLite stores the text as it is.
const REPORT_KIND = "report" as unknown as MailOutboxRow["kind"];

export const recipientKey = (siteId: number, month: string, userId: number) => `${reportMailKey(siteId, month)}:to:u${userId}`;

/** Whether the process with this id still runs (signal 0 only checks). */
export type QueueResult = { reports: number; queued: number; deferred?: "history-backfill" };

/**
 * Queues what is due. While a live process is still writing history (the demo's backfill), nothing is queued: the
 * report would count the unwritten part as "no data" and claim a bad month; the next call after it ends queues it.
 */
export function queueMonthlyReportMails(
  db: Db,
  now: number,
  opts: { from: string; baseUrl?: string; alive?: (pid: number) => boolean },
): QueueResult {
  const mark = historyBackfillMark(db);
  if (mark && (opts.alive ?? processAlive)(mark.pid)) return { reports: 0, queued: 0, deferred: "history-backfill" };
  const queuedKey = db.$client.prepare("SELECT 1 FROM mail_outbox WHERE key = ?");
  let reports = 0;
  let queued = 0;
  for (const due of dueMonthlyReports(db, now)) {
    const pending = reportRecipients(db, due.siteId).filter((r) => !queuedKey.get(recipientKey(due.siteId, due.month, r.userId)));
    if (!pending.length) continue;
    const mail = buildMonthlyReportMail(db, due.siteId, due.month, { now, baseUrl: opts.baseUrl });
    if (!mail) continue;
    reports++;
    db.transaction(() => {
      for (const r of pending) {
        const res = enqueueMail(
          db,
          {
            key: recipientKey(due.siteId, due.month, r.userId),
            kind: REPORT_KIND,
            siteId: due.siteId,
            to: { name: r.name, address: r.email },
            subject: mail.subject,
            text: mail.text,
            html: mail.html,
            details: { report: due.key, month: due.month },
          },
          { from: opts.from, now, actor: "reports" },
        );
        if (res.inserted) queued++;
      }
    }, { behavior: "immediate" });
  }
  return { reports, queued };
}
