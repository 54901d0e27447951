import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openDatabase, type Db } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { buildMonthlyReportMail, dueMonthlyReports, reportRecipients } from "@/db/reports";
import { clearHistoryBackfill, markHistoryBackfill } from "@/db/history-backfill";
import { createReadingStore } from "@/db/readings";
import { queueMonthlyReportMails, recipientKey } from "@/lib/reports/monthly-mail";
import { SAFETY_NOTICE } from "@/shared/safety";

// Monthly report e-mails: which (site, month) reports are due shortly after the month ends in each site's own
// time zone, who gets them, what they say, and that queueing them twice queues nothing more.

let db: Db;

beforeAll(() => {
  db = openDatabase(":memory:");
  runMigrations(db);
  const s = db.$client;
  s.prepare("INSERT INTO sites (id, name, code, time_zone, created_at) VALUES (1, 'Kiwi Dive', 'kiwi', 'Pacific/Auckland', 0), (2, 'Coast Station', 'coast', 'America/Los_Angeles', 0), (3, 'Empty Site', 'empty', 'UTC', 0)").run();
  s.prepare("INSERT INTO compressor_models (id, name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES (1, 'M', 4, 300, 420, 0)").run();
  s.prepare(
    "INSERT INTO compressors (id, site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at) VALUES (1, 1, 1, 'K-1', 'S1', 'k1', 300, 270, 0, 0), (2, 2, 1, 'C-1', 'S2', 'c1', 300, 270, 0, 0)",
  ).run();
  const u = s.prepare("INSERT INTO users (id, email, name, password_hash, role, disabled, all_sites, created_at, updated_at) VALUES (?, ?, ?, 'x', ?, ?, ?, 0, 0)");
  u.run(1, "maya@example.test", "Maya", "manager", 0, 1); // every site
  u.run(2, "kai@example.test", "Kai", "manager", 0, 0); // only site 1
  u.run(3, "old@example.test", "Old", "manager", 1, 1); // disabled
  u.run(4, "eve@example.test", "Eve", "engineer", 0, 1); // not a manager
  u.run(5, "nil@example.test", "Nil", "manager", 0, 0); // limited to no site at all: gets none
  s.prepare("INSERT INTO user_sites (user_id, site_id) VALUES (2, 1)").run();
});

afterAll(() => db.$client.close());

describe("which monthly reports are due", () => {
  // March 2026 ends at 1 April 00:00 NZDT (UTC+13) = 31 March 11:00 UTC in Auckland, and at
  // 1 April 00:00 PDT (UTC−7) = 1 April 07:00 UTC in Los Angeles (tz database). Due 2 h later, for 7 days.
  it("follows each site's own month end", () => {
    expect(dueMonthlyReports(db, Date.UTC(2026, 2, 31, 12, 59))).toEqual([]);
    const at = Date.UTC(2026, 3, 1, 2);
    expect(dueMonthlyReports(db, at)).toEqual([
      { siteId: 1, siteName: "Kiwi Dive", timeZone: "Pacific/Auckland", month: "2026-03", monthEnd: Date.UTC(2026, 2, 31, 11), dueAt: Date.UTC(2026, 2, 31, 13), key: "report:1:2026-03" },
    ]);
    expect(dueMonthlyReports(db, Date.UTC(2026, 3, 1, 10)).map((d) => d.key)).toEqual(["report:1:2026-03", "report:2:2026-03"]);
    expect(dueMonthlyReports(db, Date.UTC(2026, 3, 8, 12))).toEqual([]);
  });

  it("goes to active managers whose sites include the site", () => {
    expect(reportRecipients(db, 1).map((r) => r.userId)).toEqual([1, 2]);
    expect(reportRecipients(db, 2).map((r) => r.userId)).toEqual([1]);
  });
});

describe("the e-mail", () => {
  it("states the period, the figures, the benchmarks, the links and the safety notice", () => {
    const mail = buildMonthlyReportMail(db, 1, "2026-03", { now: Date.UTC(2026, 3, 1, 2), baseUrl: "https://airkeep.example.test/" })!;
    // Nothing was recorded at Kiwi Dive in March: the mail says so instead of claiming 0.00 % availability.
    expect(mail.subject).toBe("Airkeep monthly report, March 2026 — Kiwi Dive: no data recorded this month");
    expect(mail.text).toContain("No readings and no planned service were recorded at this site in this period");
    expect(mail.text).toContain("Availability (planned service counted as down): no data");
    expect(mail.text).toContain("K-1: availability no data,");
    expect(mail.text).not.toContain("0.00 %");
    expect(mail.html).not.toContain("0.00 %");
    expect(mail.text).toContain("Period: March 2026 in Pacific/Auckland: 2026-03-01 00:00 to 2026-04-01 00:00 local time, 744 h");
    expect(mail.text).toContain("No data (offline): 744.0 h");
    expect(mail.text).toContain("Down: planned service: 0.0 h — No planned service recorded.");
    expect(mail.text).toContain("Full report: https://airkeep.example.test/reports?month=2026-03&scope=site-1");
    expect(mail.text).toContain("Average alarm rate per operator position: 0.00 per hour");
    expect(mail.text).toContain(SAFETY_NOTICE);
    expect(mail.html).toContain("<h1");
    expect(mail.html).toContain("Kiwi Dive");
    expect(mail.html).not.toContain("<script");
    expect(buildMonthlyReportMail(db, 99, "2026-03")).toBeNull();
  });

  it("with some data, gives the availability; a compressor without data reads \"no data\"", () => {
    // Coast Station (Los Angeles, March 2026 = 743 h): C-1 in standby for the first 10 h (a reading a minute,
    // written through the reading store), nothing after. Availability = 10 h / 743 h (a lower bound: the rest has no data).
    const start = Date.UTC(2026, 2, 1, 8); // 1 March 00:00 PST
    const rows = Array.from({ length: 601 }, (_, i) => ({
      compressorId: 2, ts: start + i * 60_000, seq: i + 1, deliveryBar: 280, stage1Bar: null, stage2Bar: null, stage3Bar: null, stage4Bar: null,
      stage1C: 20, stage2C: 20, stage3C: 20, stage4C: null, oilBar: 0, purifierC: 15, intakeC: 15, runState: 1, motorOn: 0, hourMeterH: 100, starts: 5, tripCode: null,
    }));
    createReadingStore(db).insert(rows, { keepRaw: false });
    const mail = buildMonthlyReportMail(db, 2, "2026-03", { now: Date.UTC(2026, 3, 1, 10) })!;
    expect(mail.subject).toBe(`Airkeep monthly report, March 2026 — Coast Station: availability ${((10 / 743) * 100).toFixed(2)} %`);
    expect(mail.text).not.toContain("No readings and no planned service");
  });

  it("waits while history is still being written (the demo's backfill), then queues", () => {
    const at = Date.UTC(2026, 3, 1, 10);
    markHistoryBackfill(db, 4242, at - 60_000);
    expect(queueMonthlyReportMails(db, at, { from: "Airkeep <reports@airkeep.example.test>", alive: (pid) => pid === 4242 })).toEqual({
      reports: 0,
      queued: 0,
      deferred: "history-backfill",
    });
    expect(db.$client.prepare("SELECT COUNT(*) AS n FROM mail_outbox").get()).toEqual({ n: 0 });
    // A mark left by a process that died does not hold the reports back for ever.
    expect(queueMonthlyReportMails(db, at, { from: "x@airkeep.example.test", alive: () => false })).toEqual({ reports: 2, queued: 3 });
    db.$client.prepare("DELETE FROM mail_outbox").run();
    clearHistoryBackfill(db);
  });

  it("queues one message per manager, once", () => {
    const at = Date.UTC(2026, 3, 1, 10);
    expect(queueMonthlyReportMails(db, at, { from: "Airkeep <reports@airkeep.example.test>" })).toEqual({ reports: 2, queued: 3 });
    const keys = (db.$client.prepare("SELECT key, to_address AS to_ FROM mail_outbox ORDER BY key").all() as { key: string; to_: string }[]).map((r) => [r.key, r.to_]);
    expect(keys).toEqual([
      [recipientKey(1, "2026-03", 1), "maya@example.test"],
      [recipientKey(1, "2026-03", 2), "kai@example.test"],
      [recipientKey(2, "2026-03", 1), "maya@example.test"],
    ]);
    expect(recipientKey(1, "2026-03", 2)).toBe("report:1:2026-03:to:u2");
    expect(queueMonthlyReportMails(db, at + 600_000, { from: "Airkeep <reports@airkeep.example.test>" })).toEqual({ reports: 0, queued: 0 });
  });
});
