import { afterAll, afterEach, beforeEach, describe, expect, it } from "vitest";
import { mailOutbox, mailReceived } from "@/db/schema";
import { mailboxProbe, type OutboxSender } from "@/lib/mail/outbox";
import { startSmtpFake, type SmtpFake } from "@/lib/mail/smtp-fake";
import { notifyTick } from "@/lib/notify/notifier";
import { openWorld, raiseAlarm, tempDir, testConfig, testSender, waitFor, type World } from "./notify-fixtures";

// A mail-server outage with the notifier, the outbox sender and the real SMTP fake, on the wall clock: first notices
// must not sit out their own back-off once the server is back, and no escalation may overtake its first notice.

const tmp = tempDir("airkeep-outage-");
let n = 0;
let w: World;
let sender: OutboxSender | null = null;
let fake: SmtpFake | null = null;
// Escalation after 0.3 s so the outage can outlast the wait.
const cfg = testConfig({ escalateAfterMs: 300 });

beforeEach(() => {
  w = openWorld(tmp.file(`outage-${++n}.db`), Date.now());
});

afterEach(async () => {
  await sender?.close();
  await fake?.close();
  sender = null;
  fake = null;
  w.db.$client.close();
});

afterAll(() => tmp.remove());

const outbox = () => w.db.select().from(mailOutbox).orderBy(mailOutbox.id).all();
const received = () => w.db.select().from(mailReceived).orderBy(mailReceived.id).all();
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function closedPort(): Promise<number> {
  const probe = await startSmtpFake({ db: w.db, port: 0, log: () => {} });
  await probe.close();
  return probe.port;
}

describe("after a mail-server outage", () => {
  it("first notices go as soon as the server is back, before the escalations queued during the outage", async () => {
    const port = await closedPort();
    // Each row's own back-off is long (a minute) so that waiting it out would be plain to see.
    sender = testSender(w.db, `smtp://127.0.0.1:${port}`, { pollMs: 50, retryBaseMs: 60_000, retryMaxMs: 120_000, probeMs: 150, acceptedProbe: mailboxProbe(w.db) });

    // Two alarms while the server is down: first notices to the on-call contact (and the critical copy).
    const alarmIds = [w.mb1, w.hr1].map((c, i) => raiseAlarm(w.db, { compressorId: c, siteId: i ? w.oslo : w.london, raisedAt: Date.now() }));
    notifyTick(w.db, cfg, Date.now());
    sender.kick();
    await waitFor(() => outbox().every((r) => r.attempts >= 1 && r.status === "pending"), 5_000, "the first attempts to fail");
    const firstNotices = outbox().filter((r) => r.kind === "raise");
    expect(firstNotices).toHaveLength(3);

    // Nobody acknowledges (nobody got the mail): the escalations are queued during the outage, due at once.
    await sleep(cfg.escalateAfterMs + 50);
    const tick = notifyTick(w.db, cfg, Date.now());
    expect(tick.escalations).toBe(2);
    sender.kick();
    await sleep(400); // several polls and probes against the closed port
    const escalations = outbox().filter((r) => r.kind === "escalation");
    expect(escalations).toHaveLength(2);
    // Held behind their first notices: never even tried while those are unsettled.
    expect(escalations.every((r) => r.attempts === 0 && r.status === "pending")).toBe(true);
    // The first notices were probed again ahead of their one-minute back-off.
    expect(outbox().filter((r) => r.kind === "raise").some((r) => r.attempts >= 2)).toBe(true);

    // The server returns. Each first notice's own back-off would end a minute or more from now.
    const backoffEnds = new Map(outbox().filter((r) => r.kind === "raise").map((r) => [r.id, r.nextAttemptAt]));
    expect(Math.min(...backoffEnds.values()) - Date.now()).toBeGreaterThan(30_000);
    const upAt = Date.now();
    fake = await startSmtpFake({ db: w.db, port, log: () => {} });
    await waitFor(() => outbox().every((r) => r.status === "sent"), 15_000, "every message to be delivered");

    const rows = outbox();
    for (const r of rows.filter((x) => x.kind === "raise")) expect(r.sentAt!).toBeLessThan(backoffEnds.get(r.id)!);
    const lastFirstNotice = Math.max(...rows.filter((r) => r.kind === "raise").map((r) => r.sentAt!));
    console.log(`[outage] last first notice delivered ${((lastFirstNotice - upAt) / 1000).toFixed(2)} s after the server returned (probe every 0.15 s)`);
    const got = received();
    expect(got).toHaveLength(5);
    // Per alarm, the escalation arrives after every first notice of that alarm.
    for (const id of alarmIds) {
      const ids = new Set(rows.filter((r) => r.alarmId === id).map((r) => r.messageId));
      const kinds = got.filter((m) => ids.has(m.messageId!)).map((m) => rows.find((r) => r.messageId === m.messageId)!.kind);
      expect(kinds.at(-1)).toBe("escalation");
      expect(kinds.indexOf("escalation")).toBe(kinds.length - 1);
    }
  });

  it("an escalation waits while its first notice is retried after a refusal, and goes once that notice has finally failed", async () => {
    fake = await startSmtpFake({ db: w.db, port: 0, log: () => {} });
    sender = testSender(w.db, fake.url, { retryBaseMs: 60_000, retryMaxMs: 120_000, maxRejections: 2 });
    const id = raiseAlarm(w.db, { compressorId: w.hr1, siteId: w.oslo, raisedAt: Date.now() });
    notifyTick(w.db, cfg, Date.now());
    // The first notice was refused once (a 5xx reply) and waits out its back-off.
    const first = outbox().find((r) => r.alarmId === id && r.kind === "raise")!;
    w.db.$client
      .prepare("UPDATE mail_outbox SET attempts = 1, next_attempt_at = ?, last_error = 'EENVELOPE 550: no such mailbox', server_response = '550 no such mailbox' WHERE id = ?")
      .run(Date.now() + 60_000, first.id);
    await sleep(cfg.escalateAfterMs + 50);
    notifyTick(w.db, cfg, Date.now());
    await sender.runOnce();
    expect(received()).toHaveLength(0);
    expect(outbox().find((r) => r.kind === "escalation")!.status).toBe("pending");

    // Given up: the escalation may go now.
    w.db.$client.prepare("UPDATE mail_outbox SET status = 'failed' WHERE id = ?").run(first.id);
    await sender.runOnce();
    expect(received().map((m) => m.envelopeTo)).toEqual([["sebastian@airkeep.demo"]]);
  });
});
