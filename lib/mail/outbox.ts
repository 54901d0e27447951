import { randomBytes } from "node:crypto";
import { eq } from "drizzle-orm";
import nodemailer from "nodemailer";
import type SMTPTransport from "nodemailer/lib/smtp-transport";
import type { Db } from "@/db/client";
import { appendEvent } from "@/db/events";
import {
  claimNextOutbox,
  insertOutbox,
  mailInstanceId,
  markOutboxFailed,
  markOutboxSent,
  receivedByMessageId,
  releaseDeferredOutbox,
  settleStaleClaim,
  staleClaims,
} from "@/db/mail";
import { alarms, type MailOutboxRow } from "@/db/schema";
import type { Priority } from "@/shared/alarm-rules";
import { retryDelayMs } from "./backoff";
import { messageIdDomain, type MailConfig } from "./config";
import { messageIdFor } from "./message-id";

// The outbox: every e-mail Airkeep sends is first a row in mail_outbox with a unique idempotency key, so nothing is
// queued twice; a sender loop hands due rows to the SMTP server one at a time.
//
// Delivery guarantees
// - Claim before send: a row goes pending → sending (with this sender's token) in one UPDATE before any SMTP traffic,
//   and sending → sent only after the server's 250 reply to DATA. Two senders never send the same row.
// - Failure: connection trouble and 4xx replies put the row back to pending with exponential backoff (never given up,
//   so an SMTP outage loses nothing); a 5xx refusal is retried too but given up ("failed") after MAIL_MAX_REJECTIONS.
// - Recovery: while the server is unreachable, one message is tried every MAIL_PROBE_S ahead of its own back-off; the
//   first delivery releases every row deferred for connection trouble, so the backlog drains at once and in queue order.
// - Order within a notice thread: an escalation, re-alarm or all-clear is not sent while a first notice of the same
//   thread is still pending (db/mail.ts), so the next contact never hears before the person told first.
// - Crash between the server's acceptance and our "sent" mark: the row is left in "sending". After
//   MAIL_CLAIM_TIMEOUT_S it is settled. If the server is known to have the message (the built-in fake shares this
//   database, so its mailbox is checked for the Message-ID) the row is marked sent: at-most-once. Otherwise Airkeep
//   cannot tell whether the server took it, and sends it again: at-least-once rather than lose an alarm. The resend
//   carries the same Message-ID (derived from the key), so the duplicate is detectable by the receiver, and the
//   built-in mailbox flags it.

export type NewMail = {
  key: string;
  kind: MailOutboxRow["kind"];
  priority?: Priority | null;
  siteId?: number | null;
  compressorId?: number | null;
  alarmId?: number | null;
  threadId?: number | null;
  contactId?: number | null;
  to: { name: string; address: string };
  subject: string;
  text: string;
  html: string;
  /** Extra details for the event log entry. */
  details?: Record<string, unknown>;
};

/**
 * Queues a message unless one with the same key exists; the first queueing is written to the event log.
 * Call inside the caller's transaction to queue atomically with its own state.
 */
export function enqueueMail(db: Db, mail: NewMail, opts: { from: string; now?: number; actor?: string }): { id: number; inserted: boolean; messageId: string } {
  const now = opts.now ?? Date.now();
  const messageId = messageIdFor(mail.key, mailInstanceId(db), messageIdDomain(opts.from));
  const r = insertOutbox(db, {
    key: mail.key,
    kind: mail.kind,
    priority: mail.priority ?? null,
    siteId: mail.siteId ?? null,
    alarmId: mail.alarmId ?? null,
    threadId: mail.threadId ?? null,
    contactId: mail.contactId ?? null,
    toAddress: mail.to.address,
    toName: mail.to.name,
    subject: mail.subject,
    text: mail.text,
    html: mail.html,
    messageId,
    nextAttemptAt: now,
    createdAt: now,
  });
  if (r.inserted) {
    appendEvent(db, {
      ts: now,
      kind: "mail",
      action: "mail.queue",
      text: `E-mail queued for ${mail.to.name} <${mail.to.address}>: ${mail.subject}`,
      priority: mail.priority ?? null,
      siteId: mail.siteId ?? null,
      compressorId: mail.compressorId ?? null,
      alarmId: mail.alarmId ?? null,
      actor: opts.actor ?? "notifier",
      details: { key: mail.key, kind: mail.kind, messageId, outboxId: r.id, ...mail.details },
    });
  }
  return { ...r, messageId };
}

// ---- Sender ------------------------------------------------------------------------------------------

export type SenderOptions = Pick<
  MailConfig,
  "smtpUrl" | "from" | "pollMs" | "retryBaseMs" | "retryMaxMs" | "maxRejections" | "claimTimeoutMs" | "sendTimeoutMs"
> &
  Partial<Pick<MailConfig, "probeMs">> & {
  db: Db;
  /** Whether the SMTP server is known to hold a message with this Message-ID (used to settle stale claims). */
  acceptedProbe?: (messageId: string) => { serverMessageId: string | null } | null;
  /** Retry jitter fraction (0 in tests). */
  jitter?: number;
  log?: (line: string) => void;
};

export type OutboxSender = {
  /** Look for due mail now instead of at the next poll. */
  kick(): void;
  /** One pass: settle stale claims, then send due rows until none is due or the server cannot be reached. */
  runOnce(): Promise<{ sent: number; failed: number }>;
  close(): Promise<void>;
};

/** A probe that looks the Message-ID up in the built-in fake's mailbox (same database). */
export function mailboxProbe(db: Db) {
  return (messageId: string) => {
    const first = receivedByMessageId(db, messageId)[0];
    return first ? { serverMessageId: String(first.id) } : null;
  };
}

export function smtpTransportOptions(smtpUrl: string, timeoutMs: number): SMTPTransport.Options {
  const u = new URL(smtpUrl);
  const secure = u.protocol === "smtps:";
  if (u.protocol !== "smtp:" && !secure) throw new Error(`SMTP_URL must start with smtp:// or smtps://, not ${u.protocol}//`);
  return {
    host: u.hostname,
    port: u.port ? Number(u.port) : secure ? 465 : 587,
    secure,
    auth: u.username ? { user: decodeURIComponent(u.username), pass: decodeURIComponent(u.password) } : undefined,
    connectionTimeout: timeoutMs,
    greetingTimeout: timeoutMs,
    socketTimeout: timeoutMs,
    name: "airkeep.local",
  };
}

type SmtpError = Error & { code?: string; responseCode?: number; response?: string };

/** nodemailer's and Node's codes for a server that cannot be reached or talked to. */
const CONNECTION_ERRORS = new Set(["ECONNECTION", "ETIMEDOUT", "ESOCKET", "EDNS", "ETLS", "EPROTOCOL", "ECONNREFUSED", "ECONNRESET", "EHOSTUNREACH", "ENETUNREACH", "EPIPE"]);

/** "250 Message queued as 42" → "42"; other servers' replies are kept whole in serverResponse. */
export function serverMessageIdOf(response: string | undefined): string | null {
  if (!response) return null;
  const m = /queued as\s+<?([^\s>]+)>?/i.exec(response) ?? /\bid[=:]\s*<?([^\s>]+)>?/i.exec(response);
  return m ? m[1]! : null;
}

function compressorOf(db: Db, alarmId: number | null): number | null {
  if (alarmId === null) return null;
  return db.select({ c: alarms.compressorId }).from(alarms).where(eq(alarms.id, alarmId)).get()?.c ?? null;
}

export function startOutboxSender(opts: SenderOptions): OutboxSender {
  const { db } = opts;
  const log = opts.log ?? ((line: string) => console.log(`[mail] ${line}`));
  const token = `${process.pid}:${randomBytes(6).toString("hex")}`;
  const transport = nodemailer.createTransport(smtpTransportOptions(opts.smtpUrl, opts.sendTimeoutMs));
  let timer: NodeJS.Timeout | null = null;
  let running: Promise<{ sent: number; failed: number }> | null = null;
  let again = false;
  let closed = false;
  let serverDown = false;
  // From this time on a row deferred for connection trouble may be tried before its own back-off ends (0: at once,
  // so a sender restarted during an outage finds out soon whether the server is back).
  let probeAt = 0;
  const probeMs = opts.probeMs ?? 2000;

  const event = (row: MailOutboxRow, action: string, text: string, details: Record<string, unknown> = {}) =>
    appendEvent(db, {
      kind: "mail",
      action,
      text,
      priority: row.priority,
      siteId: row.siteId,
      alarmId: row.alarmId,
      compressorId: compressorOf(db, row.alarmId),
      actor: "mail",
      details: { key: row.key, messageId: row.messageId, outboxId: row.id, attempts: row.attempts, ...details },
    });

  function settleStale(now: number) {
    for (const row of staleClaims(db, now - opts.claimTimeoutMs)) {
      const known = opts.acceptedProbe?.(row.messageId) ?? null;
      if (known) {
        if (settleStaleClaim(db, row, now, { sent: true, serverMessageId: known.serverMessageId, note: "recovered: the server already holds this Message-ID" })) {
          event(row, "mail.sent", `E-mail to ${row.toName} <${row.toAddress}> found delivered after an interrupted send: ${row.subject}`, {
            recovered: true,
          });
        }
      } else if (
        settleStaleClaim(db, row, now, {
          sent: false,
          note: "A send was interrupted; whether the server took it is unknown. Sending again with the same Message-ID.",
        })
      ) {
        event(row, "mail.resend", `E-mail to ${row.toName} <${row.toAddress}> will be sent again after an interrupted send: ${row.subject}`);
      }
    }
  }

  async function sendOne(row: MailOutboxRow): Promise<"sent" | "rejected" | "unreachable" | "lost-claim"> {
    try {
      const info = (await transport.sendMail({
        from: opts.from,
        to: { name: row.toName, address: row.toAddress },
        subject: row.subject,
        text: row.text,
        html: row.html,
        messageId: row.messageId,
        headers: { "X-Airkeep-Key": row.key, "Auto-Submitted": "auto-generated" },
      })) as SMTPTransport.SentMessageInfo;
      const now = Date.now();
      const ok = markOutboxSent(db, row.id, token, now, { serverMessageId: serverMessageIdOf(info.response), serverResponse: info.response ?? null });
      if (!ok) {
        log(`row ${row.id} was sent but its claim was settled meanwhile (send took longer than the claim timeout)`);
        return "lost-claim";
      }
      event(row, "mail.sent", `E-mail delivered to the mail server for ${row.toName} <${row.toAddress}>: ${row.subject}`, {
        serverMessageId: serverMessageIdOf(info.response),
      });
      return "sent";
    } catch (e) {
      const err = e as SmtpError;
      const now = Date.now();
      const answered = typeof err.responseCode === "number";
      // The server never answered: the message itself is not at fault (never given up; released when the server is back).
      const connection = !answered && err.response === undefined && (err.code === undefined || CONNECTION_ERRORS.has(err.code));
      // A 5xx refusal, or a fault of the message itself found before sending (e.g. EENVELOPE): given up in the end.
      const rejected = answered ? err.responseCode! >= 500 : !connection;
      const giveUp = rejected && row.attempts >= opts.maxRejections;
      const delay = retryDelayMs(row.attempts, opts.retryBaseMs, opts.retryMaxMs, opts.jitter ?? 0.1);
      const message = `${err.code ?? "ERROR"}${err.responseCode ? ` ${err.responseCode}` : ""}: ${err.message}`;
      markOutboxFailed(db, row.id, token, now, {
        status: giveUp ? "failed" : "pending",
        nextAttemptAt: now + delay,
        error: message,
        // Only rows without a server response count as deferred for connection trouble (db/mail.ts).
        serverResponse: err.response ?? (connection ? null : message),
      });
      if (giveUp) {
        event(row, "mail.failed", `E-mail to ${row.toName} <${row.toAddress}> refused by the mail server, given up after ${row.attempts} attempts: ${row.subject}`, {
          error: message,
        });
      } else if (row.attempts === 1) {
        event(row, "mail.deferred", `E-mail to ${row.toName} <${row.toAddress}> not delivered yet, will retry: ${row.subject}`, { error: message });
      }
      return rejected ? "rejected" : "unreachable";
    }
  }

  async function pass(): Promise<{ sent: number; failed: number }> {
    const result = { sent: 0, failed: 0 };
    settleStale(Date.now());
    while (!closed) {
      const now = Date.now();
      const row = claimNextOutbox(db, now, token, { probe: now >= probeAt });
      if (!row) break;
      const outcome = await sendOne(row);
      if (outcome === "sent") {
        result.sent++;
        if (serverDown) log("mail server reachable again");
        serverDown = false;
        const released = releaseDeferredOutbox(db, Date.now());
        if (released) log(`${released} message(s) waiting out their back-off released: the server takes mail again`);
      } else if (outcome === "unreachable") {
        result.failed++;
        if (!serverDown) log(`mail server ${new URL(opts.smtpUrl).host} unreachable; mail stays queued and is retried with backoff`);
        serverDown = true;
        probeAt = Date.now() + probeMs;
        break; // the next due rows would fail the same way: wait for the next poll
      } else if (outcome === "rejected") result.failed++;
    }
    return result;
  }

  function runOnce(): Promise<{ sent: number; failed: number }> {
    if (running) {
      again = true;
      return running;
    }
    running = (async () => {
      try {
        let total = { sent: 0, failed: 0 };
        do {
          again = false;
          const r = await pass();
          total = { sent: total.sent + r.sent, failed: total.failed + r.failed };
        } while (again && !closed && !serverDown);
        return total;
      } catch (e) {
        log(`sender pass failed: ${(e as Error).message}`);
        return { sent: 0, failed: 0 };
      } finally {
        running = null;
      }
    })();
    return running;
  }

  function schedule() {
    if (closed) return;
    timer = setTimeout(async () => {
      await runOnce();
      schedule();
    }, opts.pollMs);
  }
  schedule();

  return {
    kick() {
      if (!closed) void runOnce();
    },
    runOnce,
    async close() {
      closed = true;
      if (timer) clearTimeout(timer);
      await running;
      transport.close();
    },
  };
}
