import { eq } from "drizzle-orm";
import { afterAll, afterEach, beforeEach, describe, expect, it } from "vitest";
import { acknowledgeAlarms } from "@/db/alarms";
import { alarms, compressors, mailOutbox, mailReceived, thresholdLimits, thresholdSets, users } from "@/db/schema";
import { createAlarmEngine, type AlarmEngine } from "@/db/alarm-engine";
import type { OutboxSender } from "@/lib/mail/outbox";
import { startSmtpFake, type SmtpFake } from "@/lib/mail/smtp-fake";
import { notifyTick } from "@/lib/notify/notifier";
import { SAFETY_NOTICE } from "@/shared/safety";
import { runStateCode, type ReadingInput } from "@/shared/telemetry";
import { MIN, openWorld, tempDir, testConfig, testSender, type World } from "./notify-fixtures";

// The whole path with the real alarm engine: readings → engine writes the alarm row → notifier → outbox → SMTP fake;
// an acknowledgement through the alarms' own db function stops the escalation; the return to normal sends the all-clear.

const tmp = tempDir("airkeep-notify-engine-");
const cfg = testConfig();
const t0 = Date.UTC(2025, 5, 2, 10, 0, 0);
let n = 0;
let w: World;
let fake: SmtpFake;
let sender: OutboxSender;
let engine: AlarmEngine;
const clock = { now: t0 };

beforeEach(async () => {
  w = openWorld(tmp.file(`engine-${++n}.db`), t0 - 86_400_000);
  const modelId = w.db.select({ m: compressors.modelId }).from(compressors).where(eq(compressors.id, w.mb1)).get()!.m;
  w.db.insert(thresholdLimits)
    .values({ scopeType: "model", scopeId: modelId, signal: "finalStageC", direction: "high", priority: "critical", value: 200, deadband: 5, updatedAt: t0 })
    .run();
  w.db.insert(thresholdSets).values({ scopeType: "model", scopeId: modelId, version: 1, updatedAt: t0 }).run();
  engine = createAlarmEngine(w.db, { settings: { settlingS: 0, reAlarmS: 0, chatterCount: 3, chatterWindowS: 60 }, now: () => clock.now, log: () => {} });
  fake = await startSmtpFake({ db: w.db, port: 0, log: () => {} });
  sender = testSender(w.db, fake.url);
});

afterEach(async () => {
  await sender.close();
  await fake.close();
  w.db.$client.close();
});
afterAll(() => tmp.remove());

let seq = 0;
function reading(ts: number, finalC: number): ReadingInput {
  return {
    compressorId: w.mb1,
    ts,
    seq: seq++,
    deliveryBar: 380,
    stage1Bar: null,
    stage2Bar: null,
    stage3Bar: null,
    stage4Bar: null,
    stage1C: 110,
    stage2C: 120,
    stage3C: 130,
    stage4C: finalC,
    oilBar: 3.5,
    purifierC: 25,
    intakeC: 18,
    runState: runStateCode.running,
    motorOn: 1,
    hourMeterH: 1000,
    starts: 100,
    tripCode: null,
  };
}

describe("with the alarm engine", () => {
  it("a hot final stage becomes an e-mail; acknowledging stops escalation; the return to normal sends the all-clear", async () => {
    for (let s = 0; s <= 60; s += 10) engine.onReadings([reading(t0 + s * 1000, 150)], t0 + s * 1000 + 200);
    clock.now = t0 + 70_000;
    engine.onReadings([reading(t0 + 70_000, 212.4)], t0 + 70_200);
    const row = w.db.select().from(alarms).get();
    expect(row).toMatchObject({ key: "finalStageC.high.critical", state: "active-unacknowledged" });

    notifyTick(w.db, cfg, t0 + 75_000);
    await sender.runOnce();
    const first = w.db.select().from(mailReceived).all().find((m) => m.envelopeTo.includes("olive@airkeep.demo"))!;
    expect(first.subject).toBe("[Critical] MB-1 Main, Marrow Bay Fire Station: Final-stage temperature high");
    expect(first.text).toContain("212 °C, above the critical limit of 200 °C");
    expect(first.text).toContain(`https://airkeep.example.org/alarms?id=${row!.id}`);
    expect(first.text).toContain(SAFETY_NOTICE);

    const supervisor = w.db
      .insert(users)
      .values({ email: "sup@example.org", name: "Sam Okafor", passwordHash: "x", role: "supervisor", createdAt: t0, updatedAt: t0 })
      .returning()
      .get();
    const acked = acknowledgeAlarms(w.db, { ids: [row!.id], comment: "Cooler fan restarted", siteIds: null, userId: supervisor.id, actor: supervisor.email, now: t0 + 5 * MIN });
    expect(acked.done).toEqual([row!.id]);
    notifyTick(w.db, cfg, t0 + 20 * MIN);
    notifyTick(w.db, cfg, t0 + 40 * MIN);
    expect(w.db.select().from(mailOutbox).all().filter((o) => o.kind === "escalation")).toHaveLength(0);

    clock.now = t0 + 41 * MIN;
    engine.onReadings([reading(t0 + 41 * MIN, 150)], t0 + 41 * MIN + 200);
    expect(w.db.select().from(alarms).get()!.state).toBe("normal");
    notifyTick(w.db, cfg, t0 + 42 * MIN);
    await sender.runOnce();
    const clear = w.db.select().from(mailReceived).all().find((m) => m.envelopeTo.includes("olive@airkeep.demo") && m.subject.startsWith("[Cleared]"))!;
    expect(clear.text).toContain("Sam Okafor: “Cooler fan restarted”");
    expect(clear.text).toContain("back to normal");
    expect(w.db.select().from(alarms).get()!.notifiedAt).toBe(t0 + 75_000);
  });
});
