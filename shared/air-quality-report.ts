/** The monthly report's air-quality figures per site: tests due, done, passed, failed, overdue days, cartridge changes. */
import { DAY_MS } from "./purifier";

export type AirQualityReportSite = {
  siteId: number;
  siteName: string;
  /** Compressors whose test fell due before the month ended (at most one per compressor). */
  due: number;
  done: number;
  passed: number;
  failed: number;
  /** Compressor-days without a valid test within the month (up to now for the current month). */
  overdueDays: number;
  cartridgeChanges: number;
};

export type AirMonthInput = {
  from: number;
  to: number;
  now: number;
  intervalDays: number;
  /** Since when the compressor counts (its creation). */
  since: number;
  /** This compressor's test times (all before `to`), oldest first, with results. */
  tests: readonly { sampledAt: number; passed: boolean }[];
};

/** One compressor's month: due (0/1), done, passed, failed, overdue days. */
export function airMonthOf(m: AirMonthInput): { due: number; done: number; passed: number; failed: number; overdueDays: number } {
  const intervalMs = m.intervalDays * DAY_MS;
  const before = m.tests.filter((t) => t.sampledAt < m.from);
  const inMonth = m.tests.filter((t) => t.sampledAt >= m.from && t.sampledAt < m.to);
  let dueAt = (before.at(-1)?.sampledAt ?? m.since) + intervalMs;
  const end = Math.min(m.to, m.now);
  let overdueMs = 0;
  let cursor = m.from;
  for (const t of inMonth) {
    overdueMs += Math.max(0, t.sampledAt - Math.max(dueAt, cursor));
    cursor = t.sampledAt;
    dueAt = t.sampledAt + intervalMs;
  }
  overdueMs += Math.max(0, end - Math.max(dueAt, cursor));
  const firstDue = (before.at(-1)?.sampledAt ?? m.since) + intervalMs;
  return {
    due: firstDue < m.to ? 1 : 0,
    done: inMonth.length,
    passed: inMonth.filter((t) => t.passed).length,
    failed: inMonth.filter((t) => !t.passed).length,
    overdueDays: Math.round((overdueMs / DAY_MS) * 10) / 10,
  };
}
