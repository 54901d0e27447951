import { and, desc, eq, gt, gte, inArray, isNotNull, isNull, notInArray, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { appendEvent } from "@/db/events";
import { alarms, notifyAlarms, notifyThreads, type NotifyThreadRow } from "@/db/schema";
import { enqueueMail, type NewMail } from "@/lib/mail/outbox";
import { priorities, type Priority } from "@/shared/alarm-rules";
import { isStorm, nextInChain, type Recipient } from "@/shared/notify-routing";
import {
  composeAlarmMail,
  composeDigestMail,
  highestPriority,
  priorityWord,
  type AlarmMailKind,
  type ComposedMail,
  type DigestMailKind,
  type MailContext,
} from "@/shared/notify-text";
import type { NotifyConfig } from "./config";
import { loadNoticeAlarms, loadRoutingContext, routingFor, type NoticeRow, type RoutingContext } from "./data";

// The notifier: polls the alarms table (written by the alarm engine) and decides who is e-mailed, queueing each
// message in the outbox. All its state is in the database (notify_threads, notify_alarms, the outbox's unique keys),
// and each pass is one IMMEDIATE transaction, so a restart — or a second notifier on the same database — neither
// loses nor repeats a notice.
//
// - First notice: an alarm that needs an operator (active-unacknowledged or cleared-unacknowledged) goes to the first
//   of its escalation chain and to its copies (shared/notify-routing.ts). Shelved, suppressed and out-of-service
//   alarms are not notified; they are picked up if they become annunciated again.
// - Escalation: while an alarm stays active-unacknowledged, after the chain member's wait (the rule's, or
//   ESCALATE_AFTER_MIN) the next contact in the chain not yet told is e-mailed. Acknowledging, shelving, suppression
//   or taking it out of service pauses it; clearing ends it. With nobody left, the notifier looks again after another
//   wait (the rota may have turned over).
// - Announced again: when the alarm becomes unacknowledged again (the engine's re-alarm, or shelving ended) everyone
//   told so far is e-mailed again and the wait starts afresh.
// - All-clear: once the condition has cleared, everyone told gets a "cleared" notice. If the engine later re-activates
//   the same row (new raise time), that is a new occurrence with its own thread "alarm:<id>@<raisedAt>".
// - Digest: when more than DIGEST_THRESHOLD alarms were raised at one site inside DIGEST_WINDOW_MIN (or more than that
//   many wait at once), new alarms there go into one digest mail instead of one mail each, and further alarms are
//   held for at most one window, then sent as the next digest. A digest escalates and clears as a whole. Critical
//   alarms are never held (one raised while a window is open is e-mailed on its own at once), and alarms that notify
//   nobody neither count toward a storm nor join a digest.
//
// Idempotency keys of the mails: "<thread>:raise:<level>:to:<contact>" (level 0 = first notice),
// "<thread>:again:<marker>:to:<contact>", "<thread>:resolved:to:<contact>"; threads are "alarm:<id>" or
// "digest:<siteId>:<windowStart>".

export type TickReport = { queued: number; threads: number; digests: number; escalations: number; resolved: number };

type Pending = { id: number; raisedAt: number; again: boolean };

const NOTIFIABLE = ["active-unacknowledged", "cleared-unacknowledged"] as const;
const NOT_COUNTED = ["shelved", "suppressed", "out-of-service"] as const;

const isCleared = (a: NoticeRow) => !a.active && (a.state === "normal" || a.state === "cleared-unacknowledged");

/** One pass of the notifier at `now`. */
export function notifyTick(db: Db, cfg: NotifyConfig, now = Date.now(), log: (line: string) => void = (l) => console.error(`[notifier] ${l}`)): TickReport {
  return db.transaction(() => new Pass(db, cfg, now, log).run(), { behavior: "immediate" });
}

class Pass {
  private readonly report: TickReport = { queued: 0, threads: 0, digests: 0, escalations: 0, resolved: 0 };
  /** Threads opened in this pass: their first notice already says everything known now. */
  private readonly opened = new Set<number>();
  private ctxCache: RoutingContext | null = null;

  constructor(
    private readonly db: Db,
    private readonly cfg: NotifyConfig,
    private readonly now: number,
    private readonly log: (line: string) => void,
  ) {}

  /** Runs one piece in a savepoint: a failure undoes that piece only, is logged, and the rest of the pass goes on. */
  private isolated(what: string, fn: () => void) {
    try {
      this.db.transaction(() => fn());
    } catch (e) {
      this.log(`${what} skipped this pass: ${(e as Error).message}`);
    }
  }

  private get ctx(): RoutingContext {
    this.ctxCache ??= loadRoutingContext(this.db);
    return this.ctxCache;
  }

  run(): TickReport {
    this.handleNewAlarms();
    this.followOpenThreads();
    return this.report;
  }

  // ---- Sending ---------------------------------------------------------------------------------------

  private mailContext(contactId: number): { ctx: MailContext; contact: { name: string; email: string } } | null {
    const c = this.ctx.contacts.get(contactId);
    if (!c || !c.active) return null;
    return { ctx: { now: this.now, baseUrl: this.cfg.baseUrl, units: c.units, recipientName: c.name }, contact: c };
  }

  /** Queues one message per contact; returns the contacts actually addressed. */
  private send(
    contactIds: readonly number[],
    keyFor: (contactId: number) => string,
    compose: (ctx: MailContext) => ComposedMail,
    meta: Omit<NewMail, "key" | "to" | "subject" | "text" | "html" | "contactId">,
  ): number[] {
    const addressed: number[] = [];
    for (const contactId of contactIds) {
      const m = this.mailContext(contactId);
      if (!m) continue;
      const mail = compose(m.ctx);
      const r = enqueueMail(
        this.db,
        { ...meta, key: keyFor(contactId), contactId, to: { name: m.contact.name, address: m.contact.email }, ...mail },
        { from: this.cfg.from, now: this.now },
      );
      if (r.inserted) this.report.queued++;
      addressed.push(contactId);
    }
    return addressed;
  }

  private alarmMail(a: NoticeRow, kind: AlarmMailKind, contactIds: readonly number[], key: (c: number) => string, thread: number, extra = {}) {
    return this.send(contactIds, key, (ctx) => composeAlarmMail(kind, a, ctx, extra), {
      kind,
      priority: a.priority,
      siteId: a.siteId,
      compressorId: a.compressorId,
      alarmId: a.id,
      threadId: thread,
      details: { alarmKind: kind },
    });
  }

  private names(ids: readonly number[]): string[] {
    return ids.map((id) => this.ctx.contacts.get(id)?.name).filter((n): n is string => Boolean(n));
  }

  private markNotified(alarmIds: readonly number[]) {
    if (!alarmIds.length) return;
    this.db
      .update(alarms)
      .set({ notifiedAt: sql`coalesce(${alarms.notifiedAt}, ${this.now})` })
      .where(inArray(alarms.id, [...alarmIds]))
      .run();
  }

  /** The key itself, or with "#2", "#3"… if a thread already has it (an alarm announced afresh with an old raise time). */
  private freeThreadKey(key: string): string {
    const taken = (k: string) => this.db.select({ id: notifyThreads.id }).from(notifyThreads).where(eq(notifyThreads.key, k)).get() !== undefined;
    if (!taken(key)) return key;
    let n = 2;
    while (taken(`${key}#${n}`)) n++;
    return `${key}#${n}`;
  }

  private createThread(wanted: string, kind: "alarm" | "digest", siteId: number, priority: Priority, memberIds: readonly number[], windowEnd: number | null) {
    const key = this.freeThreadKey(wanted);
    const thread = this.db
      .insert(notifyThreads)
      .values({
        key,
        kind,
        siteId,
        priority,
        windowStart: this.now,
        windowEnd,
        level: 0,
        lastStepAt: this.now,
        nextStepAt: this.now + this.cfg.escalateAfterMs,
        contactIds: [],
        createdAt: this.now,
        updatedAt: this.now,
      })
      .returning()
      .get();
    for (const alarmId of memberIds) {
      this.db
        .insert(notifyAlarms)
        .values({ alarmId, threadId: thread.id, siteId, handledAt: this.now })
        .onConflictDoUpdate({ target: notifyAlarms.alarmId, set: { threadId: thread.id, handledAt: this.now } })
        .run();
    }
    this.report.threads++;
    this.opened.add(thread.id);
    return thread;
  }

  private updateThread(id: number, set: Partial<typeof notifyThreads.$inferInsert>) {
    this.db.update(notifyThreads).set({ ...set, updatedAt: this.now }).where(eq(notifyThreads.id, id)).run();
  }

  private noRecipient(siteId: number, priority: Priority, what: string, alarmId: number | null, compressorId: number | null) {
    const site = this.ctx.sites.get(siteId)?.name ?? `site ${siteId}`;
    appendEvent(this.db, {
      ts: this.now,
      kind: "mail",
      action: "mail.no_recipient",
      text: `Nobody to e-mail about ${priorityWord[priority].toLowerCase()} ${what} at ${site}: no notification rule or on-call contact matches`,
      priority,
      siteId,
      alarmId,
      compressorId,
      actor: "notifier",
    });
  }

  // ---- New alarms ------------------------------------------------------------------------------------

  private handleNewAlarms() {
    const recent = gte(alarms.raisedAt, this.now - this.cfg.lookbackMs);
    // Never handled, and needing an operator.
    const fresh = this.db
      .select({ id: alarms.id, siteId: alarms.siteId, raisedAt: alarms.raisedAt, again: sql<number>`0` })
      .from(alarms)
      .leftJoin(notifyAlarms, eq(notifyAlarms.alarmId, alarms.id))
      .where(and(isNull(notifyAlarms.alarmId), inArray(alarms.state, [...NOTIFIABLE]), recent))
      .all();
    // Handled before and finished (all-clear sent), but the engine re-activated the same row: a new occurrence.
    const again = this.db
      .select({ id: alarms.id, siteId: alarms.siteId, raisedAt: alarms.raisedAt, again: sql<number>`1` })
      .from(alarms)
      .innerJoin(notifyAlarms, eq(notifyAlarms.alarmId, alarms.id))
      .innerJoin(notifyThreads, eq(notifyThreads.id, notifyAlarms.threadId))
      .where(and(isNotNull(notifyThreads.resolvedAt), eq(alarms.state, "active-unacknowledged"), eq(alarms.active, true), recent))
      .all();
    const bySite = new Map<number, Pending[]>();
    for (const a of [...fresh, ...again].sort((x, y) => x.siteId - y.siteId || x.raisedAt - y.raisedAt || x.id - y.id)) {
      bySite.set(a.siteId, [...(bySite.get(a.siteId) ?? []), { id: a.id, raisedAt: a.raisedAt, again: a.again === 1 }]);
    }
    for (const [siteId, pending] of bySite) this.isolated(`new alarms at site ${siteId}`, () => this.handleSite(siteId, pending));
  }

  private handleSite(siteId: number, pending: Pending[]) {
    const window = this.cfg.digestWindowMs;
    const rows = loadNoticeAlarms(this.db, pending.map((p) => p.id));
    const members = pending.map((p) => rows.get(p.id)).filter((a): a is NoticeRow => a !== undefined);
    if (!members.length) return;
    const again = (a: NoticeRow) => pending.find((p) => p.id === a.id)?.again ?? false;

    // Alarms that notify nobody (no rule or rota matches their priority) never count toward a storm and never go into a
    // digest: each gets its own thread, which records "nobody to e-mail" and looks again later.
    const notifying = new Set(priorities.filter((p) => this.notifiesSomeone(siteId, p)));
    for (const a of members.filter((m) => !notifying.has(m.priority))) this.firstNotice(a, again(a));
    const told = members.filter((m) => notifying.has(m.priority));
    if (!told.length) return;

    const lastDigest = this.db
      .select()
      .from(notifyThreads)
      .where(and(eq(notifyThreads.siteId, siteId), eq(notifyThreads.kind, "digest")))
      .orderBy(desc(notifyThreads.windowStart))
      .limit(1)
      .get();
    // A digest window is open: hold new alarms for the next digest — except critical ones, which are never held.
    if (lastDigest?.windowEnd != null && lastDigest.windowEnd > this.now) {
      for (const a of told.filter((m) => m.priority === "critical")) this.firstNotice(a, again(a));
      return;
    }

    const recent =
      this.db
        .select({ n: sql<number>`count(*)` })
        .from(alarms)
        .where(
          and(
            eq(alarms.siteId, siteId),
            gt(alarms.raisedAt, this.now - window),
            notInArray(alarms.state, [...NOT_COUNTED]),
            inArray(alarms.priority, [...notifying]),
          ),
        )
        .get()?.n ?? 0;
    const held = lastDigest?.windowEnd != null && told.some((a) => a.raisedAt < lastDigest.windowEnd! && a.raisedAt >= lastDigest.windowStart - window);

    // A storm: many raised at the site lately, alarms held from the last digest, or many waiting at once (e.g. after
    // the notifier was stopped for a while). A digest opened now goes out at once, critical members included.
    const storm = isStorm(recent, this.cfg.digestThreshold) || isStorm(told.length, this.cfg.digestThreshold) || held;
    if (storm) this.openDigest(siteId, told);
    else for (const a of told) this.firstNotice(a, again(a));
  }

  private notifiesSomeone(siteId: number, priority: Priority): boolean {
    const r = routingFor(this.ctx, siteId, priority, this.now, this.cfg.escalateAfterMs);
    return r.chain.length + r.copies.length > 0;
  }

  private firstNotice(a: NoticeRow, again: boolean) {
    // The first occurrence of an alarm row is "alarm:<id>"; a re-activation of the same row gets its own thread.
    const thread = this.createThread(again ? `alarm:${a.id}@${a.raisedAt}` : `alarm:${a.id}`, "alarm", a.siteId, a.priority, [a.id], null);
    const key = thread.key;
    if (again) this.db.update(alarms).set({ escalationLevel: 0 }).where(eq(alarms.id, a.id)).run();
    const routing = routingFor(this.ctx, a.siteId, a.priority, this.now, this.cfg.escalateAfterMs);
    const first = routing.chain[0];
    const to = [...(first ? [first.contactId] : []), ...routing.copies.map((c) => c.contactId)];
    const told = this.alarmMail(a, "raise", to, (c) => `${key}:raise:0:to:${c}`, thread.id);
    this.updateThread(thread.id, {
      contactIds: told,
      nextStepAt: this.now + (first?.escalateAfterMs ?? this.cfg.escalateAfterMs),
      // Already cleared when first seen: the notice says so, no separate all-clear follows.
      resolvedAt: isCleared(a) ? this.now : null,
    });
    if (told.length) this.markNotified([a.id]);
    else this.noRecipient(a.siteId, a.priority, `alarm “${a.title}” on ${a.compressorName}`, a.id, a.compressorId);
  }

  private openDigest(siteId: number, members: NoticeRow[]) {
    const priority = highestPriority(members);
    const thread = this.createThread(`digest:${siteId}:${this.now}`, "digest", siteId, priority, members.map((m) => m.id), this.now + this.cfg.digestWindowMs);
    const key = thread.key;
    this.report.digests++;
    const routing = routingFor(this.ctx, siteId, priority, this.now, this.cfg.escalateAfterMs);
    const first = routing.chain[0];
    const to = [...(first ? [first.contactId] : []), ...routing.copies.map((c) => c.contactId)];
    const told = this.digestMail("digest", thread, members, to, (c) => `${key}:raise:0:to:${c}`);
    this.updateThread(thread.id, {
      contactIds: told,
      nextStepAt: this.now + (first?.escalateAfterMs ?? this.cfg.escalateAfterMs),
      resolvedAt: members.every(isCleared) ? this.now : null,
    });
    const site = this.ctx.sites.get(siteId);
    appendEvent(this.db, {
      ts: this.now,
      kind: "mail",
      action: "mail.digest",
      text: `${members.length} alarm${members.length === 1 ? "" : "s"} at ${site?.name ?? `site ${siteId}`} go into one digest e-mail instead of one e-mail each`,
      priority,
      siteId,
      actor: "notifier",
      details: { key, alarmIds: members.map((m) => m.id), threshold: this.cfg.digestThreshold, windowMin: this.cfg.digestWindowMs / 60_000 },
    });
    if (told.length) this.markNotified(members.map((m) => m.id));
    else this.noRecipient(siteId, priority, `digest of ${members.length} alarms`, null, null);
  }

  private digestMail(kind: DigestMailKind, thread: NotifyThreadRow, members: NoticeRow[], to: readonly number[], key: (c: number) => string, extra = {}) {
    const site = this.ctx.sites.get(thread.siteId);
    const alreadySent = kind === "digest" ? this.alreadySentAt(thread.siteId, members) : [];
    return this.send(
      to,
      key,
      (ctx) =>
        composeDigestMail(
          kind,
          {
            siteId: thread.siteId,
            siteName: site?.name ?? `Site ${thread.siteId}`,
            timeZone: site?.timeZone ?? "UTC",
            windowMin: Math.round(this.cfg.digestWindowMs / 60_000),
            alarms: members,
            alreadySent,
            ...extra,
          },
          ctx,
        ),
      {
        kind: kind === "digest-again" ? "re-alarm" : kind,
        priority: highestPriority(members),
        siteId: thread.siteId,
        threadId: thread.id,
        details: { alarmIds: members.map((m) => m.id) },
      },
    );
  }

  /** Alarms at the site inside the window that already went out one by one (context for a digest). */
  private alreadySentAt(siteId: number, members: NoticeRow[]): NoticeRow[] {
    const ids = this.db
      .select({ id: alarms.id })
      .from(alarms)
      .innerJoin(notifyAlarms, eq(notifyAlarms.alarmId, alarms.id))
      .innerJoin(notifyThreads, eq(notifyThreads.id, notifyAlarms.threadId))
      .where(and(eq(alarms.siteId, siteId), gt(alarms.raisedAt, this.now - this.cfg.digestWindowMs), eq(notifyThreads.kind, "alarm")))
      .all()
      .map((r) => r.id)
      .filter((id) => !members.some((m) => m.id === id));
    return [...loadNoticeAlarms(this.db, ids).values()];
  }

  // ---- Open threads: escalation, re-alarm, all-clear ----------------------------------------------------

  private followOpenThreads() {
    const open = this.db.select().from(notifyThreads).where(isNull(notifyThreads.resolvedAt)).all();
    for (const thread of open) {
      if (this.opened.has(thread.id)) continue;
      const memberIds = this.db
        .select({ id: notifyAlarms.alarmId })
        .from(notifyAlarms)
        .where(eq(notifyAlarms.threadId, thread.id))
        .all()
        .map((r) => r.id);
      const members = [...loadNoticeAlarms(this.db, memberIds).values()];
      if (!members.length) {
        this.updateThread(thread.id, { resolvedAt: this.now });
        continue;
      }
      this.isolated(`thread ${thread.key}`, () => (thread.kind === "alarm" ? this.followAlarm(thread, members[0]!) : this.followDigest(thread, members)));
    }
  }

  private escalationTarget(thread: NotifyThreadRow, priority: Priority): { next: Recipient | null; copies: Recipient[] } {
    const routing = routingFor(this.ctx, thread.siteId, priority, this.now, this.cfg.escalateAfterMs);
    return { next: nextInChain(routing.chain, new Set(thread.contactIds)), copies: routing.copies };
  }

  private followAlarm(thread: NotifyThreadRow, a: NoticeRow) {
    const key = thread.key;
    if (isCleared(a)) {
      const told = this.alarmMail(a, "resolved", thread.contactIds, (c) => `${key}:resolved:to:${c}`, thread.id);
      this.updateThread(thread.id, { resolvedAt: this.now });
      if (told.length) this.report.resolved++;
      return;
    }
    if (a.state !== "active-unacknowledged") {
      // Acknowledged, shelved, suppressed or out of service: escalation pauses.
      if (thread.nextStepAt !== null) this.updateThread(thread.id, { nextStepAt: null });
      return;
    }

    // Announced again (the engine's re-alarm after an acknowledgement, or shelving/suppression/out-of-service ended):
    // tell everyone told so far, and the wait for an acknowledgement starts afresh.
    const reAlarm = a.reAlarmedAt != null && a.reAlarmedAt > (thread.reAlarmSeenAt ?? thread.createdAt);
    const resumed = thread.nextStepAt === null;
    if ((reAlarm || resumed) && thread.contactIds.length) {
      const marker = reAlarm ? a.reAlarmedAt! : this.now;
      this.alarmMail(a, "re-alarm", thread.contactIds, (c) => `${key}:again:${marker}:to:${c}`, thread.id);
      this.updateThread(thread.id, {
        reAlarmSeenAt: a.reAlarmedAt ?? thread.reAlarmSeenAt,
        lastStepAt: this.now,
        nextStepAt: this.now + this.cfg.escalateAfterMs,
      });
      return;
    }

    const due = thread.nextStepAt === null || this.now >= thread.nextStepAt;
    if (!due) return;
    const { next, copies } = this.escalationTarget(thread, a.priority);
    if (!next) {
      // Nobody left in the chain: look again after another wait (the rota may have turned over).
      this.updateThread(thread.id, { nextStepAt: this.now + this.cfg.escalateAfterMs, reAlarmSeenAt: a.reAlarmedAt ?? thread.reAlarmSeenAt });
      return;
    }
    if (thread.contactIds.length === 0) {
      // Nobody was reachable at the raise (e.g. before a rota shift began): this is the first notice.
      const to = [next.contactId, ...copies.map((c) => c.contactId)];
      const told = this.alarmMail(a, "raise", to, (c) => `${key}:raise:0:to:${c}`, thread.id);
      this.updateThread(thread.id, { contactIds: told, lastStepAt: this.now, nextStepAt: this.now + next.escalateAfterMs });
      if (told.length) this.markNotified([a.id]);
      return;
    }
    const level = thread.level + 1;
    const told = this.alarmMail(a, "escalation", [next.contactId], (c) => `${key}:raise:${level}:to:${c}`, thread.id, {
      waitedMin: Math.round((this.now - thread.lastStepAt) / 60_000),
      toldBefore: this.names(thread.contactIds),
    });
    this.updateThread(thread.id, {
      level,
      contactIds: [...thread.contactIds, ...told],
      lastStepAt: this.now,
      nextStepAt: this.now + next.escalateAfterMs,
    });
    this.db.update(alarms).set({ escalationLevel: level }).where(eq(alarms.id, a.id)).run();
    this.report.escalations++;
  }

  private followDigest(thread: NotifyThreadRow, members: NoticeRow[]) {
    if (members.every(isCleared)) {
      const told = this.digestMail("digest-resolved", thread, members, thread.contactIds, (c) => `${thread.key}:resolved:to:${c}`);
      this.updateThread(thread.id, { resolvedAt: this.now });
      if (told.length) this.report.resolved++;
      return;
    }
    const unacked = members.filter((m) => m.state === "active-unacknowledged");
    if (!unacked.length) {
      if (thread.nextStepAt !== null) this.updateThread(thread.id, { nextStepAt: null });
      return;
    }
    if (thread.nextStepAt === null && thread.contactIds.length) {
      // Some member is announced again after everyone had been acknowledged: remind those told, restart the wait.
      this.digestMail("digest-again", thread, unacked, thread.contactIds, (c) => `${thread.key}:again:${this.now}:to:${c}`);
      this.updateThread(thread.id, { lastStepAt: this.now, nextStepAt: this.now + this.cfg.escalateAfterMs });
      return;
    }
    if (thread.nextStepAt !== null && this.now < thread.nextStepAt) return;
    const { next, copies } = this.escalationTarget(thread, highestPriority(unacked));
    if (!next) {
      this.updateThread(thread.id, { nextStepAt: this.now + this.cfg.escalateAfterMs });
      return;
    }
    if (thread.contactIds.length === 0) {
      const to = [next.contactId, ...copies.map((c) => c.contactId)];
      const told = this.digestMail("digest", thread, unacked, to, (c) => `${thread.key}:raise:0:to:${c}`);
      this.updateThread(thread.id, { contactIds: told, lastStepAt: this.now, nextStepAt: this.now + next.escalateAfterMs });
      if (told.length) this.markNotified(unacked.map((m) => m.id));
      return;
    }
    const level = thread.level + 1;
    const told = this.digestMail("digest-escalation", thread, unacked, [next.contactId], (c) => `${thread.key}:raise:${level}:to:${c}`, {
      waitedMin: Math.round((this.now - thread.lastStepAt) / 60_000),
      toldBefore: this.names(thread.contactIds),
    });
    this.updateThread(thread.id, {
      level,
      contactIds: [...thread.contactIds, ...told],
      lastStepAt: this.now,
      nextStepAt: this.now + next.escalateAfterMs,
    });
    this.db.update(alarms).set({ escalationLevel: level }).where(inArray(alarms.id, unacked.map((m) => m.id))).run();
    this.report.escalations++;
  }
}

// ---- The loop -----------------------------------------------------------------------------------------

export type Notifier = { tick(now?: number): TickReport; close(): void };

export function startNotifier(opts: {
  db: Db;
  config: NotifyConfig;
  /** Called after a pass that queued mail (e.g. to wake the outbox sender). */
  onQueued?: () => void;
  log?: (line: string) => void;
}): Notifier {
  const log = opts.log ?? ((line: string) => console.log(`[notifier] ${line}`));
  let closed = false;
  let failing = false;
  const tick = (now = Date.now()) => {
    const report = notifyTick(opts.db, opts.config, now, log);
    if (report.queued) opts.onQueued?.();
    if (report.queued || report.digests || report.escalations)
      log(`queued ${report.queued} e-mail(s): ${report.threads} new, ${report.digests} digest(s), ${report.escalations} escalation(s), ${report.resolved} all-clear(s)`);
    return report;
  };
  const timer = setInterval(() => {
    if (closed) return;
    try {
      tick();
      if (failing) log("notifier pass succeeded again");
      failing = false;
    } catch (e) {
      if (!failing) log(`notifier pass failed (retrying every ${opts.config.pollMs} ms): ${(e as Error).message}`);
      failing = true;
    }
  }, opts.config.pollMs);
  return {
    tick,
    close() {
      closed = true;
      clearInterval(timer);
    },
  };
}
