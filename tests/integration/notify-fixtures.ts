import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { and, eq, ne } from "drizzle-orm";
import { openDatabase, type Db } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { alarms, compressorModels, compressors, compressorState, contacts, notificationRules, onCallEntries, sites, users } from "@/db/schema";
import { startOutboxSender, type OutboxSender, type SenderOptions } from "@/lib/mail/outbox";
import type { NotifyConfig } from "@/lib/notify/config";
import type { Priority } from "@/shared/alarm-rules";
import type { AlarmState } from "@/shared/alarm-lifecycle";

// A small world for the notifier tests: two sites, a compressor each, three contacts, a rota and rules.

export const MIN = 60_000;

export function tempDir(prefix: string): { dir: string; file: (name: string) => string; remove: () => void } {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), prefix));
  return { dir, file: (name) => path.join(dir, name), remove: () => fs.rmSync(dir, { recursive: true, force: true }) };
}

export function testConfig(over: Partial<NotifyConfig> = {}): NotifyConfig {
  return {
    escalateAfterMs: 15 * MIN,
    digestThreshold: 5,
    digestWindowMs: 10 * MIN,
    lookbackMs: 24 * 60 * MIN,
    pollMs: 100,
    baseUrl: "https://airkeep.example.org",
    from: "Airkeep <alarms@airkeep.demo>",
    ...over,
  };
}

/** An outbox sender for the tests: no polling of its own (call runOnce), short retries, no jitter, quiet. */
export function testSender(db: Db, smtpUrl: string, over: Partial<SenderOptions> = {}): OutboxSender {
  return startOutboxSender({
    db,
    smtpUrl,
    from: testConfig().from,
    pollMs: 60_000,
    retryBaseMs: 20,
    retryMaxMs: 100,
    maxRejections: 3,
    claimTimeoutMs: 60_000,
    sendTimeoutMs: 5_000,
    jitter: 0,
    log: () => {},
    ...over,
  });
}

export type World = {
  db: Db;
  london: number;
  oslo: number;
  mb1: number;
  hr1: number;
  onCall: number;
  second: number;
  copy: number;
  osloOnCall: number;
};

export function openWorld(file: string, now: number): World {
  const db = openDatabase(file);
  runMigrations(db);
  const london = db.insert(sites).values({ name: "Marrow Bay Fire Station", code: "marrow-bay", timeZone: "Europe/London", createdAt: now }).returning().get().id;
  const oslo = db.insert(sites).values({ name: "Heronfold Ridge Fire Station", code: "heronfold-ridge", timeZone: "Europe/Oslo", createdAt: now }).returning().get().id;
  const model = db
    .insert(compressorModels)
    .values({ name: "Fulmar 450", stages: 4, ratedDeliveryLpm: 450, ratedPressureBar: 420, createdAt: now })
    .returning()
    .get().id;
  const comp = (siteId: number, name: string, deviceId: string) =>
    db
      .insert(compressors)
      .values({ siteId, modelId: model, name, serial: `SN-${deviceId}`, deviceId, stopPressureBar: 414, restartPressureBar: 370, createdAt: now, updatedAt: now })
      .returning()
      .get().id;
  const mb1 = comp(london, "MB-1 Main", "mb-main");
  const hr1 = comp(oslo, "HR-1 Bay compressor", "hr-bay");
  const psiUser = db
    .insert(users)
    .values({ email: "second@example.org", name: "Second Person", passwordHash: "x", role: "technician", pressureUnit: "psi", createdAt: now, updatedAt: now })
    .returning()
    .get().id;
  const contact = (name: string, email: string, userId: number | null = null) =>
    db.insert(contacts).values({ name, email, userId, createdAt: now, updatedAt: now }).returning().get().id;
  const onCall = contact("Olive On-Call", "olive@airkeep.demo");
  const second = contact("Sebastian Second", "sebastian@airkeep.demo", psiUser);
  const copy = contact("Watch Room", "watch@airkeep.demo");
  const osloOnCall = contact("Oda Oslo", "oda@airkeep.demo");
  const everyDay = [1, 2, 3, 4, 5, 6, 7];
  db.insert(onCallEntries).values({ siteId: london, contactId: onCall, position: 0, weekdays: everyDay, startTime: "00:00", endTime: "00:00", createdAt: now, updatedAt: now }).run();
  db.insert(onCallEntries).values({ siteId: oslo, contactId: osloOnCall, position: 0, weekdays: everyDay, startTime: "00:00", endTime: "00:00", createdAt: now, updatedAt: now }).run();
  const rule = (v: Partial<typeof notificationRules.$inferInsert>) =>
    db.insert(notificationRules).values({ minPriority: "warning", target: "on-call", mode: "chain", position: 0, createdAt: now, updatedAt: now, ...v }).run();
  rule({ siteId: null, minPriority: "warning", target: "on-call", position: 0 });
  rule({ siteId: null, minPriority: "critical", target: "contact", contactId: second, position: 10 });
  rule({ siteId: london, minPriority: "critical", target: "contact", contactId: copy, mode: "copy", position: 0 });
  for (const [id, at] of [
    [mb1, now],
    [hr1, now],
  ] as const)
    db.insert(compressorState).values({ compressorId: id, online: true, lastSeenAt: at, receivedAt: at, ts: at, updatedAt: at }).run();
  return { db, london, oslo, mb1, hr1, onCall, second, copy, osloOnCall };
}

export function setLastData(db: Db, compressorId: number, at: number) {
  db.update(compressorState).set({ receivedAt: at, lastSeenAt: at, ts: at, updatedAt: at }).where(eq(compressorState.compressorId, compressorId)).run();
}

const SIGNALS = ["finalStageC", "stage1C", "stage2C", "stage3C", "stage4C", "purifierC", "intakeC", "oilBar", "deliveryBar"];

/** The first limit key of this priority not open on the compressor (the engine keeps one open row per key). */
function freeKey(db: Db, compressorId: number, priority: Priority): { key: string; signal: string } {
  const open = new Set(
    db
      .select({ key: alarms.key })
      .from(alarms)
      .where(and(eq(alarms.compressorId, compressorId), ne(alarms.state, "normal")))
      .all()
      .map((r) => r.key),
  );
  for (const direction of ["high", "low"])
    for (const signal of SIGNALS) {
      const key = `${signal}.${direction}.${priority}`;
      if (!open.has(key)) return { key, signal };
    }
  throw new Error("no free alarm key");
}

/** Writes an alarm row as the engine would. */
export function raiseAlarm(
  db: Db,
  a: {
    compressorId: number;
    siteId: number;
    raisedAt: number;
    priority?: Priority;
    key?: string;
    signal?: string | null;
    value?: number | null;
    limitValue?: number | null;
    tripCode?: number | null;
    state?: AlarmState;
  },
): number {
  const priority = a.priority ?? "critical";
  const free = a.key ? { key: a.key, signal: a.signal ?? null } : freeKey(db, a.compressorId, priority);
  return db
    .insert(alarms)
    .values({
      compressorId: a.compressorId,
      siteId: a.siteId,
      key: free.key,
      priority,
      signal: a.signal === undefined ? free.signal : a.signal,
      state: a.state ?? "active-unacknowledged",
      active: true,
      raisedAt: a.raisedAt,
      value: a.value === undefined ? 212.4 : a.value,
      limitValue: a.limitValue === undefined ? 200 : a.limitValue,
      tripCode: a.tripCode ?? null,
      updatedAt: a.raisedAt,
    })
    .returning()
    .get().id;
}

export function acknowledge(db: Db, id: number, at: number, by: number | null = null) {
  const row = db.select().from(alarms).where(eq(alarms.id, id)).get()!;
  db.update(alarms)
    .set({ state: row.active ? "active-acknowledged" : "normal", ackAt: at, ackBy: by, ackComment: "Checked the cooler", updatedAt: at })
    .where(eq(alarms.id, id))
    .run();
}

export function clearAlarm(db: Db, id: number, at: number) {
  const row = db.select().from(alarms).where(eq(alarms.id, id)).get()!;
  db.update(alarms)
    .set({ active: false, clearedAt: at, state: row.state === "active-acknowledged" ? "normal" : "cleared-unacknowledged", updatedAt: at })
    .where(eq(alarms.id, id))
    .run();
}

/** Polls `check` until it returns true (or fails after `ms`). */
export async function waitFor(check: () => boolean | Promise<boolean>, ms = 10_000, what = "condition"): Promise<void> {
  const until = Date.now() + ms;
  while (Date.now() < until) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 25));
  }
  throw new Error(`timed out waiting for ${what}`);
}
