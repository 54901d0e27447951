import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openDatabase, type Db } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { alarmLoad, buildMonthlyReport } from "@/db/reports";
import { assessAlarmLoad } from "@/shared/alarm-load";
import { monthWindow } from "@/shared/month";

// Alarm load on a constructed alarm stream at one site in June 2026 (Europe/London, UTC+1, 720 h), every answer
// worked out by hand below. The benchmarks themselves (ISA-18.2 / EEMUA 191) are in shared/alarm-load.ts with
// their sources; here only the counting is checked.

const H = 3_600_000;
const L = (d: number, h: number) => Date.UTC(2026, 5, d) + h * H - H; // June 2026 local (BST) → UTC ms
const NOW = Date.UTC(2026, 6, 5);

let db: Db;

type A = { c: number; site?: number; key: string; priority: "critical" | "warning" | "advisory"; at: number; cleared?: number | null; chattering?: boolean };

function insert(a: A) {
  const open = a.cleared === null;
  db.$client
    .prepare(
      `INSERT INTO alarms (compressor_id, site_id, key, priority, state, active, raised_at, cleared_at, chattering, updated_at)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    )
    .run(a.c, a.site ?? 1, a.key, a.priority, open ? "active-acknowledged" : "normal", open ? 1 : 0, a.at, open ? null : (a.cleared ?? a.at + 60_000), a.chattering ? 1 : 0, a.at);
}

beforeAll(() => {
  db = openDatabase(":memory:");
  runMigrations(db);
  const s = db.$client;
  s.prepare("INSERT INTO sites (id, name, code, time_zone, created_at) VALUES (1, 'Harbour', 'harbour', 'Europe/London', 0), (2, 'Ridge', 'ridge', 'Europe/Oslo', 0)").run();
  s.prepare("INSERT INTO compressor_models (id, name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES (1, 'M', 4, 300, 420, 0)").run();
  for (const [id, site] of [
    [1, 1],
    [2, 1],
    [3, 2],
  ]) {
    s.prepare(
      "INSERT INTO compressors (id, site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at) VALUES (?, ?, 1, ?, ?, ?, 300, 270, 0, 0)",
    ).run(id, site, `C${id}`, `S${id}`, `d${id}`);
  }
  // A. Flood: 12 warnings from C1 within 14:00–14:09 on 3 June, one every 45 s; 4 of them marked chattering.
  for (let i = 0; i < 12; i++) insert({ c: 1, key: "finalStageC.high.warning", priority: "warning", at: L(3, 14) + i * 45_000, chattering: i >= 8 });
  // B. Exactly 10 advisories from C2 in 09:00–09:09 on 8 June: not more than 10, so not a flood period.
  for (let i = 0; i < 10; i++) insert({ c: 2, key: "deliveryBar.low.advisory", priority: "advisory", at: L(8, 9) + i * 60_000 });
  // C. One advisory from C1 every day at 06:00 (30).
  for (let d = 1; d <= 30; d++) insert({ c: 1, key: "intakeC.high.advisory", priority: "advisory", at: L(d, 6) });
  // D. Three trips of C2 (critical) at noon on 10, 15, 20 June.
  for (const d of [10, 15, 20]) insert({ c: 2, key: "trip", priority: "critical", at: L(d, 12) });
  // E. Two communication losses of C1 (warning).
  for (const d of [12, 25]) insert({ c: 1, key: "comms", priority: "warning", at: L(d, 3) });
  // Stale candidates:
  // S1 raised 30 May 12:00, cleared 2 June 18:00: stale from 31 May 12:00 — present on 1 and 2 June; raised in May, so not counted.
  insert({ c: 1, key: "purifierC.high.warning", priority: "warning", at: L(0, 12) - 24 * H, cleared: L(2, 18) });
  // S2 active 12 h on 10 June: not stale.
  insert({ c: 2, key: "stage1C.high.advisory", priority: "advisory", at: L(10, 0), cleared: L(10, 12) });
  // S3 raised 20 June 06:00 and still active: stale from 21 June 06:00 to the end of the month.
  insert({ c: 2, key: "oilBar.low.critical", priority: "critical", at: L(20, 6), cleared: null });
  // S4 raised 1 June 00:30, cleared 3 June 00:30 (48 h): stale from 2 June 00:30 to 3 June 00:30.
  insert({ c: 1, key: "intakeC.low.advisory", priority: "advisory", at: L(1, 0.5), cleared: L(3, 0.5) });
  // Outside: another site, the minute before the month, the first minute after it.
  insert({ c: 3, site: 2, key: "trip", priority: "critical", at: L(15, 12) });
  insert({ c: 1, key: "deliveryBar.high.advisory", priority: "advisory", at: L(1, 0) - 60_000 });
  insert({ c: 1, key: "deliveryBar.high.advisory", priority: "advisory", at: L(31, 0) });
});

afterAll(() => db.$client.close());

const june = () => monthWindow("2026-06", "Europe/London");

describe("alarm load of one site and month (constructed stream, answers computed by hand)", () => {
  it("counts and rates: 60 alarms in 720 h at one operator position", () => {
    // 12 + 10 + 30 + 3 + 2 + S2 + S3 + S4 = 60.
    const f = alarmLoad(db, 1, june(), 1, NOW);
    expect(f.alarms).toBe(60);
    expect(f.periodS).toBe(720 * 3600);
    expect(f.perHour).toBeCloseTo(60 / 720, 12);
    expect(f.perDay).toBeCloseTo(2, 12);
    // critical: 3 trips + S3 = 4; warning: 12 + 2 = 14; advisory: 10 + 30 + S2 + S4 = 42.
    expect(f.byPriority).toEqual({ critical: 4, warning: 14, advisory: 42 });
    expect(f.priorityShare!.critical).toBeCloseTo(4 / 60, 12);
    expect(f.priorityShare!.advisory).toBeCloseTo(0.7, 12);
  });

  it("floods on a sliding window: one flood, 14:07:30 to 14:15:15 on 3 June; the busiest 10 minutes hold 12 from 14:00", () => {
    // The 11th of the 12 (14:00 + 10 × 45 s) takes the rate above 10; it falls below 5 when the 8th (14:05:15) ages
    // out at 14:15:15 (ISA-18.2 start/end rule, from memory). The 10 advisories on 8 June never exceed 10.
    const f = alarmLoad(db, 1, june(), 1, NOW);
    expect(f.floods).toBe(1);
    expect(f.floodS).toBe(465);
    expect(f.floodShare).toBeCloseTo(465 / (720 * 3600), 12);
    expect(f.peakTenMinute).toBe(12);
    expect(f.peakTenMinuteAt).toBe(L(3, 14));
  });

  it("18 alarms in 9 minutes across a bucket edge is a flood", () => {
    // Ridge (Europe/Oslo, UTC+2 in June): 9 alarms 14:05:30–14:09:30 and 9 more 14:10:00–14:14:00 local on 22 June.
    // Fixed 10-minute buckets from the start of the month hold 9 each (no flood); the sliding window holds all 18.
    const O = (d: number, h: number) => Date.UTC(2026, 5, d) + h * H - 2 * H;
    const first = O(22, 14) + 5.5 * 60_000;
    for (let i = 0; i < 18; i++) insert({ c: 3, site: 2, key: "stage2C.high.warning", priority: "warning", at: first + i * 30_000 });
    const f = alarmLoad(db, 2, monthWindow("2026-06", "Europe/Oslo"), 1, NOW);
    expect(f.floods).toBe(1);
    // From the 11th alarm (14:10:30) until the 14th ages out (14:12:00 + 10 min = 14:22:00): 690 s.
    expect(f.floodS).toBe(690);
    expect(f.peakTenMinute).toBe(18);
    expect(f.peakTenMinuteAt).toBe(first);
    const verdicts = Object.fromEntries(assessAlarmLoad(f).map((r) => [r.id, r.verdict]));
    expect(verdicts.peak).toBe("above");
    // Two operator positions share it: 18 is below 2 × 10, no flood per position.
    expect(alarmLoad(db, 2, monthWindow("2026-06", "Europe/Oslo"), 2, NOW).floods).toBe(0);
  });

  it("ten most frequent: 8 distinct alarms, so they are all 60 (100 %)", () => {
    const f = alarmLoad(db, 1, june(), 1, NOW);
    expect(f.top.map((t) => [t.compressorId, t.key, t.count])).toEqual([
      [1, "intakeC.high.advisory", 30],
      [1, "finalStageC.high.warning", 12],
      [2, "deliveryBar.low.advisory", 10],
      [2, "trip", 3],
      [1, "comms", 2],
      [1, "intakeC.low.advisory", 1],
      [2, "oilBar.low.critical", 1],
      [2, "stage1C.high.advisory", 1],
    ]);
    expect(f.top[0]!.share).toBeCloseTo(0.5, 12);
    expect(f.topShare).toBe(1);
  });

  it("chattering and stale alarms", () => {
    const f = alarmLoad(db, 1, june(), 1, NOW);
    expect(f.chatteringOccurrences).toBe(4);
    expect(f.chatteringAlarms).toBe(1);
    // S1, S3 and S4 were stale during June; on 2 June S1 and S4 both were: at most 2 on one day.
    expect(f.stale.map((s) => s.key).sort()).toEqual(["intakeC.low.advisory", "oilBar.low.critical", "purifierC.high.warning"]);
    expect(f.staleAlarms).toBe(3);
    expect(f.staleMaxOnOneDay).toBe(2);
  });

  it("against the benchmarks: rate, flood share and stale within; peak, top ten, chattering and priority split above", () => {
    // Flood share 465 s of 720 h = 0.018 % < 1 %.
    const verdicts = Object.fromEntries(assessAlarmLoad(alarmLoad(db, 1, june(), 1, NOW)).map((r) => [r.id, r.verdict]));
    expect(verdicts).toEqual({ rate: "within", flood: "within", peak: "above", top10: "above", chattering: "above", stale: "within", priority: "above" });
  });

  it("shares the load between configured operator positions", () => {
    db.$client.prepare("INSERT INTO settings (key, value) VALUES ('reports.operator_positions', '{\"1\": 2}')").run();
    const r = buildMonthlyReport(db, { month: "2026-06", scope: { kind: "site", siteId: 1 }, siteIds: null, now: NOW })!;
    const f = r.alarmLoad[0]!.figures;
    expect(f.positions).toBe(2);
    expect(f.perHour).toBeCloseTo(60 / 720 / 2, 12);
    db.$client.prepare("DELETE FROM settings WHERE key = 'reports.operator_positions'").run();
  });

  it("a compressor's report counts only its own alarms", () => {
    // C2: 10 + 3 trips + S2 + S3 = 15; its only stale alarm is S3.
    const f = alarmLoad(db, 1, june(), 1, NOW, { compressorId: 2 });
    expect(f.alarms).toBe(15);
    expect(f.staleAlarms).toBe(1);
    expect(f.peakTenMinute).toBe(10);
    expect(f.floods).toBe(0);
  });
});
