import { randomBytes } from "node:crypto";
import { and, count, desc, eq, lt, not, or, sql } from "drizzle-orm";
import type { MailboxItemDto, MailboxMessageDto, MailboxPage, MailboxQuery, OutboxItemDto, OutboxStatus, OutboxSummary } from "@/shared/notify-mailbox";
import type { Db } from "./client";
import { mailOutbox, mailReceived, settings, type MailOutboxRow, type MailReceivedRow } from "./schema";

// The mail outbox (one row per message and recipient, keyed for idempotency) and the SMTP fake's mailbox.

// ---- This database's mail instance id (part of every Message-ID, so a reset database never reuses one) ----

const INSTANCE_KEY = "mail.instance_id";

export function mailInstanceId(db: Db): string {
  const existing = db.select({ value: settings.value }).from(settings).where(eq(settings.key, INSTANCE_KEY)).get();
  if (existing) return existing.value;
  db.insert(settings)
    .values({ key: INSTANCE_KEY, value: randomBytes(6).toString("hex"), updatedAt: Date.now() })
    .onConflictDoNothing()
    .run();
  return db.select({ value: settings.value }).from(settings).where(eq(settings.key, INSTANCE_KEY)).get()!.value;
}

// ---- Outbox -----------------------------------------------------------------------------------------

export type NewOutboxRow = Omit<
  typeof mailOutbox.$inferInsert,
  "id" | "status" | "attempts" | "claimToken" | "claimedAt" | "sentAt" | "serverMessageId" | "serverResponse" | "lastError" | "updatedAt"
>;

/** Inserts unless a row with the same key exists; `inserted` tells which. */
export function insertOutbox(db: Db, row: NewOutboxRow): { id: number; inserted: boolean } {
  const created = db
    .insert(mailOutbox)
    .values({ ...row, status: "pending", attempts: 0, updatedAt: row.createdAt })
    .onConflictDoNothing({ target: mailOutbox.key })
    .returning({ id: mailOutbox.id })
    .get();
  if (created) return { id: created.id, inserted: true };
  const existing = db.select({ id: mailOutbox.id }).from(mailOutbox).where(eq(mailOutbox.key, row.key)).get();
  return { id: existing!.id, inserted: false };
}

export function outboxByKey(db: Db, key: string): MailOutboxRow | null {
  return db.select().from(mailOutbox).where(eq(mailOutbox.key, key)).get() ?? null;
}

const priorityOrder = sql`CASE ${mailOutbox.priority} WHEN 'critical' THEN 0 WHEN 'warning' THEN 1 WHEN 'advisory' THEN 2 ELSE 3 END`;

/**
 * A later mail of a notice thread (escalation, re-alarm, all-clear) waits while a first notice of the same thread is
 * still unsettled (first notices are the kinds "raise" and "digest"), so the next in the chain never hears before the person told first. Only pending/sending rows are
 * looked at, through the status index.
 */
const heldBehindFirstNotice = sql`(${mailOutbox.threadId} IS NOT NULL AND ${mailOutbox.kind} NOT IN ('raise', 'digest') AND EXISTS (
  SELECT 1 FROM mail_outbox AS f
  WHERE f.status IN ('pending', 'sending') AND f.thread_id = ${mailOutbox.threadId} AND f.kind IN ('raise', 'digest')))`;

/**
 * Rows put back for connection trouble: the server never answered, so nothing about the message itself is wrong
 * (a 4xx/5xx refusal stores the server's reply in server_response).
 */
const deferredForConnection = sql`(${mailOutbox.serverResponse} IS NULL AND ${mailOutbox.lastError} IS NOT NULL)`;

/**
 * Claims the most urgent due row for sending: pending → sending, with this sender's token and one more attempt.
 * A single UPDATE, so two senders never claim the same row. `probe`: a row deferred for connection trouble may be
 * taken before its own back-off ends (to find out whether the server is back).
 */
export function claimNextOutbox(db: Db, now: number, token: string, opts: { probe?: boolean } = {}): MailOutboxRow | null {
  const due = opts.probe ? or(sql`${mailOutbox.nextAttemptAt} <= ${now}`, deferredForConnection) : sql`${mailOutbox.nextAttemptAt} <= ${now}`;
  const row = db
    .select({ id: mailOutbox.id })
    .from(mailOutbox)
    .where(and(eq(mailOutbox.status, "pending"), due, not(heldBehindFirstNotice)))
    .orderBy(priorityOrder, mailOutbox.nextAttemptAt, mailOutbox.id)
    .limit(1)
    .get();
  if (!row) return null;
  return (
    db
      .update(mailOutbox)
      .set({ status: "sending", claimToken: token, claimedAt: now, attempts: sql`${mailOutbox.attempts} + 1`, updatedAt: now })
      .where(and(eq(mailOutbox.id, row.id), eq(mailOutbox.status, "pending")))
      .returning()
      .get() ?? null
  );
}

/**
 * The server took a message: every row waiting out its own back-off for connection trouble is due again, back in
 * queue order (next attempt = when it was queued). Returns how many were released.
 */
export function releaseDeferredOutbox(db: Db, now: number): number {
  return db
    .update(mailOutbox)
    .set({ nextAttemptAt: mailOutbox.createdAt, updatedAt: now })
    .where(and(eq(mailOutbox.status, "pending"), sql`${mailOutbox.nextAttemptAt} > ${now}`, deferredForConnection))
    .run().changes;
}

/** sending → sent, only while the claim is still this sender's. */
export function markOutboxSent(
  db: Db,
  id: number,
  token: string,
  now: number,
  server: { serverMessageId: string | null; serverResponse: string | null },
): boolean {
  const r = db
    .update(mailOutbox)
    .set({ status: "sent", sentAt: now, ...server, lastError: null, claimToken: null, updatedAt: now })
    .where(and(eq(mailOutbox.id, id), eq(mailOutbox.status, "sending"), eq(mailOutbox.claimToken, token)))
    .run();
  return r.changes === 1;
}

/** sending → pending (try again at nextAttemptAt) or failed (given up), only while the claim is this sender's. */
export function markOutboxFailed(
  db: Db,
  id: number,
  token: string,
  now: number,
  outcome: { status: "pending" | "failed"; nextAttemptAt: number; error: string; serverResponse?: string | null },
): boolean {
  const r = db
    .update(mailOutbox)
    .set({
      status: outcome.status,
      nextAttemptAt: outcome.nextAttemptAt,
      lastError: outcome.error.slice(0, 1000),
      serverResponse: outcome.serverResponse ?? null,
      claimToken: null,
      claimedAt: null,
      updatedAt: now,
    })
    .where(and(eq(mailOutbox.id, id), eq(mailOutbox.status, "sending"), eq(mailOutbox.claimToken, token)))
    .run();
  return r.changes === 1;
}

/** Rows left in "sending" longer than a send can take: their sender died between claiming and marking. */
export function staleClaims(db: Db, claimedBefore: number): MailOutboxRow[] {
  return db
    .select()
    .from(mailOutbox)
    .where(and(eq(mailOutbox.status, "sending"), lt(mailOutbox.claimedAt, claimedBefore)))
    .all();
}

/** Settles a stale claim: sent (the server is known to have it) or pending again. Only if still the same claim. */
export function settleStaleClaim(
  db: Db,
  row: Pick<MailOutboxRow, "id" | "claimToken">,
  now: number,
  outcome: { sent: true; serverMessageId: string | null; note: string } | { sent: false; note: string },
): boolean {
  const where = and(
    eq(mailOutbox.id, row.id),
    eq(mailOutbox.status, "sending"),
    row.claimToken === null ? sql`${mailOutbox.claimToken} IS NULL` : eq(mailOutbox.claimToken, row.claimToken),
  );
  const set = outcome.sent
    ? { status: "sent" as const, sentAt: now, serverMessageId: outcome.serverMessageId, serverResponse: outcome.note, claimToken: null, updatedAt: now }
    : { status: "pending" as const, nextAttemptAt: now, lastError: outcome.note, claimToken: null, claimedAt: null, updatedAt: now };
  return db.update(mailOutbox).set(set).where(where).run().changes === 1;
}

export function outboxRow(db: Db, id: number): MailOutboxRow | null {
  return db.select().from(mailOutbox).where(eq(mailOutbox.id, id)).get() ?? null;
}

function outboxDto(r: MailOutboxRow): OutboxItemDto {
  return {
    id: r.id,
    key: r.key,
    kind: r.kind,
    priority: r.priority,
    alarmId: r.alarmId,
    toAddress: r.toAddress,
    toName: r.toName,
    subject: r.subject,
    messageId: r.messageId,
    status: r.status,
    attempts: r.attempts,
    nextAttemptAt: r.nextAttemptAt,
    sentAt: r.sentAt,
    serverMessageId: r.serverMessageId,
    lastError: r.lastError,
    createdAt: r.createdAt,
  };
}

/** The newest rows (unsent ones first) and a count per status. */
export function outboxSummary(db: Db, limit = 200): OutboxSummary {
  const items = db
    .select()
    .from(mailOutbox)
    .orderBy(sql`CASE ${mailOutbox.status} WHEN 'sent' THEN 1 ELSE 0 END`, desc(mailOutbox.id))
    .limit(limit)
    .all()
    .map(outboxDto);
  const counts: Record<OutboxStatus, number> = { pending: 0, sending: 0, sent: 0, failed: 0 };
  for (const r of db.select({ status: mailOutbox.status, n: count() }).from(mailOutbox).groupBy(mailOutbox.status).all()) counts[r.status] = r.n;
  return { items, counts };
}

// ---- Received mail (the SMTP fake) -------------------------------------------------------------------

export type NewReceivedMail = Omit<typeof mailReceived.$inferInsert, "id" | "duplicateOf">;

/** Stores a received message; a repeated Message-ID is kept too, marked as a duplicate of the first. */
export function insertReceived(db: Db, mail: NewReceivedMail): MailReceivedRow {
  return db.transaction(() => {
    const first = mail.messageId
      ? db
          .select({ id: mailReceived.id })
          .from(mailReceived)
          .where(eq(mailReceived.messageId, mail.messageId))
          .orderBy(mailReceived.id)
          .limit(1)
          .get()
      : undefined;
    return db
      .insert(mailReceived)
      .values({ ...mail, duplicateOf: first?.id ?? null })
      .returning()
      .get();
  }, { behavior: "immediate" });
}

export function receivedByMessageId(db: Db, messageId: string): MailReceivedRow[] {
  return db.select().from(mailReceived).where(eq(mailReceived.messageId, messageId)).orderBy(mailReceived.id).all();
}

const itemColumns = {
  id: mailReceived.id,
  receivedAt: mailReceived.receivedAt,
  messageId: mailReceived.messageId,
  duplicateOf: mailReceived.duplicateOf,
  from: mailReceived.fromText,
  to: mailReceived.toText,
  subject: mailReceived.subject,
  size: mailReceived.size,
};

export function listMailbox(db: Db, query: MailboxQuery): MailboxPage {
  const q = query.q.trim();
  const pattern = `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
  const where = q
    ? or(
        sql`${mailReceived.subject} LIKE ${pattern} ESCAPE '\\'`,
        sql`${mailReceived.toText} LIKE ${pattern} ESCAPE '\\'`,
        sql`${mailReceived.text} LIKE ${pattern} ESCAPE '\\'`,
      )
    : undefined;
  const items: MailboxItemDto[] = db
    .select(itemColumns)
    .from(mailReceived)
    .where(where)
    .orderBy(desc(mailReceived.id))
    .limit(query.limit)
    .offset(query.offset)
    .all();
  const total = db.select({ n: count() }).from(mailReceived).where(where).get()?.n ?? 0;
  return { items, total };
}

export function getMailboxMessage(db: Db, id: number): MailboxMessageDto | null {
  const r = db.select().from(mailReceived).where(eq(mailReceived.id, id)).get();
  if (!r) return null;
  return {
    id: r.id,
    receivedAt: r.receivedAt,
    messageId: r.messageId,
    duplicateOf: r.duplicateOf,
    from: r.fromText,
    to: r.toText,
    subject: r.subject,
    size: r.size,
    envelopeFrom: r.envelopeFrom,
    envelopeTo: r.envelopeTo,
    text: r.text,
    html: r.html,
    headers: r.headers,
  };
}
