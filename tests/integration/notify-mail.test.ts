import { and, eq } from "drizzle-orm";
import { openDatabase } from "@/db/client";
import { afterAll, afterEach, beforeEach, describe, expect, it } from "vitest";
import { mailOutbox, mailReceived, alarms, events, notifyThreads } from "@/db/schema";
import { mailboxProbe, type OutboxSender } from "@/lib/mail/outbox";
import { startSmtpFake, type SmtpFake } from "@/lib/mail/smtp-fake";
import { notifyTick } from "@/lib/notify/notifier";
import { cautions, SAFETY_NOTICE } from "@/shared/safety";
import { escapeHtml } from "@/shared/notify-text";
import { MIN, acknowledge, clearAlarm, openWorld, raiseAlarm, setLastData, tempDir, testConfig, testSender, type World } from "./notify-fixtures";

// The notifier against a real SQLite file and the real SMTP fake on an ephemeral loopback port.

const tmp = tempDir("airkeep-notify-");
let n = 0;
let w: World;
let fake: SmtpFake;
let sender: OutboxSender;
const cfg = testConfig();
// Monday 2 June 2025, 10:00 UTC (11:00 BST in London).
const t0 = Date.UTC(2025, 5, 2, 10, 0, 0);

beforeEach(async () => {
  w = openWorld(tmp.file(`notify-${++n}.db`), t0);
  fake = await startSmtpFake({ db: w.db, port: 0, log: () => {} });
  sender = testSender(w.db, fake.url, { acceptedProbe: mailboxProbe(w.db) });
});

afterEach(async () => {
  await sender.close();
  await fake.close();
  w.db.$client.close();
});

afterAll(() => tmp.remove());

const received = () => w.db.select().from(mailReceived).orderBy(mailReceived.id).all();
const receivedBy = (address: string) => received().filter((m) => m.envelopeTo.includes(address));
const outbox = () => w.db.select().from(mailOutbox).orderBy(mailOutbox.id).all();

describe("a raised alarm", () => {
  it("reaches the on-call contact through the SMTP fake with what, where, value, limit, age, link and the safety notice", async () => {
    setLastData(w.db, w.mb1, t0 - 12_000);
    const id = raiseAlarm(w.db, { compressorId: w.mb1, siteId: w.london, raisedAt: t0 - 45_000, value: 212.4, limitValue: 200 });
    const report = notifyTick(w.db, cfg, t0);
    expect(report.queued).toBe(2); // the on-call contact and the watch-room copy
    const result = await sender.runOnce();
    expect(result.sent).toBe(2);

    const [mail] = receivedBy("olive@airkeep.demo");
    expect(mail).toBeDefined();
    expect(mail!.subject).toBe("[Critical] MB-1 Main, Marrow Bay Fire Station: Final-stage temperature high");
    expect(mail!.text).toContain("212 °C, above the critical limit of 200 °C");
    expect(mail!.text).toContain("Marrow Bay Fire Station");
    expect(mail!.text).toContain("2025-06-02 10:59:15 BST, 45 s before this message was written");
    expect(mail!.text).toContain("Latest data:");
    expect(mail!.text).toContain("(12 s old when this was written)");
    expect(mail!.text).toContain(`https://airkeep.example.org/alarms?id=${id}`);
    expect(mail!.text).toContain(SAFETY_NOTICE);
    expect(mail!.text).toContain(cautions.hotStage);
    expect(mail!.html).toContain(`href="https://airkeep.example.org/alarms?id=${id}"`);
    expect(mail!.html).toContain(escapeHtml(SAFETY_NOTICE));
    expect(mail!.html).toContain(escapeHtml(cautions.hotStage));
    expect(mail!.fromText).toContain("alarms@airkeep.demo");

    // The Message-ID is the one derived from the row's idempotency key, and the row carries the fake's id.
    const row = outbox().find((r) => r.toAddress === "olive@airkeep.demo")!;
    expect(row.key).toBe(`alarm:${id}:raise:0:to:${w.onCall}`);
    expect(mail!.messageId).toBe(row.messageId);
    expect(row.status).toBe("sent");
    expect(row.serverMessageId).toBe(String(mail!.id));

    // The alarm row shows it was notified; the event log records the queueing and the delivery.
    expect(w.db.select().from(alarms).where(eq(alarms.id, id)).get()!.notifiedAt).toBe(t0);
    const mailEvents = w.db.select().from(events).where(eq(events.kind, "mail")).all();
    expect(mailEvents.filter((e) => e.action === "mail.queue" && e.alarmId === id)).toHaveLength(2);
    expect(mailEvents.filter((e) => e.action === "mail.sent" && e.alarmId === id)).toHaveLength(2);
  });

  it("shows values in the recipient's own units when the contact is linked to an account", async () => {
    const id = raiseAlarm(w.db, {
      compressorId: w.mb1,
      siteId: w.london,
      raisedAt: t0,
      key: "deliveryBar.high.critical",
      signal: "deliveryBar",
      value: 430,
      limitValue: 420,
    });
    notifyTick(w.db, cfg, t0);
    notifyTick(w.db, cfg, t0 + 16 * MIN); // escalates to the second contact, who prefers psi
    await sender.runOnce();
    const [mail] = receivedBy("sebastian@airkeep.demo");
    // 430 bar = 6237 psi, 420 bar = 6092 psi (1 psi = 6 894.757 Pa, NIST SP 811 B.8).
    expect(mail!.text).toContain("6237 psi, above the critical limit of 6092 psi");
    expect(mail!.text).toContain(cautions.cylinderFill);
    expect(mail!.subject).toMatch(/^\[Critical\] Escalated, not acknowledged MB-1 Main/);
    expect(mail!.text).toContain(`alarms?id=${id}`);
  });
});

describe("escalation", () => {
  it("goes to the next in the chain when nobody acknowledges, and stops once someone does", async () => {
    const x = raiseAlarm(w.db, { compressorId: w.mb1, siteId: w.london, raisedAt: t0 });
    notifyTick(w.db, cfg, t0);
    notifyTick(w.db, cfg, t0 + 14 * MIN); // not yet
    expect(outbox().filter((r) => r.kind === "escalation")).toHaveLength(0);

    const r = notifyTick(w.db, cfg, t0 + 15 * MIN);
    expect(r.escalations).toBe(1);
    const esc = outbox().filter((o) => o.kind === "escalation");
    expect(esc.map((o) => o.key)).toEqual([`alarm:${x}:raise:1:to:${w.second}`]);
    expect(w.db.select().from(alarms).where(eq(alarms.id, x)).get()!.escalationLevel).toBe(1);

    acknowledge(w.db, x, t0 + 20 * MIN);
    for (const t of [30, 45, 60, 120]) notifyTick(w.db, cfg, t0 + t * MIN);
    expect(outbox().filter((o) => o.alarmId === x)).toHaveLength(3); // first notice + copy + one escalation

    await sender.runOnce();
    expect(receivedBy("olive@airkeep.demo")).toHaveLength(1);
    expect(receivedBy("sebastian@airkeep.demo")).toHaveLength(1);
    expect(receivedBy("sebastian@airkeep.demo")[0]!.text).toContain("Olive On-Call, Watch Room were told first");
  });

  it("never escalates an alarm acknowledged in time, and sends the all-clear to everyone told", async () => {
    const y = raiseAlarm(w.db, { compressorId: w.mb1, siteId: w.london, raisedAt: t0 });
    notifyTick(w.db, cfg, t0);
    acknowledge(w.db, y, t0 + 5 * MIN);
    notifyTick(w.db, cfg, t0 + 16 * MIN);
    notifyTick(w.db, cfg, t0 + 40 * MIN);
    expect(outbox().filter((o) => o.kind === "escalation")).toHaveLength(0);

    clearAlarm(w.db, y, t0 + 50 * MIN);
    notifyTick(w.db, cfg, t0 + 50 * MIN);
    notifyTick(w.db, cfg, t0 + 51 * MIN);
    const resolved = outbox().filter((o) => o.kind === "resolved");
    expect(resolved.map((o) => o.toAddress).sort()).toEqual(["olive@airkeep.demo", "watch@airkeep.demo"]);
    await sender.runOnce();
    const clear = receivedBy("olive@airkeep.demo").find((m) => m.subject.startsWith("[Cleared]"));
    expect(clear!.subject).toBe("[Cleared] Critical MB-1 Main, Marrow Bay Fire Station: Final-stage temperature high");
    expect(clear!.text).toContain("back to normal");
    expect(clear!.text).toContain("Acknowledged:");
    expect(clear!.text).toContain(SAFETY_NOTICE);
  });

  it("does not notify shelved alarms, nor those older than the look-back", () => {
    raiseAlarm(w.db, { compressorId: w.mb1, siteId: w.london, raisedAt: t0, state: "shelved" });
    raiseAlarm(w.db, { compressorId: w.mb1, siteId: w.london, raisedAt: t0 - 2 * 24 * 60 * MIN });
    expect(notifyTick(w.db, cfg, t0).queued).toBe(0);
  });

  it("announces a re-alarm to everyone told and restarts the wait", () => {
    const z = raiseAlarm(w.db, { compressorId: w.hr1, siteId: w.oslo, raisedAt: t0 });
    notifyTick(w.db, cfg, t0);
    acknowledge(w.db, z, t0 + 2 * MIN);
    notifyTick(w.db, cfg, t0 + 3 * MIN);
    const reAlarm = t0 + 4 * 60 * MIN;
    w.db.update(alarms).set({ state: "active-unacknowledged", reAlarmedAt: reAlarm }).where(eq(alarms.id, z)).run();
    notifyTick(w.db, cfg, reAlarm + 1000);
    notifyTick(w.db, cfg, reAlarm + 2000);
    expect(outbox().filter((o) => o.kind === "re-alarm").map((o) => o.toAddress)).toEqual(["oda@airkeep.demo"]);
    notifyTick(w.db, cfg, reAlarm + 16 * MIN);
    expect(outbox().filter((o) => o.kind === "escalation").map((o) => o.toAddress)).toEqual(["sebastian@airkeep.demo"]);
  });

  it("pauses while shelved, and when shelving ends announces the alarm again and restarts the wait", () => {
    const s1 = raiseAlarm(w.db, { compressorId: w.hr1, siteId: w.oslo, raisedAt: t0 });
    notifyTick(w.db, cfg, t0);
    w.db.update(alarms).set({ state: "shelved", shelvedUntil: t0 + 8 * 60 * MIN }).where(eq(alarms.id, s1)).run();
    notifyTick(w.db, cfg, t0 + 5 * MIN);
    notifyTick(w.db, cfg, t0 + 4 * 60 * MIN); // long past the first wait: nothing while shelved
    expect(outbox().filter((o) => o.alarmId === s1).map((o) => o.kind)).toEqual(["raise"]);

    const unshelved = t0 + 8 * 60 * MIN;
    w.db.update(alarms).set({ state: "active-unacknowledged", shelvedUntil: null }).where(eq(alarms.id, s1)).run();
    notifyTick(w.db, cfg, unshelved);
    notifyTick(w.db, cfg, unshelved + MIN);
    expect(outbox().filter((o) => o.alarmId === s1).map((o) => [o.kind, o.toAddress])).toEqual([
      ["raise", "oda@airkeep.demo"],
      ["re-alarm", "oda@airkeep.demo"],
    ]);
    notifyTick(w.db, cfg, unshelved + 15 * MIN);
    expect(outbox().filter((o) => o.alarmId === s1 && o.kind === "escalation").map((o) => o.toAddress)).toEqual(["sebastian@airkeep.demo"]);
  });

  it("a cleared alarm the engine re-activates (same row, new raise time) is a new occurrence with its own notices", () => {
    const r1 = raiseAlarm(w.db, { compressorId: w.hr1, siteId: w.oslo, raisedAt: t0 });
    notifyTick(w.db, cfg, t0);
    clearAlarm(w.db, r1, t0 + 3 * MIN);
    notifyTick(w.db, cfg, t0 + 3 * MIN);
    const back = t0 + 7 * MIN;
    w.db.update(alarms).set({ state: "active-unacknowledged", active: true, clearedAt: null, raisedAt: back }).where(eq(alarms.id, r1)).run();
    notifyTick(w.db, cfg, back + 1000);
    notifyTick(w.db, cfg, back + 2000);
    expect(outbox().filter((o) => o.alarmId === r1).map((o) => o.key)).toEqual([
      `alarm:${r1}:raise:0:to:${w.osloOnCall}`,
      `alarm:${r1}:resolved:to:${w.osloOnCall}`,
      `alarm:${r1}@${back}:raise:0:to:${w.osloOnCall}`,
    ]);
    notifyTick(w.db, cfg, back + 16 * MIN);
    expect(outbox().filter((o) => o.alarmId === r1).map((o) => o.key).at(-1)).toBe(`alarm:${r1}@${back}:raise:1:to:${w.second}`);
  });

  it("an alarm announced afresh with an old raise time, twice, gets a thread each time without stalling the notifier", () => {
    const r2 = raiseAlarm(w.db, { compressorId: w.hr1, siteId: w.oslo, raisedAt: t0 });
    notifyTick(w.db, cfg, t0);
    for (const k of [1, 2]) {
      clearAlarm(w.db, r2, t0 + k * 10 * MIN);
      notifyTick(w.db, cfg, t0 + k * 10 * MIN);
      // e.g. shelved while cleared, the condition returned while shelved, shelving ended: raised_at is the old one.
      w.db.update(alarms).set({ state: "active-unacknowledged", active: true, clearedAt: null }).where(eq(alarms.id, r2)).run();
      notifyTick(w.db, cfg, t0 + k * 10 * MIN + 1000);
    }
    expect(w.db.select().from(notifyThreads).all().map((t) => t.key)).toEqual([`alarm:${r2}`, `alarm:${r2}@${t0}`, `alarm:${r2}@${t0}#2`]);
    expect(outbox().filter((o) => o.alarmId === r2 && o.kind === "raise")).toHaveLength(3);
  });

  it("records an event when nobody matches", () => {
    raiseAlarm(w.db, { compressorId: w.hr1, siteId: w.oslo, raisedAt: t0, priority: "advisory", key: "intakeC.high.advisory", signal: "intakeC" });
    expect(notifyTick(w.db, cfg, t0).queued).toBe(0);
    const e = w.db.select().from(events).where(eq(events.action, "mail.no_recipient")).all();
    expect(e).toHaveLength(1);
    expect(e[0]!.text).toContain("Heronfold Ridge Fire Station");
  });
});

describe("restart safety", () => {
  it("a restarted notifier queues nothing twice, and every message arrives once", async () => {
    const ids = [0, 1, 2].map((i) => raiseAlarm(w.db, { compressorId: w.mb1, siteId: w.london, raisedAt: t0 + i * 1000 }));
    notifyTick(w.db, cfg, t0 + 5000);
    const before = outbox().length;

    // Restart: the process (notifier, sender and fake) goes away and a fresh one runs the same passes again.
    const file = w.db.$client.name;
    const port = fake.port;
    await sender.close();
    await fake.close();
    w.db.$client.close();
    w = { ...w, db: openDatabase(file) };
    fake = await startSmtpFake({ db: w.db, port, log: () => {} });
    for (const t of [5000, 6000, 7000]) notifyTick(w.db, cfg, t0 + t);
    expect(outbox().length).toBe(before);
    expect(w.db.select().from(notifyThreads).all()).toHaveLength(3);

    sender = testSender(w.db, fake.url);
    await sender.runOnce();
    await sender.runOnce();
    const got = received();
    expect(got).toHaveLength(before);
    expect(new Set(got.map((m) => m.messageId)).size).toBe(before);
    expect(got.every((m) => m.duplicateOf === null)).toBe(true);
    for (const id of ids) expect(got.filter((m) => m.text.includes(`alarms?id=${id}\n`)).length).toBeGreaterThan(0);
  });
});

describe("two notifiers on one database", () => {
  it("queue each notice once", () => {
    const other = openDatabase(w.db.$client.name);
    try {
      for (let i = 0; i < 4; i++) raiseAlarm(w.db, { compressorId: i % 2 ? w.hr1 : w.mb1, siteId: i % 2 ? w.oslo : w.london, raisedAt: t0 + i * 1000 });
      for (const t of [5, 6, 7]) {
        notifyTick(w.db, cfg, t0 + t * 1000);
        notifyTick(other, cfg, t0 + t * 1000);
      }
      notifyTick(other, cfg, t0 + 16 * MIN);
      notifyTick(w.db, cfg, t0 + 16 * MIN);
      const rows = outbox();
      expect(new Set(rows.map((r) => r.key)).size).toBe(rows.length);
      expect(rows.filter((r) => r.kind === "raise")).toHaveLength(6); // 4 on-call + 2 copies at Marrow Bay
      expect(rows.filter((r) => r.kind === "escalation")).toHaveLength(4);
    } finally {
      other.$client.close();
    }
  });
});

describe("digest", () => {
  it("sends one digest instead of a storm when more than the threshold are raised at one site in the window", async () => {
    // Five alarms over five minutes: each is sent on its own.
    const single = [0, 1, 2, 3, 4].map((i) => {
      const id = raiseAlarm(w.db, { compressorId: w.mb1, siteId: w.london, raisedAt: t0 + i * MIN, priority: "warning" });
      notifyTick(w.db, cfg, t0 + i * MIN + 1000);
      return id;
    });
    expect(outbox().filter((o) => o.kind === "raise")).toHaveLength(5);

    // The sixth inside ten minutes: a digest.
    const sixth = raiseAlarm(w.db, { compressorId: w.mb1, siteId: w.london, raisedAt: t0 + 6 * MIN, priority: "warning" });
    const r = notifyTick(w.db, cfg, t0 + 6 * MIN + 1000);
    expect(r.digests).toBe(1);
    const digests = outbox().filter((o) => o.kind === "digest");
    expect(digests).toHaveLength(1);
    expect(digests[0]!.toAddress).toBe("olive@airkeep.demo");
    expect(digests[0]!.key).toMatch(new RegExp(`^digest:${w.london}:\\d+:raise:0:to:${w.onCall}$`));

    // More during the window are held, then go out together in the next digest; a critical one is never held.
    const held = [7, 8].map((m) => raiseAlarm(w.db, { compressorId: w.mb1, siteId: w.london, raisedAt: t0 + m * MIN, priority: "warning" }));
    const urgent = raiseAlarm(w.db, { compressorId: w.mb1, siteId: w.london, raisedAt: t0 + 8 * MIN + 30_000, priority: "critical" });
    notifyTick(w.db, cfg, t0 + 9 * MIN);
    expect(outbox().filter((o) => o.kind === "digest")).toHaveLength(1);
    expect(outbox().filter((o) => o.alarmId === urgent && o.kind === "raise").map((o) => o.toAddress).sort()).toEqual(["olive@airkeep.demo", "watch@airkeep.demo"]);
    notifyTick(w.db, cfg, t0 + 16 * MIN + 2000);
    const second = outbox().filter((o) => o.kind === "digest").slice(1);
    expect(second.map((o) => o.toAddress)).toEqual(["olive@airkeep.demo"]); // warnings: the watch-room copy is for critical only

    // The storm is over: the next alarm, well after, is sent on its own again.
    const later = raiseAlarm(w.db, { compressorId: w.mb1, siteId: w.london, raisedAt: t0 + 40 * MIN, priority: "warning" });
    notifyTick(w.db, cfg, t0 + 40 * MIN + 1000);
    expect(outbox().filter((o) => o.alarmId === later && o.kind === "raise")).toHaveLength(1);

    await sender.runOnce();
    const first = received().find((m) => m.subject === "[Warning] 1 alarm at Marrow Bay Fire Station (many alarms in 10 min)");
    expect(first).toBeDefined();
    expect(first!.text).toContain(`alarms?id=${sixth}`);
    expect(first!.text).toContain("Already sent one by one in the same period:");
    expect(first!.text).toContain(SAFETY_NOTICE);
    for (const id of single) expect(first!.text).not.toContain(`alarms?id=${id}\n`);
    const next = received().find((m) => m.subject.startsWith("[Warning] 2 alarms at Marrow Bay Fire Station") && m.envelopeTo.includes("olive@airkeep.demo"));
    for (const id of held) expect(next!.text).toContain(`alarms?id=${id}`);
    expect(next!.text).not.toContain(`alarms?id=${urgent}\n`);
  });

  it("a burst at one site becomes one message per recipient, and the digest escalates and clears as a whole", async () => {
    const burst = Array.from({ length: 7 }, (_, i) => raiseAlarm(w.db, { compressorId: w.hr1, siteId: w.oslo, raisedAt: t0 + i * 1000 }));
    notifyTick(w.db, cfg, t0 + 10_000);
    expect(outbox().map((o) => [o.kind, o.toAddress])).toEqual([["digest", "oda@airkeep.demo"]]);

    notifyTick(w.db, cfg, t0 + 10_000 + 15 * MIN);
    expect(outbox().filter((o) => o.kind === "digest-escalation").map((o) => o.toAddress)).toEqual(["sebastian@airkeep.demo"]);

    for (const id of burst) clearAlarm(w.db, id, t0 + 30 * MIN);
    notifyTick(w.db, cfg, t0 + 31 * MIN);
    expect(outbox().filter((o) => o.kind === "digest-resolved").map((o) => o.toAddress).sort()).toEqual(["oda@airkeep.demo", "sebastian@airkeep.demo"]);

    await sender.runOnce();
    const digest = received().find((m) => m.subject === "[Critical] 7 alarms at Heronfold Ridge Fire Station (many alarms in 10 min)");
    expect(digest).toBeDefined();
    for (const id of burst) expect(digest!.text).toContain(`alarms?id=${id}`);
    expect(digest!.text).toContain(cautions.hotStage);
    expect(received().filter((m) => m.envelopeTo.includes("oda@airkeep.demo"))).toHaveLength(2);
    expect(w.db.select().from(mailOutbox).where(and(eq(mailOutbox.status, "sent"))).all()).toHaveLength(4);
  });

  it("alarms that notify nobody neither open a digest nor hold a critical alarm back", async () => {
    // Heronfold Ridge has no rule for advisory alarms: a burst of them reaches nobody and is no storm.
    const quiet = Array.from({ length: 7 }, (_, i) =>
      raiseAlarm(w.db, { compressorId: w.hr1, siteId: w.oslo, raisedAt: t0 + i * 1000, priority: "advisory", key: `adv.${i}`, signal: "intakeC" }),
    );
    const r = notifyTick(w.db, cfg, t0 + 10_000);
    expect(r.digests).toBe(0);
    expect(w.db.select().from(notifyThreads).where(eq(notifyThreads.kind, "digest")).all()).toHaveLength(0);
    expect(w.db.select().from(events).where(eq(events.action, "mail.no_recipient")).all()).toHaveLength(quiet.length);

    // A critical alarm right after goes out on its own in the next pass, not held for a digest window.
    const critical = raiseAlarm(w.db, { compressorId: w.hr1, siteId: w.oslo, raisedAt: t0 + 20_000, priority: "critical" });
    notifyTick(w.db, cfg, t0 + 21_000);
    expect(outbox().filter((o) => o.alarmId === critical).map((o) => [o.kind, o.toAddress])).toEqual([["raise", "oda@airkeep.demo"]]);
    await sender.runOnce();
    expect(receivedBy("oda@airkeep.demo").map((m) => m.subject)).toEqual(["[Critical] HR-1 Bay compressor, Heronfold Ridge Fire Station: Final-stage temperature high"]);
  });
});
