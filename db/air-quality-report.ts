import { airMonthOf, type AirQualityReportSite } from "@/shared/air-quality-report";
import { airTestsBefore, allSiteAirSettings, cartridgeChangesBetween, DEFAULT_INTERVAL_DAYS } from "./air-quality";
import type { Db } from "./client";

type Period = { siteId: number; siteName: string; from: number; to: number };
type Unit = { id: number; siteId: number };

/** The report's air-quality section for the scope's compressors, one row per site period (its own month window). */
export function airQualityReportSection(db: Db, periods: readonly Period[], compressors: readonly (Unit & { createdAt?: number })[], now: number): AirQualityReportSite[] {
  const settings = allSiteAirSettings(db);
  const maxTo = Math.max(0, ...periods.map((p) => p.to));
  const tests = airTestsBefore(db, maxTo);
  const created = new Map(
    (db.$client.prepare("SELECT id, created_at AS createdAt FROM compressors").all() as { id: number; createdAt: number }[]).map((r) => [r.id, r.createdAt]),
  );
  return periods.map((p) => {
    const row: AirQualityReportSite = { siteId: p.siteId, siteName: p.siteName, due: 0, done: 0, passed: 0, failed: 0, overdueDays: 0, cartridgeChanges: 0 };
    const units = compressors.filter((c) => c.siteId === p.siteId);
    const ids = new Set(units.map((u) => u.id));
    for (const u of units) {
      const m = airMonthOf({
        from: p.from,
        to: p.to,
        now,
        intervalDays: settings.get(p.siteId)?.intervalDays ?? DEFAULT_INTERVAL_DAYS,
        since: created.get(u.id) ?? p.from,
        tests: tests.filter((t) => t.compressorId === u.id && t.sampledAt < p.to),
      });
      row.due += m.due;
      row.done += m.done;
      row.passed += m.passed;
      row.failed += m.failed;
      row.overdueDays = Math.round((row.overdueDays + m.overdueDays) * 10) / 10;
    }
    row.cartridgeChanges = cartridgeChangesBetween(db, p.from, p.to).filter((c) => ids.has(c.compressorId)).length;
    return row;
  });
}
